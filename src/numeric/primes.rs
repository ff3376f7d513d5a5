//! Primes, smallest-prime-factor tables and factorials as prime-exponent
//! vectors (Legendre's formula). Owns the per-thread prime table that grows
//! on demand; everything exact in `numeric` factors through here.

use std::cell::RefCell;

/// A sieve of primes and smallest prime factors up to `limit`.
struct PrimeTable {
    limit: usize,
    primes: Vec<u64>,
    /// `spf[n]` is the smallest prime factor of `n` (0 for n < 2).
    spf: Vec<u32>,
    /// `index[p]` is the position of prime `p` in `primes`.
    index: Vec<u32>,
}

impl PrimeTable {
    fn new(limit: usize) -> Self {
        let limit = limit.max(64);
        let mut spf = vec![0u32; limit + 1];
        let mut primes = Vec::new();
        let mut index = vec![u32::MAX; limit + 1];
        for n in 2..=limit {
            if spf[n] == 0 {
                spf[n] = n as u32;
                index[n] = primes.len() as u32;
                primes.push(n as u64);
            }
            let s = spf[n] as u64;
            for &p in &primes {
                if p > s || (p as usize) * n > limit {
                    break;
                }
                spf[p as usize * n] = p as u32;
            }
        }
        PrimeTable {
            limit,
            primes,
            spf,
            index,
        }
    }
}

thread_local! {
    static TABLE: RefCell<PrimeTable> = RefCell::new(PrimeTable::new(1024));
}

fn ensure(limit: usize) {
    TABLE.with(|t| {
        if t.borrow().limit < limit {
            let new_limit = limit.max(t.borrow().limit * 2);
            *t.borrow_mut() = PrimeTable::new(new_limit);
        }
    });
}

/// Runs `f` on the list of all primes `<= n` (in increasing order).
pub fn with_primes_upto<R>(n: usize, f: impl FnOnce(&[u64]) -> R) -> R {
    ensure(n);
    TABLE.with(|t| {
        let t = t.borrow();
        let count = t.primes.partition_point(|&p| p as usize <= n);
        f(&t.primes[..count])
    })
}

/// The prime with the given index (0 -> 2, 1 -> 3, ...). The table must
/// already reach it (it does for every index handed out by this module).
pub fn prime_at(i: usize) -> u64 {
    TABLE.with(|t| t.borrow().primes[i])
}

/// Factorials below this argument take their exponents from a table.
const SMALL_FACTORIALS: usize = 512;

/// `exps[n][i]` = exponent of the i-th prime in `n!`, for n < 512.
fn small_factorial_exps() -> &'static [Vec<u32>] {
    static T: std::sync::OnceLock<Vec<Vec<u32>>> = std::sync::OnceLock::new();
    T.get_or_init(|| {
        let mut rows: Vec<Vec<u32>> = vec![Vec::new(), Vec::new()];
        with_primes_upto(SMALL_FACTORIALS, |primes| {
            for n in 2..SMALL_FACTORIALS as u64 {
                let mut row = rows[n as usize - 1].clone();
                let mut m = n;
                for (i, &p) in primes.iter().enumerate() {
                    if p > m {
                        break;
                    }
                    while m % p == 0 {
                        if row.len() <= i {
                            row.resize(i + 1, 0);
                        }
                        row[i] += 1;
                        m /= p;
                    }
                }
                rows.push(row);
            }
        });
        rows
    })
}

/// A product of prime powers `Π p_i^{e_i}`, exponents indexed by prime
/// position, possibly negative.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct PrimeExps {
    exps: Vec<i64>,
}

impl PrimeExps {
    /// The empty product, 1.
    pub fn one() -> Self {
        PrimeExps { exps: Vec::new() }
    }

    fn grow(&mut self, len: usize) {
        if self.exps.len() < len {
            self.exps.resize(len, 0);
        }
    }

    /// The empty product with room for every prime up to `n`.
    pub fn with_room(n: u64) -> Self {
        let count = with_primes_upto(n as usize, |p| p.len());
        PrimeExps {
            exps: vec![0; count],
        }
    }

    /// Multiplies by `(n!)^times`.
    pub fn add_factorial(&mut self, n: u64, times: i64) {
        if n < 2 || times == 0 {
            return;
        }
        if (n as usize) < SMALL_FACTORIALS {
            let row = &small_factorial_exps()[n as usize];
            self.grow(row.len());
            for (a, &e) in self.exps.iter_mut().zip(row) {
                *a += times * e as i64;
            }
            return;
        }
        with_primes_upto(n as usize, |primes| {
            self.grow(primes.len());
            for (i, &p) in primes.iter().enumerate() {
                let mut e = 0u64;
                let mut q = n / p;
                while q > 0 {
                    e += q;
                    q /= p;
                }
                self.exps[i] += times * e as i64;
            }
        });
    }

