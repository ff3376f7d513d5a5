//! Spot-evaluation: two expressions evaluated exactly at the same
//! admissible points. Agreement at every point, with at least one nonzero,
//! is what "verified" means in recoup: strong evidence, not a proof.
//!
//! Random points are stratified (each point pins one variable to a value
//! that cycles through its whole range) and, unless the domain keeps the
//! triangle rules, a quarter of them break a triad of free variables.
//! Exhaustive comparison streams every point of the domain (counted first
//! by the caller) and keeps only a bounded sample of values.
//!
//! A side may be undefined at a point (a square root of a negative number
//! or a division by zero in a closed form evaluated off its triangle
//! rules). Where both sides are undefined the point is outside the claim
//! and skipped; where one is, the sides differ there. With
//! `lhs_is_domain` (a rewrite checked against its input) the points where
//! the left side is undefined are skipped whatever the right side does.

use super::rng::Rng;
use super::sample::{Point, Sampler};
use crate::evaluate::{EvalError, Evaluator};
use crate::expr::{Expr, Q};
use crate::numeric::Surd;

/// How to choose points.
#[derive(Clone, Debug)]
pub struct SpotSettings {
    /// largest value of any free variable
    pub max_j: Q,
    /// number of random points
    pub samples: usize,
    /// enumerate every point of the domain up to `max_j` instead
    pub exhaustive: bool,
    /// seed of the random points
    pub seed: u64,
    /// narrow the domain to points where every triad of free variables
    /// satisfies the triangle rule (no broken-triad points)
    pub triangles_hold: bool,
    /// most points an exhaustive comparison may visit
    pub max_points: u64,
    /// the left side's domain is the comparison's (a rewrite against its
    /// input): points where it is undefined are skipped
    pub lhs_is_domain: bool,
}

/// Most summation points per evaluation in spot comparisons.
pub const SPOT_BUDGET: u64 = 5_000_000;

/// Default of `SpotSettings::max_points`.
pub const DEFAULT_MAX_POINTS: u64 = 1_000_000;

/// Values kept in a report for diagnosis (beyond these, only mismatches).
pub const KEPT_VALUES: usize = 4_000;

impl Default for SpotSettings {
    fn default() -> Self {
        SpotSettings {
            max_j: Q::from_integer(3),
            samples: 60,
            exhaustive: false,
            seed: 1,
            triangles_hold: false,
            max_points: DEFAULT_MAX_POINTS,
            lhs_is_domain: false,
        }
    }
}

/// The value of a side at a point: a number, or undefined (with why).
#[derive(Clone, Debug, PartialEq)]
pub enum SpotValue {
    /// an exact value
    Number(Surd),
    /// no value: a square root of a negative number, a division by zero
    Undefined(String),
}

impl SpotValue {
    /// The number, if defined.
    pub fn number(&self) -> Option<&Surd> {
        match self {
            SpotValue::Number(v) => Some(v),
            SpotValue::Undefined(_) => None,
        }
    }
}

impl std::fmt::Display for SpotValue {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            SpotValue::Number(v) => write!(f, "{v}"),
            SpotValue::Undefined(why) => write!(f, "undefined ({why})"),
        }
    }
}

/// Evaluates one side at a point: arithmetic failures are "undefined"
/// there, every other failure is an error.
fn side_value(ev: &Evaluator<Surd>, e: &Expr, p: &Point) -> Result<SpotValue, EvalError> {
    match ev.eval(e, p) {
        Ok(v) => Ok(SpotValue::Number(v)),
        Err(EvalError::Arithmetic(why)) => Ok(SpotValue::Undefined(why)),
        Err(e @ EvalError::PhaseNotInteger { .. }) => Ok(SpotValue::Undefined(e.to_string())),
        Err(e) => Err(e),
    }
}

/// A point where the two sides differ.
#[derive(Clone, Debug)]
pub struct Mismatch {
    /// the values of the free variables
    pub at: Point,
    /// value of the left side
    pub lhs: SpotValue,
    /// value of the right side
    pub rhs: SpotValue,
}

/// The outcome of a comparison.
#[derive(Clone, Debug)]
pub struct SpotReport {
    /// points evaluated
    pub checked: usize,
    /// points where either side was nonzero
    pub nonzero: usize,
    /// mismatches found (the smallest first), at most a few dozen
    pub mismatches: Vec<Mismatch>,
    /// the number of mismatching points (all of them, not only those kept)
    pub mismatch_count: usize,
    /// points skipped because both sides (or, for a rewrite, its input)
    /// are undefined there
    pub undefined: usize,
    /// why the first skipped point was undefined
    pub undefined_why: Option<String>,
    /// values at the points (for diagnosis): every point of a random
    /// comparison, a uniform sample of the nonzero points of an
    /// exhaustive one
    pub values: Vec<(Point, Surd, Surd)>,
    seen_nonzero: u64,
    rng: Rng,
}

