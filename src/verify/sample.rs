//! Admissible assignments of the free variables of one or more
//! expressions: integer and half-integer values up to a maximum j, with the
//! projection ranges every formula assumes, and (to make most points
//! nonzero) the triangle rules and conservation laws of the terms. Random
//! points alternate between the constraints of all terms together and those
//! of one term at a time, so that a term nonzero where the others vanish is
//! still visited (terms made only of phases and powers, closed formulas,
//! have no domain of their own and are never sampled alone). Exhaustive
//! enumeration uses the same ranges.

use super::rng::Rng;
use crate::algebra::selection::{range_indexed, Constraints, Indexed, Range};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Q};
use num_traits::{Signed, Zero};
use std::collections::{BTreeMap, BTreeSet};

/// Values for the free variables.
pub type Point = BTreeMap<Name, Q>;

/// Draws admissible points for a set of expressions.
#[derive(Clone, Debug)]
pub struct Sampler {
    vars: Vec<(Name, Kind)>,
    base: Constraints,
    per_term: Vec<Constraints>,
    all: Constraints,
    base_ix: Indexed,
    per_term_ix: Vec<Indexed>,
    all_ix: Indexed,
}

fn retain_free(c: &mut Constraints, bound: &BTreeSet<Name>) {
    let free = |l: &Lin| !l.has_any(bound);
    c.ge.retain(free);
    c.eq.retain(free);
    c.integral.retain(free);
}

/// Solves the equalities (conservation laws, deltas) for summed variables
/// and substitutes them everywhere, so that the laws they imply on the
/// free variables (`m1+m2+m3+m4 = 0` from two 3j joined by a summed line)
/// survive.
fn eliminate_bound(c: &mut Constraints, bound: &[Name]) {
    for b in bound {
        let Some(pos) = c.eq.iter().position(|l| !l.coeff(b).is_zero()) else {
            continue;
        };
        let l = c.eq.remove(pos);
        let a = l.coeff(b);
        // b = -(l - a b)/a
        let rest = l.substitute(b, &Lin::zero());
        let sol = rest.scale(-a.recip());
        for f in
            c.ge.iter_mut()
                .chain(c.eq.iter_mut())
                .chain(c.integral.iter_mut())
        {
            *f = f.substitute(b, &sol);
        }
    }
}

impl Sampler {
    /// A sampler for the free variables of all the expressions together.
    pub fn new(exprs: &[&Expr]) -> Sampler {
        let mut kinds: BTreeMap<Name, Kind> = BTreeMap::new();
        for e in exprs {
            for (v, k) in e.kinds() {
                let slot = kinds.entry(v).or_insert(Kind::Other);
                if k < *slot {
                    *slot = k;
                }
            }
        }
        let mut base = Constraints::default();
        let mut per_term = Vec::new();
        let mut all = Constraints::default();
        for e in exprs {
            for t in &e.terms {
                let bound: BTreeSet<Name> = t.bound.iter().cloned().collect();
                let mut cols = Constraints::default();
                for f in &t.factors {
                    cols.add_columns(f);
                }
                // a phase only means something where its exponent is an
                // integer: that is part of every expression's domain
                if !t.phase.is_zero() {
                    cols.integral.push(t.phase.clone());
                }
                retain_free(&mut cols, &bound);
                base.ge.extend(cols.ge);
                base.integral.extend(cols.integral);
                let mut c = Constraints::of(&t.factors);
                eliminate_bound(&mut c, &t.bound);
                retain_free(&mut c, &bound);
                all.ge.extend(c.ge.iter().cloned());
                all.eq.extend(c.eq.iter().cloned());
                all.integral.extend(c.integral.iter().cloned());
                // a term of phases and powers only has no domain of its own
                // (a closed formula holds where the other side's symbols do)
                let has_rules = t
                    .factors
                    .iter()
                    .any(|f| f.is_symbol() || matches!(f, Factor::Tri(_) | Factor::Delta(..)));
                if has_rules {
                    per_term.push(c);
                }
            }
        }
        for (v, k) in &kinds {
            if *k == Kind::AngularMomentum {
                base.ge.push(Lin::var(v.clone()));
            }
        }
        let merge = |c: &Constraints| {
            let mut m = base.clone();
            m.ge.extend(c.ge.iter().cloned());
            m.eq.extend(c.eq.iter().cloned());
            m.integral.extend(c.integral.iter().cloned());
            m
        };
        let per_term: Vec<Constraints> = per_term.iter().map(merge).collect();
        let all = merge(&all);
        Sampler {
            vars: kinds.into_iter().collect(),
            base_ix: Indexed::new(&base),
            per_term_ix: per_term.iter().map(Indexed::new).collect(),
            all_ix: Indexed::new(&all),
            base,
            per_term,
            all,
        }
    }

