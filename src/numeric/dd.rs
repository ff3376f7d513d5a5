//! Double-double arithmetic (about 106 bits) and an extended-exponent
//! wrapper `Xf = dd * 2^e`, so that products of huge factorials neither
//! overflow nor lose precision. Used only by the floating-point symbols.

use std::ops::{Add, Div, Mul, Neg, Sub};

/// An unevaluated sum `hi + lo` with `|lo| <= ulp(hi)/2`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Dd {
    /// leading part
    pub hi: f64,
    /// trailing part
    pub lo: f64,
}

#[inline]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

#[inline]
fn quick_two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    (s, b - (s - a))
}

#[inline]
fn two_prod(a: f64, b: f64) -> (f64, f64) {
    let p = a * b;
    (p, a.mul_add(b, -p))
}

impl Dd {
    /// Zero.
    pub const ZERO: Dd = Dd { hi: 0.0, lo: 0.0 };
    /// One.
    pub const ONE: Dd = Dd { hi: 1.0, lo: 0.0 };

    /// An f64.
    pub fn from_f64(x: f64) -> Dd {
        Dd { hi: x, lo: 0.0 }
    }

    /// An integer up to 2^106 in magnitude, exactly.
    pub fn from_u128(n: u128) -> Dd {
        let hi = n as f64;
        let diff = n as i128 - hi as i128;
        let (hi, lo) = quick_two_sum(hi, diff as f64);
        Dd { hi, lo }
    }

    /// Nearest f64.
    pub fn to_f64(self) -> f64 {
        self.hi + self.lo
    }

    /// Absolute value.
    pub fn abs(self) -> Dd {
        if self.hi < 0.0 {
            -self
        } else {
            self
        }
    }

    /// Square root (Newton step on the f64 root).
    pub fn sqrt(self) -> Dd {
        if self.hi <= 0.0 {
            return Dd::ZERO;
        }
        let x = self.hi.sqrt();
        let (p, e) = two_prod(x, x);
        let r = ((self.hi - p - e) + self.lo) / (2.0 * x);
        let (hi, lo) = quick_two_sum(x, r);
        Dd { hi, lo }
    }

    /// Product with an f64.
    #[inline]
    pub fn mul_f64(self, b: f64) -> Dd {
        let (p, e) = two_prod(self.hi, b);
        let (hi, lo) = quick_two_sum(p, e + self.lo * b);
        Dd { hi, lo }
    }

    /// Quotient by an f64.
    #[inline]
    pub fn div_f64(self, b: f64) -> Dd {
        let q1 = self.hi / b;
        let (p, e) = two_prod(q1, b);
        let r = ((self.hi - p) - e + self.lo) / b;
        let (hi, lo) = quick_two_sum(q1, r);
        Dd { hi, lo }
    }

    /// Multiplies by an exact power of two.
    pub fn ldexp(self, e: i32) -> Dd {
        let s = pow2(e);
        Dd {
            hi: self.hi * s,
            lo: self.lo * s,
        }
    }
}

/// 2^e as an f64 for |e| <= 1022.
#[inline]
pub fn pow2(e: i32) -> f64 {
    f64::from_bits(((e + 1023) as u64) << 52)
}

/// The binary exponent of a finite nonzero f64: x = m 2^e, m in [1, 2).
#[inline]
pub fn exponent(x: f64) -> i32 {
    let bits = x.to_bits();
    let e = ((bits >> 52) & 0x7ff) as i32;
    if e == 0 {
        // subnormal
        exponent(x * pow2(600)) - 600
    } else {
        e - 1023
    }
}

impl Add for Dd {
    type Output = Dd;
    #[inline]
    fn add(self, b: Dd) -> Dd {
        let (s, e) = two_sum(self.hi, b.hi);
        let (t, f) = two_sum(self.lo, b.lo);
        let (s, e) = quick_two_sum(s, e + t);
        let (hi, lo) = quick_two_sum(s, e + f);
        Dd { hi, lo }
    }
}

impl Neg for Dd {
    type Output = Dd;
    #[inline]
    fn neg(self) -> Dd {
        Dd {
            hi: -self.hi,
            lo: -self.lo,
        }
    }
}

impl Sub for Dd {
    type Output = Dd;
    #[inline]
    fn sub(self, b: Dd) -> Dd {
        self + (-b)
    }
}

impl Mul for Dd {
    type Output = Dd;
    #[inline]
    fn mul(self, b: Dd) -> Dd {
        let (p, e) = two_prod(self.hi, b.hi);
        let e = e + (self.hi * b.lo + self.lo * b.hi);
        let (hi, lo) = quick_two_sum(p, e);
        Dd { hi, lo }
    }
}

impl Div for Dd {
    type Output = Dd;
    #[inline]
    fn div(self, b: Dd) -> Dd {
        let q1 = self.hi / b.hi;
        let r = self - b * Dd::from_f64(q1);
        let q2 = r.hi / b.hi;
        let r = r - b * Dd::from_f64(q2);
        let q3 = r.hi / b.hi;
        let (hi, lo) = quick_two_sum(q1, q2);
        Dd { hi, lo } + Dd::from_f64(q3)
    }
}

