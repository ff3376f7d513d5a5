"""Symbol values through Python: exact values against SymPy's
sympy.physics.wigner (the outside reference; its version is printed in the
test header by conftest.py), floats against the exact values, NumPy
broadcasting, dtypes and bad input."""

from fractions import Fraction
import itertools
import random
import threading
import time

import numpy as np
import pytest
import sympy
from sympy.physics import wigner

import recoup

HALVES = [Fraction(k, 2) for k in range(0, 5)]  # 0 .. 2


def same_exact(ours, theirs):
    """Our Exact equals SymPy's exact number (both are signed square roots
    of rationals: compare sign and square exactly)."""
    theirs = sympy.nsimplify(theirs) if theirs != 0 else sympy.Integer(0)
    if theirs == 0:
        return ours.is_zero()
    square = sympy.Rational(theirs**2)
    sign = 1 if theirs > 0 else -1
    s = ours.squared()
    return Fraction(int(square.p), int(square.q)) * sign == s


def sym(q):
    return sympy.Rational(q.numerator, q.denominator)


def test_every_3j_up_to_j_2_equals_sympy():
    # source: sympy.physics.wigner.wigner_3j (SymPy, version in the header)
    count = 0
    for j1, j2, j3 in itertools.product(HALVES, repeat=3):
        for m1 in [j1 - k for k in range(int(2 * j1) + 1)]:
            for m2 in [j2 - k for k in range(int(2 * j2) + 1)]:
                m3 = -m1 - m2
                if abs(m3) > j3 or (j3 - m3).denominator != 1:
                    continue
                ref = wigner.wigner_3j(sym(j1), sym(j2), sym(j3), sym(m1), sym(m2), sym(m3))
                ours = recoup.exact_3j(j1, j2, j3, m1, m2, m3)
                assert same_exact(ours, ref), (j1, j2, j3, m1, m2, m3, ours, ref)
                assert abs(float(ours) - float(ref)) < 1e-15
                count += 1
    assert count > 300


def test_clebsch_gordan_equals_sympy():
    # source: sympy.physics.wigner.clebsch_gordan
    rng = random.Random(4)
    for _ in range(300):
        j1, j2 = rng.choice(HALVES), rng.choice(HALVES)
        j = rng.choice([abs(j1 - j2) + k for k in range(int(j1 + j2 - abs(j1 - j2)) + 1)])
        m1 = j1 - rng.randint(0, int(2 * j1))
        m2 = j2 - rng.randint(0, int(2 * j2))
        m = m1 + m2
        if abs(m) > j:
            continue
        ref = wigner.clebsch_gordan(sym(j1), sym(j2), sym(j), sym(m1), sym(m2), sym(m))
        ours = recoup.exact_cg(j1, m1, j2, m2, j, m)
        assert same_exact(ours, ref), (j1, m1, j2, m2, j, m)


def triad(a, b, c):
    return abs(a - b) <= c <= a + b and (a + b + c).denominator == 1


def test_every_admissible_6j_up_to_2_and_random_9j_equal_sympy():
    # source: sympy.physics.wigner.wigner_6j and wigner_9j
    seen6 = 0
    for a in itertools.product(HALVES, repeat=6):
        j1, j2, j3, j4, j5, j6 = a
        if not (triad(j1, j2, j3) and triad(j1, j5, j6) and triad(j4, j2, j6)
                and triad(j4, j5, j3)):
            continue
        ref = wigner.wigner_6j(*map(sym, a))
        assert same_exact(recoup.exact_6j(*a), ref), a
        seen6 += 1
    rng = random.Random(7)
    seen9 = 0
    while seen9 < 40:
        a = [rng.choice(HALVES) for _ in range(9)]
        rows = [a[0:3], a[3:6], a[6:9]]
        cols = [a[0::3], a[1::3], a[2::3]]
        if not all(triad(*t) for t in rows + cols):
            continue
        ref = wigner.wigner_9j(*map(sym, a), prec=None)
        assert same_exact(recoup.exact_9j(*a), ref), a
        seen9 += 1
    assert seen6 > 500


def test_floats_agree_with_exact_values_over_an_array():
    rng = np.random.default_rng(3)
    tj = rng.integers(0, 41, size=(2000, 3))
    tm1 = np.array([j - 2 * rng.integers(0, j + 1) for j in tj[:, 0]])
    tm2 = np.array([j - 2 * rng.integers(0, j + 1) for j in tj[:, 1]])
    tm3 = -tm1 - tm2
    vals = recoup.float_3j(tj[:, 0], tj[:, 1], tj[:, 2], tm1, tm2, tm3, doubled=True)
    assert vals.shape == (2000,) and vals.dtype == np.float64
    for i in range(0, 2000, 37):
        e = recoup.exact_3j(*(Fraction(int(x), 2) for x in (*tj[i], tm1[i], tm2[i], tm3[i])))
        assert abs(vals[i] - float(e)) <= 1e-13 * max(1.0, abs(float(e)))


