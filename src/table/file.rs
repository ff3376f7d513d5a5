//! The files a 3j table is written to and read from.
//!
//! Indexed binary layout (little-endian throughout; our own):
//!
//! | offset | size | content |
//! |---|---|---|
//! | 0  | 8 | magic `RECOUP3J` |
//! | 8  | 4 | u32 layout version, 1 |
//! | 12 | 4 | u32 flags: bit 0 set when only integer j are covered |
//! | 16 | 8 | i64 largest doubled j of the domain |
//! | 24 | 8 | i64 largest line sum `J = j1+j2+j3` numbered |
//! | 32 | 8 | u64 positions `P` of the numbering |
//! | 40 | 8 | u64 entries `N` |
//! | 48 | 16 | zero |
//! | 64 | 8·⌈P/64⌉ | bitmap words, bit `p % 64` of word `p / 64` set when position `p` holds an entry |
//! | … | 8·N | f64 values in position order |
//!
//! Positions are those of `regge::Numbering`; the value at a set position
//! is the 3j of its key's square read with row 0 as the triangle row, and
//! entry `k` is the `k`-th set position.
//!
//! A 6j table has the same layout with magic `RECOUP6J`, bytes 16..24
//! the largest doubled entry, 24..32 zero, positions those of
//! `six_j::SixJNumbering` and values those of the canonical forms.
//!
//! Record files list one symbol per entry, a representative within the
//! domain with its own value: NumPy `.npy` (format 1.0, a structured array
//! of `two_j1, two_j2, two_j3, two_m1, two_m2, two_m3` as `<i4` and
//! `value` as `<f8`) and CSV (`j1,j2,j3,m1,m2,m3,value`, j and m as
//! decimals).

use super::build::{Domain, Entry};
use super::rank::RankedBits;
use super::regge::Numbering;
use super::six_j::{SixJDomain, SixJNumbering};
use std::io::{self, Write};

/// The magic bytes of the indexed layout.
pub const MAGIC: &[u8; 8] = b"RECOUP3J";
/// The magic bytes of a 6j table.
pub const MAGIC_6J: &[u8; 8] = b"RECOUP6J";
/// The layout version written.
pub const VERSION: u32 = 1;
/// Bytes before the bitmap.
pub const HEADER_BYTES: usize = 64;

/// The header of the indexed layout.
pub fn header(domain: &Domain, numbering: &Numbering, entries: u64) -> [u8; HEADER_BYTES] {
    let mut h = [0u8; HEADER_BYTES];
    h[0..8].copy_from_slice(MAGIC);
    h[8..12].copy_from_slice(&VERSION.to_le_bytes());
    h[12..16].copy_from_slice(&(domain.integer_only as u32).to_le_bytes());
    h[16..24].copy_from_slice(&domain.max_tj.to_le_bytes());
    h[24..32].copy_from_slice(&numbering.max_sum().to_le_bytes());
    h[32..40].copy_from_slice(&numbering.len().to_le_bytes());
    h[40..48].copy_from_slice(&entries.to_le_bytes());
    h
}

/// Writes the header and the bitmap of the indexed layout.
pub fn write_index(
    w: &mut dyn Write,
    domain: &Domain,
    numbering: &Numbering,
    bits: &RankedBits,
) -> io::Result<()> {
    w.write_all(&header(domain, numbering, bits.ones()))?;
    write_words(w, bits)
}

/// Writes the values of the indexed layout.
pub fn write_values(w: &mut dyn Write, entries: &[Entry]) -> io::Result<()> {
    let mut buf = Vec::with_capacity(entries.len() * 8);
    for e in entries {
        buf.extend_from_slice(&e.value.to_le_bytes());
    }
    w.write_all(&buf)
}

/// The NumPy header of a record file with `n` entries.
pub fn npy_header(n: u64) -> Vec<u8> {
    npy_header_with(
        "[('two_j1', '<i4'), ('two_j2', '<i4'), ('two_j3', '<i4'), \
         ('two_m1', '<i4'), ('two_m2', '<i4'), ('two_m3', '<i4'), ('value', '<f8')]",
        n,
    )
}

/// A NumPy format 1.0 header for a 1-d structured array.
fn npy_header_with(descr: &str, n: u64) -> Vec<u8> {
    let dict = format!("{{'descr': {descr}, 'fortran_order': False, 'shape': ({n},), }}");
    // magic (6) + version (2) + length (2) + dict + padding + '\n', a multiple of 64
    let unpadded = 10 + dict.len() + 1;
    let total = unpadded.div_ceil(64) * 64;
    let mut h = Vec::with_capacity(total);
    h.extend_from_slice(b"\x93NUMPY\x01\x00");
    h.extend_from_slice(&((total - 10) as u16).to_le_bytes());
    h.extend_from_slice(dict.as_bytes());
    h.resize(total - 1, b' ');
    h.push(b'\n');
    h
}

