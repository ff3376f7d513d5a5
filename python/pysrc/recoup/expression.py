"""Expressions of recoup's language and the reports of what is done with
them: simplification (with its verified steps), checks (verdict,
counterexample, diagnosis with a repaired claim) and recoupling.

Every result has passed recoup's verification against its own input
before it is returned; an operation that cannot verify raises instead.
Operations run with a time limit (``time_limit`` seconds, 60 by default,
``None`` for none) and release the GIL while they work.
"""

from dataclasses import dataclass, field
from fractions import Fraction
import json
import numbers

from . import _native
from .errors import InputError
from .values import Exact, _half_integer

DEFAULT_TIME_LIMIT = 60.0


def _value_text(name, v):
    if isinstance(v, str):
        return v.strip()
    if isinstance(v, (bool,)) or not isinstance(v, numbers.Real):
        raise InputError(f"the value of {name} must be a number; got {v!r}")
    if isinstance(v, numbers.Rational):
        q = Fraction(v)
    else:
        q = _half_integer(v, f"the value of {name}")
    return f"{q.numerator}/{q.denominator}" if q.denominator != 1 else str(q.numerator)


def _time_limit(seconds):
    """A time limit in seconds (positive and finite), or None for none."""
    if seconds is None:
        return None
    if isinstance(seconds, bool) or not isinstance(seconds, numbers.Real):
        raise InputError(f"time_limit must be a number of seconds or None; got {seconds!r}")
    seconds = float(seconds)
    if not (seconds > 0 and seconds < float("inf")):
        raise InputError(f"time_limit must be positive and finite; got {seconds!r}")
    return seconds


def _names(names):
    if isinstance(names, str):
        names = [n for n in names.replace(",", " ").split() if n]
    return [str(n) for n in names]


class Expression:
    """An expression of recoup's language, e.g.
    ``Expression("sum(x: (2*x+1) {a, b, x; a, b, c})")``.

    ``integer`` and ``half_odd`` declare names (a list, or a string
    ``"k, q"``); the text may also begin with ``integer k;``. ``str`` gives
    the normal form, ``text`` the text as written, ``latex()`` LaTeX (shown
    rendered in Jupyter).
    """

    __slots__ = ("_native",)

    def __init__(self, text, *, integer=(), half_odd=()):
        if isinstance(text, Expression):
            self._native = text._native
            return
        if not isinstance(text, str):
            raise InputError(f"an expression is text; got {type(text).__name__}")
        self._native = _native.NativeExpression(text, _names(integer), _names(half_odd))

    @classmethod
    def _wrap(cls, native):
        e = cls.__new__(cls)
        e._native = native
        return e

    @property
    def text(self):
        """The text as written."""
        return self._native.text()

    @property
    def free(self):
        """The free variables, sorted."""
        return list(self._native.free())

    @property
    def declared(self):
        """The declarations in force, in the language (or None)."""
        return self._native.declared()

    def latex(self):
        """The expression as LaTeX (math mode, without delimiters)."""
        return self._native.latex()

    def _repr_latex_(self):
        return f"$\\displaystyle {self.latex()}$"

    def __str__(self):
        return self._native.normal()

    def __repr__(self):
        return f"Expression({str(self)!r})"

    def _reparse(self, text):
        """An expression of this one's declarations (a result's text)."""
        d = self.declared
        return Expression(f"{d} {text}" if d else text)

    def simplify(self, *, regge=False, samples=40, max_j="5/2", canonical=False,
                 time_limit=DEFAULT_TIME_LIMIT):
        """The simplified expression with the verified steps to it; 6j and
        9j symbols are written in the order this text names their entries
        (``canonical=True``: recoup's canonical form)."""
        report, result = self._native.simplify(
            bool(regge), int(samples), _value_text("max_j", max_j), bool(canonical),
            _time_limit(time_limit))
        return Simplification._from(json.loads(report), Expression._wrap(result))

    def check(self, other, *, max_j=3, samples=60, exhaustive=False,
              max_points=1_000_000, triangles_hold=False, seed=1,
              time_limit=DEFAULT_TIME_LIMIT):
        """Checks ``self = other`` by exact evaluation at points."""
        if not isinstance(other, Expression):
            other = Expression(other)
        report = self._native.check(
            other._native, _value_text("max_j", max_j), int(samples),
            bool(exhaustive), int(max_points), bool(triangles_hold), int(seed),
            _time_limit(time_limit))
        return CheckReport._from(json.loads(report), self, other)

    def _point(self, at, kw):
        values = dict(at or {})
        values.update(kw)
        return [(str(k), _value_text(k, v)) for k, v in values.items()]

    def value(self, at=None, *, time_limit=DEFAULT_TIME_LIMIT, **values):
        """The exact value at the given values of the free variables
        (keywords, or a dict for names such as ``j'``)."""
        text, f, parts = self._native.evaluate(
            self._point(at, values), False, _time_limit(time_limit))
        return Exact(text, parts, f)

    def value_float(self, at=None, *, time_limit=DEFAULT_TIME_LIMIT, **values):
        """The value in floating point only (fast at large quantum numbers)."""
        _, f, _ = self._native.evaluate(self._point(at, values), True, _time_limit(time_limit))
        return f

    def to_sympy(self):
        """The expression as a SymPy expression (symbols as
        ``sympy.physics.quantum.cg`` objects, ``tri`` as an undefined
        function). Expressions with sums or matrix elements are refused:
        convert their simplified results."""
        from .sympy_form import to_sympy

        return to_sympy(json.loads(self._native.shape()))


