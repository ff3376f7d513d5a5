//! recoup: reduce, verify and evaluate angular-momentum algebra.
#![warn(missing_docs)]

pub mod algebra;
pub mod expr;
pub mod numeric;
pub mod render;
pub mod syntax;
pub mod verify;
