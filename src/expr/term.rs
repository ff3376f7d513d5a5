//! Terms and expressions. A `Term` is `coef · sqrt(root) · (-1)^phase ·
//! Π factors`, summed over its `bound` variables; an `Expr` is a sum of
//! terms. Construction keeps the light normal form every later stage
//! relies on: factors sorted, equal power bases merged, constant powers and
//! constant deltas folded, integer constant phases folded into the sign,
//! identical terms merged.
//!
//! The normal form is an invariant: the fields of `Term` and `Expr` are
//! private, every constructor and every changing method returns a term in
//! normal form. Code that assembles a term piece by piece works on
//! `TermParts` (public fields, no invariant) and ends with
//! `TermParts::normalized`.

use super::factor::{Factor, Kind};
use super::lin::{Lin, Q};
use super::name::Name;
use crate::numeric::Surd;
use num_bigint::{BigInt, BigUint};
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use std::collections::{BTreeMap, BTreeSet};

/// `coef · sqrt(root) · (-1)^phase · Π factors`, summed over `bound`,
/// always in normal form (see the module comment).
#[derive(Clone, PartialEq, Eq, Hash, Debug)]
pub struct Term {
    /// rational coefficient
    coef: BigRational,
    /// square-free radicand of the constant (1 for none)
    root: BigUint,
    /// the exponent of the phase `(-1)^phase`
    phase: Lin,
    /// the factors, in canonical order
    factors: Vec<Factor>,
    /// summed variables, sorted
    bound: Vec<Name>,
}

/// The pieces of a term while it is being assembled: no invariant holds
/// until `normalized` turns them into a `Term`.
#[derive(Clone, Debug)]
pub struct TermParts {
    /// rational coefficient
    pub coef: BigRational,
    /// radicand of the constant (1 for none; any positive integer here)
    pub root: BigUint,
    /// the exponent of the phase `(-1)^phase`
    pub phase: Lin,
    /// the factors, in any order
    pub factors: Vec<Factor>,
    /// summed variables, in any order
    pub bound: Vec<Name>,
}

impl TermParts {
    /// The term these parts make, in normal form.
    pub fn normalized(self) -> Term {
        let mut t = Term {
            coef: self.coef,
            root: BigUint::one(),
            phase: self.phase,
            factors: self.factors,
            bound: self.bound,
        };
        if !self.root.is_one() {
            // the radicand need not be square-free here
            let s = &t.scalar() * &Surd::signed_sqrt(false, &BigRational::from(BigInt::from(self.root)))
                .expect("a positive radicand has a square root");
            t.set_scalar(&s);
        }
        t.normalized()
    }
}

impl TermParts {
    /// The product of two sets of parts, pieces side by side: summed names
    /// are not renamed apart (the caller keeps them apart).
    pub fn times(&self, other: &TermParts) -> TermParts {
        let mut p = self.clone();
        p.coef = &p.coef * &other.coef;
        p.root = &p.root * &other.root;
        p.phase = &p.phase + &other.phase;
        p.factors.extend(other.factors.iter().cloned());
        p.bound.extend(other.bound.iter().cloned());
        p
    }
}

impl Default for TermParts {
    fn default() -> Self {
        Term::one().into_parts()
    }
}

/// A sum of terms (the empty sum is 0): no zero term, like terms merged.
#[derive(Clone, PartialEq, Eq, Hash, Debug, Default)]
pub struct Expr {
    /// the terms, in the order written (like terms merged)
    terms: Vec<Term>,
}

/// Converts a small rational to a big one.
pub fn big_q(q: Q) -> BigRational {
    BigRational::new(BigInt::from(*q.numer()), BigInt::from(*q.denom()))
}

impl Term {
    /// The constant 1.
    pub fn one() -> Term {
        Term {
            coef: BigRational::one(),
            root: BigUint::one(),
            phase: Lin::zero(),
            factors: Vec::new(),
            bound: Vec::new(),
        }
    }

    /// A constant term `value` (must be a single `q sqrt(s)` monomial).
    pub fn constant(value: &Surd) -> Option<Term> {
        let mut t = Term::one();
        match value.terms().count() {
            0 => {
                t.coef = BigRational::zero();
                Some(t)
            }
            1 => {
                let (s, q) = value.terms().next().unwrap();
                t.coef = q.clone();
                t.root = s.clone();
                Some(t)
            }
            _ => None,
        }
    }

