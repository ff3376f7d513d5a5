//! Exact 3j, Clebsch–Gordan, 6j and 9j values from the Racah single-sum
//! formulas (Edmonds 3.7.3 for the 3j, 6.3.7 for the 6j, 6.4.3 for the 9j as a
//! sum over 6j products; equation numbers from memory). Arguments are
//! *doubled* integers (`2j`, `2m`), so half-integers are exact. A symbol
//! whose arguments break a triangle rule, a projection range or an
//! integrality condition is exactly 0.

use super::racah::{canonical, six_j_formula, sum_raw, three_j_formula, RawValue};
use super::surd::Surd;
use num_bigint::BigInt;

/// True when `(a, b, c)` (doubled) satisfy the triangle rule and `a+b+c`
/// is an integer.
pub fn triangle2(a: i64, b: i64, c: i64) -> bool {
    a >= 0 && b >= 0 && c >= 0 && (a + b + c) % 2 == 0 && c <= a + b && c >= (a - b).abs()
}

/// True when the doubled projection `m` is allowed for the doubled `j`.
pub fn projection_ok2(j: i64, m: i64) -> bool {
    j >= 0 && m.abs() <= j && (j - m) % 2 == 0
}

/// The 3j symbol `(j1 j2 j3; m1 m2 m3)` as an unreduced raw value.
pub fn three_j_raw(tj: [i64; 3], tm: [i64; 3]) -> RawValue {
    match three_j_formula(tj, tm) {
        Some(f) => f.exact_raw(),
        None => RawValue::zero(),
    }
}

/// The 3j symbol `(j1 j2 j3; m1 m2 m3)`, doubled arguments.
pub fn three_j(tj: [i64; 3], tm: [i64; 3]) -> Surd {
    match three_j_formula(tj, tm) {
        None => Surd::zero(),
        Some(f) => f.exact_fast().unwrap_or_else(|| canonical(&f.exact_raw())),
    }
}

/// The Clebsch–Gordan coefficient `<j1 m1; j2 m2 | J M>`, doubled arguments
/// (cg-to-3j, Edmonds 3.7.3).
pub fn clebsch_gordan(tj1: i64, tm1: i64, tj2: i64, tm2: i64, tjj: i64, tmm: i64) -> Surd {
    let mut raw = three_j_raw([tj1, tj2, tjj], [tm1, tm2, -tmm]);
    if raw.is_zero() {
        return Surd::zero();
    }
    raw.e.add_integer((tjj + 1) as u64, 1);
    if ((tj1 - tj2 + tmm) / 2).rem_euclid(2) == 1 {
        raw.a = -raw.a;
    }
    canonical(&raw)
}

/// The 6j symbol `{j1 j2 j3; j4 j5 j6}` as an unreduced raw value.
pub fn six_j_raw(t: [i64; 6]) -> RawValue {
    match six_j_formula(t) {
        Some(f) => f.exact_raw(),
        None => RawValue::zero(),
    }
}

/// The 6j symbol `{j1 j2 j3; j4 j5 j6}`, doubled arguments.
pub fn six_j(t: [i64; 6]) -> Surd {
    match six_j_formula(t) {
        None => Surd::zero(),
        Some(f) => f.exact_fast().unwrap_or_else(|| canonical(&f.exact_raw())),
    }
}

/// The range of the doubled summation variable of 9j-as-6j-sum.
pub fn nine_j_x_range(t: &[i64; 9]) -> (i64, i64) {
    let [a, b, _c, d, _e, f, _g, h, i] = *t;
    let lo = (a - i).abs().max((b - f).abs()).max((d - h).abs());
    let hi = (a + i).min(b + f).min(d + h);
    (lo, hi)
}

/// True when every row and column triad of a 9j (doubled) is a triangle.
pub fn nine_j_triads_ok(t: &[i64; 9]) -> bool {
    let [a, b, c, d, e, f, g, h, i] = *t;
    [
        (a, b, c),
        (d, e, f),
        (g, h, i),
        (a, d, g),
        (b, e, h),
        (c, f, i),
    ]
    .iter()
    .all(|&(x, y, z)| triangle2(x, y, z))
}

/// The 9j symbol `{a b c; d e f; g h i}` (doubled), as the sum over x of
/// `(-1)^(2x) (2x+1) {a b c; f i x} {d e f; b x h} {g h i; x a d}`.
pub fn nine_j(t: [i64; 9]) -> Surd {
    if !nine_j_triads_ok(&t) {
        return Surd::zero();
    }
    let [a, b, c, d, e, f, g, h, i] = t;
    let (lo, hi) = nine_j_x_range(&t);
    let mut terms = Vec::new();
    let mut x = lo;
    while x <= hi {
        let s1 = six_j_raw([a, b, c, f, i, x]);
        if !s1.is_zero() {
            let s2 = six_j_raw([d, e, f, b, x, h]);
            if !s2.is_zero() {
                let s3 = six_j_raw([g, h, i, x, a, d]);
                if !s3.is_zero() {
                    let mut ex = s1.e.clone();
                    ex.add_exps(&s2.e, 1);
                    ex.add_exps(&s3.e, 1);
                    let mut prod = s1.a * s2.a * s3.a * BigInt::from(x + 1);
                    if x % 2 != 0 {
                        prod = -prod;
                    }
                    terms.push(RawValue { a: prod, e: ex });
                }
            }
        }
        x += 2;
    }
    sum_raw(&terms)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(v: &Surd) -> String {
        v.to_string()
    }

    #[test]
    fn small_clebsch_gordan_values_match_the_standard_table() {
        // IDENTITIES.md "Table values" (Condon–Shortley table, from memory).
        assert_eq!(s(&clebsch_gordan(1, 1, 1, -1, 2, 0)), "sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(1, 1, 1, -1, 0, 0)), "sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(2, 2, 2, -2, 4, 0)), "sqrt(1/6)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 4, 0)), "sqrt(2/3)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 0, 0)), "-sqrt(1/3)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 2, 0)), "0");
        assert_eq!(s(&clebsch_gordan(2, -2, 2, 2, 2, 0)), "-sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(2, 0, 1, 1, 1, 1)), "-sqrt(1/3)");
    }

    #[test]
    fn six_j_and_nine_j_small_values() {
        // {1 1 1; 1 1 1} = 1/6 (Edmonds Table 5 formulas, from memory).
        assert_eq!(s(&six_j([2, 2, 2, 2, 2, 2])), "1/6");
        // {1/2 1/2 1; 1/2 1/2 0} = 1/2 * ... via 6j-zero: (-1)^(a+b+c)/(hat a hat b)
        assert_eq!(s(&six_j([1, 1, 2, 1, 1, 0])), "1/2");
        // 9j with a zero: {1/2 1/2 1; 1/2 1/2 1; 1 1 0} from 9j-zero (Edmonds 6.4.14):
        // (-1)^(b+c+d+g) {a b c; e d g} / (hat c hat g) = {1/2 1/2 1; 1/2 1/2 1}/3
        let lhs = nine_j([1, 1, 2, 1, 1, 2, 2, 2, 0]);
        let six = six_j([1, 1, 2, 1, 1, 2]);
        let rhs = &six * &Surd::from_rational(num_rational::BigRational::new(1.into(), 3.into()));
        // phase (-1)^(b+c+d+g) = (-1)^(1/2+1+1/2+1) = -1
        assert_eq!(lhs, -rhs);
    }
}
