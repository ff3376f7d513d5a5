//! The simplification driver: normal form, special values, exact values of
//! numeric symbols and (in later passes) the projection-sum and
//! angular-momentum-sum rewrites, repeated until nothing applies. Every
//! step is spot-evaluated (the rewrite, or its local instance) and recorded
//! with its rule name and typed source by one function, `Driver::advance`,
//! which tidies the rewritten expression into the normal form first: so
//! the trace's last step is exactly the printed result. A step that fails
//! is an error naming the rule and the counterexample, never applied
//! silently. The result passes the verification gate against the input.

use crate::algebra::normal::{canonical_expr_assuming, free_projection_facts};
use crate::evaluate::{EvalError, Evaluator};
use crate::expr::Q;
use crate::expr::{Expr, Factor, Term};
use crate::graph::reduce::next_step_skipping;
use crate::graph::Graph;
use crate::numeric::Surd;
use crate::rules::apply::Prepared;
use crate::rules::{catalog, Rule, RuleKind, Source};
mod vacuous;

use crate::verify::gate::{certify, Certificate, GateError};
use crate::verify::sample::Point;
use crate::verify::spot::{compare, SpotSettings};
use num_traits::Signed;

/// One verified rewrite.
#[derive(Clone, Debug)]
pub struct Step {
    /// the rule's name
    pub rule: String,
    /// where the rule is published
    pub source: Source,
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
    /// what the verification gate established
    pub certificate: Certificate,
    /// remarks for the trace (summed projections left alone, a final
    /// comparison skipped because the input is too large to evaluate)
    pub notes: Vec<String>,
}

/// Most variables one term may have: the normal form's phase lattice costs
/// about the cube of this (800 variables take several seconds).
pub const MAX_TERM_VARS: usize = 800;

/// Refuses, before any work, a term too large for the normal form.
fn check_size(e: &Expr) -> Result<(), SimplifyError> {
    for t in e.terms() {
        let n = t.all_vars().len();
        if n > MAX_TERM_VARS {
            return Err(SimplifyError::Limit(format!(
                "a term with {n} variables is beyond the size the normal form handles ({MAX_TERM_VARS} variables; its phase lattice grows as the cube): simplify independent factors separately"
            )));
        }
    }
    Ok(())
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
    /// try the graphical route on sums no catalog identity fits
    pub graphical: bool,
    /// catalog rules not to use (by name; for experiments and tests)
    pub skip_rules: Vec<String>,
    /// inside the graphical route: also read the interchange backwards
    pub backwards_interchange: bool,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            step_spot: SpotSettings {
                max_j: Q::from_integer(2),
                samples: 20,
                exhaustive: false,
                seed: 3,
                lhs_is_domain: true,
                ..SpotSettings::default()
            },
            final_spot: SpotSettings {
                max_j: Q::new(5, 2),
                samples: 40,
                exhaustive: false,
                seed: 5,
                lhs_is_domain: true,
                ..SpotSettings::default()
            },
            regge: false,
            extra_rules: Vec::new(),
            max_steps: 200,
            graphical: true,
            skip_rules: Vec::new(),
            backwards_interchange: false,
        }
    }
}

/// Why a simplification stopped.
#[derive(Debug, Clone, thiserror::Error)]
pub enum SimplifyError {
    /// A rewrite changed the value somewhere.
    #[error("{0}")]
    Unverified(Box<Unverified>),
    /// The expression cannot be evaluated (so nothing can be verified).
    #[error("{0}")]
    Eval(#[from] EvalError),
    /// A limit was reached (size of the work, points).
    #[error("{0}")]
    Limit(String),
    /// The input holds a form the engine cannot rewrite (a matrix element
    /// of operators on nested subsystems, ...).
    #[error("{0}")]
    Unsupported(String),
    /// A defect: an invariant of the engine does not hold.
    #[error("internal error: {0}")]
    Internal(String),
}

/// A rewrite that failed its verification: the rule, the point, the
/// values before and after.
#[derive(Debug, Clone, thiserror::Error)]
#[error("the rewrite by {rule} ({rule_source}) is wrong at {}: before {before}, after {after}", fmt_point(.at))]
pub struct Unverified {
    /// the rule's name
    pub rule: String,
    /// its source
    pub rule_source: Source,
    /// where it fails
    pub at: Point,
    /// value before
    pub before: crate::verify::spot::SpotValue,
    /// value after
    pub after: crate::verify::spot::SpotValue,
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
    source: &Source,
    before: &Expr,
    after: &Expr,
    s: &SpotSettings,
) -> Result<Step, SimplifyError> {
    let rep = compare(before, after, s)?;
    step_of_report(rule, source, before, after, rep)
}

/// Verifies `after` against `before` at points of the input's domain only
/// (its projections admissible): for a step that holds where the input
/// is defined, such as dropping a triangle factor whose failing values
/// the input's own projections rule out.
pub fn verified_step_within(
    rule: &str,
    source: &Source,
    before: &Expr,
    after: &Expr,
    domain: &Expr,
    s: &SpotSettings,
) -> Result<Step, SimplifyError> {
    let pts = crate::verify::spot::points(&[domain, before, after], s);
    let rep = crate::verify::spot::compare_at(before, after, &pts)?;
    step_of_report(rule, source, before, after, rep)
}

/// A term with its sums opened: the summed names become free.
fn opened(t: &Term) -> Expr {
    let mut parts = t.parts();
    parts.bound.clear();
    Expr::from_terms([parts.normalized()])
}

/// Compares term pairs summand by summand: each pair must have the same
/// summed names, and its two terms are compared with their sums opened
/// (the summed names free) by `compare_pair`, which gives the points
/// checked and those nonzero, or `None`. Summands equal at every point
/// give equal sums: a stronger statement than the equality of the two
/// sums, checked without evaluating any nested sum. `None` when a pair
/// differs in its summed names, disagrees somewhere or shows no nonzero
/// point: the caller then compares the two sides themselves.
fn summandwise<'t>(
    pairs: impl Iterator<Item = (&'t Term, &'t Term)>,
    compare_pair: impl Fn(&Expr, &Expr) -> Option<(usize, usize)>,
) -> Option<(usize, usize)> {
    let (mut checked, mut nonzero) = (0, 0);
    for (x, y) in pairs {
        if x.bound() != y.bound() {
            return None;
        }
        let (c, n) = compare_pair(&opened(x), &opened(y))?;
        if n == 0 {
            return None;
        }
        checked += c;
        nonzero += n;
    }
    Some((checked, nonzero))
}