    /// A term holding one factor.
    pub fn factor(f: Factor) -> Term {
        let mut t = Term::one();
        t.factors.push(f);
        t.normalized()
    }

    /// A phase `(-1)^e`.
    pub fn minus_one_to(e: Lin) -> Term {
        let mut t = Term::one();
        t.phase = e;
        t.normalized()
    }

    /// The rational coefficient.
    pub fn coef(&self) -> &BigRational {
        &self.coef
    }

    /// The square-free radicand of the constant (1 for none).
    pub fn root(&self) -> &BigUint {
        &self.root
    }

    /// The exponent of the phase `(-1)^phase`.
    pub fn phase(&self) -> &Lin {
        &self.phase
    }

    /// The factors, in canonical order.
    pub fn factors(&self) -> &[Factor] {
        &self.factors
    }

    /// The summed variables, sorted.
    pub fn bound(&self) -> &[Name] {
        &self.bound
    }

    /// The pieces of this term, to assemble a changed one.
    pub fn parts(&self) -> TermParts {
        self.clone().into_parts()
    }

    /// The pieces of this term, to assemble a changed one.
    pub fn into_parts(self) -> TermParts {
        TermParts {
            coef: self.coef,
            root: self.root,
            phase: self.phase,
            factors: self.factors,
            bound: self.bound,
        }
    }

    /// The negated term.
    pub fn negated(&self) -> Term {
        let mut t = self.clone();
        t.coef = -t.coef;
        t
    }

    /// The same term with these factors (normalized again).
    pub fn with_factors(&self, factors: Vec<Factor>) -> Term {
        let mut p = self.parts();
        p.factors = factors;
        p.normalized()
    }

    /// True when the coefficient is 0.
    pub fn is_zero(&self) -> bool {
        self.coef.is_zero()
    }

    /// The constant part `coef sqrt(root)` as a value.
    pub fn scalar(&self) -> Surd {
        Surd::monomial_squarefree(self.coef.clone(), self.root.clone())
    }

    /// Sets the constant part from a monomial value (the caller
    /// normalizes: a zero value leaves the other parts in place).
    fn set_scalar(&mut self, v: &Surd) {
        match Term::constant(v) {
            Some(c) => {
                self.coef = c.coef;
                self.root = c.root;
            }
            None => panic!("scalar must be a monomial"),
        }
    }

    /// Multiplies the constant part by a monomial value.
    pub fn scale(&mut self, v: &Surd) {
        let s = &self.scalar() * v;
        self.set_scalar(&s);
        if self.coef.is_zero() {
            *self = std::mem::replace(self, Term::one()).zeroed();
        }
    }

    /// The term times a monomial value.
    pub fn scaled(&self, v: &Surd) -> Term {
        let mut t = self.clone();
        t.scale(v);
        t
    }

    /// Every variable that occurs (free or bound).
    pub fn all_vars(&self) -> BTreeSet<Name> {
        let mut s: BTreeSet<Name> = self.phase.vars().cloned().collect();
        for f in &self.factors {
            for l in f.lins() {
                s.extend(l.vars().cloned());
            }
        }
        s.extend(self.bound.iter().cloned());
        s
    }

    /// The free variables.
    pub fn free_vars(&self) -> BTreeSet<Name> {
        let mut s = self.all_vars();
        for b in &self.bound {
            s.remove(b);
        }
        s
    }

    /// Renames variables (free or bound) by a map.
    pub fn rename(&self, map: &BTreeMap<Name, Name>) -> Term {
        let mut t = self.clone();
        t.phase = t.phase.rename(map);
        t.factors = t.factors.iter().map(|f| f.rename(map)).collect();
        t.bound = t
            .bound
            .iter()
            .map(|b| map.get(b).cloned().unwrap_or_else(|| b.clone()))
            .collect();
        t.normalized()
    }

    /// Substitutes a free variable by a linear form.
    pub fn substitute(&self, v: &Name, by: &Lin) -> Term {
        let mut t = self.clone();
        t.phase = t.phase.substitute(v, by);
        t.factors = t.factors.iter().map(|f| f.substitute(v, by)).collect();
        t.normalized()
    }

