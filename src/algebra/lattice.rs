//! Phases modulo integrality. In a term, `2v` is an integer for every
//! variable, and so are `a+b+c` for every triad its symbols and triangle
//! factors contain, `j-m` for every (j, m) column of a 3j or CG, and the
//! term's own phase exponent (a phase only means something where it is an
//! integer); projection conservation and deltas are 0 on the support. A phase
//! `(-1)^e` only depends on `e` modulo `L = 2·I + Z` (I the integer lattice
//! of those, Z the zero forms). `PhaseLattice` holds an echelon basis of L
//! (Hermite normal form over the integers) and reduces `e` to a canonical
//! representative: projections are eliminated first (in reverse name
//! order, and kept with coefficient -1 rather than +1 modulo 2, so `j-m`
//! stays `j-m`), then other variables, then angular momenta, then the
//! constant; coefficients are taken in (-d/2, d/2].

use crate::expr::{Factor, Kind, Lin, Name, Term, Q};
use num_integer::Integer;
use num_traits::Zero;
use std::collections::BTreeMap;

/// An echelon basis of a lattice of linear forms, with the column order
/// used for reduction.
#[derive(Clone, Debug)]
pub struct PhaseLattice {
    columns: Vec<Name>,
    kinds: Vec<Kind>,
    scale: i128,
    /// (pivot column, row); rows have zeros left of their pivot
    rows: Vec<(usize, Vec<i128>)>,
    /// the integer lattice I itself, for integrality tests
    int_rows: Vec<(usize, Vec<i128>)>,
    /// the generators of L, for choosing a readable representative
    gens: Vec<Vec<i128>>,
}

/// Forms known to be integers in a term, and forms known to be zero
/// (declared parities included).
pub fn integral_forms(t: &Term) -> (Vec<Lin>, Vec<Lin>) {
    integral_forms_except(t, None)
}

/// `integral_forms` without the declaration of `skip` (to test whether
/// the rest of the term implies it).
pub fn integral_forms_except(t: &Term, skip: Option<&Name>) -> (Vec<Lin>, Vec<Lin>) {
    let mut ints = Vec::new();
    if !super::declare::nothing_declared() {
        let vars = t.all_vars();
        ints.extend(super::declare::declared_forms(
            vars.iter().filter(|v| Some(*v) != skip),
        ));
    }
    let mut zeros = Vec::new();
    for f in t.factors() {
        for [a, b, c] in f.triads() {
            ints.push(&(a + b) + c);
        }
        for (j, m) in f.columns() {
            ints.push(j - m);
        }
        if let Some(c) = f.conservation() {
            zeros.push(c);
        }
        if let Factor::Delta(a, b) = f {
            zeros.push(a - b);
        }
    }
    (ints, zeros)
}

fn lcm_den(ls: &[&Lin]) -> i128 {
    let mut d: i64 = 2;
    for l in ls {
        for (_, c) in l.terms() {
            d = d.lcm(c.denom());
        }
        d = d.lcm(l.constant_part().denom());
    }
    d as i128
}

/// Reduces the rows to echelon form (columns left to right).
fn echelon(mut rows: Vec<Vec<i128>>, ncols: usize) -> Vec<(usize, Vec<i128>)> {
    let mut out = Vec::new();
    for col in 0..ncols {
        crate::limits::tick();
        loop {
            // rows with a nonzero entry in col
            let nz: Vec<usize> = (0..rows.len()).filter(|&i| rows[i][col] != 0).collect();
            if nz.len() <= 1 {
                if let Some(&i) = nz.first() {
                    let mut r = rows.swap_remove(i);
                    if r[col] < 0 {
                        for x in r.iter_mut() {
                            *x = -*x;
                        }
                    }
                    out.push((col, r));
                }
                break;
            }
            let min = *nz.iter().min_by_key(|&&i| rows[i][col].abs()).unwrap();
            let p = rows[min][col];
            for &i in &nz {
                if i == min {
                    continue;
                }
                let q = Integer::div_floor(&rows[i][col], &p);
                let pr = rows[min].clone();
                for (x, y) in rows[i].iter_mut().zip(&pr) {
                    *x -= q * y;
                }
            }
        }
        rows.retain(|r| r.iter().any(|x| *x != 0));
    }
    out
}