/// Verifies a rewrite that keeps every sum (same terms in the same order,
/// each with the same summed names) summand by summand (`summandwise`):
/// the cost of comparing a long unreduced product of symbols whose
/// normal form was taken, without its nested sums.
fn summandwise_step(
    rule: &str,
    source: &Source,
    before: &Expr,
    after: &Expr,
    s: &SpotSettings,
) -> Option<Step> {
    let (b, a) = (before.terms(), after.terms());
    if b.len() != a.len() || b.iter().all(|t| t.bound().is_empty()) {
        return None;
    }
    let (checked, nonzero) = summandwise(b.iter().zip(a), |x, y| {
        let rep = compare(x, y, s).ok()?;
        (rep.mismatch_count == 0).then_some((rep.checked, rep.nonzero))
    })?;
    Some(Step {
        rule: rule.to_string(),
        source: source.clone(),
        before: before.clone(),
        after: after.clone(),
        checked,
        nonzero,
    })
}

/// The step a comparison report supports, or why it does not.
fn step_of_report(
    rule: &str,
    source: &Source,
    before: &Expr,
    after: &Expr,
    rep: crate::verify::spot::SpotReport,
) -> Result<Step, SimplifyError> {
    if rep.checked == 0 {
        if let Some(why) = &rep.undefined_why {
            return Err(SimplifyError::Eval(EvalError::Arithmetic(format!(
                "the expression is undefined at every point tried, so no step can be verified: {why}"
            ))));
        }
    }
    if let Some(m) = rep.mismatches.first() {
        return Err(SimplifyError::Unverified(Box::new(Unverified {
            rule: rule.to_string(),
            rule_source: source.clone(),
            at: m.at.clone(),
            before: m.lhs.clone(),
            after: m.rhs.clone(),
        })));
    }
    Ok(Step {
        rule: rule.to_string(),
        source: source.clone(),
        before: before.clone(),
        after: after.clone(),
        checked: rep.checked,
        nonzero: rep.nonzero,
    })
}

/// A rewrite proposed by one of the strategies, before it is recorded.
pub struct Proposal {
    /// the rule's name
    pub rule: String,
    /// its source
    pub source: Source,
    /// the whole expression after the rewrite (not yet tidied)
    pub next: Expr,
    /// the local identity applied, when it is cheaper to verify than the
    /// whole expression
    pub local: Option<(Expr, Expr)>,
}

/// A derivation in progress: the expression so far and its trace. Every
/// step of every command is made by `advance`.
pub struct Derivation<'a> {
    opts: &'a Options,
    facts: Vec<crate::expr::Lin>,
    cur: Expr,
    steps: Vec<Step>,
}

/// The driver of `simplify` is a derivation.
type Driver<'a> = Derivation<'a>;

impl<'a> Derivation<'a> {
    /// A derivation that starts at `start` with the steps so far (free
    /// projections of `input` stay admissible facts).
    pub fn resume(input: &Expr, start: Expr, steps: Vec<Step>, opts: &'a Options) -> Self {
        Derivation {
            opts,
            facts: free_projection_facts(input),
            cur: start,
            steps,
        }
    }

    /// The expression so far.
    pub fn current(&self) -> &Expr {
        &self.cur
    }

