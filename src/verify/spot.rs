//! Spot-evaluation: two expressions evaluated exactly at the same
//! admissible points. Agreement at every point, with at least one nonzero,
//! is what "verified" means in recoup: strong evidence, not a proof.

use super::rng::Rng;
use super::sample::{Point, Sampler};
use crate::expr::{Expr, Q};
use crate::numeric::eval::{EvalError, Evaluator};
use crate::numeric::Surd;

/// How to choose points.
#[derive(Clone, Debug)]
pub struct SpotSettings {
    /// largest value of any free variable
    pub max_j: Q,
    /// number of random points
    pub samples: usize,
    /// enumerate every point up to `max_j` instead (at most `samples * 50`)
    pub exhaustive: bool,
    /// seed of the random points
    pub seed: u64,
}

/// Most summation points per evaluation in spot comparisons.
pub const SPOT_BUDGET: u64 = 5_000_000;

impl Default for SpotSettings {
    fn default() -> Self {
        SpotSettings {
            max_j: Q::from_integer(3),
            samples: 60,
            exhaustive: false,
            seed: 1,
        }
    }
}

/// A point where the two sides differ.
#[derive(Clone, Debug)]
pub struct Mismatch {
    /// the values of the free variables
    pub at: Point,
    /// value of the left side
    pub lhs: Surd,
    /// value of the right side
    pub rhs: Surd,
}

/// The outcome of a comparison.
#[derive(Clone, Debug)]
pub struct SpotReport {
    /// points evaluated
    pub checked: usize,
    /// points where either side was nonzero
    pub nonzero: usize,
    /// mismatches found (the smallest first), at most a few
    pub mismatches: Vec<Mismatch>,
    /// every point with both values (for diagnosis)
    pub values: Vec<(Point, Surd, Surd)>,
}

impl SpotReport {
    /// Equal at every point and nonzero somewhere.
    pub fn agrees(&self) -> bool {
        self.mismatches.is_empty() && self.nonzero > 0
    }
}

/// The points a comparison uses.
pub fn points(exprs: &[&Expr], s: &SpotSettings) -> Vec<Point> {
    let sampler = Sampler::new(exprs);
    if s.exhaustive {
        return sampler.exhaustive(s.max_j, s.samples.saturating_mul(50).max(1));
    }
    let mut rng = Rng::new(s.seed);
    let mut out: Vec<Point> = Vec::new();
    let mut misses = 0;
    while out.len() < s.samples && misses < s.samples * 4 + 20 {
        match sampler.random(&mut rng, s.max_j, 40) {
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

/// Compares `lhs` and `rhs` at admissible points of both.
pub fn compare(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<SpotReport, EvalError> {
    let pts = points(&[lhs, rhs], s);
    compare_at(lhs, rhs, &pts)
}

/// `compare` with a budget of summation points per evaluation.
pub fn compare_budget(
    lhs: &Expr,
    rhs: &Expr,
    s: &SpotSettings,
    budget: u64,
) -> Result<SpotReport, EvalError> {
    let pts = points(&[lhs, rhs], s);
    compare_at_budget(lhs, rhs, &pts, budget)
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
    compare_points(lhs, rhs, pts, budget, u64::MAX, 0)
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
    compare_points(lhs, rhs, &pts, total, total, min_points)
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
) -> Result<SpotReport, EvalError> {
    let mut ev = Evaluator::<Surd>::new();
    ev.budget = budget;
    let mut rep = SpotReport {
        checked: 0,
        nonzero: 0,
        mismatches: Vec::new(),
        values: Vec::new(),
    };
    let mut spent: u64 = 0;
    for p in pts {
        if spent >= total && rep.checked >= min_points {
            break;
        }
        let a = ev.eval(lhs, p)?;
        spent = spent.saturating_add(ev.points_visited());
        let b = ev.eval(rhs, p)?;
        spent = spent.saturating_add(ev.points_visited());
        rep.checked += 1;
        if !a.is_zero() || !b.is_zero() {
            rep.nonzero += 1;
        }
        if a != b {
            rep.mismatches.push(Mismatch {
                at: p.clone(),
                lhs: a.clone(),
                rhs: b.clone(),
            });
        }
        rep.values.push((p.clone(), a, b));
    }
    rep.mismatches.sort_by_key(|x| point_size(&x.at));
    Ok(rep)
}
