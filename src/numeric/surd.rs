//! Exact values: `Surd`, a canonical finite sum `Σ q_i sqrt(s_i)` with
//! rational `q_i ≠ 0` and distinct square-free integers `s_i ≥ 1`.
//! Constructors normalise, so two equal values are equal structurally.

use num_bigint::{BigInt, BigUint, Sign};
use num_integer::{Integer, Roots};
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::BTreeMap;
use std::fmt;
use std::ops::{Add, Mul, Neg, Sub};

/// Largest integer whose square-free part `Surd::sqrt_of` will find by
/// trial division (values from symbols arrive factored and skip this).
pub const SQRT_FACTOR_LIMIT: u128 = 1u128 << 64;

/// An exact real number of the form `Σ q_i sqrt(s_i)`.
#[derive(Clone, PartialEq, Eq, Hash, Default)]
pub struct Surd {
    /// square-free radicand -> nonzero rational coefficient
    terms: BTreeMap<BigUint, BigRational>,
}

/// The error for a square root this module cannot take exactly.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum SurdError {
    /// The root of a negative number.
    #[error("square root of a negative number ({0})")]
    Negative(String),
    /// The root of a number too large to factor by trial division.
    #[error("square root of {0}: the number is too large to factor exactly")]
    TooLarge(String),
    /// The root of a value that is not a single rational.
    #[error("square root of {0}: only the root of a rational number is exact here")]
    NotRational(String),
}

impl Surd {
    /// Zero.
    pub fn zero() -> Self {
        Surd::default()
    }

    /// One.
    pub fn one() -> Self {
        Surd::from_rational(BigRational::one())
    }

    /// An integer.
    pub fn from_int(n: i64) -> Self {
        Surd::from_rational(BigRational::from_integer(BigInt::from(n)))
    }

    /// A rational.
    pub fn from_rational(q: BigRational) -> Self {
        let mut terms = BTreeMap::new();
        if !q.is_zero() {
            terms.insert(BigUint::one(), q);
        }
        Surd { terms }
    }

    /// `q * sqrt(s)` for a square-free `s` the caller guarantees.
    pub fn monomial_squarefree(q: BigRational, s: BigUint) -> Self {
        let mut terms = BTreeMap::new();
        if !q.is_zero() {
            assert!(!s.is_zero(), "zero radicand");
            terms.insert(s, q);
        }
        Surd { terms }
    }

    /// `sign * sqrt(r)` for a rational `r ≥ 0`.
    pub fn signed_sqrt(negative: bool, r: &BigRational) -> Result<Self, SurdError> {
        if r.is_negative() {
            return Err(SurdError::Negative(r.to_string()));
        }
        if r.is_zero() {
            return Ok(Surd::zero());
        }
        // sqrt(n/d) = sqrt(n d) / d
        let n = r.numer().magnitude() * r.denom().magnitude();
        let (root, free) = squarefree_split(&n)?;
        let q = BigRational::new(BigInt::from(root), r.denom().clone());
        let q = if negative { -q } else { q };
        Ok(Surd::monomial_squarefree(q, free))
    }

    /// The square root of this value, which must be a nonnegative
    /// rational (or `q^2 s` with one radicand, giving `q sqrt(sqrt(s))`,
    /// which is refused).
    pub fn sqrt(&self) -> Result<Self, SurdError> {
        match self.as_rational() {
            Some(r) => Surd::signed_sqrt(false, &r),
            None => Err(SurdError::NotRational(self.to_string())),
        }
    }