    /// The result and the trace (whose last step, if any, is the result).
    pub fn finish(self) -> (Expr, Vec<Step>) {
        (self.cur, self.steps)
    }

    fn tidy(&self, e: &Expr) -> Expr {
        canonical_expr_assuming(e, self.opts.regge, &self.facts)
    }

    /// The one place a step is made: the rewritten expression is tidied
    /// into the normal form, the rewrite verified (its local instance when
    /// it has one, else the whole before and after), and the step
    /// recorded with exactly the expression the next step sees.
    pub fn advance(&mut self, p: Proposal) -> Result<(), SimplifyError> {
        self.advance_checked(p, None)
    }

    /// `advance` for a step that holds on the input's domain (its
    /// projections admissible), verified at points of that domain.
    pub fn advance_within(&mut self, p: Proposal, domain: &Expr) -> Result<(), SimplifyError> {
        self.advance_checked(p, Some(domain))
    }

    fn advance_checked(&mut self, p: Proposal, domain: Option<&Expr>) -> Result<(), SimplifyError> {
        check_size(&p.next)?;
        let next = self.tidy(&p.next);
        let s = &self.opts.step_spot;
        let st = match (&p.local, domain) {
            (Some((il, ir)), _) => verified_step(&p.rule, &p.source, il, ir, s)?,
            (None, Some(d)) => verified_step_within(&p.rule, &p.source, &self.cur, &next, d, s)?,
            (None, None) => match summandwise_step(&p.rule, &p.source, &self.cur, &next, s) {
                Some(st) => st,
                None => verified_step(&p.rule, &p.source, &self.cur, &next, s)?,
            },
        };
        let (checked, nonzero) = (st.checked, st.nonzero);
        self.steps.push(Step {
            rule: p.rule,
            source: p.source,
            before: self.cur.clone(),
            after: next.clone(),
            checked,
            nonzero,
        });
        self.cur = next;
        Ok(())
    }
}

/// The expression with term `i` replaced by the terms of `by`.
fn replace_term(e: &Expr, i: usize, by: &Expr) -> Expr {
    let mut next = Expr::zero();
    for (k, u) in e.terms().iter().enumerate() {
        if k == i {
            for x in by.terms() {
                next.push(x.clone());
            }
        } else {
            next.push(u.clone());
        }
    }
    next
}

/// Source of the normal form: the symmetries of the symbols and phases
/// reduced modulo the integers they are known to be.
fn normal_form_source() -> Source {
    Source::parse(
        "edmonds1957 sections 3.7, 6.2 and 6.4; regge1958; regge1959 -- the symmetries of the 3j, 6j and 9j symbols; phases reduced modulo integrality (common practice); from memory",
    )
    .expect("the normal form's source parses")
}

/// Source of exact values of numeric symbols.
fn exact_value_source() -> Source {
    Source::parse(
        "racah1942; edmonds1957 eq. 6.4.3 -- the single-sum formulas for the 3j and 6j, the 9j as a sum over three 6j; from memory",
    )
    .expect("the exact values' source parses")
}

/// Numeric symbols up to this j are replaced by their exact values.
pub const EXACT_VALUE_J: i64 = 60;

/// Replaces every symbol whose arguments are all numbers by its value.
fn exact_values(e: &Expr) -> Option<Expr> {
    let ev = Evaluator::<Surd>::new();
    let mut changed = false;
    let mut out = Expr::zero();
    for t in e.terms() {
        let mut values = Vec::new();
        let mut keep = Vec::new();
        for f in t.factors() {
            // numeric symbols of moderate size become numbers (larger ones
            // stay symbols: their exact values are long and slow)
            let small = f.lins().iter().all(|l| {
                l.is_constant() && l.constant_part().abs() <= Q::from_integer(EXACT_VALUE_J)
            });
            if f.is_symbol() && small {
                let single = Expr::from_term(Term::factor(f.clone()));
                match ev.eval(&single, &Default::default()) {
                    Ok(v) if v.terms().count() <= 1 => {
                        values.push(v);
                        changed = true;
                        continue;
                    }
                    _ => keep.push(f.clone()),
                }
            } else {
                keep.push(f.clone());
            }
        }
        let mut nt = t.with_factors(keep);
        for v in &values {
            nt.scale(v);
        }
        out.push(nt);
    }
    changed.then_some(out)
}

/// True when every summed variable still appears in a factor that bounds it.
fn sums_stay_bounded(e: &Expr) -> bool {
    e.terms().iter().all(|t| {
        t.bound().iter().all(|v| {
            t.factors().iter().any(|f| {
                (f.is_symbol() || matches!(f, Factor::Tri(_) | Factor::Delta(..))) && f.has(v)
            })
        })
    })
}

