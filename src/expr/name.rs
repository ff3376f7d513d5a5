//! Variable names with the natural order theorists expect (`j2 < j10`,
//! `j < j'`), used as keys everywhere a canonical order is needed.

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

/// Splits into runs of digits and non-digits for natural comparison.
fn chunks(s: &str) -> Vec<(bool, &str)> {
    let mut out = Vec::new();
    let mut start = 0;
    let bytes = s.as_bytes();
    for i in 1..=bytes.len() {
        if i == bytes.len() || bytes[i].is_ascii_digit() != bytes[start].is_ascii_digit() {
            out.push((bytes[start].is_ascii_digit(), &s[start..i]));
            start = i;
        }
    }
    out
}

impl Ord for Name {
    fn cmp(&self, other: &Self) -> Ordering {
        let a = chunks(&self.0);
        let b = chunks(&other.0);
        for (x, y) in a.iter().zip(&b) {
            let o = match (x.0, y.0) {
                (true, true) => {
                    let xv = x.1.trim_start_matches('0');
                    let yv = y.1.trim_start_matches('0');
                    xv.len()
                        .cmp(&yv.len())
                        .then_with(|| xv.cmp(yv))
                        .then_with(|| x.1.len().cmp(&y.1.len()))
                }
                _ => x.1.cmp(y.1),
            };
            if o != Ordering::Equal {
                return o;
            }
        }
        a.len().cmp(&b.len())
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
        assert_eq!(s, ["J", "a", "j1", "j1'", "j2", "j10"]);
    }
}
