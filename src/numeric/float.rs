//! Floating-point 3j, Clebsch–Gordan, 6j and 9j values that stay accurate
//! for every j (measured to 10^4). The Racah single sums are run in
//! double-double arithmetic with extended exponents (no overflow), while
//! the sum of absolute values is tracked; when cancellation could cost more
//! than the margin (|Σ|t|| / |Σ t| > 2^45, leaving at least ~55 good bits),
//! the sum is redone in big-integer fixed point with as many bits as the
//! cancellation needs (doubled until a rigorous error bound is below 2^-60
//! of the value), and only past 2^22 bits computed exactly and rounded. Results are
//! correctly signed, with relative error about 1e-16 (the f64 rounding).
//! Values below the f64 range underflow to 0 or a subnormal.

use super::dd::{Dd, Xf};
use super::exact::{nine_j_six_js, nine_j_triads_ok, nine_j_x_range};
use super::family::FamilyNumber;
use super::racah::{six_j_formula, three_j_formula, RacahFormula, RacahSum};
use super::selection::{projection_ok2, triangle2};
use super::{exact, Surd};
use num_traits::Signed;
use std::cell::RefCell;

/// Cancellation beyond which the double-double sum is not trusted.
const MAX_CANCELLATION_LOG2: i64 = 45;

/// Factorials kept in a shared read-only table up to this argument.
const STATIC_FACTORIALS: usize = 4096;

fn static_factorials() -> &'static [Xf] {
    static T: std::sync::OnceLock<Vec<Xf>> = std::sync::OnceLock::new();
    T.get_or_init(|| build_factorials(STATIC_FACTORIALS))
}

fn build_factorials(n: usize) -> Vec<Xf> {
    let mut t = vec![Xf::ONE];
    for k in 1..=n {
        let prev = t[k - 1];
        t.push(prev * Xf::from_dd(Dd::from_u128(k as u128)));
    }
    t
}

thread_local! {
    static FACTORIALS: RefCell<Vec<Xf>> = const { RefCell::new(Vec::new()) };
}

/// Runs `f` with a table of `n!` reaching at least `n`.
fn with_factorials<R>(n: usize, f: impl FnOnce(&[Xf]) -> R) -> R {
    if n <= STATIC_FACTORIALS {
        return f(static_factorials());
    }
    FACTORIALS.with(|t| {
        {
            let mut t = t.borrow_mut();
            if t.len() <= n {
                *t = build_factorials(n.max(2 * t.len()));
            }
        }
        f(&t.borrow())
    })
}

/// `n!` as `m 2^e` with `m` in [1, 2), in plain f64, for the fast path.
fn f64_factorials() -> &'static [(f64, i64)] {
    static T: std::sync::OnceLock<Vec<(f64, i64)>> = std::sync::OnceLock::new();
    T.get_or_init(|| {
        static_factorials()
            .iter()
            .map(|x| {
                let v = x.m.to_f64();
                let ex = super::dd::exponent(v);
                (v * super::dd::pow2(-ex), x.e + ex as i64)
            })
            .collect()
    })
}

