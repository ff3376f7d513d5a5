//! The mutation audit: false claims made from the identity list (sources
//! in tests/data/identities.txt) by adding a phase `(-1)^(2v)` or
//! `(-1)^v`, a factor `(2v+1)`, swapping two arguments of a symbol, or
//! dropping a `tri(...)`. Each mutant is kept only when the test itself
//! finds a witness of its falsity: a point with every value in {0, 1/2,
//! 1} (projections in {-1, ..., 1}) where both sides are admissible and
//! differ, found by plain enumeration and direct evaluation, independent
//! of recoup's sampler and checker. Every kept mutant must be "different"
//! for `check` in random mode and in exhaustive mode at two largest values
//! (1 and 3/2, both of which contain the witness).

mod common;

use recoup::evaluate::{check_assignment, Assignment, Evaluator};
use recoup::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use recoup::numeric::Surd;
use recoup::syntax::parse;
use recoup::verify::check::{check, Verdict};
use recoup::verify::spot::SpotSettings;
use std::collections::BTreeMap;

/// Most free variables an identity may have to join the audit (the
/// exhaustive checks visit 4^n points).
const MAX_VARS: usize = 7;
/// Most mutants kept per identity.
const PER_IDENTITY: usize = 16;

struct Mutant {
    what: String,
    lhs: Expr,
    rhs: Expr,
    witness: Assignment,
}

/// Every point of the small grid where both sides are admissible, with
/// the left side's value there.
fn grid(lhs: &Expr, rhs: &Expr) -> Vec<(Assignment, Surd)> {
    let mut kinds: BTreeMap<Name, Kind> = lhs.kinds();
    for (v, k) in rhs.kinds() {
        let e = kinds.entry(v).or_insert(k);
        if k < *e {
            *e = k;
        }
    }
    let vars: Vec<(Name, Kind)> = kinds.into_iter().collect();
    let ev = Evaluator::<Surd>::new();
    let mut out = Vec::new();
    let mut at = Assignment::new();
    fn walk(i: usize, vars: &[(Name, Kind)], at: &mut Assignment, f: &mut dyn FnMut(&Assignment)) {
        if i == vars.len() {
            f(at);
            return;
        }
        let vals: Vec<Q> = match vars[i].1 {
            Kind::Projection => (-2..=2).map(|k| Q::new(k, 2)).collect(),
            _ => (0..=2).map(|k| Q::new(k, 2)).collect(),
        };
        for v in vals {
            at.insert(vars[i].0.clone(), v);
            walk(i + 1, vars, at, f);
        }
        at.remove(&vars[i].0);
    }
    walk(0, &vars, &mut at, &mut |p| {
        if check_assignment(lhs, p).is_err() || check_assignment(rhs, p).is_err() {
            return;
        }
        if let (Ok(a), Ok(_)) = (ev.eval(lhs, p), ev.eval(rhs, p)) {
            out.push((p.clone(), a));
        }
    });
    out
}

/// A point of the grid (admissible for the unmutated side, whose value it
/// holds) where `mutated` is admissible too, evaluates, and differs.
fn witness(mutated: &Expr, pts: &[(Assignment, Surd)]) -> Option<Assignment> {
    let ev = Evaluator::<Surd>::new();
    pts.iter()
        .find(|(p, a)| {
            check_assignment(mutated, p).is_ok() && ev.eval(mutated, p).is_ok_and(|b| b != *a)
        })
        .map(|(p, _)| p.clone())
}

fn times(e: &Expr, t: &Term) -> Expr {
    let mut out = Expr::zero();
    for u in e.terms() {
        out.push(u.mul(t));
    }
    out
}

/// The candidate mutations of a right side (before witnesses are sought).
fn candidates(lhs: &Expr, rhs: &Expr) -> Vec<(String, Expr)> {
    let mut out = Vec::new();
    let mut kinds = lhs.kinds();
    kinds.extend(rhs.kinds());
    for (v, k) in &kinds {
        let lv = Lin::var(v.clone());
        out.push((
            format!("phase (-1)^(2*{v})"),
            times(rhs, &Term::minus_one_to(lv.scale(Q::from_integer(2)))),
        ));
        out.push((
            format!("phase (-1)^({v})"),
            times(rhs, &Term::minus_one_to(lv.clone())),
        ));
        if *k == Kind::AngularMomentum {
            let base = lv
                .scale(Q::from_integer(2))
                .add_scaled(&Lin::int(1), Q::from_integer(1));
            out.push((
                format!("factor (2*{v}+1)"),
                times(rhs, &Term::factor(Factor::Power(base, Q::from_integer(1)))),
            ));
        }
    }
    // swaps and dropped triangle factors, on the right side (or the left
    // when the right has no symbol)
    let (side_is_rhs, side) = if rhs
        .terms()
        .iter()
        .any(|t| t.factors().iter().any(Factor::is_symbol))
    {
        (true, rhs)
    } else {
        (false, lhs)
    };
    for (ti, t) in side.terms().iter().enumerate() {
        for (fi, f) in t.factors().iter().enumerate() {
            let n = f.lins().len();
            if f.is_symbol() {
                for i in 0..n {
                    for k in i + 1..n {
                        let g = f.with_args_swapped(i, k);
                        if g == *f {
                            continue;
                        }
                        let alt = side.with_term_edited(ti, |p| p.factors[fi] = g.clone());
                        out.push((
                            format!(
                                "swap {} and {} of {}",
                                i + 1,
                                k + 1,
                                recoup::syntax::print_factor(f)
                            ),
                            alt,
                        ));
                    }
                }
            }
        }
    }
    // a mutated left side is compared with the right side as the claim
    if !side_is_rhs {
        out = out
            .into_iter()
            .map(|(w, e)| {
                if w.starts_with("swap") {
                    (format!("{w} (left side)"), e)
                } else {
                    (w, e)
                }
            })
            .collect();
    }
    // a triangle factor of the right side dropped
    for (ti, t) in rhs.terms().iter().enumerate() {
        for (fi, f) in t.factors().iter().enumerate() {
            if matches!(f, Factor::Tri(_)) {
                let alt = rhs.with_term_edited(ti, |p| {
                    p.factors.remove(fi);
                });
                out.push((format!("drop {}", recoup::syntax::print_factor(f)), alt));
            }
        }
    }
    out
}

