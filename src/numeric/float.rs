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
use super::exact::{nine_j_triads_ok, nine_j_x_range, projection_ok2, triangle2};
use super::racah::{FactArg, RacahSum};
use super::{exact, Surd};
use num_traits::Signed;
use std::cell::RefCell;

/// Cancellation beyond which the double-double sum is not trusted.
const MAX_CANCELLATION_LOG2: i64 = 45;

thread_local! {
    static FACTORIALS: RefCell<Vec<Xf>> = RefCell::new(vec![Xf::ONE]);
}

/// Runs `f` with a table of `n!` reaching at least `n`.
fn with_factorials<R>(n: usize, f: impl FnOnce(&[Xf]) -> R) -> R {
    FACTORIALS.with(|t| {
        {
            let mut t = t.borrow_mut();
            while t.len() <= n {
                let k = t.len();
                let prev = t[k - 1];
                t.push(prev * Xf::from_dd(Dd::from_u128(k as u128)));
            }
        }
        f(&t.borrow())
    })
}

/// A Racah sum with its root prefactor `sqrt(Π num! / Π den!)`.
struct FloatRacah<'a> {
    sum: &'a RacahSum,
    root_num: &'a [i64],
    root_den: &'a [i64],
    negative: bool,
}

impl FloatRacah<'_> {
    fn max_arg(&self) -> i64 {
        let mut m = 1;
        for &a in self.root_num.iter().chain(self.root_den) {
            m = m.max(a);
        }
        for f in self.sum.num.iter().chain(&self.sum.den) {
            m = m.max(f.c + f.s * self.sum.kmin).max(f.c + f.s * self.sum.kmax);
        }
        m
    }

    /// The value, or `None` when cancellation leaves too few bits.
    fn evaluate(&self) -> Option<Xf> {
        let s = self.sum;
        if s.kmin > s.kmax {
            return Some(Xf::ZERO);
        }
        let n = self.max_arg() as usize;
        with_factorials(n + 1, |fact| {
            let mut pref = Xf::ONE;
            for &a in self.root_num {
                pref = pref * fact[a as usize];
            }
            for &a in self.root_den {
                pref = pref / fact[a as usize];
            }
            let pref = pref.sqrt();
            let mut t0 = Xf::ONE;
            for f in &s.num {
                t0 = t0 * fact[(f.c + f.s * s.kmin) as usize];
            }
            for f in &s.den {
                t0 = t0 / fact[(f.c + f.s * s.kmin) as usize];
            }
            // terms relative to t0
            let mut term = Xf::ONE;
            let mut acc = Xf::ONE;
            let mut abs_acc = Xf::ONE;
            for k in s.kmin..s.kmax {
                let (num, den) = ratio(s, k);
                term = -(term * Xf::from_dd(Dd::from_u128(num) / Dd::from_u128(den)));
                acc = acc + term;
                abs_acc = abs_acc + term.abs();
            }
            let cancel = if acc.is_zero() {
                i64::MAX
            } else {
                abs_acc.ilog() - acc.ilog()
            };
            let acc = if cancel > MAX_CANCELLATION_LOG2 {
                // too much cancellation for 106 bits: fixed point with
                // enough bits, doubled until the error bound is tiny
                let start = if cancel == i64::MAX { 256 } else { cancel + 96 };
                fixed_point_sum(s, start.max(128) as u64)?
            } else {
                acc
            };
            let mut v = pref * t0 * acc;
            if (s.kmin & 1 == 1) != self.negative {
                v = -v;
            }
            Some(v)
        })
    }
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
    while bits <= (1 << 22) {
        let mut t = BigInt::from(1u8) << bits;
        let mut sum = t.clone();
        // rel = Σ 1/|T_i|; err_log2 = log2 Σ rel_k |T_k| (units 2^-bits)
        let tf = big_int_f64_log2(&t);
        let mut rel = (-tf).exp2();
        let mut err_log2 = rel.log2() + tf;
        let mut overflowed = false;
        for k in s.kmin..s.kmax {
            let (n, d) = ratio(s, k);
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
                let (neg, mag) = (sum.sign() == num_bigint::Sign::Minus, sum.magnitude().clone());
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

fn ratio(s: &RacahSum, k: i64) -> (u128, u128) {
    let mut n: u128 = 1;
    let mut d: u128 = 1;
    for f in &s.num {
        if f.s > 0 {
            n *= (f.c + k + 1) as u128;
        } else {
            d *= (f.c - k) as u128;
        }
    }
    for f in &s.den {
        if f.s > 0 {
            d *= (f.c + k + 1) as u128;
        } else {
            n *= (f.c - k) as u128;
        }
    }
    (n, d)
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

fn h(x: i64) -> i64 {
    x / 2
}

/// 3j symbol as an extended double-double; doubled arguments.
fn three_j_xf(tj: [i64; 3], tm: [i64; 3]) -> Xf {
    let [a, b, c] = tj;
    let [ma, mb, mc] = tm;
    if ma + mb + mc != 0
        || !projection_ok2(a, ma)
        || !projection_ok2(b, mb)
        || !projection_ok2(c, mc)
        || !triangle2(a, b, c)
    {
        return Xf::ZERO;
    }
    let sum = RacahSum {
        num: vec![],
        den: vec![
            FactArg::up(0),
            FactArg::up(h(c - b + ma)),
            FactArg::up(h(c - a - mb)),
            FactArg::down(h(a + b - c)),
            FactArg::down(h(a - ma)),
            FactArg::down(h(b + mb)),
        ],
        kmin: 0.max(h(b - c - ma)).max(h(a - c + mb)),
        kmax: h(a + b - c).min(h(a - ma)).min(h(b + mb)),
    };
    let root_num = [
        h(a + b - c),
        h(a - b + c),
        h(-a + b + c),
        h(a + ma),
        h(a - ma),
        h(b + mb),
        h(b - mb),
        h(c + mc),
        h(c - mc),
    ];
    let root_den = [h(a + b + c) + 1];
    let fr = FloatRacah {
        sum: &sum,
        root_num: &root_num,
        root_den: &root_den,
        negative: h(a - b - mc).rem_euclid(2) == 1,
    };
    fr.evaluate()
        .unwrap_or_else(|| surd_to_xf(&exact::three_j(tj, tm)))
}

/// The 3j symbol `(j1 j2 j3; m1 m2 m3)` in f64; doubled arguments.
pub fn three_j_f64(tj: [i64; 3], tm: [i64; 3]) -> f64 {
    three_j_xf(tj, tm).to_f64()
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
    let [j1, j2, j3, j4, j5, j6] = t;
    let triads = [(j1, j2, j3), (j1, j5, j6), (j4, j2, j6), (j4, j5, j3)];
    if triads.iter().any(|&(a, b, c)| !triangle2(a, b, c)) {
        return Xf::ZERO;
    }
    let mut root_num = [0i64; 12];
    let mut root_den = [0i64; 4];
    for (i, &(a, b, c)) in triads.iter().enumerate() {
        root_num[3 * i] = h(a + b - c);
        root_num[3 * i + 1] = h(a - b + c);
        root_num[3 * i + 2] = h(-a + b + c);
        root_den[i] = h(a + b + c) + 1;
    }
    let asum: Vec<i64> = triads.iter().map(|&(a, b, c)| h(a + b + c)).collect();
    let bsum = [
        h(j1 + j2 + j4 + j5),
        h(j2 + j3 + j5 + j6),
        h(j3 + j1 + j6 + j4),
    ];
    let sum = RacahSum {
        num: vec![FactArg::up(1)],
        den: vec![
            FactArg::up(-asum[0]),
            FactArg::up(-asum[1]),
            FactArg::up(-asum[2]),
            FactArg::up(-asum[3]),
            FactArg::down(bsum[0]),
            FactArg::down(bsum[1]),
            FactArg::down(bsum[2]),
        ],
        kmin: *asum.iter().max().unwrap(),
        kmax: *bsum.iter().min().unwrap(),
    };
    let fr = FloatRacah {
        sum: &sum,
        root_num: &root_num,
        root_den: &root_den,
        negative: false,
    };
    fr.evaluate().unwrap_or_else(|| surd_to_xf(&exact::six_j(t)))
}

/// The 6j symbol `{j1 j2 j3; j4 j5 j6}` in f64; doubled arguments.
pub fn six_j_f64(t: [i64; 6]) -> f64 {
    six_j_xf(t).to_f64()
}

/// The 9j symbol in f64; doubled arguments. The sum over x of products of
/// three 6j runs in double-double with the same cancellation guard.
pub fn nine_j_f64(t: [i64; 9]) -> f64 {
    if !nine_j_triads_ok(&t) {
        return 0.0;
    }
    let [a, b, c, d, e, f, g, hh, i] = t;
    let (lo, hi) = nine_j_x_range(&t);
    let mut acc = Xf::ZERO;
    let mut abs_acc = Xf::ZERO;
    let mut x = lo;
    while x <= hi {
        let s1 = six_j_xf([a, b, c, f, i, x]);
        if !s1.is_zero() {
            let s2 = six_j_xf([d, e, f, b, x, hh]);
            if !s2.is_zero() {
                let s3 = six_j_xf([g, hh, i, x, a, d]);
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
