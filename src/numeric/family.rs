//! Whole families of symbols in floating point by the three-term
//! recursions of Schulten and Gordon (J. Math. Phys. 16, 1961 (1975)):
//! the 3j symbol over its first angular momentum with the others fixed,
//! and the 6j symbol over its first argument. Each family is computed
//! from both ends — forward from the lower end, backward from the upper
//! end, each run only into the classical region where it is stable —
//! matched by least squares at the turning point, normalised by the
//! orthogonality sum and signed by the phase convention (the treatment of
//! Luscombe and Luban, Phys. Rev. E 57, 7274 (1998), from memory). The
//! cost is O(1) per member. Arguments are doubled integers, like the rest
//! of `numeric`; a family is the first member's doubled value and the
//! values in steps of 1.

/// A family: values at `first`, `first + 2`, ... (doubled arguments).
#[derive(Clone, Debug, PartialEq)]
pub struct Family {
    /// doubled value of the first member's varying argument
    pub first: i64,
    /// the values, one per member
    pub values: Vec<f64>,
}

impl Family {
    fn empty() -> Family {
        Family {
            first: 0,
            values: Vec::new(),
        }
    }

    /// The doubled argument of member `i`.
    pub fn argument(&self, i: usize) -> i64 {
        self.first + 2 * i as i64
    }
}

/// Values beyond this are rescaled during a recursion run.
const HUGE: f64 = 1e150;

/// Solves a family from its recursion `a(i) f(i+1) + b(i) f(i) + c(i)
/// f(i-1) = 0` on indices `0..n` (`c(0)` = 0 and `a(n-1)` = 0 at the
/// ends), normalised so that `Σ w(i) f(i)^2 = 1`, the last member with the
/// sign `last_sign`. The forward run starts at the lower end and stops
/// once the magnitude stops growing (the classical region); the backward
/// run starts at the upper end and goes down to three members below
/// that; the two are matched by least squares on their overlap.
fn solve(
    n: usize,
    abc: impl Fn(usize) -> (f64, f64, f64),
    weight: impl Fn(usize) -> f64,
    last_sign: f64,
) -> Vec<f64> {
    if n == 0 {
        return Vec::new();
    }
    if n == 1 {
        return vec![last_sign / weight(0).sqrt()];
    }
    // forward: f(0) = 1, f(1) from the equation at 0
    let mut fw: Vec<f64> = Vec::new();
    let (a0, b0, _) = abc(0);
    if a0 != 0.0 {
        fw.push(1.0);
        fw.push(-b0 / a0);
        let mut i = 1;
        while i + 1 < n {
            let grown = fw[i].abs().max(fw[i - 1].abs());
            if i >= 2 && grown < fw[i - 2].abs().max(fw[i - 1].abs()) {
                break;
            }
            let (a, b, c) = abc(i);
            if a == 0.0 {
                break;
            }
            let next = -(b * fw[i] + c * fw[i - 1]) / a;
            fw.push(next);
            i += 1;
            if next.abs() > HUGE {
                fw.iter_mut().for_each(|v| *v /= HUGE);
            }
        }
    }
    // backward: g(n-1) = 1, g(n-2) from the equation at n-1, down to `low`
    let low = fw.len().saturating_sub(3);
    let mut g = vec![0.0; n];
    g[n - 1] = 1.0;
    let (_, bn, cn) = abc(n - 1);
    if n >= 2 {
        g[n - 2] = if cn == 0.0 { 0.0 } else { -bn / cn };
    }
    let mut i = n - 2;
    while i > low {
        let (a, b, c) = abc(i);
        g[i - 1] = if c == 0.0 {
            0.0
        } else {
            -(b * g[i] + a * g[i + 1]) / c
        };
        if g[i - 1].abs() > HUGE {
            g.iter_mut().for_each(|v| *v /= HUGE);
        }
        i -= 1;
    }
    let mut values = g;
    if !fw.is_empty() && fw.len() >= n {
        values.copy_from_slice(&fw[..n]);
    } else if !fw.is_empty() {
        let top = fw.len().min(n);
        let (mut num, mut den) = (0.0, 0.0);
        for k in low..top {
            num += fw[k] * values[k];
            den += values[k] * values[k];
        }
        if den > 0.0 && num != 0.0 {
            // express the backward run in the forward run's scale
            let scale = num / den;
            for v in values.iter_mut() {
                *v *= scale;
            }
            values[..top].copy_from_slice(&fw[..top]);
        } else if top == n {
            values.copy_from_slice(&fw[..n]);
        }
    }
    let norm: f64 = (0..n).map(|i| weight(i) * values[i] * values[i]).sum();
    let mut scale = 1.0 / norm.sqrt();
    if values[n - 1] * scale * last_sign < 0.0 {
        scale = -scale;
    }
    values.iter_mut().for_each(|v| *v *= scale);
    values
}

