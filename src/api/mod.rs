//! The library's API: one surface that the command line, the C interface
//! and the Python package share. Parse an expression (with its
//! declarations), simplify it, check it against another, evaluate it
//! exactly or in floating point, derive recoupling coefficients, compute
//! single symbols; every result is a typed, serialisable report
//! (`report`), every failure a typed `Error` in the library's words.
//!
//! ```
//! use recoup::api::{Expression, SimplifySettings};
//!
//! // the orthogonality of 3j symbols over both projections
//! let e = Expression::parse(
//!     "sum(m1, m2: (2*c+1) (a, b, c; m1, m2, -m3) (a, b, c; m1, m2, -m3))",
//! )
//! .unwrap();
//! let s = e.simplify(&SimplifySettings::default()).unwrap();
//! assert_eq!(s.result, "tri(a, b, c)");
//! assert!(s.verified.checked > 0);
//! ```
//!
//! Every operation runs with the expression's declarations in force
//! (`integer k;` written before it, or `Expression::declare`), so a
//! library caller never manages the thread's declaration scope itself.

pub mod error;
pub mod report;
pub mod symbols;

/// Whole families of float symbols by the three-term recursions, by
/// doubled arguments (see `recoup family` for their use).
///
/// ```
/// use recoup::api::families::three_j_over_j1;
///
/// // (j1 1 1; 0 0 0) for every admissible j1: 0, 1, 2 (doubled 0, 2, 4)
/// let f = three_j_over_j1(2, 2, 0, 0);
/// assert_eq!((f.first, f.values.len()), (0, 3));
/// // (1 1 1; 0 0 0) = 0: j1 + j2 + j3 odd with every m zero
/// assert!(f.values[1].abs() < 1e-15);
/// ```
pub mod families {
    pub use crate::numeric::family::{six_j_over_j1, three_j_over_j1, three_j_over_m2, Family};
}

/// Bulk tables (written by `recoup tabulate`, or built in memory): lookup
/// of any 3j, CG or 6j by its symmetries.
///
/// ```
/// use recoup::api::tables::{Domain, ThreeJTable};
///
/// let t = ThreeJTable::build(Domain { max_tj: 4, integer_only: false });
/// // (1 1 0; 0 0 0) = -1/sqrt(3) (Edmonds 1957, Table 2, from memory),
/// // found through the symmetries from any spelling
/// let v = t.three_j([0, 2, 2], [0, 0, 0]).unwrap();
/// assert!((v + 1.0 / 3f64.sqrt()).abs() < 1e-15);
/// ```
pub mod tables {
    pub use crate::table::build::Domain;
    pub use crate::table::file::TableFileError;
    pub use crate::table::six_j::SixJDomain;
    pub use crate::table::{Lookup, SixJTable, ThreeJTable, MAX_DOUBLED_J};
}

pub use crate::algebra::declare::{Declarations, Parity};
pub use crate::evaluate::Assignment;
pub use crate::expr::{Expr, Name, Q};
pub use crate::numeric::Surd;
pub use crate::syntax::ParseError;
pub use crate::verify::diagnose::Finding;
pub use error::Error;
pub use report::{
    CheckReport, CheckVerdict, Counterexample, RecouplingReport, Simplification, StepReport, Value,
    Verification,
};

use crate::algebra::declare;
use crate::evaluate::{check_assignment, EvalError, Evaluator};
use crate::verify::spot::{SpotSettings, DEFAULT_MAX_POINTS};
use std::collections::{BTreeMap, BTreeSet};

/// Largest value of a free variable at verification points (exact
/// evaluation above it is slow).
pub const MAX_CHECK_J: i64 = 20;

/// An expression of the language with the declarations it is read under.
#[derive(Clone, Debug)]
pub struct Expression {
    text: String,
    expr: Expr,
    declared: Declarations,
}

impl Expression {
    /// Parses `text` (which may begin with declarations such as
    /// `integer k, q;`). The ranks of scalar-product factors and of `C[k]`
    /// are declared integer, as the physics implies.
    ///
    /// ```
    /// use recoup::api::{Error, Expression};
    ///
    /// let e = Expression::parse("integer k; (a, k, a; 0, 0, 0)").unwrap();
    /// assert_eq!(e.declared_text().as_deref(), Some("integer k;"));
    /// // a mistake comes with its line and column
    /// let err = Expression::parse("{a, b, c; d, e}").unwrap_err();
    /// assert!(matches!(err, Error::Parse(_)) && err.position() == Some((1, 1)));
    /// ```
    pub fn parse(text: &str) -> Result<Expression, Error> {
        Expression::parse_with(text, &Declarations::new())
    }

