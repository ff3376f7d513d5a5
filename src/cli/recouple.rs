//! `recoup recouple FROM TO`: the recoupling coefficient between two
//! coupling schemes, as a formula, LaTeX, JSON, an exact value or the
//! transformation matrix for numeric leaves.

use super::eval::parse_assignment;
use super::{out, outln, read_arg, Failure, Io};
use crate::evaluate::Evaluator;
use crate::numeric::Surd;
use crate::recouple::{matrix, recouple_as, Form, Recoupling};
use crate::render::latex;
use crate::simplify::Options;
use clap::Args;

#[derive(Args, Debug)]
pub struct RecoupleArgs {
    /// the first coupling scheme, e.g. "((j1, j2) j12, j3) J"
    from: String,
    /// the second coupling scheme, e.g. "(j1, (j2, j3) j23) J"
    to: String,
    /// print LaTeX (with --steps: the derivation from the overlap as an
    /// align* chain)
    #[arg(long)]
    latex: bool,
    /// with --latex: a complete article that compiles on its own
    #[arg(long, requires = "latex")]
    document: bool,
    /// print JSON {"result", "latex", "sums", "symbols"}
    #[arg(long)]
    json: bool,
    /// write every 9j as a sum of three 6j (for codes with 6j routines only)
    #[arg(long)]
    only_6j: bool,
    /// print each symbol in recoup's canonical form instead of the order
    /// the two schemes name their momenta
    #[arg(long)]
    canonical: bool,
    /// also print the exact value at these values, e.g. --at j1=1/2,j2=1,...
    #[arg(long, value_name = "VALUES")]
    at: Option<String>,
    /// numeric leaves: print the whole transformation matrix for each total
    #[arg(long)]
    matrix: bool,
    /// print the verified steps of the derivation
    #[arg(long)]
    steps: bool,
}

/// A scheme's text (`-` reads standard input) and its tree.
fn tree(s: &str, io: &mut Io) -> Result<(String, crate::expr::CouplingTree), Failure> {
    let text = read_arg(s, io)?;
    let t = crate::syntax::parse_tree(&text)
        .map_err(|e| Failure::input(format!("parse error at {e}")))?;
    Ok((text, t))
}

pub fn run(a: RecoupleArgs, io: &mut Io) -> Result<(), Failure> {
    let (from_text, from) = tree(&a.from, io)?;
    let (to_text, to) = tree(&a.to, io)?;
    if a.matrix {
        let m = matrix::matrices(&from, &to)?;
        if a.json {
            outln!(io, "{}", super::json_text(&matrix::shape(&m))?)?;
        } else if a.latex {
            super::write_latex(
                io,
                &matrix::latex(&m),
                a.document,
                "Recoupling matrix",
                "Exact; orthogonality of every block checked (recoup).",
            )?;
        } else {
            out!(io, "{}", matrix::text(&m))?;
        }
        return Ok(());
    }
    let form = if a.only_6j {
        Form::SixJOnly
    } else {
        Form::Symbols
    };
    let opts = Options::default();
    let mut r = recouple_as(&from, &to, &opts, form)?;
    if a.canonical {
        return print_recoupling(&a, io, &r);
    }
    crate::recouple::arrange_for_reading(&mut r, &from_text, &to_text, &opts)?;
    crate::render::arrange::in_reading_order(&[&from_text, &to_text], || {
        print_recoupling(&a, io, &r)
    })
}

/// Prints a recoupling coefficient (and its value at `--at`) as text,
/// LaTeX or JSON.
fn print_recoupling(a: &RecoupleArgs, io: &mut Io, r: &Recoupling) -> Result<(), Failure> {
    let result = r.outcome.result.clone();
    let value = match &a.at {
        Some(s) => {
            let at = parse_assignment(s)?;
            let v = Evaluator::<Surd>::new().eval_checked(&result, &at)?;
            Some(v)
        }
        None => None,
    };
    if a.json {
        let mut report = crate::api::RecouplingReport::of(r);
        if !a.steps {
            report.steps.clear();
        }
        report.value = value.as_ref().map(crate::api::Value::exact);
        outln!(io, "{}", super::json_text(&report)?)?;
        return Ok(());
    }
    if a.latex {
        let body = if a.steps {
            super::simplify::latex_chain(&latex::expr(&r.overlap), &r.outcome.steps)
        } else if a.document {
            let lhs = crate::render::document::term_lines(&r.overlap);
            crate::render::document::equation(&lhs, &result)
        } else {
            format!("{}\n", latex::expr(&result))
        };
        let note = format!(
            "Verified against the overlap of the two coupled states at {} points ({} nonzero; recoup).",
            r.outcome.checked, r.outcome.nonzero
        );
        super::write_latex(io, &body, a.document, "Recoupling coefficient", &note)?;
        if let Some(v) = value {
            outln!(io, "% value: {v}\t{}", crate::render::fmt_float(v.to_f64()))?;
        }
        return Ok(());
    }
    if a.steps {
        outln!(io, "overlap: {}", r.overlap)?;
        super::print_steps(io, &r.outcome.steps, &r.outcome.notes)?;
    }
    outln!(io, "{result}")?;
    if let Some(v) = value {
        outln!(io, "{v}\t{}", crate::render::fmt_float(v.to_f64()))?;
    }
    Ok(())
}