/// How hard a phase exponent is to read: more variables, larger
/// coefficients, negative coefficients, a negative lead and a constant are
/// worse, in that order; ties broken by the form itself.
fn badness(l: &Lin) -> (usize, i64, usize, bool, bool, Lin) {
    let c0 = l.constant_part();
    let neg = l.terms().filter(|(_, c)| **c < Q::zero()).count() + usize::from(c0 < Q::zero());
    let size: i64 = l
        .terms()
        .map(|(_, c)| c.numer().abs() * 1000 / c.denom())
        .sum::<i64>()
        + c0.numer().abs() * 1000 / c0.denom();
    (
        l.terms().count(),
        size,
        neg,
        l.leading_negative(),
        !l.constant_part().is_zero(),
        l.clone(),
    )
}

impl PhaseLattice {
    /// The lattice of a term (its free and bound variables alike).
    pub fn of_term(t: &Term) -> PhaseLattice {
        Self::of_term_eliminating(t, &[])
    }

    /// The lattice of a term with extra forms known to be integers.
    pub fn of_term_with(t: &Term, extra: &[Lin]) -> PhaseLattice {
        let (mut ints, zeros) = integral_forms(t);
        if !t.phase().is_zero() {
            ints.push(t.phase().clone());
        }
        ints.extend(extra.iter().cloned());
        let kinds = t.kinds();
        PhaseLattice::with_order(&kinds, &ints, &zeros, &[])
    }

    /// The lattice of a term with the columns of `first` reduced before all
    /// others (to test whether a phase can be freed of those variables).
    pub fn of_term_eliminating(t: &Term, first: &[Name]) -> PhaseLattice {
        let (mut ints, zeros) = integral_forms(t);
        // the phase exponent itself is an integer wherever it means anything
        if !t.phase().is_zero() {
            ints.push(t.phase().clone());
        }
        let kinds = t.kinds();
        PhaseLattice::with_order(&kinds, &ints, &zeros, first)
    }

    /// `e` modulo the lattice with the `first` columns reduced away, when
    /// that is possible; `None` if a `first` variable must stay.
    pub fn eliminate(&self, e: &Lin, first: &[Name]) -> Option<Lin> {
        let r = self.reduce_with(&self.rows, e, true)?;
        if first.iter().any(|v| r.has(v)) {
            None
        } else {
            Some(r)
        }
    }

    /// The lattice generated by `2·I + Z` for the given integer forms `I`
    /// (plus `2v` for every variable and the constant 1) and zero forms `Z`.
    pub fn new(kinds: &BTreeMap<Name, Kind>, ints: &[Lin], zeros: &[Lin]) -> PhaseLattice {
        Self::with_order(kinds, ints, zeros, &[])
    }

    fn with_order(
        kinds: &BTreeMap<Name, Kind>,
        ints: &[Lin],
        zeros: &[Lin],
        first: &[Name],
    ) -> PhaseLattice {
        let mut columns: Vec<(Kind, Name)> = kinds.iter().map(|(n, k)| (*k, n.clone())).collect();
        let rank = |k: Kind| match k {
            Kind::Projection => 0,
            Kind::Other => 1,
            Kind::AngularMomentum => 2,
        };
        // projections in reverse name order, so that m3 (or m1, m2) rather
        // than M is eliminated through conservation
        let pri = |n: &Name| first.iter().position(|f| f == n).unwrap_or(usize::MAX);
        columns.sort_by(|a, b| {
            pri(&a.1)
                .cmp(&pri(&b.1))
                .then_with(|| rank(a.0).cmp(&rank(b.0)))
                .then_with(|| {
                    if a.0 == Kind::Projection {
                        b.1.cmp(&a.1)
                    } else {
                        a.1.cmp(&b.1)
                    }
                })
        });
        let kinds_v: Vec<Kind> = columns.iter().map(|c| c.0).collect();
        let names: Vec<Name> = columns.into_iter().map(|c| c.1).collect();
        let all: Vec<&Lin> = ints.iter().chain(zeros).collect();
        let scale = lcm_den(&all);
        let ncols = names.len() + 1;
        let to_row = |l: &Lin, k: Q| -> Vec<i128> {
            let mut r = vec![0i128; ncols];
            for (i, n) in names.iter().enumerate() {
                let c = l.coeff(n) * k;
                r[i] = (c * Q::from_integer(scale as i64)).to_integer() as i128;
            }
            r[ncols - 1] =
                (l.constant_part() * k * Q::from_integer(scale as i64)).to_integer() as i128;
            r
        };
        let mut int_gens: Vec<Vec<i128>> = Vec::new();
        for n in &names {
            int_gens.push(to_row(&Lin::var(n.clone()), Q::from_integer(2)));
        }
        int_gens.push(to_row(&Lin::int(1), Q::from_integer(1)));
        for l in ints {
            int_gens.push(to_row(l, Q::from_integer(1)));
        }
        let mut red_gens: Vec<Vec<i128>> = int_gens
            .iter()
            .map(|r| r.iter().map(|x| 2 * x).collect())
            .collect();
        for z in zeros {
            red_gens.push(to_row(z, Q::from_integer(1)));
        }
        let mut int_all = int_gens;
        for z in zeros {
            int_all.push(to_row(z, Q::from_integer(1)));
        }
        PhaseLattice {
            columns: names,
            kinds: kinds_v,
            scale,
            rows: echelon(red_gens.clone(), ncols),
            int_rows: echelon(int_all, ncols),
            gens: red_gens,
        }
    }

