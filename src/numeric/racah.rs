//! The exact single-sum engine behind the Racah formulas: a value
//! `sign * sqrt(R) * Σ_k (-1)^k Π num_i(k)! / Π den_i(k)!` with factorial
//! arguments affine in `k`, summed by Horner's rule from the last term (no
//! big factorials are ever built), first in `i128` and, on overflow, in
//! `num-bigint`. The result is a `RawValue` `A * sqrt(Π p^e_p)` that
//! `canonical` turns into a `Surd`.

use super::primes::{prime_at, PrimeExps};
use super::surd::Surd;
use num_bigint::{BigInt, BigUint};
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

/// A factorial `(c + s k)!` with `s = ±1`.
#[derive(Clone, Copy, Debug)]
pub struct FactArg {
    /// constant part
    pub c: i64,
    /// coefficient of k, +1 or -1
    pub s: i64,
}

impl FactArg {
    /// `(c + k)!`
    pub fn up(c: i64) -> Self {
        FactArg { c, s: 1 }
    }
    /// `(c - k)!`
    pub fn down(c: i64) -> Self {
        FactArg { c, s: -1 }
    }
    fn at(&self, k: i64) -> i64 {
        self.c + self.s * k
    }
}

/// The summand of a Racah-type single sum and its range.
#[derive(Clone, Debug)]
pub struct RacahSum {
    /// factorials in the numerator of each term
    pub num: Vec<FactArg>,
    /// factorials in the denominator of each term
    pub den: Vec<FactArg>,
    /// first k
    pub kmin: i64,
    /// last k (inclusive)
    pub kmax: i64,
}

/// `a * sqrt(Π p^e_p)`: an unreduced exact value.
#[derive(Clone, Debug)]
pub struct RawValue {
    /// integer multiplier (carries the sign)
    pub a: BigInt,
    /// exponents of the radicand
    pub e: PrimeExps,
}

impl RawValue {
    /// The value 0.
    pub fn zero() -> Self {
        RawValue {
            a: BigInt::zero(),
            e: PrimeExps::one(),
        }
    }

    /// True for 0.
    pub fn is_zero(&self) -> bool {
        self.a.is_zero()
    }
}

impl RacahSum {
    /// The ratio `t_{k+1} / t_k` without the sign, as `(n, d)`.
    fn ratio(&self, k: i64) -> (u128, u128) {
        let mut n: u128 = 1;
        let mut d: u128 = 1;
        for f in &self.num {
            if f.s > 0 {
                n *= (f.at(k) + 1) as u128;
            } else {
                d *= f.at(k) as u128;
            }
        }
        for f in &self.den {
            if f.s > 0 {
                d *= (f.at(k) + 1) as u128;
            } else {
                n *= f.at(k) as u128;
            }
        }
        (n, d)
    }

    /// Calls `f` on each small factor of the denominator of the ratio at k.
    fn for_each_denominator_factor(&self, k: i64, mut f: impl FnMut(u64)) {
        for a in &self.num {
            if a.s < 0 {
                f(a.at(k) as u64);
            }
        }
        for a in &self.den {
            if a.s > 0 {
                f((a.at(k) + 1) as u64);
            }
        }
    }

    /// Evaluates `sign * sqrt(R) * Σ` with `R` given as exponents.
    /// Every factorial argument must be `>= 0` on the whole range.
    pub fn evaluate(&self, negative: bool, radicand: PrimeExps) -> RawValue {
        if self.kmin > self.kmax {
            return RawValue::zero();
        }
        let mut e = radicand;
        // t_kmin squared goes under the root
        for f in &self.num {
            e.add_factorial(f.at(self.kmin) as u64, 2);
        }
        for f in &self.den {
            e.add_factorial(f.at(self.kmin) as u64, -2);
        }
        let (a, denominators) = match self.horner_i128() {
            Some(v) => v,
            None => self.horner_big(),
        };
        // divide by P = Π d_i: exponents -2 each, factor by factor
        let _ = denominators;
        for k in self.kmin..self.kmax {
            self.for_each_denominator_factor(k, |f| e.add_integer(f, -2));
        }
        let mut a = a;
        if (self.kmin & 1 == 1) != negative {
            a = -a;
        }
        RawValue { a, e }
    }