/// The fast path for arguments up to 4096: the sum relative to its first
/// term is exact in `i128` (or plain f64 under a rigorous error bound of
/// 2^-50), and the prefactor is a product of at most 22 correctly rounded
/// f64 factorials, so the result carries at most ~26 roundings (relative
/// error below 4e-15; measured below 1e-15).
fn evaluate_fast(f: &RacahFormula) -> Option<f64> {
    let s = &f.sum;
    if s.kmin > s.kmax {
        return Some(0.0);
    }
    let table = f64_factorials();
    let ratio = match s.horner_ratio_i128() {
        Some((0, _)) => return Some(0.0),
        Some((a, p)) => a as f64 / p as f64,
        None => f64_sum_with_bound(s).or_else(|| dd_sum_plain(s))?,
    };
    let get = |n: i64| table.get(n as usize).copied();
    let (mut rm, mut re) = (1.0f64, 0i64);
    for &x in &f.root_num {
        let (m, e) = get(x)?;
        rm *= m;
        re += e;
    }
    for &x in &f.root_den {
        let (m, e) = get(x)?;
        rm /= m;
        re -= e;
    }
    if re % 2 != 0 {
        rm *= 2.0;
        re -= 1;
    }
    let (mut tm, mut te) = (rm.sqrt(), re / 2);
    for x in &s.num {
        let (m, e) = get(x.c + x.s * s.kmin)?;
        tm *= m;
        te += e;
    }
    for x in &s.den {
        let (m, e) = get(x.c + x.s * s.kmin)?;
        tm /= m;
        te -= e;
    }
    let mut v = super::surd::ldexp(tm * ratio, te);
    if (s.kmin & 1 == 1) != f.negative {
        v = -v;
    }
    Some(v)
}

/// The sum relative to its first term in plain f64, with a running
/// rounding-error bound: term k carries at most 2k+1 roundings, the
/// additions one each. Accepted only when the bound is below 2^-50 of the
/// sum (relative error under 1e-15); otherwise `None`.
fn f64_sum_with_bound(s: &RacahSum) -> Option<f64> {
    let u = f64::EPSILON / 2.0;
    let mut t = 1.0f64;
    let mut sum = 1.0f64;
    let mut abs = 1.0f64;
    let mut weighted = 1.0f64;
    let mut steps = 0u32;
    for k in s.kmin..s.kmax {
        let (n, d) = s.ratio(k);
        if n >= (1u128 << 53) || d >= (1u128 << 53) {
            return None;
        }
        // below 2^53: the u64 conversion is one instruction, the u128 one a call
        t = -t * ((n as u64) as f64 / (d as u64) as f64);
        steps += 1;
        sum += t;
        abs += t.abs();
        weighted += t.abs() * (2 * steps + 1) as f64;
    }
    if !abs.is_finite() {
        return None;
    }
    let bound = u * (weighted + (steps as f64 + 1.0) * abs);
    if bound <= sum.abs() * 2f64.powi(-50) {
        Some(sum)
    } else {
        None
    }
}

/// The sum relative to its first term in double-double without extended
/// exponents (`None` if a term leaves 2^±900, or if cancellation exceeds
/// 2^45, which would leave fewer than ~55 good bits).
fn dd_sum_plain(s: &RacahSum) -> Option<f64> {
    let mut t = Dd::ONE;
    let mut sum = Dd::ONE;
    let mut abs = 1.0f64;
    for k in s.kmin..s.kmax {
        let (n, d) = s.ratio(k);
        if n >= (1u128 << 53) || d >= (1u128 << 53) {
            return None;
        }
        t = -(t.mul_f64((n as u64) as f64).div_f64((d as u64) as f64));
        sum = sum + t;
        abs += t.hi.abs();
        if abs.is_nan() || abs >= 1e270 {
            return None;
        }
    }
    let v = sum.to_f64();
    if v == 0.0 || abs / v.abs() > 2f64.powi(MAX_CANCELLATION_LOG2 as i32) {
        return None;
    }
    Some(v)
}

