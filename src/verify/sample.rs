//! Admissible assignments of the free variables of one or more
//! expressions: integer and half-integer values up to a maximum j.
//!
//! The domain is every such assignment that meets the preconditions every
//! formula assumes: angular momenta nonnegative, free projections in
//! range (`|m| <= j`, `j - m` an integer) and phases with integer
//! exponents. Triangle rules are not preconditions: a claim that holds
//! only where they hold must say so with `tri(...)`. Optionally
//! (`triangles_hold`) the domain is narrowed to the points where every
//! triad of free variables in the expressions satisfies the triangle rule.
//!
//! Random points come in three flavours: points that satisfy the selection
//! rules of all terms together or of one term (so that most are nonzero,
//! and a term nonzero where the others vanish is visited), points where
//! one triad of free variables is broken (so that a missing `tri(...)`
//! shows), and for each point one variable pinned to a value that cycles
//! through its whole range (stratification: every variable's range is
//! covered, not only what rejection sampling reaches). Exhaustive
//! enumeration visits every point of the domain, counted first. Declared
//! parities (`algebra::declare`) narrow the domain of their names.

use super::rng::Rng;
use crate::algebra::selection::{range_indexed, Constraints, Indexed, Range};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Q};
use num_traits::{Signed, Zero};
use std::collections::{BTreeMap, BTreeSet};

/// Values for the free variables.
pub type Point = BTreeMap<Name, Q>;

/// A constraint set with its index and, for each variable (by position
/// in the sampler's list), the variables it shares a constraint with.
#[derive(Clone, Debug)]
struct Rules {
    c: Constraints,
    ix: Indexed,
    neighbours: Vec<Vec<usize>>,
}

impl Rules {
    fn new(mut c: Constraints, index: &BTreeMap<Name, usize>) -> Rules {
        crate::limits::tick();
        // a product of equal symbols repeats its rules: keep each once
        for v in [&mut c.ge, &mut c.eq, &mut c.integral] {
            v.sort();
            v.dedup();
        }
        let ix = Indexed::new(&c);
        let mut neighbours: Vec<BTreeSet<usize>> = vec![BTreeSet::new(); index.len()];
        for l in c.ge.iter().chain(&c.eq).chain(&c.integral) {
            let vs: Vec<usize> = l.vars().filter_map(|v| index.get(v).copied()).collect();
            for &a in &vs {
                for &b in &vs {
                    if a != b {
                        neighbours[a].insert(b);
                    }
                }
            }
        }
        Rules {
            c,
            ix,
            neighbours: neighbours
                .into_iter()
                .map(|n| n.into_iter().collect())
                .collect(),
        }
    }
}

/// A triad of linear forms in free variables that some factor implies.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct Triad(pub [Lin; 3]);

impl Triad {
    fn of(t: [&Lin; 3]) -> Triad {
        let mut v = [t[0].clone(), t[1].clone(), t[2].clone()];
        v.sort();
        Triad(v)
    }

    /// The triangle rule as constraints.
    fn holds(&self) -> Constraints {
        let [a, b, c] = &self.0;
        Constraints {
            ge: vec![&(a + b) - c, &(a + c) - b, &(b + c) - a],
            eq: Vec::new(),
            integral: vec![&(a + b) + c],
        }
    }

    /// One way of breaking the triangle rule (`kind` 0-2: one side longer
    /// than the other two together; 3: a half-integer perimeter).
    fn broken(&self, kind: u64) -> Constraints {
        let [a, b, c] = &self.0;
        let half = Lin::constant(Q::new(1, 2));
        let mut out = Constraints::default();
        match kind {
            0 => out.ge.push(&(&(a - b) - c) - &half),
            1 => out.ge.push(&(&(b - a) - c) - &half),
            2 => out.ge.push(&(&(c - a) - b) - &half),
            _ => out.integral.push(&(&(a + b) + c) + &half),
        }
        out
    }

