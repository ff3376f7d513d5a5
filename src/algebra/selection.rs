//! Selection rules as linear constraints: triangle inequalities, `j ≥ 0`,
//! projection ranges `|m| ≤ j`, projection conservation and deltas, and the
//! integrality forms (`a+b+c`, `j-m`) that fix parities. From these, the
//! range of one variable given values of the others: what both the
//! evaluator (sums) and the sampler (spot-evaluation points) enumerate.

use crate::expr::{Factor, Lin, Name, Q};
use num_traits::{One, Signed, Zero};
use std::collections::BTreeMap;

/// The linear constraints of a set of factors.
#[derive(Clone, Debug, Default)]
pub struct Constraints {
    /// forms that must be `>= 0`
    pub ge: Vec<Lin>,
    /// forms that must be `= 0`
    pub eq: Vec<Lin>,
    /// forms that must be integers
    pub integral: Vec<Lin>,
}

/// Constraints indexed by variable, for repeated range queries.
#[derive(Clone, Debug, Default)]
pub struct Indexed {
    ge: BTreeMap<Name, Vec<Lin>>,
    eq: BTreeMap<Name, Vec<Lin>>,
    integral: BTreeMap<Name, Vec<Lin>>,
}

impl Indexed {
    /// Indexes a constraint set.
    pub fn new(c: &Constraints) -> Indexed {
        let mut out = Indexed::default();
        let add = |m: &mut BTreeMap<Name, Vec<Lin>>, ls: &[Lin]| {
            for l in ls {
                for v in l.vars() {
                    m.entry(v.clone()).or_default().push(l.clone());
                }
            }
        };
        add(&mut out.ge, &c.ge);
        add(&mut out.eq, &c.eq);
        add(&mut out.integral, &c.integral);
        out
    }

    /// The constraints that mention `v`.
    pub fn of(&self, v: &Name) -> (&[Lin], &[Lin], &[Lin]) {
        fn get<'a>(m: &'a BTreeMap<Name, Vec<Lin>>, v: &Name) -> &'a [Lin] {
            m.get(v).map(|x| x.as_slice()).unwrap_or(&[])
        }
        (get(&self.ge, v), get(&self.eq, v), get(&self.integral, v))
    }
}

impl Constraints {
    /// The constraints the given factors impose for a nonzero value.
    pub fn of<'a>(factors: impl IntoIterator<Item = &'a Factor>) -> Constraints {
        let mut c = Constraints::default();
        for f in factors {
            c.add_factor(f);
        }
        c
    }

    /// Adds the constraints of one factor.
    pub fn add_factor(&mut self, f: &Factor) {
        if !matches!(f, Factor::Power(..)) {
            for l in f.j_slots() {
                self.ge.push(l.clone());
            }
        }
        for [a, b, c] in f.triads() {
            self.ge.push(&(a + b) - c);
            self.ge.push(&(a + c) - b);
            self.ge.push(&(b + c) - a);
            self.integral.push(&(a + b) + c);
        }
        for (j, m) in f.columns() {
            self.ge.push(j - m);
            self.ge.push(j + m);
            self.integral.push(j - m);
        }
        if let Some(c) = f.conservation() {
            self.eq.push(c);
        }
        if let Factor::Delta(a, b) = f {
            self.eq.push(a - b);
        }
        if let Factor::Power(b, e) = f {
            if !e.is_integer() {
                self.ge.push(b.clone());
            }
        }
    }

    /// Only the projection-range part of a factor (columns), the
    /// preconditions every formula assumes of its free projections.
    pub fn add_columns(&mut self, f: &Factor) {
        for (j, m) in f.columns() {
            self.ge.push(j - m);
            self.ge.push(j + m);
            self.integral.push(j - m);
        }
    }
}

/// The values a variable may take.
#[derive(Clone, Debug, PartialEq)]
pub enum Range {
    /// no value is allowed
    Empty,
    /// exactly one value
    Fixed(Q),
    /// `start, start+step, ..., <= hi`
    Steps {
        /// first value
        start: Q,
        /// increment: 1/2 or 1
        step: Q,
        /// last allowed value (inclusive bound)
        hi: Q,
    },
    /// not bounded on at least one side
    Unbounded {
        /// lower bound if any
        lo: Option<Q>,
        /// upper bound if any
        hi: Option<Q>,
    },
}