/// Evaluates a Racah formula in extended double-double, or `None` when
/// even the fixed-point fallback cannot settle it (the exact path then).
fn evaluate(f: &RacahFormula) -> Option<Xf> {
    let s = &f.sum;
    if s.kmin > s.kmax {
        return Some(Xf::ZERO);
    }
    let mut n = 1i64;
    for &a in f.root_num.iter().chain(&f.root_den) {
        n = n.max(a);
    }
    for a in s.num.iter().chain(&s.den) {
        n = n.max(a.c + a.s * s.kmin).max(a.c + a.s * s.kmax);
    }
    with_factorials(n as usize + 1, |fact| {
        // pref * t0 = sqrt(Π root_num! / Π root_den!) Π num(kmin)! / Π den(kmin)!
        let mut rn = Xf::ONE;
        for &a in &f.root_num {
            rn = rn * fact[a as usize];
        }
        let mut rd = Xf::ONE;
        for &a in &f.root_den {
            rd = rd * fact[a as usize];
        }
        let pref = (rn / rd).sqrt();
        let mut tn = Xf::ONE;
        for a in &s.num {
            tn = tn * fact[(a.c + a.s * s.kmin) as usize];
        }
        let mut td = Xf::ONE;
        for a in &s.den {
            td = td * fact[(a.c + a.s * s.kmin) as usize];
        }
        let t0 = tn / td;
        // the sum relative to t0: exactly in i128 when it fits
        let acc = match s.horner_ratio_i128() {
            Some((a, p)) => {
                if a == 0 {
                    return Some(Xf::ZERO);
                }
                let x = Xf::from_dd(Dd::from_u128(a.unsigned_abs()))
                    / Xf::from_dd(Dd::from_u128(p.unsigned_abs()));
                if (a < 0) != (p < 0) {
                    -x
                } else {
                    x
                }
            }
            None => {
                let mut term = Xf::ONE;
                let mut acc = Xf::ONE;
                let mut abs_acc = Xf::ONE;
                for k in s.kmin..s.kmax {
                    crate::limits::tick();
                    let (num, den) = s.ratio(k);
                    term = -(term * Xf::from_dd(Dd::from_u128(num) / Dd::from_u128(den)));
                    acc = acc + term;
                    abs_acc = abs_acc + term.abs();
                }
                let cancel = if acc.is_zero() {
                    i64::MAX
                } else {
                    abs_acc.ilog() - acc.ilog()
                };
                if cancel > MAX_CANCELLATION_LOG2 {
                    // too much cancellation for 106 bits: fixed point with
                    // enough bits, doubled until the error bound is tiny
                    let start = if cancel == i64::MAX { 256 } else { cancel + 96 };
                    fixed_point_sum(s, start.max(128) as u64)?
                } else {
                    acc
                }
            }
        };
        let mut v = pref * t0 * acc;
        if (s.kmin & 1 == 1) != f.negative {
            v = -v;
        }
        Some(v)
    })
}

/// The Racah sum relative to its first term, in fixed point with `bits`
/// fractional bits: `T_{k+1} = -T_k n_k / d_k` with truncating division.
/// Each truncation adds at most one unit, so the relative error of `T_k` is
/// at most `Σ_{i<=k} 1/|T_i|`; the result is accepted when the bound on
/// the sum's error is below 2^-60 of its value, else the precision is
/// doubled (giving up, `None`, past 2^22 bits: the exact path takes over).
fn fixed_point_sum(s: &RacahSum, bits: u64) -> Option<Xf> {
    use num_bigint::BigInt;
    use num_traits::Zero;
    let mut bits = bits;
    let last = (bits * 16).max(1 << 14);
    while bits <= last {
        let mut t = BigInt::from(1u8) << bits;
        let mut sum = t.clone();
        // rel = Σ 1/|T_i|; err_log2 = log2 Σ rel_k |T_k| (units 2^-bits)
        let tf = big_int_f64_log2(&t);
        let mut rel = (-tf).exp2();
        let mut err_log2 = rel.log2() + tf;
        let mut overflowed = false;
        for k in s.kmin..s.kmax {
            crate::limits::tick();
            let (n, d) = s.ratio(k);
            t = -(t * BigInt::from(n)) / BigInt::from(d);
            if t.is_zero() {
                overflowed = true;
                break;
            }
            sum += &t;
            let lt = big_int_f64_log2(&t);
            rel += (-lt).exp2();
            // log2(rel |T|) accumulated as a log-sum
            let term_log = rel.log2() + lt;
            err_log2 = log2_add(err_log2, term_log);
        }
        if !overflowed && !sum.is_zero() {
            let sum_log = big_int_f64_log2(&sum);
            if sum_log - err_log2 > 60.0 {
                let (neg, mag) = (
                    sum.sign() == num_bigint::Sign::Minus,
                    sum.magnitude().clone(),
                );
                let x = big_to_xf(&mag);
                let x = Xf {
                    m: x.m,
                    e: x.e - bits as i64,
                };
                return Some(if neg { -x } else { x });
            }
        }
        bits *= 2;
    }
    None
}

