//! The normal form of terms: symbols in canonical form under their
//! symmetry groups with the phase they cost folded into the term's phase,
//! the phase reduced modulo the integrality lattice, selection-rule zeros
//! detected (broken triangle rules, impossible parities, projections out of
//! range, conservation violated identically, symmetry zeros such as
//! `(a, a, 1; 0, 0, 0)`), redundant triangle factors dropped, deltas
//! eliminated where a summed variable allows it, and alpha-equivalent
//! terms merged. Pure algebra: the simplifier verifies every use.

use super::lattice::{integral_forms, PhaseLattice};
use super::symmetry::{canonical, classical_images};
use crate::expr::{Expr, Factor, Lin, Name, Term, Q};
use num_traits::Signed;
use std::collections::{BTreeMap, BTreeSet};

/// True when a linear form is a negative constant.
fn negative_constant(l: &Lin) -> bool {
    l.is_constant() && l.constant_part().is_negative()
}

/// True when `l` can never be an integer (every variable enters with an
/// even coefficient, so `l ≡ constant (mod 1)`, and that constant is not an
/// integer).
fn never_integer(l: &Lin) -> bool {
    l.terms()
        .all(|(_, c)| c.is_integer() && c.to_integer() % 2 == 0)
        && !l.constant_part().is_integer()
}

/// True when a selection rule makes the term vanish for every assignment.
pub fn selection_zero(t: &Term) -> bool {
    for f in t.factors() {
        if let Some(c) = f.conservation() {
            if c.is_constant() && !c.is_zero() {
                return true;
            }
        }
        if !matches!(f, Factor::Power(..)) && f.j_slots().iter().any(|l| negative_constant(l)) {
            return true;
        }
        for [a, b, c] in f.triads() {
            let ineq = [&(a + b) - c, &(a + c) - b, &(b + c) - a];
            if ineq.iter().any(negative_constant) || never_integer(&(&(a + b) + c)) {
                return true;
            }
        }
        for (j, m) in f.columns() {
            if negative_constant(&(j - m)) || negative_constant(&(j + m)) || never_integer(&(j - m))
            {
                return true;
            }
        }
    }
    // integrality rules that contradict each other (two triads that give
    // one variable both parities): no point makes the term nonzero
    // (forms with integer coefficients and constants only span such forms,
    // which never give 1/2: the lattice is built only otherwise)
    let (ints, zeros) = integral_forms(t);
    let fractional =
        |l: &Lin| !l.constant_part().is_integer() || l.terms().any(|(_, c)| !c.is_integer());
    if ints.iter().chain(&zeros).any(fractional)
        && PhaseLattice::new(&t.kinds(), &ints, &zeros).is_integer(&Lin::constant(Q::new(1, 2)))
    {
        return true;
    }
    // a symmetry that maps a symbol to itself with the phase -1 (the
    // lattice is built only when some symmetry maps a symbol to itself)
    let fixed: Vec<Lin> = t
        .factors()
        .iter()
        .filter(|f| f.is_symbol())
        .flat_map(|f| {
            classical_images(f)
                .into_iter()
                .filter(|img| img.factor == *f && !img.phase.is_zero())
                .map(|img| img.phase)
        })
        .collect();
    if fixed.is_empty() {
        return false;
    }
    let lattice = PhaseLattice::of_term(t);
    fixed
        .iter()
        .any(|phase| lattice.constant_sign(phase) == Some(true))
}

/// The canonical form of one term (`None` when it is zero).
pub fn canonical_term(t: &Term, regge: bool) -> Option<Term> {
    canonical_term_assuming(t, regge, &[])
}

