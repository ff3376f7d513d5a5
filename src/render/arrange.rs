//! Arrangement for reading. Canonical forms are for matching; a printed
//! result shows each 6j and 9j symbol in the spelling, among those its
//! classical symmetries allow, whose arguments come in the order the
//! user's text first names them, and each 3j and Clebsch–Gordan
//! coefficient turned the way the user writes it. For a recoupling coefficient that is the
//! literature's arrangement: `{j1 j2 j12; j3 J j23}` for
//! `((j1, j2) j12, j3) J -> (j1, (j2, j3) j23) J`, `{l1 l2 L; s1 s2 S; j1
//! j2 J}` for LS to jj coupling (Edmonds 1957, eqs. 6.1.5 and 6.4.2, from
//! memory). The phase a spelling costs (an odd permutation of a 9j's rows
//! or columns) joins the term's phase, reduced modulo integrality; the
//! caller verifies the arranged result against the canonical one before
//! printing it.

use crate::algebra::lattice::PhaseLattice;
use crate::algebra::symmetry::classical_images;
use crate::expr::{Expr, Factor, Lin, Name, Term, TermParts, Q};
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
            let chars: Vec<char> = crate::syntax::without_declarations(text).chars().collect();
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

/// Runs `f` (the printing of an arranged result) with phases listing
/// their names in the order `texts` name them.
pub fn in_reading_order<T>(texts: &[&str], f: impl FnOnce() -> T) -> T {
    crate::expr::lin::with_reading_order(&ranks(texts), f)
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

/// The spelling of a 6j or 9j that leaves the term's phase (`phase`, then
/// the image's cost, reduced by `lattice`) shortest and, among those,
/// reads in the order of `ranks`, with the phase exponent it costs; other
/// factors as they are. (Only a 9j's odd permutations cost a phase: a
/// result carrying `(-1)^(sum of the nine)` reads better as the other
/// parity of rows, as the textbooks print it.)
fn arrange_factor(
    f: &Factor,
    ranks: &BTreeMap<Name, usize>,
    phase: &Lin,
    lattice: &PhaseLattice,
) -> (Factor, Lin) {
    if !matches!(f, Factor::SixJ(_) | Factor::NineJ(_)) {
        return (f.clone(), Lin::zero());
    }
    let reading = |g: &Factor| -> Vec<(usize, String)> {
        g.lins().into_iter().map(|l| key(l, ranks)).collect()
    };
    // images share few phases (none for a 6j, two for a 9j): each
    // distinct one is reduced once
    let mut reduced: Vec<(Lin, usize)> = Vec::new();
    let mut phase_terms = |p: &Lin| {
        if let Some((_, n)) = reduced.iter().find(|(q, _)| q == p) {
            return *n;
        }
        let r = lattice.reduce(&(phase + p));
        let n = r.terms().count() + usize::from(r.constant_part() != Q::from_integer(0));
        reduced.push((p.clone(), n));
        n
    };
    classical_images(f)
        .into_iter()
        .map(|img| ((phase_terms(&img.phase), reading(&img.factor)), img))
        // ties (equal keys) keep the first image, the identity among them
        .min_by(|a, b| a.0.cmp(&b.0))
        .map(|(_, img)| (img.factor, img.phase))
        .unwrap_or_else(|| (f.clone(), Lin::zero()))
}

/// What the user wrote, for arranging a result: the order in which the
/// text names its variables, and the 3j and Clebsch–Gordan symbols it
/// spells out.
#[derive(Clone, Debug, Default)]
pub struct Written {
    /// the order of first appearance (see `ranks`)
    pub ranks: BTreeMap<Name, usize>,
    /// the 3j and CG symbols of the texts that parse as expressions
    pub symbols: Vec<Factor>,
}

impl Written {
    /// Reads `texts` (expressions or coupling trees; a text that is not an
    /// expression gives ranks only).
    pub fn of_texts(texts: &[&str]) -> Written {
        let mut symbols = Vec::new();
        for text in texts {
            if let Ok((_, e)) = crate::syntax::parse_declared(text) {
                for t in e.terms() {
                    for f in t.factors() {
                        if matches!(f, Factor::ThreeJ(_) | Factor::Cg(_)) && !symbols.contains(f) {
                            symbols.push(f.clone());
                        }
                    }
                }
            }
        }
        Written {
            ranks: ranks(texts),
            symbols,
        }
    }

    /// How many columns of `f` hold an angular momentum or projection
    /// variable in the same column of a written symbol of the same kind.
    fn columns_in_place(&self, f: &Factor) -> usize {
        let name = |l: &Lin| l.as_signed_var().map(|(v, _)| v.clone());
        let same_kind = |g: &Factor| std::mem::discriminant(g) == std::mem::discriminant(f);
        f.columns()
            .iter()
            .enumerate()
            .map(|(k, (j, m))| {
                [name(j), name(m)]
                    .into_iter()
                    .flatten()
                    .filter(|v| {
                        self.symbols.iter().filter(|g| same_kind(g)).any(|g| {
                            g.columns().get(k).is_some_and(|(gj, gm)| {
                                name(gj).as_ref() == Some(v) || name(gm).as_ref() == Some(v)
                            })
                        })
                    })
                    .count()
            })
            .sum()
    }
}

/// `e` with every 6j and 9j arranged for reading by the written order,
/// and every 3j and Clebsch–Gordan coefficient turned the way the user
/// writes it (equal in value; phases reduced modulo integrality).
pub fn for_reading(e: &Expr, written: &Written) -> Expr {
    Expr::from_terms(e.terms().iter().map(|t| term_for_reading(t, written)))
}

/// One term of `for_reading`: its sums kept as they are, its symbols
/// turned and its phase rewritten.
pub fn term_for_reading(t: &Term, written: &Written) -> Term {
    let mut parts = t.parts();
    let mut phase = t.phase().clone();
    let lattice = PhaseLattice::of_term(t);
    parts.factors = t
        .factors()
        .iter()
        .map(|f| {
            let (g, p) = arrange_factor(f, &written.ranks, &phase, &lattice);
            phase = &phase + &p;
            g
        })
        .collect();
    parts.phase = phase;
    let mut term = with_reduced_phase(parts);
    let eligible: Vec<Factor> = term
        .factors()
        .iter()
        .filter(|f| matches!(f, Factor::ThreeJ(_) | Factor::Cg(_)))
        .cloned()
        .collect();
    for f in eligible {
        // the factor's place after the earlier turns (normal form sorts)
        if let Some(i) = term.factors().iter().position(|g| *g == f) {
            term = oriented(&term, i, written);
        }
    }
    term
}

/// The term of `parts` with its phase reduced by the term's lattice.
fn with_reduced_phase(parts: TermParts) -> Term {
    let term = parts.normalized();
    let lattice = PhaseLattice::of_term(&term);
    let mut parts = term.into_parts();
    parts.phase = lattice.reduce(&parts.phase);
    parts.normalized()
}

/// `hat(j)^(2 power)`: `(2j+1)^power`.
fn hat_power(j: &Lin, power: Q) -> Factor {
    Factor::Power(&j.scale(Q::from_integer(2)) + &Lin::int(1), power)
}

/// The term with factor `i` (a 3j or CG) replaced by each spelling its
/// classical symmetries allow, through the 3j for a CG (Edmonds 1957, eq.
/// 3.7.3: `<j1 m1; j2 m2 | J M> = (-1)^(j1-j2+M) hat(J) (j1, j2, J; m1, m2,
/// -M)`, from memory), each with the phase and hats it costs.
fn spellings(t: &Term, i: usize) -> Vec<(Term, Factor)> {
    let f = &t.factors()[i];
    let (three_j, to_three_j) = match f {
        Factor::Cg([a, al, b, be, c, ga]) => (
            Factor::ThreeJ([
                a.clone(),
                b.clone(),
                c.clone(),
                al.clone(),
                be.clone(),
                -ga,
            ]),
            Some((&(a - b) + ga, c.clone())),
        ),
        _ => (f.clone(), None),
    };
    let mut out = Vec::new();
    for img in classical_images(&three_j) {
        let mut parts = t.parts();
        parts.phase = &parts.phase + &img.phase;
        let replacement = match (&img.factor, &to_three_j) {
            (Factor::ThreeJ([y1, y2, y3, m1, m2, m3]), Some((phase, coupled))) => {
                // C = (-1)^phase hat(coupled) X, X = (-1)^img Y and
                // Y = (-1)^(y1-y2-m3) <y1 m1; y2 m2 | y3, -m3> / hat(y3)
                parts.phase = &(&parts.phase + phase) + &(&(y1 - y2) - m3);
                parts.factors.push(hat_power(coupled, Q::new(1, 2)));
                parts.factors.push(hat_power(y3, Q::new(-1, 2)));
                Factor::Cg([
                    y1.clone(),
                    m1.clone(),
                    y2.clone(),
                    m2.clone(),
                    y3.clone(),
                    -m3,
                ])
            }
            _ => img.factor.clone(),
        };
        parts.factors[i] = replacement.clone();
        out.push((with_reduced_phase(parts), replacement));
    }
    out
}

/// The spelling of factor `i` a reader expects: the user's own when the
/// text writes it, else no free projection written `-m`, columns where the
/// user's symbols keep the same names, fewest hats in denominators, fewest
/// hats, the shortest phase; ties keep the term as it is.
fn oriented(t: &Term, i: usize, written: &Written) -> Term {
    let key = |u: &Term, f: &Factor| {
        let negated_free = f
            .m_slots()
            .iter()
            .filter(|m| matches!(m.as_signed_var(), Some((v, true)) if !u.bound().contains(v)))
            .count();
        let hats: Vec<&Q> = u
            .factors()
            .iter()
            .filter_map(|g| match g {
                Factor::Power(_, e) if !e.is_integer() => Some(e),
                _ => None,
            })
            .collect();
        let denominators = hats.iter().filter(|e| ***e < Q::from_integer(0)).count();
        (
            !written.symbols.contains(f),
            negated_free,
            std::cmp::Reverse(written.columns_in_place(f)),
            denominators,
            hats.len(),
            u.phase().terms().count(),
        )
    };
    let mut best = t.clone();
    let mut best_key = key(t, &t.factors()[i]);
    for (u, f) in spellings(t, i) {
        let k = key(&u, &f);
        if k < best_key {
            best = u;
            best_key = k;
        }
    }
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn declarations_give_no_ranks() {
        let r = ranks(&["integer k, q; half-odd s; sum(q: (-1)^(q+s) {a, b, k; a, b, s})"]);
        assert_eq!(r[&Name::new("a")], 0);
        assert!(r[&Name::new("q")] > r[&Name::new("s")]);
    }

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
