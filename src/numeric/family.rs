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

/// A family: values at `first`, `first + 2`, ... (doubled arguments), in
/// f64 or in double-double (`Dd`).
#[derive(Clone, Debug, PartialEq)]
pub struct Family<T = f64> {
    /// doubled value of the first member's varying argument
    pub first: i64,
    /// the values, one per member
    pub values: Vec<T>,
}

/// The numbers a recursion can run in: f64, or double-double where a sum
/// of family members cancels heavily (the 9j).
pub trait FamilyNumber:
    Copy
    + std::ops::Add<Output = Self>
    + std::ops::Sub<Output = Self>
    + std::ops::Mul<Output = Self>
    + std::ops::Div<Output = Self>
    + std::ops::Neg<Output = Self>
{
    /// An f64.
    fn from_f64(x: f64) -> Self;
    /// An integer (exact where the type allows).
    fn from_i128(n: i128) -> Self;
    /// The nearest f64 (for magnitude tests).
    fn approx(self) -> f64;
    /// The square root.
    fn sqrt(self) -> Self;
}

impl FamilyNumber for f64 {
    fn from_f64(x: f64) -> f64 {
        x
    }
    fn from_i128(n: i128) -> f64 {
        exact_or_rounded(n)
    }
    fn approx(self) -> f64 {
        self
    }
    fn sqrt(self) -> f64 {
        f64::sqrt(self)
    }
}

/// An i128 as f64 (one instruction when it fits in i64: the general
/// conversion is a slow library routine).
#[inline]
fn exact_or_rounded(n: i128) -> f64 {
    let small = n as i64;
    if small as i128 == n {
        small as f64
    } else {
        wide_to_f64(n)
    }
}

#[cold]
#[inline(never)]
fn wide_to_f64(n: i128) -> f64 {
    n as f64
}

impl FamilyNumber for Dd {
    fn from_f64(x: f64) -> Dd {
        Dd::from_f64(x)
    }
    fn from_i128(n: i128) -> Dd {
        if n < 0 {
            -Dd::from_u128(n.unsigned_abs())
        } else {
            Dd::from_u128(n as u128)
        }
    }
    fn approx(self) -> f64 {
        self.to_f64()
    }
    fn sqrt(self) -> Dd {
        Dd::sqrt(self)
    }
}