/// `canonical_term` with extra forms known to be integers.
pub fn canonical_term_assuming(t: &Term, regge: bool, facts: &[Lin]) -> Option<Term> {
    if t.is_zero() || selection_zero(t) {
        return None;
    }
    let mut phase = t.phase().clone();
    let mut factors = Vec::with_capacity(t.factors().len());
    for f in t.factors() {
        if f.is_symbol() {
            let img = canonical(f, regge);
            phase = &phase + &img.phase;
            factors.push(img.factor);
        } else {
            factors.push(f.clone());
        }
    }
    // idempotent factors appear once; triangle factors implied by a symbol go
    factors.sort();
    factors.dedup_by(|a, b| a == b && matches!(a, Factor::Tri(_) | Factor::Delta(..)));
    let triads: Vec<BTreeSet<Lin>> = factors
        .iter()
        .filter(|f| f.is_symbol())
        .flat_map(|f| {
            f.triads()
                .into_iter()
                .map(|t| t.iter().map(|l| (*l).clone()).collect::<BTreeSet<Lin>>())
                .collect::<Vec<_>>()
        })
        .collect();
    factors.retain(|f| match f {
        Factor::Tri(x) => {
            let s: BTreeSet<Lin> = x.iter().cloned().collect();
            !(s.len() == 3 && triads.contains(&s))
        }
        _ => true,
    });
    let mut parts = t.parts();
    parts.factors = factors;
    parts.phase = phase;
    let out = parts.normalized();
    let vars = out.all_vars();
    let relevant: Vec<Lin> = facts
        .iter()
        .filter(|l| l.vars().all(|v| vars.contains(v) && !out.bound().contains(v)))
        .cloned()
        .collect();
    let lattice = PhaseLattice::of_term_with(&out, &relevant);
    let mut parts = out.into_parts();
    parts.phase = lattice.reduce(&parts.phase);
    let out = parts.normalized();
    if out.is_zero() {
        None
    } else {
        Some(out)
    }
}

/// Eliminates deltas that pin a summed variable: `sum(x: delta(x, y) F(x))`
/// becomes `F(y)`. Returns the new term and whether anything changed.
pub fn eliminate_deltas(t: &Term) -> (Term, bool) {
    let mut cur = t.clone();
    let mut changed = false;
    loop {
        let mut did = false;
        for (i, f) in cur.factors().iter().enumerate() {
            let Factor::Delta(a, b) = f else { continue };
            let d = a - b;
            let pick = cur
                .bound()
                .iter()
                .find(|v| {
                    let c = d.coeff(v);
                    c == Q::from_integer(1) || c == Q::from_integer(-1)
                })
                .cloned();
            if let Some(v) = pick {
                // d = c v + rest = 0  =>  v = -rest / c
                let c = d.coeff(&v);
                let rest = d.substitute(&v, &Lin::zero());
                let by = rest.scale(-c.recip());
                let mut next = cur.parts();
                next.factors.remove(i);
                next.bound.retain(|x| *x != v);
                let next = next.normalized().substitute(&v, &by);
                cur = next;
                did = true;
                changed = true;
                break;
            }
        }
        if !did {
            break;
        }
    }
    (cur, changed)
}