fn mutants() -> Vec<Mutant> {
    let mut out = Vec::new();
    for b in common::blocks(include_str!("data/identities.txt")) {
        let lhs = parse(&b.lhs).unwrap();
        let rhs = parse(&b.rhs).unwrap();
        let mut vars = lhs.free_vars();
        vars.extend(rhs.free_vars());
        if vars.len() > MAX_VARS {
            continue;
        }
        let pts = grid(&lhs, &rhs);
        let mut kept = 0;
        // the kinds interleaved, so each identity gives mutants of every kind
        let mut by_kind: BTreeMap<String, Vec<(String, Expr)>> = BTreeMap::new();
        for (what, m) in candidates(&lhs, &rhs) {
            let kind: String = what.chars().take(9).collect();
            by_kind.entry(kind).or_default().push((what, m));
        }
        let longest = by_kind.values().map(Vec::len).max().unwrap_or(0);
        let order: Vec<(String, Expr)> = (0..longest)
            .flat_map(|i| by_kind.values().filter_map(move |v| v.get(i).cloned()))
            .collect();
        for (what, m) in order {
            if kept >= PER_IDENTITY {
                break;
            }
            let left_mutated = what.ends_with("(left side)");
            let (l, r) = if left_mutated {
                (m.clone(), rhs.clone())
            } else {
                (lhs.clone(), m.clone())
            };
            let found = if left_mutated {
                witness(&m, &grid(&rhs, &m))
            } else {
                witness(&m, &pts)
            };
            if let Some(w) = found {
                out.push(Mutant {
                    what: format!("{}: {what}", b.name),
                    lhs: l,
                    rhs: r,
                    witness: w,
                });
                kept += 1;
            }
        }
    }
    out
}

fn verdict_is_different(m: &Mutant, s: &SpotSettings) -> Result<(), String> {
    let r = check(&m.lhs, &m.rhs, s).map_err(|e| format!("{}: {e}", m.what))?;
    match r.verdict {
        Verdict::Different { .. } => Ok(()),
        other => Err(format!(
            "{} ({} = {}, witness {:?}): {:?} at {} points, exhaustive {}, max j {}",
            m.what,
            m.lhs,
            m.rhs,
            m.witness,
            matches!(other, Verdict::Equal),
            r.checked,
            s.exhaustive,
            s.max_j
        )),
    }
}

#[test]
fn every_mutated_identity_is_found_different() {
    let all = mutants();
    let kinds = ["phase (-1)^(2*", "phase (-1)^(", "factor", "swap", "drop"];
    let count = |k: &str| {
        all.iter()
            .filter(|m| m.what.contains(&format!(": {k}")))
            .count()
    };
    eprintln!(
        "mutation audit: {} false claims ({} phase 2v, {} phase v, {} factor, {} swap, {} dropped tri)",
        all.len(),
        count(kinds[0]),
        count(kinds[1]) - count(kinds[0]),
        count(kinds[2]),
        count(kinds[3]),
        count(kinds[4])
    );
    assert!(
        all.len() >= 300,
        "only {} mutants with a witness",
        all.len()
    );
    for k in kinds {
        assert!(count(k) > 0, "no mutant of kind {k}");
    }
    let random = SpotSettings::default();
    let exhaustive: Vec<SpotSettings> = [Q::from_integer(1), Q::new(3, 2)]
        .into_iter()
        .map(|max_j| SpotSettings {
            max_j,
            exhaustive: true,
            ..SpotSettings::default()
        })
        .collect();
    let mut failures = Vec::new();
    for m in &all {
        for s in std::iter::once(&random).chain(&exhaustive) {
            if let Err(f) = verdict_is_different(m, s) {
                failures.push(f);
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} of {} checks missed a false claim:\n{}",
        failures.len(),
        all.len() * 3,
        failures.join("\n")
    );
}