/// log2 of |n| (approximate, from the leading 64 bits).
fn big_int_f64_log2(n: &num_bigint::BigInt) -> f64 {
    let (m, e) = super::surd::biguint_to_mantissa_exp(n.magnitude());
    if m == 0.0 {
        f64::NEG_INFINITY
    } else {
        m.log2() + e as f64
    }
}

/// log2(2^a + 2^b).
fn log2_add(a: f64, b: f64) -> f64 {
    let (hi, lo) = if a > b { (a, b) } else { (b, a) };
    if lo == f64::NEG_INFINITY {
        return hi;
    }
    hi + (1.0 + (lo - hi).exp2()).log2()
}

/// An exact value as an extended double-double (for the rare fallback).
fn surd_to_xf(v: &Surd) -> Xf {
    let mut acc = Xf::ZERO;
    for (s, q) in v.terms() {
        let num = big_to_xf(q.numer().magnitude());
        let den = big_to_xf(q.denom().magnitude());
        let mut t = num / den * big_to_xf(s).sqrt();
        if q.is_negative() {
            t = -t;
        }
        acc = acc + t;
    }
    acc
}

fn big_to_xf(n: &num_bigint::BigUint) -> Xf {
    let bits = n.bits();
    if bits <= 106 {
        let v: u128 = n.try_into().unwrap();
        return Xf::from_dd(Dd::from_u128(v));
    }
    let shift = bits - 106;
    let top: u128 = (n >> shift).try_into().unwrap();
    let m = Xf::from_dd(Dd::from_u128(top));
    Xf {
        m: m.m,
        e: m.e + shift as i64,
    }
}

/// 3j symbol as an extended double-double; doubled arguments.
fn three_j_xf(tj: [i64; 3], tm: [i64; 3]) -> Xf {
    match three_j_formula(tj, tm) {
        None => Xf::ZERO,
        Some(f) => evaluate(&f).unwrap_or_else(|| surd_to_xf(&exact::three_j(tj, tm))),
    }
}

/// From this doubled angular momentum on, a single float 3j or 6j comes
/// from the shortest family that holds it (O(j), about 20-35 ns per
/// member) when it is not small in that family; the single-sum path costs
/// O(j) big-number work per value there.
pub const FAMILY_FROM_DOUBLED_J: i64 = 400;

/// The 3j from its shortest family over one column (cyclic permutations
/// are even), or `None` when the member is small in its family or the
/// symbol is zero by its selection rules.
fn three_j_by_family(tj: [i64; 3], tm: [i64; 3]) -> Option<f64> {
    if tm.iter().sum::<i64>() != 0
        || !triangle2(tj[0], tj[1], tj[2])
        || (0..3).any(|k| !projection_ok2(tj[k], tm[k]))
    {
        return None;
    }
    // first: recursion from the stretched top of the column nearest it
    // (O(distance), the top a single Racah term)
    let near = (0..3).min_by_key(|&k| tj[(k + 1) % 3] + tj[(k + 2) % 3] - tj[k])?;
    let (b, c) = ((near + 1) % 3, (near + 2) % 3);
    let top = three_j_single_sum_f64(
        [tj[b] + tj[c], tj[b], tj[c]],
        [-tm[b] - tm[c], tm[b], tm[c]],
    );
    if let Some(v) =
        super::family::three_j_member_from_top(tj[near], tj[b], tj[c], tm[b], tm[c], top)
    {
        return Some(v);
    }
    let k = (0..3).min_by_key(|&k| {
        let (b, c) = ((k + 1) % 3, (k + 2) % 3);
        tj[b] + tj[c] - (tj[b] - tj[c]).abs().max(tm[k].abs())
    })?;
    let (b, c) = ((k + 1) % 3, (k + 2) % 3);
    let fam = super::family::three_j_over_j1(tj[b], tj[c], tm[b], tm[c]);
    trusted_member(&fam, tj[k])
}

