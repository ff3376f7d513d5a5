//! Matching linear forms: find the substitution `σ` of pattern variables
//! by linear forms of the target such that `σ(P_i) = T_i` for every pair,
//! by Gaussian elimination over the rationals with linear-form right-hand
//! sides. Every pattern variable must be determined.

use crate::expr::{Lin, Name, Q};
use num_traits::{One, Zero};
use std::collections::{BTreeMap, BTreeSet};

/// A substitution of pattern variables.
pub type Subst = BTreeMap<Name, Lin>;

/// Solves `σ(p_i) = t_i` for the variables `vars` of the patterns.
pub fn unify(patterns: &[&Lin], targets: &[&Lin], vars: &BTreeSet<Name>) -> Option<Subst> {
    let (s, complete) = unify_partial(patterns, targets, vars)?;
    complete.then_some(s)
}

/// Like `unify`, but a pattern variable may stay undetermined: returns
/// the substitution of the determined ones and whether all were. `None`
/// when the equations are inconsistent.
pub fn unify_partial(
    patterns: &[&Lin],
    targets: &[&Lin],
    vars: &BTreeSet<Name>,
) -> Option<(Subst, bool)> {
    let vs: Vec<&Name> = vars.iter().collect();
    // rows: coefficients over vs, rhs = t - const(p) - (non-pattern part of p)
    let mut rows: Vec<(Vec<Q>, Lin)> = Vec::with_capacity(patterns.len());
    for (p, t) in patterns.iter().zip(targets) {
        let coeffs: Vec<Q> = vs.iter().map(|v| p.coeff(v)).collect();
        let mut rest = (*p).clone();
        for v in &vs {
            rest = rest.substitute(v, &Lin::zero());
        }
        rows.push((coeffs, *t - &rest));
    }
    let n = vs.len();
    let mut pivots: Vec<(usize, usize)> = Vec::new(); // (row, col)
    let mut r = 0;
    let mut complete = true;
    for c in 0..n {
        let Some(pr) = (r..rows.len()).find(|&i| !rows[i].0[c].is_zero()) else {
            complete = false; // this pattern variable stays undetermined
            continue;
        };
        rows.swap(r, pr);
        let inv = Q::one() / rows[r].0[c];
        let (mut pc, prhs) = rows[r].clone();
        for x in pc.iter_mut() {
            *x *= inv;
        }
        let prhs = prhs.scale(inv);
        rows[r] = (pc.clone(), prhs.clone());
        for i in 0..rows.len() {
            if i != r && !rows[i].0[c].is_zero() {
                let k = rows[i].0[c];
                for (x, y) in rows[i].0.iter_mut().zip(&pc) {
                    *x -= k * *y;
                }
                rows[i].1 = rows[i].1.add_scaled(&prhs, -k);
            }
        }
        pivots.push((r, c));
        r += 1;
    }
    // remaining rows must read 0 = 0
    for (coeffs, rhs) in rows.iter().skip(r) {
        debug_assert!(coeffs.iter().all(|x| x.is_zero()));
        if !rhs.is_zero() {
            return None;
        }
    }
    let mut out = Subst::new();
    for (row, col) in pivots {
        // a pivot row that still involves an undetermined variable does not
        // determine its own
        let depends = rows[row]
            .0
            .iter()
            .enumerate()
            .any(|(k, x)| k != col && !x.is_zero());
        if depends {
            complete = false;
            continue;
        }
        out.insert(vs[col].clone(), rows[row].1.clone());
    }
    Some((out, complete))
}

/// Applies a substitution to a linear form.
pub fn apply(l: &Lin, s: &Subst) -> Lin {
    let mut out = Lin::constant(l.constant_part());
    for (v, c) in l.terms() {
        match s.get(v) {
            Some(by) => out = out.add_scaled(by, *c),
            None => out = out.add_scaled(&Lin::var(v.clone()), *c),
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn l(s: &str) -> Lin {
        crate::syntax::parse(s)
            .ok()
            .and_then(|e| e.as_lin())
            .unwrap_or_else(|| panic!("{s}"))
    }

    #[test]
    fn solves_the_6j_half_pattern() {
        let vars: BTreeSet<Name> = ["a", "b", "c"].iter().map(|s| Name::from(*s)).collect();
        let p = [l("a"), l("b"), l("c"), l("1/2"), l("c-1/2"), l("b+1/2")];
        let t = [l("x"), l("y+1"), l("z"), l("1/2"), l("z-1/2"), l("y+3/2")];
        let pr: Vec<&Lin> = p.iter().collect();
        let tr: Vec<&Lin> = t.iter().collect();
        let s = unify(&pr, &tr, &vars).unwrap();
        assert_eq!(s[&Name::from("b")].to_string(), "y+1");
        let bad = [l("x"), l("y"), l("z"), l("1/2"), l("z+1/2"), l("y+1/2")];
        let br: Vec<&Lin> = bad.iter().collect();
        assert!(unify(&pr, &br, &vars).is_none());
    }
}
