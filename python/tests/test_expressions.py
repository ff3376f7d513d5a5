"""Expressions through Python: simplification with verified steps, checks
with verdicts, counterexamples and typed diagnoses, recoupling, exact
evaluation, LaTeX, SymPy conversion and the exceptions."""

from fractions import Fraction

import numpy as np
import pytest
import sympy
import sympy.physics.wigner

import recoup


def test_simplify_returns_a_verified_result_with_sourced_steps():
    # sum over x of (2x+1) {a b x; a b c} = (-1)^(2c) tri(a, b, c)
    # (Edmonds 1957, eq. 6.2.9 with the orthogonality 6.2.9/6.2.10,
    # from memory)
    e = recoup.Expression("sum(x: (2*x+1) {a, b, x; a, b, c})")
    s = e.simplify()
    assert str(s.result) == "(-1)^(2*c) tri(a, b, c)"
    assert s.verified.checked >= 40 and s.verified.nonzero > 0 and s.verified.whole
    assert s.steps and all(st.checked > 0 for st in s.steps)
    assert any(st.reference.citations for st in s.steps)
    # the result is an Expression with the input's value at a point
    at = dict(a=1, b="1/2", c=Fraction(1, 2))
    assert s.result.value(**at) == e.value(**at)


def test_a_wrong_phase_is_caught_and_diagnosed():
    # the 3j symbol under exchange of its first two columns takes the phase
    # (-1)^(a+b+c) (Edmonds 1957, eq. 3.7.5, from memory); the claim
    # without it is false for odd a+b+c
    lhs = recoup.Expression("(a, b, c; m1, m2, m3)")
    r = lhs.check("(b, a, c; m2, m1, m3)")
    assert r.verdict == "different" and not r.equal and not r
    assert r.counterexample is not None and r.counterexample.lhs != r.counterexample.rhs
    assert r.diagnosis is not None and "phase" in r.diagnosis.findings
    fixed = lhs.check(r.diagnosis.repaired)
    assert fixed.verdict == "equal" and fixed


def test_a_vanishing_claim_is_not_established():
    r = recoup.Expression("(1, 1, 1; 0, 0, 0) a").check("0", max_j=2)
    assert r.verdict == "not-established"


def test_declarations_reach_the_phase_lattice():
    # the scalar product of two rank-k tensors needs k integer (Edmonds
    # 1957, eq. 7.1.6 context); declared, the phase (-1)^k is an integer
    text = "sum(q: (-1)^q (a, k, b; 0, q, -q) (a, k, b; 0, -q, q))"
    with pytest.raises(recoup.InputError, match="declare so"):
        recoup.Expression(text).value(a=1, b="1/2", k="1/2")
    e = recoup.Expression(text, integer="k")
    assert e.declared == "integer k;"
    s = e.simplify()
    assert s.result.value(a=1, b=1, k=1) == e.value(a=1, b=1, k=1)
    with pytest.raises(recoup.InputError, match="declared integer"):
        e.value(a=1, b="1/2", k="1/2")


def test_recouple_gives_the_9j_of_ls_to_jj():
    r = recoup.recouple("((l1, l2) L, (s1, s2) S) J", "((l1, s1) j1, (l2, s2) j2) J")
    assert r.nine_j == 1 and r.sums == 0
    assert r.verified.checked > 0 and "overlap" in r.verified.against
    # the 9j form of the LS-jj coefficient (Edmonds 1957, eq. 6.4.2, from
    # memory): hats of j1, j2, L, S times the 9j, in some arrangement
    point = dict(l1=1, l2=1, s1="1/2", s2="1/2", L=1, S=1, j1="3/2", j2="1/2", J=2)
    v = r.result.value(**point)
    ref = sympy.sqrt(4 * 2 * 3 * 3) * sympy.physics.wigner.wigner_9j(
        1, sympy.Rational(1, 2), sympy.Rational(3, 2), 1, sympy.Rational(1, 2),
        sympy.Rational(1, 2), 1, 1, 2, prec=None)
    assert abs(float(v) - float(ref)) < 1e-14