/// Eliminates sums over a projection that a symbol's conservation law pins
/// to free variables: `sum(M: <j1, m1; j2, m2 | J, M> F(M))` becomes
/// `<j1, m1; j2, m2 | J, m1+m2> F(m1+m2)`, since every other term of the
/// sum vanishes. (A line of the projection graph pinned this way is a
/// bridge between two vertices with external legs, which no graph step
/// uses.) Done only where the pinned value has
/// the parity the symbol's columns need wherever the term is defined
/// (implied by its other columns, its triads, declarations and `facts`),
/// so that a value the sum never reaches gives a symbol that is 0.
pub fn eliminate_pinned_projections(t: &Term, facts: &[Lin]) -> Term {
    let mut cur = t.clone();
    'again: loop {
        for v in cur.bound().to_vec() {
            let holders: Vec<&Factor> = cur
                .factors()
                .iter()
                .filter(|f| f.is_symbol() && f.has(&v))
                .collect();
            // a holder whose conservation law pins v to free variables
            let pinned = holders.iter().find_map(|f| {
                let c = f.conservation()?;
                let k = c.coeff(&v);
                let free = c.vars().all(|x| *x == v || !cur.bound().contains(x));
                (k.abs() == Q::from_integer(1) && free)
                    .then(|| c.substitute(&v, &Lin::zero()).scale(-k.recip()))
            });
            let Some(by) = pinned else { continue };
            let mut next = cur.parts();
            next.bound.retain(|x| *x != v);
            let next = next.normalized().substitute(&v, &by);
            // the integer forms of the new term, without the columns the
            // substitution made
            let made: Vec<Lin> = holders
                .iter()
                .flat_map(|f| {
                    let g = f.substitute(&v, &by);
                    f.columns()
                        .into_iter()
                        .zip(g.columns())
                        .filter(|((_, m), _)| m.has(&v))
                        .map(|(_, (j, m))| j - m)
                        .collect::<Vec<Lin>>()
                })
                .collect();
            let (mut ints, zeros) = integral_forms(&next);
            ints.retain(|l| !made.contains(l));
            ints.extend(facts.iter().cloned());
            let lattice = PhaseLattice::new(&next.kinds(), &ints, &zeros);
            if made.iter().all(|l| lattice.is_integer(l)) {
                cur = next;
                continue 'again;
            }
        }
        return cur;
    }
}

/// Uses each delta between free variables to rewrite the rest of the term:
/// `delta(J, J') f(J')` becomes `delta(J, J') f(J)` (the later name is
/// replaced by the earlier), so equal quantities read equal.
pub fn substitute_free_deltas(t: &Term) -> Term {
    let mut cur = t.clone();
    let mut done: Vec<Name> = Vec::new();
    loop {
        let mut changed = false;
        for i in 0..cur.factors().len() {
            let Factor::Delta(a, b) = &cur.factors()[i] else {
                continue;
            };
            let d = a - b;
            // the latest-named free variable with a unit coefficient
            let v = d
                .terms()
                .filter(|(n, c)| {
                    !cur.bound().contains(n)
                        && !done.contains(n)
                        && (**c == Q::from_integer(1) || **c == Q::from_integer(-1))
                })
                .map(|(n, _)| n.clone())
                .max();
            let Some(v) = v else { continue };
            let uses = cur
                .factors()
                .iter()
                .enumerate()
                .any(|(k, f)| k != i && f.has(&v))
                || cur.phase().has(&v);
            if !uses {
                continue;
            }
            let c = d.coeff(&v);
            let by = d.substitute(&v, &Lin::zero()).scale(-c.recip());
            let delta = cur.factors()[i].clone();
            let mut next = cur.parts();
            next.factors.remove(i);
            let mut next = next.normalized().substitute(&v, &by).into_parts();
            next.factors.push(delta);
            cur = next.normalized();
            // every variable of this delta is settled now (no ping-pong)
            done.extend(d.vars().cloned());
            changed = true;
            break;
        }
        if !changed {
            return cur;
        }
    }
}

/// True when two terms are equal up to renaming their bound variables
/// (tried for up to 5 bound variables) and their coefficients.
pub fn same_shape_alpha(a: &Term, b: &Term) -> bool {
    if a.same_shape(b) {
        return true;
    }
    if a.bound().len() != b.bound().len()
        || a.bound().is_empty()
        || a.bound().len() > 5
        || a.factors().len() != b.factors().len()
        || a.root() != b.root()
    {
        return false;
    }
    let n = a.bound().len();
    let mut perm: Vec<usize> = (0..n).collect();
    loop {
        let map: BTreeMap<Name, Name> = (0..n)
            .map(|i| (b.bound()[perm[i]].clone(), a.bound()[i].clone()))
            .collect();
        // rename b's bound vars through fresh names to avoid collisions
        let renamed = rename_bound(b, &map);
        if renamed.same_shape(a) {
            return true;
        }
        if !next_perm(&mut perm) {
            return false;
        }
    }
}