    /// `(a, b, c)` as written in a message.
    pub fn text(&self) -> String {
        format!("({}, {}, {})", self.0[0], self.0[1], self.0[2])
    }

    /// The forms.
    pub fn forms(&self) -> &[Lin; 3] {
        &self.0
    }
}

/// How many points a domain has, as far as counting went.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Count {
    /// exactly this many
    Exactly(u64),
    /// more than this many (counting stopped)
    MoreThan(u64),
}

/// Draws admissible points for a set of expressions.
#[derive(Clone, Debug)]
pub struct Sampler {
    vars: Vec<(Name, Kind)>,
    index: BTreeMap<Name, usize>,
    base: Rules,
    per_term: Vec<Rules>,
    /// for each per-term rule set, the triads it implies
    per_term_triads: Vec<BTreeSet<Triad>>,
    all: Rules,
    triads: Vec<Triad>,
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

fn extend(c: &mut Constraints, o: &Constraints) {
    c.ge.extend(o.ge.iter().cloned());
    c.eq.extend(o.eq.iter().cloned());
    c.integral.extend(o.integral.iter().cloned());
}

impl Sampler {
    /// A sampler for the free variables of all the expressions together,
    /// on the full domain.
    pub fn new(exprs: &[&Expr]) -> Sampler {
        Sampler::with_domain(exprs, false)
    }

    /// A sampler whose domain is narrowed to the points where every triad
    /// of free variables satisfies the triangle rule when `triangles_hold`.
    pub fn with_domain(exprs: &[&Expr], triangles_hold: bool) -> Sampler {
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
        let mut per_term_triads = Vec::new();
        let mut all = Constraints::default();
        let mut triads: BTreeSet<Triad> = BTreeSet::new();
        for e in exprs {
            for t in e.terms() {
                crate::limits::tick();
                let bound: BTreeSet<Name> = t.bound().iter().cloned().collect();
                // the admissibility every formula assumes of its free
                // projections: only columns whose projection holds one
                // (a column like (-m, 0) is a selection rule, not a
                // precondition)
                let mut cols = Constraints::default();
                for f in t.factors() {
                    for (j, m) in f.columns() {
                        let free_projection = m
                            .vars()
                            .any(|v| !bound.contains(v) && kinds.get(v) == Some(&Kind::Projection));
                        if free_projection {
                            cols.ge.push(j - m);
                            cols.ge.push(j + m);
                            cols.integral.push(j - m);
                        }
                    }
                }
                // a phase only means something where its exponent is an
                // integer: that is part of every expression's domain
                if !t.phase().is_zero() {
                    cols.integral.push(t.phase().clone());
                }
                retain_free(&mut cols, &bound);
                base.ge.extend(cols.ge);
                base.integral.extend(cols.integral);
                base.ge.sort();
                base.ge.dedup();
                base.integral.sort();
                base.integral.dedup();
                let mut mine = BTreeSet::new();
                for f in t.factors() {
                    for tr in f.triads() {
                        let free = tr.iter().all(|l| !l.has_any(&bound));
                        let constant = tr.iter().all(|l| l.is_constant());
                        if free && !constant {
                            mine.insert(Triad::of(tr));
                        }
                    }
                }
                triads.extend(mine.iter().cloned());
                let mut c = Constraints::of(t.factors());
                eliminate_bound(&mut c, t.bound());
                retain_free(&mut c, &bound);
                extend(&mut all, &c);
                // a term of phases and powers only has no domain of its own
                // (a closed formula holds where the other side's symbols do)
                let has_rules = t
                    .factors()
                    .iter()
                    .any(|f| f.is_symbol() || matches!(f, Factor::Tri(_) | Factor::Delta(..)));
                if has_rules {
                    per_term.push(c);
                    per_term_triads.push(mine);
                }
            }
        }
        for (v, k) in &kinds {
            if *k == Kind::AngularMomentum {
                base.ge.push(Lin::var(v.clone()));
            }
        }
        // declared parities narrow the domain
        base.integral
            .extend(crate::algebra::declare::declared_forms(kinds.keys()));
        if triangles_hold {
            for tr in &triads {
                extend(&mut base, &tr.holds());
            }
        }
        // angular momenta first: projection ranges depend on them
        let mut vars: Vec<(Name, Kind)> = kinds.into_iter().collect();
        vars.sort_by_key(|(_, k)| *k);
        let index: BTreeMap<Name, usize> = vars
            .iter()
            .enumerate()
            .map(|(i, (n, _))| (n.clone(), i))
            .collect();
        let merge = |c: &Constraints| {
            let mut m = base.clone();
            extend(&mut m, c);
            Rules::new(m, &index)
        };
        let per_term: Vec<Rules> = per_term.iter().map(merge).collect();
        let all = merge(&all);
        Sampler {
            vars,
            base: Rules::new(base, &index),
            index,
            per_term,
            per_term_triads,
            all,
            triads: if triangles_hold {
                Vec::new()
            } else {
                triads.into_iter().collect()
            },
        }
    }