def test_to_sympy_keeps_the_value_and_the_argument_order():
    r = recoup.recouple("((a, b) x, c) J", "(a, (b, c) y) J")
    expr = r.result.to_sympy()
    point = dict(a=1, b=Fraction(1, 2), c=1, x=Fraction(3, 2), y=Fraction(1, 2), J=Fraction(3, 2))
    subs = {sympy.Symbol(k): sympy.Rational(v.numerator, v.denominator) if isinstance(v, Fraction)
            else v for k, v in point.items()}
    from_sympy = expr.subs(subs).doit()
    assert abs(float(from_sympy) - float(r.result.value(**point))) < 1e-14
    # an expression with a sum is refused with a reason
    with pytest.raises(recoup.InputError, match="sums over"):
        recoup.Expression("sum(m: (j, j, 0; m, -m, 0))").to_sympy()
    # Exact converts exactly
    assert recoup.exact_3j(1, 1, 0, 0, 0, 0).to_sympy() == -sympy.sqrt(3) / 3


def test_latex_and_jupyter_forms():
    e = recoup.Expression("hat(j12) {j1, j2, j12; j3, J, j23}")
    assert "j_{12}" in e.latex()
    assert e._repr_latex_().startswith("$") and e._repr_latex_().endswith("$")
    s = e.simplify()
    assert s._repr_latex_().startswith("$")
    # -sqrt(1/3) = -(1/3) sqrt(3)
    assert recoup.exact_3j(1, 1, 0, 0, 0, 0)._repr_latex_() == "$-\\frac{1}{3}\\sqrt{3}$"


def test_errors_carry_kind_and_position():
    with pytest.raises(recoup.ParseError) as err:
        recoup.Expression("{a, b, c;\n d, e, $}")
    assert (err.value.line, err.value.column) == (2, 8)
    assert isinstance(err.value, ValueError)
    with pytest.raises(recoup.InputError, match="has no value"):
        recoup.Expression("(a, 1, a; 0, 0, 0)").value()
    with pytest.raises(recoup.InputError):
        recoup.Expression("a", integer="a", half_odd="a")
    with pytest.raises(recoup.InputError):
        recoup.Expression(42)
    with pytest.raises(recoup.RecoupError):
        recoup.recouple("((a, b) x, c) J", "((a, b) x, d) J")
    with pytest.raises(recoup.LimitError, match="time limit"):
        recoup.recouple(
            "((((((a, b) p, c) q, d) r, e) s, f) t, g) J",
            "((((((g, f) u, e) v, d) w, c) y, b) z, a) J",
            time_limit=0.01,
        )


def test_bad_settings_are_refused():
    e = recoup.Expression("a")
    for bad in (-1, 0, float("nan"), float("inf"), "10", True):
        with pytest.raises(recoup.InputError, match="time_limit"):
            e.value(a=1, time_limit=bad)
    with pytest.raises(recoup.InputError, match="time_limit"):
        recoup.recouple("((a, b) x, c) J", "(a, (b, c) y) J", time_limit=-1)
    with pytest.raises(recoup.InputError, match="at most 20"):
        e.check("a", max_j=100)
    with pytest.raises(recoup.InputError):
        recoup.float_3j(np.array([1 + 2j]), 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError, match="got 'x'"):
        recoup.float_3j(np.array(["1/2", "x"], dtype=object), 1, 1, 0, 0, 0)
    with pytest.raises(recoup.ParseError, match="deeper than 200"):
        recoup.Expression("(" * 5000 + "a" + ")" * 5000)
    with pytest.raises(recoup.ParseError, match="longer than"):
        recoup.Expression("x" * 2_000_000)


def test_primed_names_through_a_dict():
    e = recoup.Expression("delta(j, j') (j, 1, j'; 0, 0, 0)")
    assert e.value({"j": 1, "j'": 1}) == 0
    assert e.value_float({"j": 1, "j'": 1}) == 0.0
