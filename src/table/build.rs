//! Building a 3j table: which canonical keys a domain holds (a bitmap over
//! the numbering), then their values in position order, computed in
//! parallel (rayon) one line sum at a time and handed to a sink in order,
//! so memory stays bounded by the largest line sum's entries.
//!
//! Values come from the recursion over m2 (`numeric::family`): the keys of
//! one `(J, S, a, c)` row are one 3j family with m1 fixed, so each value
//! costs O(1); a member the family does not trust (small beside its
//! neighbours) is evaluated on its own (`numeric::float::three_j_f64`).

use super::rank::RankedBits;
use super::regge::{
    is_canonical, line_fits, square_of_key, three_j_of, view_within, Key, Numbering, Square,
};
use crate::numeric::family::three_j_over_m2;
use crate::numeric::float::{three_j_f64, trusted_member};
use rayon::prelude::*;

/// Which 3j symbols a table covers: every orbit (under the 72 symmetries)
/// that holds a symbol with every j at most `max_tj / 2`, and, with
/// `integer_only`, every j an integer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Domain {
    /// the largest doubled j
    pub max_tj: i64,
    /// only symbols with integer j
    pub integer_only: bool,
}

impl Domain {
    /// The largest line sum `j1 + j2 + j3` of the domain.
    pub fn max_sum(&self) -> i64 {
        3 * self.max_tj / 2
    }

    /// The smallest entry of a line that reads as a 3j within the bound.
    fn floor(&self, sum: i64) -> i64 {
        sum - self.max_tj
    }

    fn parity(&self, sum: i64) -> Option<i64> {
        self.integer_only.then_some(sum.rem_euclid(2))
    }

    /// Whether the orbit of a square holds a symbol of the domain.
    pub fn holds(&self, sq: &Square) -> bool {
        let sum: i64 = sq[0].iter().sum();
        let (floor, parity) = (self.floor(sum), self.parity(sum));
        (0..3).any(|i| line_fits(sq[i], floor, parity))
            || (0..3).any(|k| line_fits([sq[0][k], sq[1][k], sq[2][k]], floor, parity))
    }

    /// A symbol of the orbit within the domain (doubled `j`, `m`) and the
    /// sign that takes the key's symbol to it.
    pub fn representative(&self, key: &Key) -> Option<([i64; 3], [i64; 3], i8)> {
        view_within(
            &square_of_key(key),
            self.floor(key.sum),
            self.parity(key.sum),
        )
    }
}

/// One entry handed to a sink: its key and the value of the key's symbol
/// (the square of the key read with row 0 as the triangle row).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Entry {
    /// the canonical key
    pub key: Key,
    /// the value of the key's own symbol
    pub value: f64,
}

/// Which positions of `numbering` the domain holds.
pub fn positions(
    domain: &Domain,
    numbering: &Numbering,
    stop: &dyn Fn() -> bool,
) -> Option<RankedBits> {
    let words = numbering.len().div_ceil(64) as usize;
    let mut all = vec![0u64; words];
    let sums: Vec<i64> = (0..=numbering.max_sum()).collect();
    for chunk in sums.chunks(8) {
        if stop() {
            return None;
        }
        let parts: Vec<(u64, Vec<u64>)> = chunk
            .par_iter()
            .map(|&sum| {
                let (start, end) = numbering.span(sum);
                let mut local = vec![0u64; (end - start).div_ceil(64) as usize];
                for (pos, row) in numbering.rows(sum) {
                    for e in 0..=row.a - row.s {
                        let key = Key { e, ..row };
                        if domain.holds(&square_of_key(&key)) && is_canonical(&key) {
                            let i = pos + e as u64 - start;
                            local[(i / 64) as usize] |= 1 << (i % 64);
                        }
                    }
                }
                (start, local)
            })
            .collect();
        for (start, local) in parts {
            merge_at(&mut all, start, &local);
        }
    }
    Some(RankedBits::from_words(all))
}

/// ORs `local` (bit 0 = position `start`) into `all`.
fn merge_at(all: &mut [u64], start: u64, local: &[u64]) {
    let (w0, shift) = ((start / 64) as usize, start % 64);
    for (i, &x) in local.iter().enumerate() {
        if x == 0 {
            continue;
        }
        all[w0 + i] |= x << shift;
        if shift != 0 && w0 + i + 1 < all.len() {
            all[w0 + i + 1] |= x >> (64 - shift);
        }
    }
}

/// The entries of one line sum, in position order.
fn entries_of_sum(numbering: &Numbering, bits: &RankedBits, sum: i64) -> Vec<Entry> {
    let mut out = Vec::new();
    for (pos, row) in numbering.rows(sum) {
        let len = (row.a - row.s + 1) as u64;
        if !(0..len).any(|e| bits.get(pos + e)) {
            continue;
        }
        let (tj, tm) = three_j_of(&square_of_key(&row));
        let family = three_j_over_m2(tj[0], tj[1], tj[2], tm[0]);
        for e in 0..len {
            if !bits.get(pos + e) {
                continue;
            }
            let key = Key { e: e as i64, ..row };
            // e' up by one: m2 down by one (doubled: 2), m3 up by one
            let tm2 = tm[1] - 2 * e as i64;
            let value = trusted_member(&family, tm2)
                .unwrap_or_else(|| three_j_f64(tj, [tm[0], tm2, -tm[0] - tm2]));
            out.push(Entry { key, value });
        }
    }
    out
}

/// Runs `work` on every item of each batch in parallel (rayon), and hands
/// the results to `sink` in order, batch by batch; `progress(done,
/// total)` after each batch; `stop()` true ends early (returns false).
pub fn in_batches<T: Sync, E: Send, B: AsRef<[T]>>(
    batches: impl IntoIterator<Item = B>,
    work: impl Fn(&T) -> Vec<E> + Sync,
    total: u64,
    sink: &mut dyn FnMut(&[E]) -> std::io::Result<()>,
    progress: &mut dyn FnMut(u64, u64),
    stop: &dyn Fn() -> bool,
) -> std::io::Result<bool> {
    let mut done = 0u64;
    for batch in batches {
        if stop() {
            return Ok(false);
        }
        let parts: Vec<Vec<E>> = batch.as_ref().par_iter().map(&work).collect();
        for part in parts {
            done += part.len() as u64;
            sink(&part)?;
        }
        progress(done, total);
    }
    Ok(true)
}

/// Computes every entry the bits hold, in position order, and hands them
/// to `sink` a few line sums at a time; `progress(done, total)` is called
/// between batches; `stop()` true ends the work early (returns false).
pub fn values(
    numbering: &Numbering,
    bits: &RankedBits,
    sink: &mut dyn FnMut(&[Entry]) -> std::io::Result<()>,
    progress: &mut dyn FnMut(u64, u64),
    stop: &dyn Fn() -> bool,
) -> std::io::Result<bool> {
    let sums: Vec<i64> = (0..=numbering.max_sum()).collect();
    in_batches(
        sums.chunks(4),
        |&sum| entries_of_sum(numbering, bits, sum),
        bits.ones(),
        sink,
        progress,
        stop,
    )
}