/// `m * 2^e` with a double-double mantissa kept within 2^±256 (so one
/// product or quotient of two mantissas cannot overflow).
#[derive(Clone, Copy, Debug)]
pub struct Xf {
    /// mantissa
    pub m: Dd,
    /// binary exponent
    pub e: i64,
}

const RENORM: i32 = 256;

impl Xf {
    /// Zero.
    pub const ZERO: Xf = Xf { m: Dd::ZERO, e: 0 };
    /// One.
    pub const ONE: Xf = Xf { m: Dd::ONE, e: 0 };

    /// From a double-double.
    pub fn from_dd(m: Dd) -> Xf {
        Xf { m, e: 0 }.norm()
    }

    /// Brings the mantissa back near 1 when it drifted far.
    #[inline]
    pub fn norm(self) -> Xf {
        if self.m.hi == 0.0 {
            return Xf::ZERO;
        }
        let ex = exponent(self.m.hi);
        if ex.abs() < RENORM {
            return self;
        }
        Xf {
            m: self.m.ldexp(-ex),
            e: self.e + ex as i64,
        }
    }

    /// True for 0.
    pub fn is_zero(&self) -> bool {
        self.m.hi == 0.0
    }

    /// Absolute value.
    pub fn abs(self) -> Xf {
        Xf {
            m: self.m.abs(),
            e: self.e,
        }
    }

    /// Square root.
    pub fn sqrt(self) -> Xf {
        if self.e % 2 != 0 {
            Xf {
                m: self.m.ldexp(1).sqrt(),
                e: (self.e - 1) / 2,
            }
        } else {
            Xf {
                m: self.m.sqrt(),
                e: self.e / 2,
            }
        }
    }

    /// The nearest f64 (0 or ±inf outside the f64 range).
    pub fn to_f64(self) -> f64 {
        super::surd::ldexp(self.m.to_f64(), self.e)
    }

    /// The binary exponent of the magnitude (`floor(log2 |x|)`).
    #[inline]
    pub fn ilog(self) -> i64 {
        exponent(self.m.hi) as i64 + self.e
    }

    /// log2 of the magnitude (approximate; for comparisons).
    pub fn log2(self) -> f64 {
        if self.is_zero() {
            f64::NEG_INFINITY
        } else {
            self.m.hi.abs().log2() + self.e as f64
        }
    }
}

impl Mul for Xf {
    type Output = Xf;
    #[inline]
    fn mul(self, b: Xf) -> Xf {
        Xf {
            m: self.m * b.m,
            e: self.e + b.e,
        }
        .norm()
    }
}

impl Div for Xf {
    type Output = Xf;
    #[inline]
    fn div(self, b: Xf) -> Xf {
        Xf {
            m: self.m / b.m,
            e: self.e - b.e,
        }
        .norm()
    }
}

impl Add for Xf {
    type Output = Xf;
    #[inline]
    fn add(self, b: Xf) -> Xf {
        if self.is_zero() {
            return b;
        }
        if b.is_zero() {
            return self;
        }
        let (big, small) = if self.ilog() >= b.ilog() {
            (self, b)
        } else {
            (b, self)
        };
        let d = small.e - big.e;
        if d < -1000 {
            return big;
        }
        let shifted = if d < -RENORM as i64 {
            small.m.ldexp(-RENORM).ldexp((d + RENORM as i64) as i32)
        } else {
            small.m.ldexp(d as i32)
        };
        Xf {
            m: big.m + shifted,
            e: big.e,
        }
        .norm()
    }
}

impl Neg for Xf {
    type Output = Xf;
    fn neg(self) -> Xf {
        Xf {
            m: -self.m,
            e: self.e,
        }
    }
}

impl Sub for Xf {
    type Output = Xf;
    fn sub(self, b: Xf) -> Xf {
        self + (-b)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn double_double_keeps_digits_a_double_loses() {
        let third = Dd::ONE / Dd::from_f64(3.0);
        let back = third * Dd::from_f64(3.0) - Dd::ONE;
        assert!(back.to_f64().abs() < 1e-31);
        let two = Dd::from_f64(2.0).sqrt();
        assert!((two * two - Dd::from_f64(2.0)).to_f64().abs() < 1e-31);
        let big = Dd::from_u128((1u128 << 100) + 12345);
        assert_eq!(
            big.hi as u128 as i128 + big.lo as i128,
            (1i128 << 100) + 12345
        );
    }

    #[test]
    fn extended_exponents_survive_huge_products() {
        let mut x = Xf::ONE;
        for _ in 0..10_000 {
            x = x * Xf::from_dd(Dd::from_f64(1e10));
        }
        for _ in 0..10_000 {
            x = x / Xf::from_dd(Dd::from_f64(1e10));
        }
        assert!((x.to_f64() - 1.0).abs() < 1e-25);
    }
}
