//! `recoup run FILE`: a derivation document (`document`) checked item by
//! item — declarations, named expressions, claims checked by exact
//! spot-evaluation, simplifications verified and compared with their
//! expected form — with a line per item, every failure reported with its
//! file, line, counterexample and diagnosis (exit 1), and with `--latex`
//! the whole derivation as a standalone LaTeX appendix (only when every
//! item holds).

use super::check::{check_failure, how, settings, write_verdict};
use super::input::decode;
use super::{out, outln, parse_expr, Failure, Io};
use crate::document::{read, Item, Located};
use crate::expr::Expr;
use crate::simplify::{simplify, Options};
use crate::verify::check::{check, Verdict};
use clap::Args;

#[derive(Args, Debug)]
pub struct RunArgs {
    /// the derivation file (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    file: String,
    /// largest value of any free variable at the points checked
    #[arg(long, value_name = "J", default_value = "3")]
    max_j: String,
    /// random points per claim
    #[arg(long, value_name = "N", default_value_t = 60)]
    samples: usize,
    /// every admissible point up to --max-j for each claim
    #[arg(long)]
    exhaustive: bool,
    /// seed of the random points
    #[arg(long, default_value_t = 1)]
    seed: u64,
    /// print the derivation as a standalone LaTeX document (when every
    /// item holds)
    #[arg(long)]
    latex: bool,
}

/// What a verified item contributes to the LaTeX appendix.
enum Verified {
    Claim {
        label: Option<String>,
        lhs: Expr,
        rhs: Expr,
        how: String,
    },
    Simplified {
        label: Option<String>,
        input: Expr,
        result: Expr,
        how: String,
    },
}

fn at(file: &str, line: usize, f: Failure) -> Failure {
    // positions inside the item's one-line text need no line number
    let f = match f {
        Failure::Input(m) => Failure::Input(m.replacen("at line 1, column", "at column", 1)),
        other => other,
    };
    match f {
        Failure::Input(m) => Failure::Input(format!("{file}:{line}: {m}")),
        Failure::Limit(m) => Failure::Limit(format!("{file}:{line}: {m}")),
        Failure::Internal(m) => Failure::Internal(format!("{file}:{line}: {m}")),
        Failure::Closed => Failure::Closed,
    }
}

fn read_file(a: &RunArgs, io: &mut Io) -> Result<String, Failure> {
    let bytes = if a.file == "-" {
        let mut buf = Vec::new();
        io.stdin
            .read_to_end(&mut buf)
            .map_err(|e| Failure::input(format!("cannot read standard input: {e}")))?;
        buf
    } else {
        std::fs::read(&a.file)
            .map_err(|e| Failure::input(format!("cannot read {}: {e}", a.file)))?
    };
    if bytes.len() > 1 << 24 {
        return Err(Failure::limit(format!("{} is larger than 16 MiB", a.file)));
    }
    decode(&bytes, &a.file).map_err(Failure::input)
}

fn label_text(label: &Option<String>) -> String {
    label.as_ref().map(|l| format!(" {l}")).unwrap_or_default()
}

pub fn run(a: RunArgs, io: &mut Io) -> Result<i32, Failure> {
    let text = read_file(&a, io)?;
    // the report is held back until every item has run, so that bad input
    // anywhere leaves standard output empty (exit 2 prints nothing there)
    let mut report = Vec::new();
    let code = {
        let mut held = Io {
            stdin: &mut *io.stdin,
            out: &mut report,
            err: &mut *io.err,
        };
        run_items(&a, &text, &mut held)?
    };
    io.out.write_all(&report)?;
    Ok(code)
}

