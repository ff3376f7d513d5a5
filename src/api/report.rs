//! Typed, serialisable results of the API: a simplification with its
//! steps, a check report with its verdict and diagnosis, a recoupling, a
//! value. The command line's `--json` is the serde form of these types, so
//! their field names are the JSON keys the README documents.

use crate::expr::lin::fmt_q;
use crate::expr::Expr;
use crate::render::latex;
use crate::rules::source::Source;
use crate::simplify::{Outcome, Step};
use crate::verify::check::{CheckResult, Verdict};
use crate::verify::diagnose::{Finding, Side};
use crate::verify::gate::Certificate;
use crate::verify::sample::Point;
use serde::Serialize;
use std::collections::BTreeMap;

/// One published work cited by a step.
#[derive(Clone, Debug, Serialize)]
pub struct Citation {
    /// the catalog's key of the work
    pub work: String,
    /// author and year
    pub short: String,
    /// the full reference
    pub reference: String,
    /// equation, table or page in that work
    pub place: String,
}

/// Where a step's identity is published.
#[derive(Clone, Debug, Serialize)]
pub struct Reference {
    /// the source in words: `Edmonds 1957, eq. 6.2.9`
    pub text: String,
    /// each citation with its work
    pub citations: Vec<Citation>,
    /// a remark on the source (`from memory`, a derivation)
    pub note: Option<String>,
}

impl From<&Source> for Reference {
    fn from(s: &Source) -> Self {
        Reference {
            text: s.text(),
            citations: s
                .citations
                .iter()
                .map(|c| Citation {
                    work: c.work.key.to_string(),
                    short: c.work.short.to_string(),
                    reference: c.work.full.to_string(),
                    place: c.place.clone(),
                })
                .collect(),
            note: s.note.clone(),
        }
    }
}

/// One verified rewrite.
#[derive(Clone, Debug, Serialize)]
pub struct StepReport {
    /// the rule's name
    pub rule: String,
    /// its source in words
    pub source: String,
    /// its source, typed
    pub reference: Reference,
    /// the expression before
    pub before: String,
    /// the expression after
    pub after: String,
    /// points at which before and after were compared
    pub checked: usize,
    /// of those, points where they were nonzero
    pub nonzero: usize,
}

impl From<&Step> for StepReport {
    fn from(s: &Step) -> Self {
        StepReport {
            rule: s.rule.clone(),
            source: s.source.text(),
            reference: Reference::from(&s.source),
            before: s.before.to_string(),
            after: s.after.to_string(),
            checked: s.checked,
            nonzero: s.nonzero,
        }
    }
}

/// How a result was verified against its input.
#[derive(Clone, Debug, Serialize)]
pub struct Verification {
    /// what the result was compared with, when it is not the input as
    /// written (a recoupling is compared with the overlap of its states)
    #[serde(skip_serializing_if = "Option::is_none")]
    pub against: Option<String>,
    /// points compared
    pub checked: usize,
    /// of those, points where either side was nonzero
    pub nonzero: usize,
    /// the largest value of a free variable at those points
    pub max_j: String,
    /// false when the input could not be evaluated within the budget: the
    /// result was then verified step by step only
    pub whole: bool,
}

impl Verification {
    fn of(o: &Outcome, c: &Certificate, against: Option<&str>) -> Self {
        Verification {
            against: against.map(str::to_string),
            checked: o.checked,
            nonzero: o.nonzero,
            max_j: fmt_q(&c.max_j),
            whole: c.compared,
        }
    }
}

/// A simplification: the result and the verified steps that lead to it.
#[derive(Clone, Debug, Serialize)]
pub struct Simplification {
    /// the input in normal form
    pub input: String,
    /// the declarations in force, in the language (`integer k;`)
    pub declared: Option<String>,
    /// the result
    pub result: String,
    /// the result as LaTeX
    pub latex: String,
    /// the steps, in order
    pub steps: Vec<StepReport>,
    /// the verification of the result against the input
    pub verified: Verification,
    /// remarks for the reader (a symbol that is zero by its selection
    /// rules, ...)
    pub notes: Vec<String>,
    /// the result as an expression
    #[serde(skip)]
    pub result_expr: Expr,
}

