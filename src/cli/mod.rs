//! The command line: clap definitions and the thin glue from arguments to
//! library calls and printed output. No mathematics lives here.
//!
//! One entry point, `run_with`, takes the arguments and the three streams,
//! so the binary and the in-process tests (the fuzz target among them)
//! drive exactly the same code. Exit codes: 0 success; 1 a `check` that
//! found the sides different or established nothing; 2 bad input; 3 a
//! limit reached (time, size, points); 4 an internal error. Bad input
//! prints one message on standard error and nothing on standard output.
//! A closed standard output (`recoup ... | head`) ends the run quietly.

mod check;
mod eval;
mod family;
mod graph;
mod input;
mod recouple;
mod run;
mod simplify;
mod table;
mod tabulate;

use crate::algebra::declare::{self, Declarations, Parity};
use crate::expr::Name;
use crate::limits::within_time_limit;
use clap::{Parser, Subcommand};
use std::ffi::OsString;
use std::io::{BufRead, Write};

pub use input::{parse_expr, read_arg};

/// Exit code: success.
pub const EXIT_OK: i32 = 0;
/// Exit code: `check` found the sides different or established nothing.
pub const EXIT_DIFFERENT: i32 = 1;
/// Exit code: bad input.
pub const EXIT_INPUT: i32 = 2;
/// Exit code: a limit was reached (time, size, points).
pub const EXIT_LIMIT: i32 = 3;
/// Exit code: an internal error (a rewrite that failed its own
/// verification, a matrix that is not orthogonal, a defect).
pub const EXIT_INTERNAL: i32 = 4;

/// Default of `--time-limit`, in seconds.
pub const DEFAULT_TIME_LIMIT: f64 = 60.0;

/// What went wrong, and with which exit code.
#[derive(Debug)]
pub enum Failure {
    /// bad input: exit 2
    Input(String),
    /// a limit was reached: exit 3
    Limit(String),
    /// an internal error: exit 4
    Internal(String),
    /// standard output was closed by its reader: end quietly
    Closed,
}

impl Failure {
    /// A bad-input failure.
    pub fn input(msg: impl Into<String>) -> Self {
        Failure::Input(msg.into())
    }
    /// A limit failure.
    pub fn limit(msg: impl Into<String>) -> Self {
        Failure::Limit(msg.into())
    }
    /// An internal failure.
    pub fn internal(msg: impl Into<String>) -> Self {
        Failure::Internal(msg.into())
    }
}

impl From<std::io::Error> for Failure {
    fn from(e: std::io::Error) -> Self {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            Failure::Closed
        } else {
            Failure::Input(format!("cannot write the output: {e}"))
        }
    }
}

impl From<crate::evaluate::EvalError> for Failure {
    fn from(e: crate::evaluate::EvalError) -> Self {
        use crate::evaluate::EvalError;
        match e {
            EvalError::TooLarge | EvalError::SymbolTooLarge(..) | EvalError::ElementTooLarge(_) => {
                Failure::Limit(e.to_string())
            }
            EvalError::TooSlow { ref what, .. } => Failure::Limit(format!(
                "{e}; raise it with --time-limit SECONDS{}",
                if what.contains("exact") {
                    "; eval --float is much faster"
                } else {
                    ""
                }
            )),
            EvalError::Unassigned(ref name) => {
                Failure::Input(format!("{e} (give it with --at {name}=...)"))
            }
            other => Failure::Input(other.to_string()),
        }
    }
}

impl From<crate::simplify::SimplifyError> for Failure {
    fn from(e: crate::simplify::SimplifyError) -> Self {
        use crate::simplify::SimplifyError;
        match e {
            SimplifyError::Eval(e) => e.into(),
            SimplifyError::Limit(m) => Failure::Limit(m),
            SimplifyError::Unsupported(m) => Failure::Input(m),
            other @ (SimplifyError::Unverified(_) | SimplifyError::Internal(..)) => {
                Failure::Internal(other.to_string())
            }
        }
    }
}