/// The catalog's sum identities as prepared patterns.
fn sum_patterns() -> &'static [crate::rules::matcher::Pattern] {
    static P: std::sync::OnceLock<Vec<crate::rules::matcher::Pattern>> = std::sync::OnceLock::new();
    P.get_or_init(|| {
        crate::algebra::declare::suspended(|| {
            catalog()
                .iter()
                .filter(|r| r.kind == RuleKind::MomentumSum)
                .filter_map(crate::rules::matcher::Pattern::new)
                .collect()
        })
    })
}

/// One application of a sum identity to some term (classical symmetries
/// first, then Regge's), to be verified on its instance.
fn momentum_sum_step(cur: &Expr, opts: &Options) -> Option<Proposal> {
    let mut extra: Vec<crate::rules::matcher::Pattern> = opts
        .extra_rules
        .iter()
        .filter(|r| r.kind == RuleKind::MomentumSum)
        .filter_map(crate::rules::matcher::Pattern::new)
        .collect();
    if opts.backwards_interchange {
        extra.extend(crate::rules::matcher::Pattern::new(crate::rules::rule(
            "interchange-backwards",
        )));
    }
    let usable = || {
        extra
            .iter()
            .chain(sum_patterns().iter())
            .filter(|p| !opts.skip_rules.contains(&p.name))
    };
    // terms no identity fits (in any spelling) are remembered, with what
    // decides it: the options and the declarations
    let key = no_identity_key(opts);
    let dead = |t: &Term| NO_IDENTITY.with(|d| d.borrow().contains(&term_key(t, key)));
    let bury = |ts: &[Term]| {
        NO_IDENTITY.with(|d| {
            let mut d = d.borrow_mut();
            if d.len() > 20_000 {
                d.clear();
            }
            for t in ts.iter().filter(|t| !t.bound().is_empty()) {
                d.insert(term_key(t, key));
            }
        })
    };
    for regge in [false, true] {
        for (i, t) in cur.terms().iter().enumerate() {
            if t.bound().is_empty() || dead(t) {
                continue;
            }
            for p in usable() {
                crate::limits::tick();
                let Some((m, replacement)) = sum_identity_match(p, t, regge) else {
                    continue;
                };
                let source = if regge {
                    // the terms before it fit nothing in either pass
                    bury(&cur.terms()[..i]);
                    p.source.clone().noted("matched through a Regge symmetry")
                } else {
                    p.source.clone()
                };
                return Some(Proposal {
                    rule: p.name.clone(),
                    source,
                    next: replace_term(cur, i, &replacement),
                    local: Some(p.instance(t, &m)),
                });
            }
        }
    }
    bury(cur.terms());
    // the identities are stated with 3j: a sum whose Clebsch-Gordan
    // coefficients hold a summed variable has them written as 3j first,
    // one at a time, when an identity fits the term so written
    for (i, t) in cur.terms().iter().enumerate() {
        let Some(first) = crate::graph::reduce::cg_in_sum_step(t) else {
            continue;
        };
        let single =
            |e: &Expr| -> Option<Term> { (e.terms().len() == 1).then(|| e.terms()[0].clone()) };
        let mut written = first.replacement.clone();
        while let Some(next) = single(&written)
            .as_ref()
            .and_then(crate::graph::reduce::cg_in_sum_step)
        {
            written = next.replacement;
        }
        let Some(as_3j) = single(&written) else {
            continue;
        };
        let fits = [false, true]
            .iter()
            .any(|&regge| usable().any(|p| sum_identity_match(p, &as_3j, regge).is_some()));
        if fits {
            return Some(Proposal {
                rule: first.rule,
                source: first.source,
                next: replace_term(cur, i, &first.replacement),
                local: Some(first.instance),
            });
        }
    }
    None
}

/// A sum identity's first match in a term: through the classical
/// symmetries, or through Regge's (then the simplest of the matches).
fn sum_identity_match(
    p: &crate::rules::matcher::Pattern,
    t: &Term,
    regge: bool,
) -> Option<(crate::rules::matcher::Match, Expr)> {
    if regge {
        p.apply_simplest(t, &Default::default(), true, 512)
    } else {
        p.apply_first(t, &Default::default(), false)
    }
}

thread_local! {
    /// Terms (hashed with the key of what decided it) that no sum identity
    /// fits. A collision could only leave a sum unreduced, never make a
    /// wrong rewrite.
    static NO_IDENTITY: std::cell::RefCell<std::collections::HashSet<u64>> =
        std::cell::RefCell::new(std::collections::HashSet::new());
}

/// A term's hash with the key of what decides whether an identity fits.
fn term_key(t: &Term, key: u64) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::collections::hash_map::DefaultHasher::new();
    t.hash(&mut h);
    key.hash(&mut h);
    h.finish()
}