impl Range {
    /// The values, when finite.
    pub fn values(&self) -> Option<Vec<Q>> {
        match self {
            Range::Empty => Some(vec![]),
            Range::Fixed(q) => Some(vec![*q]),
            Range::Steps { start, step, hi } => {
                let mut out = Vec::new();
                let mut x = *start;
                while x <= *hi {
                    out.push(x);
                    x += *step;
                }
                Some(out)
            }
            Range::Unbounded { .. } => None,
        }
    }

    /// Number of values (`None` when unbounded).
    pub fn count(&self) -> Option<u64> {
        match self {
            Range::Empty => Some(0),
            Range::Fixed(_) => Some(1),
            Range::Steps { start, step, hi } => {
                if hi < start {
                    Some(0)
                } else {
                    Some(((*hi - *start) / *step).floor().to_integer() as u64 + 1)
                }
            }
            Range::Unbounded { .. } => None,
        }
    }
}

fn ceil_half(q: Q) -> Q {
    let d = q * Q::from_integer(2);
    Q::new(d.ceil().to_integer(), 2)
}

fn floor_half(q: Q) -> Q {
    let d = q * Q::from_integer(2);
    Q::new(d.floor().to_integer(), 2)
}

/// Splits `l = a·v + b` when every other variable of `l` has a value.
fn split(l: &Lin, v: &Name, env: &BTreeMap<Name, Q>) -> Option<(Q, Q)> {
    let a = l.coeff(v);
    if a.is_zero() {
        return None;
    }
    let mut b = l.constant_part();
    for (x, c) in l.terms() {
        if x == v {
            continue;
        }
        b += *c * *env.get(x)?;
    }
    Some((a, b))
}

/// The range of `v` (values in multiples of 1/2) given the values in `env`,
/// with optional extra bounds.
pub fn range_of(
    v: &Name,
    c: &Constraints,
    env: &BTreeMap<Name, Q>,
    extra_lo: Option<Q>,
    extra_hi: Option<Q>,
) -> Range {
    range_from(v, &c.ge, &c.eq, &c.integral, env, extra_lo, extra_hi)
}

/// `range_of` with an index (only the forms that mention `v` are read).
pub fn range_indexed(
    v: &Name,
    c: &Indexed,
    env: &BTreeMap<Name, Q>,
    extra_lo: Option<Q>,
    extra_hi: Option<Q>,
) -> Range {
    let (ge, eq, integral) = c.of(v);
    range_from(v, ge, eq, integral, env, extra_lo, extra_hi)
}

fn range_from(
    v: &Name,
    ge: &[Lin],
    eq: &[Lin],
    integral: &[Lin],
    env: &BTreeMap<Name, Q>,
    extra_lo: Option<Q>,
    extra_hi: Option<Q>,
) -> Range {
    let mut fixed: Option<Q> = None;
    for l in eq {
        if let Some((a, b)) = split(l, v, env) {
            let x = -b / a;
            match fixed {
                None => fixed = Some(x),
                Some(y) if y != x => return Range::Empty,
                _ => {}
            }
        }
    }
    let mut lo = extra_lo;
    let mut hi = extra_hi;
    for l in ge {
        if let Some((a, b)) = split(l, v, env) {
            let bound = -b / a;
            if a.is_positive() {
                lo = Some(lo.map_or(bound, |x: Q| x.max(bound)));
            } else {
                hi = Some(hi.map_or(bound, |x: Q| x.min(bound)));
            }
        }
    }
    // parity from an integrality form with unit coefficient
    let mut parity: Option<Q> = None;
    for l in integral {
        if let Some((a, b)) = split(l, v, env) {
            if a.abs() == Q::one() {
                let target = -b / a;
                parity = Some(target - target.floor());
                break;
            }
        }
    }
    if let Some(x) = fixed {
        let in_range = lo.is_none_or(|l| x >= l) && hi.is_none_or(|h| x <= h);
        let twice_ok = (x * Q::from_integer(2)).is_integer();
        let parity_ok = parity.is_none_or(|p| x - x.floor() == p);
        return if in_range && twice_ok && parity_ok {
            Range::Fixed(x)
        } else {
            Range::Empty
        };
    }
    match (lo, hi) {
        (Some(l), Some(h)) => {
            let mut start = ceil_half(l);
            let step = match parity {
                Some(p) => {
                    if start - start.floor() != p {
                        start += Q::new(1, 2);
                    }
                    Q::one()
                }
                None => Q::new(1, 2),
            };
            let hi = floor_half(h);
            if start > hi {
                Range::Empty
            } else {
                Range::Steps { start, step, hi }
            }
        }
        (lo, hi) => Range::Unbounded { lo, hi },
    }
}