impl SpotReport {
    fn new() -> SpotReport {
        SpotReport {
            checked: 0,
            nonzero: 0,
            mismatches: Vec::new(),
            mismatch_count: 0,
            undefined: 0,
            undefined_why: None,
            values: Vec::new(),
            seen_nonzero: 0,
            rng: Rng::new(17),
        }
    }

    /// Equal (and defined) at every point and nonzero somewhere.
    pub fn agrees(&self) -> bool {
        self.mismatch_count == 0 && self.nonzero > 0
    }

    /// Records the two values at a point.
    fn record(
        &mut self,
        p: &Point,
        a: SpotValue,
        b: SpotValue,
        keep_all: bool,
        lhs_is_domain: bool,
    ) {
        let (a, b) = match (a, b) {
            (SpotValue::Number(a), SpotValue::Number(b)) => (a, b),
            (SpotValue::Undefined(why), SpotValue::Undefined(_)) => {
                self.undefined += 1;
                self.undefined_why.get_or_insert(why);
                return;
            }
            (SpotValue::Undefined(why), _) if lhs_is_domain => {
                self.undefined += 1;
                self.undefined_why.get_or_insert(why);
                return;
            }
            (a, b) => {
                self.checked += 1;
                self.nonzero += 1;
                self.mismatch(p, a, b);
                return;
            }
        };
        self.checked += 1;
        if !a.is_zero() || !b.is_zero() {
            self.nonzero += 1;
        }
        if a != b {
            self.mismatch(
                p,
                SpotValue::Number(a.clone()),
                SpotValue::Number(b.clone()),
            );
        }
        if keep_all {
            self.values.push((p.clone(), a, b));
            return;
        }
        // a uniform sample of the points (reservoir sampling), nonzero
        // points and mismatches first, so the sample spans the whole domain
        let nonzero = !a.is_zero() || !b.is_zero();
        let mismatch = a != b;
        if !nonzero {
            return;
        }
        self.seen_nonzero += 1;
        if self.values.len() < KEPT_VALUES {
            self.values.push((p.clone(), a, b));
            return;
        }
        let k = self.rng.below(self.seen_nonzero);
        if (k as usize) < KEPT_VALUES {
            let slot = k as usize;
            // a mismatch never gives way to a match
            if mismatch || self.values[slot].1 == self.values[slot].2 {
                self.values[slot] = (p.clone(), a, b);
            }
        }
    }

    fn mismatch(&mut self, p: &Point, a: SpotValue, b: SpotValue) {
        self.mismatch_count += 1;
        let m = Mismatch {
            at: p.clone(),
            lhs: a,
            rhs: b,
        };
        if self.mismatches.len() < MAX_MISMATCHES {
            self.mismatches.push(m);
            return;
        }
        // keep the smallest ones
        let size = point_size(p);
        if let Some(i) = (0..self.mismatches.len())
            .max_by_key(|&i| point_size(&self.mismatches[i].at))
            .filter(|&i| point_size(&self.mismatches[i].at) > size)
        {
            self.mismatches[i] = m;
        }
    }

    fn finish(mut self) -> SpotReport {
        self.mismatches.sort_by_key(|x| point_size(&x.at));
        self
    }
}

/// Mismatches kept in a report.
const MAX_MISMATCHES: usize = 32;

/// The random points a comparison uses: stratified, with a share that
/// breaks a triad of free variables (unless the domain keeps them).
pub fn points(exprs: &[&Expr], s: &SpotSettings) -> Vec<Point> {
    let sampler = Sampler::with_domain(exprs, s.triangles_hold);
    random_points(&sampler, s)
}

fn random_points(sampler: &Sampler, s: &SpotSettings) -> Vec<Point> {
    let mut rng = Rng::new(s.seed);
    let nvars = sampler.vars().len();
    // each variable's strata, visited from a random offset
    let strata: Vec<Vec<Q>> = (0..nvars).map(|i| sampler.strata(i, s.max_j)).collect();
    let offsets: Vec<u64> = strata
        .iter()
        .map(|v| rng.below(v.len().max(1) as u64))
        .collect();
    let mut visits = vec![0u64; nvars];
    let mut out: Vec<Point> = Vec::new();
    let mut misses = 0;
    let mut k = 0usize;
    while out.len() < s.samples && misses < s.samples * 4 + 20 {
        k += 1;
        let p = if k.is_multiple_of(4) && !sampler.triads().is_empty() {
            sampler.broken_triad_point(&mut rng, s.max_j, 12)
        } else if nvars > 0 {
            let i = k % nvars;
            let vals = &strata[i];
            let x = vals[((offsets[i] + visits[i]) % vals.len() as u64) as usize];
            visits[i] += 1;
            sampler
                .random_pinned(&mut rng, s.max_j, 8, Some((i, x)))
                .or_else(|| sampler.random(&mut rng, s.max_j, 40))
        } else {
            sampler.random(&mut rng, s.max_j, 40)
        };
        match p {
            Some(p) => {
                if out.contains(&p) {
                    misses += 1;
                } else {
                    out.push(p);
                }
            }
            None => misses += 10,
        }
    }
    out
}

