//! recoup: reduce, verify and evaluate angular-momentum algebra — sums
//! over magnetic projections and intermediate angular momenta of products
//! of Wigner 3j, 6j and 9j symbols and Clebsch–Gordan coefficients.
//!
//! ```
//! use recoup::evaluate::{eval_exact, Assignment};
//! use recoup::syntax::parse;
//!
//! // 6j-sum-plain: sum over x of (2x+1) {a, b, x; a, b, c} = (-1)^(2a+2b)
//! let e = parse("sum(x: (2*x+1) {a, b, x; a, b, c})").unwrap();
//! let mut at = Assignment::new();
//! for (v, n, d) in [("a", 1, 2), ("b", 1, 1), ("c", 1, 2)] {
//!     at.insert(v.into(), recoup::expr::Q::new(n, d));
//! }
//! assert_eq!(eval_exact(&e, &at).unwrap().to_string(), "-1");
//! ```
#![warn(missing_docs)]
// Index loops read more clearly than iterator chains in the matrix code.
#![allow(clippy::needless_range_loop)]

pub mod algebra;
pub mod api;
#[cfg(feature = "cli")]
pub mod cli;
pub mod document;
pub mod evaluate;
pub mod expr;
pub mod graph;
pub mod limits;
pub mod numeric;
pub mod recouple;
pub mod render;
pub mod rules;
pub mod simplify;
pub mod syntax;
pub mod table;
pub mod tensor;
pub mod verify;
