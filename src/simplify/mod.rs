//! The simplification driver: normal form, special values, exact values of
//! numeric symbols and (in later passes) the projection-sum and
//! angular-momentum-sum rewrites, repeated until nothing applies. Every
//! step is spot-evaluated against the expression before it and recorded
//! with its rule name and source; a step that fails is an error naming the
//! rule and the counterexample, never applied silently. The result is
//! verified against the input as a whole.

use crate::algebra::normal::{canonical_expr_assuming, free_projection_facts};
use crate::expr::Q;
use crate::expr::{Expr, Factor, Term};
use crate::graph::reduce::next_step;
use crate::graph::Graph;
use crate::numeric::eval::{EvalError, Evaluator};
use crate::numeric::Surd;
use crate::rules::apply::Prepared;
use crate::rules::{catalog, Rule, RuleKind};
use crate::verify::sample::Point;
use crate::verify::spot::{compare, compare_within, SpotSettings};
use num_traits::Signed;

/// One verified rewrite.
#[derive(Clone, Debug)]
pub struct Step {
    /// the rule's name
    pub rule: String,
    /// where the rule is published
    pub source: String,
    /// the expression before
    pub before: Expr,
    /// the expression after
    pub after: Expr,
    /// points compared
    pub checked: usize,
    /// points where either side was nonzero
    pub nonzero: usize,
}

/// The result of a simplification.
#[derive(Clone, Debug)]
pub struct Outcome {
    /// the input
    pub input: Expr,
    /// the simplified expression
    pub result: Expr,
    /// every step, in order
    pub steps: Vec<Step>,
    /// points at which the result was compared with the input
    pub checked: usize,
    /// of those, points where either was nonzero
    pub nonzero: usize,
    /// remarks for the trace (summed projections left alone, a final
    /// comparison skipped because the input is too large to evaluate)
    pub notes: Vec<String>,
}

/// Summation points the final comparison may visit in all (it checks
/// fewer points, at least 3, when the input's sums are expensive).
pub const FINAL_BUDGET: u64 = 600_000;

/// Settings of a simplification.
#[derive(Clone, Debug)]
pub struct Options {
    /// how each step is verified
    pub step_spot: SpotSettings,
    /// how the result is verified against the input
    pub final_spot: SpotSettings,
    /// let canonical forms use Regge's symmetries
    pub regge: bool,
    /// rules tried before the catalog's (for experiments and tests)
    pub extra_rules: Vec<Rule>,
    /// most steps before stopping
    pub max_steps: usize,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            step_spot: SpotSettings {
                max_j: Q::from_integer(2),
                samples: 20,
                exhaustive: false,
                seed: 3,
            },
            final_spot: SpotSettings {
                max_j: Q::new(5, 2),
                samples: 40,
                exhaustive: false,
                seed: 5,
            },
            regge: false,
            extra_rules: Vec::new(),
            max_steps: 200,
        }
    }
}