/// What decides whether a sum identity fits a term besides the term: the
/// extra and skipped rules, the graphical route's flag, the declarations.
fn no_identity_key(opts: &Options) -> u64 {
    use std::hash::{Hash, Hasher};
    let mut h = std::collections::hash_map::DefaultHasher::new();
    for r in &opts.extra_rules {
        r.name.hash(&mut h);
        r.lhs.hash(&mut h);
        r.rhs.hash(&mut h);
    }
    opts.skip_rules.hash(&mut h);
    opts.backwards_interchange.hash(&mut h);
    crate::algebra::declare::current().to_string().hash(&mut h);
    h.finish()
}

/// Number of sums and of symbols of the most complex term.
fn weight(e: &Expr) -> (usize, usize) {
    e.terms()
        .iter()
        .map(|t| {
            (
                t.bound().len(),
                t.factors().iter().filter(|f| f.is_symbol()).count(),
            )
        })
        .max()
        .unwrap_or((0, 0))
}

/// A cheap test before the graphical route: with one 6j, completeness
/// needs the two triads holding x to share their other entries; with two,
/// the interchange read backwards needs them to share four entries besides
/// x.
fn graphical_route_may_fit(t: &Term, x: &crate::expr::Name, with_x: &[usize]) -> bool {
    let entries =
        |k: usize| -> Vec<crate::expr::Lin> { t.factors()[k].lins().into_iter().cloned().collect() };
    match with_x {
        [k] => {
            let f = &t.factors()[*k];
            let triads: Vec<Vec<crate::expr::Lin>> = f
                .triads()
                .into_iter()
                .filter(|tr| tr.iter().any(|l| l.has(x)))
                .map(|tr| {
                    let mut v: Vec<crate::expr::Lin> = tr
                        .iter()
                        .filter(|l| !l.has(x))
                        .map(|l| (*l).clone())
                        .collect();
                    v.sort();
                    v
                })
                .collect();
            triads.len() == 2 && triads[0] == triads[1]
        }
        [k1, k2] => {
            let a = entries(*k1);
            let mut b = entries(*k2);
            let mut shared = 0;
            for l in a.iter().filter(|l| !l.has(x)) {
                if let Some(p) = b.iter().position(|m| m == l) {
                    b.remove(p);
                    shared += 1;
                }
            }
            shared >= 4
        }
        _ => false,
    }
}

/// The graphical route for a sum over an angular momentum x that no
/// catalog identity fits: of the (one or two) 6j containing x, one is
/// written as its tetrahedral projection sum, so that 3j-completeness or
/// the interchange read backwards can remove the sum over x, and the graph
/// reduction finishes. The rewritten term is simplified on its own and
/// kept only when it has fewer sums, or as many sums and fewer symbols;
/// the replacement is verified against the term.
fn graphical_route(
    cur: &Expr,
    opts: &Options,
    tried: &mut std::collections::HashSet<Term>,
) -> Option<Proposal> {
    let expand = crate::rules::matcher::Pattern::new(crate::rules::rule("6j-as-projection-sum"))
        .expect("the 6j definition is a pattern");
    for (i, t) in cur.terms().iter().enumerate() {
        if !tried.insert(t.clone()) {
            continue;
        }
        // small pure sums over angular momenta only (the route simplifies a
        // whole term again, which is worth it only there)
        if crate::graph::reduce::has_projection_sum(t)
            || t.factors().iter().filter(|f| f.is_symbol()).count() > 4
        {
            continue;
        }
        let kinds = t.kinds();
        for x in t
            .bound()
            .iter()
            .filter(|b| kinds.get(*b) == Some(&crate::expr::Kind::AngularMomentum))
        {
            let with_x: Vec<usize> = (0..t.factors().len())
                .filter(|&k| t.factors()[k].is_symbol() && t.factors()[k].has(x))
                .collect();
            if with_x.is_empty()
                || with_x.len() > 2
                || with_x
                    .iter()
                    .any(|&k| !matches!(t.factors()[k], Factor::SixJ(_)))
            {
                continue;
            }
            if !graphical_route_may_fit(t, x, &with_x) {
                continue;
            }
            for &k in with_x.iter().rev() {
                let Factor::SixJ(a) = &t.factors()[k] else {
                    continue;
                };
                let mut req = crate::algebra::unify::Subst::new();
                for (name, l) in ["j1", "j2", "j3", "j4", "j5", "j6"].iter().zip(a.iter()) {
                    req.insert(expand.var(name), l.clone());
                }
                let Some((_, expanded)) = expand.apply_first(t, &req, false) else {
                    continue;
                };
                let sub_opts = Options {
                    graphical: false,
                    backwards_interchange: true,
                    max_steps: 40,
                    ..opts.clone()
                };
                let Ok(sub) = simplify(&expanded, &sub_opts) else {
                    continue;
                };
                let before = Expr::from_term(t.clone());
                if weight(&sub.result) >= weight(&before) {
                    continue;
                }
                let rules: Vec<String> = {
                    let mut r: Vec<String> = sub.steps.iter().map(|s| s.rule.clone()).collect();
                    r.dedup();
                    r
                };
                let mut source = Source::parse("yutsis1962 -- from memory")
                    .expect("the graphical route's source parses");
                source.note = Some(format!(
                    "the 6j written as its projection sum (edmonds1957 section 6.2), then {}; from memory",
                    rules.join(", ")
                ));
                return Some(Proposal {
                    rule: "graphical-route".into(),
                    source,
                    next: replace_term(cur, i, &sub.result),
                    local: Some((before, sub.result)),
                });
            }
        }
    }
    None
}

