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
    /// print JSON {"input", "result", "latex", "steps", "verified"}
    #[arg(long)]
    json: bool,
    /// let canonical forms use Regge's symmetries
    #[arg(long)]
    regge: bool,
    /// points for the final verification
    #[arg(long, value_name = "N", default_value_t = 40)]
    samples: usize,
    /// largest value of free variables at the verification points
    #[arg(long, value_name = "J", default_value = "5/2")]
    max_j: String,
}

/// The declarations in force, in the language (`integer k; half-odd s;`).
pub fn declared_text() -> Option<String> {
    let d = crate::algebra::declare::current();
    (!d.is_empty()).then(|| d.to_string())
}

pub fn run(a: SimplifyArgs, io: &mut Io) -> Result<(), Failure> {
    let e = parse_expr(&read_arg(&a.expr, io)?)?;
    let mut opts = Options {
        regge: a.regge,
        ..Options::default()
    };
    opts.final_spot = super::check::settings(&a.max_j, a.samples, false, opts.final_spot.seed)?;
    let out = simplify(&e, &opts)?;
    if a.json {
        let report = crate::api::Simplification::of(&out, declared_text());
        outln!(io, "{}", super::json_text(&report)?)?;
        return Ok(());
    }
    if a.latex {
        if a.steps {
            outln!(io, "\\begin{{align*}}")?;
            outln!(io, "  & {} \\\\", latex::expr(&out.input))?;
            for (i, s) in out.steps.iter().enumerate() {
                let end = if i + 1 == out.steps.len() {
                    ""
                } else {
                    " \\\\"
                };
                // each step labelled with its published source (the rule's
                // name where it has none)
                let label = if s.source.citations.is_empty() && s.source.note.is_none() {
                    s.rule.clone()
                } else {
                    s.source.latex()
                };
                outln!(
                    io,
                    "  &= {} && \\text{{{label}}}{end}",
                    latex::expr(&s.after),
                )?;
            }
            outln!(io, "\\end{{align*}}")?;
        } else {
            outln!(io, "{}", latex::expr(&out.result))?;
        }
        return Ok(());
    }
    if a.steps {
        outln!(io, "input: {}", out.input)?;
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
