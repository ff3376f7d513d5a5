//! What is wrong with a claim `LHS = RHS` that failed: a missing phase
//! `(-1)^(Σ c_i v_i + c_0)` (solved as a linear system over GF(2): first
//! the integrality conditions on the odd parts of the coefficients, then
//! the signs), a missing factor `K Π (2v_i+1)^(e_i/2)` (exponents fitted by
//! least squares on logarithms, then confirmed exactly), or two arguments
//! of one symbol swapped, or a triangle factor `tri(a, b, c)` missing on
//! one side (the sides agree wherever the triad holds and one side vanishes
//! wherever it is broken). Every repair is re-checked before it is
//! offered.

use super::sample::{Point, Sampler, Triad};
use super::spot::{compare, compare_at, SpotReport, SpotSettings, SpotValue};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, TermParts, Q};
use crate::numeric::Surd;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive};
use std::collections::BTreeMap;

/// Which side of a claim a repair changes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Side {
    /// the left side
    Left,
    /// the right side
    Right,
}

/// What a diagnosis found missing or wrong, one kind per part of the
/// repair (a missing triangle factor may come with a phase, say).
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Finding {
    /// a factor `tri(a, b, c)` missing on one side
    MissingTriangle,
    /// a phase `(-1)^(...)` (an overall sign included)
    Phase,
    /// a constant or a product of hats `(2v+1)^(e/2)`
    Factor,
    /// two arguments of one symbol exchanged
    SwappedArguments,
}

/// The kinds of a phase-and-factor repair `t`: a phase when its phase is
/// not even, a factor when its coefficient, radical or factors are not 1.
fn term_findings(t: &Term) -> Vec<Finding> {
    let mut out = Vec::new();
    if !t.phase().is_zero() {
        out.push(Finding::Phase);
    }
    if !t.coef().abs().is_one() || !t.root().is_one() || !t.factors().is_empty() {
        out.push(Finding::Factor);
    }
    if *t.coef() < BigRational::from_integer(0.into()) && !out.contains(&Finding::Phase) {
        out.insert(0, Finding::Phase);
    }
    out
}

/// A repair of a failed claim.
#[derive(Clone, Debug)]
pub struct Diagnosis {
    /// what was found, in words
    pub text: String,
    /// what kinds of repair it made, in the order applied
    pub findings: Vec<Finding>,
    /// the side that was repaired
    pub side: Side,
    /// the corrected side (the right side unless `side` says otherwise)
    pub repaired: Expr,
    /// the re-check of the repaired claim
    pub confirmed: SpotReport,
}

/// The first triad of `triads` broken at `p` (the triangle rule fails:
/// a side longer than the other two together, or a half-integer sum).
pub fn broken_at<'a>(triads: &'a [Triad], p: &Point) -> Option<&'a Triad> {
    let get = |n: &Name| p.get(n).copied();
    triads.iter().find(|t| {
        let v: Vec<Option<Q>> = t.forms().iter().map(|l| l.eval(&get)).collect();
        let (Some(a), Some(b), Some(c)) = (v[0], v[1], v[2]) else {
            return false;
        };
        let ok = a + b >= c && a + c >= b && b + c >= a && (a + b + c).is_integer();
        !ok
    })
}

/// True when `t` is broken at `p`.
fn breaks(t: &Triad, p: &Point) -> bool {
    broken_at(std::slice::from_ref(t), p).is_some()
}

