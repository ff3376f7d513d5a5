//! `recoup recouple FROM TO`: the recoupling coefficient between two
//! coupling schemes, as a formula, LaTeX, JSON, an exact value or the
//! transformation matrix for numeric leaves.

use super::eval::parse_assignment;
use super::{read_arg, Failure};
use clap::Args;
use recoup::numeric::eval::Evaluator;
use recoup::numeric::Surd;
use recoup::recouple::{matrix, only_6j, recouple};
use recoup::render::latex;
use recoup::simplify::Options;

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

fn tree(s: &str) -> Result<recoup::expr::CouplingTree, Failure> {
    recoup::syntax::parse_tree(&read_arg(s)?)
        .map_err(|e| Failure::input(format!("parse error at {e}")))
}

pub fn run(a: RecoupleArgs) -> Result<(), Failure> {
    let from = tree(&a.from)?;
    let to = tree(&a.to)?;
    if a.matrix {
        let m = matrix::matrices(&from, &to).map_err(|e| Failure::input(e.to_string()))?;
        if a.json {
            println!("{}", matrix::json(&m));
        } else {
            print!("{}", matrix::text(&m));
        }
        return Ok(());
    }
    let r = recouple(&from, &to, &Options::default()).map_err(|e| Failure::input(e.to_string()))?;
    let result = if a.only_6j {
        only_6j(&r.outcome.result)
    } else {
        r.outcome.result.clone()
    };
    let value = match &a.at {
        Some(s) => {
            let at = parse_assignment(s)?;
            let v = Evaluator::<Surd>::new()
                .eval_checked(&result, &at)
                .map_err(|e| Failure::input(e.to_string()))?;
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
        let count = |k: fn(&recoup::expr::Factor) -> bool| {
            result
                .terms
                .iter()
                .map(|t| t.factors.iter().filter(|f| k(f)).count())
                .max()
                .unwrap_or(0)
        };
        let six = count(|f| matches!(f, recoup::expr::Factor::SixJ(_)));
        let nine = count(|f| matches!(f, recoup::expr::Factor::NineJ(_)));
        let mut j = serde_json::json!({
            "result": result.to_string(),
            "latex": latex::expr(&result),
            "sums": sums,
            "symbols": {"6j": six, "9j": nine},
            "verified": {"checked": r.outcome.checked, "nonzero": r.outcome.nonzero},
        });
        if let Some(v) = &value {
            j["exact"] = serde_json::Value::String(v.to_string());
            j["float"] = serde_json::json!(v.to_f64());
        }
        println!("{j}");
        return Ok(());
    }
    if a.steps {
        println!("overlap: {}", r.overlap);
        super::print_steps(&r.outcome.steps, &r.outcome.notes);
    }
    if a.latex {
        println!("{}", latex::expr(&result));
    } else {
        println!("{result}");
    }
    if let Some(v) = value {
        println!("{v}\t{}", recoup::render::fmt_float(v.to_f64()));
    }
    Ok(())
}