impl Simplification {
    /// The report of an outcome (`declared`: the declarations in words).
    pub fn of(o: &Outcome, declared: Option<String>) -> Self {
        Simplification {
            input: o.input.to_string(),
            declared,
            result: o.result.to_string(),
            latex: latex::expr(&o.result),
            steps: o.steps.iter().map(StepReport::from).collect(),
            verified: Verification::of(o, &o.certificate, None),
            notes: o.notes.clone(),
            result_expr: o.result.clone(),
        }
    }
}

/// The verdict of a check.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum CheckVerdict {
    /// equal at every point checked (some of them nonzero)
    Equal,
    /// different at some point: a counterexample is given
    Different,
    /// both sides vanish at every point checked
    NotEstablished,
}

/// A point where the sides differ, with both values.
#[derive(Clone, Debug, Serialize)]
pub struct Counterexample {
    /// the free variables' values
    pub at: BTreeMap<String, String>,
    /// the left side's exact value there
    pub lhs: String,
    /// the right side's exact value there
    pub rhs: String,
}

/// The result of checking `LHS = RHS`.
#[derive(Clone, Debug, Serialize)]
pub struct CheckReport {
    /// the verdict, typed
    pub verdict: CheckVerdict,
    /// true when the verdict is `equal`
    pub equal: bool,
    /// false when both sides vanished everywhere
    pub established: bool,
    /// points checked
    pub checked: usize,
    /// of those, points where either side was nonzero
    pub nonzero: usize,
    /// points where the sides differ
    pub mismatches: usize,
    /// points where a triad of free variables breaks the triangle rule
    pub broken_triads: usize,
    /// true for every admissible point up to the largest value
    pub exhaustive: bool,
    /// the declarations in force, in the language
    pub declared: Option<String>,
    /// the number of points of an exhaustive domain
    pub domain_points: Option<u64>,
    /// the smallest counterexample
    pub counterexample: Option<Counterexample>,
    /// what is wrong, in words
    pub diagnosis: Option<String>,
    /// what is wrong, typed
    pub findings: Vec<Finding>,
    /// the repaired side
    pub repaired: Option<String>,
    /// which side was repaired: `left` or `right`
    pub repaired_side: Option<&'static str>,
    /// points at which the repaired claim was re-checked
    pub repaired_checked: Option<usize>,
}

fn point_strings(p: &Point) -> BTreeMap<String, String> {
    p.iter().map(|(k, v)| (k.to_string(), fmt_q(v))).collect()
}

impl CheckReport {
    /// The report of a check result.
    pub fn of(r: &CheckResult, declared: Option<String>) -> Self {
        let verdict = match &r.verdict {
            Verdict::Equal => CheckVerdict::Equal,
            Verdict::Different { .. } => CheckVerdict::Different,
            Verdict::NotEstablished => CheckVerdict::NotEstablished,
        };
        let mut report = CheckReport {
            verdict,
            equal: verdict == CheckVerdict::Equal,
            established: verdict != CheckVerdict::NotEstablished,
            checked: r.checked,
            nonzero: r.nonzero,
            mismatches: r.mismatches,
            broken_triads: r.broken_triads,
            exhaustive: r.domain.is_some(),
            declared,
            domain_points: r.domain,
            counterexample: None,
            diagnosis: None,
            findings: Vec::new(),
            repaired: None,
            repaired_side: None,
            repaired_checked: None,
        };
        if let Verdict::Different {
            at,
            lhs,
            rhs,
            diagnosis,
        } = &r.verdict
        {
            report.counterexample = Some(Counterexample {
                at: point_strings(at),
                lhs: lhs.to_string(),
                rhs: rhs.to_string(),
            });
            if let Some(d) = diagnosis {
                report.diagnosis = Some(d.text.clone());
                report.findings = d.findings.clone();
                report.repaired = Some(d.repaired.to_string());
                report.repaired_side = Some(match d.side {
                    Side::Left => "left",
                    Side::Right => "right",
                });
                report.repaired_checked = Some(d.confirmed.checked);
            }
        }
        report
    }
}