    fn vector(&self, e: &Lin) -> Option<Vec<i128>> {
        let ncols = self.columns.len() + 1;
        let mut r = vec![0i128; ncols];
        for (v, c) in e.terms() {
            let i = self.columns.iter().position(|n| n == v)?;
            let x = *c * Q::from_integer(self.scale as i64);
            if !x.is_integer() {
                return None;
            }
            r[i] = x.to_integer() as i128;
        }
        let x = e.constant_part() * Q::from_integer(self.scale as i64);
        if !x.is_integer() {
            return None;
        }
        r[ncols - 1] = x.to_integer() as i128;
        Some(r)
    }

    fn lin(&self, r: &[i128]) -> Lin {
        let mut l = Lin::constant(Q::new(r[r.len() - 1] as i64, self.scale as i64));
        for (i, n) in self.columns.iter().enumerate() {
            if r[i] != 0 {
                l = l.add_scaled(&Lin::var(n.clone()), Q::new(r[i] as i64, self.scale as i64));
            }
        }
        l
    }

    fn reduce_with(&self, rows: &[(usize, Vec<i128>)], e: &Lin, symmetric_m: bool) -> Option<Lin> {
        let mut v = self.vector(e)?;
        for (col, row) in rows {
            let d = row[*col];
            let x = v[*col];
            // residues in (-d/2, d/2] (so -1, not 3, modulo 4), except a
            // projection modulo 2, kept at -1 (j-m rather than m-j); the
            // integrality test uses [0, d)
            let proj = *col < self.kinds.len() && self.kinds[*col] == Kind::Projection;
            let r = x.rem_euclid(d);
            let target = if !symmetric_m {
                r
            } else if proj && d == 2 * self.scale {
                // modulo 2 (in units of the scale): -1 rather than +1
                if r == self.scale {
                    -self.scale
                } else {
                    r
                }
            } else if 2 * r > d {
                r - d
            } else {
                r
            };
            let q = (x - target) / d;
            if q != 0 {
                for (a, b) in v.iter_mut().zip(row) {
                    *a -= q * b;
                }
            }
        }
        Some(self.lin(&v))
    }

    /// The canonical representative of a phase exponent (`e` itself when it
    /// mentions a variable outside the lattice or a finer fraction).
    pub fn reduce(&self, e: &Lin) -> Lin {
        let Some(a) = self.reduce_with(&self.rows, e, true) else {
            return e.clone();
        };
        // an integer exponent may change sign: of the representatives of e
        // and -e, take the one with fewer negative coefficients (then the
        // smaller); the choice depends only on the pair, so stays canonical
        if !self.is_integer(e) {
            return a;
        }
        let b = self
            .reduce_with(&self.rows, &-e, true)
            .unwrap_or_else(|| a.clone());
        let start = if badness(&b) < badness(&a) { b } else { a };
        self.tidy(start)
    }