/// The member at doubled argument `t` when it is not small in its family
/// (below a tenth of the largest of its neighbours it is not trusted).
pub fn trusted_member(fam: &super::family::Family, t: i64) -> Option<f64> {
    let i = usize::try_from((t - fam.first) / 2).ok()?;
    let v = *fam.values.get(i)?;
    super::family::trusted(&fam.values, i).then_some(v)
}

/// The 6j from its shortest family over one argument (the argument moved
/// to the top left by the symbol's symmetries), like `three_j_by_family`.
fn six_j_by_family(t: [i64; 6]) -> Option<f64> {
    let triads = [
        (t[0], t[1], t[2]),
        (t[0], t[4], t[5]),
        (t[3], t[1], t[5]),
        (t[3], t[4], t[2]),
    ];
    if triads.iter().any(|&(a, b, c)| !triangle2(a, b, c)) {
        return None;
    }
    let moved = |p: usize| super::family::six_j_with_first(t, p);
    // first: recursion from the top of the argument nearest its top
    // (O(distance), the top a single Racah term)
    let near = (0..6)
        .map(moved)
        .min_by_key(|u| super::family::six_j_top_j1(*u) - u[0])?;
    let mut top_args = near;
    top_args[0] = super::family::six_j_top_j1(near);
    let top = six_j_single_sum_f64(top_args);
    if let Some(v) = super::family::six_j_member_from_top(near, top) {
        return Some(v);
    }
    let length = |u: &[i64; 6]| {
        (u[1] + u[2]).min(u[4] + u[5]) - (u[1] - u[2]).abs().max((u[4] - u[5]).abs())
    };
    let p = (0..6).min_by_key(|&p| length(&moved(p)))?;
    let u = moved(p);
    let fam = super::family::six_j_over_j1(u[1], u[2], u[3], u[4], u[5]);
    trusted_member(&fam, u[0])
}

/// The 3j symbol `(j1 j2 j3; m1 m2 m3)` in f64; doubled arguments.
pub fn three_j_f64(tj: [i64; 3], tm: [i64; 3]) -> f64 {
    if tj.iter().any(|&x| x >= FAMILY_FROM_DOUBLED_J) {
        if let Some(v) = three_j_by_family(tj, tm) {
            return v;
        }
    }
    three_j_single_sum_f64(tj, tm)
}

/// The 3j symbol in f64 by the single-sum formula alone (double-double
/// with a cancellation guard, big-number fixed point where it must);
/// doubled arguments.
pub fn three_j_single_sum_f64(tj: [i64; 3], tm: [i64; 3]) -> f64 {
    match three_j_formula(tj, tm) {
        None => 0.0,
        Some(f) => evaluate_fast(&f).unwrap_or_else(|| {
            evaluate(&f)
                .unwrap_or_else(|| surd_to_xf(&exact::three_j(tj, tm)))
                .to_f64()
        }),
    }
}

/// The Clebsch–Gordan coefficient `<j1 m1; j2 m2 | J M>` in f64; doubled.
pub fn clebsch_gordan_f64(tj1: i64, tm1: i64, tj2: i64, tm2: i64, tjj: i64, tmm: i64) -> f64 {
    let v = three_j_xf([tj1, tj2, tjj], [tm1, tm2, -tmm]);
    if v.is_zero() {
        return 0.0;
    }
    let v = v * Xf::from_dd(Dd::from_u128((tjj + 1) as u128)).sqrt();
    let v = if ((tj1 - tj2 + tmm) / 2).rem_euclid(2) == 1 {
        -v
    } else {
        v
    };
    v.to_f64()
}

