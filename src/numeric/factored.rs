//! Exact values in factored form for fast products: `±sqrt(Π p_i^{e_i})`
//! with the exponents of small primes in a vector indexed by prime
//! position and those of large primes in a short sorted list (so a value
//! with one large prime factor costs one entry, never a sieve up to that
//! prime). A product is an exponent sum; a sum of many products is grouped
//! by the parity of the exponents (the square-free part) and accumulated
//! as an exact integer over the least exponents, then turned into a `Surd`.

use super::primes::{prime_at, with_primes_upto};
use super::surd::Surd;
use num_bigint::{BigInt, BigUint};
use num_integer::Integer;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// Largest integer factored by trial division here.
const FACTOR_LIMIT: u64 = 1 << 40;

/// Primes below this bound are kept by index (the sieve reaches it);
/// larger ones in the sparse list.
const INDEXED_PRIME_LIMIT: u64 = 1 << 16;

/// `±sqrt(Π p_i^{e_i})`.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Factored {
    /// the sign
    pub neg: bool,
    /// exponents of the small primes, by prime index
    pub exps: Vec<i32>,
    /// exponents of primes at or above 2^16, sorted by prime, none zero
    pub large: Vec<(u64, i32)>,
}

/// Adds `times` to the exponent of a large prime in a sorted sparse list.
fn add_large(large: &mut Vec<(u64, i32)>, p: u64, times: i32) {
    match large.binary_search_by_key(&p, |x| x.0) {
        Ok(i) => {
            large[i].1 += times;
            if large[i].1 == 0 {
                large.remove(i);
            }
        }
        Err(i) => large.insert(i, (p, times)),
    }
}

fn add_factors(f: &mut Factored, n: &BigUint, times: i32) -> Option<()> {
    let mut m = n.to_u64()?;
    if m == 0 || m > FACTOR_LIMIT {
        return None;
    }
    // trial division up to sqrt(m) <= 2^20 (a sieve of at most a million)
    let limit = ((m as f64).sqrt() as usize + 2).max(2);
    with_primes_upto(limit, |primes| {
        for (i, &p) in primes.iter().enumerate() {
            if p * p > m {
                break;
            }
            while m.is_multiple_of(p) {
                if p < INDEXED_PRIME_LIMIT {
                    if f.exps.len() <= i {
                        f.exps.resize(i + 1, 0);
                    }
                    f.exps[i] += times;
                } else {
                    add_large(&mut f.large, p, times);
                }
                m /= p;
            }
        }
    });
    if m > 1 {
        // what is left is a prime
        if m < INDEXED_PRIME_LIMIT {
            let idx = with_primes_upto(INDEXED_PRIME_LIMIT as usize, |primes| {
                primes.partition_point(|&p| p < m)
            });
            if f.exps.len() <= idx {
                f.exps.resize(idx + 1, 0);
            }
            f.exps[idx] += times;
        } else {
            add_large(&mut f.large, m, times);
        }
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
        let mut f = Factored::default();
        add_factors(&mut f, q.numer().magnitude(), 2)?;
        add_factors(&mut f, q.denom().magnitude(), -2)?;
        add_factors(&mut f, s, 1)?;
        f.neg = q.is_negative();
        Some(f)
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
        for &(p, e) in &o.large {
            add_large(&mut self.large, p, e);
        }
    }
}

/// The key of a group of a sum: which primes have odd exponents.
#[derive(Clone, Debug, PartialEq, Eq)]
struct Parity {
    small: Vec<u8>,
    large: Vec<u64>,
}

fn parity(v: &Factored) -> Parity {
    let mut small: Vec<u8> = v.exps.iter().map(|e| e.rem_euclid(2) as u8).collect();
    while small.last() == Some(&0) {
        small.pop();
    }
    let large = v
        .large
        .iter()
        .filter(|(_, e)| e.rem_euclid(2) == 1)
        .map(|(p, _)| *p)
        .collect();
    Parity { small, large }
}

/// One group of a running sum: every value in it is an integer times
/// `sqrt(Π p^base)`.
#[derive(Clone, Debug)]
struct Group {
    key: Parity,
    base: Vec<i32>,
    base_large: Vec<(u64, i32)>,
    total: BigInt,
}

