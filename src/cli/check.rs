//! `recoup check LHS RHS`: a verdict, the smallest counterexample, and a
//! diagnosis with a repaired claim.

use super::{parse_expr, read_arg, Failure};
use clap::Args;
use recoup::expr::Q;
use recoup::verify::check::{check, Verdict};
use recoup::verify::spot::SpotSettings;

#[derive(Args, Debug)]
pub struct CheckArgs {
    /// the left side (`-` reads standard input)
    lhs: String,
    /// the right side
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

fn point_json(p: &recoup::verify::sample::Point) -> serde_json::Value {
    let m: serde_json::Map<String, serde_json::Value> = p
        .iter()
        .map(|(k, v)| {
            (
                k.to_string(),
                serde_json::Value::String(recoup::expr::lin::fmt_q(v)),
            )
        })
        .collect();
    serde_json::Value::Object(m)
}

pub fn run(a: CheckArgs) -> Result<i32, Failure> {
    let lhs = parse_expr(&read_arg(&a.lhs)?)?;
    let rhs = parse_expr(&read_arg(&a.rhs)?)?;
    let s = settings(&a.max_j, a.samples, a.exhaustive, a.seed)?;
    let r = check(&lhs, &rhs, &s).map_err(|e| Failure::input(e.to_string()))?;
    let how = format!(
        "{} points ({} nonzero), values up to {}, {}",
        r.checked,
        r.nonzero,
        recoup::expr::lin::fmt_q(&s.max_j),
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
        println!(
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
        );
        return Ok(code);
    }
    match &r.verdict {
        Verdict::Equal => println!("equal at all {how}"),
        Verdict::NotEstablished => println!(
            "not established: both sides vanish at all {how}; try other values (--max-j, --seed)"
        ),
        Verdict::Different {
            at,
            lhs,
            rhs,
            diagnosis,
        } => {
            println!("different (checked {how})");
            println!(
                "smallest counterexample: {}",
                recoup::simplify::fmt_point(at)
            );
            println!("  left  = {lhs}");
            println!("  right = {rhs}");
            match diagnosis {
                Some(d) => {
                    println!("diagnosis: {}", d.text);
                    println!("repaired right side: {}", d.repaired);
                    println!(
                        "the repaired claim agrees at {} points ({} nonzero, other seed)",
                        d.confirmed.checked, d.confirmed.nonzero
                    );
                }
                None => println!("diagnosis: no single phase, factor of hats or swapped pair of arguments explains the difference"),
            }
        }
    }
    Ok(code)
}