    /// Renames bound variables so none of them is in `avoid`.
    pub fn freshen(&self, avoid: &BTreeSet<Name>) -> Term {
        self.rename_bound(avoid, |b| avoid.contains(b).then(|| b.primed()))
    }

    /// Renames each bound variable for which `start` gives a name: that
    /// name, primed until it is neither a variable of the term, nor in
    /// `avoid`, nor already chosen.
    pub fn rename_bound(
        &self,
        avoid: &BTreeSet<Name>,
        start: impl Fn(&Name) -> Option<Name>,
    ) -> Term {
        let mut taken: BTreeSet<Name> = avoid.clone();
        taken.extend(self.all_vars());
        let mut map = BTreeMap::new();
        for b in &self.bound {
            if let Some(mut n) = start(b) {
                while taken.contains(&n) {
                    n = n.primed();
                }
                taken.insert(n.clone());
                map.insert(b.clone(), n);
            }
        }
        if map.is_empty() {
            self.clone()
        } else {
            self.rename(&map)
        }
    }

    /// The product of two terms (bound variables renamed apart).
    pub fn mul(&self, other: &Term) -> Term {
        let a = self.freshen(&other.all_vars());
        let b = other.freshen(&a.all_vars());
        let mut t = a.clone();
        let s = &a.scalar() * &b.scalar();
        t.set_scalar(&s);
        t.phase = &a.phase + &b.phase;
        t.factors.extend(b.factors.iter().cloned());
        t.bound.extend(b.bound.iter().cloned());
        t.normalized()
    }

    /// The product with `other` placed inside this term's sums: free
    /// variables of `other` may refer to this term's summed variables
    /// (only `other`'s own summed variables are renamed apart).
    pub fn mul_inside(&self, other: &Term) -> Term {
        let b = other.freshen(&self.all_vars());
        let mut t = self.clone();
        let s = &self.scalar() * &b.scalar();
        t.set_scalar(&s);
        t.phase = &self.phase + &b.phase;
        t.factors.extend(b.factors.iter().cloned());
        t.bound.extend(b.bound.iter().cloned());
        t.normalized()
    }

    /// The term written by a renderer: `product(coef, root, phase,
    /// factors)` writes a product, `sum(names, inside)` a sum. A summed
    /// term is the product of the factors free of summed variables times
    /// the sum of those with one; the phase goes inside when it has a
    /// summed variable. Printing and LaTeX share this layout.
    pub fn write_with(
        &self,
        product: impl Fn(&BigRational, &BigUint, Option<&Lin>, &[&Factor]) -> String,
        sum: impl Fn(&[Name], &str) -> String,
    ) -> String {
        if self.bound.is_empty() {
            let fs: Vec<&Factor> = self.factors.iter().collect();
            return product(&self.coef, &self.root, Some(&self.phase), &fs);
        }
        let bound: BTreeSet<Name> = self.bound.iter().cloned().collect();
        let (inner, outer): (Vec<&Factor>, Vec<&Factor>) = self
            .factors
            .iter()
            .partition(|f| f.lins().iter().any(|l| l.has_any(&bound)));
        let phase_inside = self.phase.has_any(&bound);
        let outside = product(
            &self.coef,
            &self.root,
            (!phase_inside).then_some(&self.phase),
            &outer,
        );
        let inside = product(
            &BigRational::one(),
            &BigUint::one(),
            phase_inside.then_some(&self.phase),
            &inner,
        );
        let sum = sum(&self.bound, &inside);
        match outside.as_str() {
            "1" => sum,
            "-1" => format!("-{sum}"),
            o => format!("{o} {sum}"),
        }
    }

    /// Kinds of the variables of this term (bound ones included).
    pub fn kinds(&self) -> BTreeMap<Name, Kind> {
        let mut out = BTreeMap::new();
        for v in self.all_vars() {
            out.insert(v, Kind::Other);
        }
        for f in &self.factors {
            for l in f.m_slots() {
                for v in l.vars() {
                    let e = out.get_mut(v).unwrap();
                    if *e == Kind::Other {
                        *e = Kind::Projection;
                    }
                }
            }
        }
        for f in &self.factors {
            for l in f.j_slots() {
                for v in l.vars() {
                    out.insert(v.clone(), Kind::AngularMomentum);
                }
            }
        }
        out
    }

