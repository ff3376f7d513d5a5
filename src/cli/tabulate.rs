//! `recoup tabulate 3j|6j --max-j J --output FILE`: every 3j symbol
//! unique under its 72 symmetries, or 6j under its 24, up to a largest j,
//! written as an indexed table (`table::file`, read back by
//! `table::ThreeJTable`, `table::SixJTable` and the C interface) or as
//! records (`.npy`, CSV). Work runs on every core; a progress bar
//! appears on standard error when it is a terminal and the job runs past
//! a second. The time limit applies only when --time-limit is given.

use super::{outln, Failure, Io};
use crate::api::parse_rational;
use crate::table::build::{self, Domain, Entry};
use crate::table::file;
use crate::table::regge::Numbering;
use crate::table::MAX_DOUBLED_J;
use clap::{Args, ValueEnum};
use std::io::{BufWriter, IsTerminal, Write};
use std::time::Instant;

/// Most positions (bits of the index) a table may have: 2 GiB of bitmap.
const MAX_POSITIONS: u64 = 16_000_000_000;
/// Most entries of an indexed or .npy table (20 GB of values).
const MAX_ENTRIES: u64 = 2_500_000_000;
/// Most entries of a CSV table.
const MAX_CSV_ENTRIES: u64 = 1_000_000;

/// The symbols a table can hold.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Symbol {
    /// 3j symbols (Clebsch-Gordan coefficients are looked up through them)
    #[value(name = "3j")]
    ThreeJ,
    /// 6j symbols
    #[value(name = "6j")]
    SixJ,
}

/// The file layouts.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum Layout {
    /// header, bitmap index and values, for lookup by any argument list
    Indexed,
    /// NumPy .npy records (doubled j and m, value)
    Npy,
    /// CSV records (j and m as decimals, value); small tables only
    Csv,
}

#[derive(Args, Debug)]
pub struct TabulateArgs {
    /// the symbol to tabulate
    symbol: Symbol,
    /// the largest j (an integer or half-integer, e.g. 100 or 199/2)
    #[arg(long, value_name = "J")]
    max_j: String,
    /// only symbols whose three j are integers
    #[arg(long)]
    integer_j: bool,
    /// the file to write
    #[arg(long, short = 'o', value_name = "FILE")]
    output: std::path::PathBuf,
    /// the layout (default: from the file's extension, .npy, .csv, else indexed)
    #[arg(long, value_enum)]
    layout: Option<Layout>,
}

fn layout_of(a: &TabulateArgs) -> Layout {
    a.layout
        .unwrap_or_else(|| match a.output.extension().and_then(|e| e.to_str()) {
            Some("npy") => Layout::Npy,
            Some("csv") => Layout::Csv,
            _ => Layout::Indexed,
        })
}

fn max_doubled_j(text: &str) -> Result<i64, Failure> {
    let q = parse_rational(text.trim())
        .filter(|q| *q.denom() <= 2 && *q.numer() >= 0)
        .ok_or_else(|| {
            Failure::input(format!(
                "--max-j takes a nonnegative integer or half-integer such as 100 or 199/2; got {text:?}"
            ))
        })?;
    let t = if *q.denom() == 2 {
        *q.numer()
    } else {
        2 * *q.numer()
    };
    if t > MAX_DOUBLED_J {
        return Err(Failure::limit(format!(
            "--max-j {text} is beyond the largest table j ({})",
            MAX_DOUBLED_J / 2
        )));
    }
    Ok(t)
}

/// A progress bar that shows itself once the job has run a second, on a
/// terminal only.
struct Progress {
    started: Instant,
    bar: Option<indicatif::ProgressBar>,
    terminal: bool,
}

impl Progress {
    fn new() -> Progress {
        Progress {
            started: Instant::now(),
            bar: None,
            terminal: std::io::stderr().is_terminal(),
        }
    }

    fn update(&mut self, done: u64, total: u64) {
        if !self.terminal || self.started.elapsed().as_secs_f64() < 1.0 {
            return;
        }
        let bar = self.bar.get_or_insert_with(|| {
            let b = indicatif::ProgressBar::new(total);
            if let Ok(style) = indicatif::ProgressStyle::with_template(
                "{bar:40} {pos}/{len} entries, {elapsed} elapsed, about {eta} left",
            ) {
                b.set_style(style);
            }
            b
        });
        bar.set_position(done);
    }

    fn finish(&mut self) {
        if let Some(b) = self.bar.take() {
            b.finish_and_clear();
        }
    }
}

/// True once the time limit (if one is in force) has passed.
fn past_deadline() -> bool {
    crate::limits::seconds_left().is_some_and(|s| s <= 0.0)
}

pub fn run(a: TabulateArgs, io: &mut Io) -> Result<(), Failure> {
    match a.symbol {
        Symbol::ThreeJ => removing_on_failure(a, io, run_three_j),
        Symbol::SixJ => removing_on_failure(a, io, run_six_j),
    }
}

/// Creates the output file, buffered.
fn create(path: &std::path::Path) -> Result<BufWriter<std::fs::File>, Failure> {
    let created = std::fs::File::create(path)
        .map_err(|e| Failure::input(format!("cannot write {}: {e}", path.display())))?;
    Ok(BufWriter::with_capacity(1 << 20, created))
}

/// The position limit (the bitmap's size), refused before any work.
fn check_positions(symbol: &str, max_j: &str, positions: u64) -> Result<(), Failure> {
    if positions > MAX_POSITIONS {
        return Err(Failure::limit(format!(
            "a {symbol} table up to j = {max_j} numbers {positions} positions, beyond the limit of {MAX_POSITIONS}; ask for a smaller --max-j"
        )));
    }
    Ok(())
}