impl From<crate::recouple::RecoupleError> for Failure {
    fn from(e: crate::recouple::RecoupleError) -> Self {
        use crate::recouple::RecoupleError;
        match e {
            RecoupleError::Simplify(s) => (*s).into(),
            RecoupleError::Limit(m) => Failure::Limit(m),
            RecoupleError::Internal(_) => Failure::Internal(format!(
                "{e}. This is a defect in recoup; please report it with the command line"
            )),
            other => Failure::Input(other.to_string()),
        }
    }
}

/// LaTeX output: `body` as it is, or with `document` a complete article
/// titled `title` with `note` (how it was verified) after the body.
pub fn write_latex(
    io: &mut Io,
    body: &str,
    document: bool,
    title: &str,
    note: &str,
) -> Result<(), Failure> {
    if document {
        let text = format!("{body}{note}\n");
        out!(io, "{}", crate::render::document::article(title, &text))
    } else {
        out!(io, "{body}")
    }
}

/// A report as one line of JSON (its serde form).
pub fn json_text(report: &impl serde::Serialize) -> Result<String, Failure> {
    serde_json::to_string(report).map_err(|e| Failure::internal(format!("cannot write JSON: {e}")))
}

/// The three streams a run reads and writes.
pub struct Io<'a> {
    /// standard input
    pub stdin: &'a mut dyn BufRead,
    /// standard output
    pub out: &'a mut dyn Write,
    /// standard error
    pub err: &'a mut dyn Write,
}

/// recoup: reduce, verify and evaluate angular-momentum algebra (3j, 6j,
/// 9j symbols and Clebsch-Gordan coefficients).
///
/// Exit codes: 0 success; 1 `check` found the sides different (or
/// established nothing); 2 bad input; 3 a limit was reached (time, size,
/// points): the message says what and how to raise it; 4 an internal
/// error: please report it.
#[derive(Parser, Debug)]
#[command(name = "recoup", version, about, long_about = None)]
pub struct Cli {
    #[command(subcommand)]
    command: Command,
    /// stop with exit code 3 after this many seconds of work (default 60;
    /// tabulate has no limit unless this is given)
    #[arg(long, global = true, value_name = "SECONDS")]
    time_limit: Option<f64>,
    /// names that only take integer values (0, 1, 2, ...), comma separated
    #[arg(long, global = true, value_name = "NAMES", value_delimiter = ',')]
    integer: Vec<String>,
    /// names that only take half-odd values (1/2, 3/2, ...), comma separated
    #[arg(
        long = "half-odd",
        global = true,
        value_name = "NAMES",
        value_delimiter = ','
    )]
    half_odd: Vec<String>,
}

