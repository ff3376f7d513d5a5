//! A bitmap over a numbering with constant-time rank: which positions hold
//! an entry, and how many entries come before a position. Words are u64,
//! bit `i % 64` of word `i / 64`; a cumulative count is kept for every
//! block of 8 words (512 bits), so a rank reads one count and at most one
//! cache line of words (common practice, no source).

/// Words per counted block.
pub const BLOCK_WORDS: usize = 8;

/// The bitmap and its block counts.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct RankedBits {
    words: Vec<u64>,
    /// entries before each block, and the total at the end
    counts: Vec<u64>,
}

impl RankedBits {
    /// Bits from their words (the tail past the last position must be 0).
    pub fn from_words(words: Vec<u64>) -> RankedBits {
        let mut counts = Vec::with_capacity(words.len() / BLOCK_WORDS + 2);
        let mut total = 0u64;
        for (i, w) in words.iter().enumerate() {
            if i % BLOCK_WORDS == 0 {
                counts.push(total);
            }
            total += w.count_ones() as u64;
        }
        counts.push(total);
        RankedBits { words, counts }
    }

    /// The words.
    pub fn words(&self) -> &[u64] {
        &self.words
    }

    /// How many bits are set.
    pub fn ones(&self) -> u64 {
        *self.counts.last().unwrap_or(&0)
    }

    /// Whether position `i` is set.
    pub fn get(&self, i: u64) -> bool {
        let w = (i / 64) as usize;
        w < self.words.len() && self.words[w] >> (i % 64) & 1 == 1
    }

    /// The entry number of position `i` when it is set.
    pub fn rank(&self, i: u64) -> Option<u64> {
        let w = (i / 64) as usize;
        let word = *self.words.get(w)?;
        let bit = i % 64;
        if word >> bit & 1 == 0 {
            return None;
        }
        let block = w / BLOCK_WORDS;
        let mut r = self.counts[block];
        for x in &self.words[block * BLOCK_WORDS..w] {
            r += x.count_ones() as u64;
        }
        r += (word & ((1u64 << bit) - 1)).count_ones() as u64;
        Some(r)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rank_counts_the_bits_before() {
        // every third position set, over 3000 positions
        let n = 3000u64;
        let mut words = vec![0u64; n.div_ceil(64) as usize];
        for i in (0..n).step_by(3) {
            words[(i / 64) as usize] |= 1 << (i % 64);
        }
        let bits = RankedBits::from_words(words);
        assert_eq!(bits.ones(), n.div_ceil(3));
        for i in 0..n {
            assert_eq!(bits.rank(i), (i % 3 == 0).then_some(i / 3), "{i}");
        }
        assert_eq!(bits.rank(n + 64 * 100), None);
    }
}