/// One record: the representative of an entry's orbit and its value.
fn record(domain: &Domain, e: &Entry) -> io::Result<([i64; 3], [i64; 3], f64)> {
    let (tj, tm, sign) = domain
        .representative(&e.key)
        .ok_or_else(|| io::Error::other("an entry without a representative in its domain"))?;
    Ok((tj, tm, e.value * sign as f64))
}

/// Writes the records of some entries as `.npy` rows.
pub fn write_npy_rows(w: &mut dyn Write, domain: &Domain, entries: &[Entry]) -> io::Result<()> {
    let mut buf = Vec::with_capacity(entries.len() * 32);
    for e in entries {
        let (tj, tm, v) = record(domain, e)?;
        for x in tj.iter().chain(tm.iter()) {
            buf.extend_from_slice(&(*x as i32).to_le_bytes());
        }
        buf.extend_from_slice(&v.to_le_bytes());
    }
    w.write_all(&buf)
}

/// The CSV header line.
pub const CSV_HEADER: &str = "j1,j2,j3,m1,m2,m3,value\n";

fn half(t: i64) -> String {
    if t % 2 == 0 {
        format!("{}", t / 2)
    } else {
        format!(
            "{}.5",
            if t < 0 {
                format!("-{}", (-t) / 2)
            } else {
                format!("{}", t / 2)
            }
        )
    }
}

/// Writes the records of some entries as CSV lines.
pub fn write_csv_rows(w: &mut dyn Write, domain: &Domain, entries: &[Entry]) -> io::Result<()> {
    let mut s = String::new();
    for e in entries {
        let (tj, tm, v) = record(domain, e)?;
        let fields: Vec<String> = tj.iter().chain(tm.iter()).map(|&t| half(t)).collect();
        s.push_str(&fields.join(","));
        s.push_str(&format!(",{v:.17e}\n"));
    }
    w.write_all(s.as_bytes())
}