/// "Size" of a point, to report the smallest counterexample.
pub fn point_size(p: &Point) -> Q {
    p.values()
        .map(|q| if *q < Q::from_integer(0) { -*q } else { *q })
        .sum()
}

/// Compares `lhs` and `rhs` at admissible points of both (random, or
/// every point of the domain when `s.exhaustive`; the caller checks the
/// domain's size against `s.max_points` first).
pub fn compare(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<SpotReport, EvalError> {
    if s.exhaustive {
        return compare_exhaustive(lhs, rhs, s);
    }
    let pts = points(&[lhs, rhs], s);
    compare_points(lhs, rhs, &pts, SPOT_BUDGET, u64::MAX, 0, s.lhs_is_domain)
}

/// Every point of the domain, streamed: values are kept only as a bounded
/// sample, mismatches as the smallest few (and counted).
fn compare_exhaustive(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<SpotReport, EvalError> {
    let sampler = Sampler::with_domain(&[lhs, rhs], s.triangles_hold);
    let ev = Evaluator::<Surd>::new();
    let mut rep = SpotReport::new();
    let mut failure: Option<EvalError> = None;
    let mut visited = 0u64;
    sampler.for_each_point(s.max_j, &mut |p| {
        visited += 1;
        if visited > s.max_points {
            failure = Some(EvalError::TooLarge);
            return false;
        }
        let pair = side_value(&ev, lhs, p).and_then(|a| side_value(&ev, rhs, p).map(|b| (a, b)));
        match pair {
            Ok((a, b)) => {
                rep.record(p, a, b, false, s.lhs_is_domain);
                true
            }
            Err(e) => {
                failure = Some(e);
                false
            }
        }
    });
    match failure {
        Some(e) => Err(e),
        None => Ok(rep.finish()),
    }
}

/// `compare` with a budget of summation points per evaluation.
pub fn compare_budget(
    lhs: &Expr,
    rhs: &Expr,
    s: &SpotSettings,
    budget: u64,
) -> Result<SpotReport, EvalError> {
    let pts = points(&[lhs, rhs], s);
    compare_points(lhs, rhs, &pts, budget, u64::MAX, 0, s.lhs_is_domain)
}

/// Compares at given points.
pub fn compare_at(lhs: &Expr, rhs: &Expr, pts: &[Point]) -> Result<SpotReport, EvalError> {
    compare_at_budget(lhs, rhs, pts, SPOT_BUDGET)
}

/// Compares at given points with a budget of summation points per
/// evaluation (`EvalError::TooLarge` beyond it).
pub fn compare_at_budget(
    lhs: &Expr,
    rhs: &Expr,
    pts: &[Point],
    budget: u64,
) -> Result<SpotReport, EvalError> {
    compare_points(lhs, rhs, pts, budget, u64::MAX, 0, false)
}

/// Compares at up to `s.samples` points while the summation points visited
/// stay within `total` (at least `min_points` points when any fit): the
/// comparison for inputs whose sums are expensive. `TooLarge` when not even
/// one point fits.
pub fn compare_within(
    lhs: &Expr,
    rhs: &Expr,
    s: &SpotSettings,
    total: u64,
    min_points: usize,
) -> Result<SpotReport, EvalError> {
    let pts = points(&[lhs, rhs], s);
    compare_points(lhs, rhs, &pts, total, total, min_points, s.lhs_is_domain)
}

/// The comparison loop: each evaluation within `budget` summation points,
/// stopping once `total` are spent and `min_points` points are done.
fn compare_points(
    lhs: &Expr,
    rhs: &Expr,
    pts: &[Point],
    budget: u64,
    total: u64,
    min_points: usize,
    lhs_is_domain: bool,
) -> Result<SpotReport, EvalError> {
    let mut ev = Evaluator::<Surd>::new();
    ev.budget = budget;
    let mut rep = SpotReport::new();
    let mut spent: u64 = 0;
    for p in pts {
        if spent >= total && rep.checked >= min_points {
            break;
        }
        let a = side_value(&ev, lhs, p)?;
        spent = spent.saturating_add(ev.points_visited());
        let b = side_value(&ev, rhs, p)?;
        spent = spent.saturating_add(ev.points_visited());
        rep.record(p, a, b, true, lhs_is_domain);
    }
    Ok(rep.finish())
}