    /// The free variables and their kinds.
    pub fn vars(&self) -> &[(Name, Kind)] {
        &self.vars
    }

    fn bounds(kind: Kind, max_j: Q) -> (Option<Q>, Option<Q>) {
        match kind {
            Kind::AngularMomentum => (Some(Q::zero()), Some(max_j)),
            Kind::Projection => (Some(-max_j), Some(max_j)),
            Kind::Other => (Some(Q::zero()), Some(max_j)),
        }
    }

    fn range(&self, c: &Indexed, v: &Name, kind: Kind, env: &Point, max_j: Q) -> Range {
        let (lo, hi) = Self::bounds(kind, max_j);
        range_indexed(v, c, env, lo, hi)
    }

    /// True when the point satisfies every constraint of `c`.
    fn satisfies(c: &Constraints, p: &Point) -> bool {
        let get = |n: &Name| p.get(n).copied();
        c.ge.iter()
            .all(|l| l.eval(&get).is_some_and(|x| !x.is_negative()))
            && c.eq
                .iter()
                .all(|l| l.eval(&get).is_some_and(|x| x.is_zero()))
            && c.integral
                .iter()
                .all(|l| l.eval(&get).is_some_and(|x| x.is_integer()))
    }

    /// One attempt at a random point under constraints `c`.
    fn try_point(&self, c: &Constraints, ix: &Indexed, rng: &mut Rng, max_j: Q) -> Option<Point> {
        let mut env = Point::new();
        let mut left: Vec<usize> = (0..self.vars.len()).collect();
        while !left.is_empty() {
            // the most constrained variable next
            let mut best: Option<(usize, u64, Range)> = None;
            for (pos, &i) in left.iter().enumerate() {
                let (v, k) = &self.vars[i];
                let r = self.range(ix, v, *k, &env, max_j);
                let n = r.count().unwrap_or(u64::MAX);
                if best.as_ref().is_none_or(|b| n < b.1) {
                    best = Some((pos, n, r));
                }
            }
            let (pos, n, r) = best.unwrap();
            if n == 0 || n == u64::MAX {
                return None;
            }
            let vals = r.values().unwrap();
            let x = vals[rng.below(vals.len() as u64) as usize];
            let i = left.remove(pos);
            env.insert(self.vars[i].0.clone(), x);
        }
        if Self::satisfies(c, &env) {
            Some(env)
        } else {
            None
        }
    }

    /// A random admissible point, or `None` when none was found in
    /// `tries` attempts.
    pub fn random(&self, rng: &mut Rng, max_j: Q, tries: usize) -> Option<Point> {
        for attempt in 0..tries {
            let (c, ix) = if attempt % 4 == 3 || self.per_term.is_empty() || rng.coin() {
                (&self.all, &self.all_ix)
            } else {
                let k = rng.below(self.per_term.len() as u64) as usize;
                (&self.per_term[k], &self.per_term_ix[k])
            };
            if let Some(p) = self.try_point(c, ix, rng, max_j) {
                return Some(p);
            }
        }
        // only the preconditions
        for _ in 0..tries {
            if let Some(p) = self.try_point(&self.base, &self.base_ix, rng, max_j) {
                return Some(p);
            }
        }
        None
    }

    /// Every point satisfying the preconditions with values up to `max_j`,
    /// at most `limit` of them (in a fixed order).
    pub fn exhaustive(&self, max_j: Q, limit: usize) -> Vec<Point> {
        let mut out = Vec::new();
        let mut env = Point::new();
        self.enumerate(
            &self.base,
            &self.base_ix,
            0,
            &mut env,
            max_j,
            limit,
            &mut out,
        );
        out
    }

    #[allow(clippy::too_many_arguments)]
    fn enumerate(
        &self,
        c: &Constraints,
        ix: &Indexed,
        i: usize,
        env: &mut Point,
        max_j: Q,
        limit: usize,
        out: &mut Vec<Point>,
    ) {
        if out.len() >= limit {
            return;
        }
        if i == self.vars.len() {
            if Self::satisfies(c, env) {
                out.push(env.clone());
            }
            return;
        }
        let (v, k) = &self.vars[i];
        let r = self.range(ix, v, *k, env, max_j);
        let vals = match r.values() {
            Some(v) => v,
            None => {
                let (lo, hi) = Self::bounds(*k, max_j);
                let mut vs = Vec::new();
                let mut x = lo.unwrap();
                while x <= hi.unwrap() {
                    vs.push(x);
                    x += Q::new(1, 2);
                }
                vs
            }
        };
        for x in vals {
            env.insert(v.clone(), x);
            self.enumerate(c, ix, i + 1, env, max_j, limit, out);
            env.remove(v);
            if out.len() >= limit {
                return;
            }
        }
    }
}