    /// The light normal form (see the module comment).
    fn normalized(mut self) -> Term {
        crate::limits::tick();
        if self.coef.is_zero() {
            return self.zeroed();
        }
        // merge powers with equal primitive bases, fold constants
        let mut powers: BTreeMap<Lin, Q> = BTreeMap::new();
        let mut others = Vec::new();
        let mut scalar = self.scalar();
        for f in std::mem::take(&mut self.factors) {
            match f {
                Factor::Power(base, e) => {
                    if base.is_zero() {
                        if e > Q::zero() {
                            return self.zeroed();
                        }
                        others.push(Factor::Power(Lin::zero(), e));
                        continue;
                    }
                    let (k, prim) = base.primitive();
                    // k^e into the scalar
                    if k != Q::one() {
                        match power_of_rational(k, e) {
                            Some(v) => scalar = &scalar * &v,
                            None => {
                                others.push(Factor::Power(base, e));
                                continue;
                            }
                        }
                    }
                    if prim.is_constant() {
                        // prim is 1 or -1 here
                        if prim.constant_part() == Q::one() {
                            continue;
                        }
                        if e.is_integer() {
                            if e.to_integer() % 2 != 0 {
                                scalar = -scalar;
                            }
                            continue;
                        }
                        others.push(Factor::Power(prim, e));
                        continue;
                    }
                    *powers.entry(prim).or_insert_with(Q::zero) += e;
                }
                Factor::Delta(a, b) => {
                    let d = &a - &b;
                    if d.is_constant() {
                        if d.is_zero() {
                            continue;
                        }
                        return self.zeroed();
                    }
                    // the names on both sides cancel: delta(M+n-N, n) is
                    // delta(M, N), read off the difference's signs
                    let (a, b) = delta_sides(&d);
                    // canonical spelling among delta(a,b), delta(b,a),
                    // delta(-a,-b), delta(-b,-a): no leading minus first
                    let forms = [
                        (a.clone(), b.clone()),
                        (b.clone(), a.clone()),
                        (-&a, -&b),
                        (-&b, -&a),
                    ];
                    let best = forms
                        .into_iter()
                        .min_by_key(|x| {
                            (
                                x.0.is_constant(),
                                x.0.leading_negative(),
                                x.1.leading_negative(),
                                x.0.clone(),
                                x.1.clone(),
                            )
                        })
                        .unwrap();
                    others.push(Factor::Delta(best.0, best.1));
                }
                Factor::Tri(t) => {
                    if t.iter().all(|l| l.is_constant()) {
                        let v: Option<Vec<i64>> =
                            t.iter().map(|l| doubled(l.constant_part())).collect();
                        if let Some(v) = v {
                            if crate::numeric::selection::triangle2(v[0], v[1], v[2]) {
                                continue;
                            }
                        }
                        return self.zeroed();
                    }
                    // the triangle rule is symmetric: one spelling
                    let mut t = t;
                    t.sort();
                    others.push(Factor::Tri(t));
                }
                other => others.push(other),
            }
        }
        // an integer power of a base with a negative leading coefficient
        // takes its sign out: (b-a)^1 = -(a-b)^1
        let mut merged: BTreeMap<Lin, Q> = BTreeMap::new();
        for (base, e) in powers {
            if e.is_zero() {
                continue;
            }
            if e.is_integer() && base.leading_negative() {
                if e.to_integer() % 2 != 0 {
                    scalar = -scalar;
                }
                *merged.entry(-&base).or_insert_with(Q::zero) += e;
            } else {
                *merged.entry(base).or_insert_with(Q::zero) += e;
            }
        }
        // B^n next to (-B)^(k/2): B^n = (-1)^n (-B)^n joins the root
        let negatives: Vec<Lin> = merged
            .iter()
            .filter(|(b, e)| b.leading_negative() && !e.is_integer())
            .map(|(b, _)| b.clone())
            .collect();
        for nb in negatives {
            let pb = -&nb;
            if let Some(n) = merged.get(&pb).copied() {
                if n.is_integer() {
                    merged.remove(&pb);
                    if n.to_integer() % 2 != 0 {
                        scalar = -scalar;
                    }
                    *merged.get_mut(&nb).unwrap() += n;
                }
            }
        }
        for (base, e) in merged {
            if !e.is_zero() {
                others.push(Factor::Power(base, e));
            }
        }
        others.sort();
        self.factors = others;
        if scalar.is_zero() {
            return self.zeroed();
        }
        self.set_scalar(&scalar);
        // phase: constant integer part reduced mod 2; a constant phase folds
        let c = self.phase.constant_part();
        if c.is_integer() {
            let r = c.to_integer().rem_euclid(2);
            self.phase = self
                .phase
                .add_scaled(&Lin::constant(Q::from_integer(r) - c), Q::one());
            if self.phase.is_constant() && r == 1 {
                self.coef = -self.coef.clone();
                self.phase = Lin::zero();
            }
        }
        self.bound.sort();
        self.bound.dedup();
        self
    }

