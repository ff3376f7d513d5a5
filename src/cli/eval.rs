//! `recoup eval`: one expression, or `--batch` lines from standard input.

use super::{parse_expr, read_arg, Failure};
use clap::Args;
use recoup::expr::{Name, Q};
use recoup::numeric::eval::{check_assignment, Assignment, Evaluator};
use recoup::numeric::Surd;
use std::io::{BufRead, Write};

#[derive(Args, Debug)]
pub struct EvalArgs {
    /// the expression (`-` reads standard input); omit with --batch
    expr: Option<String>,
    /// values of the free variables, e.g. --at j1=1,j2=1/2,m=-1/2
    #[arg(long, value_name = "VALUES")]
    at: Option<String>,
    /// print JSON: {"exact": "...", "float": ...}
    #[arg(long)]
    json: bool,
    /// floating point only (fast for large quantum numbers); no exact value
    #[arg(long)]
    float: bool,
    /// read one closed expression per line from standard input; answer
    /// one line each (exact<TAB>float, or JSON lines); blank lines and
    /// lines starting with # are skipped
    #[arg(long)]
    batch: bool,
}

/// Parses `a=1,b=1/2,m=-3/2`.
pub fn parse_assignment(s: &str) -> Result<Assignment, Failure> {
    let mut out = Assignment::new();
    for part in s.split(',').map(str::trim).filter(|p| !p.is_empty()) {
        let Some((k, v)) = part.split_once('=') else {
            return Err(Failure::input(format!(
                "--at expects name=value pairs separated by commas, e.g. --at j=1,m=1/2; got '{part}'"
            )));
        };
        let k = k.trim();
        let valid_name = k.chars().next().is_some_and(|c| c.is_ascii_alphabetic())
            && k.trim_end_matches('\'')
                .chars()
                .all(|c| c.is_ascii_alphanumeric() || c == '_');
        if !valid_name {
            return Err(Failure::input(format!(
                "--at: '{k}' is not a variable name"
            )));
        }
        let q = parse_q(v.trim()).ok_or_else(|| {
            Failure::input(format!(
                "--at: the value of {k} must be an integer or a fraction like 3/2; got '{}'",
                v.trim()
            ))
        })?;
        out.insert(Name::new(k), q);
    }
    Ok(out)
}

/// `3`, `-1/2`.
pub fn parse_q(s: &str) -> Option<Q> {
    let (n, d) = match s.split_once('/') {
        Some((n, d)) => (n.trim(), d.trim()),
        None => (s, "1"),
    };
    let n: i64 = n.parse().ok()?;
    let d: i64 = d.parse().ok()?;
    if d <= 0 || n.abs() > (1 << 40) || d > (1 << 40) {
        return None;
    }
    Some(Q::new(n, d))
}

fn answer(
    e: &recoup::expr::Expr,
    at: &Assignment,
    float_only: bool,
) -> Result<(Option<Surd>, f64), String> {
    check_assignment(e, at).map_err(|e| e.to_string())?;
    if float_only {
        let v = Evaluator::<f64>::new()
            .eval(e, at)
            .map_err(|e| e.to_string())?;
        Ok((None, v))
    } else {
        let v = Evaluator::<Surd>::new()
            .eval(e, at)
            .map_err(|e| e.to_string())?;
        let f = v.to_f64();
        Ok((Some(v), f))
    }
}

fn json_line(exact: &Option<Surd>, f: f64) -> String {
    serde_json::json!({
        "exact": exact.as_ref().map(|v| v.to_string()),
        "float": f,
    })
    .to_string()
}

fn text_line(exact: &Option<Surd>, f: f64) -> String {
    match exact {
        Some(v) => format!("{v}\t{}", recoup::render::fmt_float(f)),
        None => recoup::render::fmt_float(f),
    }
}

pub fn run(a: EvalArgs) -> Result<(), Failure> {
    let at = match &a.at {
        Some(s) => parse_assignment(s)?,
        None => Assignment::new(),
    };
    if a.batch {
        if a.expr.is_some() {
            return Err(Failure::input(
                "--batch reads expressions from standard input; give no EXPR",
            ));
        }
        return batch(&a, &at);
    }
    let Some(text) = &a.expr else {
        return Err(Failure::input("eval needs an expression (or --batch)"));
    };
    let text = read_arg(text)?;
    let e = parse_expr(&text)?;
    let (exact, f) = answer(&e, &at, a.float).map_err(Failure::input)?;
    if a.json {
        println!("{}", json_line(&exact, f));
    } else {
        println!("{}", text_line(&exact, f));
    }
    Ok(())
}

fn batch(a: &EvalArgs, at: &Assignment) -> Result<(), Failure> {
    let stdin = std::io::stdin();
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    let mut failed = 0usize;
    for (i, line) in stdin.lock().lines().enumerate() {
        let line = line.map_err(|e| Failure::input(format!("cannot read standard input: {e}")))?;
        let n = i + 1;
        if line.trim().is_empty() || line.trim_start().starts_with('#') {
            continue;
        }
        let res = recoup::syntax::parse(&line)
            .map_err(|e| format!("parse error at {e}"))
            .and_then(|e| answer(&e, at, a.float));
        match res {
            Ok((exact, f)) => {
                let s = if a.json {
                    json_line(&exact, f)
                } else {
                    text_line(&exact, f)
                };
                writeln!(out, "{s}").ok();
            }
            Err(msg) => {
                failed += 1;
                let one_line = msg.lines().next().unwrap_or("").to_string();
                if a.json {
                    writeln!(out, "{}", serde_json::json!({"line": n, "error": one_line})).ok();
                } else {
                    writeln!(out, "error\tline {n}: {one_line}").ok();
                }
                out.flush().ok();
                eprintln!("recoup: line {n}: {msg}");
            }
        }
    }
    out.flush().ok();
    if failed > 0 {
        return Err(Failure::input(format!(
            "{failed} line{} of the batch failed (see above)",
            if failed == 1 { "" } else { "s" }
        )));
    }
    Ok(())
}
