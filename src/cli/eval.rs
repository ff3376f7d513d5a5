//! `recoup eval`: one expression, or `--batch` lines from standard input.

use super::input::{decode, explain_phase, parse_expr, read_arg, validate_literals};
use super::{outln, Failure, Io};
use crate::evaluate::Assignment;
use crate::expr::Name;
use clap::Args;

#[derive(Args, Debug)]
pub struct EvalArgs {
    /// the expression (`-` reads standard input); omit with --batch
    #[arg(allow_hyphen_values = true)]
    expr: Option<String>,
    /// values of the free variables, e.g. --at j1=1,j2=1/2,m=-1/2
    #[arg(long, value_name = "VALUES", allow_hyphen_values = true)]
    at: Option<String>,
    /// print JSON: {"exact": "...", "float": ...}
    #[arg(long)]
    json: bool,
    /// floating point only (fast for large quantum numbers); no exact value
    #[arg(long)]
    float: bool,
    /// read one closed expression per line from standard input; answer
    /// one line each (exact<TAB>float, or JSON lines); blank lines and
    /// lines starting with # are skipped; lines end at LF, CRLF or CR
    #[arg(long)]
    batch: bool,
}

impl EvalArgs {
    /// True for `--batch`.
    pub fn is_batch(&self) -> bool {
        self.batch
    }
}

/// Parses `a=1,b=1/2,m=-3/2`; a name given twice is an error.
pub fn parse_assignment(s: &str) -> Result<Assignment, Failure> {
    let mut out = Assignment::new();
    for part in s.split(',').map(str::trim) {
        if part.is_empty() {
            return Err(Failure::input(format!(
                "--at expects name=value pairs separated by single commas, e.g. --at j=1,m=1/2; got '{s}'"
            )));
        }
        let Some((k, v)) = part.split_once('=') else {
            return Err(Failure::input(format!(
                "--at expects name=value pairs separated by commas, e.g. --at j=1,m=1/2; got '{part}'"
            )));
        };
        let k = k.trim();
        if !crate::api::is_name(k) {
            return Err(Failure::input(format!(
                "--at: '{k}' is not a variable name"
            )));
        }
        let q = crate::api::parse_rational(v.trim()).ok_or_else(|| {
            Failure::input(format!(
                "--at: the value of {k} must be an integer or a fraction like 3/2; got '{}'",
                v.trim()
            ))
        })?;
        if out.insert(Name::new(k), q).is_some() {
            return Err(Failure::input(format!(
                "--at gives {k} more than one value; give each name once"
            )));
        }
    }
    Ok(out)
}

fn text_line(v: &crate::api::Value) -> String {
    match &v.exact {
        Some(x) => format!("{x}\t{}", crate::render::fmt_float(v.float)),
        None => crate::render::fmt_float(v.float),
    }
}

pub fn run(a: EvalArgs, io: &mut Io, seconds: f64) -> Result<(), Failure> {
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
        return batch(&a, &at, io, seconds);
    }
    let Some(text) = &a.expr else {
        return Err(Failure::input("eval needs an expression (or --batch)"));
    };
    let text = read_arg(text, io)?;
    let e = parse_expr(&text)?;
    let value =
        crate::api::value_of(&e, &at, a.float).map_err(|err| explain_phase(&text, &e, err))?;
    validate_literals(&e, &text, io)?;
    if a.json {
        outln!(io, "{}", super::json_text(&value)?)?;
    } else {
        outln!(io, "{}", text_line(&value))?;
    }
    Ok(())
}

/// Reads the next lines of standard input: one chunk up to LF, split at
/// lone CRs (so LF, CRLF and CR all end a line); raw bytes, so that a bad
/// byte costs only its line.
fn next_lines(io: &mut Io, buf: &mut Vec<u8>) -> Result<Option<Vec<Vec<u8>>>, Failure> {
    buf.clear();
    let n = io
        .stdin
        .read_until(b'\n', buf)
        .map_err(|e| Failure::input(format!("cannot read standard input: {e}")))?;
    if n == 0 {
        return Ok(None);
    }
    let mut chunk: &[u8] = buf;
    if let Some(c) = chunk.strip_suffix(b"\n") {
        chunk = c;
    }
    if let Some(c) = chunk.strip_suffix(b"\r") {
        chunk = c;
    }
    Ok(Some(
        chunk.split(|b| *b == b'\r').map(<[u8]>::to_vec).collect(),
    ))
}