fn rename_bound(t: &Term, map: &BTreeMap<Name, Name>) -> Term {
    // two-step renaming through names no input can contain
    let tmp: BTreeMap<Name, Name> = map
        .keys()
        .map(|k| (k.clone(), Name::new(format!("\u{1}{k}"))))
        .collect();
    let back: BTreeMap<Name, Name> = map
        .iter()
        .map(|(k, v)| (Name::new(format!("\u{1}{k}")), v.clone()))
        .collect();
    t.rename(&tmp).rename(&back)
}

fn next_perm(p: &mut [usize]) -> bool {
    let n = p.len();
    if n < 2 {
        return false;
    }
    let mut i = n - 1;
    while i > 0 && p[i - 1] >= p[i] {
        i -= 1;
    }
    if i == 0 {
        return false;
    }
    let mut j = n - 1;
    while p[j] <= p[i - 1] {
        j -= 1;
    }
    p.swap(i - 1, j);
    p[i..].reverse();
    true
}

/// Adds a term to an expression, merging it into an alpha-equivalent term.
pub fn push_merging(e: &mut Expr, t: Term) {
    if let Some(pos) = e
        .terms()
        .iter()
        .position(|u| !u.same_shape(&t) && same_shape_alpha(u, &t))
    {
        let renamed = {
            // bring t's bound names to u's
            let u = &e.terms()[pos];
            let mut found = None;
            let n = u.bound().len();
            let mut perm: Vec<usize> = (0..n).collect();
            loop {
                let map: BTreeMap<Name, Name> = (0..n)
                    .map(|i| (t.bound()[perm[i]].clone(), u.bound()[i].clone()))
                    .collect();
                let r = rename_bound(&t, &map);
                if r.same_shape(u) {
                    found = Some(r);
                    break;
                }
                if !next_perm(&mut perm) {
                    break;
                }
            }
            found.unwrap_or(t)
        };
        e.push(renamed);
    } else {
        e.push(t);
    }
}

/// The canonical form of an expression: every term canonical, deltas on
/// summed variables eliminated, like terms merged.
pub fn canonical_expr(e: &Expr, regge: bool) -> Expr {
    canonical_expr_assuming(e, regge, &[])
}

/// Forms known to be integers from the free projections of an expression:
/// `j - m` for every column `(j, ±m)` with `m` a free variable that every
/// term shows (a term is 0 where its own free projection is not admissible,
/// so only a fact of every term holds wherever the expression is nonzero).
pub fn free_projection_facts(e: &Expr) -> Vec<Lin> {
    // a fact shown by one term says nothing where another term is nonzero:
    // only the facts every term shows hold wherever the input is nonzero
    let mut common: Option<Vec<Lin>> = None;
    for t in e.terms() {
        let mut out: Vec<Lin> = Vec::new();
        for f in t.factors() {
            for (j, m) in f.columns() {
                let Some((v, _)) = m.as_signed_var() else {
                    continue;
                };
                if t.bound().contains(v) || j.vars().any(|x| t.bound().contains(x)) {
                    continue;
                }
                let l = j - m;
                if !out.contains(&l) {
                    out.push(l);
                }
            }
        }
        common = Some(match common {
            None => out,
            Some(c) => c.into_iter().filter(|l| out.contains(l)).collect(),
        });
    }
    common.unwrap_or_default()
}

/// The canonical form, with extra forms known to be integers (the
/// admissibility of the input's free projections).
pub fn canonical_expr_assuming(e: &Expr, regge: bool, facts: &[Lin]) -> Expr {
    let mut out = Expr::zero();
    for t in e.terms() {
        let (t, _) = eliminate_deltas(t);
        let t = eliminate_pinned_projections(&t, facts);
        let t = substitute_free_deltas(&t);
        if let Some(c) = canonical_term_assuming(&t, regge, facts) {
            push_merging(&mut out, c);
        }
    }
    out
}
