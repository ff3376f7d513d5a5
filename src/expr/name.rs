//! Variable names with the natural order theorists expect (`j2 < j10`,
//! `j < j'`, `j1 < J < M`), used as keys everywhere a canonical order is
//! needed.

use std::cmp::Ordering;
use std::fmt;

/// A variable name: letters, digits, `_`, trailing primes.
#[derive(Clone, PartialEq, Eq, Hash)]
pub struct Name(String);

impl Name {
    /// Wraps a string (callers guarantee it is a valid identifier).
    pub fn new(s: impl Into<String>) -> Self {
        Name(s.into())
    }

    /// The text of the name.
    pub fn as_str(&self) -> &str {
        &self.0
    }

    /// The same name with one more prime.
    pub fn primed(&self) -> Name {
        Name(format!("{}'", self.0))
    }
}

impl fmt::Display for Name {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl fmt::Debug for Name {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl From<&str> for Name {
    fn from(s: &str) -> Self {
        Name(s.to_string())
    }
}

/// Natural comparison without allocation: runs of digits compare by
/// value (then by length, so `j01` and `j1` differ), other bytes as bytes.
fn natural_cmp(a: &[u8], b: &[u8]) -> Ordering {
    let (mut i, mut k) = (0, 0);
    while i < a.len() && k < b.len() {
        let (x, y) = (a[i], b[k]);
        if x.is_ascii_digit() && y.is_ascii_digit() {
            let si = i;
            let sk = k;
            while i < a.len() && a[i].is_ascii_digit() {
                i += 1;
            }
            while k < b.len() && b[k].is_ascii_digit() {
                k += 1;
            }
            let da = trim_zeros(&a[si..i]);
            let db = trim_zeros(&b[sk..k]);
            let o = da
                .len()
                .cmp(&db.len())
                .then_with(|| da.cmp(db))
                .then_with(|| (i - si).cmp(&(k - sk)));
            if o != Ordering::Equal {
                return o;
            }
        } else if x.is_ascii_digit() != y.is_ascii_digit() {
            // a digit run sorts after a letter at the same place
            return if x.is_ascii_digit() {
                Ordering::Greater
            } else {
                Ordering::Less
            };
        } else {
            // letters compare without case first, then lower before upper
            // (j1 < j2 < J < M, as papers order them)
            let o = x
                .to_ascii_lowercase()
                .cmp(&y.to_ascii_lowercase())
                .then_with(|| y.is_ascii_lowercase().cmp(&x.is_ascii_lowercase()));
            if o != Ordering::Equal {
                return o;
            }
            i += 1;
            k += 1;
        }
    }
    (a.len() - i).cmp(&(b.len() - k))
}

fn trim_zeros(d: &[u8]) -> &[u8] {
    let z = d.iter().take_while(|c| **c == b'0').count();
    &d[z..]
}

impl Ord for Name {
    fn cmp(&self, other: &Self) -> Ordering {
        if self.0 == other.0 {
            return Ordering::Equal;
        }
        natural_cmp(self.0.as_bytes(), other.0.as_bytes())
    }
}

impl PartialOrd for Name {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn natural_order() {
        let mut v: Vec<Name> = ["j10", "j2", "j1'", "j1", "J", "a"]
            .iter()
            .map(|s| Name::from(*s))
            .collect();
        v.sort();
        let s: Vec<&str> = v.iter().map(|n| n.as_str()).collect();
        assert_eq!(s, ["a", "j1", "j1'", "j2", "j10", "J"]);
    }
}
