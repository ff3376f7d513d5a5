//! The expression language: pest grammar (grammar/recoup.pest) to `Expr`
//! and `CouplingTree`, and `Expr` back to plain text that parses to the
//! same `Expr`. Only this module sees pest pairs; users see friendly names
//! for grammar rules, never rule identifiers.

mod error;
mod guard;
mod lower;
mod print;

pub use error::ParseError;
pub use guard::{MAX_DEPTH, MAX_INPUT, MAX_SIGN_RUN};
pub use lower::literal_problem;
pub use print::{print_factor, print_term};

use crate::expr::{CouplingTree, Expr};
use grammar::{Grammar, Rule};
use num_traits::Signed;
use pest::Parser;

mod grammar {
    #![allow(missing_docs)]
    use pest_derive::Parser;

    /// The pest parser generated from grammar/recoup.pest.
    #[derive(Parser)]
    #[grammar = "../grammar/recoup.pest"]
    pub struct Grammar;
}

/// Parses an expression of the language (the README's table).
pub fn parse(input: &str) -> Result<Expr, ParseError> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    guard::check(input)?;
    pest::set_error_detail(true);
    let mut pairs =
        Grammar::parse(Rule::expression_input, input).map_err(|e| error::from_pest(input, e))?;
    let top = pairs.next().unwrap();
    let expr = top.into_inner().next().unwrap();
    lower::lower_expr(input, expr)
}

/// Parses a coupling tree such as `((j1, j2) j12, j3) J`.
pub fn parse_tree(input: &str) -> Result<CouplingTree, ParseError> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    guard::check(input)?;
    pest::set_error_detail(true);
    let mut pairs =
        Grammar::parse(Rule::tree_input, input).map_err(|e| error::from_pest(input, e))?;
    let top = pairs.next().unwrap();
    let node = top.into_inner().next().unwrap();
    lower::lower_tree(input, node, true)
}

/// Notes on symbols that are 0 because a literal projection exceeds its
/// literal angular momentum (|m| > j): the usual convention makes them 0,
/// which the user may not have meant.
pub fn literal_zero_notes(e: &Expr) -> Vec<String> {
    let mut out = Vec::new();
    for t in &e.terms {
        for f in &t.factors {
            for (j, m) in f.columns() {
                if j.is_constant() && m.is_constant() && m.constant_part().abs() > j.constant_part()
                {
                    let note = format!(
                        "{} is 0: its projection {m} exceeds j = {j} (|m| <= j; the usual convention)",
                        print_factor(f)
                    );
                    if !out.contains(&note) {
                        out.push(note);
                    }
                }
            }
        }
    }
    out
}