/// A missing triangle factor: every mismatch is at a point where some
/// triad is broken and one side (the same one each time) vanishes; the
/// triads chosen are those the vanishing side never survives being
/// broken at any point seen. The repaired side is multiplied by their
/// `tri(...)` and the claim re-checked.
fn missing_triangles(
    lhs: &Expr,
    rhs: &Expr,
    report: &SpotReport,
    s: &SpotSettings,
) -> Option<Diagnosis> {
    let sampler = Sampler::with_domain(&[lhs, rhs], false);
    let triads = sampler.triads();
    // the mismatches where exactly one side vanishes (or is undefined:
    // a closed form off its triangle rules)
    let zero = SpotValue::Number(Surd::zero());
    let mut bad: Vec<(Point, SpotValue, SpotValue)> = report
        .values
        .iter()
        .filter(|(_, a, b)| a != b && (a.is_zero() || b.is_zero()))
        .map(|(p, a, b)| {
            (
                p.clone(),
                SpotValue::Number(a.clone()),
                SpotValue::Number(b.clone()),
            )
        })
        .collect();
    for m in &report.mismatches {
        let undefined = m.lhs.number().is_none() || m.rhs.number().is_none();
        if undefined && (m.lhs == zero || m.rhs == zero) {
            bad.push((m.at.clone(), m.lhs.clone(), m.rhs.clone()));
        }
    }
    if triads.is_empty() || bad.is_empty() {
        return None;
    }
    for side in [Side::Right, Side::Left] {
        // the side that vanishes at the mismatches implies the triads
        let vanishes = |a: &SpotValue, b: &SpotValue| match side {
            Side::Right => *a == zero,
            Side::Left => *b == zero,
        };
        let zero_side = |a: &Surd, b: &Surd| match side {
            Side::Right => a.clone(),
            Side::Left => b.clone(),
        };
        if !bad.iter().all(|(_, a, b)| vanishes(a, b)) {
            continue;
        }
        // triads the vanishing side implies, as far as the points show
        let implied: Vec<&Triad> = triads
            .iter()
            .filter(|t| {
                report
                    .values
                    .iter()
                    .filter(|(p, _, _)| breaks(t, p))
                    .all(|(_, a, b)| zero_side(a, b).is_zero())
            })
            .collect();
        let mut chosen: Vec<&Triad> = Vec::new();
        let mut covered = true;
        for (p, _, _) in &bad {
            if chosen.iter().any(|t| breaks(t, p)) {
                continue;
            }
            match implied.iter().find(|t| breaks(t, p)) {
                Some(t) => chosen.push(t),
                None => {
                    covered = false;
                    break;
                }
            }
        }
        if !covered || chosen.is_empty() {
            continue;
        }
        let mut factor = TermParts::default();
        for t in &chosen {
            factor.factors.push(Factor::Tri(t.forms().clone()));
        }
        let factor = factor.normalized();
        let (new_lhs, new_rhs) = match side {
            Side::Right => (lhs.clone(), times(rhs, &factor)),
            Side::Left => (times(lhs, &factor), rhs.clone()),
        };
        let names: Vec<String> = chosen.iter().map(|t| t.text()).collect();
        let tris: Vec<String> = chosen.iter().map(|t| format!("tri{}", t.text())).collect();
        let which = match side {
            Side::Right => "right",
            Side::Left => "left",
        };
        let text = format!(
            "equal wherever {} satisfy the triangle rule; the {which} side lacks {}",
            names.join(" and "),
            tris.join(" ")
        );
        let repaired = match side {
            Side::Right => new_rhs.clone(),
            Side::Left => new_lhs.clone(),
        };
        if let Some(rep) = confirm(&new_lhs, &new_rhs, s) {
            return Some(Diagnosis {
                text,
                findings: vec![Finding::MissingTriangle],
                side,
                repaired,
                confirmed: rep,
            });
        }
        // a triangle factor and something else: diagnose the rest
        let rest = compare(&new_lhs, &new_rhs, s).ok()?;
        let more = diagnose_values(&new_lhs, &new_rhs, &rest, s)?;
        let (l2, r2) = match more.side {
            Side::Right => (new_lhs.clone(), more.repaired.clone()),
            Side::Left => (more.repaired.clone(), new_rhs.clone()),
        };
        if more.side != side {
            return None;
        }
        let mut findings = vec![Finding::MissingTriangle];
        findings.extend(more.findings.iter().copied());
        return Some(Diagnosis {
            text: format!("{text}; then {}", more.text),
            findings,
            side,
            repaired: match side {
                Side::Right => r2,
                Side::Left => l2,
            },
            confirmed: more.confirmed,
        });
    }
    None
}

/// `lhs / rhs` for single-radical values.
fn ratio(a: &Surd, b: &Surd) -> Option<Surd> {
    if a.terms().count() != 1 || b.terms().count() != 1 {
        return None;
    }
    Some(a * &b.recip()?)
}

/// Solves `A x = y` over GF(2); `None` if inconsistent. Free variables 0.
fn solve_gf2(rows: &[Vec<u8>], rhs: &[u8], n: usize) -> Option<Vec<u8>> {
    let mut m: Vec<(Vec<u8>, u8)> = rows.iter().cloned().zip(rhs.iter().cloned()).collect();
    let mut pivots = Vec::new();
    let mut r = 0;
    for c in 0..n {
        let Some(p) = (r..m.len()).find(|&i| m[i].0[c] == 1) else {
            continue;
        };
        m.swap(r, p);
        let pr = m[r].clone();
        for i in 0..m.len() {
            if i != r && m[i].0[c] == 1 {
                for k in 0..n {
                    m[i].0[k] ^= pr.0[k];
                }
                m[i].1 ^= pr.1;
            }
        }
        pivots.push((r, c));
        r += 1;
    }
    if m[r..].iter().any(|(_, y)| *y == 1) {
        return None;
    }
    let mut x = vec![0u8; n];
    for (row, col) in pivots {
        x[col] = m[row].1;
    }
    Some(x)
}