/// The declarations of --integer and --half-odd.
fn declarations_of(cli: &Cli) -> Result<Declarations, Failure> {
    let mut d = Declarations::new();
    for (names, parity, option) in [
        (&cli.integer, Parity::Integer, "--integer"),
        (&cli.half_odd, Parity::HalfOdd, "--half-odd"),
    ] {
        for n in names {
            let n = n.trim();
            if !crate::api::is_name(n) {
                return Err(Failure::input(format!(
                    "{option} takes names separated by commas (letters, digits, _, trailing primes); got {n:?}"
                )));
            }
            d.declare(Name::new(n), parity)
                .map_err(|c| Failure::input(c.to_string()))?;
        }
    }
    Ok(d)
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Exact value and float of an expression at given values.
    ///
    /// EXPR is one argument in the expression language; `-` reads it from
    /// standard input. Free variables get values with --at j=1,m=1/2.
    /// Sums over projections and angular momenta run over all allowed
    /// values. A literal projection with |m| > j makes its symbol 0 (the
    /// usual convention; a note says so on standard error).
    Eval(eval::EvalArgs),
    /// Every Clebsch-Gordan coefficient for numeric j1 and j2.
    ///
    /// Prints each coupled state |J M> as its expansion in the product
    /// basis |m1 m2>, grouped by M; --json and --csv give the entries.
    Table(table::TableArgs),
    /// Every admissible value of one name of a symbol, with the symbol's
    /// value.
    ///
    /// EXPR is one 3j, Clebsch-Gordan coefficient or 6j with numbers in
    /// every slot but the name given with --over. Where the name is one
    /// angular momentum of the symbol, or a projection paired with
    /// `c - name` in another column, the whole family comes from one
    /// three-term recursion (Schulten and Gordon 1975), O(1) per member;
    /// elsewhere each member is evaluated on its own. Prints
    /// `value<TAB>float` per member (`value<TAB>exact<TAB>float` with
    /// --exact).
    Family(family::FamilyArgs),
    /// Write every symmetry-unique 3j or 6j symbol up to a largest j to a
    /// file.
    ///
    /// 3j symbols are unique under all 72 symmetries of the 3j symbol
    /// (column permutations, projections reversed, Regge's), 6j symbols
    /// under their 24 (columns permuted, rows swapped in two columns). The
    /// indexed layout (default) holds a header, a bitmap index and the
    /// values, for lookup of any 3j, Clebsch-Gordan coefficient or 6j by
    /// the library and the C interface; .npy and .csv files list one
    /// representative symbol per entry (doubled arguments in .npy). Runs
    /// on every core.
    Tabulate(tabulate::TabulateArgs),
    /// Check a derivation document: claims, simplifications, definitions.
    ///
    /// FILE holds one item a line (`\` continues a line, `#` starts a
    /// comment): `integer k, q;` and `half-odd s;` declarations, `let NAME
    /// = EXPR` (later items use NAME), `claim [LABEL:] LHS = RHS` (checked
    /// like `check`), `simplify [LABEL:] EXPR [= EXPECTED]` (simplified,
    /// and the result checked equal to the expected form). Prints a line
    /// per item; exit 1 when any fails, each failure with its file, line,
    /// counterexample and diagnosis. --latex prints the derivation as a
    /// standalone LaTeX document when every item holds.
    Run(run::RunArgs),
    /// Simplify an expression; every step is verified by exact
    /// spot-evaluation.
    ///
    /// Applies the normal form (canonical symbols, phases modulo
    /// integrality, selection rules, deltas, like terms), special values,
    /// the graph reduction of projection sums and the identity catalog.
    /// "Verified" means exact agreement with the input at admissible
    /// points (integer and half-integer values up to --max-j): strong
    /// evidence, not a proof.
    Simplify(simplify::SimplifyArgs),
    /// Check a claim LHS = RHS by exact spot-evaluation.
    ///
    /// Exit 0 when the sides agree at every point checked (some nonzero),
    /// 1 when they differ (with the smallest counterexample and, where one
    /// fits, the phase, factor, swapped arguments or triangle factor that
    /// repair the claim) or when nothing nonzero was found. Points include
    /// some where a triad of free variables breaks the triangle rule
    /// (--triangles-hold leaves those out). Agreement at the points
    /// checked is strong evidence, not a proof for all quantum numbers.
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
    /// 6j/9j symbols and the fewest sums found, verified against the
    /// overlap of the two coupled states. --matrix with numeric leaves
    /// prints the exact transformation matrix.
    Recouple(recouple::RecoupleArgs),
    /// LaTeX (amsmath) for an expression, for a paper.
    Latex {
        /// the expression (`-` reads standard input)
        #[arg(allow_hyphen_values = true)]
        expr: String,
        /// a complete article that compiles on its own (pdflatex)
        #[arg(long)]
        document: bool,
        /// print JSON {"input", "latex"}
        #[arg(long)]
        json: bool,
        /// keep the text's own arrangement (sums, factors and terms where
        /// they stand, `a/b` as a fraction) instead of the normal form
        #[arg(long)]
        as_written: bool,
    },
}

/// Writes a line to standard output, mapping write errors.
macro_rules! outln {
    ($io:expr) => { writeln!($io.out).map_err($crate::cli::Failure::from) };
    ($io:expr, $($arg:tt)*) => { writeln!($io.out, $($arg)*).map_err($crate::cli::Failure::from) };
}
pub(crate) use outln;