    fn zeroed(mut self) -> Term {
        self.coef = BigRational::zero();
        self.root = BigUint::one();
        self.phase = Lin::zero();
        self.factors.clear();
        self.bound.clear();
        self
    }

    /// The term as a linear form, when it is `c` or `c·(L)` with rational
    /// `c` (and the product fits the small rationals of `Lin`).
    pub fn as_linear(&self) -> Option<Lin> {
        if !self.bound.is_empty() || !self.phase.is_zero() || !self.root.is_one() {
            return None;
        }
        // bounds first: Q::new and abs overflow at i64::MIN
        let (n, d) = (self.coef.numer().to_i64()?, self.coef.denom().to_i64()?);
        if n.unsigned_abs() > (1 << 40) || d.unsigned_abs() > (1 << 40) {
            return None;
        }
        let c = Q::new(n, d);
        match self.factors.as_slice() {
            [] => Some(Lin::constant(c)),
            [Factor::Power(l, e)] if *e == Q::one() => Some(l.scale(c)),
            _ => None,
        }
    }

    /// The term of a linear form (`None` for 0).
    pub fn linear(l: &Lin) -> Option<Term> {
        if l.is_zero() {
            return None;
        }
        if l.is_constant() {
            let mut t = Term::one();
            t.coef = big_q(l.constant_part());
            return Some(t);
        }
        Some(Term::factor(Factor::Power(l.clone(), Q::one())))
    }

    /// True when two terms differ only in their constant coefficient.
    pub fn same_shape(&self, other: &Term) -> bool {
        self.root == other.root
            && self.phase == other.phase
            && self.factors == other.factors
            && self.bound == other.bound
    }
}

/// The two sides of `delta(a, b)` for a nonconstant difference `d = a -
/// b` with no name on both sides: the terms of `d` with positive
/// coefficients (and a positive constant) on the left, the others negated
/// on the right; when one side would be empty, the last name of the other
/// moves across (`delta(m1, -m2)`, not `delta(m1+m2, 0)`).
fn delta_sides(d: &Lin) -> (Lin, Lin) {
    let (mut left, mut right) = (Lin::zero(), Lin::zero());
    for (v, c) in d.terms() {
        let term = Lin::var(v.clone()).scale(*c);
        if *c > Q::zero() {
            left = &left + &term;
        } else {
            right = &right - &term;
        }
    }
    let c0 = d.constant_part();
    if c0 > Q::zero() {
        left = &left + &Lin::constant(c0);
    } else {
        right = &right - &Lin::constant(c0);
    }
    for _ in 0..2 {
        if left.is_zero() {
            let Some((v, c)) = right.terms().last().map(|(v, c)| (v.clone(), *c)) else {
                break;
            };
            let term = Lin::var(v).scale(c);
            right = &right - &term;
            left = &left - &term;
        }
        std::mem::swap(&mut left, &mut right);
    }
    (left, right)
}

/// `2q` as an integer, when it is one.
pub fn doubled(q: Q) -> Option<i64> {
    let d = q * Q::from_integer(2);
    if d.is_integer() {
        Some(d.to_integer())
    } else {
        None
    }
}