fn half(x: i64) -> f64 {
    x as f64 / 2.0
}

/// `(j1, j2, j3; m1, m2, m3)` for every allowed j1 (doubled arguments;
/// `m1 = -m2 - m3`).
pub fn three_j_over_j1(tj2: i64, tj3: i64, tm2: i64, tm3: i64) -> Family {
    let tm1 = -tm2 - tm3;
    if tm2.abs() > tj2 || tm3.abs() > tj3 || (tj2 - tm2) % 2 != 0 || (tj3 - tm3) % 2 != 0 {
        return Family::empty();
    }
    let lo = (tj2 - tj3).abs().max(tm1.abs());
    let hi = tj2 + tj3;
    if lo > hi {
        return Family::empty();
    }
    let n = ((hi - lo) / 2 + 1) as usize;
    let (j2, j3, m1, m2, m3) = (half(tj2), half(tj3), half(tm1), half(tm2), half(tm3));
    let j_of = |i: usize| half(lo) + i as f64;
    // A(j) = sqrt((j^2 - (j2-j3)^2)((j2+j3+1)^2 - j^2)(j^2 - m1^2))
    let big_a = |j: f64| {
        let v =
            (j * j - (j2 - j3) * (j2 - j3)) * ((j2 + j3 + 1.0).powi(2) - j * j) * (j * j - m1 * m1);
        v.max(0.0).sqrt()
    };
    let big_b = |j: f64| {
        -(2.0 * j + 1.0) * (j2 * (j2 + 1.0) * m1 - j3 * (j3 + 1.0) * m1 - j * (j + 1.0) * (m3 - m2))
    };
    // j A(j+1) f(j+1) + B(j) f(j) + (j+1) A(j) f(j-1) = 0, each A once
    let a_of: Vec<f64> = (0..=n).map(|i| big_a(j_of(i))).collect();
    let abc = |i: usize| {
        let j = j_of(i);
        let a = if i + 1 < n { j * a_of[i + 1] } else { 0.0 };
        let c = if i > 0 { (j + 1.0) * a_of[i] } else { 0.0 };
        (a, big_b(j), c)
    };
    let weight = |i: usize| 2.0 * j_of(i) + 1.0;
    // the stretched member j1 = j2 + j3 has the sign (-1)^(j2-j3-m1)
    let e = (tj2 - tj3 - tm1) / 2;
    let last_sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
    Family {
        first: lo,
        values: solve(n, abc, weight, last_sign),
    }
}