/// Writes to standard output without a newline, mapping write errors.
macro_rules! out {
    ($io:expr, $($arg:tt)*) => { write!($io.out, $($arg)*).map_err($crate::cli::Failure::from) };
}
pub(crate) use out;

/// Prints a derivation's steps and notes (for --steps).
pub fn print_steps(
    io: &mut Io,
    steps: &[crate::simplify::Step],
    notes: &[String],
) -> Result<(), Failure> {
    for (i, s) in steps.iter().enumerate() {
        outln!(
            io,
            "step {}: {} ({}) [verified at {} points, {} nonzero]",
            i + 1,
            s.rule,
            s.source,
            s.checked,
            s.nonzero
        )?;
        outln!(io, "  = {}", s.after)?;
    }
    for n in notes {
        outln!(io, "note: {n}")?;
    }
    Ok(())
}

/// Parses `--time-limit`.
fn time_limit_seconds(s: f64) -> Result<f64, Failure> {
    if !(s.is_finite() && s > 0.0) {
        return Err(Failure::input(format!(
            "--time-limit must be a positive number of seconds; got {s}"
        )));
    }
    Ok(s.min(1e9))
}

fn dispatch(command: Command, io: &mut Io, seconds: f64) -> Result<i32, Failure> {
    match command {
        Command::Eval(a) => eval::run(a, io, seconds).map(|_| EXIT_OK),
        Command::Table(a) => table::run(a, io).map(|_| EXIT_OK),
        Command::Family(a) => family::run(a, io).map(|_| EXIT_OK),
        Command::Tabulate(a) => tabulate::run(a, io).map(|_| EXIT_OK),
        Command::Simplify(a) => simplify::run(a, io).map(|_| EXIT_OK),
        Command::Check(a) => check::run(a, io),
        Command::Run(a) => run::run(a, io),
        Command::Graph(a) => graph::run(a, io).map(|_| EXIT_OK),
        Command::Recouple(a) => recouple::run(a, io).map(|_| EXIT_OK),
        Command::Latex {
            expr,
            document,
            json,
            as_written,
        } => {
            let text = read_arg(&expr, io)?;
            let e = parse_expr(&text)?;
            input::validate_literals(&e, &text, io)?;
            let latex = if as_written {
                crate::render::written::latex_as_written(&text, &e)
            } else {
                crate::render::latex::expr(&e)
            };
            if json {
                let report = crate::api::report::LatexReport { input: text, latex };
                outln!(io, "{}", json_text(&report)?)?;
            } else if document {
                let body = if as_written {
                    let lines = crate::render::document::packed_lines(
                        &latex,
                        crate::render::document::LINE_BUDGET,
                    );
                    crate::render::document::multline(&lines)
                } else {
                    crate::render::document::equation(&[], &e)
                };
                out!(
                    io,
                    "{}",
                    crate::render::document::article("Expression", &body)
                )?;
            } else {
                outln!(io, "{latex}")?;
            }
            Ok(EXIT_OK)
        }
    }
}

fn panic_text(payload: &(dyn std::any::Any + Send)) -> String {
    if let Some(s) = payload.downcast_ref::<&str>() {
        (*s).to_string()
    } else if let Some(s) = payload.downcast_ref::<String>() {
        s.clone()
    } else {
        "an unexpected failure".to_string()
    }
}

