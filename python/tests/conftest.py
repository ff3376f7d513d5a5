"""Test header: the outside reference's version, printed with the run."""

import sympy


def pytest_report_header(config):
    return f"outside reference: SymPy {sympy.__version__} (sympy.physics.wigner)"
