//! The exact single-sum engine behind the Racah formulas: a value
//! `sign * sqrt(R) * Σ_k (-1)^k Π num_i(k)! / Π den_i(k)!` with factorial
//! arguments affine in `k`, summed by Horner's rule from the last term (no
//! big factorials are ever built). Two paths give the same values: the
//! stack path (`FastRaw`, `FastSum`) while every factorial argument is at
//! most 127 — exponents over the 31 primes below 128, Horner in `i128`
//! then in `wide` integers — and the general path (`RawValue`, any primes,
//! `num-bigint`). `canonical` and `FastRaw::to_surd` turn either
//! `A * sqrt(Π p^e_p)` into a `Surd`.

use super::primes::{prime_at, PrimeExps};
use super::surd::Surd;
use super::wide::{SignedWide, Wide};
use num_bigint::{BigInt, BigUint, Sign};
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

/// A short list with a fixed capacity (no allocation on the hot path).
#[derive(Clone, Copy, Debug)]
pub struct Short<T: Copy + Default, const N: usize> {
    items: [T; N],
    len: usize,
}

impl<T: Copy + Default, const N: usize> Short<T, N> {
    /// From a slice of at most N items.
    pub fn of(xs: &[T]) -> Self {
        let mut items = [T::default(); N];
        items[..xs.len()].copy_from_slice(xs);
        Short {
            items,
            len: xs.len(),
        }
    }
    /// The items.
    pub fn as_slice(&self) -> &[T] {
        &self.items[..self.len]
    }
    /// Iterates over the items.
    pub fn iter(&self) -> std::slice::Iter<'_, T> {
        self.as_slice().iter()
    }
}

impl<'a, T: Copy + Default, const N: usize> IntoIterator for &'a Short<T, N> {
    type Item = &'a T;
    type IntoIter = std::slice::Iter<'a, T>;
    fn into_iter(self) -> Self::IntoIter {
        self.iter()
    }
}

impl Default for FactArg {
    fn default() -> Self {
        FactArg { c: 0, s: 1 }
    }
}

/// The summand of a Racah-type single sum and its range.
#[derive(Clone, Debug)]
pub struct RacahSum {
    /// factorials in the numerator of each term
    pub num: Short<FactArg, 2>,
    /// factorials in the denominator of each term
    pub den: Short<FactArg, 7>,
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
    pub fn ratio(&self, k: i64) -> (u128, u128) {
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
        let a = match self.horner_ratio_i128() {
            Some((a, _)) => BigInt::from(a),
            None => self.horner_big(),
        };
        // divide by P = Π d_i: exponents -2 each, factor by factor
        let mut factors: Vec<u64> = Vec::with_capacity(4 * (self.kmax - self.kmin) as usize);
        for k in self.kmin..self.kmax {
            crate::limits::tick();
            self.for_each_denominator_factor(k, |f| factors.push(f));
        }
        e.add_integers(&factors, -2);
        let mut a = a;
        if (self.kmin & 1 == 1) != negative {
            a = -a;
        }
        RawValue { a, e }
    }

    /// Horner in `i128` without recording denominators: the sum relative
    /// to its first term is `A / P` (`None` on overflow).
    pub fn horner_ratio_i128(&self) -> Option<(i128, i128)> {
        let mut a: i128 = 1;
        let mut p: i128 = 1;
        let mut k = self.kmax - 1;
        while k >= self.kmin {
            let (n, d) = self.ratio(k);
            let n = i128::try_from(n).ok()?;
            let d = i128::try_from(d).ok()?;
            let dp = d.checked_mul(p)?;
            let na = n.checked_mul(a)?;
            a = dp.checked_sub(na)?;
            p = dp;
            k -= 1;
        }
        Some((a, p))
    }

    /// Horner from the last term in big integers: tail = A/P,
    /// tail_i = 1 - (n_i/d_i) tail_{i+1}; returns A.
    fn horner_big(&self) -> BigInt {
        let mut a = BigInt::one();
        let mut p = BigInt::one();
        let mut k = self.kmax - 1;
        while k >= self.kmin {
            crate::limits::tick();
            let (n, d) = self.ratio(k);
            p *= d;
            a = &p - a * n;
            k -= 1;
        }
        a
    }
}