/// 6j symbol as an extended double-double; doubled arguments.
fn six_j_xf(t: [i64; 6]) -> Xf {
    match six_j_formula(t) {
        None => Xf::ZERO,
        Some(f) => evaluate(&f).unwrap_or_else(|| surd_to_xf(&exact::six_j(t))),
    }
}

/// The 6j symbol `{j1 j2 j3; j4 j5 j6}` in f64; doubled arguments.
pub fn six_j_f64(t: [i64; 6]) -> f64 {
    if t.iter().any(|&x| x >= FAMILY_FROM_DOUBLED_J) {
        if let Some(v) = six_j_by_family(t) {
            return v;
        }
    }
    six_j_single_sum_f64(t)
}

/// The 6j symbol in f64 by the single-sum formula alone; doubled
/// arguments.
pub fn six_j_single_sum_f64(t: [i64; 6]) -> f64 {
    match six_j_formula(t) {
        None => 0.0,
        Some(f) => evaluate_fast(&f).unwrap_or_else(|| {
            evaluate(&f)
                .unwrap_or_else(|| surd_to_xf(&exact::six_j(t)))
                .to_f64()
        }),
    }
}

/// The 9j symbol in f64; doubled arguments. Where the exact stack path
/// applies (every factorial argument of its 6j up to 127, about j <= 30)
/// the exact value is rounded: that is faster there than the float sum,
/// and correctly rounded. Beyond, the sum over x of products of three 6j
/// runs in double-double with the same cancellation guard.
pub fn nine_j_f64(t: [i64; 9]) -> f64 {
    if !nine_j_triads_ok(&t) {
        return 0.0;
    }
    // O(j) by recursion where its error bound allows (faster than the
    // exact stack path from j ~ 5 on), else the exact value rounded (small
    // j), else the single sums
    if let Some(v) = nine_j_by_families(&t) {
        return v;
    }
    if let Some(v) = exact::nine_j_fast(&t) {
        return v.to_f64();
    }
    nine_j_by_six_j_sums(&t)
}

/// Absolute error of an f64 family member, as a fraction of the largest
/// of its neighbours (measured below 1.5e-15 of the family's largest for
/// j <= 30 in `tests/family.rs`; the 9j values this bound lets through
/// are checked against exact ones in `tests/float_accuracy.rs`).
const FAMILY_ABSOLUTE_ERROR: f64 = 2e-15;
/// The same for a double-double family (about 106 bits, less what the
/// recursion and its matching lose; checked the same way).
const DD_FAMILY_ABSOLUTE_ERROR: f64 = 1e-27;
/// Relative error bound a 9j by families must meet to be returned.
const NINE_J_FAMILY_TOLERANCE: f64 = 1e-13;

/// The 9j as its sum over x of three 6j, each 6j's values over x from
/// one recursion (`six_j_over_j1` after moving x to the top left): O(j)
/// work, first in f64, then, where the sum cancels too much for f64
/// members, in double-double. A value is returned only when the error
/// bound of the sum (each member's absolute error a fixed fraction of the
/// largest of its neighbours, propagated through the products) is within
/// `NINE_J_FAMILY_TOLERANCE` of the result; `None` sends the caller to
/// the single sums.
pub fn nine_j_by_families(t: &[i64; 9]) -> Option<f64> {
    let (lo, hi) = nine_j_x_range(t);
    if lo > hi {
        return None;
    }
    // x stands at position 5, 4 and 3 of the three 6j
    let sixes = nine_j_six_js(t, 0);
    let moved = [(0usize, 5usize), (1, 4), (2, 3)]
        .map(|(k, p)| super::family::six_j_with_first(sixes[k], p));
    let f64_families = moved.map(|u| super::family::six_j_over_j1(u[1], u[2], u[3], u[4], u[5]));
    if let Some(v) = nine_j_sum(&f64_families, lo, hi, FAMILY_ABSOLUTE_ERROR, f64::EPSILON) {
        return Some(v);
    }
    crate::limits::check_now();
    let dd_families = moved.map(|u| super::family::six_j_over_j1_dd(u[1], u[2], u[3], u[4], u[5]));
    nine_j_sum(&dd_families, lo, hi, DD_FAMILY_ABSOLUTE_ERROR, 1e-31)
}

