//! Bulk tables of 6j symbols: canonical forms under the 24 symmetries of
//! the 6j symbol (its columns permuted, upper and lower entries swapped in
//! two columns; Edmonds, Angular Momentum in Quantum Mechanics, 6.2.4–6.2.5,
//! from memory), a numbering of canonical forms, the values by recursion,
//! and lookup. Regge's further symmetries of the 6j are not used here.
//!
//! Canonical form (our own): the image whose entries `(a, b, c, d, e, f)`
//! of `{a b c; d e f}` are lexicographically largest; so `a` is the
//! largest entry, `b` the largest of the four entries that share a triad
//! with `a`, and the triads give `a - b <= c <= b`, `e, f <= b`, `d <= a`.
//!
//! Numbering (our own), doubled entries: rows `(a, b)` in order, each row
//! a box `c × e × f × d` with `c` from `a - b` to `b` in steps of 2, `e`
//! from 0 to `b` (steps of 2 in a table of integer j), `f` and `d` from 0
//! to `b` and `a` indexed by `f / 2` and `d / 2` (their parity is fixed by
//! the triads `(a, e, f)` and `(d, b, f)`). Positions of the box that are
//! not canonical forms of the domain are holes, skipped by the bitmap.

use super::rank::RankedBits;
use crate::numeric::family::{six_j_over_j1, six_j_with_first};
use crate::numeric::float::{six_j_f64, trusted_member};
use crate::numeric::selection::triangle2;
use rayon::prelude::*;

/// A canonical 6j (doubled entries) and its value.
pub type SixJEntry = ([i64; 6], f64);

/// The canonical image of a 6j (doubled entries), or `None` when a triad
/// fails (the symbol is 0).
pub fn canonical(t: [i64; 6]) -> Option<[i64; 6]> {
    let [a, b, c, d, e, f] = t;
    if !(triangle2(a, b, c) && triangle2(a, e, f) && triangle2(d, b, f) && triangle2(d, e, c)) {
        return None;
    }
    let top = *t.iter().max()?;
    let mut best = [i64::MIN; 6];
    for p in 0..6 {
        if t[p] != top {
            continue;
        }
        let u = six_j_with_first(t, p);
        // the four images that keep u[0] at the top left
        let [a, b, c, d, e, f] = u;
        for image in [
            [a, b, c, d, e, f],
            [a, c, b, d, f, e],
            [a, e, f, d, b, c],
            [a, f, e, d, c, b],
        ] {
            if image > best {
                best = image;
            }
        }
    }
    Some(best)
}

/// Which 6j a table covers: every entry at most `max_t` (doubled), and
/// with `integer_only` every entry an integer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct SixJDomain {
    /// the largest doubled entry
    pub max_t: i64,
    /// only integer entries
    pub integer_only: bool,
}

/// The numbering of canonical forms of a domain.
#[derive(Clone, Debug)]
pub struct SixJNumbering {
    domain: SixJDomain,
    step: i64,
    /// start of each `(a, b)` row (index `a (a+1)/2 + b`), and the total
    start: Vec<u64>,
}

/// The sizes of the box of row `(a, b)`: counts of c, e, f, d.
fn row_box(a: i64, b: i64, step: i64) -> [u64; 4] {
    if 2 * b < a {
        return [0; 4];
    }
    [
        ((2 * b - a) / 2 + 1) as u64,
        (b / step + 1) as u64,
        (b / 2 + 1) as u64,
        (a / 2 + 1) as u64,
    ]
}

impl SixJNumbering {
    /// The numbering of a domain.
    pub fn new(domain: SixJDomain) -> SixJNumbering {
        let step = if domain.integer_only { 2 } else { 1 };
        let mut start = Vec::new();
        let mut at = 0u64;
        for a in 0..=domain.max_t.max(0) {
            for b in 0..=a {
                start.push(at);
                if domain.integer_only && (a % 2 != 0 || b % 2 != 0) {
                    continue;
                }
                at += row_box(a, b, step).iter().product::<u64>();
            }
        }
        start.push(at);
        SixJNumbering {
            domain,
            step,
            start,
        }
    }

    /// How many positions there are.
    pub fn len(&self) -> u64 {
        *self.start.last().unwrap_or(&0)
    }

    /// Whether there are none.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The domain numbered.
    pub fn domain(&self) -> SixJDomain {
        self.domain
    }

    /// The position of a canonical form, `None` outside the box.
    pub fn position(&self, k: &[i64; 6]) -> Option<u64> {
        let [a, b, c, d, e, f] = *k;
        if a > self.domain.max_t || a < 0 || b < 0 || b > a || d > a || d < 0 || e < 0 || f < 0 {
            return None;
        }
        if self.domain.integer_only && k.iter().any(|x| x % 2 != 0) {
            return None;
        }
        if e > b || f > b || c > b || c < a - b || e % self.step != 0 {
            return None;
        }
        let [_, ne, nf, nd] = row_box(a, b, self.step);
        let row = (a * (a + 1) / 2 + b) as usize;
        let (ci, ei, fi, di) = (
            ((c - (a - b)) / 2) as u64,
            (e / self.step) as u64,
            (f / 2) as u64,
            (d / 2) as u64,
        );
        Some(self.start[row] + ((ci * ne + ei) * nf + fi) * nd + di)
    }
}

