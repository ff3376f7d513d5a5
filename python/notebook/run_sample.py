"""Executes samples/toy-trion.ipynb headless in a real Jupyter kernel
(nbclient); any cell that raises fails the run (exit 1)."""

import pathlib
import sys

import nbformat
from nbclient import NotebookClient
from nbclient.exceptions import CellExecutionError


def main():
    path = pathlib.Path(__file__).resolve().parents[2] / "samples" / "toy-trion.ipynb"
    nb = nbformat.read(path, as_version=4)
    try:
        NotebookClient(nb, timeout=600, kernel_name="python3").execute()
    except CellExecutionError as e:
        print(f"{path.name}: a cell failed:\n{e}", file=sys.stderr)
        return 1
    cells = sum(1 for c in nb.cells if c.cell_type == "code")
    print(f"{path.name}: {cells} code cells ran without error")
    return 0


if __name__ == "__main__":
    sys.exit(main())