impl<T> Family<T> {
    fn empty() -> Family<T> {
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

use super::dd::{exponent, pow2, Dd};

/// Values beyond this are rescaled during a recursion run.
const HUGE: f64 = 1e150;

/// Solves a family from its recursion `a(i) f(i+1) + b(i) f(i) + c(i)
/// f(i-1) = 0` on indices `0..n` (`c(0)` = 0 and `a(n-1)` = 0 at the
/// ends), normalised so that `Σ w(i) f(i)^2 = 1`, the last member with the
/// sign `last_sign`. The forward run starts at the lower end and stops
/// once the magnitude stops growing (the classical region); the backward
/// run starts at the upper end and goes down to three members below
/// that; the two are matched by least squares on their overlap.
fn solve<T: FamilyNumber>(
    n: usize,
    abc: impl Fn(usize) -> (T, T, T),
    weight: impl Fn(usize) -> T,
    last_sign: f64,
) -> Vec<T> {
    let num = T::from_f64;
    let zero = num(0.0);
    let mag = |x: T| x.approx().abs();
    if n == 0 {
        return Vec::new();
    }
    if n == 1 {
        return vec![num(last_sign) / weight(0).sqrt()];
    }
    // forward: f(0) = 1, f(1) from the equation at 0
    let mut fw: Vec<T> = Vec::new();
    let (a0, b0, _) = abc(0);
    if a0.approx() != 0.0 {
        fw.push(num(1.0));
        fw.push(-b0 / a0);
        let mut i = 1;
        while i + 1 < n {
            let grown = mag(fw[i]).max(mag(fw[i - 1]));
            if i >= 2 && grown < mag(fw[i - 2]).max(mag(fw[i - 1])) {
                break;
            }
            let (a, b, c) = abc(i);
            if a.approx() == 0.0 {
                break;
            }
            let next = -(b * fw[i] + c * fw[i - 1]) / a;
            fw.push(next);
            i += 1;
            if mag(next) > HUGE {
                fw.iter_mut().for_each(|v| *v = *v / num(HUGE));
            }
        }
    }
    // backward: g(n-1) = 1, g(n-2) from the equation at n-1, down to `low`
    let low = fw.len().saturating_sub(3);
    let mut g = vec![zero; n];
    g[n - 1] = num(1.0);
    let (_, bn, cn) = abc(n - 1);
    if n >= 2 {
        g[n - 2] = if cn.approx() == 0.0 { zero } else { -bn / cn };
    }
    let mut i = n - 2;
    while i > low {
        let (a, b, c) = abc(i);
        g[i - 1] = if c.approx() == 0.0 {
            zero
        } else {
            -(b * g[i] + a * g[i + 1]) / c
        };
        if mag(g[i - 1]) > HUGE {
            g.iter_mut().for_each(|v| *v = *v / num(HUGE));
        }
        i -= 1;
    }
    // the sign of the unnormalised last member, kept apart: the member
    // itself may underflow to 0 in the rescaled runs
    let mut top_sign = 1.0;
    let mut values = g;
    if !fw.is_empty() && fw.len() >= n {
        values.copy_from_slice(&fw[..n]);
        top_sign = if fw[n - 1].approx() < 0.0 { -1.0 } else { 1.0 };
    } else if !fw.is_empty() {
        let top = fw.len();
        let (mut nu, mut den) = (zero, zero);
        for k in low..top {
            nu = nu + fw[k] * values[k];
            den = den + values[k] * values[k];
        }
        if den.approx() > 0.0 && nu.approx() != 0.0 {
            // express the backward run in the forward run's scale
            let scale = nu / den;
            top_sign = scale.approx().signum();
            for v in values.iter_mut() {
                *v = *v * scale;
            }
            values[..top].copy_from_slice(&fw[..top]);
        }
    }
    let mut norm = zero;
    for i in 0..n {
        norm = norm + weight(i) * values[i] * values[i];
    }
    let mut scale = num(1.0) / norm.sqrt();
    if top_sign * last_sign < 0.0 {
        scale = -scale;
    }
    values.iter_mut().for_each(|v| *v = *v * scale);
    values
}

fn half(x: i64) -> f64 {
    x as f64 / 2.0
}

/// The recursion of the 3j over j1 (Schulten and Gordon 1975):
/// `j A(j+1) f(j+1) + B(j) f(j) + (j+1) A(j) f(j-1) = 0` with
/// `A(j)^2 = (j^2 - (j2-j3)^2)((j2+j3+1)^2 - j^2)(j^2 - m1^2)` and
/// `B(j) = -(2j+1)(j2(j2+1) m1 - j3(j3+1) m1 - j(j+1)(m3 - m2))`, its
/// coefficients in exact integer arithmetic on doubled values (one
/// rounding each: their terms cancel heavily at large j).
struct ThreeJOverJ1 {
    lo: i64,
    n: usize,
    t2: i128,
    t3: i128,
    u1: i128,
    u2: i128,
    u3: i128,
}

impl ThreeJOverJ1 {
    fn new(tj2: i64, tj3: i64, tm2: i64, tm3: i64) -> Option<ThreeJOverJ1> {
        let tm1 = -tm2 - tm3;
        if tm2.abs() > tj2 || tm3.abs() > tj3 || (tj2 - tm2) % 2 != 0 || (tj3 - tm3) % 2 != 0 {
            return None;
        }
        let lo = (tj2 - tj3).abs().max(tm1.abs());
        let hi = tj2 + tj3;
        (lo <= hi).then(|| ThreeJOverJ1 {
            lo,
            n: ((hi - lo) / 2 + 1) as usize,
            t2: tj2 as i128,
            t3: tj3 as i128,
            u1: tm1 as i128,
            u2: tm2 as i128,
            u3: tm3 as i128,
        })
    }

    fn j_of(&self, i: usize) -> f64 {
        half(self.lo) + i as f64
    }

    fn t_of(&self, i: usize) -> i128 {
        (self.lo + 2 * i as i64) as i128
    }

    /// 8 A(j): each factor exact, their product rounded twice (no
    /// cancellation there).
    fn big_a(&self, t: i128) -> f64 {
        let (t2, t3, u1) = (self.t2, self.t3, self.u1);
        let p = exact_or_rounded(t * t - (t2 - t3) * (t2 - t3));
        let q = exact_or_rounded((t2 + t3 + 2) * (t2 + t3 + 2) - t * t);
        let r = exact_or_rounded(t * t - u1 * u1);
        (p * q * r).max(0.0).sqrt() / 8.0
    }

    /// B(j), from 8 B(j) / (2j+1) = -(T2 u1 - T3 u1 - T (u3 - u2)) with
    /// T = t(t+2).
    fn big_b(&self, t: i128) -> f64 {
        let (t2, t3) = (self.t2, self.t3);
        let tt = t * (t + 2);
        let inner = t2 * (t2 + 2) * self.u1 - t3 * (t3 + 2) * self.u1 - tt * (self.u3 - self.u2);
        -exact_or_rounded((t + 1) * inner) / 8.0
    }

    /// The coefficients at member i, each A computed where it is used.
    fn abc(&self, i: usize) -> (f64, f64, f64) {
        let j = self.j_of(i);
        let a = if i + 1 < self.n {
            j * self.big_a(self.t_of(i + 1))
        } else {
            0.0
        };
        let c = if i > 0 {
            (j + 1.0) * self.big_a(self.t_of(i))
        } else {
            0.0
        };
        (a, self.big_b(self.t_of(i)), c)
    }
}

/// `(j1, j2, j3; m1, m2, m3)` for every allowed j1 (doubled arguments;
/// `m1 = -m2 - m3`).
pub fn three_j_over_j1(tj2: i64, tj3: i64, tm2: i64, tm3: i64) -> Family {
    let Some(r) = ThreeJOverJ1::new(tj2, tj3, tm2, tm3) else {
        return Family::empty();
    };
    let n = r.n;
    // each A once
    let a_of: Vec<f64> = (0..=n).map(|i| r.big_a(r.t_of(i))).collect();
    let abc = |i: usize| {
        let j = r.j_of(i);
        let a = if i + 1 < n { j * a_of[i + 1] } else { 0.0 };
        let c = if i > 0 { (j + 1.0) * a_of[i] } else { 0.0 };
        (a, r.big_b(r.t_of(i)), c)
    };
    let weight = |i: usize| 2.0 * r.j_of(i) + 1.0;
    // the stretched member j1 = j2 + j3 has the sign (-1)^(j2-j3-m1)
    let e = (tj2 - tj3 + tm2 + tm3) / 2;
    let last_sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
    Family {
        first: r.lo,
        values: solve(n, abc, weight, last_sign),
    }
}

/// Members on each side of a member that set its local amplitude.
pub const NEIGHBOURS: usize = 8;

/// A member is trusted at this fraction of its local amplitude or more
/// (members near a zero of the family lose relative accuracy in the
/// recursion, in proportion to the local amplitude over their own size).
pub const TRUST_FRACTION: f64 = 0.1;

/// The largest magnitude among member `i` and its `NEIGHBOURS` on each
/// side.
pub fn local_amplitude<T: FamilyNumber>(values: &[T], i: usize) -> f64 {
    values[i.saturating_sub(NEIGHBOURS)..(i + NEIGHBOURS + 1).min(values.len())]
        .iter()
        .fold(0.0f64, |m, v| m.max(v.approx().abs()))
}

/// Whether member `i` is nonzero and at least `TRUST_FRACTION` of its
/// local amplitude.
pub fn trusted(values: &[f64], i: usize) -> bool {
    let v = values[i];
    v != 0.0 && v.abs() >= TRUST_FRACTION * local_amplitude(values, i)
}

/// One member of a family by backward recursion from its top member,
/// whose value `top` is known: O(distance from the top). The run is
/// stable through the upper non-classical region (values grow downward)
/// and the classical one (`b^2 < 4ac`, oscillation); `None` once it
/// would enter the lower non-classical region (where the wanted solution
/// decays downward and the recursion loses it), or when the member is
/// small beside its neighbours.
fn member_from_top(
    n: usize,
    abc: impl Fn(usize) -> (f64, f64, f64),
    target: usize,
    top: f64,
) -> Option<f64> {
    if target >= n || top == 0.0 || !top.is_finite() {
        return None;
    }
    if target == n - 1 {
        return Some(top);
    }
    let stop = target.saturating_sub(NEIGHBOURS);
    let mut g = vec![0.0f64; n - stop];
    let at = |i: usize| i - stop;
    g[at(n - 1)] = 1.0;
    let (_, bn, cn) = abc(n - 1);
    if cn == 0.0 {
        return None;
    }
    g[at(n - 2)] = -bn / cn;
    // rescalings by 2^-RESCALE_BITS, exact, counted
    let mut rescaled = 0i32;
    let mut classical = false;
    let mut i = n - 2;
    while i > stop {
        let (a, b, c) = abc(i);
        if c == 0.0 {
            return None;
        }
        let oscillating = b * b < 4.0 * a * c;
        if classical && !oscillating && i <= target + NEIGHBOURS {
            // left the classical region below: the lower non-classical one
            return None;
        }
        classical |= oscillating;
        g[at(i - 1)] = -(b * g[at(i)] + a * g[at(i + 1)]) / c;
        if g[at(i - 1)].abs() > pow2(RESCALE_BITS) {
            g.iter_mut().for_each(|v| *v *= pow2(-RESCALE_BITS));
            rescaled += 1;
        }
        i -= 1;
    }
    let v = g[at(target)];
    if !trusted(&g, at(target)) {
        return None;
    }
    // g is the family divided by its top member and by 2^(RESCALE_BITS
    // rescaled): the member is top * v * 2^(RESCALE_BITS rescaled), formed
    // on mantissas and exponents so that nothing overflows on the way
    let (et, ev) = (exponent(top), exponent(v));
    let mantissas = (top * pow2(-et)) * (v * pow2(-ev));
    let e = et + ev + RESCALE_BITS * rescaled;
    let out = if e > 1000 {
        f64::INFINITY
    } else if e < -1070 {
        0.0
    } else {
        mantissas * pow2((e / 2).clamp(-1022, 1023)) * pow2((e - e / 2).clamp(-1022, 1023))
    };
    (out.is_finite() && out != 0.0).then_some(out)
}

/// Bits of one rescaling in `member_from_top`.
const RESCALE_BITS: i32 = 500;

/// `(j1, j2, j3; -m2-m3, m2, m3)` for one j1 by the recursion over j1
/// from its stretched top `j2 + j3` (a single term, `top`); `None` where
/// `member_from_top` declines.
pub fn three_j_member_from_top(
    tj1: i64,
    tj2: i64,
    tj3: i64,
    tm2: i64,
    tm3: i64,
    top: f64,
) -> Option<f64> {
    let r = ThreeJOverJ1::new(tj2, tj3, tm2, tm3)?;
    if tj1 < r.lo || (tj1 - r.lo) % 2 != 0 {
        return None;
    }
    let target = ((tj1 - r.lo) / 2) as usize;
    member_from_top(r.n, |i| r.abc(i), target, top)
}

/// `(j1, j2, j3; m1, m2, -m1-m2)` for every allowed m2 with the rest
/// fixed (doubled arguments; `first` is the first 2 m2), by the
/// recursion in m2 of Schulten and Gordon 1975:
/// `C(m2+1) f(m2+1) + D(m2) f(m2) + C(m2) f(m2-1) = 0` with
/// `C(m2)^2 = (j2-m2+1)(j2+m2)(j3+m3+1)(j3-m3)` (m3 = -m1-m2) and
/// `D(m2) = j2(j2+1) + j3(j3+1) - j1(j1+1) + 2 m2 m3`; normalised by
/// `Σ (2j1+1) f^2 = 1`.
pub fn three_j_over_m2(tj1: i64, tj2: i64, tj3: i64, tm1: i64) -> Family {
    let triad_ok = (tj1 + tj2 + tj3) % 2 == 0 && tj3 >= (tj1 - tj2).abs() && tj3 <= tj1 + tj2;
    if !triad_ok || tm1.abs() > tj1 || (tj1 - tm1) % 2 != 0 {
        return Family::empty();
    }
    let lo = (-tj2).max(-tj3 - tm1);
    let hi = tj2.min(tj3 - tm1);
    if lo > hi {
        return Family::empty();
    }
    let n = ((hi - lo) / 2 + 1) as usize;
    let (t1, t2, t3, u1) = (tj1 as i128, tj2 as i128, tj3 as i128, tm1 as i128);
    let u_of = |i: usize| (lo + 2 * i as i64) as i128;
    // 16 C(m2)^2 = (t2-u2+2)(t2+u2)(t3+u3+2)(t3-u3), u3 = -u1-u2
    let big_c = |u2: i128| {
        let u3 = -u1 - u2;
        let v = (t2 - u2 + 2) * (t2 + u2) * (t3 + u3 + 2) * (t3 - u3);
        exact_or_rounded(v.max(0)).sqrt() / 4.0
    };
    // 4 D(m2) = T2 + T3 - T1 + 2 u2 u3 with T = t(t+2)
    let big_d = |u2: i128| {
        let u3 = -u1 - u2;
        exact_or_rounded(t2 * (t2 + 2) + t3 * (t3 + 2) - t1 * (t1 + 2) + 2 * u2 * u3) / 4.0
    };
    let c_of: Vec<f64> = (0..=n).map(|i| big_c(u_of(i))).collect();
    let abc = |i: usize| {
        let a = if i + 1 < n { c_of[i + 1] } else { 0.0 };
        let c = if i > 0 { c_of[i] } else { 0.0 };
        (a, big_d(u_of(i)), c)
    };
    let weight = |_: usize| (tj1 + 1) as f64;
    // the last member: m2 = j2 (a single Racah term, sign
    // (-1)^(2j1 - j3 - m3)) or else m3 = -j3 (sign (-1)^(2j1 - j2 - m1 + j3))
    let e = if hi == tj2 {
        let tm3 = -tm1 - hi;
        (2 * tj1 - tj3 - tm3) / 2
    } else {
        (2 * tj1 - tj2 - tm1 + tj3) / 2
    };
    let last_sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
    Family {
        first: lo,
        values: solve(n, abc, weight, last_sign),
    }
}

/// The 6j `{t0, t1, t2; t3, t4, t5}` rewritten by its symmetries
/// (columns permuted, upper and lower rows swapped in two columns) so that
/// the argument at position `p` stands at the top left.
pub fn six_j_with_first(t: [i64; 6], p: usize) -> [i64; 6] {
    let col = p % 3;
    let order = [col, (col + 1) % 3, (col + 2) % 3];
    let mut u = [0i64; 6];
    for (n, &c) in order.iter().enumerate() {
        u[n] = t[c];
        u[3 + n] = t[3 + c];
    }
    if p >= 3 {
        u.swap(0, 3);
        u.swap(1, 4);
    }
    u
}

/// `{j1, j2, j3; l1, l2, l3}` for every allowed j1 (doubled arguments).
pub fn six_j_over_j1(tj2: i64, tj3: i64, tl1: i64, tl2: i64, tl3: i64) -> Family {
    six_j_over_j1_in(tj2, tj3, tl1, tl2, tl3)
}

/// `six_j_over_j1` in double-double: the same recursion with each
/// coefficient rounded once to about 106 bits.
pub fn six_j_over_j1_dd(tj2: i64, tj3: i64, tl1: i64, tl2: i64, tl3: i64) -> Family<Dd> {
    six_j_over_j1_in(tj2, tj3, tl1, tl2, tl3)
}

/// The recursion of the 6j over its first argument (Schulten and Gordon
/// 1975): `j E(j+1) f(j+1) + F(j) f(j) + (j+1) E(j) f(j-1) = 0`, its
/// coefficients exact integers on doubled values before one rounding.
struct SixJOverJ1 {
    lo: i64,
    n: usize,
    t: [i128; 5],
    tl1: i64,
}

impl SixJOverJ1 {
    fn new(tj2: i64, tj3: i64, tl1: i64, tl2: i64, tl3: i64) -> Option<SixJOverJ1> {
        let lo = (tj2 - tj3).abs().max((tl2 - tl3).abs());
        let hi = (tj2 + tj3).min(tl2 + tl3);
        // the other two triads must hold and every triad be integral
        let triad =
            |a: i64, b: i64, c: i64| (a + b + c) % 2 == 0 && c >= (a - b).abs() && c <= a + b;
        let fails = lo > hi
            || (tj2 + tj3 + lo) % 2 != 0
            || (tl2 + tl3 + lo) % 2 != 0
            || !triad(tl1, tj2, tl3)
            || !triad(tl1, tl2, tj3);
        (!fails).then(|| SixJOverJ1 {
            lo,
            n: ((hi - lo) / 2 + 1) as usize,
            t: [tj2, tj3, tl1, tl2, tl3].map(|x| x as i128),
            tl1,
        })
    }

    fn j_of(&self, i: usize) -> f64 {
        half(self.lo) + i as f64
    }

    fn t_of(&self, i: usize) -> i128 {
        (self.lo + 2 * i as i64) as i128
    }

    /// 256 E(j)^2 = (t^2-(t2-t3)^2)((t2+t3+2)^2-t^2)(t^2-(s2-s3)^2)((s2+s3+2)^2-t^2),
    /// taken as two square roots so the product stays within i128.
    fn big_e<T: FamilyNumber>(&self, t: i128) -> T {
        let [t2, t3, _, s2, s3] = self.t;
        let p = (t * t - (t2 - t3) * (t2 - t3)) * ((t2 + t3 + 2) * (t2 + t3 + 2) - t * t);
        let q = (t * t - (s2 - s3) * (s2 - s3)) * ((s2 + s3 + 2) * (s2 + s3 + 2) - t * t);
        (T::from_i128(p.max(0)).sqrt() * T::from_i128(q.max(0)).sqrt()) / T::from_f64(16.0)
    }

    /// F(j) = (2j+1) [JJ(-JJ + A2 + A3 - 2 B1) + B2(JJ + A2 - A3) + B3(JJ - A2 + A3)] / 16
    /// with JJ = t(t+2) = 4 j(j+1) and likewise for the others.
    fn big_f<T: FamilyNumber>(&self, t: i128) -> T {
        let [t2, t3, s1, s2, s3] = self.t;
        let tt = t * (t + 2);
        let (a2, a3) = (t2 * (t2 + 2), t3 * (t3 + 2));
        let (b1, b2, b3) = (s1 * (s1 + 2), s2 * (s2 + 2), s3 * (s3 + 2));
        let inner = tt * (-tt + a2 + a3 - 2 * b1) + b2 * (tt + a2 - a3) + b3 * (tt - a2 + a3);
        T::from_i128((t + 1) * inner) / T::from_f64(16.0)
    }

    /// The coefficients at member i, each E computed where it is used.
    fn abc(&self, i: usize) -> (f64, f64, f64) {
        let j = self.j_of(i);
        let a = if i + 1 < self.n {
            j * self.big_e::<f64>(self.t_of(i + 1))
        } else {
            0.0
        };
        let c = if i > 0 {
            (j + 1.0) * self.big_e::<f64>(self.t_of(i))
        } else {
            0.0
        };
        (a, self.big_f(self.t_of(i)), c)
    }
}

fn six_j_over_j1_in<T: FamilyNumber>(
    tj2: i64,
    tj3: i64,
    tl1: i64,
    tl2: i64,
    tl3: i64,
) -> Family<T> {
    let Some(r) = SixJOverJ1::new(tj2, tj3, tl1, tl2, tl3) else {
        return Family::empty();
    };
    let (n, num) = (r.n, T::from_f64);
    let l1 = half(r.tl1);
    // each E once
    let e_of: Vec<T> = (0..=n).map(|i| r.big_e(r.t_of(i))).collect();
    let abc = |i: usize| {
        let j = r.j_of(i);
        let a = if i + 1 < n {
            num(j) * e_of[i + 1]
        } else {
            num(0.0)
        };
        let c = if i > 0 {
            num(j + 1.0) * e_of[i]
        } else {
            num(0.0)
        };
        (a, r.big_f(r.t_of(i)), c)
    };
    let weight = |i: usize| num((2.0 * r.j_of(i) + 1.0) * (2.0 * l1 + 1.0));
    // the last member has the sign (-1)^(j2+j3+l2+l3)
    let e = (tj2 + tj3 + tl2 + tl3) / 2;
    let last_sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
    Family {
        first: r.lo,
        values: solve(n, abc, weight, last_sign),
    }
}

/// `{j1, j2, j3; l1, l2, l3}` for one j1 by the recursion over j1 from the
/// top of its range, whose value `top` is given; `None` where
/// `member_from_top` declines.
pub fn six_j_member_from_top(t: [i64; 6], top: f64) -> Option<f64> {
    let r = SixJOverJ1::new(t[1], t[2], t[3], t[4], t[5])?;
    if t[0] < r.lo || (t[0] - r.lo) % 2 != 0 {
        return None;
    }
    let target = ((t[0] - r.lo) / 2) as usize;
    member_from_top(r.n, |i| r.abc(i), target, top)
}

/// The doubled top of the range of the first argument of a 6j.
pub fn six_j_top_j1(t: [i64; 6]) -> i64 {
    (t[1] + t[2]).min(t[4] + t[5])
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::numeric::float::{
        six_j_single_sum_f64 as six_j_f64, three_j_single_sum_f64 as three_j_f64,
    };

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
    fn three_j_m_families_match_single_values() {
        for (j1, j2, j3, m1) in [
            (2, 2, 2, 0),
            (2, 2, 0, 2),
            (4, 6, 4, 2),
            (21, 17, 10, -3),
            (40, 40, 40, 0),
            (100, 60, 80, 20),
            (201, 199, 100, -51),
            (0, 4, 4, 0),
        ] {
            let f = three_j_over_m2(j1, j2, j3, m1);
            assert!(!f.values.is_empty(), "{:?}", (j1, j2, j3, m1));
            let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
            for (i, v) in f.values.iter().enumerate() {
                let m2 = f.argument(i);
                let want = three_j_f64([j1, j2, j3], [m1, m2, -m1 - m2]);
                let err = (v - want).abs() / want.abs().max(biggest * 1e-6);
                assert!(err < 1e-12, "{:?} m2 {m2}: {v} vs {want}", (j1, j2, j3, m1));
            }
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