/// A basis of the null space of `A` over GF(2).
fn nullspace_gf2(rows: &[Vec<u8>], n: usize) -> Vec<Vec<u8>> {
    let mut m: Vec<Vec<u8>> = rows.to_vec();
    let mut pivot_cols = Vec::new();
    let mut r = 0;
    for c in 0..n {
        let Some(p) = (r..m.len()).find(|&i| m[i][c] == 1) else {
            continue;
        };
        m.swap(r, p);
        let pr = m[r].clone();
        for i in 0..m.len() {
            if i != r && m[i][c] == 1 {
                for k in 0..n {
                    m[i][k] ^= pr[k];
                }
            }
        }
        pivot_cols.push(c);
        r += 1;
    }
    let mut basis = Vec::new();
    for f in (0..n).filter(|c| !pivot_cols.contains(c)) {
        let mut v = vec![0u8; n];
        v[f] = 1;
        for (i, &pc) in pivot_cols.iter().enumerate() {
            if m[i][f] == 1 {
                v[pc] = 1;
            }
        }
        basis.push(v);
    }
    basis
}

/// The phase exponent that turns `rhs` into `lhs` at every point, if one
/// of the form `Σ c_i v_i + c_0` exists.
fn fit_phase(vars: &[Name], pts: &[(Point, bool)]) -> Option<Lin> {
    let n = vars.len();
    let t: Vec<Vec<i64>> = pts
        .iter()
        .map(|(p, _)| {
            vars.iter()
                .map(|v| (p[v] * Q::from_integer(2)).to_integer())
                .collect()
        })
        .collect();
    let parity: Vec<Vec<u8>> = t
        .iter()
        .map(|r| r.iter().map(|x| x.rem_euclid(2) as u8).collect())
        .collect();
    let basis = nullspace_gf2(&parity, n);
    if basis.len() > 12 {
        return None;
    }
    // a in span(basis), fewest nonzero first
    let mut combos: Vec<Vec<u8>> = (0u32..(1 << basis.len()))
        .map(|mask| {
            let mut a = vec![0u8; n];
            for (k, b) in basis.iter().enumerate() {
                if mask >> k & 1 == 1 {
                    for i in 0..n {
                        a[i] ^= b[i];
                    }
                }
            }
            a
        })
        .collect();
    combos.sort_by_key(|a| a.iter().filter(|x| **x == 1).count());
    for a in combos {
        // h_p = (Σ a_i t_i / 2) mod 2; solve Σ b_i t_i + c0 = s_p + h_p (mod 2)
        let mut rows = Vec::new();
        let mut rhs = Vec::new();
        for (k, (_, neg)) in pts.iter().enumerate() {
            let s: i64 = (0..n).map(|i| a[i] as i64 * t[k][i]).sum();
            let h = (s / 2).rem_euclid(2) as u8;
            let mut row: Vec<u8> = parity[k].clone();
            row.push(1);
            rows.push(row);
            rhs.push((*neg as u8) ^ h);
        }
        if let Some(x) = solve_gf2(&rows, &rhs, n + 1) {
            let mut e = Lin::constant(Q::from_integer(x[n] as i64));
            for i in 0..n {
                let c = a[i] as i64 + 2 * x[i] as i64;
                let c = if c == 3 { -1 } else { c };
                if c != 0 {
                    e = e.add_scaled(&Lin::var(vars[i].clone()), Q::from_integer(c));
                }
            }
            return Some(e);
        }
    }
    None
}

fn rational_f64_log(q: &BigRational) -> f64 {
    let (nm, ne) = crate::numeric::surd::biguint_to_mantissa_exp(q.numer().magnitude());
    let (dm, de) = crate::numeric::surd::biguint_to_mantissa_exp(q.denom().magnitude());
    (nm.ln() - dm.ln()) + (ne - de) as f64 * std::f64::consts::LN_2
}

