//! `recoup table J1 J2`: the Clebsch–Gordan table for numeric j1, j2.

use super::{out, outln, Failure, Io};
use crate::api::parse_rational;
use crate::render::table;
use clap::Args;

/// Largest j1 or j2 a table is printed for.
const MAX_TABLE_J: i64 = 40;

#[derive(Args, Debug)]
pub struct TableArgs {
    /// j1 (an integer or half-integer, e.g. 3 or 3/2)
    #[arg(allow_hyphen_values = true)]
    j1: String,
    /// j2
    #[arg(allow_hyphen_values = true)]
    j2: String,
    /// print JSON {"j1", "j2", "entries": [...]}
    #[arg(long, conflicts_with = "csv")]
    json: bool,
    /// print CSV with columns j1, j2, m1, m2, J, M, exact, float
    #[arg(long)]
    csv: bool,
}

fn doubled(name: &str, s: &str) -> Result<i64, Failure> {
    let q = parse_rational(s)
        .ok_or_else(|| Failure::input(format!("{name} must be a number like 1, 3/2; got '{s}'")))?;
    let d = q * crate::expr::Q::from_integer(2);
    if !d.is_integer() || d < crate::expr::Q::from_integer(0) {
        return Err(Failure::input(format!(
            "{name} = {s} is not a nonnegative multiple of 1/2"
        )));
    }
    let d = d.to_integer();
    if d > 2 * MAX_TABLE_J {
        return Err(Failure::input(format!(
            "{name} = {s} is too large for a table (at most {MAX_TABLE_J}); use eval for single values"
        )));
    }
    Ok(d)
}

pub fn run(a: TableArgs, io: &mut Io) -> Result<(), Failure> {
    let t1 = doubled("j1", &a.j1)?;
    let t2 = doubled("j2", &a.j2)?;
    if a.json {
        outln!(io, "{}", super::json_text(&table::shape(t1, t2))?)?;
    } else if a.csv {
        out!(io, "{}", table::csv(t1, t2))?;
    } else {
        out!(io, "{}", table::text(t1, t2))?;
    }
    Ok(())
}
