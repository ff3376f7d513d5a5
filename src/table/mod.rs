//! Bulk tables of 3j symbols (and Clebsch–Gordan coefficients through
//! them) and of 6j symbols: every symbol unique under its symmetries (the
//! 72 of the 3j, permutations, the sign of the projections and Regge's;
//! the 24 classical ones of the 6j) up to a largest j, computed in
//! parallel, written to a file a numeric code reads, and looked up by any
//! argument list.
//!
//! - `regge`: the Regge square, canonical keys and their dense numbering;
//! - `rank`: the bitmap of keys a table holds, with constant-time rank;
//! - `build`: which keys a domain holds and their values, in parallel;
//! - `six_j`: canonical 6j forms, their numbering and values;
//! - `file`: the indexed binary layout and the record files (.npy, CSV).
//!
//! A lookup builds the Regge square, finds its canonical key and the sign
//! the symmetries cost, numbers the key and ranks it in the bitmap: a few
//! tens of integer operations and no search.

pub mod build;
pub mod file;
pub mod rank;
pub mod regge;
pub mod six_j;

use build::Domain;
use rank::RankedBits;
use regge::{canonical, square_of, Canonical, Numbering};

/// The largest doubled j a table may be asked for (the size limits of
/// `tabulate` stop well before it).
pub const MAX_DOUBLED_J: i64 = 1000;

/// Where a symbol is in a table.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Lookup {
    /// zero by its selection rules or a sign-reversing symmetry
    Zero,
    /// `symbol = sign * values[index]`
    Entry {
        /// the entry number
        index: u64,
        /// `+1` or `-1`
        sign: i8,
    },
    /// a symbol the table does not cover (beyond its largest j)
    Outside,
}

/// A 3j table in memory.
pub struct ThreeJTable {
    domain: Domain,
    numbering: Numbering,
    bits: RankedBits,
    values: Vec<f64>,
}

impl ThreeJTable {
    /// A table from the bytes of the indexed layout (`file`).
    pub fn from_bytes(bytes: &[u8]) -> Result<ThreeJTable, file::TableFileError> {
        let p = file::parse(bytes)?;
        Ok(ThreeJTable {
            domain: p.domain,
            numbering: p.numbering,
            bits: p.bits,
            values: p.values,
        })
    }

    /// A table read from a file of the indexed layout.
    pub fn read(path: &std::path::Path) -> Result<ThreeJTable, file::TableFileError> {
        ThreeJTable::from_bytes(&std::fs::read(path)?)
    }

    /// A table built in memory (for tests and small tables).
    pub fn build(domain: Domain) -> ThreeJTable {
        let numbering = Numbering::new(domain.max_sum());
        let never = || false;
        let bits = build::positions(&domain, &numbering, &never).unwrap_or_default();
        let mut values = Vec::with_capacity(bits.ones() as usize);
        let mut keep = |e: &[build::Entry]| {
            values.extend(e.iter().map(|x| x.value));
            Ok(())
        };
        let _ = build::values(&numbering, &bits, &mut keep, &mut |_, _| {}, &never);
        ThreeJTable {
            domain,
            numbering,
            bits,
            values,
        }
    }

    /// The domain the table covers.
    pub fn domain(&self) -> Domain {
        self.domain
    }

    /// How many entries the table holds.
    pub fn len(&self) -> usize {
        self.values.len()
    }

    /// Whether it holds none.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// The stored values, in entry order.
    pub fn values(&self) -> &[f64] {
        &self.values
    }

    /// Where `(j1 j2 j3; m1 m2 m3)` is (doubled arguments).
    pub fn locate(&self, tj: [i64; 3], tm: [i64; 3]) -> Lookup {
        let Some(sq) = square_of(tj, tm) else {
            return Lookup::Zero;
        };
        match canonical(&sq) {
            Canonical::Zero => Lookup::Zero,
            Canonical::At { key, sign } => {
                match self
                    .numbering
                    .position(&key)
                    .and_then(|p| self.bits.rank(p))
                {
                    Some(index) => Lookup::Entry { index, sign },
                    None => Lookup::Outside,
                }
            }
        }
    }