    /// The free variables and their kinds (angular momenta first).
    pub fn vars(&self) -> &[(Name, Kind)] {
        &self.vars
    }

    /// The triads of free variables that may be broken at a point (none
    /// when the domain keeps the triangle rules).
    pub fn triads(&self) -> &[Triad] {
        &self.triads
    }

    fn bounds(kind: Kind, max_j: Q) -> (Option<Q>, Option<Q>) {
        match kind {
            Kind::AngularMomentum => (Some(Q::zero()), Some(max_j)),
            Kind::Projection => (Some(-max_j), Some(max_j)),
            Kind::Other => (Some(Q::zero()), Some(max_j)),
        }
    }

    /// Every value variable `i` can take in the domain's widest sense
    /// (its bounds in steps of 1/2): the strata of stratified sampling.
    pub fn strata(&self, i: usize, max_j: Q) -> Vec<Q> {
        let (lo, hi) = Self::bounds(self.vars[i].1, max_j);
        let (mut x, hi) = (lo.unwrap(), hi.unwrap());
        let declared = crate::algebra::declare::parity_of(&self.vars[i].0);
        let mut out = Vec::new();
        while x <= hi {
            if declared.is_none_or(|p| p.admits(x)) {
                out.push(x);
            }
            x += Q::new(1, 2);
        }
        out
    }