/// `k^e` for a positive rational `k` and an exponent with denominator 1 or
/// 2, as an exact monomial; `None` otherwise.
pub fn power_of_rational(k: Q, e: Q) -> Option<Surd> {
    if k <= Q::zero() && !e.is_integer() {
        return None;
    }
    let twice = e * Q::from_integer(2);
    if !twice.is_integer() {
        return None;
    }
    let n = twice.to_integer();
    let kb = big_q(k);
    if n.unsigned_abs() > 4096 {
        return None;
    }
    // k^(n/2) = k^(|n| div 2) sqrt(k)^(|n| mod 2), inverted if negative:
    // only k itself is ever put under a root (so no large radicand has to
    // be factored)
    let mut q = BigRational::one();
    for _ in 0..(n.unsigned_abs() / 2) {
        q *= &kb;
    }
    let mut v = Surd::from_rational(q);
    if n % 2 != 0 {
        v = &v * &Surd::signed_sqrt(false, &kb).ok()?;
    }
    if n < 0 {
        return v.recip();
    }
    Some(v)
}

impl Expr {
    /// 0.
    pub fn zero() -> Expr {
        Expr::default()
    }

    /// A one-term expression.
    pub fn from_term(t: Term) -> Expr {
        let mut e = Expr::zero();
        e.push(t);
        e
    }

    /// The sum of these terms (like terms merged, zeros dropped).
    pub fn from_terms(terms: impl IntoIterator<Item = Term>) -> Expr {
        let mut e = Expr::zero();
        for t in terms {
            e.push(t);
        }
        e
    }

    /// The terms.
    pub fn terms(&self) -> &[Term] {
        &self.terms
    }

    /// The terms, by value.
    pub fn into_terms(self) -> Vec<Term> {
        self.terms
    }

    /// The same sum with term `i` changed by `edit` (then normalized and
    /// merged again).
    pub fn with_term_edited(&self, i: usize, edit: impl FnOnce(&mut TermParts)) -> Expr {
        let mut parts = self.terms[i].parts();
        edit(&mut parts);
        let mut edit = Some(parts);
        Expr::from_terms(self.terms.iter().enumerate().map(|(k, t)| {
            if k == i {
                edit.take().expect("edited once").normalized()
            } else {
                t.clone()
            }
        }))
    }

    /// A constant.
    pub fn constant(v: &Surd) -> Expr {
        let mut e = Expr::zero();
        for (s, q) in v.terms() {
            e.push(Term::constant(&Surd::monomial_squarefree(q.clone(), s.clone())).unwrap());
        }
        e
    }

    /// Adds a term, merging it into a like term when there is one (all
    /// purely linear terms, `c` and `c·(L)`, merge into one linear form).
    pub fn push(&mut self, t: Term) {
        crate::limits::tick();
        if t.is_zero() {
            return;
        }
        if let Some(l) = t.as_linear() {
            if let Some(pos) = self.terms.iter().position(|u| u.as_linear().is_some()) {
                let sum = &self.terms[pos].as_linear().unwrap() + &l;
                let merged = Term::linear(&sum);
                match merged {
                    Some(m) => self.terms[pos] = m,
                    None => {
                        self.terms.remove(pos);
                    }
                }
                return;
            }
        }
        if let Some(pos) = self.terms.iter().position(|u| u.same_shape(&t)) {
            let c = &self.terms[pos].coef + &t.coef;
            if c.is_zero() {
                self.terms.remove(pos);
            } else {
                self.terms[pos].coef = c;
            }
        } else {
            self.terms.push(t);
        }
    }

    /// The sum of two expressions.
    pub fn add(&self, other: &Expr) -> Expr {
        let mut e = self.clone();
        for t in &other.terms {
            e.push(t.clone());
        }
        e
    }

    /// The negation.
    pub fn neg(&self) -> Expr {
        Expr {
            terms: self.terms.iter().map(Term::negated).collect(),
        }
    }

    /// The product (expanded).
    pub fn mul(&self, other: &Expr) -> Expr {
        Expr::merged(
            self.terms
                .iter()
                .flat_map(|a| other.terms.iter().map(move |b| a.mul(b))),
        )
    }