/// Simplifies an expression with the catalog's rules, verifying each step,
/// and passes the result through the verification gate against the input.
pub fn simplify(input: &Expr, opts: &Options) -> Result<Outcome, SimplifyError> {
    crate::tensor::with_implied_integers(&[input], || simplify_declared(input, opts, true))
}

/// `simplify` without the final gate: every step is verified, but the
/// result is not compared with the input as a whole (the certificate says
/// `compared: false`). Only for a caller that passes the result it keeps
/// through the gate itself against the definition of what it was asked
/// (`recouple`, which compares the result with the overlap's definition);
/// nothing else may print such a result.
pub(crate) fn simplify_before_gate(input: &Expr, opts: &Options) -> Result<Outcome, SimplifyError> {
    crate::tensor::with_implied_integers(&[input], || simplify_declared(input, opts, false))
}

fn simplify_declared(input: &Expr, opts: &Options, gated: bool) -> Result<Outcome, SimplifyError> {
    check_size(input)?;
    // free projections are admissible: j - m is an integer for the input's
    // free columns, even after the symbols that showed it are gone
    let mut d = Driver {
        opts,
        facts: free_projection_facts(input),
        cur: input.clone(),
        steps: Vec::new(),
    };
    let nf = d.tidy(&d.cur);
    if nf != d.cur {
        d.advance(Proposal {
            rule: "normal-form".into(),
            source: normal_form_source(),
            next: nf,
            local: None,
        })?;
    }
    let rules: Vec<&Rule> = opts
        .extra_rules
        .iter()
        .chain(catalog().iter())
        .filter(|r| matches!(r.kind, RuleKind::Special | RuleKind::ClosedForm))
        .collect();
    let prepared: Vec<Prepared> = rules.iter().filter_map(|r| Prepared::new(r)).collect();
    let mut tried_graphical: std::collections::HashSet<Term> = std::collections::HashSet::new();
    while d.steps.len() < opts.max_steps {
        crate::limits::check_now();
        if let Some(step) = crate::tensor::next_rewrite(&d.cur) {
            let (rule, source, next) = step.map_err(|e| {
                if e.0.contains("beyond") {
                    SimplifyError::Limit(e.0)
                } else {
                    SimplifyError::Unsupported(e.0)
                }
            })?;
            d.advance(Proposal {
                rule,
                source,
                next,
                local: None,
            })?;
            continue;
        }
        if let Some(p) = next_proposal(&d.cur, opts, &prepared, &mut tried_graphical) {
            d.advance(p)?;
            continue;
        }
        break;
    }
    // triangle factors that change no value go, so like terms merge
    for _ in 0..16 {
        let Some((next, text)) = vacuous::drop_one(&d.cur, input) else {
            break;
        };
        if d.tidy(&next) == d.cur {
            break;
        }
        d.advance_within(
            Proposal {
                rule: "vacuous-triangle".into(),
                source: Source::default().noted(&format!(
                    "{text} fails only where the terms that carry it sum to zero (checked at each such value; common practice, no source)"
                )),
                next,
                local: None,
            },
            input,
        )?;
    }
    // where the user wrote Clebsch-Gordan coefficients and no 3j, the 3j
    // left with free projections read better as CGs again
    let wrote_cg = input
        .terms()
        .iter()
        .any(|t| t.factors().iter().any(|f| matches!(f, Factor::Cg(_))));
    let wrote_3j = input
        .terms()
        .iter()
        .any(|t| t.factors().iter().any(|f| matches!(f, Factor::ThreeJ(_))));
    if wrote_cg && !wrote_3j {
        if let Some(next) = crate::graph::reduce::with_3j_as_cg(&d.cur) {
            let r = crate::rules::rule("3j-to-cg");
            d.advance(Proposal {
                rule: r.name.clone(),
                source: r.source.clone(),
                next,
                local: None,
            })?;
        }
    }
    let mut notes: Vec<String> = Vec::new();
    for t in d.cur.terms() {
        for n in Graph::of_term(t).notes {
            if !notes.contains(&n) {
                notes.push(n);
            }
        }
        let kinds = t.kinds();
        let left: Vec<String> = t
            .bound()
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
    if let Some(last) = d.steps.last() {
        if last.after != d.cur {
            return Err(SimplifyError::Internal(
                "the trace's last step is not the result".into(),
            ));
        }
    }
    let certificate = if gated {
        gate(input, &d.cur, &opts.final_spot)?
    } else {
        Certificate {
            checked: 0,
            nonzero: 0,
            max_j: Q::from_integer(0),
            compared: false,
        }
    };
    if gated && !certificate.compared {
        notes.push(format!(
            "the input's sums are too large to evaluate within {FINAL_BUDGET} points even at values up to 1/2, so the result was not compared with the input as a whole; every step was verified on its own instance"
        ));
    }
    Ok(Outcome {
        input: input.clone(),
        result: d.cur,
        steps: d.steps,
        checked: certificate.checked,
        nonzero: certificate.nonzero,
        certificate,
        notes,
    })
}

/// Writes every symbol the left side of the definition `rule_name` (one
/// symbol with plain variables as arguments, such as `9j-as-6j-sum`)
/// matches as the rule's right side: through the catalog and the matcher
/// (summed variables of the rule renamed apart from every name in use),
/// one verified step per symbol.
pub fn expand_definition(d: &mut Derivation, rule_name: &str) -> Result<(), SimplifyError> {
    let rule = crate::rules::rule(rule_name);
    let pattern = crate::rules::matcher::Pattern::new(rule)
        .ok_or_else(|| SimplifyError::Internal(format!("{rule_name} is not a pattern")))?;
    let shape = &rule.lhs.terms()[0].factors()[0];
    let names: Vec<crate::expr::Name> = shape
        .lins()
        .iter()
        .map(|l| l.as_var().cloned())
        .collect::<Option<Vec<_>>>()
        .ok_or_else(|| {
            SimplifyError::Internal(format!("{rule_name} does not take plain arguments"))
        })?;
    let same_kind = |f: &Factor| std::mem::discriminant(f) == std::mem::discriminant(shape);
    let mut left = d
        .current()
        .terms()
        .iter()
        .map(|t| t.factors().iter().filter(|f| same_kind(f)).count())
        .sum::<usize>();
    while left > 0 {
        left -= 1;
        let cur = d.current().clone();
        let found = cur.terms().iter().enumerate().find_map(|(i, t)| {
            let f = t.factors().iter().find(|f| same_kind(f))?;
            let mut req = crate::algebra::unify::Subst::new();
            for (n, l) in names.iter().zip(f.lins()) {
                req.insert(pattern.var(n.as_str()), l.clone());
            }
            let (m, replacement) = pattern.apply_first(t, &req, false)?;
            Some((i, m, replacement))
        });
        let Some((i, m, replacement)) = found else {
            break;
        };
        let t = &cur.terms()[i];
        d.advance(Proposal {
            rule: rule.name.clone(),
            source: rule.source.clone(),
            next: replace_term(&cur, i, &replacement),
            local: Some(pattern.instance(t, &m)),
        })?;
    }
    Ok(())
}

/// Writes `out.result` in the arrangement for reading: each 6j and 9j in
/// the spelling whose entries follow the order in which `texts` name them
/// (`render::arrange`). The arranged result passes the gate against the
/// verified canonical one and is recorded as a last step; returns the
/// canonical form it replaced (`None` when nothing moved).
pub fn arrange_for_reading(
    out: &mut Outcome,
    texts: &[&str],
    opts: &Options,
) -> Result<Option<Expr>, SimplifyError> {
    let written = crate::render::arrange::Written::of_texts(texts);
    // term by term: the arrangement keeps every sum, so it is verified
    // summand by summand, through the gate on the whole when that fails
    let pieces: Vec<Term> = out
        .result
        .terms()
        .iter()
        .map(|t| crate::render::arrange::term_for_reading(t, &written))
        .collect();
    let arranged = Expr::from_terms(pieces.iter().cloned());
    if arranged == out.result {
        return Ok(None);
    }
    let s = &opts.final_spot;
    let summands = summandwise(out.result.terms().iter().zip(&pieces), |x, y| {
        let c = certify(x, y, s, FINAL_BUDGET).ok()?;
        c.compared.then_some((c.checked, c.nonzero))
    });
    let (checked, nonzero) = match summands {
        Some(counts) => counts,
        None => {
            let c = gate(&out.result, &arranged, s)?;
            (c.checked, c.nonzero)
        }
    };
    let source = Source::parse(
        "edmonds1957 sections 3.7, 6.2 and 6.4 -- the classical symmetries of the 3j, Clebsch-Gordan, 6j and 9j symbols, each symbol spelled the way the input writes it; from memory",
    )
    .map_err(|e| SimplifyError::Internal(e.to_string()))?;
    let canonical = std::mem::replace(&mut out.result, arranged.clone());
    out.steps.push(Step {
        rule: "arrangement-for-reading".into(),
        source,
        before: canonical.clone(),
        after: arranged,
        checked,
        nonzero,
    });
    Ok(Some(canonical))
}

/// The verification gate (see `verify::gate`) with the driver's budget,
/// its failures as simplification errors.
pub fn gate(
    reference: &Expr,
    result: &Expr,
    s: &SpotSettings,
) -> Result<Certificate, SimplifyError> {
    certify(reference, result, s, FINAL_BUDGET).map_err(|e| match e {
        GateError::NewVariables(_) => SimplifyError::Internal(e.to_string()),
        GateError::Mismatch {
            at,
            reference,
            result,
        } => SimplifyError::Unverified(Box::new(Unverified {
            rule: "the whole derivation".into(),
            rule_source: Source::default().noted("the composition of the steps above"),
            at,
            before: reference,
            after: result,
        })),
        GateError::Eval(e) => SimplifyError::Eval(e),
    })
}

/// The next rewrite: special values, graph steps for projection sums,
/// the catalog's sum identities, the graphical route, exact values.
fn next_proposal(
    cur: &Expr,
    opts: &Options,
    prepared: &[Prepared],
    tried_graphical: &mut std::collections::HashSet<Term>,
) -> Option<Proposal> {
    for p in prepared {
        for (i, t) in cur.terms().iter().enumerate() {
            let Some(replacement) = p.rewrite(t, opts.regge) else {
                continue;
            };
            let next = replace_term(cur, i, &replacement);
            if !sums_stay_bounded(&next) {
                continue;
            }
            return Some(Proposal {
                rule: p.rule.name.clone(),
                source: p.rule.source.clone(),
                next,
                local: None,
            });
        }
    }
    // inside the graphical route the sum identities go first (so the 6j
    // just written out is not recognised again before the interchange
    // read backwards can act); elsewhere the graph first
    if opts.backwards_interchange {
        if let Some(p) = momentum_sum_step(cur, opts) {
            return Some(p);
        }
    }
    // the graph reduction of projection sums
    for (i, t) in cur.terms().iter().enumerate() {
        if let Some(r) = next_step_skipping(t, opts.regge, &opts.skip_rules) {
            return Some(Proposal {
                rule: r.rule,
                source: r.source,
                next: replace_term(cur, i, &r.replacement),
                local: Some(r.instance),
            });
        }
    }
    // sums over angular momenta: the catalog's identities
    if let Some(p) = momentum_sum_step(cur, opts) {
        return Some(p);
    }
    // and, where none fits, the graphical route
    if opts.graphical {
        if let Some(p) = graphical_route(cur, opts, tried_graphical) {
            return Some(p);
        }
    }
    exact_values(cur).map(|next| Proposal {
        rule: "exact-value".into(),
        source: exact_value_source(),
        next,
        local: None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse;

    /// The graphical route on its own (without the catalog's sum
    /// identities) derives the standard sums.
    #[test]
    fn the_graphical_route_derives_orthogonality_and_the_plain_sum() {
        for (text, want) in [
            // 6j-orthogonality (Edmonds 6.2.9)
            (
                "sum(x: (2*x+1) (2*p+1) {a, b, x; c, d, p} {a, b, x; c, d, q})",
                "delta(p, q) tri(a, d, p) tri(b, c, p)",
            ),
            // 6j-sum-plain (Varshalovich et al. 1988, section 9.8, from memory)
            (
                "sum(x: (2*x+1) {a, b, x; a, b, c})",
                "(-1)^(2*a+2*b) tri(a, b, c)",
            ),
            // racah-sum-rule (Edmonds 6.2.10)
            (
                "sum(x: (-1)^(p+q+x) (2*x+1) {a, b, x; c, d, p} {a, b, x; d, c, q})",
                "{a, c, q; b, d, p}",
            ),
        ] {
            let e = parse(text).unwrap();
            let mut tried = std::collections::HashSet::new();
            // without the closed-form sum identities: only 3j-completeness
            // and the interchange read backwards remain
            let opts = Options {
                skip_rules: [
                    "6j-orthogonality",
                    "6j-orthogonality-crossed",
                    "racah-sum-rule",
                    "biedenharn-elliott",
                    "6j-sum-phase",
                    "6j-sum-plain",
                    "9j-orthogonality",
                    "9j-from-6j-sum",
                ]
                .iter()
                .map(|s| s.to_string())
                .collect(),
                ..Options::default()
            };
            let step = graphical_route(&e, &opts, &mut tried)
                .unwrap_or_else(|| panic!("no graphical route for {text}"));
            let next = step.next;
            assert_eq!(step.rule, "graphical-route");
            let said = step.source.text();
            assert!(
                !said.contains("orthogonality,") && !said.contains("racah"),
                "{said}"
            );
            assert_eq!(weight(&next).0, 0, "{text}: {next}");
            let rep = crate::verify::spot::compare(
                &next,
                &parse(want).unwrap(),
                &Options::default().step_spot,
            )
            .unwrap();
            assert!(rep.agrees(), "{text}: {next}");
        }
    }
}
