//! What is wrong with a claim `LHS = RHS` that failed: a missing phase
//! `(-1)^(Σ c_i v_i + c_0)` (solved as a linear system over GF(2): first
//! the integrality conditions on the odd parts of the coefficients, then
//! the signs), a missing factor `K Π (2v_i+1)^(e_i/2)` (exponents fitted by
//! least squares on logarithms, then confirmed exactly), or two arguments
//! of one symbol swapped. Every repair is re-checked before it is offered.

use super::sample::Point;
use super::spot::{compare, compare_at, SpotReport, SpotSettings};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use crate::numeric::Surd;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, ToPrimitive};
use std::collections::BTreeMap;

/// A repair of a failed claim.
#[derive(Clone, Debug)]
pub struct Diagnosis {
    /// what was found, in words
    pub text: String,
    /// the corrected right side
    pub repaired: Expr,
    /// the re-check of `LHS = repaired`
    pub confirmed: SpotReport,
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

/// Multiplies every term of `e` by a term.
fn times(e: &Expr, t: &Term) -> Expr {
    let mut out = Expr::zero();
    for u in &e.terms {
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

/// Diagnoses a failed comparison (`report` holds every point's values).
pub fn diagnose(
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
    let zero_mismatch = report
        .values
        .iter()
        .any(|(_, a, b)| a.is_zero() != b.is_zero());
    if !zero_mismatch {
        let mut signs = Vec::new();
        let mut mags = Vec::new();
        let mut ok = true;
        for (p, a, b) in &report.values {
            if a.is_zero() {
                continue;
            }
            match ratio(a, b).and_then(|r| r.as_signed_square()) {
                Some((neg, sq)) => {
                    signs.push((p.clone(), neg));
                    mags.push((p.clone(), sq));
                }
                None => ok = false,
            }
        }
        if ok && !signs.is_empty() {
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
            let phase = fit_phase(&vars, &signs);
            if let (Some((k2, e)), Some(ph)) = (factor, phase) {
                let mut t = Term::one();
                let k = Surd::signed_sqrt(false, &k2).ok()?;
                t.set_scalar(&k);
                t.phase = ph.clone();
                for (i, v) in jvars.iter().enumerate() {
                    if e[i] != 0 {
                        let base = Lin::var(v.clone())
                            .scale(Q::from_integer(2))
                            .add_scaled(&Lin::int(1), Q::one());
                        t.factors.push(Factor::Power(base, Q::new(e[i], 2)));
                    }
                }
                let t = t.normalized();
                let repaired = crate::algebra::normal::canonical_expr(&times(rhs, &t), false);
                let what = describe(&t);
                if let Some(rep) = confirm(lhs, &repaired, s) {
                    return Some(Diagnosis {
                        text: format!("the left side is {what} times the right side"),
                        repaired,
                        confirmed: rep,
                    });
                }
            }
        }
    }
    // two arguments of one symbol swapped on the right
    let pts: Vec<Point> = report.values.iter().map(|(p, _, _)| p.clone()).collect();
    for (ti, t) in rhs.terms.iter().enumerate() {
        for (fi, f) in t.factors.iter().enumerate() {
            if !f.is_symbol() {
                continue;
            }
            let n = f.lins().len();
            for i in 0..n {
                for k in i + 1..n {
                    let swapped = swap_args(f, i, k);
                    if swapped == *f {
                        continue;
                    }
                    let mut alt = rhs.clone();
                    alt.terms[ti].factors[fi] = swapped.clone();
                    alt.terms[ti] = alt.terms[ti].clone().normalized();
                    let Ok(rep) = compare_at(lhs, &alt, &pts) else {
                        continue;
                    };
                    if rep.agrees() {
                        if let Some(conf) = confirm(lhs, &alt, s) {
                            return Some(Diagnosis {
                                text: format!(
                                    "the sides agree after swapping arguments {} and {} of {} on the right (giving {})",
                                    i + 1,
                                    k + 1,
                                    crate::syntax::print_factor(f),
                                    crate::syntax::print_factor(&swapped)
                                ),
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

fn swap_args(f: &Factor, i: usize, k: usize) -> Factor {
    let mut idx = 0;
    let mut vals: Vec<Lin> = f.lins().into_iter().cloned().collect();
    vals.swap(i, k);
    f.map_lins(&mut |_| {
        let v = vals[idx].clone();
        idx += 1;
        v
    })
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