    /// The sum of many terms with like terms merged, as `push` merges
    /// them, but with a hash index instead of a scan per term (so a large
    /// expansion costs linear, not quadratic, time).
    pub fn merged(terms: impl IntoIterator<Item = Term>) -> Expr {
        use std::hash::{Hash, Hasher};
        let shape_hash = |t: &Term| {
            let mut h = std::collections::hash_map::DefaultHasher::new();
            t.root.hash(&mut h);
            t.phase.hash(&mut h);
            t.factors.hash(&mut h);
            t.bound.hash(&mut h);
            h.finish()
        };
        let mut out: Vec<Term> = Vec::new();
        let mut index: std::collections::HashMap<u64, Vec<usize>> = Default::default();
        let mut linear: Option<(usize, Lin)> = None;
        for t in terms {
            crate::limits::tick();
            if t.is_zero() {
                continue;
            }
            if let Some(l) = t.as_linear() {
                match &mut linear {
                    Some((_, acc)) => *acc = &*acc + &l,
                    None => {
                        linear = Some((out.len(), l));
                        out.push(Term::one());
                    }
                }
                continue;
            }
            let h = shape_hash(&t);
            let slots = index.entry(h).or_default();
            match slots.iter().find(|&&i| out[i].same_shape(&t)) {
                Some(&i) => out[i].coef = &out[i].coef + &t.coef,
                None => {
                    slots.push(out.len());
                    out.push(t);
                }
            }
        }
        if let Some((i, l)) = linear {
            match Term::linear(&l) {
                Some(t) => out[i] = t,
                None => out[i].coef = BigRational::zero(),
            }
        }
        Expr {
            terms: out.into_iter().filter(|t| !t.coef.is_zero()).collect(),
        }
    }

    /// True for 0.
    pub fn is_zero(&self) -> bool {
        self.terms.is_empty()
    }

    /// The free variables of all terms.
    pub fn free_vars(&self) -> BTreeSet<Name> {
        let mut s = BTreeSet::new();
        for t in &self.terms {
            s.extend(t.free_vars());
        }
        s
    }

    /// Kinds of the free variables (angular momentum wins over projection).
    pub fn kinds(&self) -> BTreeMap<Name, Kind> {
        let free = self.free_vars();
        let mut out: BTreeMap<Name, Kind> = BTreeMap::new();
        for t in &self.terms {
            for (v, k) in t.kinds() {
                if !free.contains(&v) || t.bound.contains(&v) {
                    continue;
                }
                let e = out.entry(v).or_insert(Kind::Other);
                if k < *e {
                    *e = k;
                }
            }
        }
        out
    }

    /// Applies a substitution of a free variable.
    pub fn substitute(&self, v: &Name, by: &Lin) -> Expr {
        let mut e = Expr::zero();
        for t in &self.terms {
            let t = t.freshen(&by.vars().cloned().collect());
            e.push(t.substitute(v, by));
        }
        e
    }

    /// Renames free variables.
    pub fn rename(&self, map: &BTreeMap<Name, Name>) -> Expr {
        let mut e = Expr::zero();
        for t in &self.terms {
            let avoid: BTreeSet<Name> = map.values().cloned().collect();
            let t = t.freshen(&avoid);
            e.push(t.rename(map));
        }
        e
    }

    /// The expression as one linear form, when every term is `c` or `c·(L)`.
    pub fn as_lin(&self) -> Option<Lin> {
        let mut acc = Lin::zero();
        for t in &self.terms {
            acc = &acc + &t.as_linear()?;
        }
        Some(acc)
    }

    /// The number of terms.
    pub fn len(&self) -> usize {
        self.terms.len()
    }

    /// True for no terms.
    pub fn is_empty(&self) -> bool {
        self.terms.is_empty()
    }
}

/// The value of an integer-valued `BigRational` as i64, if it fits.
pub fn rational_to_i64(q: &BigRational) -> Option<i64> {
    if q.is_integer() {
        q.numer().to_i64()
    } else {
        None
    }
}

/// True when the rational is negative.
pub fn is_negative(q: &BigRational) -> bool {
    q.is_negative()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_coefficient_of_minus_two_to_the_63_is_not_linear_and_does_not_overflow() {
        let x = Lin::var(Name::new("x"));
        let mut t = Term::factor(Factor::Power(x, Q::one()));
        t.coef = BigRational::from_integer(num_bigint::BigInt::from(i64::MIN));
        assert_eq!(t.as_linear(), None);
        t.coef = BigRational::from_integer(num_bigint::BigInt::from(-3));
        assert!(t.as_linear().is_some());
    }
}