    /// Horner from the last term: tail = A/P, tail_i = 1 - (n_i/d_i) tail_{i+1}.
    fn horner_i128(&self) -> Option<(BigInt, Vec<u128>)> {
        let mut a: i128 = 1;
        let mut p: i128 = 1;
        let mut ds = Vec::with_capacity((self.kmax - self.kmin) as usize);
        let mut k = self.kmax - 1;
        while k >= self.kmin {
            let (n, d) = self.ratio(k);
            let n = i128::try_from(n).ok()?;
            let d = i128::try_from(d).ok()?;
            let dp = d.checked_mul(p)?;
            let na = n.checked_mul(a)?;
            a = dp.checked_sub(na)?;
            p = dp;
            ds.push(d as u128);
            k -= 1;
        }
        Some((BigInt::from(a), ds))
    }

    fn horner_big(&self) -> (BigInt, Vec<u128>) {
        let mut a = BigInt::one();
        let mut p = BigInt::one();
        let mut ds = Vec::with_capacity((self.kmax - self.kmin) as usize);
        let mut k = self.kmax - 1;
        while k >= self.kmin {
            let (n, d) = self.ratio(k);
            p *= d;
            a = &p - a * n;
            ds.push(d);
            k -= 1;
        }
        (a, ds)
    }
}

/// Turns `a * sqrt(Π p^e_p)` into the canonical `Surd` `q sqrt(s)`.
pub fn canonical(v: &RawValue) -> Surd {
    if v.a.is_zero() {
        return Surd::zero();
    }
    let negative = v.a.is_negative();
    let mut a: BigUint = v.a.magnitude().clone();
    let mut num_small: u128 = 1;
    let mut num = BigUint::one();
    let mut den_small: u128 = 1;
    let mut den = BigUint::one();
    let mut free_small: u128 = 1;
    let mut free = BigUint::one();
    for i in 0..v.e.len() {
        let ex = v.e.get(i);
        if ex == 0 {
            continue;
        }
        let p = prime_at(i);
        let half = ex.div_euclid(2);
        if ex.rem_euclid(2) == 1 {
            mul_small(&mut free_small, &mut free, p as u128);
        }
        if half > 0 {
            for _ in 0..half {
                mul_small(&mut num_small, &mut num, p as u128);
            }
        } else if half < 0 {
            let mut left = -half;
            // cancel against a first
            while left > 0 {
                let (qt, r) = num_integer::Integer::div_rem(&a, &BigUint::from(p));
                if r.is_zero() {
                    a = qt;
                    left -= 1;
                } else {
                    break;
                }
            }
            for _ in 0..left {
                mul_small(&mut den_small, &mut den, p as u128);
            }
        }
    }
    let num = num * num_small * a;
    let den = den * den_small;
    let free = free * free_small;
    let mut q = BigRational::new_raw(BigInt::from(num), BigInt::from(den));
    if negative {
        q = -q;
    }
    Surd::monomial_squarefree(q, free)
}

fn mul_small(small: &mut u128, big: &mut BigUint, p: u128) {
    match small.checked_mul(p) {
        Some(v) if v < (1u128 << 100) => *small = v,
        _ => {
            *big *= *small;
            *small = p;
        }
    }
}

/// Sum of raw values that may carry different radicands: terms whose
/// exponent vectors agree mod 2 are combined over the least common power.
pub fn sum_raw(values: &[RawValue]) -> Surd {
    let mut out = Surd::zero();
    let mut groups: Vec<(Vec<i64>, Vec<usize>)> = Vec::new();
    for (idx, v) in values.iter().enumerate() {
        if v.is_zero() {
            continue;
        }
        let parity: Vec<i64> = (0..v.e.len()).map(|i| v.e.get(i).rem_euclid(2)).collect();
        let parity = trim(parity);
        match groups.iter_mut().find(|(p, _)| *p == parity) {
            Some((_, list)) => list.push(idx),
            None => groups.push((parity, vec![idx])),
        }
    }
    for (_, list) in groups {
        let len = list.iter().map(|&i| values[i].e.len()).max().unwrap_or(0);
        let mut emin = PrimeExps::one();
        for i in 0..len {
            let m = list.iter().map(|&t| values[t].e.get(i)).min().unwrap();
            emin.set(i, m);
        }
        let mut total = BigInt::zero();
        for &t in &list {
            let v = &values[t];
            let mut mult = BigUint::one();
            for i in 0..len {
                let d = (v.e.get(i) - emin.get(i)) / 2;
                if d > 0 {
                    mult *= BigUint::from(prime_at(i)).pow(d as u32);
                }
            }
            total += &v.a * BigInt::from(mult);
        }
        let raw = RawValue { a: total, e: emin };
        out = &out + &canonical(&raw);
    }
    out
}

fn trim(mut v: Vec<i64>) -> Vec<i64> {
    while v.last() == Some(&0) {
        v.pop();
    }
    v
}