/// `{j1, j2, j3; l1, l2, l3}` for every allowed j1 (doubled arguments).
pub fn six_j_over_j1(tj2: i64, tj3: i64, tl1: i64, tl2: i64, tl3: i64) -> Family {
    let lo = (tj2 - tj3).abs().max((tl2 - tl3).abs());
    let hi = (tj2 + tj3).min(tl2 + tl3);
    // the other two triads must hold and every triad be integral
    let triad = |a: i64, b: i64, c: i64| (a + b + c) % 2 == 0 && c >= (a - b).abs() && c <= a + b;
    if lo > hi
        || (tj2 + tj3 + lo) % 2 != 0
        || (tl2 + tl3 + lo) % 2 != 0
        || !triad(tl1, tj2, tl3)
        || !triad(tl1, tl2, tj3)
    {
        return Family::empty();
    }
    let n = ((hi - lo) / 2 + 1) as usize;
    let (j2, j3, l1, l2, l3) = (half(tj2), half(tj3), half(tl1), half(tl2), half(tl3));
    let j_of = |i: usize| half(lo) + i as f64;
    let big_e = |j: f64| {
        let v = (j * j - (j2 - j3).powi(2))
            * ((j2 + j3 + 1.0).powi(2) - j * j)
            * (j * j - (l2 - l3).powi(2))
            * ((l2 + l3 + 1.0).powi(2) - j * j);
        v.max(0.0).sqrt()
    };
    let big_f = |j: f64| {
        let jj = j * (j + 1.0);
        let (a2, a3) = (j2 * (j2 + 1.0), j3 * (j3 + 1.0));
        let (b1, b2, b3) = (l1 * (l1 + 1.0), l2 * (l2 + 1.0), l3 * (l3 + 1.0));
        (2.0 * j + 1.0)
            * (jj * (-jj + a2 + a3 - 2.0 * b1) + b2 * (jj + a2 - a3) + b3 * (jj - a2 + a3))
    };
    // j E(j+1) f(j+1) + F(j) f(j) + (j+1) E(j) f(j-1) = 0, each E once
    let e_of: Vec<f64> = (0..=n).map(|i| big_e(j_of(i))).collect();
    let abc = |i: usize| {
        let j = j_of(i);
        let a = if i + 1 < n { j * e_of[i + 1] } else { 0.0 };
        let c = if i > 0 { (j + 1.0) * e_of[i] } else { 0.0 };
        (a, big_f(j), c)
    };
    let weight = |i: usize| (2.0 * j_of(i) + 1.0) * (2.0 * l1 + 1.0);
    // the last member has the sign (-1)^(j2+j3+l2+l3)
    let e = (tj2 + tj3 + tl2 + tl3) / 2;
    let last_sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
    Family {
        first: lo,
        values: solve(n, abc, weight, last_sign),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::numeric::float::{six_j_f64, three_j_f64};

    fn worst_3j(tj2: i64, tj3: i64, tm2: i64, tm3: i64) -> f64 {
        let f = three_j_over_j1(tj2, tj3, tm2, tm3);
        let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
        let mut worst = 0.0f64;
        for (i, v) in f.values.iter().enumerate() {
            let want = three_j_f64([f.argument(i), tj2, tj3], [-tm2 - tm3, tm2, tm3]);
            let err = (v - want).abs() / want.abs().max(biggest * 1e-6);
            worst = worst.max(err);
        }
        worst
    }

    #[test]
    fn three_j_families_match_single_values() {
        for (j2, j3, m2, m3) in [
            (2, 2, 0, 0),
            (1, 1, 1, -1),
            (4, 6, 2, -4),
            (21, 17, 3, -5),
            (40, 40, 0, 0),
            (100, 60, 20, -30),
            (201, 199, 11, -51),
            (0, 4, 0, 2),
        ] {
            let w = worst_3j(j2, j3, m2, m3);
            assert!(w < 1e-12, "({j2}, {j3}, {m2}, {m3}): {w}");
        }
    }

    #[test]
    fn six_j_families_match_single_values() {
        for (j2, j3, l1, l2, l3) in [
            (2, 2, 2, 2, 2),
            (3, 5, 4, 3, 5),
            (20, 24, 10, 22, 18),
            (101, 99, 40, 97, 103),
        ] {
            let f = six_j_over_j1(j2, j3, l1, l2, l3);
            assert!(!f.values.is_empty());
            let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            for (i, v) in f.values.iter().enumerate() {
                let want = six_j_f64([f.argument(i), j2, j3, l1, l2, l3]);
                let err = (v - want).abs() / want.abs().max(biggest * 1e-6);
                assert!(
                    err < 1e-12,
                    "{:?} at {}: {v} vs {want}",
                    (j2, j3, l1, l2, l3),
                    f.argument(i)
                );
            }
        }
    }
}
