//! recoup: reduce, verify and evaluate angular-momentum algebra — sums
//! over magnetic projections and intermediate angular momenta of products
//! of Wigner 3j, 6j and 9j symbols and Clebsch–Gordan coefficients.
//!
//! The API is [`api`] (its main types are re-exported here): parse an
//! [`Expression`], simplify it, check it against another, evaluate it
//! exactly or in floating point, derive recoupling coefficients
//! ([`recouple`]), compute single symbols ([`api::symbols`]), families
//! ([`api::families`]) and bulk tables ([`api::tables`]). Every result has
//! passed verification by exact evaluation against its own input; every
//! failure is a typed [`Error`].
//!
//! ```
//! use recoup::{Expression, SimplifySettings};
//!
//! // sum over x of (2x+1) {a, b, x; a, b, c} (Edmonds 1957, eq. 6.2.9
//! // with the orthogonality of 6j symbols, from memory)
//! let e = Expression::parse("sum(x: (2*x+1) {a, b, x; a, b, c})").unwrap();
//! let s = e.simplify(&SimplifySettings::default()).unwrap();
//! assert_eq!(s.result, "(-1)^(2*c) tri(a, b, c)");
//! let at = recoup::api::point(&[("a", "1/2"), ("b", "1"), ("c", "1/2")]).unwrap();
//! assert_eq!(e.evaluate(&at).unwrap().exact.as_deref(), Some("-1"));
//! ```
#![warn(missing_docs)]
// Without `internals`, items that only the crate's own tests and
// benchmarks use (sample generators, test-only accessors) are unreachable;
// with it (every test and clippy --all-targets build) they are public and
// linted as before.
#![cfg_attr(not(feature = "internals"), allow(dead_code, unused_imports))]
// Index loops read more clearly than iterator chains in the matrix code.
#![allow(clippy::needless_range_loop)]

/// Declares internal modules: public to the crate's own tests and
/// benchmarks (feature `internals`), private to everyone else.
macro_rules! internal_modules {
    ($($(#[$attr:meta])* $name:ident;)*) => {$(
        $(#[$attr])*
        #[cfg(feature = "internals")]
        #[doc(hidden)]
        pub mod $name;
        $(#[$attr])*
        #[cfg(not(feature = "internals"))]
        pub(crate) mod $name;
    )*};
}

pub mod api;
#[cfg(feature = "cli")]
pub mod cli;

internal_modules! {
    algebra;
    document;
    evaluate;
    expr;
    graph;
    limits;
    numeric;
    recouple;
    render;
    rules;
    simplify;
    syntax;
    table;
    tensor;
    verify;
}

pub use api::{
    recouple, CheckReport, CheckSettings, Error, Expression, RecouplingForm, RecouplingReport,
    Simplification, SimplifySettings, Value,
};