/// Runs the command line on `args` (the first is the program name) with
/// the given streams; returns the exit code. Never panics: a defect is
/// reported as an internal error (exit 4).
pub fn run_with<I, T>(args: I, io: &mut Io) -> i32
where
    I: IntoIterator<Item = T>,
    T: Into<OsString> + Clone,
{
    let args: Vec<OsString> = args.into_iter().map(Into::into).collect();
    // with --json, a failure is also a JSON document on standard output
    // (a batch reports each failed line in its own JSON line instead)
    let json =
        args.iter().skip(1).any(|a| a == "--json") && !args.iter().skip(1).any(|a| a == "--batch");
    let report = |f: Failure, io: &mut Io| report(f, io, json);
    let cli = match Cli::try_parse_from(&args) {
        Ok(c) => c,
        Err(e) => {
            use clap::error::ErrorKind;
            return match e.kind() {
                ErrorKind::DisplayHelp
                | ErrorKind::DisplayVersion
                | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => {
                    match write!(io.out, "{e}").and_then(|_| io.out.flush()) {
                        _ if e.kind() == ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => {
                            EXIT_INPUT
                        }
                        _ => EXIT_OK,
                    }
                }
                _ => {
                    let text = e.to_string();
                    let text = text.strip_prefix("error: ").unwrap_or(&text);
                    let _ = write!(io.err, "recoup: {text}");
                    if json {
                        json_error(io, "input", text.trim_end());
                    }
                    EXIT_INPUT
                }
            };
        }
    };
    let seconds = match time_limit_seconds(cli.time_limit.unwrap_or(DEFAULT_TIME_LIMIT)) {
        Ok(s) => s,
        Err(f) => return report(f, io),
    };
    let declared = match declarations_of(&cli) {
        Ok(d) => d,
        Err(f) => return report(f, io),
    };
    let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        // a batch gives each line the time limit; everything else has it
        // for the whole command
        let whole = match &cli.command {
            Command::Eval(a) if a.is_batch() => None,
            Command::Tabulate(_) if cli.time_limit.is_none() => None,
            _ => Some(seconds),
        };
        declare::scoped(&declared, || {
            within_time_limit(whole, || dispatch(cli.command, io, seconds))
        })
    }));
    let code = match outcome {
        Ok(Ok(Ok(code))) => code,
        Ok(Ok(Err(f))) => report(f, io),
        Ok(Err(up)) => report(
            Failure::limit(format!(
                "the work took longer than the time limit of {} s; raise it with --time-limit SECONDS (or ask for less: smaller quantum numbers, fewer points)",
                up.seconds
            )),
            io,
        ),
        Err(payload) => report(
            Failure::internal(format!(
                "internal error: {}. This is a defect in recoup; please report it with the command line that produced it",
                panic_text(payload.as_ref())
            )),
            io,
        ),
    };
    match io.out.flush() {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => EXIT_OK,
        _ => code,
    }
}

fn report(f: Failure, io: &mut Io, json: bool) -> i32 {
    let (code, kind, msg) = match f {
        Failure::Input(m) => (EXIT_INPUT, "input", m),
        Failure::Limit(m) => (EXIT_LIMIT, "limit", format!("limit reached: {m}")),
        Failure::Internal(m) => (EXIT_INTERNAL, "internal", m),
        Failure::Closed => return EXIT_OK,
    };
    let _ = writeln!(io.err, "recoup: {msg}");
    let _ = io.err.flush();
    if json {
        json_error(io, kind, &msg);
    }
    code
}

/// A failure as one JSON line on standard output: `{"error": {"kind",
/// "message"}}` (the message also goes to standard error).
fn json_error(io: &mut Io, kind: &'static str, message: &str) {
    let doc = crate::api::report::ErrorReport {
        error: crate::api::report::ErrorBody {
            kind,
            message: message.to_string(),
        },
    };
    if let Ok(text) = serde_json::to_string(&doc) {
        let _ = writeln!(io.out, "{text}");
        let _ = io.out.flush();
    }
}

/// The binary's entry: the process's arguments and streams, on a thread
/// with a large stack; panics print no source locations.
pub fn main() -> i32 {
    std::panic::set_hook(Box::new(|_| {}));
    let worker = std::thread::Builder::new().stack_size(512 << 20).spawn(|| {
        let stdin = std::io::stdin();
        let mut stdin = stdin.lock();
        let stdout = std::io::stdout();
        let mut out = std::io::BufWriter::new(stdout.lock());
        let stderr = std::io::stderr();
        let mut err = stderr.lock();
        let mut io = Io {
            stdin: &mut stdin,
            out: &mut out,
            err: &mut err,
        };
        run_with(std::env::args_os(), &mut io)
    });
    match worker.map(|w| w.join()) {
        Ok(Ok(code)) => code,
        _ => {
            eprintln!("recoup: internal error: the worker thread failed; please report it");
            EXIT_INTERNAL
        }
    }
}