fn run_items(a: &RunArgs, text: &str, io: &mut Io) -> Result<i32, Failure> {
    let name = if a.file == "-" {
        "<stdin>"
    } else {
        a.file.as_str()
    };
    let items =
        read(text).map_err(|e| Failure::input(format!("{name}:{}: {}", e.line, e.message)))?;
    let spot = settings(&a.max_j, a.samples, a.exhaustive, a.seed)?;
    let opts = Options {
        final_spot: settings(&a.max_j, a.samples, false, a.seed)?,
        ..Options::default()
    };
    let mut verified = Vec::new();
    let (mut failed, mut claims, mut simplified) = (0usize, 0usize, 0usize);
    let quiet = a.latex;
    for Located { line, item } in items {
        let place = |f| at(name, line, f);
        match item {
            Item::Declare(d) => {
                parse_expr(&format!("{d} 1")).map_err(place)?;
            }
            Item::Define { text, .. } => {
                parse_expr(&text).map_err(place)?;
            }
            Item::Claim { label, lhs, rhs } => {
                claims += 1;
                let l = parse_expr(&lhs).map_err(place)?;
                let r = parse_expr(&rhs).map_err(place)?;
                let result = check(&l, &r, &spot).map_err(|e| place(check_failure(e)))?;
                let holds = matches!(result.verdict, Verdict::Equal);
                if !holds {
                    failed += 1;
                }
                if !quiet || !holds {
                    super::out!(io, "{name}:{line}: claim{}: ", label_text(&label))?;
                    write_verdict(io, &result, &spot, "    ")?;
                }
                if holds {
                    verified.push(Verified::Claim {
                        label,
                        lhs: l,
                        rhs: r,
                        how: how(&result, &spot),
                    });
                }
            }
            Item::Simplify {
                label,
                expr,
                expected,
            } => {
                simplified += 1;
                let e = parse_expr(&expr).map_err(place)?;
                let out = simplify(&e, &opts).map_err(|x| place(x.into()))?;
                let verified_how = format!(
                    "every step and the result verified against the input at {} points ({} nonzero)",
                    out.checked, out.nonzero
                );
                let mut holds = true;
                if !quiet {
                    outln!(
                        io,
                        "{name}:{line}: simplify{}: {} ({verified_how})",
                        label_text(&label),
                        out.result
                    )?;
                }
                if let Some(x) = expected {
                    let want = parse_expr(&x).map_err(place)?;
                    let r =
                        check(&out.result, &want, &spot).map_err(|e| place(check_failure(e)))?;
                    holds = matches!(r.verdict, Verdict::Equal);
                    if !quiet || !holds {
                        super::out!(io, "{name}:{line}: the result against the expected form: ")?;
                        write_verdict(io, &r, &spot, "    ")?;
                    }
                }
                if holds {
                    verified.push(Verified::Simplified {
                        label,
                        input: e,
                        result: out.result,
                        how: verified_how,
                    });
                } else {
                    failed += 1;
                }
            }
        }
    }
    if failed > 0 {
        outln!(
            io,
            "{name}: {failed} of {} claims and simplifications do not hold",
            claims + simplified
        )?;
        return Ok(1);
    }
    if a.latex {
        write_document(io, name, &verified)?;
    } else {
        outln!(
            io,
            "{name}: {claims} claims and {simplified} simplifications hold"
        )?;
    }
    Ok(0)
}

/// The LaTeX text of a label or a line-numbered default.
fn latex_words(s: &str) -> String {
    crate::render::document::text(s)
}

fn write_document(io: &mut Io, name: &str, items: &[Verified]) -> Result<(), Failure> {
    use crate::render::document::{article, equation, term_lines};
    let mut body = format!(
        "Every relation below was checked by exact evaluation (recoup, derivation file \\texttt{{{}}}).\n",
        latex_words(name)
    );
    for (n, v) in items.iter().enumerate() {
        let (label, how) = match v {
            Verified::Claim { label, how, .. } | Verified::Simplified { label, how, .. } => {
                (label, how)
            }
        };
        let title = label
            .as_ref()
            .map(|l| latex_words(l))
            .unwrap_or_else(|| format!("Relation {}", n + 1));
        body.push_str(&format!("\\paragraph{{{title}}}\n"));
        body.push_str(&match v {
            Verified::Claim { lhs, rhs, .. } => equation(&term_lines(lhs), rhs),
            Verified::Simplified { input, result, .. } => equation(&term_lines(input), result),
        });
        body.push_str(&format!("Checked: {}.\n", latex_words(how)));
    }
    out!(io, "{}", article("Angular-momentum relations", &body))?;
    Ok(())
}