    fn range(&self, ix: &Indexed, v: &Name, kind: Kind, env: &Point, max_j: Q) -> Range {
        let (lo, hi) = Self::bounds(kind, max_j);
        range_indexed(v, ix, env, lo, hi)
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

    /// One attempt at a random point under `rules`, with one variable
    /// pinned first when `pinned` says so. The most constrained variable
    /// goes next; after each choice only the ranges of the variables that
    /// share a constraint with it are computed again.
    fn try_point(
        &self,
        rules: &Rules,
        rng: &mut Rng,
        max_j: Q,
        pinned: Option<(usize, Q)>,
    ) -> Option<Point> {
        crate::limits::tick();
        let n = self.vars.len();
        let mut env = Point::new();
        let mut left = vec![true; n];
        let mut ranges: Vec<Option<(u64, Range)>> = vec![None; n];
        let assign = |i: usize, x: Q, env: &mut Point, ranges: &mut Vec<Option<(u64, Range)>>| {
            env.insert(self.vars[i].0.clone(), x);
            for &k in &rules.neighbours[i] {
                ranges[k] = None;
            }
        };
        let mut remaining = n;
        if let Some((i, x)) = pinned {
            let (v, k) = &self.vars[i];
            let r = self.range(&rules.ix, v, *k, &env, max_j);
            if !r.values().is_some_and(|vs| vs.contains(&x)) {
                return None;
            }
            assign(i, x, &mut env, &mut ranges);
            left[i] = false;
            remaining -= 1;
        }
        while remaining > 0 {
            // drawing a point over hundreds of names is long work: the
            // time limit may stop it
            crate::limits::tick();
            // the most constrained variable next
            let mut best: Option<(usize, u64)> = None;
            for i in (0..n).filter(|&i| left[i]) {
                if ranges[i].is_none() {
                    let (v, k) = &self.vars[i];
                    let r = self.range(&rules.ix, v, *k, &env, max_j);
                    ranges[i] = Some((r.count().unwrap_or(u64::MAX), r));
                }
                let c = ranges[i].as_ref().unwrap().0;
                if best.is_none_or(|b| c < b.1) {
                    best = Some((i, c));
                }
            }
            let (i, count) = best.unwrap();
            if count == 0 || count == u64::MAX {
                return None;
            }
            let vals = ranges[i].as_ref().unwrap().1.values().unwrap();
            let x = vals[rng.below(vals.len() as u64) as usize];
            assign(i, x, &mut env, &mut ranges);
            left[i] = false;
            remaining -= 1;
        }
        Self::satisfies(&rules.c, &env).then_some(env)
    }

    /// A random admissible point guided by the selection rules, or `None`
    /// when none was found in `tries` attempts.
    pub fn random(&self, rng: &mut Rng, max_j: Q, tries: usize) -> Option<Point> {
        self.random_pinned(rng, max_j, tries, None)
    }

    /// `random` with variable `pinned.0` set to `pinned.1` (when the value
    /// fits; `None` otherwise).
    pub fn random_pinned(
        &self,
        rng: &mut Rng,
        max_j: Q,
        tries: usize,
        pinned: Option<(usize, Q)>,
    ) -> Option<Point> {
        for attempt in 0..tries {
            let rules = if attempt % 4 == 3 || self.per_term.is_empty() || rng.coin() {
                &self.all
            } else {
                &self.per_term[rng.below(self.per_term.len() as u64) as usize]
            };
            if let Some(p) = self.try_point(rules, rng, max_j, pinned) {
                return Some(p);
            }
        }
        // only the preconditions
        for _ in 0..tries {
            if let Some(p) = self.try_point(&self.base, rng, max_j, pinned) {
                return Some(p);
            }
        }
        None
    }

    /// A random point where one triad of free variables breaks the
    /// triangle rule, the rules of some term that does not imply that
    /// triad holding where they can (so the term is nonzero there).
    pub fn broken_triad_point(&self, rng: &mut Rng, max_j: Q, tries: usize) -> Option<Point> {
        if self.triads.is_empty() {
            return None;
        }
        for attempt in 0..tries {
            let tr = &self.triads[rng.below(self.triads.len() as u64) as usize];
            let others: Vec<usize> = (0..self.per_term.len())
                .filter(|&k| !self.per_term_triads[k].contains(tr))
                .collect();
            let mut c = if others.is_empty() || attempt % 3 == 2 {
                self.base.c.clone()
            } else {
                self.per_term[others[rng.below(others.len() as u64) as usize]]
                    .c
                    .clone()
            };
            extend(&mut c, &tr.broken(rng.below(4)));
            let rules = Rules::new(c, &self.index);
            if let Some(p) = self.try_point(&rules, rng, max_j, None) {
                return Some(p);
            }
        }
        None
    }

    /// Counts the points of the domain up to `max_j`, stopping once more
    /// than `cap` are found (or the search itself grows beyond a multiple
    /// of `cap`).
    pub fn count(&self, max_j: Q, cap: u64) -> Count {
        let mut n = 0u64;
        let mut nodes = 0u64;
        let complete = self.walk(
            max_j,
            &mut |_| {
                n += 1;
                n <= cap
            },
            &mut nodes,
            cap.saturating_mul(8).max(1_000),
        );
        if complete && n <= cap {
            Count::Exactly(n)
        } else {
            Count::MoreThan(cap)
        }
    }

    /// A rough size of the domain (the product of the variables' ranges),
    /// for messages about domains too large to count.
    pub fn rough_size(&self, max_j: Q) -> f64 {
        (0..self.vars.len())
            .map(|i| self.strata(i, max_j).len() as f64)
            .product()
    }

    /// Calls `f` on every point of the domain up to `max_j`, in a fixed
    /// order, until it returns false.
    pub fn for_each_point(&self, max_j: Q, f: &mut dyn FnMut(&Point) -> bool) {
        let mut nodes = 0;
        self.walk(max_j, f, &mut nodes, u64::MAX);
    }

    /// The depth-first walk behind `count` and `for_each_point`; false when
    /// it stopped early (`f` said so, or more than `max_nodes` nodes).
    fn walk(
        &self,
        max_j: Q,
        f: &mut dyn FnMut(&Point) -> bool,
        nodes: &mut u64,
        max_nodes: u64,
    ) -> bool {
        let mut env = Point::new();
        self.walk_from(0, &mut env, max_j, f, nodes, max_nodes)
    }

    fn walk_from(
        &self,
        i: usize,
        env: &mut Point,
        max_j: Q,
        f: &mut dyn FnMut(&Point) -> bool,
        nodes: &mut u64,
        max_nodes: u64,
    ) -> bool {
        crate::limits::tick();
        *nodes += 1;
        if *nodes > max_nodes {
            return false;
        }
        if i == self.vars.len() {
            if Self::satisfies(&self.base.c, env) {
                return f(env);
            }
            return true;
        }
        let (v, k) = &self.vars[i];
        let r = self.range(&self.base.ix, v, *k, env, max_j);
        let vals = match r.values() {
            Some(v) => v,
            None => self.strata(i, max_j),
        };
        for x in vals {
            env.insert(v.clone(), x);
            let go_on = self.walk_from(i + 1, env, max_j, f, nodes, max_nodes);
            env.remove(v);
            if !go_on {
                return false;
            }
        }
        true
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse;

    #[test]
    fn the_exhaustive_domain_is_every_point_counted_first() {
        // a, b free angular momenta up to 2: 5 x 5 points
        let e = parse("{a, b, 1; 1, 1, 1}").unwrap();
        let s = Sampler::new(&[&e]);
        assert_eq!(s.count(Q::from_integer(2), 1000), Count::Exactly(25));
        assert_eq!(s.count(Q::from_integer(2), 10), Count::MoreThan(10));
        let mut seen = 0;
        s.for_each_point(Q::from_integer(2), &mut |_| {
            seen += 1;
            true
        });
        assert_eq!(seen, 25);
        // the narrowed domain keeps the triads (a, b, 1), (a, 1, 1) and
        // (b, 1, 1): a, b in {0, 1, 2}, |a - b| <= 1 <= a + b
        // (common practice, no source: the triangle rule)
        let s = Sampler::with_domain(&[&e], true);
        let mut pts = Vec::new();
        s.for_each_point(Q::from_integer(2), &mut |p| {
            pts.push(p.clone());
            true
        });
        assert!(pts.iter().all(|p| {
            let (a, b) = (p[&Name::new("a")], p[&Name::new("b")]);
            (a - b).abs() <= Q::from_integer(1) && a + b >= Q::from_integer(1) && a.is_integer()
        }));
        assert_eq!(pts.len(), 6);
    }

    #[test]
    fn broken_triad_points_break_a_triad() {
        let e = parse("tri(a, b, c)").unwrap();
        let one = parse("1").unwrap();
        let s = Sampler::new(&[&e, &one]);
        let mut rng = Rng::new(4);
        for _ in 0..50 {
            let p = s
                .broken_triad_point(&mut rng, Q::from_integer(3), 20)
                .unwrap();
            let v = |n: &str| p[&Name::new(n)];
            let (a, b, c) = (v("a"), v("b"), v("c"));
            let holds = (a - b).abs() <= c && c <= a + b && (a + b + c).is_integer();
            assert!(!holds, "{p:?}");
        }
    }
}
