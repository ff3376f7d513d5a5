//! The one verification gate every printed formula passes: the result of
//! a command is compared, by exact spot-evaluation, with the expression
//! the command was asked about (for `simplify` its input, for `recouple`
//! the overlap of the two coupled states from its definition), after the
//! last rewrite. A result with a free variable its reference does not
//! have is an internal error before any number is computed.
//!
//! When the reference is too expensive to evaluate within the budget at
//! the requested values, the gate tries smaller values (down to 1/2)
//! before it gives up; giving up is reported in the certificate, never
//! hidden.

use super::sample::Point;
use super::spot::{compare_within, SpotSettings, SpotValue};
use crate::evaluate::EvalError;
use crate::expr::{Expr, Name, Q};
use std::collections::BTreeSet;

/// What the gate established.
#[derive(Clone, Debug, PartialEq)]
pub struct Certificate {
    /// points at which the result was compared with the reference
    pub checked: usize,
    /// of those, points where either was nonzero
    pub nonzero: usize,
    /// the largest value of a free variable at those points
    pub max_j: Q,
    /// false when the reference could not be evaluated within the budget
    /// at any size: the result was then only verified step by step
    pub compared: bool,
}

/// Why a result did not pass.
#[derive(Clone, Debug, thiserror::Error)]
pub enum GateError {
    /// The result has free variables the reference lacks.
    #[error("the result has free variables its input does not have: {}", .0.join(", "))]
    NewVariables(Vec<String>),
    /// The result differs from the reference.
    #[error("the result differs from its input")]
    Mismatch {
        /// where
        at: Point,
        /// the reference's value
        reference: SpotValue,
        /// the result's value
        result: SpotValue,
    },
    /// Neither could be evaluated.
    #[error("{0}")]
    Eval(#[from] EvalError),
}

/// The free variables of `result` that `reference` lacks.
pub fn new_variables(reference: &Expr, result: &Expr) -> Vec<Name> {
    let have: BTreeSet<Name> = reference.free_vars();
    result
        .free_vars()
        .into_iter()
        .filter(|v| !have.contains(v))
        .collect()
}

/// Compares `result` with `reference` (see the module comment); `budget`
/// bounds the summation points all evaluations may visit together.
pub fn certify(
    reference: &Expr,
    result: &Expr,
    s: &SpotSettings,
    budget: u64,
) -> Result<Certificate, GateError> {
    let extra = new_variables(reference, result);
    if !extra.is_empty() {
        return Err(GateError::NewVariables(
            extra.iter().map(|n| n.to_string()).collect(),
        ));
    }
    let mut max_j = s.max_j;
    let half = Q::new(1, 2);
    loop {
        let settings = SpotSettings {
            max_j,
            lhs_is_domain: true,
            ..s.clone()
        };
        match compare_within(reference, result, &settings, budget, 3) {
            Ok(rep) => {
                if rep.checked == 0 {
                    if let Some(why) = rep.undefined_why {
                        return Err(GateError::Eval(EvalError::Arithmetic(format!(
                            "the input is undefined at every point tried, so the result cannot be verified: {why}"
                        ))));
                    }
                }
                if let Some(m) = rep.mismatches.first() {
                    return Err(GateError::Mismatch {
                        at: m.at.clone(),
                        reference: m.lhs.clone(),
                        result: m.rhs.clone(),
                    });
                }
                return Ok(Certificate {
                    checked: rep.checked,
                    nonzero: rep.nonzero,
                    max_j,
                    compared: true,
                });
            }
            Err(EvalError::TooLarge) if max_j > half => {
                max_j = (max_j - half).max(half);
            }
            Err(EvalError::TooLarge) => {
                return Ok(Certificate {
                    checked: 0,
                    nonzero: 0,
                    max_j,
                    compared: false,
                })
            }
            Err(e) => return Err(e.into()),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse;

    #[test]
    fn a_new_free_variable_or_a_wrong_value_never_passes() {
        let s = SpotSettings::default();
        let input = parse("sum(x: (2*x+1) {a, b, x; a, b, c})").unwrap();
        let good = parse("(-1)^(2*a+2*b) tri(a, b, c)").unwrap();
        let c = certify(&input, &good, &s, 100_000).unwrap();
        assert!(c.compared && c.nonzero > 0);
        let captured = parse("(-1)^(2*a+2*b) tri(a, b, y)").unwrap();
        assert!(matches!(
            certify(&input, &captured, &s, 100_000),
            Err(GateError::NewVariables(v)) if v == ["y"]
        ));
        let wrong = parse("tri(a, b, c)").unwrap();
        assert!(matches!(
            certify(&input, &wrong, &s, 100_000),
            Err(GateError::Mismatch { .. })
        ));
    }
}
