//! `recoup recouple FROM TO`: the recoupling coefficient between two
//! coupling schemes, as a formula, LaTeX, JSON, an exact value or the
//! transformation matrix for numeric leaves.

use super::eval::parse_assignment;
use super::{out, outln, read_arg, Failure, Io};
use crate::numeric::eval::Evaluator;
use crate::numeric::Surd;
use crate::recouple::{matrix, recouple_as, Form};
use crate::render::latex;
use crate::simplify::Options;
use clap::Args;

#[derive(Args, Debug)]
pub struct RecoupleArgs {
    /// the first coupling scheme, e.g. "((j1, j2) j12, j3) J"
    from: String,
    /// the second coupling scheme, e.g. "(j1, (j2, j3) j23) J"
    to: String,
    /// print LaTeX
    #[arg(long)]
    latex: bool,
    /// print JSON {"result", "latex", "sums", "symbols"}
    #[arg(long)]
    json: bool,
    /// write every 9j as a sum of three 6j (for codes with 6j routines only)
    #[arg(long)]
    only_6j: bool,
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

fn tree(s: &str, io: &mut Io) -> Result<crate::expr::CouplingTree, Failure> {
    crate::syntax::parse_tree(&read_arg(s, io)?)
        .map_err(|e| Failure::input(format!("parse error at {e}")))
}

pub fn run(a: RecoupleArgs, io: &mut Io) -> Result<(), Failure> {
    let from = tree(&a.from, io)?;
    let to = tree(&a.to, io)?;
    if a.matrix {
        let m = matrix::matrices(&from, &to)?;
        if a.json {
            outln!(io, "{}", matrix::json(&m))?;
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
    let r = recouple_as(&from, &to, &Options::default(), form)?;
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
        let sums = result
            .terms
            .iter()
            .map(|t| t.bound.len())
            .max()
            .unwrap_or(0);
        let count = |k: fn(&crate::expr::Factor) -> bool| {
            result
                .terms
                .iter()
                .map(|t| t.factors.iter().filter(|f| k(f)).count())
                .max()
                .unwrap_or(0)
        };
        let six = count(|f| matches!(f, crate::expr::Factor::SixJ(_)));
        let nine = count(|f| matches!(f, crate::expr::Factor::NineJ(_)));
        let mut j = serde_json::json!({
            "result": result.to_string(),
            "latex": latex::expr(&result),
            "sums": sums,
            "symbols": {"6j": six, "9j": nine},
            "verified": {
                "against": "the overlap of the two coupled states from its definition",
                "checked": r.outcome.checked,
                "nonzero": r.outcome.nonzero,
                "max_j": crate::expr::lin::fmt_q(&r.outcome.certificate.max_j),
                "whole": r.outcome.certificate.compared,
            },
        });
        if let Some(v) = &value {
            j["exact"] = serde_json::Value::String(v.to_string());
            j["float"] = serde_json::json!(v.to_f64());
        }
        outln!(io, "{j}")?;
        return Ok(());
    }
    if a.steps {
        outln!(io, "overlap: {}", r.overlap)?;
        super::print_steps(io, &r.outcome.steps, &r.outcome.notes)?;
    }
    if a.latex {
        outln!(io, "{}", latex::expr(&result))?;
    } else {
        outln!(io, "{result}")?;
    }
    if let Some(v) = value {
        outln!(io, "{v}\t{}", crate::render::fmt_float(v.to_f64()))?;
    }
    Ok(())
}