    /// Parses `text` with `declared` in force as well (and any
    /// declarations already in force on this thread).
    pub fn parse_with(text: &str, declared: &Declarations) -> Result<Expression, Error> {
        let (written, expr) = crate::syntax::parse_declared(text)?;
        let mut all = declare::current();
        all.extend(declared)?;
        all.extend(&written)?;
        for name in crate::tensor::implied_integers(&expr) {
            all.declare(name, Parity::Integer).map_err(|c| {
                Error::Input(format!(
                    "{c}: the rank of a factor of a scalar product (A . B), and the rank and orbital angular momentum of C[k], are integers"
                ))
            })?;
        }
        let e = Expression {
            text: text.to_string(),
            expr,
            declared: all,
        };
        e.scoped(|| match summed_declaration_problem(&e.expr) {
            Some(problem) => Err(Error::Input(problem)),
            None => Ok(()),
        })?;
        Ok(e)
    }

    /// Declares `names` with `parity` (a conflict with an earlier
    /// declaration is an error).
    pub fn declare<'a>(
        &mut self,
        names: impl IntoIterator<Item = &'a str>,
        parity: Parity,
    ) -> Result<(), Error> {
        for n in names {
            if !is_name(n) {
                return Err(Error::Input(format!(
                    "{n:?} is not a variable name (letters, digits, _, trailing primes)"
                )));
            }
            self.declared.declare(Name::new(n), parity)?;
        }
        let problem = self.scoped(|| summed_declaration_problem(&self.expr));
        problem.map_or(Ok(()), |p| Err(Error::Input(p)))
    }

    /// The text as written.
    pub fn text(&self) -> &str {
        &self.text
    }

    /// The expression in normal form.
    pub fn expr(&self) -> &Expr {
        &self.expr
    }

    /// The declarations in force for it.
    pub fn declarations(&self) -> &Declarations {
        &self.declared
    }

    /// The declarations in the language (`integer k; half-odd s;`), if any.
    pub fn declared_text(&self) -> Option<String> {
        (!self.declared.is_empty()).then(|| self.declared.to_string())
    }

    /// The free variables, sorted.
    pub fn free_variables(&self) -> Vec<String> {
        self.expr
            .free_vars()
            .iter()
            .map(|n| n.to_string())
            .collect()
    }

    /// The expression as LaTeX.
    pub fn latex(&self) -> String {
        crate::render::latex::expr(&self.expr)
    }

    /// Runs `f` with this expression's declarations in force.
    pub fn scoped<R>(&self, f: impl FnOnce() -> R) -> R {
        declare::scoped(&self.declared, f)
    }

    /// An expression derived from this one (a result): the same
    /// declarations, `expr` in normal form as its text.
    pub fn derived(&self, expr: Expr) -> Expression {
        Expression {
            text: expr.to_string(),
            expr,
            declared: self.declared.clone(),
        }
    }

    /// Simplifies it; the result has passed verification against it.
    pub fn simplify(&self, settings: &SimplifySettings) -> Result<Simplification, Error> {
        let mut opts = crate::simplify::Options {
            regge: settings.regge,
            ..crate::simplify::Options::default()
        };
        opts.final_spot = spot_settings(&settings.max_j, settings.samples, opts.final_spot.seed)?;
        self.scoped(|| {
            let mut out = crate::simplify::simplify(&self.expr, &opts)?;
            if settings.canonical {
                return Ok(Simplification::of(&out, self.declared_text()));
            }
            crate::simplify::arrange_for_reading(&mut out, &[&self.text], &opts)?;
            Ok(crate::render::arrange::in_reading_order(
                &[&self.text],
                || Simplification::of(&out, self.declared_text()),
            ))
        })
    }

    /// The simplified result as an expression.
    pub fn simplified(&self, settings: &SimplifySettings) -> Result<Expression, Error> {
        let s = self.simplify(settings)?;
        Ok(Expression {
            text: s.result,
            expr: s.result_expr,
            declared: self.declared.clone(),
        })
    }

    /// Checks `self = other` by exact evaluation at points; a difference
    /// comes with the smallest counterexample and, where one exists, a
    /// diagnosis with a repaired claim.
    ///
    /// ```
    /// use recoup::api::{CheckSettings, CheckVerdict, Expression, Finding};
    ///
    /// // exchanging two columns of a 3j takes the phase (-1)^(a+b+c)
    /// // (Edmonds 1957, eq. 3.7.5, from memory): without it the claim fails
    /// let lhs = Expression::parse("(a, b, c; m1, m2, m3)").unwrap();
    /// let rhs = Expression::parse("(b, a, c; m2, m1, m3)").unwrap();
    /// let r = lhs.check(&rhs, &CheckSettings::default()).unwrap();
    /// assert_eq!(r.verdict, CheckVerdict::Different);
    /// assert!(r.findings.contains(&Finding::Phase));
    /// ```
    pub fn check(
        &self,
        other: &Expression,
        settings: &CheckSettings,
    ) -> Result<CheckReport, Error> {
        let mut both = self.declared.clone();
        both.extend(&other.declared)?;
        let s = settings.spot()?;
        declare::scoped(&both, || {
            let r = crate::verify::check::check(&self.expr, &other.expr, &s)?;
            Ok(CheckReport::of(
                &r,
                (!both.is_empty()).then(|| both.to_string()),
            ))
        })
    }

    /// The exact value (and its float) at the given values of the free
    /// variables; a name of an opaque operator gives the value of all its
    /// reduced matrix elements.
    ///
    /// ```
    /// use recoup::api::{point, Expression};
    ///
    /// let e = Expression::parse("<j1, m1; j2, m2 | J, M>").unwrap();
    /// let at = point(&[("j1", "1/2"), ("m1", "1/2"), ("j2", "1/2"),
    ///                  ("m2", "-1/2"), ("J", "1"), ("M", "0")]).unwrap();
    /// let v = e.evaluate(&at).unwrap();
    /// assert_eq!(v.exact.as_deref(), Some("sqrt(1/2)"));
    /// assert!((e.evaluate_float(&at).unwrap() - 0.5f64.sqrt()).abs() < 1e-15);
    /// ```
    pub fn evaluate(&self, at: &Assignment) -> Result<Value, Error> {
        self.value_at(at, false)
    }

    /// The value in floating point only (fast at large quantum numbers).
    pub fn evaluate_float(&self, at: &Assignment) -> Result<f64, Error> {
        Ok(self.value_at(at, true)?.float)
    }

    fn value_at(&self, at: &Assignment, float_only: bool) -> Result<Value, Error> {
        self.scoped(|| value_of(&self.expr, at, float_only))
            .map_err(|err| self.explain(err))
    }

    /// An evaluation error in words; a phase with a non-integer exponent is
    /// shown as the user wrote it, at the point, with the declaration that
    /// rules such points out.
    pub fn explain(&self, err: EvalError) -> Error {
        match explain_phase(&self.text, &self.expr, &err) {
            Some((msg, names)) if names.is_empty() => Error::Input(msg),
            Some((msg, names)) => Error::Input(format!(
                "{msg}. If {} only take{} integer values, declare so (begin the expression with `integer {};`)",
                spoken_list(&names),
                if names.len() == 1 { "s" } else { "" },
                names.join(", ")
            )),
            None => err.into(),
        }
    }
}

