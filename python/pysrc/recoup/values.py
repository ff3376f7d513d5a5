"""Symbol values: exact (``Exact``) and in floating point over NumPy arrays.

Angular momenta and projections are given as they are written (``1``,
``0.5``, ``"3/2"``, ``Fraction(3, 2)``), or, with ``doubled=True``, as the
integers ``2j`` and ``2m`` numeric codes keep. Float functions broadcast
their arguments like NumPy ufuncs and return a float for scalar input.
A symbol whose selection rules fail is 0 (the usual convention); a
negative angular momentum or a value that is not a multiple of 1/2 raises
``InputError``.
"""

from fractions import Fraction
import numbers

import numpy as np

from . import _native
from .errors import InputError, LimitError

# beyond this a doubled argument is refused before any arithmetic, so
# that NumPy's integers cannot wrap around
_LARGEST = 1 << 40


def _half_integer(x, name):
    """A scalar as an exact multiple of 1/2 (a Fraction)."""
    if isinstance(x, (bool, np.bool_)):
        raise InputError(f"{name} must be a number, not {x!r}")
    if isinstance(x, str):
        try:
            q = Fraction(x.strip())
        except (ValueError, ZeroDivisionError):
            raise InputError(
                f"{name} must be an integer or a fraction like 3/2; got {x!r}"
            ) from None
    elif isinstance(x, numbers.Rational):
        q = Fraction(x)
    elif isinstance(x, numbers.Real):
        f = float(x)
        if not np.isfinite(f):
            raise InputError(f"{name} must be finite; got {x!r}")
        q = Fraction(f)
    else:
        raise InputError(f"{name} must be a number; got {x!r}")
    if (2 * q).denominator != 1:
        raise InputError(f"{name} must be a multiple of 1/2; got {x!r}")
    if abs(q) > _LARGEST:
        raise LimitError(f"{name} = {x!r} is beyond any value recoup evaluates")
    return q


def _doubled_scalar(x, name, doubled):
    if doubled:
        if isinstance(x, (bool, np.bool_)) or not isinstance(x, numbers.Integral):
            raise InputError(f"{name} must be an integer (doubled); got {x!r}")
        if abs(int(x)) > _LARGEST:
            raise LimitError(f"{name} = {x!r} is beyond any value recoup evaluates")
        return int(x)
    return int(2 * _half_integer(x, name))


def _doubled_array(x, name, doubled):
    """An array of doubled arguments (int64) from the caller's values."""
    a = np.asarray(x)
    kind = a.dtype.kind
    if kind == "b":
        raise InputError(f"{name} must hold numbers, not booleans")
    if kind in "iu":
        if a.size and (int(a.max()) > _LARGEST or int(a.min()) < -_LARGEST):
            raise LimitError(f"{name} holds a value beyond any recoup evaluates")
        a = a.astype(np.int64, copy=False)
        return a if doubled else 2 * a
    if kind == "f":
        if not np.all(np.isfinite(a)):
            raise InputError(f"{name} holds a value that is not finite")
        if a.size and (a.max() > _LARGEST or a.min() < -_LARGEST):
            raise LimitError(f"{name} holds a value beyond any recoup evaluates")
        t = a if doubled else 2.0 * a
        r = np.rint(t)
        if not np.array_equal(t, r):
            what = "integers (doubled)" if doubled else "multiples of 1/2"
            raise InputError(f"{name} must hold {what}")
        return r.astype(np.int64)
    if kind in "OU":
        flat = [_doubled_scalar(v, name, doubled) for v in a.ravel()]
        return np.array(flat, dtype=np.int64).reshape(a.shape)
    raise InputError(f"{name} must hold numbers; got an array of dtype {a.dtype}")


def _floats(kind, names, values, doubled):
    arrays = [_doubled_array(v, n, doubled) for n, v in zip(names, values)]
    try:
        arrays = np.broadcast_arrays(*arrays)
    except ValueError as e:
        raise InputError(f"the arguments do not broadcast together: {e}") from None
    shape = arrays[0].shape
    # a column that is one value broadcast (all strides 0) goes as that
    # value; any other as a contiguous copy in C order
    columns = [
        a.reshape(-1)[:1].copy() if a.size and not any(a.strides)
        else np.ascontiguousarray(a).reshape(-1)
        for a in arrays
    ]
    out = _native.float_symbols(kind, list(shape), columns)
    return float(out) if shape == () else out


def float_3j(j1, j2, j3, m1, m2, m3, *, doubled=False):
    """The 3j symbol (j1 j2 j3; m1 m2 m3) in double precision."""
    return _floats("3j", ("j1", "j2", "j3", "m1", "m2", "m3"),
                   (j1, j2, j3, m1, m2, m3), doubled)


