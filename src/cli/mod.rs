//! The command line: clap definitions and the thin glue from arguments to
//! library calls and printed output. No mathematics lives here. Errors map
//! to exit codes: 0 success, 1 a `check` that found the sides different,
//! 2 bad input (with a one-paragraph message on standard error and nothing
//! on standard output).

mod check;
mod eval;
mod graph;
mod recouple;
mod simplify;
mod table;

use clap::{Parser, Subcommand};
use std::io::Read;

/// What went wrong, and with which exit code.
#[derive(Debug)]
pub enum Failure {
    /// bad input: exit 2
    Input(String),
}

impl Failure {
    /// A bad-input failure.
    pub fn input(msg: impl Into<String>) -> Self {
        Failure::Input(msg.into())
    }
}

/// recoup: reduce, verify and evaluate angular-momentum algebra (3j, 6j,
/// 9j symbols and Clebsch-Gordan coefficients).
#[derive(Parser, Debug)]
#[command(name = "recoup", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Exact value and float of an expression at given values.
    ///
    /// EXPR is one argument in the expression language; `-` reads it from
    /// standard input. Free variables get values with --at j=1,m=1/2.
    /// Sums over projections and angular momenta run over all allowed
    /// values.
    Eval(eval::EvalArgs),
    /// Every Clebsch-Gordan coefficient for numeric j1 and j2.
    ///
    /// Prints each coupled state |J M> as its expansion in the product
    /// basis |m1 m2>, grouped by M; --json and --csv give the entries.
    Table(table::TableArgs),
    /// Simplify an expression; every step is verified by exact
    /// spot-evaluation.
    ///
    /// Applies the normal form (canonical symbols, phases modulo
    /// integrality, selection rules, deltas, like terms), special values
    /// and exact values of numeric symbols. "Verified" means exact
    /// agreement at random admissible points (integer and half-integer
    /// values up to --max-j): strong evidence, not a proof.
    Simplify(simplify::SimplifyArgs),
    /// Check a claim LHS = RHS by exact spot-evaluation.
    ///
    /// Exit 0 when the sides agree at every point checked (some nonzero),
    /// 1 when they differ (with the smallest counterexample and, where one
    /// fits, the phase, factor or swapped arguments that repair the claim)
    /// or when nothing nonzero was found. Agreement at the points checked
    /// is strong evidence, not a proof for all quantum numbers.
    Check(check::CheckArgs),
    /// The projection-sum graph of an expression (Graphviz DOT, or --json).
    ///
    /// Each 3j (or Clebsch-Gordan coefficient, drawn as its 3j) is a
    /// vertex; a summed projection shared by two of them is a line labelled
    /// with its j, drawn from the +m end to the -m end (dashed when both
    /// ends carry the same sign); other slots are external legs.
    Graph(graph::GraphArgs),
    /// The recoupling coefficient between two coupling schemes.
    ///
    /// FROM and TO are binary coupling trees such as "((j1, j2) j12, j3) J"
    /// and "(j1, (j2, j3) j23) J"; the result is <FROM|TO> in hats, phases,
    /// 6j/9j symbols and the fewest sums found, every step verified.
    /// --matrix with numeric leaves prints the exact transformation matrix.
    Recouple(recouple::RecoupleArgs),
    /// LaTeX (amsmath) for an expression, for a paper.
    Latex {
        /// the expression (`-` reads standard input)
        expr: String,
    },
}

/// Reads an EXPR argument, `-` meaning standard input (where lines that
/// start with `#` are comments, as in the sample files).
pub fn read_arg(s: &str) -> Result<String, Failure> {
    if s == "-" {
        let mut buf = String::new();
        std::io::stdin()
            .read_to_string(&mut buf)
            .map_err(|e| Failure::input(format!("cannot read standard input: {e}")))?;
        let text: Vec<&str> = buf
            .lines()
            .filter(|l| !l.trim_start().starts_with('#'))
            .collect();
        Ok(text.join("\n").trim_end().to_string())
    } else {
        Ok(s.to_string())
    }
}

/// Prints a derivation's steps and notes (for --steps).
pub fn print_steps(steps: &[recoup::simplify::Step], notes: &[String]) {
    for (i, s) in steps.iter().enumerate() {
        println!(
            "step {}: {} ({}) [verified at {} points, {} nonzero]",
            i + 1,
            s.rule,
            s.source,
            s.checked,
            s.nonzero
        );
        println!("  = {}", s.after);
    }
    for n in notes {
        println!("note: {n}");
    }
}

/// Parses an expression, mapping parse errors to bad input.
pub fn parse_expr(text: &str) -> Result<recoup::expr::Expr, Failure> {
    recoup::syntax::parse(text).map_err(|e| Failure::input(format!("parse error at {e}")))
}

/// Runs the command line; returns the exit code.
pub fn run() -> i32 {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Eval(a) => eval::run(a).map(|_| 0),
        Command::Table(a) => table::run(a).map(|_| 0),
        Command::Simplify(a) => simplify::run(a).map(|_| 0),
        Command::Check(a) => check::run(a),
        Command::Graph(a) => graph::run(a).map(|_| 0),
        Command::Recouple(a) => recouple::run(a).map(|_| 0),
        Command::Latex { expr } => read_arg(&expr)
            .and_then(|t| parse_expr(&t))
            .map(|e| println!("{}", recoup::render::latex::expr(&e)))
            .map(|_| 0),
    };
    match result {
        Ok(code) => code,
        Err(Failure::Input(msg)) => {
            eprintln!("recoup: {msg}");
            2
        }
    }
}
