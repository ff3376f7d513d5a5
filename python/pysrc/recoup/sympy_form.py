"""Conversion of a closed recoup expression into a SymPy expression.

Symbols become SymPy's symbolic objects of ``sympy.physics.quantum.cg``
(``Wigner3j``, ``CG``, ``Wigner6j``, ``Wigner9j``), ``delta`` becomes
``KroneckerDelta``, ``tri(a, b, c)`` an undefined function ``tri`` (1 when
the triangle rule holds, else 0), phases ``(-1)**(...)``. A sum over
projections or intermediate momenta is refused (SymPy's ``Sum`` runs over
integers, and recoup's summed variables may be half-odd): convert the
simplified result instead.
"""

from .errors import InputError


def _rational(sympy, text):
    if "/" in text:
        n, d = text.split("/")
        return sympy.Rational(int(n), int(d))
    return sympy.Integer(int(text))


def _linear(sympy, shape):
    out = _rational(sympy, shape["constant"])
    for name, c in shape["terms"]:
        out += _rational(sympy, c) * sympy.Symbol(name)
    return out


def to_sympy(terms):
    """The SymPy form of the structure recoup gives term by term."""
    import sympy
    from sympy.physics.quantum.cg import CG, Wigner3j, Wigner6j, Wigner9j

    tri = sympy.Function("tri")
    total = sympy.Integer(0)
    for t in terms:
        if t["summed"]:
            raise InputError(
                "this expression sums over " + ", ".join(t["summed"])
                + "; to_sympy converts closed expressions: simplify it first"
            )
        x = _rational(sympy, t["coefficient"]) * sympy.sqrt(int(t["root"]))
        phase = _linear(sympy, t["phase"])
        if phase != 0:
            x *= sympy.Integer(-1) ** phase
        for f in t["factors"]:
            args = [_linear(sympy, a) for a in f["args"]]
            kind = f["kind"]
            if kind == "delta":
                x *= sympy.KroneckerDelta(*args)
            elif kind == "tri":
                x *= tri(*args)
            elif kind == "power":
                x *= args[0] ** _rational(sympy, f["exponent"])
            elif kind == "3j":
                j1, j2, j3, m1, m2, m3 = args
                x *= Wigner3j(j1, m1, j2, m2, j3, m3)
            elif kind == "cg":
                x *= CG(*args)
            elif kind == "6j":
                x *= Wigner6j(*args)
            elif kind == "9j":
                x *= Wigner9j(*args)
            else:
                raise InputError(
                    f"the matrix element {f.get('text')} has no SymPy form; reduce it first"
                )
        total += x
    return total