def float_cg(j1, m1, j2, m2, j, m, *, doubled=False):
    """The Clebsch-Gordan coefficient <j1 m1; j2 m2 | j m> in double
    precision (Condon-Shortley phase)."""
    return _floats("cg", ("j1", "m1", "j2", "m2", "j", "m"),
                   (j1, m1, j2, m2, j, m), doubled)


def float_6j(j1, j2, j3, j4, j5, j6, *, doubled=False):
    """The 6j symbol {j1 j2 j3; j4 j5 j6} in double precision."""
    return _floats("6j", tuple(f"j{i}" for i in range(1, 7)),
                   (j1, j2, j3, j4, j5, j6), doubled)


def float_9j(j1, j2, j3, j4, j5, j6, j7, j8, j9, *, doubled=False):
    """The 9j symbol {j1 j2 j3; j4 j5 j6; j7 j8 j9} in double precision."""
    return _floats("9j", tuple(f"j{i}" for i in range(1, 10)),
                   (j1, j2, j3, j4, j5, j6, j7, j8, j9), doubled)


class Exact:
    """An exact value: a sum of rational multiples of square roots of
    square-free integers (one such term for every symbol).

    ``str`` gives recoup's text (``-sqrt(1/3)``), ``float`` the double,
    ``parts`` the pairs ``(Fraction, radicand)``, ``to_sympy`` the same
    number as a SymPy expression.
    """

    __slots__ = ("_text", "_parts", "_float")

    def __init__(self, text, parts, value):
        self._text = text
        self._parts = tuple(
            sorted((Fraction(c), int(r)) for c, r in parts) if parts else ()
        )
        self._float = float(value)

    @property
    def parts(self):
        """The terms ``(coefficient, radicand)``: value = sum c * sqrt(r)."""
        return self._parts

    def is_zero(self):
        return not self._parts

    def squared(self):
        """The square as a Fraction, with the sign: ``s`` with value =
        sign(s) * sqrt(|s|) (only for a single term)."""
        if not self._parts:
            return Fraction(0)
        if len(self._parts) != 1:
            raise ValueError("the value is a sum of square roots: it has no single square")
        c, r = self._parts[0]
        s = c * c * r
        return s if c > 0 else -s

    def to_sympy(self):
        """The value as a SymPy number (exact)."""
        import sympy

        return sympy.Add(*[
            sympy.Rational(c.numerator, c.denominator) * sympy.sqrt(r)
            for c, r in self._parts
        ])

    def latex(self):
        if not self._parts:
            return "0"
        out = []
        for i, (c, r) in enumerate(self._parts):
            sign = "-" if c < 0 else ("+" if i else "")
            c = abs(c)
            root = f"\\sqrt{{{r}}}" if r != 1 else ""
            if c.denominator == 1:
                num = "" if (c.numerator == 1 and root) else str(c.numerator)
                out.append(f"{sign}{num}{root}")
            else:
                out.append(f"{sign}\\frac{{{c.numerator}}}{{{c.denominator}}}{root}")
        return " ".join(out)

    def _repr_latex_(self):
        return f"${self.latex()}$"

    def __str__(self):
        return self._text

    def __repr__(self):
        return f"Exact('{self._text}')"

    def __float__(self):
        return self._float

    def __bool__(self):
        return bool(self._parts)

    def __eq__(self, other):
        if isinstance(other, Exact):
            return self._parts == other._parts
        if isinstance(other, numbers.Rational):
            q = Fraction(other)
            return self._parts == (((q, 1),) if q else ())
        return NotImplemented

    def __hash__(self):
        return hash(self._parts)


def _exact(kind, names, values):
    args = [_doubled_scalar(v, n, False) for n, v in zip(names, values)]
    text, value, parts = _native.exact_symbol(kind, args)
    return Exact(text, parts, value)


def exact_3j(j1, j2, j3, m1, m2, m3):
    """The exact 3j symbol (j1 j2 j3; m1 m2 m3)."""
    return _exact("3j", ("j1", "j2", "j3", "m1", "m2", "m3"), (j1, j2, j3, m1, m2, m3))


def exact_cg(j1, m1, j2, m2, j, m):
    """The exact Clebsch-Gordan coefficient <j1 m1; j2 m2 | j m>."""
    return _exact("cg", ("j1", "m1", "j2", "m2", "j", "m"), (j1, m1, j2, m2, j, m))


def exact_6j(j1, j2, j3, j4, j5, j6):
    """The exact 6j symbol {j1 j2 j3; j4 j5 j6}."""
    return _exact("6j", tuple(f"j{i}" for i in range(1, 7)), (j1, j2, j3, j4, j5, j6))


def exact_9j(j1, j2, j3, j4, j5, j6, j7, j8, j9):
    """The exact 9j symbol {j1 j2 j3; j4 j5 j6; j7 j8 j9}."""
    return _exact("9j", tuple(f"j{i}" for i in range(1, 10)),
                  (j1, j2, j3, j4, j5, j6, j7, j8, j9))