/// Whether a box tuple is the canonical form of a symbol of the domain.
fn holds(k: &[i64; 6]) -> bool {
    canonical(*k).is_some_and(|c| c == *k)
}

/// The tuples `(a, b, c, e, f)` of row `(a, b)` that can hold entries,
/// with the range of d their triads allow (doubled, inclusive).
fn row_tuples(a: i64, b: i64, step: i64) -> impl Iterator<Item = ([i64; 5], i64, i64)> {
    let cs = (a - b..=b).step_by(2);
    cs.flat_map(move |c| {
        (0..=b).step_by(step as usize).flat_map(move |e| {
            let f_lo = (a - e).abs();
            (f_lo..=b.min(a + e)).step_by(2).filter_map(move |f| {
                // d with (d, b, f) and (d, e, c) triangles, d <= a
                let lo = (b - f).abs().max((e - c).abs());
                let hi = (b + f).min(e + c).min(a);
                ((lo <= hi) && (lo - b - f) % 2 == 0 && (lo + e + c) % 2 == 0).then_some((
                    [a, b, c, e, f],
                    lo,
                    hi,
                ))
            })
        })
    })
}

/// The `(a, b)` rows of a numbering that can hold entries, in order.
fn rows_of(n: &SixJNumbering) -> Vec<(i64, i64)> {
    let mut rows = Vec::new();
    for a in 0..=n.domain.max_t {
        for b in (a + 1) / 2..=a {
            if !(n.domain.integer_only && (a % 2 != 0 || b % 2 != 0)) {
                rows.push((a, b));
            }
        }
    }
    rows
}

/// Rows handled per parallel batch (positions pass).
const ROWS_PER_BATCH: usize = 64;
/// Entries computed per parallel batch (values pass): bounds memory.
const ENTRIES_PER_BATCH: u64 = 1 << 21;

impl SixJNumbering {
    /// The positions of row `(a, b)`: `start..end`.
    fn row_span(&self, a: i64, b: i64) -> (u64, u64) {
        let row = (a * (a + 1) / 2 + b) as usize;
        (self.start[row], self.start[row + 1])
    }
}

/// Rows in order, cut into batches of about `ENTRIES_PER_BATCH` entries.
fn batches(n: &SixJNumbering, bits: &RankedBits) -> Vec<Vec<(i64, i64)>> {
    let mut out = vec![Vec::new()];
    let mut held = 0u64;
    for (a, b) in rows_of(n) {
        let (lo, hi) = n.row_span(a, b);
        let here = bits.ones_before(hi) - bits.ones_before(lo);
        if held > 0 && held + here > ENTRIES_PER_BATCH {
            out.push(Vec::new());
            held = 0;
        }
        held += here;
        if let Some(last) = out.last_mut() {
            last.push((a, b));
        }
    }
    out
}

/// Which positions the domain holds.
pub fn positions(n: &SixJNumbering, stop: &dyn Fn() -> bool) -> Option<RankedBits> {
    let mut all = vec![0u64; n.len().div_ceil(64) as usize];
    for chunk in rows_of(n).chunks(ROWS_PER_BATCH) {
        if stop() {
            return None;
        }
        let parts: Vec<Vec<u64>> = chunk
            .par_iter()
            .map(|&(a, b)| {
                let mut set = Vec::new();
                for ([a, b, c, e, f], lo, hi) in row_tuples(a, b, n.step) {
                    for d in (lo..=hi).step_by(2) {
                        let k = [a, b, c, d, e, f];
                        if holds(&k) {
                            set.extend(n.position(&k));
                        }
                    }
                }
                set
            })
            .collect();
        for p in parts.into_iter().flatten() {
            all[(p / 64) as usize] |= 1 << (p % 64);
        }
    }
    Some(RankedBits::from_words(all))
}

/// The entries of one `(a, b)` row, in position order.
fn row_values(n: &SixJNumbering, bits: &RankedBits, a: i64, b: i64) -> Vec<SixJEntry> {
    let mut out = Vec::new();
    for ([a, b, c, e, f], lo, hi) in row_tuples(a, b, n.step) {
        let held: Vec<i64> = (lo..=hi)
            .step_by(2)
            .filter(|&d| n.position(&[a, b, c, d, e, f]).is_some_and(|p| bits.get(p)))
            .collect();
        if held.is_empty() {
            continue;
        }
        // one family over d (moved to the top left)
        let u = six_j_with_first([a, b, c, lo, e, f], 3);
        let family = six_j_over_j1(u[1], u[2], u[3], u[4], u[5]);
        for d in held {
            let k = [a, b, c, d, e, f];
            out.push((
                k,
                trusted_member(&family, d).unwrap_or_else(|| six_j_f64(k)),
            ));
        }
    }
    out
}

/// The values of every position the bits hold, in position order, handed
/// to `sink` a batch of rows at a time.
pub fn values(
    n: &SixJNumbering,
    bits: &RankedBits,
    sink: &mut dyn FnMut(&[SixJEntry]) -> std::io::Result<()>,
    progress: &mut dyn FnMut(u64, u64),
    stop: &dyn Fn() -> bool,
) -> std::io::Result<bool> {
    super::build::in_batches(
        batches(n, bits),
        |&(a, b)| row_values(n, bits, a, b),
        bits.ones(),
        sink,
        progress,
        stop,
    )
}
