//! `recoup graph EXPR`: the projection-sum graph of each term, as
//! Graphviz DOT (several terms as clusters of one picture), JSON, or a
//! picture rendered by Graphviz's `dot` (`--svg`, `--png`).

use super::{out, outln, parse_expr, read_arg, Failure, Io};
use crate::graph::dot;
use clap::Args;

#[derive(Args, Debug)]
pub struct GraphArgs {
    /// the expression (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    expr: String,
    /// print vertices and lines as JSON instead of DOT
    #[arg(long, conflicts_with_all = ["svg", "png"])]
    json: bool,
    /// render the picture as SVG through Graphviz's dot program
    #[arg(long, conflicts_with = "png")]
    svg: bool,
    /// render the picture as PNG through Graphviz's dot program
    #[arg(long)]
    png: bool,
}

/// The picture rendered by Graphviz's `dot` in the given format.
fn render(dot_text: &str, format: &str) -> Result<Vec<u8>, Failure> {
    use std::io::Write;
    use std::process::{Command, Stdio};
    let missing = || {
        Failure::input(format!(
            "--{format} needs Graphviz's dot program, which is not installed (Debian: apt-get install graphviz); without it, recoup graph prints the DOT text"
        ))
    };
    let mut child = Command::new("dot")
        .arg(format!("-T{format}"))
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .map_err(|_| missing())?;
    if let Some(mut stdin) = child.stdin.take() {
        stdin.write_all(dot_text.as_bytes())?;
    }
    let out = child.wait_with_output()?;
    if !out.status.success() {
        return Err(Failure::internal(format!(
            "Graphviz's dot failed on recoup's picture: {}",
            String::from_utf8_lossy(&out.stderr).trim()
        )));
    }
    Ok(out.stdout)
}

pub fn run(a: GraphArgs, io: &mut Io) -> Result<(), Failure> {
    let e = parse_expr(&read_arg(&a.expr, io)?)?;
    // Clebsch-Gordan coefficients are drawn as the 3j they stand for
    let e = crate::graph::reduce::with_cg_as_3j(&e);
    let has_vertex = e.terms().iter().any(|t| {
        t.factors()
            .iter()
            .any(|f| matches!(f, crate::expr::Factor::ThreeJ(_)))
    });
    if !has_vertex {
        return Err(Failure::input(
            "nothing to draw: the expression has no 3j symbol or Clebsch-Gordan coefficient, so it has no projection-sum graph",
        ));
    }
    let has_line = e
        .terms()
        .iter()
        .any(|t| !crate::graph::Graph::of_term(t).lines.is_empty());
    if !has_line {
        return Err(Failure::input(
            "nothing to draw: no projection is summed between two 3j symbols or Clebsch-Gordan coefficients, so the projection-sum graph has no lines (each symbol would be a lone vertex)",
        ));
    }
    if a.json {
        #[derive(serde::Serialize)]
        struct Terms {
            terms: Vec<dot::GraphShape>,
        }
        let terms = Terms {
            terms: e.terms().iter().map(dot::shape).collect(),
        };
        outln!(io, "{}", super::json_text(&terms)?)?;
        return Ok(());
    }
    // one picture: several terms as labelled clusters
    let text = dot::dot_terms(e.terms());
    if a.svg || a.png {
        let bytes = render(&text, if a.svg { "svg" } else { "png" })?;
        io.out.write_all(&bytes)?;
    } else {
        out!(io, "{text}")?;
    }
    Ok(())
}