def test_broadcasting_shapes_and_dtypes():
    j = np.arange(0, 6).reshape(3, 2)
    out = recoup.float_6j(j, 1, 1, 1, 1, 1)
    assert out.shape == (3, 2)
    col = np.array([[1], [2], [3]])
    row = np.array([1, 2])
    assert recoup.float_3j(col, row, 2, 0, 0, 0).shape == (3, 2)
    # scalars give a Python float
    v = recoup.float_3j(1, 1, 0, 0, 0, 0)
    assert isinstance(v, float) and abs(v + 1 / np.sqrt(3)) < 1e-15
    # integer, float, half-integer floats, doubled ints and Fractions agree
    a = recoup.float_cg(0.5, 0.5, 0.5, -0.5, 1, 0)
    b = recoup.float_cg(1, 1, 1, -1, 2, 0, doubled=True)
    c = recoup.float_cg("1/2", Fraction(1, 2), 0.5, -0.5, 1, 0)
    assert a == b == c and abs(a - np.sqrt(0.5)) < 1e-15
    # unsigned and 32-bit inputs, non-contiguous views
    u = np.arange(0, 8, dtype=np.uint32)[::2]
    assert recoup.float_6j(u, u, u, u, u, u).shape == (4,)
    big = np.zeros((5, 9), dtype=np.int32)
    assert recoup.float_9j(*big.T).shape == (5,)
    # an empty array gives an empty result
    assert recoup.float_3j(np.array([], dtype=int), 1, 1, 0, 0, 0).shape == (0,)


def test_selection_rules_give_zero_not_errors():
    assert recoup.float_3j(1, 1, 3, 0, 0, 0) == 0.0  # triangle broken
    assert recoup.float_3j(1, 1, 1, 2, -2, 0) == 0.0  # |m| > j
    assert recoup.exact_6j(1, 1, 3, 1, 1, 1).is_zero()


def test_bad_input_raises_with_its_reason():
    with pytest.raises(recoup.InputError, match="multiple of 1/2|multiples of 1/2"):
        recoup.float_3j(0.3, 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError, match="element 2"):
        recoup.float_6j(np.array([1, 1, -1]), 1, 1, 1, 1, 1)
    with pytest.raises(ValueError):  # InputError is a ValueError
        recoup.exact_3j(-1, 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError, match="broadcast"):
        recoup.float_3j(np.zeros(3), np.zeros(4), 0, 0, 0, 0)
    with pytest.raises(recoup.InputError):
        recoup.float_3j(True, 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError):
        recoup.float_3j(np.nan, 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError):
        recoup.exact_3j("x", 1, 1, 0, 0, 0)
    with pytest.raises(recoup.InputError):
        recoup.float_3j(1.5, 1, 1, 0, 0, 0, doubled=True)
    with pytest.raises(recoup.LimitError):
        recoup.float_3j(2**50, 1, 1, 0, 0, 0)
    with pytest.raises(recoup.LimitError):
        recoup.float_9j(*([10**4] * 9))
    with pytest.raises(recoup.LimitError):
        recoup.exact_3j(30000, 30000, 0, 0, 0, 0)


def test_large_arrays_release_the_gil():
    """While one thread evaluates a large array natively, another thread
    keeps running Python: the longest pause of the Python loop is far
    shorter than the native call (with the GIL held it would be the whole
    call). A behaviour test, with a margin of more than 10x."""
    n = 400_000
    rng = np.random.default_rng(1)
    tj = 2 * rng.integers(20, 40, size=(n, 6))
    done = threading.Event()
    span = {}

    def work():
        t0 = time.perf_counter()
        recoup.float_6j(*tj.T, doubled=True)
        span["native"] = time.perf_counter() - t0
        done.set()

    worker = threading.Thread(target=work)
    worker.start()
    last = time.perf_counter()
    longest = 0.0
    while not done.is_set():
        now = time.perf_counter()
        longest = max(longest, now - last)
        last = now
    worker.join()
    assert span["native"] > 0.2, "the native call was too short to tell"
    assert longest < span["native"] / 10, (longest, span["native"])