/// Turns `a * sqrt(Π p^e_p)` into the canonical `Surd` `q sqrt(s)`.
pub fn canonical(v: &RawValue) -> Surd {
    if v.a.is_zero() {
        return Surd::zero();
    }
    if let Some(s) = canonical_small(v) {
        return s;
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

/// `canonical` in `u128` arithmetic when every number fits.
fn canonical_small(v: &RawValue) -> Option<Surd> {
    let a: i128 = (&v.a).try_into().ok()?;
    monomial_u128(a < 0, a.unsigned_abs(), v.e.iter())
}

/// `±a * sqrt(Π p^e)` as the canonical `q sqrt(s)` in `u128` scalars (the
/// shared core of `canonical_small` and the stack path; `None` when a
/// number does not fit). The square part of the radicand leaves the root;
/// the denominator's primes cancel against `a` (2 by its trailing zeros,
/// odd primes by exact-division tests with their inverses in 64 bits).
fn monomial_u128(
    negative: bool,
    mut a: u128,
    exps: impl Iterator<Item = (u64, i64)>,
) -> Option<Surd> {
    let (mut num, mut den, mut free) = (1u128, 1u128, 1u128);
    for (p, ex) in exps {
        if ex == 0 {
            continue;
        }
        if ex.rem_euclid(2) == 1 {
            free = free.checked_mul(p as u128)?;
        }
        let h = ex.div_euclid(2);
        if h > 0 {
            num = num.checked_mul((p as u128).checked_pow(u32::try_from(h).ok()?)?)?;
        } else if h < 0 {
            let mut left = u32::try_from(-h).ok()?;
            if p == 2 {
                let take = a.trailing_zeros().min(left);
                a >>= take;
                left -= take;
            } else {
                let inverse = odd_inverse(p);
                while left > 0 {
                    match u64::try_from(a) {
                        Ok(a64) => {
                            let q = a64.wrapping_mul(inverse);
                            if q > u64::MAX / p {
                                break;
                            }
                            a = q as u128;
                        }
                        Err(_) => {
                            if !a.is_multiple_of(p as u128) {
                                break;
                            }
                            a /= p as u128;
                        }
                    }
                    left -= 1;
                }
            }
            if left > 0 {
                den = den.checked_mul((p as u128).checked_pow(left)?)?;
            }
        }
    }
    // num and den share no prime (den only holds primes a lacked)
    let n = num.checked_mul(a)?;
    let mut q = BigRational::new_raw(BigInt::from(n), BigInt::from(den));
    if negative {
        q = -q;
    }
    Some(Surd::monomial_squarefree(q, BigUint::from(free)))
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

/// A symbol as a Racah single sum with its root prefactor
/// `sqrt(Π root_num! / Π root_den!)` and overall sign.
#[derive(Clone, Debug)]
pub struct RacahFormula {
    /// the single sum
    pub sum: RacahSum,
    /// factorial arguments in the numerator of the radicand
    pub root_num: Short<i64, 12>,
    /// factorial arguments in the denominator of the radicand
    pub root_den: Short<i64, 4>,
    /// overall sign
    pub negative: bool,
}

impl RacahFormula {
    /// The exact value.
    pub fn exact_raw(&self) -> RawValue {
        let s = &self.sum;
        let mut top = 2i64;
        for &a in self.root_num.iter().chain(&self.root_den) {
            top = top.max(a);
        }
        for a in s.num.iter().chain(&s.den) {
            top = top.max(a.c + a.s * s.kmin).max(a.c + a.s * s.kmax + 1);
        }
        let mut e = PrimeExps::with_room(top as u64);
        for &a in &self.root_num {
            e.add_factorial(a as u64, 1);
        }
        for &a in &self.root_den {
            e.add_factorial(a as u64, -1);
        }
        self.sum.evaluate(self.negative, e)
    }
}

/// Factorial arguments up to this use the stack-only fast path.
const FAST_LIMIT: i64 = 127;
/// Primes up to `FAST_LIMIT`.
const FAST_PRIMES: [u64; 31] = [
    2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53, 59, 61, 67, 71, 73, 79, 83, 89, 97,
    101, 103, 107, 109, 113, 127,
];
/// `p^-1 mod 2^64` for an odd `p`: Newton's iteration doubles the correct
/// low bits, 3, 6, ..., 96. Then `a` is a multiple of `p` iff
/// `a * p^-1 mod 2^64 <= u64::MAX / p`, and that product is `a / p`.
const fn odd_inverse(p: u64) -> u64 {
    let mut x = p;
    let mut step = 0;
    while step < 5 {
        x = x.wrapping_mul(2u64.wrapping_sub(p.wrapping_mul(x)));
        step += 1;
    }
    x
}

/// `odd_inverse` of each odd fast prime (0 for 2).
const ODD_INVERSES: [u64; 31] = {
    let mut out = [0u64; 31];
    let mut i = 1;
    while i < 31 {
        out[i] = odd_inverse(FAST_PRIMES[i]);
        i += 1;
    }
    out
};

/// Exponent lanes (the primes padded to a vector-friendly width).
const LANES: usize = 32;

/// Exponents of the fast primes, by position.
pub type FastExps = [i16; LANES];

/// Exponents of `n!` for `n <= FAST_LIMIT`, by prime position.
fn fast_factorials() -> &'static [FastExps] {
    static T: std::sync::OnceLock<Vec<FastExps>> = std::sync::OnceLock::new();
    T.get_or_init(|| {
        let n = FAST_LIMIT as usize;
        let mut fact = vec![[0i16; LANES]; n + 1];
        for m in 2..=n {
            let mut row = fact[m - 1];
            let mut x = m as u64;
            for (i, &p) in FAST_PRIMES.iter().enumerate() {
                while x.is_multiple_of(p) {
                    row[i] += 1;
                    x /= p;
                }
            }
            fact[m] = row;
        }
        fact
    })
}

/// `e += times * row`, lane by lane (vectorised by the compiler).
fn add_row(e: &mut FastExps, row: &FastExps, times: i16) {
    for (x, &r) in e.iter_mut().zip(row) {
        *x += times * r;
    }
}

/// Limbs for one symbol's Horner sum on the stack (1024 bits).
pub const SYMBOL_LIMBS: usize = 16;
/// Limbs for products and sums of symbols, as in a 9j (3072 bits).
pub const PRODUCT_LIMBS: usize = 48;

/// `a * sqrt(Π p_i^e_i)` over the fast primes, with `a` in `N` limbs: the
/// stack form of `RawValue`, unreduced.
#[derive(Clone, Copy, Debug)]
pub struct FastRaw<const N: usize = SYMBOL_LIMBS> {
    /// the integer multiplier with its sign
    pub a: SignedWide<N>,
    /// exponents of the radicand
    pub e: FastExps,
}

impl<const N: usize> FastRaw<N> {
    /// The value 0.
    pub fn zero() -> Self {
        FastRaw {
            a: SignedWide::zero(),
            e: [0; LANES],
        }
    }

    /// The product, in `R` limbs (`None` beyond them).
    pub fn mul<const M: usize, const R: usize>(&self, other: &FastRaw<M>) -> Option<FastRaw<R>> {
        let mag = self.a.mag.mul(&other.a.mag)?;
        let mut e = [0i16; LANES];
        for (i, x) in e.iter_mut().enumerate() {
            *x = self.e[i].checked_add(other.e[i])?;
        }
        Some(FastRaw {
            a: SignedWide {
                neg: (self.a.neg != other.a.neg) && !mag.is_zero(),
                mag,
            },
            e,
        })
    }

    /// The product with an integer.
    pub fn scale(&mut self, m: i64) -> Option<()> {
        self.a.mag.mul_small(m.unsigned_abs())?;
        self.a.neg = (self.a.neg != (m < 0)) && !self.a.mag.is_zero();
        Some(())
    }

    /// The canonical `Surd` `q sqrt(s)`: the square part of the radicand
    /// leaves the root and the denominator's primes cancel against `a`,
    /// several odd primes per pass (one remainder by their product gives
    /// every valuation), 2 by its trailing zeros. `None` beyond the stack
    /// capacity.
    pub fn to_surd(self) -> Option<Surd> {
        if self.a.is_zero() {
            return Some(Surd::zero());
        }
        if let Some(v) = self.surd_in_u128() {
            return Some(v);
        }
        let mut a = self.a.mag;
        let mut den = Wide::<N>::one();
        let mut free = Wide::<N>::one();
        // (prime position, exponent still to cancel against a)
        let mut pending = [(0usize, 0u32); LANES];
        let mut count = 0;
        for (i, &p) in FAST_PRIMES.iter().enumerate() {
            let ex = self.e[i] as i32;
            if ex == 0 {
                continue;
            }
            if ex.rem_euclid(2) == 1 {
                free.mul_small(p)?;
            }
            let h = ex.div_euclid(2);
            if h < 0 {
                pending[count] = (i, (-h) as u32);
                count += 1;
            }
        }
        let pending = &mut pending[..count];
        if let Some((0, need)) = pending.first_mut() {
            let take = a.trailing_zeros().min(*need);
            a.shr(take);
            den.mul_pow(2, *need - take)?;
            *need = 0;
        }
        loop {
            // pack the pending odd prime powers into one modulus
            let mut modulus: u64 = 1;
            let mut chunk = [(0usize, 0u32, 1u64); LANES];
            let mut parts = 0;
            for (slot, &mut (i, need)) in pending.iter_mut().enumerate() {
                if need == 0 {
                    continue;
                }
                let p = FAST_PRIMES[i];
                let room = u64::MAX / modulus / p;
                let (mut c, mut pc) = (0u32, 1u64);
                while c < need && pc <= room {
                    pc *= p;
                    c += 1;
                }
                if c > 0 {
                    modulus *= pc;
                    chunk[parts] = (slot, c, pc);
                    parts += 1;
                }
            }
            if parts == 0 {
                break;
            }
            let r = a.rem_small(modulus);
            let mut divisor: u64 = 1;
            for &(slot, c, pc) in &chunk[..parts] {
                let (i, need) = pending[slot];
                let p = FAST_PRIMES[i];
                let mut rp = r % pc;
                let mut v = c;
                if rp != 0 {
                    v = 0;
                    loop {
                        // exact division test by the inverse (rp < 2^64)
                        let q = rp.wrapping_mul(ODD_INVERSES[i]);
                        if q > u64::MAX / p {
                            break;
                        }
                        rp = q;
                        v += 1;
                    }
                }
                divisor *= p.pow(v);
                if v < c {
                    den.mul_pow(p, need - v)?;
                    pending[slot].1 = 0;
                } else {
                    pending[slot].1 = need - c;
                }
            }
            if divisor > 1 {
                a.div_small(divisor);
            }
        }
        // the square part of the radicand leaves the root; num and den
        // share no prime (den only holds primes a lacked), so the fraction
        // is already reduced
        for (i, &p) in FAST_PRIMES.iter().enumerate() {
            let h = (self.e[i] as i32).div_euclid(2);
            if h > 0 {
                a.mul_pow(p, h as u32)?;
            }
        }
        let n = a.to_biguint();
        let sign = if self.a.neg { Sign::Minus } else { Sign::Plus };
        let q = BigRational::new_raw(
            BigInt::from_biguint(sign, n),
            BigInt::from_biguint(Sign::Plus, den.to_biguint()),
        );
        Some(Surd::monomial_squarefree(q, free.to_biguint()))
    }
}

impl<const N: usize> FastRaw<N> {
    /// `to_surd` in `u128` scalars when every number fits (the common
    /// case at small j; `None` otherwise).
    fn surd_in_u128(&self) -> Option<Surd> {
        let exps = FAST_PRIMES
            .iter()
            .zip(&self.e)
            .map(|(&p, &x)| (p, x as i64));
        monomial_u128(self.a.neg, self.a.mag.to_u128()?, exps)
    }
}

/// A running sum of fast raw values that may carry different radicands
/// (the stack form of `sum_raw`): one accumulator per square class (the
/// parity of the exponents), each over the least exponents seen so far;
/// a term with a smaller exponent scales the accumulator up instead.
#[derive(Default)]
pub struct FastSum {
    groups: Vec<(u32, FastRaw<PRODUCT_LIMBS>)>,
}

impl FastSum {
    /// An empty sum.
    pub fn new() -> Self {
        FastSum::default()
    }

    /// Adds a term (`None` beyond the stack capacity).
    pub fn add(&mut self, term: &FastRaw<PRODUCT_LIMBS>) -> Option<()> {
        if term.a.is_zero() {
            return Some(());
        }
        let class = term
            .e
            .iter()
            .enumerate()
            .fold(0u32, |m, (i, &x)| m | (((x & 1) as u32) << i));
        let Some((_, acc)) = self.groups.iter_mut().find(|(c, _)| *c == class) else {
            self.groups.push((class, *term));
            return Some(());
        };
        let mut scaled = term.a;
        for (i, &p) in FAST_PRIMES.iter().enumerate() {
            let (have, new) = (acc.e[i], term.e[i]);
            if new < have {
                acc.a.mag.mul_pow(p, ((have - new) / 2) as u32)?;
                acc.e[i] = new;
            } else if new > have {
                scaled.mag.mul_pow(p, ((new - have) / 2) as u32)?;
            }
        }
        acc.a.add_assign(&scaled)
    }

    /// The exact sum (`None` beyond the stack capacity).
    pub fn to_surd(&self) -> Option<Surd> {
        let mut out = Surd::zero();
        for (_, acc) in &self.groups {
            out = &out + &acc.to_surd()?;
        }
        Some(out)
    }
}

impl RacahSum {
    /// Horner's sum relative to its first term, `A` of `A / P`: in `i128`
    /// and, on overflow, on the stack in `SignedWide`. On the fast path
    /// each ratio has at most nine factors, each at most `FAST_LIMIT + 1`,
    /// so it fits `u64`.
    fn horner_fast(&self) -> Option<SignedWide<SYMBOL_LIMBS>> {
        if let Some((a, _)) = self.horner_ratio_i128() {
            return Some(SignedWide::from_i128(a));
        }
        let mut a = SignedWide::<SYMBOL_LIMBS>::from_i128(1);
        let mut p = Wide::<SYMBOL_LIMBS>::one();
        let mut k = self.kmax - 1;
        while k >= self.kmin {
            let (n, d) = self.ratio(k);
            p.mul_small(u64::try_from(d).ok()?)?;
            a.mag.mul_small(u64::try_from(n).ok()?)?;
            a.rsub_from(&p)?;
            k -= 1;
        }
        Some(a)
    }
}

impl RacahFormula {
    /// The value as a `FastRaw`, without heap work, when every factorial
    /// argument is at most `FAST_LIMIT` and the numbers fit the stack
    /// (`None` otherwise: the general path takes over). The denominator
    /// `P` of Horner's sum is a product of ranges of integers, so its
    /// exponents are differences of factorial rows: each factorial of the
    /// summand enters once, at the end of the range where it is largest.
    pub fn fast_raw(&self) -> Option<FastRaw> {
        let s = &self.sum;
        if s.kmin > s.kmax {
            return Some(FastRaw::zero());
        }
        let in_range = |x: i64| (0..=FAST_LIMIT).contains(&x);
        if !self
            .root_num
            .iter()
            .chain(&self.root_den)
            .all(|&x| in_range(x))
            || !s
                .num
                .iter()
                .chain(&s.den)
                .all(|f| in_range(f.at(s.kmin)) && in_range(f.at(s.kmax)))
        {
            return None;
        }
        let fact = fast_factorials();
        let mut e = [0i16; LANES];
        for &x in &self.root_num {
            add_row(&mut e, &fact[x as usize], 1);
        }
        for &x in &self.root_den {
            add_row(&mut e, &fact[x as usize], -1);
        }
        for f in &s.num {
            let at = if f.s > 0 { s.kmin } else { s.kmax };
            add_row(&mut e, &fact[f.at(at) as usize], 2);
        }
        for f in &s.den {
            let at = if f.s > 0 { s.kmax } else { s.kmin };
            add_row(&mut e, &fact[f.at(at) as usize], -2);
        }
        let mut a = s.horner_fast()?;
        if (s.kmin & 1 == 1) != self.negative && !a.is_zero() {
            a.neg = !a.neg;
        }
        Some(FastRaw { a, e })
    }

    /// The exact value by the fast path (`None` outside it).
    pub fn exact_fast(&self) -> Option<Surd> {
        self.fast_raw()?.to_surd()
    }

    /// The exact value: the stack path where it applies, else the general.
    pub fn exact(&self) -> Surd {
        self.exact_fast()
            .unwrap_or_else(|| canonical(&self.exact_raw()))
    }
}

fn half(x: i64) -> i64 {
    x / 2
}

/// The Racah formula of the 3j symbol (Edmonds 3.7.3, from memory), or
/// `None` when a selection rule or a symmetry makes it 0. Doubled arguments.
pub fn three_j_formula(tj: [i64; 3], tm: [i64; 3]) -> Option<RacahFormula> {
    use super::selection::{projection_ok2, triangle2};
    let [a, b, c] = tj;
    let [ma, mb, mc] = tm;
    if ma + mb + mc != 0
        || !projection_ok2(a, ma)
        || !projection_ok2(b, mb)
        || !projection_ok2(c, mc)
        || !triangle2(a, b, c)
    {
        return None;
    }
    // symmetry zeros: (-1)^(j1+j2+j3) = -1 while an odd symmetry fixes it
    if half(a + b + c) % 2 == 1 {
        let all_zero = ma == 0 && mb == 0 && mc == 0;
        let twin = (a == b && ma == mb) || (b == c && mb == mc) || (a == c && ma == mc);
        if all_zero || twin {
            return None;
        }
    }
    let h = half;
    let sum = RacahSum {
        num: Short::of(&[]),
        den: Short::of(&[
            FactArg::up(0),
            FactArg::up(h(c - b + ma)),
            FactArg::up(h(c - a - mb)),
            FactArg::down(h(a + b - c)),
            FactArg::down(h(a - ma)),
            FactArg::down(h(b + mb)),
        ]),
        kmin: 0.max(h(b - c - ma)).max(h(a - c + mb)),
        kmax: h(a + b - c).min(h(a - ma)).min(h(b + mb)),
    };
    Some(RacahFormula {
        sum,
        root_num: Short::of(&[
            h(a + b - c),
            h(a - b + c),
            h(-a + b + c),
            h(a + ma),
            h(a - ma),
            h(b + mb),
            h(b - mb),
            h(c + mc),
            h(c - mc),
        ]),
        root_den: Short::of(&[h(a + b + c) + 1]),
        negative: h(a - b - mc).rem_euclid(2) == 1,
    })
}

/// The Racah formula of the 6j symbol (Edmonds 6.3.7, from memory), or
/// `None` when a triangle rule makes it 0. Doubled arguments.
pub fn six_j_formula(t: [i64; 6]) -> Option<RacahFormula> {
    use super::selection::triangle2;
    let [j1, j2, j3, j4, j5, j6] = t;
    let triads = [(j1, j2, j3), (j1, j5, j6), (j4, j2, j6), (j4, j5, j3)];
    if triads.iter().any(|&(a, b, c)| !triangle2(a, b, c)) {
        return None;
    }
    let mut root_num = [0i64; 12];
    let mut root_den = [0i64; 4];
    let mut asum = [0i64; 4];
    for (i, &(a, b, c)) in triads.iter().enumerate() {
        root_num[3 * i] = half(a + b - c);
        root_num[3 * i + 1] = half(a - b + c);
        root_num[3 * i + 2] = half(-a + b + c);
        root_den[i] = half(a + b + c) + 1;
        asum[i] = half(a + b + c);
    }
    let bsum = [
        half(j1 + j2 + j4 + j5),
        half(j2 + j3 + j5 + j6),
        half(j3 + j1 + j6 + j4),
    ];
    let sum = RacahSum {
        num: Short::of(&[FactArg::up(1)]),
        den: Short::of(&[
            FactArg::up(-asum[0]),
            FactArg::up(-asum[1]),
            FactArg::up(-asum[2]),
            FactArg::up(-asum[3]),
            FactArg::down(bsum[0]),
            FactArg::down(bsum[1]),
            FactArg::down(bsum[2]),
        ]),
        kmin: *asum.iter().max().unwrap(),
        kmax: *bsum.iter().min().unwrap(),
    };
    Some(RacahFormula {
        sum,
        root_num: Short::of(&root_num),
        root_den: Short::of(&root_den),
        negative: false,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_odd_inverses_invert_modulo_two_to_the_64() {
        for (i, &p) in FAST_PRIMES.iter().enumerate().skip(1) {
            assert_eq!(p.wrapping_mul(ODD_INVERSES[i]), 1, "p = {p}");
        }
    }

    #[test]
    fn the_factorial_rows_follow_legendres_formula() {
        // v_p(n!) = Σ floor(n / p^k) (Legendre; common practice, no source)
        let rows = fast_factorials();
        for n in [0u64, 1, 2, 10, 64, 100, 127] {
            for (i, &p) in FAST_PRIMES.iter().enumerate() {
                let mut v = 0;
                let mut q = p;
                while q <= n {
                    v += n / q;
                    q *= p;
                }
                assert_eq!(rows[n as usize][i] as u64, v, "{p} in {n}!");
            }
            assert_eq!(rows[n as usize][31], 0);
        }
    }
}