/// Least squares for the exponents `e_i` (of `(2v_i+1)` in the squared
/// ratio), rounded, then confirmed exactly. Returns `(K^2, e)`.
fn fit_factor(vars: &[Name], pts: &[(Point, BigRational)]) -> Option<(BigRational, Vec<i64>)> {
    let n = vars.len();
    if pts.len() < 2 {
        return None;
    }
    let logs: Vec<f64> = pts.iter().map(|(_, r)| rational_f64_log(r)).collect();
    let xs: Vec<Vec<f64>> = pts
        .iter()
        .map(|(p, _)| {
            let mut row: Vec<f64> = vars
                .iter()
                .map(|v| (2.0 * p[v].to_f64().unwrap() + 1.0).ln())
                .collect();
            row.push(1.0);
            row
        })
        .collect();
    // normal equations (n+1)x(n+1)
    let m = n + 1;
    let mut a = vec![vec![0.0f64; m + 1]; m];
    for (row, y) in xs.iter().zip(&logs) {
        for i in 0..m {
            for k in 0..m {
                a[i][k] += row[i] * row[k];
            }
            a[i][m] += row[i] * y;
        }
    }
    // ridge-free Gaussian elimination with partial pivoting
    for c in 0..m {
        let p = (c..m).max_by(|&i, &k| a[i][c].abs().partial_cmp(&a[k][c].abs()).unwrap())?;
        if a[p][c].abs() < 1e-9 {
            // a variable that does not vary: its exponent is not identifiable
            a[c][c] = 1.0;
            for k in 0..=m {
                if k != c {
                    a[c][k] = 0.0;
                }
            }
            continue;
        }
        a.swap(c, p);
        for i in 0..m {
            if i != c {
                let f = a[i][c] / a[c][c];
                for k in c..=m {
                    a[i][k] -= f * a[c][k];
                }
            }
        }
    }
    let e: Vec<i64> = (0..n).map(|i| (a[i][m] / a[i][i]).round() as i64).collect();
    if e.iter().any(|x| x.abs() > 6) {
        return None;
    }
    // exact: r_p / Π (2v+1)^e_i must be one constant
    let mut k2: Option<BigRational> = None;
    for (p, r) in pts {
        let mut q = r.clone();
        for (i, v) in vars.iter().enumerate() {
            let base = BigRational::from_integer(BigInt::from(
                (p[v] * Q::from_integer(2) + Q::from_integer(1)).to_integer(),
            ));
            for _ in 0..e[i].abs() {
                if e[i] > 0 {
                    q /= &base;
                } else {
                    q *= &base;
                }
            }
        }
        match &k2 {
            None => k2 = Some(q),
            Some(k) if *k != q => return None,
            _ => {}
        }
    }
    Some((k2?, e))
}

/// The outcome of fitting a phase and a factor.
enum Fit {
    /// a candidate `(-1)^(...) K Π (2v+1)^(e/2)` that explains every point
    Found(Term),
    /// none fits these points (more points may find one)
    NotFound,
    /// no phase and factor can explain them (a zero against a nonzero)
    Impossible,
}

/// Fits `lhs/rhs` at every nonzero point as a phase times a factor.
fn phase_and_factor(
    vars: &[Name],
    kinds: &BTreeMap<Name, Kind>,
    values: &[(Point, Surd, Surd)],
) -> Fit {
    if values.iter().any(|(_, a, b)| a.is_zero() != b.is_zero()) {
        return Fit::Impossible;
    }
    let mut signs = Vec::new();
    let mut mags = Vec::new();
    for (p, a, b) in values {
        if a.is_zero() {
            continue;
        }
        match ratio(a, b).and_then(|r| r.as_signed_square()) {
            Some((neg, sq)) => {
                signs.push((p.clone(), neg));
                mags.push((p.clone(), sq));
            }
            None => return Fit::Impossible,
        }
    }
    if signs.is_empty() {
        return Fit::NotFound;
    }
    let all_unit = mags.iter().all(|(_, m)| m.is_one());
    let jvars: Vec<Name> = vars
        .iter()
        .filter(|v| kinds[*v] == Kind::AngularMomentum)
        .cloned()
        .collect();
    let factor = if all_unit {
        Some((BigRational::one(), vec![0; jvars.len()]))
    } else {
        fit_factor(&jvars, &mags)
    };
    let phase = fit_phase(vars, &signs);
    let (Some((k2, e)), Some(ph)) = (factor, phase) else {
        return Fit::NotFound;
    };
    let Ok(k) = Surd::signed_sqrt(false, &k2) else {
        return Fit::NotFound;
    };
    let Some(t) = Term::constant(&k) else {
        return Fit::NotFound;
    };
    let mut t = t.into_parts();
    t.phase = ph;
    for (i, v) in jvars.iter().enumerate() {
        if e[i] != 0 {
            let base = Lin::var(v.clone())
                .scale(Q::from_integer(2))
                .add_scaled(&Lin::int(1), Q::one());
            t.factors.push(Factor::Power(base, Q::new(e[i], 2)));
        }
    }
    Fit::Found(t.normalized())
}

