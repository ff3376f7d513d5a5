//! `recoup graph EXPR`: the projection-sum graph of each term, as
//! Graphviz DOT or JSON.

use super::{parse_expr, read_arg, Failure};
use clap::Args;
use recoup::graph::dot;

#[derive(Args, Debug)]
pub struct GraphArgs {
    /// the expression (`-` reads standard input)
    expr: String,
    /// print vertices and lines as JSON instead of DOT
    #[arg(long)]
    json: bool,
}

pub fn run(a: GraphArgs) -> Result<(), Failure> {
    let e = parse_expr(&read_arg(&a.expr)?)?;
    // Clebsch-Gordan coefficients are drawn as the 3j they stand for
    let e = recoup::graph::reduce::with_cg_as_3j(&e);
    if a.json {
        let terms: Vec<serde_json::Value> = e.terms.iter().map(dot::json).collect();
        println!("{}", serde_json::json!({ "terms": terms }));
    } else {
        for (i, t) in e.terms.iter().enumerate() {
            if e.terms.len() > 1 {
                println!("// term {}: {}", i + 1, recoup::syntax::print_term(t));
            }
            print!("{}", dot::dot(t));
        }
    }
    Ok(())
}