/// The entry limit of a layout, refused with a hint.
fn check_entries(entries: u64, layout: Layout) -> Result<(), Failure> {
    let limit = if layout == Layout::Csv {
        MAX_CSV_ENTRIES
    } else {
        MAX_ENTRIES
    };
    if entries > limit {
        let hint = if layout == Layout::Csv {
            "; write .npy or the indexed layout instead"
        } else {
            ""
        };
        return Err(Failure::limit(format!(
            "the table would hold {entries} entries, beyond the limit of {limit} for this layout{hint}"
        )));
    }
    Ok(())
}

/// Removes the output file when a run fails after creating it (a write
/// error, the time limit), so that no partial table is left behind.
fn removing_on_failure(
    a: TabulateArgs,
    io: &mut Io,
    run: fn(&TabulateArgs, &mut Io) -> Result<(), Failure>,
) -> Result<(), Failure> {
    let existed = a.output.exists();
    let result = run(&a, io);
    if result.is_err() && !existed && a.output.is_file() {
        let _ = std::fs::remove_file(&a.output);
    }
    result
}

fn run_six_j(a: &TabulateArgs, io: &mut Io) -> Result<(), Failure> {
    use crate::table::six_j::{self, SixJDomain, SixJNumbering};
    let domain = SixJDomain {
        max_t: max_doubled_j(&a.max_j)?,
        integer_only: a.integer_j,
    };
    let layout = layout_of(a);
    let started = Instant::now();
    let numbering = SixJNumbering::new(domain);
    check_positions("6j", &a.max_j, numbering.len())?;
    let bits = six_j::positions(&numbering, &past_deadline).ok_or_else(time_up)?;
    let entries = bits.ones();
    check_entries(entries, layout)?;
    let mut w = create(&a.output)?;
    let rows = match layout {
        Layout::Indexed => {
            file::write_six_j_index(&mut w, &numbering, &bits)?;
            file::RowLayout::Values
        }
        Layout::Npy => {
            w.write_all(&file::six_j_npy_header(entries))?;
            file::RowLayout::Npy
        }
        Layout::Csv => {
            w.write_all(file::SIX_J_CSV_HEADER.as_bytes())?;
            file::RowLayout::Csv
        }
    };
    let finished = {
        let mut sink = |part: &[six_j::SixJEntry]| file::write_six_j_rows(&mut w, rows, part);
        with_progress(|progress, stop| six_j::values(&numbering, &bits, &mut sink, progress, stop))?
    };
    conclude(
        io,
        a,
        w,
        finished,
        Summary {
            symbol: "6j",
            integer_only: domain.integer_only,
            layout,
            positions: numbering.len(),
            entries,
            started,
        },
    )
}

fn run_three_j(a: &TabulateArgs, io: &mut Io) -> Result<(), Failure> {
    let domain = Domain {
        max_tj: max_doubled_j(&a.max_j)?,
        integer_only: a.integer_j,
    };
    let layout = layout_of(a);
    let started = Instant::now();
    let numbering = Numbering::new(domain.max_sum());
    check_positions("3j", &a.max_j, numbering.len())?;
    let bits = build::positions(&domain, &numbering, &past_deadline).ok_or_else(time_up)?;
    let entries = bits.ones();
    check_entries(entries, layout)?;
    let mut w = create(&a.output)?;
    match layout {
        Layout::Indexed => file::write_index(&mut w, &domain, &numbering, &bits)?,
        Layout::Npy => w.write_all(&file::npy_header(entries))?,
        Layout::Csv => w.write_all(file::CSV_HEADER.as_bytes())?,
    }
    let finished = {
        let mut sink = |part: &[Entry]| match layout {
            Layout::Indexed => file::write_values(&mut w, part),
            Layout::Npy => file::write_npy_rows(&mut w, &domain, part),
            Layout::Csv => file::write_csv_rows(&mut w, &domain, part),
        };
        with_progress(|progress, stop| build::values(&numbering, &bits, &mut sink, progress, stop))?
    };
    conclude(
        io,
        a,
        w,
        finished,
        Summary {
            symbol: "3j",
            integer_only: domain.integer_only,
            layout,
            positions: numbering.len(),
            entries,
            started,
        },
    )
}

/// What a finished table holds, for its one-line summary.
struct Summary {
    symbol: &'static str,
    integer_only: bool,
    layout: Layout,
    positions: u64,
    entries: u64,
    started: Instant,
}

/// A values pass with a progress bar and the time limit.
fn with_progress(
    pass: impl FnOnce(&mut dyn FnMut(u64, u64), &dyn Fn() -> bool) -> std::io::Result<bool>,
) -> Result<bool, Failure> {
    let mut progress = Progress::new();
    let finished = pass(
        &mut |done, total| progress.update(done, total),
        &past_deadline,
    )?;
    progress.finish();
    Ok(finished)
}

/// Flushes the file (removed when the pass did not finish) and prints the
/// summary.
fn conclude(
    io: &mut Io,
    a: &TabulateArgs,
    mut w: BufWriter<std::fs::File>,
    finished: bool,
    s: Summary,
) -> Result<(), Failure> {
    w.flush()?;
    if !finished {
        return Err(time_up());
    }
    outln!(
        io,
        "{} symmetry-unique {} symbols{} with j <= {} written to {} ({:?} layout, {} positions) in {:.1} s",
        s.entries,
        s.symbol,
        if s.integer_only { " of integer j" } else { "" },
        a.max_j.trim(),
        a.output.display(),
        s.layout,
        s.positions,
        s.started.elapsed().as_secs_f64()
    )?;
    Ok(())
}

fn time_up() -> Failure {
    Failure::limit(
        "the table was not finished within the time limit; raise --time-limit SECONDS or leave it out (tabulate has no limit by default)",
    )
}
