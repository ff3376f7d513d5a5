//! Checking a claim `LHS = RHS`: spot-evaluation at admissible points, the
//! smallest counterexample when they differ, and a diagnosis with a
//! repaired claim that is itself checked.

use super::diagnose::{diagnose, Diagnosis};
use super::sample::Point;
use super::spot::{compare, SpotSettings};
use crate::expr::Expr;
use crate::numeric::eval::EvalError;
use crate::numeric::Surd;

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
        lhs: Surd,
        /// right value there
        rhs: Surd,
        /// a repair, if one was found
        diagnosis: Option<Diagnosis>,
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
}

/// Checks `lhs = rhs`.
pub fn check(lhs: &Expr, rhs: &Expr, s: &SpotSettings) -> Result<CheckResult, EvalError> {
    let rep = compare(lhs, rhs, s)?;
    let verdict = if let Some(m) = rep.mismatches.first() {
        Verdict::Different {
            at: m.at.clone(),
            lhs: m.lhs.clone(),
            rhs: m.rhs.clone(),
            diagnosis: diagnose(lhs, rhs, &rep, s),
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
    })
}