/// Counts of a result's sums and symbols (the largest over its terms).
#[derive(Clone, Copy, Debug, Serialize)]
pub struct SymbolCounts {
    /// 6j symbols
    #[serde(rename = "6j")]
    pub six_j: usize,
    /// 9j symbols
    #[serde(rename = "9j")]
    pub nine_j: usize,
}

/// A recoupling coefficient between two coupling schemes.
#[derive(Clone, Debug, Serialize)]
pub struct RecouplingReport {
    /// the coefficient
    pub result: String,
    /// as LaTeX
    pub latex: String,
    /// the number of summed variables (largest over the terms)
    pub sums: usize,
    /// the number of 6j and 9j symbols (largest over the terms)
    pub symbols: SymbolCounts,
    /// the verification against the overlap of the two coupled states
    pub verified: Verification,
    /// the verified steps from the overlap to the result
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub steps: Vec<StepReport>,
    /// the value at given leaves, when asked for
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    pub value: Option<Value>,
    /// the coefficient as an expression
    #[serde(skip)]
    pub result_expr: Expr,
}

impl RecouplingReport {
    /// The report of a recoupling.
    pub fn of(r: &crate::recouple::Recoupling) -> Self {
        let result = &r.outcome.result;
        let most = |k: fn(&crate::expr::Factor) -> bool| {
            result
                .terms()
                .iter()
                .map(|t| t.factors().iter().filter(|f| k(f)).count())
                .max()
                .unwrap_or(0)
        };
        RecouplingReport {
            result: result.to_string(),
            latex: latex::expr(result),
            sums: result
                .terms()
                .iter()
                .map(|t| t.bound().len())
                .max()
                .unwrap_or(0),
            symbols: SymbolCounts {
                six_j: most(|f| matches!(f, crate::expr::Factor::SixJ(_))),
                nine_j: most(|f| matches!(f, crate::expr::Factor::NineJ(_))),
            },
            verified: Verification::of(
                &r.outcome,
                &r.outcome.certificate,
                Some("the overlap of the two coupled states from its definition"),
            ),
            steps: r.outcome.steps.iter().map(StepReport::from).collect(),
            value: None,
            result_expr: result.clone(),
        }
    }
}

/// A value: exact (absent when only the float was asked for) and float.
#[derive(Clone, Debug, Serialize)]
pub struct Value {
    /// the exact value (`-sqrt(1/3)`)
    pub exact: Option<String>,
    /// the value in double precision
    pub float: f64,
    /// the exact value as rational multiples of square roots of
    /// square-free integers: `[(coefficient, radicand)]`
    #[serde(skip)]
    pub parts: Vec<(String, String)>,
}

impl Value {
    /// The value of an exact number.
    pub fn exact(v: &crate::numeric::Surd) -> Self {
        Value {
            exact: Some(v.to_string()),
            float: v.to_f64(),
            parts: v
                .terms()
                .map(|(root, coef)| (coef.to_string(), root.to_string()))
                .collect(),
        }
    }

    /// A float only.
    pub fn float(x: f64) -> Self {
        Value {
            exact: None,
            float: x,
            parts: Vec::new(),
        }
    }
}

/// A linear form `c0 + Σ c_v v`: the constant and each variable's
/// coefficient, as exact rationals in text (`-1/2`).
#[derive(Clone, Debug, Serialize)]
pub struct LinearShape {
    /// the constant
    pub constant: String,
    /// variable and coefficient, sorted by name
    pub terms: Vec<(String, String)>,
}

impl From<&crate::expr::Lin> for LinearShape {
    fn from(l: &crate::expr::Lin) -> Self {
        LinearShape {
            constant: fmt_q(&l.constant_part()),
            terms: l.terms().map(|(n, q)| (n.to_string(), fmt_q(q))).collect(),
        }
    }
}

