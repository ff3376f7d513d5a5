//! The expression language: pest grammar (grammar/recoup.pest) to `Expr`
//! and `CouplingTree`, and `Expr` back to plain text that parses to the
//! same `Expr`. Only this module sees pest pairs; users see friendly names
//! for grammar rules, never rule identifiers.

mod element;
mod error;
mod guard;
mod layout;
mod lower;
mod print;

pub use error::ParseError;
pub use guard::{MAX_DEPTH, MAX_INPUT, MAX_SIGN_RUN};
pub use lower::literal_problem;
pub use print::{print_factor, print_term};

use crate::algebra::declare::Declarations;
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

/// Parses an expression of the language (the README's table). Text that
/// declares parities (`integer k;`) is refused here: read it with
/// `parse_declared`, which returns the declarations too.
pub fn parse(input: &str) -> Result<Expr, ParseError> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    let (declarations, e) = parse_declared(input)?;
    if !declarations.is_empty() {
        return Err(ParseError::at(
            input,
            0,
            "this text declares parities; read it with parse_declared, which keeps them",
        ));
    }
    Ok(e)
}

/// Parses an expression that may start with declarations (`integer k, q;
/// half-odd s;`), returning both.
pub fn parse_declared(input: &str) -> Result<(Declarations, Expr), ParseError> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    guard::check(input)?;
    pest::set_error_detail(true);
    let mut pairs =
        Grammar::parse(Rule::expression_input, input).map_err(|e| error::from_pest(input, e))?;
    let top = pairs.next().unwrap();
    let mut declarations = Declarations::new();
    for pair in top.into_inner() {
        match pair.as_rule() {
            Rule::declaration => lower::lower_declaration(input, pair, &mut declarations)?,
            Rule::expr => return Ok((declarations, lower::lower_expr(input, pair)?)),
            _ => {}
        }
    }
    unreachable!("the grammar puts an expression in every input")
}

pub use layout::{Infix, Layout};

/// The layout of an expression's text as written (declarations skipped),
/// or `None` when the text does not parse.
pub fn layout(input: &str) -> Option<Layout> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    guard::check(input).ok()?;
    let mut pairs = Grammar::parse(Rule::expression_input, input).ok()?;
    let top = pairs.next()?;
    let ctx = lower::Ctx {
        input,
        work: std::cell::Cell::new(0),
    };
    let expr = top.into_inner().find(|p| p.as_rule() == Rule::expr)?;
    ctx.layout(expr).ok()
}

/// The text after its leading declarations (`integer k, q; half-odd s;`);
/// the whole text when it declares nothing or does not parse.
pub fn without_declarations(input: &str) -> &str {
    let Ok(mut pairs) = Grammar::parse(Rule::expression_input, input) else {
        return input;
    };
    let end = pairs
        .next()
        .into_iter()
        .flat_map(|top| top.into_inner())
        .filter(|p| p.as_rule() == Rule::declaration)
        .map(|p| p.as_span().end())
        .max()
        .unwrap_or(0);
    &input[end..]
}

/// A phase as the user wrote it.
#[derive(Clone, Debug)]
pub struct WrittenPhase {
    /// the text, e.g. `(-1)^(j-m)`
    pub text: String,
    /// its exponent
    pub exponent: crate::expr::Lin,
    /// one-based line and column
    pub line: usize,
    /// one-based column
    pub column: usize,
}

/// Every phase written in an expression's text, in order (empty when the
/// text does not parse).
pub fn written_phases(input: &str) -> Vec<WrittenPhase> {
    let input = input.strip_prefix('\u{feff}').unwrap_or(input);
    if guard::check(input).is_err() {
        return Vec::new();
    }
    let Ok(mut pairs) = Grammar::parse(Rule::expression_input, input) else {
        return Vec::new();
    };
    let mut found = Vec::new();
    lower::written_phases(input, pairs.next().unwrap(), &mut found);
    found
        .into_iter()
        .map(|(text, exponent, at)| {
            let e = ParseError::at(input, at, "");
            WrittenPhase {
                text,
                exponent,
                line: e.line,
                column: e.column,
            }
        })
        .collect()
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
    for t in e.terms() {
        for f in t.factors() {
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