    /// A deterministic walk from a canonical representative to a more
    /// readable one in the same class (adding or subtracting generators,
    /// or changing the sign, while that lowers `badness`). A function of
    /// the canonical representative, hence canonical itself.
    fn tidy(&self, start: Lin) -> Lin {
        let Some(mut v) = self.vector(&start) else {
            return start;
        };
        // compare on the vectors first (cheap), on the forms only for ties
        let mut best = self.vec_badness(&v);
        let mut cand = vec![0i128; v.len()];
        for _ in 0..32 {
            crate::limits::check_now();
            let mut improved = false;
            for g in &self.gens {
                crate::limits::tick();
                for sign in [1i128, -1] {
                    for ((c, x), y) in cand.iter_mut().zip(&v).zip(g) {
                        *c = x + sign * y;
                    }
                    let b = self.vec_badness(&cand);
                    if b < best || (b == best && badness(&self.lin(&cand)) < badness(&self.lin(&v)))
                    {
                        if b == best && cand == v {
                            continue;
                        }
                        best = b;
                        v.clone_from(&cand);
                        improved = true;
                    }
                }
            }
            let neg: Vec<i128> = v.iter().map(|x| -x).collect();
            let b = self.vec_badness(&neg);
            if (b < best || (b == best && badness(&self.lin(&neg)) < badness(&self.lin(&v))))
                && neg != v
            {
                best = b;
                v = neg;
                improved = true;
            }
            if !improved {
                break;
            }
        }
        self.lin(&v)
    }

    /// `badness` without the final tie-break, on a coefficient vector.
    fn vec_badness(&self, v: &[i128]) -> (usize, i128, usize, bool, bool) {
        let n = v.len() - 1;
        let terms = v[..n].iter().filter(|x| **x != 0).count();
        let size: i128 = v.iter().map(|x| x.abs()).sum();
        let neg = v.iter().filter(|x| **x < 0).count();
        // leading = first nonzero variable in name order
        let mut lead: Option<(&Name, i128)> = None;
        for (i, n) in self.columns.iter().enumerate() {
            if v[i] != 0 && lead.is_none_or(|(m, _)| n < m) {
                lead = Some((n, v[i]));
            }
        }
        let lead_neg = match lead {
            Some((_, c)) => c < 0,
            None => v[n] < 0,
        };
        (terms, size, neg, lead_neg, v[n] != 0)
    }

    /// True when `e` is known to be an integer on the term's support.
    pub fn is_integer(&self, e: &Lin) -> bool {
        self.reduce_with(&self.int_rows, e, false)
            .is_some_and(|r| r.is_zero())
    }

    /// `(-1)^e` as a sign when it is constant on the support: `Some(false)`
    /// for +1, `Some(true)` for -1.
    pub fn constant_sign(&self, e: &Lin) -> Option<bool> {
        let r = self.reduce(e);
        if r.is_constant() {
            let c = r.constant_part();
            if c.is_zero() {
                return Some(false);
            }
            if c == Q::from_integer(1) {
                return Some(true);
            }
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::syntax::parse;

    fn reduced(text: &str) -> String {
        let e = parse(text).unwrap();
        let t = &e.terms()[0];
        let l = PhaseLattice::of_term(t);
        l.reduce(t.phase()).to_string()
    }

    #[test]
    fn the_phases_design_md_lists() {
        // phases modulo integrality (common practice, no source)
        assert_eq!(reduced("(-1)^(4*j) {a, b, j; c, d, e}"), "0");
        assert_eq!(reduced("(-1)^(2*(a+b+c)) {a, b, c; d, e, f}"), "0");
        assert_eq!(reduced("(-1)^(2*m) (j, j, 0; m, -m, 0)"), "2*j");
        assert_eq!(reduced("(-1)^(-a-b-c) {a, b, c; d, e, f}"), "a+b+c");
        assert_eq!(reduced("(-1)^(j-m) (j, j, 0; m, -m, 0)"), "j-m");
        assert_eq!(reduced("(-1)^(m-j) (j, j, 0; m, -m, 0)"), "j-m");
        assert_eq!(reduced("(-1)^(j+3) {j, a, b; c, d, e}"), "j+1");
    }
}
