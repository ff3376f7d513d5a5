"""recoup: angular-momentum algebra for physicists and chemists.

Exact and floating-point 3j, 6j, 9j symbols and Clebsch-Gordan
coefficients (float functions broadcast over NumPy arrays, release the
GIL and use all cores), and expressions of recoup's language that
simplify, check, evaluate and recouple with every result verified by
exact evaluation::

    >>> import recoup
    >>> recoup.exact_3j(1, 1, 0, 0, 0, 0)
    Exact('-sqrt(1/3)')
    >>> e = recoup.Expression("sum(x: (2*x+1) {a, b, x; a, b, c})")
    >>> str(e.simplify().result)
    '(-1)^(2*c) tri(a, b, c)'
"""

from .errors import (
    InputError,
    InternalError,
    LimitError,
    ParseError,
    RecoupError,
)
from .expression import (
    CheckReport,
    Counterexample,
    Diagnosis,
    Expression,
    Recoupling,
    Reference,
    Simplification,
    Step,
    Verification,
    recouple,
)
from .values import (
    Exact,
    exact_3j,
    exact_6j,
    exact_9j,
    exact_cg,
    float_3j,
    float_6j,
    float_9j,
    float_cg,
)

__all__ = [
    "CheckReport", "Counterexample", "Diagnosis", "Exact", "Expression",
    "InputError", "InternalError", "LimitError", "ParseError", "RecoupError",
    "Recoupling", "Reference", "Simplification", "Step", "Verification",
    "exact_3j", "exact_6j", "exact_9j", "exact_cg",
    "float_3j", "float_6j", "float_9j", "float_cg", "recouple",
]