/// The sum over x (doubled, `lo..=hi`) of `(-1)^(2x) (2x+1)` times the
/// three families' members, with its error bound; `None` when the bound
/// exceeds the tolerance.
fn nine_j_sum<T: FamilyNumber>(
    families: &[super::family::Family<T>; 3],
    lo: i64,
    hi: i64,
    member_error: f64,
    rounding: f64,
) -> Option<f64> {
    // each member's error is taken relative to the largest of its
    // neighbours (the family's local amplitude), as `trusted_member` does
    let local = families.each_ref().map(|f| {
        (0..f.values.len())
            .map(|i| super::family::local_amplitude(&f.values, i))
            .collect::<Vec<f64>>()
    });
    let index = |f: &super::family::Family<T>, x: i64| -> Option<usize> {
        usize::try_from((x - f.first) / 2)
            .ok()
            .filter(|&i| x >= f.first && i < f.values.len())
    };
    let zero = T::from_f64(0.0);
    let (mut sum, mut bound) = (zero, 0.0f64);
    let mut x = lo;
    while x <= hi {
        let mut f = [zero; 3];
        let mut delta = [0.0f64; 3];
        for k in 0..3 {
            if let Some(i) = index(&families[k], x) {
                f[k] = families[k].values[i];
                delta[k] = member_error * local[k][i];
            }
        }
        let term = T::from_f64((x + 1) as f64) * f[0] * f[1] * f[2];
        sum = if x % 2 != 0 { sum - term } else { sum + term };
        let [f1, f2, f3] = f.map(|v| v.approx().abs());
        bound += (x + 1) as f64
            * (delta[0] * f2 * f3
                + delta[1] * f1 * f3
                + delta[2] * f1 * f2
                + delta[0] * delta[1] * f3
                + delta[1] * delta[2] * f1
                + delta[0] * delta[2] * f2)
            + term.approx().abs() * 4.0 * rounding;
        x += 2;
    }
    let sum = sum.approx();
    (sum != 0.0 && sum.is_finite() && bound <= NINE_J_FAMILY_TOLERANCE * sum.abs()).then_some(sum)
}

/// The 9j as its sum over x of products of three 6j, each by its single
/// sum, in extended precision; exact when the cancellation is too heavy.
fn nine_j_by_six_j_sums(t: &[i64; 9]) -> f64 {
    let t = *t;
    let (lo, hi) = nine_j_x_range(&t);
    let mut acc = Xf::ZERO;
    let mut abs_acc = Xf::ZERO;
    let mut x = lo;
    while x <= hi {
        crate::limits::check_now();
        let [p, q, r] = nine_j_six_js(&t, x);
        let s1 = six_j_xf(p);
        if !s1.is_zero() {
            let s2 = six_j_xf(q);
            if !s2.is_zero() {
                let s3 = six_j_xf(r);
                let mut term = s1 * s2 * s3 * Xf::from_dd(Dd::from_u128((x + 1) as u128));
                if x % 2 != 0 {
                    term = -term;
                }
                acc = acc + term;
                abs_acc = abs_acc + term.abs();
            }
        }
        x += 2;
    }
    if abs_acc.is_zero() {
        return 0.0;
    }
    if acc.is_zero() || abs_acc.ilog() - acc.ilog() > MAX_CANCELLATION_LOG2 {
        return exact::nine_j(t).to_f64();
    }
    acc.to_f64()
}
