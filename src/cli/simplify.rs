//! `recoup simplify EXPR`: the simplified expression, verified, with the
//! trace of steps on request.

use super::{outln, parse_expr, read_arg, Failure, Io};
use crate::render::latex;
use crate::simplify::{simplify, Options};
use clap::Args;

#[derive(Args, Debug)]
pub struct SimplifyArgs {
    /// the expression (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    expr: String,
    /// print every step with its rule, source and the expression after it
    #[arg(long)]
    steps: bool,
    /// print LaTeX (with --steps: the derivation as an align* chain)
    #[arg(long)]
    latex: bool,
    /// with --latex: a complete article that compiles on its own
    #[arg(long, requires = "latex")]
    document: bool,
    /// print JSON {"input", "result", "latex", "steps", "verified"}
    #[arg(long)]
    json: bool,
    /// let canonical forms use Regge's symmetries
    #[arg(long)]
    regge: bool,
    /// print the result in recoup's canonical form rather than in the
    /// input's arrangement (symbol spellings and phase order)
    #[arg(long)]
    canonical: bool,
    /// points for the final verification
    #[arg(long, value_name = "N", default_value_t = 40)]
    samples: usize,
    /// largest value of free variables at the verification points
    #[arg(long, value_name = "J", default_value = "5/2")]
    max_j: String,
}

/// A derivation as an `align*` chain: the input, then each step's result
/// labelled with its published source (the rule's name where it has none).
pub fn latex_chain(input: &str, steps: &[crate::simplify::Step]) -> String {
    let labelled: Vec<(crate::expr::Expr, String)> = steps
        .iter()
        .map(|s| {
            let label = if s.source.citations.is_empty() && s.source.note.is_none() {
                crate::render::document::text(&s.rule)
            } else {
                s.source.latex()
            };
            (s.after.clone(), label)
        })
        .collect();
    crate::render::document::chain(input, &labelled)
}

/// The declarations in force, in the language (`integer k; half-odd s;`).
pub fn declared_text() -> Option<String> {
    let d = crate::algebra::declare::current();
    (!d.is_empty()).then(|| d.to_string())
}

/// The text as the user typed it, for the echo: blank lines (and the
/// blanked comment lines of standard input) left out, later lines
/// indented under the first.
fn as_typed(text: &str) -> String {
    text.lines()
        .map(str::trim_end)
        .filter(|l| !l.trim().is_empty())
        .enumerate()
        .map(|(i, l)| {
            if i == 0 {
                l.trim_start().to_string()
            } else {
                format!("  {l}")
            }
        })
        .collect::<Vec<_>>()
        .join("\n")
}

pub fn run(a: SimplifyArgs, io: &mut Io) -> Result<(), Failure> {
    let text = read_arg(&a.expr, io)?;
    let e = parse_expr(&text)?;
    let mut opts = Options {
        regge: a.regge,
        ..Options::default()
    };
    opts.final_spot = super::check::settings(&a.max_j, a.samples, false, opts.final_spot.seed)?;
    let mut out = simplify(&e, &opts)?;
    if a.canonical {
        return print_outcome(&a, io, &text, &out);
    }
    crate::simplify::arrange_for_reading(&mut out, &[&text], &opts)?;
    crate::render::arrange::in_reading_order(&[&text], || print_outcome(&a, io, &text, &out))
}

/// Prints a simplification as text, LaTeX or JSON.
fn print_outcome(
    a: &SimplifyArgs,
    io: &mut Io,
    text: &str,
    out: &crate::simplify::Outcome,
) -> Result<(), Failure> {
    if a.json {
        let report = crate::api::Simplification::of(out, declared_text());
        outln!(io, "{}", super::json_text(&report)?)?;
        return Ok(());
    }
    if a.latex {
        let typed = crate::render::written::latex_as_written(text, &out.input);
        let body = if a.steps {
            latex_chain(&typed, &out.steps)
        } else if a.document {
            let lhs =
                crate::render::document::packed_lines(&typed, crate::render::document::LINE_BUDGET);
            crate::render::document::equation(&lhs, &out.result)
        } else {
            format!("{}\n", latex::expr(&out.result))
        };
        let note = format!(
            "Verified by exact evaluation at {} points ({} nonzero; recoup).",
            out.checked, out.nonzero
        );
        return super::write_latex(io, &body, a.document, "Simplification", &note);
    }
    if a.steps {
        outln!(io, "input: {}", as_typed(text))?;
        if let Some(d) = declared_text() {
            outln!(io, "declared: {d}")?;
        }
        super::print_steps(io, &out.steps, &out.notes)?;
        outln!(
            io,
            "result (verified against the input at {} points, {} nonzero):",
            out.checked,
            out.nonzero
        )?;
    }
    outln!(io, "{}", out.result)?;
    Ok(())
}