    /// Multiplies by `m^times` for a positive integer `m` (factored with the
    /// smallest-prime-factor table; `m` must fit the table, which grows).
    pub fn add_integer(&mut self, m: u64, times: i64) {
        assert!(m > 0, "add_integer of zero");
        if m == 1 || times == 0 {
            return;
        }
        self.add_integers(&[m], times);
    }

    /// Multiplies by `Π m_i^times` (one table lookup for all).
    pub fn add_integers(&mut self, ms: &[u64], times: i64) {
        let Some(&max) = ms.iter().max() else {
            return;
        };
        ensure(max as usize);
        TABLE.with(|t| {
            let t = t.borrow();
            for &m in ms {
                assert!(m > 0, "add_integers of zero");
                let mut m = m as usize;
                while m > 1 {
                    let p = t.spf[m] as usize;
                    let i = t.index[p] as usize;
                    if self.exps.len() <= i {
                        self.exps.resize(i + 1, 0);
                    }
                    self.exps[i] += times;
                    m /= p;
                }
            }
        });
    }

    /// Adds another exponent vector times `times`.
    pub fn add_exps(&mut self, other: &PrimeExps, times: i64) {
        self.grow(other.exps.len());
        for (a, b) in self.exps.iter_mut().zip(&other.exps) {
            *a += times * b;
        }
    }

    /// The exponent of the prime with index `i`.
    pub fn get(&self, i: usize) -> i64 {
        self.exps.get(i).copied().unwrap_or(0)
    }

    /// Sets the exponent of the prime with index `i`.
    pub fn set(&mut self, i: usize, e: i64) {
        self.grow(i + 1);
        self.exps[i] = e;
    }

    /// Number of exponent slots in use.
    pub fn len(&self) -> usize {
        self.exps.len()
    }

    /// True when no slot is in use.
    pub fn is_empty(&self) -> bool {
        self.exps.is_empty()
    }

    /// Iterates over `(prime, exponent)` for nonzero exponents.
    pub fn iter(&self) -> impl Iterator<Item = (u64, i64)> + '_ {
        let nonzero: Vec<(usize, i64)> = self
            .exps
            .iter()
            .enumerate()
            .filter(|(_, e)| **e != 0)
            .map(|(i, e)| (i, *e))
            .collect();
        let primes: Vec<u64> = if nonzero.is_empty() {
            Vec::new()
        } else {
            TABLE.with(|t| {
                let t = t.borrow();
                nonzero.iter().map(|(i, _)| t.primes[*i]).collect()
            })
        };
        nonzero.into_iter().zip(primes).map(|((_, e), p)| (p, e))
    }
}

/// Factors an integer that fits the sieve range into `(prime, exponent)`.
pub fn factor_small(m: u64) -> Vec<(u64, u32)> {
    let mut out: Vec<(u64, u32)> = Vec::new();
    if m < 2 {
        return out;
    }
    ensure(m as usize);
    TABLE.with(|t| {
        let t = t.borrow();
        let mut m = m as usize;
        while m > 1 {
            let p = t.spf[m] as u64;
            match out.last_mut() {
                Some((q, e)) if *q == p => *e += 1,
                _ => out.push((p, 1)),
            }
            m /= p as usize;
        }
    });
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn factorial_exponents_follow_legendre() {
        // 10! = 2^8 3^4 5^2 7 (common practice, no source).
        let mut e = PrimeExps::one();
        e.add_factorial(10, 1);
        let got: Vec<(u64, i64)> = e.iter().collect();
        assert_eq!(got, vec![(2, 8), (3, 4), (5, 2), (7, 1)]);
    }

    #[test]
    fn integers_factor_through_the_sieve() {
        let mut e = PrimeExps::one();
        e.add_integer(360, 1);
        e.add_integer(7, -2);
        let got: Vec<(u64, i64)> = e.iter().collect();
        assert_eq!(got, vec![(2, 3), (3, 2), (5, 1), (7, -2)]);
        assert_eq!(factor_small(97), vec![(97, 1)]);
        assert_eq!(factor_small(5000), vec![(2, 3), (5, 4)]);
    }

    #[test]
    fn the_table_grows_past_its_first_limit() {
        assert_eq!(factor_small(1_000_003), vec![(1_000_003, 1)]);
        with_primes_upto(100, |p| assert_eq!(p.len(), 25));
    }
}