    /// True for the value 0.
    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }

    /// The value as a rational, when it is one.
    pub fn as_rational(&self) -> Option<BigRational> {
        match self.terms.len() {
            0 => Some(BigRational::zero()),
            1 => {
                let (s, q) = self.terms.iter().next().unwrap();
                if s.is_one() {
                    Some(q.clone())
                } else {
                    None
                }
            }
            _ => None,
        }
    }

    /// The square of a single-radicand value, `q^2 s`, as a signed rational
    /// `(negative, q^2 s)`; `None` for a sum of several radicands.
    pub fn as_signed_square(&self) -> Option<(bool, BigRational)> {
        match self.terms.len() {
            0 => Some((false, BigRational::zero())),
            1 => {
                let (s, q) = self.terms.iter().next().unwrap();
                let sq = q * q * BigRational::from_integer(BigInt::from(s.clone()));
                Some((q.is_negative(), sq))
            }
            _ => None,
        }
    }

    /// The terms `(s, q)` in increasing order of `s`.
    pub fn terms(&self) -> impl Iterator<Item = (&BigUint, &BigRational)> {
        self.terms.iter()
    }

    /// Sign of the value: -1, 0 or 1.
    pub fn signum(&self) -> i32 {
        let v = self.to_f64();
        if self.is_zero() {
            0
        } else if v > 0.0 {
            1
        } else if v < 0.0 {
            -1
        } else {
            // below f64 range: decide by the dominant term exactly enough
            let (_, q) = self.terms.iter().next().unwrap();
            if q.is_positive() {
                1
            } else {
                -1
            }
        }
    }

    /// The nearest f64 (each term converted with its exponent kept apart,
    /// so huge numerators and denominators do not overflow).
    pub fn to_f64(&self) -> f64 {
        let mut hi = 0.0f64;
        let mut lo = 0.0f64;
        for (s, q) in &self.terms {
            let (m, e) = rational_to_mantissa_exp(q);
            let (sm, se) = biguint_to_mantissa_exp(s);
            // sqrt(sm 2^se): make se even
            let (sm, se) = if se % 2 != 0 {
                (sm * 2.0, se - 1)
            } else {
                (sm, se)
            };
            let v = m * sm.sqrt();
            let t = ldexp(v, e + se / 2);
            let (s2, err) = two_sum(hi, t);
            hi = s2;
            lo += err;
        }
        hi + lo
    }

    /// `self^n` for a nonnegative integer power.
    pub fn pow(&self, n: u32) -> Surd {
        let mut acc = Surd::one();
        for _ in 0..n {
            acc = &acc * self;
        }
        acc
    }

    /// The reciprocal of a single-radicand value (`1/(q sqrt s) = sqrt(s)/(q s)`).
    pub fn recip(&self) -> Option<Surd> {
        if self.terms.len() != 1 {
            return None;
        }
        let (s, q) = self.terms.iter().next().unwrap();
        let denom = q * BigRational::from_integer(BigInt::from(s.clone()));
        Some(Surd::monomial_squarefree(denom.recip(), s.clone()))
    }
}

fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    let err = (a - (s - bb)) + (b - bb);
    (s, err)
}

/// `x * 2^e` without intermediate overflow.
pub fn ldexp(x: f64, e: i64) -> f64 {
    let mut x = x;
    let mut e = e;
    while e > 1000 {
        x *= 2f64.powi(1000);
        e -= 1000;
        if x.is_infinite() {
            return x;
        }
    }
    while e < -1000 {
        x *= 2f64.powi(-1000);
        e += 1000;
        if x == 0.0 {
            return x;
        }
    }
    x * 2f64.powi(e as i32)
}

/// `n = m * 2^e` with `m` in [1, 2) (or 0).
pub fn biguint_to_mantissa_exp(n: &BigUint) -> (f64, i64) {
    let bits = n.bits();
    if bits == 0 {
        return (0.0, 0);
    }
    if bits <= 64 {
        let v = n.to_u64().unwrap() as f64;
        return (v, 0);
    }
    let shift = bits - 64;
    let top = (n >> shift).to_u64().unwrap() as f64;
    (top, shift as i64)
}

fn rational_to_mantissa_exp(q: &BigRational) -> (f64, i64) {
    let (nm, ne) = biguint_to_mantissa_exp(q.numer().magnitude());
    let (dm, de) = biguint_to_mantissa_exp(q.denom().magnitude());
    let v = nm / dm;
    let v = if q.numer().sign() == Sign::Minus {
        -v
    } else {
        v
    };
    (v, ne - de)
}

/// Splits `n = root^2 * free` with `free` square-free. Trial division up to
/// the cube root, then a perfect-square test on the remaining cofactor
/// (which then has at most two prime factors).
pub fn squarefree_split(n: &BigUint) -> Result<(BigUint, BigUint), SurdError> {
    if n.is_zero() {
        return Ok((BigUint::zero(), BigUint::one()));
    }
    let Some(mut m) = n.to_u128() else {
        return Err(SurdError::TooLarge(n.to_string()));
    };
    if m > SQRT_FACTOR_LIMIT {
        return Err(SurdError::TooLarge(n.to_string()));
    }
    let mut root: u128 = 1;
    let mut free: u128 = 1;
    let mut p: u128 = 2;
    while p * p * p <= m {
        if m % p == 0 {
            let mut e = 0;
            while m % p == 0 {
                m /= p;
                e += 1;
            }
            root *= p.pow(e / 2);
            if e % 2 == 1 {
                free *= p;
            }
        }
        p += if p == 2 { 1 } else { 2 };
    }
    // m is 1, a prime, a product of two distinct primes, or a prime square
    if m > 1 {
        let r = m.sqrt();
        if r * r == m {
            root *= r;
        } else {
            free *= m;
        }
    }
    Ok((BigUint::from(root), BigUint::from(free)))
}

impl Add for &Surd {
    type Output = Surd;
    fn add(self, rhs: &Surd) -> Surd {
        let mut terms = self.terms.clone();
        for (s, q) in &rhs.terms {
            let entry = terms.entry(s.clone()).or_insert_with(BigRational::zero);
            *entry += q;
            if entry.is_zero() {
                terms.remove(s);
            }
        }
        Surd { terms }
    }
}

