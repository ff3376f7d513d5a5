//! Exact values in factored form for fast products: `±sqrt(Π p_i^{e_i})`
//! with the exponents in a small vector indexed by prime position. A
//! product is a vector sum; a sum of many products is grouped by the
//! parity of the exponents (the square-free part) and accumulated as an
//! exact integer over the least exponents, then turned into a `Surd`.

use super::primes::{prime_at, with_primes_upto};
use super::surd::Surd;
use num_bigint::{BigInt, BigUint};
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// Largest integer factored by trial division here.
const FACTOR_LIMIT: u64 = 1 << 40;

/// `±sqrt(Π p_i^{e_i})`.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Factored {
    /// the sign
    pub neg: bool,
    /// exponents by prime index
    pub exps: Vec<i32>,
}

fn add_factors(exps: &mut Vec<i32>, n: &BigUint, times: i32) -> Option<()> {
    let mut m = n.to_u64()?;
    if m == 0 {
        return None;
    }
    if m > FACTOR_LIMIT {
        return None;
    }
    let limit = (m as f64).sqrt() as usize + 2;
    with_primes_upto(limit.max(2), |primes| {
        for (i, &p) in primes.iter().enumerate() {
            if p * p > m {
                break;
            }
            while m.is_multiple_of(p) {
                if exps.len() <= i {
                    exps.resize(i + 1, 0);
                }
                exps[i] += times;
                m /= p;
            }
        }
    });
    if m > 1 {
        // m is prime: find its index
        let idx = with_primes_upto(m as usize, |primes| primes.partition_point(|&p| p < m));
        if exps.len() <= idx {
            exps.resize(idx + 1, 0);
        }
        exps[idx] += times;
    }
    Some(())
}

impl Factored {
    /// One.
    pub fn one() -> Self {
        Factored::default()
    }

    /// The factored form of a single-radical value (`None` for 0, for a
    /// sum of radicals, or for numbers too large to factor here).
    pub fn of(v: &Surd) -> Option<Factored> {
        let mut it = v.terms();
        let (s, q) = it.next()?;
        if it.next().is_some() {
            return None;
        }
        let mut exps = Vec::new();
        add_factors(&mut exps, q.numer().magnitude(), 2)?;
        add_factors(&mut exps, q.denom().magnitude(), -2)?;
        add_factors(&mut exps, s, 1)?;
        Some(Factored {
            neg: q.is_negative(),
            exps,
        })
    }

    /// Multiplies in place.
    pub fn mul_assign(&mut self, o: &Factored) {
        self.neg ^= o.neg;
        if self.exps.len() < o.exps.len() {
            self.exps.resize(o.exps.len(), 0);
        }
        for (a, b) in self.exps.iter_mut().zip(&o.exps) {
            *a += b;
        }
    }
}

/// A running exact sum of factored values.
#[derive(Clone, Debug, Default)]
pub struct FactoredSum {
    /// (parity vector, least exponents, integer total over them)
    groups: Vec<(Vec<u8>, Vec<i32>, BigInt)>,
}

fn trim_parity(exps: &[i32]) -> Vec<u8> {
    let mut p: Vec<u8> = exps.iter().map(|e| e.rem_euclid(2) as u8).collect();
    while p.last() == Some(&0) {
        p.pop();
    }
    p
}

fn pow_product(diff: &[i32]) -> BigUint {
    // Π p_i^{d_i / 2} for even nonnegative d_i
    let mut small: u128 = 1;
    let mut big = BigUint::one();
    for (i, &d) in diff.iter().enumerate() {
        if d == 0 {
            continue;
        }
        let p = prime_at(i) as u128;
        for _ in 0..(d / 2) {
            match small.checked_mul(p) {
                Some(v) if v < (1u128 << 100) => small = v,
                _ => {
                    big *= small;
                    small = p;
                }
            }
        }
    }
    big * small
}

impl FactoredSum {
    /// The empty sum.
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds a value.
    pub fn add(&mut self, v: &Factored) {
        let parity = trim_parity(&v.exps);
        let sign = if v.neg { -BigInt::one() } else { BigInt::one() };
        let pos = self.groups.iter().position(|g| g.0 == parity);
        let Some(pos) = pos else {
            self.groups.push((parity, v.exps.clone(), sign));
            return;
        };
        let (_, base, total) = &mut self.groups[pos];
        let n = base.len().max(v.exps.len());
        base.resize(n, 0);
        let mut e = v.exps.clone();
        e.resize(n, 0);
        // lower the base where the new value is smaller
        let mut lower = vec![0i32; n];
        for i in 0..n {
            if e[i] < base[i] {
                lower[i] = base[i] - e[i];
                base[i] = e[i];
            }
        }
        if lower.iter().any(|x| *x != 0) {
            *total *= BigInt::from(pow_product(&lower));
        }
        let diff: Vec<i32> = (0..n).map(|i| e[i] - base[i]).collect();
        *total += sign * BigInt::from(pow_product(&diff));
    }

    /// The sum as a canonical `Surd`.
    pub fn finish(&self) -> Surd {
        let mut out = Surd::zero();
        for (_, base, total) in &self.groups {
            if total.is_zero() {
                continue;
            }
            // total * sqrt(Π p^base)
            let mut num = BigUint::one();
            let mut den = BigUint::one();
            let mut free = BigUint::one();
            for (i, &e) in base.iter().enumerate() {
                if e == 0 {
                    continue;
                }
                let p = BigUint::from(prime_at(i));
                let half = Integer::div_floor(&e, &2);
                if e.rem_euclid(2) == 1 {
                    free *= &p;
                }
                if half > 0 {
                    num *= p.pow(half as u32);
                } else if half < 0 {
                    den *= p.pow((-half) as u32);
                }
            }
            let q = BigRational::new(total * BigInt::from(num), BigInt::from(den));
            out = &out + &Surd::monomial_squarefree(q, free);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factored_products_and_sums_are_exact() {
        let h = Surd::signed_sqrt(false, &BigRational::new(1.into(), 2.into())).unwrap();
        let t = Surd::signed_sqrt(true, &BigRational::new(2.into(), 3.into())).unwrap();
        let mut p = Factored::of(&h).unwrap();
        p.mul_assign(&Factored::of(&t).unwrap());
        let mut s = FactoredSum::new();
        s.add(&p);
        s.add(&Factored::of(&Surd::from_int(3)).unwrap());
        let want = &(&h * &t) + &Surd::from_int(3);
        assert_eq!(s.finish(), want);
    }
}
