//! `recoup check LHS RHS`: a verdict, the smallest counterexample, and a
//! diagnosis with a repaired claim.

use super::{outln, parse_expr, read_arg, Failure, Io};
use crate::expr::Q;
use crate::verify::check::{check, CheckError, CheckResult, Verdict};
use crate::verify::diagnose::Side;
use crate::verify::spot::{SpotSettings, DEFAULT_MAX_POINTS};
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
    /// every admissible point up to --max-j, counted first (at most
    /// --max-points of them)
    #[arg(long)]
    exhaustive: bool,
    /// most points an exhaustive check may visit
    #[arg(long, value_name = "N", default_value_t = DEFAULT_MAX_POINTS)]
    max_points: u64,
    /// check only where every triad of free variables satisfies the
    /// triangle rule (by default some points break one, so that a missing
    /// tri(...) is found)
    #[arg(long)]
    triangles_hold: bool,
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
    let q = crate::api::parse_rational(max_j)
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
        ..SpotSettings::default()
    })
}

/// How the points were chosen, in words.
pub fn how(r: &CheckResult, s: &SpotSettings) -> String {
    let domain = if s.triangles_hold {
        ", triangle rules of free triads kept"
    } else {
        ""
    };
    match r.domain {
        Some(n) => format!(
            "{} points ({} nonzero): every admissible point with values up to {}{domain} ({n} in all)",
            r.checked,
            r.nonzero,
            crate::expr::lin::fmt_q(&s.max_j),
        ),
        None => format!(
            "{} points ({} nonzero, {} with a broken triad), values up to {}{domain}, random, seed {}",
            r.checked,
            r.nonzero,
            r.broken_triads,
            crate::expr::lin::fmt_q(&s.max_j),
            s.seed
        ),
    }
}

pub fn run(a: CheckArgs, io: &mut Io) -> Result<i32, Failure> {
    let lhs = parse_expr(&read_arg(&a.lhs, io)?)?;
    let rhs = parse_expr(&read_arg(&a.rhs, io)?)?;
    let mut s = settings(&a.max_j, a.samples, a.exhaustive, a.seed)?;
    s.triangles_hold = a.triangles_hold;
    if a.max_points == 0 {
        return Err(Failure::input("--max-points must be at least 1"));
    }
    s.max_points = a.max_points;
    let r = check(&lhs, &rhs, &s).map_err(check_failure)?;
    let code = match &r.verdict {
        Verdict::Equal => 0,
        _ => 1,
    };
    if a.json {
        let report = crate::api::CheckReport::of(&r, super::simplify::declared_text());
        outln!(io, "{}", super::json_text(&report)?)?;
        return Ok(code);
    }
    write_verdict(io, &r, &s, "")?;
    Ok(code)
}

/// The verdict in words: one line for equal or not established; for
/// different, the counterexample, the values and the diagnosis, each line
/// after the first indented by `indent`.
pub fn write_verdict(
    io: &mut Io,
    r: &CheckResult,
    s: &SpotSettings,
    indent: &str,
) -> Result<(), Failure> {
    let how = how(r, s);
    match &r.verdict {
        Verdict::Equal => outln!(io, "equal at {how}")?,
        Verdict::NotEstablished => outln!(
            io,
            "not established: both sides vanish at all {how}; try other values (--max-j, --seed)"
        )?,
        Verdict::Different {
            at,
            lhs,
            rhs,
            diagnosis,
        } => {
            outln!(io, "different at {} of {how}", r.mismatches)?;
            outln!(
                io,
                "{indent}smallest counterexample: {}",
                crate::simplify::fmt_point(at)
            )?;
            outln!(io, "{indent}  left  = {lhs}")?;
            outln!(io, "{indent}  right = {rhs}")?;
            match diagnosis {
                Some(d) => {
                    outln!(io, "{indent}diagnosis: {}", d.text)?;
                    let which = match d.side {
                        Side::Left => "left",
                        Side::Right => "right",
                    };
                    outln!(io, "{indent}repaired {which} side: {}", d.repaired)?;
                    let again = if r.domain.is_some() {
                        "the same exhaustive domain"
                    } else {
                        "other seed"
                    };
                    outln!(
                        io,
                        "{indent}the repaired claim agrees at {} points ({} nonzero, {again})",
                        d.confirmed.checked,
                        d.confirmed.nonzero
                    )?;
                }
                None => outln!(io, "{indent}diagnosis: no single phase, factor of hats, triangle factor or swapped pair of arguments explains the difference")?,
            }
        }
    }
    Ok(())
}

/// A check error as a failure of the command.
pub fn check_failure(e: CheckError) -> Failure {
    match e {
        CheckError::Eval(e) => e.into(),
        too_many @ CheckError::TooManyPoints { .. } => {
            Failure::limit(format!("{too_many} (--max-points N, --max-j J)"))
        }
    }
}
