//! Exact 3j, Clebsch–Gordan, 6j and 9j values from the Racah single-sum
//! formulas (Edmonds 3.7.3 for the 3j, 6.3.7 for the 6j, 6.4.3 for the 9j as a
//! sum over 6j products; equation numbers from memory). Arguments are
//! *doubled* integers (`2j`, `2m`), so half-integers are exact. A symbol
//! whose arguments break a triangle rule, a projection range or an
//! integrality condition is exactly 0.

use super::racah::{
    canonical, six_j_formula, sum_raw, three_j_formula, FastRaw, FastSum, RawValue, PRODUCT_LIMBS,
};
use super::surd::Surd;
use num_bigint::BigInt;

use super::selection::triangle2;

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
        Some(f) => f.exact(),
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
        Some(f) => f.exact(),
    }
}

/// The range of the doubled summation variable of 9j-as-6j-sum.
pub fn nine_j_x_range(t: &[i64; 9]) -> (i64, i64) {
    let [a, b, _c, d, _e, f, _g, h, i] = *t;
    let lo = (a - i).abs().max((b - f).abs()).max((d - h).abs());
    let hi = (a + i).min(b + f).min(d + h);
    (lo, hi)
}

/// The arguments of the three 6j whose product is the term x (doubled) of
/// the 9j as a sum over x: `{a b c; f i x} {d e f; b x h} {g h i; x a d}`.
pub fn nine_j_six_js(t: &[i64; 9], x: i64) -> [[i64; 6]; 3] {
    let [a, b, c, d, e, f, g, h, i] = *t;
    [[a, b, c, f, i, x], [d, e, f, b, x, h], [g, h, i, x, a, d]]
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
    nine_j_fast(&t).unwrap_or_else(|| nine_j_general(&t))
}

/// The 9j sum in heap big integers (any size).
fn nine_j_general(t: &[i64; 9]) -> Surd {
    let (lo, hi) = nine_j_x_range(t);
    let mut terms = Vec::new();
    let mut x = lo;
    while x <= hi {
        crate::limits::check_now();
        let [p, q, r] = nine_j_six_js(t, x);
        let s1 = six_j_raw(p);
        if !s1.is_zero() {
            let s2 = six_j_raw(q);
            if !s2.is_zero() {
                let s3 = six_j_raw(r);
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

/// The 9j sum on the stack (`None` outside the fast path: some 6j with a
/// factorial argument above the fast limit, or numbers beyond the stack).
pub fn nine_j_fast(t: &[i64; 9]) -> Option<Surd> {
    let (lo, hi) = nine_j_x_range(t);
    let six = |args: [i64; 6]| match six_j_formula(args) {
        Some(formula) => formula.fast_raw(),
        None => Some(FastRaw::zero()),
    };
    let mut total = FastSum::new();
    let mut x = lo;
    while x <= hi {
        let [p, q, r] = nine_j_six_js(t, x);
        let s1 = six(p)?;
        if !s1.a.is_zero() {
            let s2 = six(q)?;
            if !s2.a.is_zero() {
                let s3 = six(r)?;
                if !s3.a.is_zero() {
                    let pair: FastRaw<PRODUCT_LIMBS> = s1.mul(&s2)?;
                    let mut term: FastRaw<PRODUCT_LIMBS> = pair.mul(&s3)?;
                    term.scale(if x % 2 != 0 { -(x + 1) } else { x + 1 })?;
                    total.add(&term)?;
                }
            }
        }
        x += 2;
    }
    total.to_surd()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn s(v: &Surd) -> String {
        v.to_string()
    }

    #[test]
    fn small_clebsch_gordan_values_match_the_standard_table() {
        // Condon–Shortley table values (Condon and Shortley 1935, from memory).
        assert_eq!(s(&clebsch_gordan(1, 1, 1, -1, 2, 0)), "sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(1, 1, 1, -1, 0, 0)), "sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(2, 2, 2, -2, 4, 0)), "sqrt(1/6)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 4, 0)), "sqrt(2/3)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 0, 0)), "-sqrt(1/3)");
        assert_eq!(s(&clebsch_gordan(2, 0, 2, 0, 2, 0)), "0");
        assert_eq!(s(&clebsch_gordan(2, -2, 2, 2, 2, 0)), "-sqrt(1/2)");
        assert_eq!(s(&clebsch_gordan(2, 0, 1, 1, 1, 1)), "-sqrt(1/3)");
    }

    /// Random doubled arguments near `j` that satisfy `ok`.
    fn random_args<const N: usize>(
        rng: &mut crate::verify::rng::Rng,
        j: i64,
        ok: impl Fn(&[i64; N]) -> bool,
    ) -> [i64; N] {
        loop {
            let mut t = [0i64; N];
            for x in t.iter_mut() {
                *x = (2 * j - rng.below(j as u64 + 1) as i64).max(0);
            }
            if ok(&t) {
                return t;
            }
        }
    }

    #[test]
    fn the_stack_path_agrees_with_the_big_integer_path() {
        // Both paths compute the same Racah sums; they share only the
        // formulas, so a slip in the stack arithmetic, the factorial rows
        // or the prime cancellation shows up as a difference. The range
        // of j crosses the i128 limit of Horner's sum and FAST_LIMIT.
        let mut rng = crate::verify::rng::Rng::new(7);
        let mut stack_used = [0usize; 3];
        for round in 0..600 {
            let j = 1 + (round % 40) as i64;
            let t6: [i64; 6] = random_args(&mut rng, j, |t| {
                triangle2(t[0], t[1], t[2])
                    && triangle2(t[0], t[4], t[5])
                    && triangle2(t[3], t[1], t[5])
                    && triangle2(t[3], t[4], t[2])
            });
            let f = six_j_formula(t6).unwrap();
            let general = canonical(&f.exact_raw());
            if let Some(fast) = f.exact_fast() {
                assert_eq!(fast, general, "6j {t6:?}");
                stack_used[1] += 1;
            }
            let mut tj: [i64; 3] = random_args(&mut rng, j, |t| triangle2(t[0], t[1], t[2]));
            tj[2] += (tj[0] + tj[1] + tj[2]) % 2;
            let mut tm = [0i64; 3];
            tm[0] = -tj[0] + 2 * rng.below(tj[0] as u64 + 1) as i64;
            tm[1] = -tj[1] + 2 * rng.below(tj[1] as u64 + 1) as i64;
            tm[2] = -tm[0] - tm[1];
            if let Some(f) = three_j_formula(tj, tm) {
                let general = canonical(&f.exact_raw());
                if let Some(fast) = f.exact_fast() {
                    assert_eq!(fast, general, "3j {tj:?} {tm:?}");
                    stack_used[0] += 1;
                }
            }
            if round % 3 == 0 {
                let j9 = 1 + (round % 32) as i64;
                let t9: [i64; 9] = random_args(&mut rng, j9, nine_j_triads_ok);
                if let Some(fast) = nine_j_fast(&t9) {
                    assert_eq!(fast, nine_j_general(&t9), "9j {t9:?}");
                    stack_used[2] += 1;
                }
            }
        }
        // the stack path really ran, on most cases
        assert!(
            stack_used[0] > 300 && stack_used[1] > 500 && stack_used[2] > 150,
            "{stack_used:?}"
        );
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