    /// The 3j symbol from the table, `None` outside it.
    pub fn three_j(&self, tj: [i64; 3], tm: [i64; 3]) -> Option<f64> {
        match self.locate(tj, tm) {
            Lookup::Zero => Some(0.0),
            Lookup::Entry { index, sign } => Some(sign as f64 * self.values[index as usize]),
            Lookup::Outside => None,
        }
    }

    /// `<j1 m1; j2 m2 | J M>` from the table through
    /// `(-1)^(j1-j2+M) sqrt(2J+1) (j1 j2 J; m1 m2 -M)` (Edmonds 3.7.3),
    /// `None` outside it.
    pub fn clebsch_gordan(
        &self,
        tj1: i64,
        tm1: i64,
        tj2: i64,
        tm2: i64,
        tjj: i64,
        tmm: i64,
    ) -> Option<f64> {
        let v = self.three_j([tj1, tj2, tjj], [tm1, tm2, -tmm])?;
        if v == 0.0 {
            return Some(0.0);
        }
        let e = (tj1 - tj2 + tmm) / 2;
        let sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
        Some(sign * ((tjj + 1) as f64).sqrt() * v)
    }
}

/// A 6j table in memory.
pub struct SixJTable {
    numbering: six_j::SixJNumbering,
    bits: RankedBits,
    values: Vec<f64>,
}

impl SixJTable {
    /// A table from the bytes of the indexed layout (`file`).
    pub fn from_bytes(bytes: &[u8]) -> Result<SixJTable, file::TableFileError> {
        let p = file::parse_six_j(bytes)?;
        Ok(SixJTable {
            numbering: p.numbering,
            bits: p.bits,
            values: p.values,
        })
    }

    /// A table read from a file of the indexed layout.
    pub fn read(path: &std::path::Path) -> Result<SixJTable, file::TableFileError> {
        SixJTable::from_bytes(&std::fs::read(path)?)
    }

    /// A table built in memory (for tests and small tables).
    pub fn build(domain: six_j::SixJDomain) -> SixJTable {
        let numbering = six_j::SixJNumbering::new(domain);
        let never = || false;
        let bits = six_j::positions(&numbering, &never).unwrap_or_default();
        let mut values = Vec::with_capacity(bits.ones() as usize);
        let mut keep = |rows: &[([i64; 6], f64)]| {
            values.extend(rows.iter().map(|x| x.1));
            Ok(())
        };
        let _ = six_j::values(&numbering, &bits, &mut keep, &mut |_, _| {}, &never);
        SixJTable {
            numbering,
            bits,
            values,
        }
    }

    /// The domain the table covers.
    pub fn domain(&self) -> six_j::SixJDomain {
        self.numbering.domain()
    }

    /// How many entries the table holds.
    pub fn len(&self) -> usize {
        self.values.len()
    }

    /// Whether it holds none.
    pub fn is_empty(&self) -> bool {
        self.values.is_empty()
    }

    /// The stored values, in entry order.
    pub fn values(&self) -> &[f64] {
        &self.values
    }

    /// Where `{j1 j2 j3; l1 l2 l3}` is (doubled arguments).
    pub fn locate(&self, t: [i64; 6]) -> Lookup {
        let Some(k) = six_j::canonical(t) else {
            return Lookup::Zero;
        };
        match self.numbering.position(&k).and_then(|p| self.bits.rank(p)) {
            Some(index) => Lookup::Entry { index, sign: 1 },
            None => Lookup::Outside,
        }
    }

    /// The 6j symbol from the table, `None` outside it.
    pub fn six_j(&self, t: [i64; 6]) -> Option<f64> {
        match self.locate(t) {
            Lookup::Zero => Some(0.0),
            Lookup::Entry { index, .. } => Some(self.values[index as usize]),
            Lookup::Outside => None,
        }
    }
}