/// `Π p^{d/2}` over even nonnegative exponents, small primes by index and
/// large ones listed.
fn pow_product(diff: &[i32], large: &[(u64, i32)]) -> BigUint {
    let mut small: u128 = 1;
    let mut big = BigUint::one();
    let primes = diff
        .iter()
        .enumerate()
        .filter(|(_, d)| **d != 0)
        .map(|(i, &d)| (prime_at(i), d))
        .chain(large.iter().copied());
    for (p, d) in primes {
        let p = p as u128;
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

/// A running exact sum of factored values.
#[derive(Clone, Debug, Default)]
pub struct FactoredSum {
    groups: Vec<Group>,
}

impl FactoredSum {
    /// The empty sum.
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds a value.
    pub fn add(&mut self, v: &Factored) {
        let key = parity(v);
        let sign = if v.neg { -BigInt::one() } else { BigInt::one() };
        let Some(g) = self.groups.iter_mut().find(|g| g.key == key) else {
            self.groups.push(Group {
                key,
                base: v.exps.clone(),
                base_large: v.large.clone(),
                total: sign,
            });
            return;
        };
        let n = g.base.len().max(v.exps.len());
        g.base.resize(n, 0);
        let mut e = v.exps.clone();
        e.resize(n, 0);
        // lower the base where the new value is smaller
        let mut lower = vec![0i32; n];
        for i in 0..n {
            if e[i] < g.base[i] {
                lower[i] = g.base[i] - e[i];
                g.base[i] = e[i];
            }
        }
        let mut lower_large = Vec::new();
        let mut diff_large = Vec::new();
        let mut merged: Vec<(u64, i32)> = Vec::new();
        let primes: std::collections::BTreeSet<u64> = g
            .base_large
            .iter()
            .chain(&v.large)
            .map(|(p, _)| *p)
            .collect();
        for p in primes {
            let b = g.base_large.iter().find(|x| x.0 == p).map_or(0, |x| x.1);
            let x = v.large.iter().find(|y| y.0 == p).map_or(0, |y| y.1);
            let nb = b.min(x);
            if nb < b {
                lower_large.push((p, b - nb));
            }
            if x > nb {
                diff_large.push((p, x - nb));
            }
            if nb != 0 {
                merged.push((p, nb));
            }
        }
        g.base_large = merged;
        if lower.iter().any(|x| *x != 0) || !lower_large.is_empty() {
            g.total *= BigInt::from(pow_product(&lower, &lower_large));
        }
        let diff: Vec<i32> = (0..n).map(|i| e[i] - g.base[i]).collect();
        g.total += sign * BigInt::from(pow_product(&diff, &diff_large));
    }

    /// The sum as a canonical `Surd`.
    pub fn finish(&self) -> Surd {
        let mut out = Surd::zero();
        for g in &self.groups {
            if g.total.is_zero() {
                continue;
            }
            // total * sqrt(Π p^base)
            let mut num = BigUint::one();
            let mut den = BigUint::one();
            let mut free = BigUint::one();
            let primes = g
                .base
                .iter()
                .enumerate()
                .filter(|(_, e)| **e != 0)
                .map(|(i, &e)| (prime_at(i), e))
                .chain(g.base_large.iter().copied());
            for (p, e) in primes {
                let p = BigUint::from(p);
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
            let q = BigRational::new(&g.total * BigInt::from(num), BigInt::from(den));
            out = &out + &Surd::monomial_squarefree(q, free);
        }
        out
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64, d: i64) -> BigRational {
        BigRational::new(n.into(), d.into())
    }

    #[test]
    fn factored_products_and_sums_are_exact() {
        let h = Surd::signed_sqrt(false, &q(1, 2)).unwrap();
        let t = Surd::signed_sqrt(true, &q(2, 3)).unwrap();
        let mut p = Factored::of(&h).unwrap();
        p.mul_assign(&Factored::of(&t).unwrap());
        let mut s = FactoredSum::new();
        s.add(&p);
        s.add(&Factored::of(&Surd::from_int(3)).unwrap());
        let want = &(&h * &t) + &Surd::from_int(3);
        assert_eq!(s.finish(), want);
    }

    #[test]
    fn large_prime_factors_stay_sparse_and_exact() {
        // 1099511627689 is the largest prime below 2^40
        // (checked by trial division, common practice): it may not
        // make a sieve that reaches it
        let big = 1_099_511_627_689i64;
        let a = Surd::signed_sqrt(false, &q(1, big)).unwrap();
        let b = Surd::signed_sqrt(true, &q(big, 4)).unwrap();
        let fa = Factored::of(&a).unwrap();
        let fb = Factored::of(&b).unwrap();
        assert!(fa.large.iter().any(|(p, _)| *p == big as u64));
        let mut p = fa.clone();
        p.mul_assign(&fb);
        // the large prime cancels in the product
        assert!(p.large.iter().all(|(p, _)| *p != big as u64));
        let mut s = FactoredSum::new();
        s.add(&p);
        s.add(&fa);
        s.add(&fa);
        s.add(&fb);
        let want = &(&(&(&a * &b) + &a) + &a) + &b;
        assert_eq!(s.finish(), want);
    }
}