/// The batch: each line has the time limit to itself (a long batch is
/// not cut off; one slow line is reported and the run goes on).
fn batch(a: &EvalArgs, at: &Assignment, io: &mut Io, seconds: f64) -> Result<(), Failure> {
    let mut failed = 0usize;
    let mut slow = 0usize;
    let mut notes = Vec::new();
    let mut buf = Vec::new();
    let mut n = 0usize;
    while let Some(lines) = next_lines(io, &mut buf)? {
        for raw in lines {
            n += 1;
            let raw: &[u8] = if n == 1 {
                raw.strip_prefix(b"\xef\xbb\xbf".as_slice()).unwrap_or(&raw)
            } else {
                &raw
            };
            let res = decode(raw, "this line").and_then(|line| {
                if line.trim().is_empty() || line.trim_start().starts_with('#') {
                    return Ok(None);
                }
                // the whole line, parsing included, has the time limit;
                // its declarations hold for that line only
                let line_work = || -> Result<_, (bool, String)> {
                    let (line_declared, e) = crate::syntax::parse_declared(&line)
                        .map_err(|e| (false, format!("parse error at {e}")))?;
                    let mut declared = crate::algebra::declare::current();
                    declared
                        .extend(&line_declared)
                        .map_err(|c| (false, c.to_string()))?;
                    let line_notes = crate::syntax::literal_zero_notes(&e);
                    crate::algebra::declare::scoped(&declared, || {
                        if let Some(problem) = crate::api::summed_declaration_problem(&e) {
                            return Err((false, problem));
                        }
                        match crate::api::value_of(&e, at, a.float) {
                            Ok(v) => Ok((line_notes, v)),
                            Err(e) if matches!(Failure::from(e.clone()), Failure::Limit(_)) => {
                                Err((true, format!("limit reached: {e}")))
                            }
                            Err(e) => Err((false, e.to_string())),
                        }
                    })
                };
                match crate::limits::within_time_limit(Some(seconds), line_work) {
                    Ok(Ok((line_notes, v))) => {
                        for note in line_notes {
                            notes.push(format!("line {n}: {note}"));
                        }
                        Ok(Some(v))
                    }
                    Ok(Err((limit, msg))) => {
                        if limit {
                            slow += 1;
                        }
                        Err(msg)
                    }
                    Err(up) => {
                        slow += 1;
                        Err(format!(
                            "limit reached: this line took longer than the time limit of {} s (raise it with --time-limit SECONDS)",
                            up.seconds
                        ))
                    }
                }
            });
            match res {
                Ok(None) => {}
                Ok(Some(value)) => {
                    let s = if a.json {
                        super::json_text(&crate::api::report::BatchLine {
                            line: n,
                            value: Some(value),
                            error: None,
                        })?
                    } else {
                        text_line(&value)
                    };
                    outln!(io, "{s}")?;
                }
                Err(msg) => {
                    failed += 1;
                    let one_line = msg.lines().next().unwrap_or("").to_string();
                    if a.json {
                        let line = crate::api::report::BatchLine {
                            line: n,
                            value: None,
                            error: Some(one_line),
                        };
                        outln!(io, "{}", super::json_text(&line)?)?;
                    } else {
                        outln!(io, "error\tline {n}: {one_line}")?;
                    }
                    io.out.flush()?;
                    writeln!(io.err, "recoup: line {n}: {msg}")?;
                }
            }
        }
    }
    for note in notes {
        writeln!(io.err, "recoup: note: {note}")?;
    }
    if slow > 0 && slow == failed {
        return Err(Failure::limit(format!(
            "{slow} line{} of the batch reached a limit (see above)",
            if slow == 1 { "" } else { "s" }
        )));
    }
    if failed > 0 {
        return Err(Failure::input(format!(
            "{failed} line{} of the batch failed (see above)",
            if failed == 1 { "" } else { "s" }
        )));
    }
    Ok(())
}