impl std::fmt::Display for Expression {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}", self.expr)
    }
}

/// A point: values of named variables, each an integer or a fraction
/// (`[("j", "3/2"), ("m", "-1/2")]`); a bad name or value, or a name given
/// twice, is `Error::Input`.
pub fn point(values: &[(&str, &str)]) -> Result<Assignment, Error> {
    let mut at = Assignment::new();
    for (name, value) in values {
        if !is_name(name) {
            return Err(Error::Input(format!("{name:?} is not a variable name")));
        }
        let q = parse_rational(value).ok_or_else(|| {
            Error::Input(format!(
                "the value of {name} must be an integer or a fraction like 3/2; got {value:?}"
            ))
        })?;
        if at.insert(Name::new(*name), q).is_some() {
            return Err(Error::Input(format!("{name} is given more than one value")));
        }
    }
    Ok(at)
}

/// The value of `e` at `at` (exact and float, or the float only), with the
/// declarations in force on this thread; a name of an opaque operator (not
/// also a variable) gives the value of all its reduced matrix elements.
/// The values are checked for admissibility first.
pub fn value_of(e: &Expr, at: &Assignment, float_only: bool) -> Result<Value, EvalError> {
    let operators = crate::tensor::opaque_names(e);
    let variables = e.free_vars();
    let mut given = BTreeMap::new();
    let mut rest = Assignment::new();
    for (k, v) in at {
        if operators.contains(k.as_str()) && !variables.contains(k) {
            given.insert(k.as_str().to_string(), *v);
        } else {
            rest.insert(k.clone(), *v);
        }
    }
    crate::tensor::opaque::with_given(&given, || {
        check_assignment(e, &rest)?;
        if float_only {
            Ok(Value::float(Evaluator::<f64>::new().eval(e, &rest)?))
        } else {
            Ok(Value::exact(&Evaluator::<Surd>::new().eval(e, &rest)?))
        }
    })
}

