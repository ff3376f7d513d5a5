//! `recoup graph EXPR`: the projection-sum graph of each term, as
//! Graphviz DOT or JSON.

use super::{out, outln, parse_expr, read_arg, Failure, Io};
use crate::graph::dot;
use clap::Args;

#[derive(Args, Debug)]
pub struct GraphArgs {
    /// the expression (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    expr: String,
    /// print vertices and lines as JSON instead of DOT
    #[arg(long)]
    json: bool,
}

pub fn run(a: GraphArgs, io: &mut Io) -> Result<(), Failure> {
    let e = parse_expr(&read_arg(&a.expr, io)?)?;
    // Clebsch-Gordan coefficients are drawn as the 3j they stand for
    let e = crate::graph::reduce::with_cg_as_3j(&e);
    let has_vertex = e.terms.iter().any(|t| {
        t.factors
            .iter()
            .any(|f| matches!(f, crate::expr::Factor::ThreeJ(_)))
    });
    if !has_vertex {
        return Err(Failure::input(
            "nothing to draw: the expression has no 3j symbol or Clebsch-Gordan coefficient, so it has no projection-sum graph",
        ));
    }
    if a.json {
        let terms: Vec<serde_json::Value> = e.terms.iter().map(dot::json).collect();
        outln!(io, "{}", serde_json::json!({ "terms": terms }))?;
    } else {
        for (i, t) in e.terms.iter().enumerate() {
            if e.terms.len() > 1 {
                outln!(io, "// term {}: {}", i + 1, crate::syntax::print_term(t))?;
            }
            out!(io, "{}", dot::dot(t))?;
        }
    }
    Ok(())
}
