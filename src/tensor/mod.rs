//! Tensor operators and their matrix elements between coupled states:
//! the independent evaluation from the definitions (`direct`), the values
//! of opaque reduced matrix elements (`opaque`), the built-in reduced
//! matrix elements (`builtin`) and the lowering of a matrix element to a
//! projection sum the graph reduction knows (`expand`).

pub mod builtin;
pub mod direct;
pub mod expand;
pub mod opaque;

use crate::expr::{Expr, Factor, Name};
use crate::rules::source::Source;
use std::collections::BTreeSet;

/// The next rewrite of a matrix element in `e`, if any holds one that is
/// not yet an opaque symbol: a sum of operators split, the Wigner–Eckart
/// theorem, or a reduced matrix element expanded into a projection sum.
/// Returns the rule's name, its source and the whole expression after.
pub fn next_rewrite(e: &Expr) -> Option<Result<(String, Source, Expr), expand::ExpandError>> {
    for (i, t) in e.terms().iter().enumerate() {
        for (k, f) in t.factors().iter().enumerate() {
            let Factor::Element(m) = f else { continue };
            if m.is_irreducible() {
                continue;
            }
            if let Some(problem) = expand::size_problem(m) {
                return Some(Err(expand::ExpandError(problem)));
            }
            let (rule, source, replacement) = if !m.is_reduced() {
                if let Some(x) = expand::split_sum(m) {
                    ("operator-sum", expand::linearity_source(), x)
                } else {
                    match expand::wigner_eckart(m) {
                        Some(x) => ("wigner-eckart", expand::wigner_eckart_source(), x),
                        None => return Some(Err(expand::ExpandError(
                            "the operator of this matrix element has no single rank and component"
                                .into(),
                        ))),
                    }
                }
            } else {
                let avoid: BTreeSet<Name> = e.terms().iter().flat_map(|t| t.all_vars()).collect();
                match expand::expand_reduced(m, &avoid) {
                    Ok(x) => ("reduced-matrix-element", expand::expansion_source(), x),
                    Err(err) => return Some(Err(err)),
                }
            };
            let rest = {
                let mut parts = t.parts();
                parts.factors.remove(k);
                parts.normalized()
            };
            let mut next = Expr::zero();
            for (j, u) in e.terms().iter().enumerate() {
                if j == i {
                    for r in replacement.terms() {
                        next.push(rest.mul_inside(r));
                    }
                } else {
                    next.push(u.clone());
                }
            }
            return Some(Ok((rule.to_string(), source, next)));
        }
    }
    None
}

/// Names that a matrix element implies are integers: the rank of each
/// factor of a scalar product (`sum(q: (-1)^q A[k, q] B[k, -q])` needs an
/// integer `q`), and the rank and the orbital angular momenta on both
/// sides of `C[k]` (a spherical harmonic acts on an orbital node). Only
/// names free in the expression.
pub fn implied_integers(e: &Expr) -> Vec<Name> {
    fn walk(op: &crate::expr::Operator, m: &crate::expr::MatrixElement, out: &mut Vec<Name>) {
        use crate::expr::element::subtree;
        use crate::expr::{Operator, OperatorName};
        match op {
            Operator::Elementary {
                name: OperatorName::Spherical,
                rank,
                node,
                ..
            } => {
                out.extend(rank.vars().cloned());
                for tree in [&m.bra.tree, &m.ket.tree] {
                    if let Some(t) = subtree(tree, node) {
                        out.extend(t.label().vars().cloned());
                    }
                }
            }
            Operator::Elementary { .. } => {}
            Operator::Coupled { left, right, .. } => {
                walk(left, m, out);
                walk(right, m, out);
            }
            Operator::Scalar(a, b) => {
                for side in [a, b] {
                    if let Some(k) = side.rank() {
                        out.extend(k.vars().cloned());
                    }
                    walk(side, m, out);
                }
            }
            Operator::Sum(terms) => terms.iter().for_each(|(_, o)| walk(o, m, out)),
        }
    }
    let free = e.free_vars();
    let mut out = Vec::new();
    for t in e.terms() {
        for f in t.factors() {
            if let Factor::Element(m) = f {
                walk(&m.op, m, &mut out);
            }
        }
    }
    out.retain(|n| free.contains(n));
    out.sort();
    out.dedup();
    out
}

/// Runs `f` with the integers the expressions imply (`implied_integers`)
/// added to the declarations in force; a name already declared otherwise
/// keeps its declaration (the evaluation then reports the conflict).
pub fn with_implied_integers<R>(exprs: &[&Expr], f: impl FnOnce() -> R) -> R {
    use crate::algebra::declare::{current, scoped, Parity};
    let names: Vec<Name> = exprs.iter().flat_map(|e| implied_integers(e)).collect();
    if names.is_empty() {
        return f();
    }
    let mut d = current();
    for n in names {
        let mut trial = d.clone();
        if trial.declare(n, Parity::Integer).is_ok() {
            d = trial;
        }
    }
    scoped(&d, f)
}

/// The names of the opaque operators in an expression.
pub fn opaque_names(e: &Expr) -> BTreeSet<String> {
    let mut out = BTreeSet::new();
    for t in e.terms() {
        for f in t.factors() {
            if let Factor::Element(m) = f {
                for el in m.op.elementaries() {
                    if let crate::expr::Operator::Elementary {
                        name: crate::expr::OperatorName::Opaque(n),
                        ..
                    } = el
                    {
                        out.insert(n.clone());
                    }
                }
            }
        }
    }
    out
}