impl Sub for &Surd {
    type Output = Surd;
    fn sub(self, rhs: &Surd) -> Surd {
        self + &(-rhs)
    }
}

impl Neg for &Surd {
    type Output = Surd;
    fn neg(self) -> Surd {
        Surd {
            terms: self.terms.iter().map(|(s, q)| (s.clone(), -q)).collect(),
        }
    }
}

impl Mul for &Surd {
    type Output = Surd;
    fn mul(self, rhs: &Surd) -> Surd {
        let mut out = Surd::zero();
        for (s1, q1) in &self.terms {
            for (s2, q2) in &rhs.terms {
                // sqrt(s1) sqrt(s2) = g sqrt(s1 s2 / g^2), g = gcd(s1, s2)
                let g = s1.gcd(s2);
                let s = (s1 / &g) * (s2 / &g);
                let q = q1 * q2 * BigRational::from_integer(BigInt::from(g));
                out = &out + &Surd::monomial_squarefree(q, s);
            }
        }
        out
    }
}

macro_rules! owned_ops {
    ($($tr:ident $m:ident),*) => {$(
        impl $tr for Surd {
            type Output = Surd;
            fn $m(self, rhs: Surd) -> Surd { (&self).$m(&rhs) }
        }
        impl $tr<&Surd> for Surd {
            type Output = Surd;
            fn $m(self, rhs: &Surd) -> Surd { (&self).$m(rhs) }
        }
    )*};
}
owned_ops!(Add add, Sub sub, Mul mul);

impl Neg for Surd {
    type Output = Surd;
    fn neg(self) -> Surd {
        -&self
    }
}

/// Prints one term `q sqrt(s)` as `p/q`, `sqrt(p/q)` or `-sqrt(p/q)`.
fn fmt_term(q: &BigRational, s: &BigUint) -> String {
    if s.is_one() {
        return fmt_rational(q);
    }
    let sq = q * q * BigRational::from_integer(BigInt::from(s.clone()));
    let inner = fmt_rational(&sq);
    if q.is_negative() {
        format!("-sqrt({inner})")
    } else {
        format!("sqrt({inner})")
    }
}

/// A rational as `n` or `n/d`.
pub fn fmt_rational(q: &BigRational) -> String {
    if q.denom().is_one() {
        q.numer().to_string()
    } else {
        format!("{}/{}", q.numer(), q.denom())
    }
}

impl fmt::Display for Surd {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.terms.is_empty() {
            return write!(f, "0");
        }
        let mut first = true;
        for (s, q) in &self.terms {
            let t = fmt_term(q, s);
            if first {
                write!(f, "{t}")?;
                first = false;
            } else if let Some(rest) = t.strip_prefix('-') {
                write!(f, " - {rest}")?;
            } else {
                write!(f, " + {t}")?;
            }
        }
        Ok(())
    }
}

impl fmt::Debug for Surd {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Surd({self})")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64, d: i64) -> BigRational {
        BigRational::new(BigInt::from(n), BigInt::from(d))
    }

    #[test]
    fn roots_print_with_square_free_parts_inside() {
        let half = Surd::signed_sqrt(false, &q(1, 2)).unwrap();
        assert_eq!(half.to_string(), "sqrt(1/2)");
        let m = Surd::signed_sqrt(true, &q(2, 3)).unwrap();
        assert_eq!(m.to_string(), "-sqrt(2/3)");
        assert_eq!(
            Surd::signed_sqrt(false, &q(4, 9)).unwrap().to_string(),
            "2/3"
        );
        assert_eq!(Surd::zero().to_string(), "0");
    }

    #[test]
    fn products_and_sums_stay_canonical() {
        let a = Surd::signed_sqrt(false, &q(1, 2)).unwrap();
        let b = Surd::signed_sqrt(false, &q(2, 1)).unwrap();
        assert_eq!((&a * &b).to_string(), "1");
        let c = Surd::signed_sqrt(false, &q(3, 1)).unwrap();
        let sum = &(&a + &c) - &a;
        assert_eq!(sum, c);
        let mixed = &Surd::from_int(1) - &c;
        assert_eq!(mixed.to_string(), "1 - sqrt(3)");
        assert!((mixed.to_f64() - (1.0 - 3f64.sqrt())).abs() < 1e-15);
    }

    #[test]
    fn squarefree_split_handles_prime_squares_above_the_cube_root() {
        let n = BigUint::from(1_000_003u64 * 1_000_003u64 * 12);
        let (r, f) = squarefree_split(&n).unwrap();
        assert_eq!(r, BigUint::from(2_000_006u64));
        assert_eq!(f, BigUint::from(3u32));
    }
}