/// Why a simplification stopped.
#[derive(Debug, Clone, thiserror::Error)]
pub enum SimplifyError {
    /// A rewrite changed the value somewhere.
    #[error("the rewrite by {rule} ({rule_source}) is wrong at {}: before {before}, after {after}", fmt_point(.at))]
    Unverified {
        /// the rule's name
        rule: String,
        /// its source
        rule_source: String,
        /// where it fails
        at: Point,
        /// value before
        before: Surd,
        /// value after
        after: Surd,
    },
    /// The expression cannot be evaluated (so nothing can be verified).
    #[error("{0}")]
    Eval(#[from] EvalError),
}

/// `a = 1, b = 1/2`.
pub fn fmt_point(p: &Point) -> String {
    p.iter()
        .map(|(k, v)| format!("{k} = {}", crate::expr::lin::fmt_q(v)))
        .collect::<Vec<_>>()
        .join(", ")
}

/// Verifies `after` against `before` and records the step.
pub fn verified_step(
    rule: &str,
    source: &str,
    before: &Expr,
    after: &Expr,
    s: &SpotSettings,
) -> Result<Step, SimplifyError> {
    let rep = compare(before, after, s)?;
    if let Some(m) = rep.mismatches.first() {
        return Err(SimplifyError::Unverified {
            rule: rule.to_string(),
            rule_source: source.to_string(),
            at: m.at.clone(),
            before: m.lhs.clone(),
            after: m.rhs.clone(),
        });
    }
    Ok(Step {
        rule: rule.to_string(),
        source: source.to_string(),
        before: before.clone(),
        after: after.clone(),
        checked: rep.checked,
        nonzero: rep.nonzero,
    })
}

/// Source of the normal form.
const NORMAL_FORM_SOURCE: &str =
    "DESIGN.md (phases modulo integrality; canonical symbols); IDENTITIES.md Symmetries";

/// Numeric symbols up to this j are replaced by their exact values.
pub const EXACT_VALUE_J: i64 = 60;

/// Replaces every symbol whose arguments are all numbers by its value.
fn exact_values(e: &Expr) -> Option<Expr> {
    let ev = Evaluator::<Surd>::new();
    let mut changed = false;
    let mut out = Expr::zero();
    for t in &e.terms {
        let mut nt = t.clone();
        let mut keep = Vec::new();
        for f in &t.factors {
            // numeric symbols of moderate size become numbers (larger ones
            // stay symbols: their exact values are long and slow)
            let small = f.lins().iter().all(|l| {
                l.is_constant() && l.constant_part().abs() <= Q::from_integer(EXACT_VALUE_J)
            });
            if f.is_symbol() && small {
                let single = Expr::from_term(Term::factor(f.clone()));
                match ev.eval(&single, &Default::default()) {
                    Ok(v) if v.terms().count() <= 1 => {
                        nt.scale(&v);
                        changed = true;
                        continue;
                    }
                    _ => keep.push(f.clone()),
                }
            } else {
                keep.push(f.clone());
            }
        }
        nt.factors = keep;
        out.push(nt.normalized());
    }
    changed.then_some(out)
}

/// True when every summed variable still appears in a factor that bounds it.
fn sums_stay_bounded(e: &Expr) -> bool {
    e.terms.iter().all(|t| {
        t.bound.iter().all(|v| {
            t.factors.iter().any(|f| {
                (f.is_symbol() || matches!(f, Factor::Tri(_) | Factor::Delta(..))) && f.has(v)
            })
        })
    })
}

/// The catalog's sum identities as prepared patterns.
fn sum_patterns() -> &'static [crate::rules::matcher::Pattern] {
    static P: std::sync::OnceLock<Vec<crate::rules::matcher::Pattern>> = std::sync::OnceLock::new();
    P.get_or_init(|| {
        catalog()
            .iter()
            .filter(|r| r.kind == RuleKind::MomentumSum)
            .filter_map(crate::rules::matcher::Pattern::new)
            .collect()
    })
}

/// One application of a sum identity to some term (classical symmetries
/// first, then Regge's), verified on its instance.
fn momentum_sum_step(cur: &Expr, opts: &Options) -> Result<Option<(Step, Expr)>, SimplifyError> {
    let extra: Vec<crate::rules::matcher::Pattern> = opts
        .extra_rules
        .iter()
        .filter(|r| r.kind == RuleKind::MomentumSum)
        .filter_map(crate::rules::matcher::Pattern::new)
        .collect();
    for regge in [false, true] {
        for (i, t) in cur.terms.iter().enumerate() {
            if t.bound.is_empty() {
                continue;
            }
            for p in extra.iter().chain(sum_patterns().iter()) {
                let found = if regge {
                    p.apply_simplest(t, &Default::default(), true, 512)
                } else {
                    p.apply_first(t, &Default::default(), false)
                };
                let Some((m, replacement)) = found else {
                    continue;
                };
                let (il, ir) = p.instance(t, &m);
                let local = verified_step(&p.name, &p.source, &il, &ir, &opts.step_spot)?;
                let mut next = Expr::zero();
                for (k, u) in cur.terms.iter().enumerate() {
                    if k == i {
                        for x in &replacement.terms {
                            next.push(x.clone());
                        }
                    } else {
                        next.push(u.clone());
                    }
                }
                let source = if regge {
                    format!("{} (matched through a Regge symmetry)", p.source)
                } else {
                    p.source.clone()
                };
                return Ok(Some((
                    Step {
                        rule: p.name.clone(),
                        source,
                        before: cur.clone(),
                        after: next.clone(),
                        checked: local.checked,
                        nonzero: local.nonzero,
                    },
                    next,
                )));
            }
        }
    }
    Ok(None)
}

