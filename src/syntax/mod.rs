//! The expression language: pest grammar (grammar/recoup.pest) to `Expr`
//! and `CouplingTree`, and `Expr` back to plain text that parses to the
//! same `Expr`. Only this module sees pest pairs; users see friendly names
//! for grammar rules, never rule identifiers.

mod error;
mod lower;
mod print;

pub use error::ParseError;
pub use print::{print_factor, print_term};

use crate::expr::{CouplingTree, Expr};
use grammar::{Grammar, Rule};
use pest::Parser;

mod grammar {
    #![allow(missing_docs)]
    use pest_derive::Parser;

    /// The pest parser generated from grammar/recoup.pest.
    #[derive(Parser)]
    #[grammar = "../grammar/recoup.pest"]
    pub struct Grammar;
}

/// Parses an expression of the language (DESIGN.md).
pub fn parse(input: &str) -> Result<Expr, ParseError> {
    pest::set_error_detail(true);
    let mut pairs =
        Grammar::parse(Rule::expression_input, input).map_err(|e| error::from_pest(input, e))?;
    let top = pairs.next().unwrap();
    let expr = top.into_inner().next().unwrap();
    lower::lower_expr(input, expr)
}

/// Parses a coupling tree such as `((j1, j2) j12, j3) J`.
pub fn parse_tree(input: &str) -> Result<CouplingTree, ParseError> {
    pest::set_error_detail(true);
    let mut pairs =
        Grammar::parse(Rule::tree_input, input).map_err(|e| error::from_pest(input, e))?;
    let top = pairs.next().unwrap();
    let node = top.into_inner().next().unwrap();
    lower::lower_tree(input, node, true)
}
