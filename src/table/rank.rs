//! A bitmap over a numbering with constant-time rank: which positions hold
//! an entry, and how many entries come before a position. Words are u64,
//! bit `i % 64` of word `i / 64`. For rank the words are also kept in
//! cache-line blocks of 7 words behind the count of entries before the
//! block, so a rank reads one cache line (common practice, no source).

/// Words per counted block: a block is one 64-byte cache line, its count
/// of earlier entries and 7 words of bits.
pub const BLOCK_WORDS: usize = 7;
const BLOCK_BITS: u64 = 64 * BLOCK_WORDS as u64;

/// One cache line of the index.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[repr(C, align(64))]
struct Block {
    before: u64,
    words: [u64; BLOCK_WORDS],
}

/// The bitmap and its block counts.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct RankedBits {
    words: Vec<u64>,
    blocks: Vec<Block>,
    ones: u64,
}

impl RankedBits {
    /// Bits from their words (the tail past the last position must be 0).
    pub fn from_words(words: Vec<u64>) -> RankedBits {
        let mut blocks = Vec::with_capacity(words.len().div_ceil(BLOCK_WORDS));
        let mut total = 0u64;
        for chunk in words.chunks(BLOCK_WORDS) {
            let mut b = Block {
                before: total,
                ..Block::default()
            };
            b.words[..chunk.len()].copy_from_slice(chunk);
            total += chunk.iter().map(|w| w.count_ones() as u64).sum::<u64>();
            blocks.push(b);
        }
        RankedBits {
            words,
            blocks,
            ones: total,
        }
    }

    /// The words.
    pub fn words(&self) -> &[u64] {
        &self.words
    }

    /// How many bits are set.
    pub fn ones(&self) -> u64 {
        self.ones
    }

    /// Whether position `i` is set.
    pub fn get(&self, i: u64) -> bool {
        let w = (i / 64) as usize;
        w < self.words.len() && self.words[w] >> (i % 64) & 1 == 1
    }

    /// How many set positions come before position `i`.
    pub fn ones_before(&self, i: u64) -> u64 {
        let Some(block) = self.blocks.get((i / BLOCK_BITS) as usize) else {
            return self.ones;
        };
        let within = i % BLOCK_BITS;
        let (w, bit) = ((within / 64) as usize, within % 64);
        let mut r = block.before;
        for x in &block.words[..w] {
            r += x.count_ones() as u64;
        }
        r + (block.words[w] & ((1u64 << bit) - 1)).count_ones() as u64
    }

    /// The entry number of position `i` when it is set (one cache line).
    pub fn rank(&self, i: u64) -> Option<u64> {
        let block = self.blocks.get((i / BLOCK_BITS) as usize)?;
        let within = i % BLOCK_BITS;
        let (w, bit) = ((within / 64) as usize, within % 64);
        let word = block.words[w];
        if word >> bit & 1 == 0 {
            return None;
        }
        let mut r = block.before;
        for x in &block.words[..w] {
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
            assert_eq!(bits.ones_before(i), i.div_ceil(3), "{i}");
        }
        assert_eq!(bits.rank(n + 64 * 100), None);
    }
}