/// True for a variable name of the language.
pub fn is_name(n: &str) -> bool {
    n.chars().next().is_some_and(|c| c.is_ascii_alphabetic())
        && n.trim_end_matches('\'')
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '_')
}

/// `3`, `-1/2`: a rational written as an integer or a fraction (spaces
/// around the `/` allowed, not around the whole).
pub fn parse_rational(s: &str) -> Option<Q> {
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

/// Settings of a simplification.
#[derive(Clone, Debug)]
pub struct SimplifySettings {
    /// let canonical forms use Regge's symmetries
    pub regge: bool,
    /// points of the final verification
    pub samples: usize,
    /// largest value of a free variable at those points (a positive
    /// multiple of 1/2, at most `MAX_CHECK_J`)
    pub max_j: Q,
    /// print 6j and 9j symbols in recoup's canonical form rather than in
    /// the order the input names their entries
    pub canonical: bool,
}

impl Default for SimplifySettings {
    fn default() -> Self {
        SimplifySettings {
            regge: false,
            samples: 40,
            max_j: Q::new(5, 2),
            canonical: false,
        }
    }
}

/// Settings of a check.
#[derive(Clone, Debug)]
pub struct CheckSettings {
    /// largest value of any free variable at the points checked
    pub max_j: Q,
    /// random points
    pub samples: usize,
    /// every admissible point up to `max_j` instead (at most `max_points`)
    pub exhaustive: bool,
    /// most points an exhaustive check may visit
    pub max_points: u64,
    /// only points where every triad of free variables holds
    pub triangles_hold: bool,
    /// seed of the random points
    pub seed: u64,
}

impl Default for CheckSettings {
    fn default() -> Self {
        CheckSettings {
            max_j: Q::from_integer(3),
            samples: 60,
            exhaustive: false,
            max_points: DEFAULT_MAX_POINTS,
            triangles_hold: false,
            seed: 1,
        }
    }
}

impl CheckSettings {
    /// The spot-evaluation settings, validated.
    pub fn spot(&self) -> Result<SpotSettings, Error> {
        let mut s = spot_settings(&self.max_j, self.samples, self.seed)?;
        if self.max_points == 0 {
            return Err(Error::Input(
                "the most points of an exhaustive check must be at least 1".into(),
            ));
        }
        s.exhaustive = self.exhaustive;
        s.max_points = self.max_points;
        s.triangles_hold = self.triangles_hold;
        Ok(s)
    }
}

/// Spot settings for a largest value and a number of points, validated.
fn spot_settings(max_j: &Q, samples: usize, seed: u64) -> Result<SpotSettings, Error> {
    let twice = *max_j * Q::from_integer(2);
    if !twice.is_integer() || *max_j <= Q::from_integer(0) {
        return Err(Error::Input(format!(
            "the largest value of the points must be a positive multiple of 1/2; got {}",
            crate::expr::lin::fmt_q(max_j)
        )));
    }
    if *max_j > Q::from_integer(MAX_CHECK_J) {
        return Err(Error::Input(format!(
            "a largest value above {MAX_CHECK_J} makes exact checks very slow; use at most {MAX_CHECK_J}"
        )));
    }
    if samples == 0 || samples > 100_000 {
        return Err(Error::Input(
            "the number of points must be between 1 and 100000".into(),
        ));
    }
    Ok(SpotSettings {
        max_j: *max_j,
        samples,
        seed,
        ..SpotSettings::default()
    })
}

/// The form a recoupling coefficient is written in.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Default)]
pub enum RecouplingForm {
    /// 6j and 9j symbols, the fewest sums, each symbol in the order the
    /// schemes name their momenta (the literature's arrangement)
    #[default]
    Symbols,
    /// 6j symbols only (every 9j as its sum of three 6j), arranged alike
    SixJOnly,
    /// 6j and 9j symbols in recoup's canonical form (for matching)
    Canonical,
}

/// The recoupling coefficient `<from | to>` between two coupling schemes
/// of the same angular momenta (`((j1, j2) j12, j3) J`), verified against
/// the overlap of the two coupled states.
///
/// ```
/// use recoup::api::{recouple, RecouplingForm};
///
/// let r = recouple("((l1, l2) L, (s1, s2) S) J", "((l1, s1) j1, (l2, s2) j2) J",
///                  RecouplingForm::Symbols).unwrap();
/// assert_eq!((r.sums, r.symbols.nine_j), (0, 1));
/// assert!(r.verified.checked > 0);
/// ```
pub fn recouple(from: &str, to: &str, form: RecouplingForm) -> Result<RecouplingReport, Error> {
    let (from_text, to_text) = (from, to);
    let from = crate::syntax::parse_tree(from)?;
    let to = crate::syntax::parse_tree(to)?;
    let (form, canonical) = match form {
        RecouplingForm::Symbols => (crate::recouple::Form::Symbols, false),
        RecouplingForm::SixJOnly => (crate::recouple::Form::SixJOnly, false),
        RecouplingForm::Canonical => (crate::recouple::Form::Symbols, true),
    };
    let opts = crate::simplify::Options::default();
    let mut r = crate::recouple::recouple_as(&from, &to, &opts, form)?;
    if canonical {
        return Ok(RecouplingReport::of(&r));
    }
    crate::recouple::arrange_for_reading(&mut r, from_text, to_text, &opts)?;
    Ok(crate::render::arrange::in_reading_order(
        &[from_text, to_text],
        || RecouplingReport::of(&r),
    ))
}

/// Runs `f` with a time limit in seconds (none: no limit); the limit
/// reached is `Error::Limit`.
pub fn within_seconds<R>(
    seconds: Option<f64>,
    f: impl FnOnce() -> Result<R, Error>,
) -> Result<R, Error> {
    crate::limits::within_time_limit(seconds, f)?
}

/// A summed name declared with a parity its term does not imply, in words.
pub fn summed_declaration_problem(e: &Expr) -> Option<String> {
    let (name, parity, term) = declare::unimplied_summed(e)?;
    Some(format!(
        "{name} is summed in {} and is declared {}, but its values there are fixed by the names it couples to, not by a declaration; declare those free names instead (a summed name's declaration must follow from them)",
        crate::syntax::print_term(&term),
        parity.word()
    ))
}

/// A phase with a non-integer exponent at a point, as the user wrote it
/// in `text`: the message, and the names whose integer declaration would
/// rule such points out (the caller says how to declare them). `None` for
/// any other error.
pub fn explain_phase(text: &str, e: &Expr, err: &EvalError) -> Option<(String, Vec<String>)> {
    let EvalError::PhaseNotInteger { at, .. } = err else {
        return None;
    };
    let point: BTreeMap<Name, Q> = at.iter().cloned().collect();
    let get = |n: &Name| point.get(n).copied();
    let (w, value) = crate::syntax::written_phases(text)
        .into_iter()
        .find_map(|w| {
            let v = w.exponent.eval(&get)?;
            (!v.is_integer()).then_some((w, v))
        })?;
    let half_odd = |n: &Name| get(n).is_some_and(|v| !v.is_integer());
    // the names to declare: the exponent's half-odd ones, a summed one
    // replaced by the free names it couples to
    let free = e.free_vars();
    let mut names: BTreeSet<Name> = BTreeSet::new();
    for v in w.exponent.vars().filter(|v| half_odd(v)) {
        if free.contains(v) {
            names.insert(v.clone());
            continue;
        }
        for t in e.terms() {
            for f in t.factors() {
                let slots: Vec<&crate::expr::Lin> = f
                    .columns()
                    .into_iter()
                    .filter(|(_, m)| m.has(v))
                    .map(|(j, _)| j)
                    .chain(
                        f.triads()
                            .into_iter()
                            .filter(|tr| tr.iter().any(|l| l.has(v)))
                            .flatten(),
                    )
                    .collect();
                for l in slots {
                    names.extend(
                        l.vars()
                            .filter(|x| free.contains(*x) && half_odd(x))
                            .cloned(),
                    );
                }
            }
        }
    }
    let msg = format!(
        "at {}, the phase {} (line {}, column {}) has the exponent {}, which is not an integer",
        crate::evaluate::point_text(at),
        w.text,
        w.line,
        w.column,
        crate::expr::lin::fmt_q(&value)
    );
    Some((msg, names.iter().map(|n| n.to_string()).collect()))
}

/// "k", "k and q", "k, q and s".
pub fn spoken_list(names: &[String]) -> String {
    match names.split_last() {
        Some((last, rest)) if !rest.is_empty() => format!("{} and {last}", rest.join(", ")),
        _ => names.join(""),
    }
}
