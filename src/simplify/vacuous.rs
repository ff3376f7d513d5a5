//! Triangle factors that say nothing: `tri(c, x, x)` with a constant
//! integer `c` fails only at the finitely many values `x < c/2`. Where
//! the terms that carry it sum to zero at each of those values (the
//! other variables free), the factor changes no value and is dropped, so
//! that terms differing only by it merge (`(l . s)` in `|(l, s) j, m>`
//! becomes the textbook `(j(j+1) - l(l+1) - s(s+1))/2`). The zero at each
//! failing value is established by the normal form or, failing that, by
//! exact evaluation at stratified points of the other variables (within
//! the input's domain); the step itself is then verified like every
//! other.

use crate::algebra::normal::canonical_expr;
use crate::expr::{Expr, Factor, Lin, Name, Term, Q};
use crate::verify::spot::{compare_at, points, SpotSettings};

/// A factor `tri(c, x, x)` (in any order) with its variable and `c`.
fn single_variable_triangle(f: &Factor) -> Option<(Name, i64)> {
    let Factor::Tri(t) = f else { return None };
    for i in 0..3 {
        let (c, a, b) = (&t[i], &t[(i + 1) % 3], &t[(i + 2) % 3]);
        if c.is_constant() && a == b {
            let x = a.as_var()?;
            let cq = c.constant_part();
            if cq.is_integer() && cq.to_integer() > 0 {
                return Some((x.clone(), cq.to_integer()));
            }
        }
    }
    None
}

/// The expression without one vacuous triangle factor, with the factor's
/// text, or `None` when no triangle factor is vacuous. `domain` (the
/// derivation's input) says which points count: its free projections are
/// admissible.
pub fn drop_one(e: &Expr, domain: &Expr) -> Option<(Expr, String)> {
    let mut candidates: Vec<&Factor> = Vec::new();
    for t in e.terms() {
        if !t.bound().is_empty() {
            continue;
        }
        for f in t.factors() {
            if single_variable_triangle(f).is_some() && !candidates.contains(&f) {
                candidates.push(f);
            }
        }
    }
    for f in candidates {
        let (x, c) = single_variable_triangle(f)?;
        let carrying: Vec<usize> = (0..e.terms().len())
            .filter(|&i| e.terms()[i].bound().is_empty() && e.terms()[i].factors().contains(f))
            .collect();
        let without: Vec<Term> = e
            .terms()
            .iter()
            .enumerate()
            .map(|(i, t)| {
                if !carrying.contains(&i) {
                    return t.clone();
                }
                let mut parts = t.parts();
                let k = parts.factors.iter().position(|g| g == f).expect("carried");
                parts.factors.remove(k);
                parts.normalized()
            })
            .collect();
        let rest = Expr::from_terms(carrying.iter().map(|&i| without[i].clone()));
        // a denominator that may vanish at a failing value keeps the factor:
        // it guards the division, which no other zero should hide
        let guards_division = carrying.iter().any(|&i| {
            e.terms()[i].factors().iter().any(|g| match g {
                Factor::Power(b, p) if *p < Q::from_integer(0) && b.has(&x) => {
                    (0..c).any(|twice| {
                        let at = b.substitute(&x, &Lin::constant(Q::new(twice, 2)));
                        !at.is_constant() || at.is_zero()
                    })
                }
                _ => false,
            })
        });
        if guards_division {
            continue;
        }
        let vanishes = (0..c).all(|twice| {
            let at = Lin::constant(Q::new(twice, 2));
            vanishes_everywhere(&rest.substitute(&x, &at), &domain.substitute(&x, &at))
        });
        if vanishes {
            let next = Expr::from_terms(without);
            return Some((next, crate::syntax::print_factor(f)));
        }
    }
    None
}

/// True when the expression is 0 in normal form, or at 60 stratified
/// points of its free variables up to 3 within the domain of `domain`
/// (exact evaluation; an undefined value is not zero).
fn vanishes_everywhere(e: &Expr, domain: &Expr) -> bool {
    let nf = canonical_expr(e, false);
    if nf.is_zero() {
        return true;
    }
    let s = SpotSettings {
        max_j: Q::from_integer(3),
        samples: 60,
        exhaustive: false,
        seed: 1,
        triangles_hold: false,
        max_points: 20_000,
        lhs_is_domain: false,
    };
    let pts = points(&[domain, &nf], &s);
    if pts.is_empty() {
        // no admissible point has this value (the input's projections
        // rule it out): the factor changes nothing there
        return true;
    }
    // equal to zero at every point, none undefined (`agrees` would also
    // ask for a nonzero value)
    matches!(compare_at(&nf, &Expr::zero(), &pts), Ok(r) if r.mismatch_count == 0 && r.undefined == 0 && r.checked > 0)
}
