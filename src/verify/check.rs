//! Checking a claim `LHS = RHS`: spot-evaluation at admissible points
//! (random, or every point of the domain, counted before any is
//! evaluated), the smallest counterexample when they differ, and a
//! diagnosis with a repaired claim that is itself checked.

use super::diagnose::{diagnose, Diagnosis};
use super::sample::{Count, Point, Sampler};
use super::spot::{compare, SpotSettings, SpotValue};
use crate::evaluate::EvalError;
use crate::expr::Expr;

/// The verdict on a claim.
#[derive(Clone, Debug)]
pub enum Verdict {
    /// equal at every point, some nonzero
    Equal,
    /// both sides vanish at every point checked: nothing is established
    NotEstablished,
    /// different somewhere
    Different {
        /// the smallest counterexample
        at: Point,
        /// left value there
        lhs: SpotValue,
        /// right value there
        rhs: SpotValue,
        /// a repair, if one was found
        diagnosis: Option<Box<Diagnosis>>,
    },
}

/// The outcome of `check`.
#[derive(Clone, Debug)]
pub struct CheckResult {
    /// the verdict
    pub verdict: Verdict,
    /// points evaluated
    pub checked: usize,
    /// points where either side was nonzero
    pub nonzero: usize,
    /// points where some triad of free variables broke the triangle rule
    pub broken_triads: usize,
    /// points where the sides differ
    pub mismatches: usize,
    /// for an exhaustive check: the number of points in the domain
    /// (every one of them was checked)
    pub domain: Option<u64>,
}

/// Why a check could not run.
#[derive(Clone, Debug, thiserror::Error)]
pub enum CheckError {
    /// An evaluation failed.
    #[error("{0}")]
    Eval(#[from] EvalError),
    /// The exhaustive domain has more points than the budget.
    #[error("an exhaustive check up to j = {max_j} would visit {} (about {rough:.3e} assignments of {vars} free variables before the selection rules); at most {budget} are allowed: raise the budget or lower the largest value", count_text(.count))]
    TooManyPoints {
        /// the count, as far as it went
        count: Count,
        /// the budget
        budget: u64,
        /// the product of the variables' ranges
        rough: f64,
        /// the number of free variables
        vars: usize,
        /// the largest value
        max_j: String,
    },
}

fn count_text(c: &Count) -> String {
    match c {
        Count::Exactly(n) => format!("{n} points"),
        Count::MoreThan(n) => format!("more than {n} points"),
    }
}

/// Counts the exhaustive domain of a claim; an error when it is over the
/// budget (nothing has been evaluated then).
pub fn exhaustive_domain(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<u64, CheckError> {
    let sampler = Sampler::with_domain(&[lhs, rhs], s.triangles_hold);
    match sampler.count(s.max_j, s.max_points) {
        Count::Exactly(n) => Ok(n),
        c @ Count::MoreThan(_) => Err(CheckError::TooManyPoints {
            count: c,
            budget: s.max_points,
            rough: sampler.rough_size(s.max_j),
            vars: sampler.vars().len(),
            max_j: crate::expr::lin::fmt_q(&s.max_j),
        }),
    }
}

/// Checks `lhs = rhs`.
pub fn check(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<CheckResult, CheckError> {
    crate::tensor::with_implied_integers(&[lhs, rhs], || check_declared(lhs, rhs, s))
}

fn check_declared(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<CheckResult, CheckError> {
    let domain = if s.exhaustive {
        Some(exhaustive_domain(lhs, rhs, s)?)
    } else {
        None
    };
    let rep = compare(lhs, rhs, s)?;
    let sampler = Sampler::with_domain(&[lhs, rhs], s.triangles_hold);
    let broken_triads = if s.exhaustive {
        0
    } else {
        rep.values
            .iter()
            .filter(|(p, _, _)| super::diagnose::broken_at(sampler.triads(), p).is_some())
            .count()
    };
    let verdict = if let Some(m) = rep.mismatches.first() {
        Verdict::Different {
            at: m.at.clone(),
            lhs: m.lhs.clone(),
            rhs: m.rhs.clone(),
            diagnosis: diagnose(lhs, rhs, &rep, s).map(Box::new),
        }
    } else if rep.nonzero == 0 {
        Verdict::NotEstablished
    } else {
        Verdict::Equal
    };
    Ok(CheckResult {
        verdict,
        checked: rep.checked,
        nonzero: rep.nonzero,
        broken_triads,
        mismatches: rep.mismatch_count,
        domain,
    })
}
