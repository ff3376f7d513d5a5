"""Writes samples/toy-trion.ipynb, the sample notebook (an invented
scenario of our own), from the cells below. Run it after editing them:
python python/notebook/make_sample.py"""

import pathlib

import nbformat

CELLS = [
    ("markdown", """# A toy trion with recoup

An invented scenario: a made-up "trion" of three spin-1/2 constituents
with spins `s1, s2, s3`, whose model couples them in two ways. We derive
the overlap of the two schemes, check a hand formula, simplify a sum that
the model's normalisation needs, and evaluate symbols in bulk with NumPy.
Every result recoup returns has been verified by exact evaluation."""),
    ("code", """import numpy as np
import recoup"""),
    ("markdown", "The overlap of the two coupling schemes: a 6j symbol with its hats and phase."),
    ("code", """r = recoup.recouple("((s1, s2) S12, s3) S", "(s1, (s2, s3) S23) S")
print(r.result, "| sums:", r.sums, "| verified at", r.verified.checked, "points")
r.result"""),
    ("code", """# its value for the three spins 1/2, S12 = 1, S23 = 0, S = 1/2
v = r.result.value(s1="1/2", s2="1/2", s3="1/2", S12=1, S23=0, S="1/2")
print(v, float(v))
assert abs(float(v) ** 2 - 0.75) < 1e-15  # |<(11/2)1/2 | 1/2 (0) 1/2>|^2 = 3/4"""),
    ("markdown", "A hand formula for the same overlap, written without its phase, is caught and repaired."),
    ("code", """hand = recoup.Expression("hat(S12) hat(S23) {s1, s2, S12; s3, S, S23}")
report = r.result.check(hand)
print(report.verdict, report.diagnosis.findings)
print("repaired:", report.diagnosis.repaired)
assert report.verdict == "different" and "phase" in report.diagnosis.findings
assert r.result.check(report.diagnosis.repaired).equal"""),
    ("markdown", "The normalisation of the model sums a product of two 3j symbols over both projections."),
    ("code", """norm = recoup.Expression("sum(m1, m2: (s1, s2, S12; m1, m2, -M) (s1, s2, S12'; m1, m2, -M))")
s = norm.simplify()
for step in s.steps:
    print(step.rule, "--", step.source)
s.result"""),
    ("markdown", "Bulk values for the model's numeric part: every 3j with j1 = j2 up to 40 and zero projections, as one NumPy call."),
    ("code", """j = np.arange(0, 41)
J1, J3 = np.meshgrid(j, np.arange(0, 81), indexing="ij")
table = recoup.float_3j(J1, J1, J3, 0, 0, 0)
print(table.shape, table.dtype)
# orthogonality: sum over j3 of (2 j3 + 1) (j1 j1 j3; 0 0 0)^2 = 1
sums = ((2 * J3 + 1) * table**2).sum(axis=1)
assert np.allclose(sums, 1.0, atol=1e-12)"""),
    ("markdown", "The overlap handed on to SymPy for further work."),
    ("code", """expr = r.result.to_sympy()
expr"""),
]


def main():
    nb = nbformat.v4.new_notebook()
    for kind, text in CELLS:
        maker = nbformat.v4.new_markdown_cell if kind == "markdown" else nbformat.v4.new_code_cell
        nb.cells.append(maker(text))
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3", "language": "python"}
    out = pathlib.Path(__file__).resolve().parents[2] / "samples" / "toy-trion.ipynb"
    nbformat.write(nb, out)
    print(out)


if __name__ == "__main__":
    main()
