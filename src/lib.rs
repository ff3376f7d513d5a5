//! recoup: reduce, verify and evaluate angular-momentum algebra.
#![warn(missing_docs)]

pub mod numeric;
