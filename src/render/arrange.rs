//! Arrangement for reading. Canonical forms are for matching; a printed
//! result shows each 6j and 9j symbol in the spelling, among those its
//! classical symmetries allow, whose arguments come in the order the
//! user's text first names them. For a recoupling coefficient that is the
//! literature's arrangement: `{j1 j2 j12; j3 J j23}` for
//! `((j1, j2) j12, j3) J -> (j1, (j2, j3) j23) J`, `{l1 l2 L; s1 s2 S; j1
//! j2 J}` for LS to jj coupling (Edmonds 1957, eqs. 6.1.5 and 6.4.2, from
//! memory). The phase a spelling costs (an odd permutation of a 9j's rows
//! or columns) joins the term's phase, reduced modulo integrality; the
//! caller verifies the arranged result against the canonical one before
//! printing it.

use crate::algebra::lattice::PhaseLattice;
use crate::algebra::symmetry::classical_images;
use crate::expr::{Expr, Factor, Lin, Name};
use std::collections::BTreeMap;

/// The order in which `texts` first name each variable (the first text
/// first): names inside braces (the user's own 6j and 9j symbols) first,
/// in the order written, then every other name in the order written (so a
/// phase written before the symbols does not lead). Keywords and function
/// names get ranks too; they never match an argument.
pub fn ranks(texts: &[&str]) -> BTreeMap<Name, usize> {
    let mut out = BTreeMap::new();
    for inside_braces_only in [true, false] {
        for text in texts {
            let chars: Vec<char> = text.chars().collect();
            let mut depth = 0usize;
            let mut i = 0;
            while i < chars.len() {
                match chars[i] {
                    '{' => depth += 1,
                    '}' => depth = depth.saturating_sub(1),
                    c if c.is_ascii_alphabetic() => {
                        let start = i;
                        while i < chars.len()
                            && (chars[i].is_ascii_alphanumeric()
                                || chars[i] == '_'
                                || chars[i] == '\'')
                        {
                            i += 1;
                        }
                        if depth > 0 || !inside_braces_only {
                            let word: String = chars[start..i].iter().collect();
                            let next = out.len();
                            out.entry(Name::new(word)).or_insert(next);
                        }
                        continue;
                    }
                    _ => {}
                }
                i += 1;
            }
        }
    }
    out
}

/// The reading key of one argument: its variable's rank when it is a
/// single variable the text names, else after every named one (then by
/// its printed form).
fn key(l: &Lin, ranks: &BTreeMap<Name, usize>) -> (usize, String) {
    match l.as_var().and_then(|v| ranks.get(v)) {
        Some(r) => (*r, String::new()),
        None => (usize::MAX, l.to_string()),
    }
}

/// The spelling of a 6j or 9j that reads in the order of `ranks`, with
/// the phase exponent it costs; other factors as they are.
fn arrange_factor(f: &Factor, ranks: &BTreeMap<Name, usize>) -> (Factor, Lin) {
    if !matches!(f, Factor::SixJ(_) | Factor::NineJ(_)) {
        return (f.clone(), Lin::zero());
    }
    let reading = |g: &Factor| -> Vec<(usize, String)> {
        g.lins().into_iter().map(|l| key(l, ranks)).collect()
    };
    classical_images(f)
        .into_iter()
        // ties (equal keys) keep the first image, the identity among them
        .min_by(|a, b| reading(&a.factor).cmp(&reading(&b.factor)))
        .map(|img| (img.factor, img.phase))
        .unwrap_or_else(|| (f.clone(), Lin::zero()))
}

/// `e` with every 6j and 9j arranged for reading by `ranks` (equal in
/// value; phases reduced modulo integrality).
pub fn for_reading(e: &Expr, ranks: &BTreeMap<Name, usize>) -> Expr {
    Expr::from_terms(e.terms().iter().map(|t| {
        let mut parts = t.parts();
        let mut phase = t.phase().clone();
        parts.factors = t
            .factors()
            .iter()
            .map(|f| {
                let (g, p) = arrange_factor(f, ranks);
                phase = &phase + &p;
                g
            })
            .collect();
        parts.phase = phase;
        let arranged = parts.normalized();
        let lattice = PhaseLattice::of_term(&arranged);
        let mut parts = arranged.into_parts();
        parts.phase = lattice.reduce(&parts.phase);
        parts.normalized()
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ranks_follow_first_appearance() {
        let r = ranks(&["((l, s) j, I) F", "(l, (s, I) G) F"]);
        let order: Vec<(&str, usize)> = ["l", "s", "j", "I", "F", "G"]
            .iter()
            .map(|n| (*n, r[&Name::new(*n)]))
            .collect();
        assert_eq!(order, [("l", 0), ("s", 1), ("j", 2), ("I", 3), ("F", 4), ("G", 5)]);
        // names inside the user's braces lead; a phase written first does not
        let r = ranks(&["sum(x: (-1)^(p+q+x) {a, b, x; c, d, p} {c, d, x; b, a, q})"]);
        let first: Vec<&str> = ["a", "b", "x", "c", "d", "p", "q"]
            .into_iter()
            .filter(|n| r[&Name::new(*n)] < 7)
            .collect();
        assert_eq!(first, ["a", "b", "x", "c", "d", "p", "q"]);
        assert!(r[&Name::new("sum")] >= 7);
    }
}
