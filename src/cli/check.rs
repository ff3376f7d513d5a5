//! `recoup check LHS RHS`: a verdict, the smallest counterexample, and a
//! diagnosis with a repaired claim.

use super::{outln, parse_expr, read_arg, Failure, Io};
use crate::expr::Q;
use crate::verify::check::{check, Verdict};
use crate::verify::spot::SpotSettings;
use clap::Args;

#[derive(Args, Debug)]
pub struct CheckArgs {
    /// the left side (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    lhs: String,
    /// the right side
    #[arg(allow_hyphen_values = true)]
    rhs: String,
    /// largest value of any free variable at the points checked
    #[arg(long, value_name = "J", default_value = "3")]
    max_j: String,
    /// number of random points
    #[arg(long, value_name = "N", default_value_t = 60)]
    samples: usize,
    /// every admissible point up to --max-j (at most 50 × --samples)
    #[arg(long)]
    exhaustive: bool,
    /// seed of the random points
    #[arg(long, default_value_t = 1)]
    seed: u64,
    /// print JSON
    #[arg(long)]
    json: bool,
}

/// The settings the spot-evaluation options describe.
pub fn settings(
    max_j: &str,
    samples: usize,
    exhaustive: bool,
    seed: u64,
) -> Result<SpotSettings, Failure> {
    let q = super::eval::parse_q(max_j)
        .filter(|q| (*q * Q::from_integer(2)).is_integer() && *q > Q::from_integer(0))
        .ok_or_else(|| {
            Failure::input(format!(
                "--max-j must be a positive multiple of 1/2; got '{max_j}'"
            ))
        })?;
    if q > Q::from_integer(20) {
        return Err(Failure::input(
            "--max-j above 20 makes exact checks very slow; use at most 20",
        ));
    }
    if samples == 0 || samples > 100_000 {
        return Err(Failure::input("--samples must be between 1 and 100000"));
    }
    Ok(SpotSettings {
        max_j: q,
        samples,
        exhaustive,
        seed,
    })
}

fn point_json(p: &crate::verify::sample::Point) -> serde_json::Value {
    let m: serde_json::Map<String, serde_json::Value> = p
        .iter()
        .map(|(k, v)| {
            (
                k.to_string(),
                serde_json::Value::String(crate::expr::lin::fmt_q(v)),
            )
        })
        .collect();
    serde_json::Value::Object(m)
}

pub fn run(a: CheckArgs, io: &mut Io) -> Result<i32, Failure> {
    let lhs = parse_expr(&read_arg(&a.lhs, io)?)?;
    let rhs = parse_expr(&read_arg(&a.rhs, io)?)?;
    let s = settings(&a.max_j, a.samples, a.exhaustive, a.seed)?;
    let r = check(&lhs, &rhs, &s).map_err(|e| Failure::input(e.to_string()))?;
    let how = format!(
        "{} points ({} nonzero), values up to {}, {}",
        r.checked,
        r.nonzero,
        crate::expr::lin::fmt_q(&s.max_j),
        if s.exhaustive {
            "every admissible point".to_string()
        } else {
            format!("random, seed {}", s.seed)
        }
    );
    let code = match &r.verdict {
        Verdict::Equal => 0,
        _ => 1,
    };
    if a.json {
        let (cx, diag, repaired) = match &r.verdict {
            Verdict::Different {
                at,
                lhs,
                rhs,
                diagnosis,
            } => (
                serde_json::json!({"at": point_json(at), "lhs": lhs.to_string(), "rhs": rhs.to_string()}),
                diagnosis.as_ref().map(|d| d.text.clone()),
                diagnosis.as_ref().map(|d| d.repaired.to_string()),
            ),
            _ => (serde_json::Value::Null, None, None),
        };
        outln!(
            io,
            "{}",
            serde_json::json!({
                "equal": code == 0,
                "established": !matches!(r.verdict, Verdict::NotEstablished),
                "checked": r.checked,
                "nonzero": r.nonzero,
                "counterexample": cx,
                "diagnosis": diag,
                "repaired": repaired,
            })
        )?;
        return Ok(code);
    }
    match &r.verdict {
        Verdict::Equal => {
            outln!(io, "equal at all {how}")?;
        }
        Verdict::NotEstablished => {
            outln!(io, "not established: both sides vanish at all {how}; try other values (--max-j, --seed)"
        )?;
        }
        Verdict::Different {
            at,
            lhs,
            rhs,
            diagnosis,
        } => {
            outln!(io, "different (checked {how})")?;
            outln!(
                io,
                "smallest counterexample: {}",
                crate::simplify::fmt_point(at)
            )?;
            outln!(io, "  left  = {lhs}")?;
            outln!(io, "  right = {rhs}")?;
            match diagnosis {
                Some(d) => {
                    outln!(io, "diagnosis: {}", d.text)?;
                    outln!(io, "repaired right side: {}", d.repaired)?;
                    outln!(
                        io,
                        "the repaired claim agrees at {} points ({} nonzero, other seed)",
                        d.confirmed.checked,
                        d.confirmed.nonzero
                    )?;
                }
                None => {
                    outln!(io, "diagnosis: no single phase, factor of hats or swapped pair of arguments explains the difference")?;
                }
            }
        }
    }
    Ok(code)
}