/// A table file could not be read.
#[derive(Debug, thiserror::Error)]
pub enum TableFileError {
    /// reading failed
    #[error("{0}")]
    Io(#[from] io::Error),
    /// the bytes are not a table of this layout
    #[error("not a recoup 3j table: {0}")]
    Format(String),
}

fn u64_at(b: &[u8], at: usize) -> u64 {
    u64::from_le_bytes(b[at..at + 8].try_into().unwrap_or([0; 8]))
}

/// The parts of an indexed table read from its bytes.
pub struct Parts {
    /// the domain
    pub domain: Domain,
    /// the numbering
    pub numbering: Numbering,
    /// the bitmap
    pub bits: RankedBits,
    /// the values
    pub values: Vec<f64>,
}

/// The fields of a table header, its sizes checked against the bytes.
struct Header {
    integer_only: bool,
    /// the largest doubled j (3j) or entry (6j)
    bound: i64,
    /// bytes 24..32 (the 3j's largest line sum)
    max_sum: i64,
    positions: u64,
    entries: u64,
}

/// Reads and checks a header: magic, version, bound, and the file size the
/// counts imply (before anything is allocated).
fn read_header(bytes: &[u8], magic: &[u8; 8]) -> Result<Header, TableFileError> {
    let bad = |m: &str| TableFileError::Format(m.to_string());
    if bytes.len() < HEADER_BYTES || &bytes[0..8] != magic {
        return Err(bad(&format!(
            "the magic bytes {} are missing",
            String::from_utf8_lossy(magic)
        )));
    }
    let version = u32::from_le_bytes(bytes[8..12].try_into().unwrap_or([0; 4]));
    if version != VERSION {
        return Err(bad(&format!(
            "layout version {version}, this reader knows {VERSION}"
        )));
    }
    let flags = u32::from_le_bytes(bytes[12..16].try_into().unwrap_or([0; 4]));
    let h = Header {
        integer_only: flags & 1 == 1,
        bound: u64_at(bytes, 16) as i64,
        max_sum: u64_at(bytes, 24) as i64,
        positions: u64_at(bytes, 32),
        entries: u64_at(bytes, 40),
    };
    if !(0..=super::MAX_DOUBLED_J).contains(&h.bound) {
        return Err(bad("the header's bound is out of range"));
    }
    let expected = h
        .positions
        .div_ceil(64)
        .checked_mul(8)
        .and_then(|x| x.checked_add(h.entries.checked_mul(8)?))
        .and_then(|x| x.checked_add(HEADER_BYTES as u64))
        .ok_or_else(|| bad("the header's sizes overflow"))?;
    if bytes.len() as u64 != expected {
        return Err(bad(&format!(
            "{} bytes where the header implies {expected}",
            bytes.len()
        )));
    }
    Ok(h)
}

/// The bitmap and values after a checked header.
fn read_body(bytes: &[u8], h: &Header) -> Result<(RankedBits, Vec<f64>), TableFileError> {
    let words = h.positions.div_ceil(64) as usize;
    let word_bytes = &bytes[HEADER_BYTES..HEADER_BYTES + 8 * words];
    let bits = RankedBits::from_words(word_bytes.chunks_exact(8).map(|c| u64_at(c, 0)).collect());
    if bits.ones() != h.entries {
        return Err(TableFileError::Format(
            "the bitmap does not hold as many entries as the header says".into(),
        ));
    }
    let values = bytes[HEADER_BYTES + 8 * words..]
        .chunks_exact(8)
        .map(|c| f64::from_le_bytes(c.try_into().unwrap_or([0; 8])))
        .collect();
    Ok((bits, values))
}

fn count_mismatch() -> TableFileError {
    TableFileError::Format("the header's position count does not match its bounds".into())
}

/// Reads an indexed 3j table from its bytes, checking every size.
pub fn parse(bytes: &[u8]) -> Result<Parts, TableFileError> {
    let h = read_header(bytes, MAGIC)?;
    let domain = Domain {
        max_tj: h.bound,
        integer_only: h.integer_only,
    };
    if h.max_sum != domain.max_sum() {
        return Err(TableFileError::Format(
            "the header's bounds do not agree".into(),
        ));
    }
    let numbering = Numbering::new(h.max_sum);
    if numbering.len() != h.positions {
        return Err(count_mismatch());
    }
    let (bits, values) = read_body(bytes, &h)?;
    Ok(Parts {
        domain,
        numbering,
        bits,
        values,
    })
}

/// The header of a 6j table.
pub fn six_j_header(domain: &SixJDomain, positions: u64, entries: u64) -> [u8; HEADER_BYTES] {
    let mut h = [0u8; HEADER_BYTES];
    h[0..8].copy_from_slice(MAGIC_6J);
    h[8..12].copy_from_slice(&VERSION.to_le_bytes());
    h[12..16].copy_from_slice(&(domain.integer_only as u32).to_le_bytes());
    h[16..24].copy_from_slice(&domain.max_t.to_le_bytes());
    h[32..40].copy_from_slice(&positions.to_le_bytes());
    h[40..48].copy_from_slice(&entries.to_le_bytes());
    h
}

/// Writes the header and bitmap of a 6j table.
pub fn write_six_j_index(
    w: &mut dyn Write,
    numbering: &SixJNumbering,
    bits: &RankedBits,
) -> io::Result<()> {
    w.write_all(&six_j_header(
        &numbering.domain(),
        numbering.len(),
        bits.ones(),
    ))?;
    write_words(w, bits)
}

fn write_words(w: &mut dyn Write, bits: &RankedBits) -> io::Result<()> {
    let mut buf = Vec::with_capacity(1 << 16);
    for chunk in bits.words().chunks(8192) {
        buf.clear();
        for x in chunk {
            buf.extend_from_slice(&x.to_le_bytes());
        }
        w.write_all(&buf)?;
    }
    Ok(())
}

/// Writes 6j values, or records (`{a b c; d e f}` doubled, value) for
/// .npy and CSV.
pub fn write_six_j_rows(
    w: &mut dyn Write,
    layout: RowLayout,
    rows: &[([i64; 6], f64)],
) -> io::Result<()> {
    let mut buf = Vec::with_capacity(rows.len() * 32);
    for (k, v) in rows {
        match layout {
            RowLayout::Values => buf.extend_from_slice(&v.to_le_bytes()),
            RowLayout::Npy => {
                for x in k {
                    buf.extend_from_slice(&(*x as i32).to_le_bytes());
                }
                buf.extend_from_slice(&v.to_le_bytes());
            }
            RowLayout::Csv => {
                let fields: Vec<String> = k.iter().map(|&t| half(t)).collect();
                buf.extend_from_slice(format!("{},{v:.17e}\n", fields.join(",")).as_bytes());
            }
        }
    }
    w.write_all(&buf)
}

/// How rows of a table are written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RowLayout {
    /// f64 values only (the indexed layout)
    Values,
    /// .npy records
    Npy,
    /// CSV records
    Csv,
}

/// The NumPy header of a 6j record file with `n` entries.
pub fn six_j_npy_header(n: u64) -> Vec<u8> {
    npy_header_with(
        "[('two_j1', '<i4'), ('two_j2', '<i4'), ('two_j3', '<i4'), ('two_l1', '<i4'), \
         ('two_l2', '<i4'), ('two_l3', '<i4'), ('value', '<f8')]",
        n,
    )
}

/// The CSV header line of a 6j record file.
pub const SIX_J_CSV_HEADER: &str = "j1,j2,j3,l1,l2,l3,value\n";

/// The parts of a 6j table read from its bytes.
pub struct SixJParts {
    /// the numbering (and domain)
    pub numbering: SixJNumbering,
    /// the bitmap
    pub bits: RankedBits,
    /// the values
    pub values: Vec<f64>,
}

/// Reads a 6j table from its bytes, checking every size.
pub fn parse_six_j(bytes: &[u8]) -> Result<SixJParts, TableFileError> {
    let h = read_header(bytes, MAGIC_6J)?;
    let numbering = SixJNumbering::new(SixJDomain {
        max_t: h.bound,
        integer_only: h.integer_only,
    });
    if numbering.len() != h.positions {
        return Err(count_mismatch());
    }
    let (bits, values) = read_body(bytes, &h)?;
    Ok(SixJParts {
        numbering,
        bits,
        values,
    })
}