/// Multiplies every term of `e` by a term.
fn times(e: &Expr, t: &Term) -> Expr {
    let mut out = Expr::zero();
    for u in e.terms() {
        out.push(u.mul(t));
    }
    out
}

fn confirm(lhs: &Expr, repaired: &Expr, s: &SpotSettings) -> Option<SpotReport> {
    let again = SpotSettings {
        seed: s.seed.wrapping_add(1000),
        ..s.clone()
    };
    let rep = compare(lhs, repaired, &again).ok()?;
    rep.agrees().then_some(rep)
}

/// Diagnoses a failed comparison (`report` holds the points' values): a
/// missing triangle factor first, then a phase and factor, then swapped
/// arguments.
pub fn diagnose(
    lhs: &Expr,
    rhs: &Expr,
    report: &SpotReport,
    s: &SpotSettings,
) -> Option<Diagnosis> {
    missing_triangles(lhs, rhs, report, s).or_else(|| diagnose_values(lhs, rhs, report, s))
}

/// The phase, factor and swapped-argument diagnoses.
fn diagnose_values(
    lhs: &Expr,
    rhs: &Expr,
    report: &SpotReport,
    s: &SpotSettings,
) -> Option<Diagnosis> {
    let mut kinds: BTreeMap<Name, Kind> = lhs.kinds();
    for (v, k) in rhs.kinds() {
        let e = kinds.entry(v).or_insert(k);
        if k < *e {
            *e = k;
        }
    }
    let vars: Vec<Name> = kinds.keys().cloned().collect();
    // a phase and a factor: fitted on the points seen, and when the fit
    // fails its re-check, refitted with more points (a few rounds)
    let mut values = report.values.clone();
    for round in 0..3u64 {
        match phase_and_factor(&vars, &kinds, &values) {
            Fit::Found(t) => {
                let repaired = crate::algebra::normal::canonical_expr(&times(rhs, &t), false);
                if let Some(rep) = confirm(lhs, &repaired, s) {
                    return Some(Diagnosis {
                        findings: term_findings(&t),
                        text: format!("the left side is {} times the right side", describe(&t)),
                        side: Side::Right,
                        repaired,
                        confirmed: rep,
                    });
                }
            }
            Fit::Impossible => break,
            Fit::NotFound => {}
        }
        if s.exhaustive {
            break;
        }
        let more = SpotSettings {
            seed: s.seed.wrapping_add(7919 * (round + 1)),
            samples: s.samples * 2,
            ..s.clone()
        };
        let Ok(rep) = compare(lhs, rhs, &more) else {
            break;
        };
        values.extend(rep.values);
    }
    // two arguments of one symbol swapped on the right
    let pts: Vec<Point> = report.values.iter().map(|(p, _, _)| p.clone()).collect();
    for (ti, t) in rhs.terms().iter().enumerate() {
        for (fi, f) in t.factors().iter().enumerate() {
            if !f.is_symbol() {
                continue;
            }
            let n = f.lins().len();
            for i in 0..n {
                for k in i + 1..n {
                    let swapped = f.with_args_swapped(i, k);
                    if swapped == *f {
                        continue;
                    }
                    let alt = rhs.with_term_edited(ti, |p| p.factors[fi] = swapped.clone());
                    let Ok(rep) = compare_at(lhs, &alt, &pts) else {
                        continue;
                    };
                    if rep.agrees() {
                        if let Some(conf) = confirm(lhs, &alt, s) {
                            return Some(Diagnosis {
                                findings: vec![Finding::SwappedArguments],
                                text: format!(
                                    "the sides agree after swapping arguments {} and {} of {} on the right (giving {})",
                                    i + 1,
                                    k + 1,
                                    crate::syntax::print_factor(f),
                                    crate::syntax::print_factor(&swapped)
                                ),
                                side: Side::Right,
                                repaired: alt,
                                confirmed: conf,
                            });
                        }
                    }
                }
            }
        }
    }
    None
}

/// Words for a repair factor: "(-1)^(a+b)", "hat(j)^2/2", ...
fn describe(t: &Term) -> String {
    let s = Expr::from_term(t.clone()).to_string();
    if s == "1" {
        "1".into()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn gf2_solver_and_null_space() {
        let rows = vec![vec![1, 1, 0], vec![0, 1, 1]];
        let x = solve_gf2(&rows, &[1, 0], 3).unwrap();
        assert_eq!((x[0] ^ x[1], x[1] ^ x[2]), (1, 0));
        let ns = nullspace_gf2(&rows, 3);
        assert_eq!(ns, vec![vec![1, 1, 1]]);
    }
}