/// One factor of a term, by kind and arguments in slot order.
#[derive(Clone, Debug, Serialize)]
pub struct FactorShape {
    /// `delta`, `tri`, `power`, `3j`, `cg`, `6j`, `9j` or `element`
    pub kind: &'static str,
    /// the arguments in the order the language writes them (`cg`:
    /// j1, m1, j2, m2, J, M)
    pub args: Vec<LinearShape>,
    /// the exponent of a power
    pub exponent: Option<String>,
    /// a matrix element in the language's text
    pub text: Option<String>,
}

/// One term: `coef * sqrt(root) * (-1)^phase * Π factors`, summed over
/// `bound`.
#[derive(Clone, Debug, Serialize)]
pub struct TermShape {
    /// the rational coefficient
    pub coefficient: String,
    /// the square-free radicand of the constant (1 for none)
    pub root: String,
    /// the exponent of the phase
    pub phase: LinearShape,
    /// the factors
    pub factors: Vec<FactorShape>,
    /// the summed variables
    pub summed: Vec<String>,
}

/// The structure of an expression, term by term, for conversion into
/// other algebra systems.
pub fn shape(e: &Expr) -> Vec<TermShape> {
    use crate::expr::Factor;
    e.terms()
        .iter()
        .map(|t| TermShape {
            coefficient: crate::numeric::surd::fmt_rational(t.coef()),
            root: t.root().to_string(),
            phase: LinearShape::from(t.phase()),
            factors: t
                .factors()
                .iter()
                .map(|f| {
                    let kind = match f {
                        Factor::Delta(..) => "delta",
                        Factor::Tri(_) => "tri",
                        Factor::Power(..) => "power",
                        Factor::ThreeJ(_) => "3j",
                        Factor::Cg(_) => "cg",
                        Factor::SixJ(_) => "6j",
                        Factor::NineJ(_) => "9j",
                        Factor::Element(_) => "element",
                    };
                    FactorShape {
                        kind,
                        args: f.lins().into_iter().map(LinearShape::from).collect(),
                        exponent: match f {
                            Factor::Power(_, q) => Some(fmt_q(q)),
                            _ => None,
                        },
                        text: matches!(f, Factor::Element(_))
                            .then(|| crate::syntax::print_factor(f)),
                    }
                })
                .collect(),
            summed: t.bound().iter().map(|n| n.to_string()).collect(),
        })
        .collect()
}

/// One member of a family: the running argument's value and the symbol's.
#[derive(Clone, Debug, Serialize)]
pub struct FamilyMember {
    /// the value of the running argument (`3/2`)
    pub value: String,
    /// the symbol in double precision
    pub float: f64,
    /// the exact value, when asked for
    pub exact: Option<String>,
}

/// A whole family of one symbol over one argument.
#[derive(Clone, Debug, Serialize)]
pub struct FamilyReport {
    /// the running argument
    pub over: String,
    /// every admissible member, in increasing order of the argument
    pub members: Vec<FamilyMember>,
}

/// One line of a batch of values: its line number and its value, or the
/// error that line met.
#[derive(Clone, Debug, Serialize)]
pub struct BatchLine {
    /// the one-based line number in the input
    pub line: usize,
    /// the value
    #[serde(flatten, skip_serializing_if = "Option::is_none")]
    pub value: Option<Value>,
    /// what went wrong on that line
    #[serde(skip_serializing_if = "Option::is_none")]
    pub error: Option<String>,
}

/// An error as JSON: its kind (`input`, `limit`, `internal`) and message.
#[derive(Clone, Debug, Serialize)]
pub struct ErrorReport {
    /// the error
    pub error: ErrorBody,
}

/// The body of an `ErrorReport`.
#[derive(Clone, Debug, Serialize)]
pub struct ErrorBody {
    /// `input`, `limit` or `internal`
    pub kind: &'static str,
    /// the message
    pub message: String,
}

/// An expression in LaTeX.
#[derive(Clone, Debug, Serialize)]
pub struct LatexReport {
    /// the text as written
    pub input: String,
    /// its LaTeX (math mode, no delimiters)
    pub latex: String,
}