def recouple(first, second, *, only_6j=False, time_limit=DEFAULT_TIME_LIMIT):
    """The recoupling coefficient ``<first | second>`` between two coupling
    schemes of the same angular momenta, e.g.
    ``recouple("((j1, j2) j12, j3) J", "(j1, (j2, j3) j23) J")``."""
    report, result = _native.recouple(
        str(first), str(second), bool(only_6j), _time_limit(time_limit))
    return Recoupling._from(json.loads(report), Expression._wrap(result))


@dataclass(frozen=True)
class Reference:
    """Where a step's identity is published."""

    text: str
    citations: list
    note: str = None


@dataclass(frozen=True)
class Step:
    """One verified rewrite: the rule, its source, the expression before
    and after, and the points at which the two were compared."""

    rule: str
    source: str
    reference: Reference
    before: str
    after: str
    checked: int
    nonzero: int

    @classmethod
    def _from(cls, d):
        r = d["reference"]
        return cls(d["rule"], d["source"],
                   Reference(r["text"], r["citations"], r.get("note")),
                   d["before"], d["after"], d["checked"], d["nonzero"])


@dataclass(frozen=True)
class Verification:
    """How a result was verified against its input: points compared, of
    those nonzero, the largest value of a free variable, and whether the
    input itself was evaluated (``whole``) or only every step."""

    checked: int
    nonzero: int
    max_j: str
    whole: bool
    against: str = None

    @classmethod
    def _from(cls, d):
        return cls(d["checked"], d["nonzero"], d["max_j"], d["whole"], d.get("against"))


@dataclass(frozen=True)
class Simplification:
    """A simplification: ``result`` (an Expression) and its ``steps``."""

    input: str
    result: Expression
    latex: str
    steps: list
    verified: Verification
    notes: list
    declared: str = None

    @classmethod
    def _from(cls, d, result):
        return cls(d["input"], result, d["latex"], [Step._from(s) for s in d["steps"]],
                   Verification._from(d["verified"]), list(d["notes"]), d.get("declared"))

    def _repr_latex_(self):
        return f"$\\displaystyle {self.latex}$"

    def __str__(self):
        return str(self.result)


@dataclass(frozen=True)
class Counterexample:
    """A point where the two sides differ, with both exact values."""

    at: dict
    lhs: str
    rhs: str


@dataclass(frozen=True)
class Diagnosis:
    """What is wrong with a failed claim: in words, by kind (``phase``,
    ``factor``, ``swapped-arguments``, ``missing-triangle``), and the
    repaired side, re-checked at ``checked`` points."""

    text: str
    findings: list
    side: str
    repaired: Expression
    checked: int


@dataclass(frozen=True)
class CheckReport:
    """The result of a check: ``verdict`` is ``"equal"``, ``"different"`` or
    ``"not-established"`` (both sides vanished everywhere)."""

    verdict: str
    checked: int
    nonzero: int
    mismatches: int
    broken_triads: int
    exhaustive: bool
    domain_points: int
    counterexample: Counterexample
    diagnosis: Diagnosis
    declared: str = None

    @property
    def equal(self):
        return self.verdict == "equal"

    def __bool__(self):
        return self.equal

    @classmethod
    def _from(cls, d, lhs, rhs):
        cx = d.get("counterexample")
        cx = Counterexample(dict(cx["at"]), cx["lhs"], cx["rhs"]) if cx else None
        diag = None
        if d.get("diagnosis"):
            side = d["repaired_side"]
            base = rhs if side == "right" else lhs
            diag = Diagnosis(d["diagnosis"], list(d["findings"]), side,
                             base._reparse(d["repaired"]), d["repaired_checked"])
        return cls(d["verdict"], d["checked"], d["nonzero"], d["mismatches"],
                   d["broken_triads"], d["exhaustive"], d.get("domain_points"), cx, diag,
                   d.get("declared"))


@dataclass(frozen=True)
class Recoupling:
    """A recoupling coefficient: ``result`` (an Expression), its sums and
    symbols, and its verification against the overlap of the two coupled
    states."""

    result: Expression
    latex: str
    sums: int
    six_j: int
    nine_j: int
    verified: Verification
    steps: list = field(default_factory=list)

    @classmethod
    def _from(cls, d, result):
        return cls(result, d["latex"], d["sums"], d["symbols"]["6j"], d["symbols"]["9j"],
                   Verification._from(d["verified"]),
                   [Step._from(s) for s in d.get("steps", [])])

    def _repr_latex_(self):
        return f"$\\displaystyle {self.latex}$"

    def __str__(self):
        return str(self.result)