/// Simplifies an expression with the catalog's rules, verifying each step.
pub fn simplify(input: &Expr, opts: &Options) -> Result<Outcome, SimplifyError> {
    let mut steps = Vec::new();
    let mut cur = input.clone();
    // free projections are admissible: j - m is an integer for the input's
    // free columns, even after the symbol that showed it is gone
    let facts = free_projection_facts(input);
    let canonical_expr = |e: &Expr, regge: bool| canonical_expr_assuming(e, regge, &facts);
    let nf = canonical_expr(&cur, opts.regge);
    if nf != cur {
        steps.push(verified_step(
            "normal-form",
            NORMAL_FORM_SOURCE,
            &cur,
            &nf,
            &opts.step_spot,
        )?);
        cur = nf;
    }
    let rules: Vec<&Rule> = opts
        .extra_rules
        .iter()
        .chain(catalog().iter())
        .filter(|r| r.kind == RuleKind::Special)
        .collect();
    let prepared: Vec<Prepared> = rules.iter().filter_map(|r| Prepared::new(r)).collect();
    'outer: while steps.len() < opts.max_steps {
        for p in &prepared {
            for (i, t) in cur.terms.iter().enumerate() {
                let Some(replacement) = p.rewrite(t, opts.regge) else {
                    continue;
                };
                let mut next = Expr::zero();
                for (k, u) in cur.terms.iter().enumerate() {
                    if k == i {
                        for r in &replacement.terms {
                            next.push(r.clone());
                        }
                    } else {
                        next.push(u.clone());
                    }
                }
                if !sums_stay_bounded(&next) {
                    continue;
                }
                let next = canonical_expr(&next, opts.regge);
                steps.push(verified_step(
                    &p.rule.name,
                    &p.rule.source,
                    &cur,
                    &next,
                    &opts.step_spot,
                )?);
                cur = next;
                continue 'outer;
            }
        }
        // the graph reduction of projection sums
        for (i, t) in cur.terms.iter().enumerate() {
            let Some(r) = next_step(t, opts.regge) else {
                continue;
            };
            let local = verified_step(
                &r.rule,
                &r.source,
                &r.instance.0,
                &r.instance.1,
                &opts.step_spot,
            )?;
            let mut next = Expr::zero();
            for (k, u) in cur.terms.iter().enumerate() {
                if k == i {
                    for x in &r.replacement.terms {
                        next.push(x.clone());
                    }
                } else {
                    next.push(u.clone());
                }
            }
            let next = canonical_expr(&next, opts.regge);
            steps.push(Step {
                rule: r.rule,
                source: r.source,
                before: cur.clone(),
                after: next.clone(),
                checked: local.checked,
                nonzero: local.nonzero,
            });
            cur = next;
            continue 'outer;
        }
        // sums over angular momenta: the catalog's identities
        if let Some((step, next)) = momentum_sum_step(&cur, opts)? {
            steps.push(step);
            cur = canonical_expr(&next, opts.regge);
            continue;
        }
        if let Some(next) = exact_values(&cur) {
            let next = canonical_expr(&next, opts.regge);
            steps.push(verified_step(
                "exact-value",
                "Racah single-sum formulas (Edmonds 3.7.3, 6.3.7, 6.4.3)",
                &cur,
                &next,
                &opts.step_spot,
            )?);
            cur = next;
            continue;
        }
        break;
    }
    // where the user wrote Clebsch-Gordan coefficients and no 3j, the 3j
    // left with free projections read better as CGs again
    let wrote_cg = input
        .terms
        .iter()
        .any(|t| t.factors.iter().any(|f| matches!(f, Factor::Cg(_))));
    let wrote_3j = input
        .terms
        .iter()
        .any(|t| t.factors.iter().any(|f| matches!(f, Factor::ThreeJ(_))));
    if wrote_cg && !wrote_3j {
        if let Some(next) = crate::graph::reduce::with_3j_as_cg(&cur) {
            let next = canonical_expr(&next, opts.regge);
            let r = crate::rules::rule("3j-to-cg");
            steps.push(verified_step(
                &r.name,
                &r.source,
                &cur,
                &next,
                &opts.step_spot,
            )?);
            cur = next;
        }
    }
    let mut notes: Vec<String> = Vec::new();
    for t in &cur.terms {
        for n in Graph::of_term(t).notes {
            if !notes.contains(&n) {
                notes.push(n);
            }
        }
        let kinds = t.kinds();
        let left: Vec<String> = t
            .bound
            .iter()
            .filter(|b| kinds.get(*b) == Some(&crate::expr::Kind::AngularMomentum))
            .map(|b| b.to_string())
            .collect();
        if !left.is_empty() {
            let n = format!(
                "no identity of the catalog applies to the sum over {}; it is left in canonical form",
                left.join(", ")
            );
            if !notes.contains(&n) {
                notes.push(n);
            }
        }
    }
    let (checked, nonzero) = match compare_within(input, &cur, &opts.final_spot, FINAL_BUDGET, 3) {
        Ok(rep) => {
            if let Some(m) = rep.mismatches.first() {
                return Err(SimplifyError::Unverified {
                    rule: "the whole simplification".into(),
                    rule_source: "composition of the steps".into(),
                    at: m.at.clone(),
                    before: m.lhs.clone(),
                    after: m.rhs.clone(),
                });
            }
            (rep.checked, rep.nonzero)
        }
        Err(EvalError::TooLarge) => {
            notes.push(format!(
                "the input's sums are too large to evaluate within {FINAL_BUDGET} points, so the result was not compared with the input as a whole; every step was verified on its own instance"
            ));
            (0, 0)
        }
        Err(e) => return Err(e.into()),
    };
    Ok(Outcome {
        input: input.clone(),
        result: cur,
        steps,
        checked,
        nonzero,
        notes,
    })
}
