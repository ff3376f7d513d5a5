//! Matching a rule with several factors and summed variables against a
//! term: an injective assignment of the pattern's symbols to symbols of
//! the term, each through some element of its symmetry group, with the
//! pattern variables solved by linear unification. Summed pattern
//! variables must land on distinct summed variables of the term (a
//! projection up to sign, an angular momentum exactly) that appear nowhere
//! else in the term; powers of the pattern that involve summed variables
//! must be present; the phase left over must be free of the summed
//! variables modulo the term's integrality lattice. Constant factors,
//! phases and powers of the pattern that do not involve its sums are
//! compensated, so a match inside a larger product always rewrites exactly.

use super::Rule;
use crate::algebra::lattice::PhaseLattice;
use crate::algebra::symmetry::{classical_images, regge_images, Image};
use crate::algebra::unify::{apply, unify_partial, Subst};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use crate::numeric::Surd;
use num_traits::{Signed, Zero};
use std::collections::{BTreeMap, BTreeSet};

fn internal(n: &Name) -> Name {
    Name::new(format!("\u{2}{n}"))
}

/// The term with every internal summed variable (a rule's own, brought in
/// by a rewrite) given a readable name: the rule's name, primed until it
/// is new to the term.
pub fn readable_bound(t: &Term) -> Term {
    t.rename_bound(&BTreeSet::new(), |b| {
        b.as_str().strip_prefix('\u{2}').map(Name::new)
    })
}

/// The free projections of a pattern's symbols (`±p` in a column) that no
/// column of some term of the right side holds with the same angular
/// momentum (and that its deltas do not pin, with their j, to 0).
fn unguarded_projections(lhs: &Term, rhs: &Expr, free: &BTreeSet<Name>) -> Vec<(Name, Lin)> {
    let kinds = lhs.kinds();
    let mut out: Vec<(Name, Lin)> = Vec::new();
    for f in lhs.factors() {
        for (j, m) in f.columns() {
            let Some((p, _)) = m.as_signed_var() else {
                continue;
            };
            if !free.contains(p) || kinds.get(p) != Some(&Kind::Projection) {
                continue;
            }
            // held in a column, or pinned with its j to 0 by deltas
            let zero = |t: &Term, l: &Lin| {
                t.factors().iter().any(|g| match g {
                    Factor::Delta(a, b) => (a == l && b.is_zero()) || (b == l && a.is_zero()),
                    _ => false,
                })
            };
            let held = |t: &Term| {
                t.factors().iter().any(|g| {
                    g.columns()
                        .iter()
                        .any(|(cj, cm)| *cj == j && cm.as_signed_var().map(|x| x.0) == Some(p))
                }) || (zero(t, m) && zero(t, j))
            };
            if !rhs.terms().iter().all(held) && !out.iter().any(|(q, _)| q == p) {
                out.push((p.clone(), j.clone()));
            }
        }
    }
    out
}

/// A rule prepared for matching (its variables renamed apart).
#[derive(Clone, Debug)]
pub struct Pattern {
    /// the rule's name
    pub name: String,
    /// the rule's source
    pub source: crate::rules::Source,
    symbols: Vec<Factor>,
    powers: Vec<(Lin, Q)>,
    phase: Lin,
    scalar: Surd,
    bound: Vec<Name>,
    bound_kinds: BTreeMap<Name, Kind>,
    vars: BTreeSet<Name>,
    free: BTreeSet<Name>,
    rhs: Expr,
    /// free projections of the left side, with their angular momentum,
    /// that the right side holds in no column: the rule assumes them
    /// admissible (`|m| <= j`, `j - m` an integer) and its right side
    /// would not vanish where they are not
    unguarded: Vec<(Name, Lin)>,
}

/// Incremental solution of the pattern equations: determined variables
/// and equations still waiting for more of them.
#[derive(Clone, Debug, Default)]
struct Solver {
    subst: Subst,
    pending: Vec<(Lin, Lin)>,
}

impl Solver {
    /// Adds `p = t` (p over pattern variables); false on a contradiction.
    fn add(&mut self, p: &Lin, t: &Lin, vars: &BTreeSet<Name>) -> bool {
        self.pending.push((p.clone(), t.clone()));
        self.propagate(vars)
    }

    fn propagate(&mut self, vars: &BTreeSet<Name>) -> bool {
        loop {
            let mut progress = false;
            let mut keep = Vec::with_capacity(self.pending.len());
            for (p, t) in std::mem::take(&mut self.pending) {
                let p = apply(&p, &self.subst);
                let unknown: Vec<&Name> = p.vars().filter(|v| vars.contains(*v)).collect();
                match unknown.len() {
                    0 => {
                        if p != t {
                            return false;
                        }
                    }
                    1 => {
                        let v = unknown[0].clone();
                        let c = p.coeff(&v);
                        let rest = p.substitute(&v, &Lin::zero());
                        let val = (&t - &rest).scale(c.recip());
                        self.subst.insert(v, val);
                        progress = true;
                    }
                    _ => keep.push((p, t)),
                }
            }
            self.pending = keep;
            if !progress {
                return true;
            }
        }
    }

    /// The full solution, solving what is left by elimination.
    fn complete(&self, vars: &BTreeSet<Name>) -> Option<(Subst, bool)> {
        if self.pending.is_empty() {
            let all = vars.iter().all(|v| self.subst.contains_key(v));
            return Some((self.subst.clone(), all));
        }
        let ps: Vec<&Lin> = self.pending.iter().map(|(p, _)| p).collect();
        let ts: Vec<&Lin> = self.pending.iter().map(|(_, t)| t).collect();
        let rest: BTreeSet<Name> = vars
            .iter()
            .filter(|v| !self.subst.contains_key(*v))
            .cloned()
            .collect();
        let (s2, complete) = unify_partial(&ps, &ts, &rest)?;
        let mut out = self.subst.clone();
        for (k, v) in s2 {
            out.insert(k, v);
        }
        // earlier values may mention later-solved variables: not here, since
        // values are target forms (no pattern variables)
        Some((out, complete))
    }
}

/// A successful match.
#[derive(Clone, Debug)]
pub struct Match {
    /// indices of the matched factors of the term, in pattern order
    pub factors: Vec<usize>,
    /// the images used, in pattern order
    pub images: Vec<Image>,
    /// values of the pattern variables
    pub subst: Subst,
    /// the term's summed variables the pattern's sums landed on
    pub summed: Vec<Name>,
}

impl Pattern {
    /// Prepares a rule whose left side is one term of symbols, powers and a
    /// phase (`None` for other shapes).
    pub fn new(rule: &Rule) -> Option<Pattern> {
        let t0 = &rule.lhs.terms()[0];
        // every name of the rule goes internal, the right side's own
        // summed variables too: no substituted value can be captured
        let mut lhs_names: BTreeSet<Name> = rule.lhs.free_vars();
        lhs_names.extend(t0.bound().iter().cloned());
        let mut names = lhs_names.clone();
        for t in rule.rhs.terms() {
            names.extend(t.bound().iter().cloned());
        }
        let map: BTreeMap<Name, Name> = names.iter().map(|v| (v.clone(), internal(v))).collect();
        let t = t0.rename(&map);
        let mut symbols = Vec::new();
        let mut powers = Vec::new();
        for f in t.factors() {
            match f {
                Factor::Power(b, e) => powers.push((b.clone(), *e)),
                f if f.is_symbol() => symbols.push(f.clone()),
                _ => return None,
            }
        }
        if symbols.is_empty() {
            return None;
        }
        // order the symbols so each shares a summed variable with earlier ones
        let bound: BTreeSet<Name> = t.bound().iter().cloned().collect();
        let mut ordered: Vec<Factor> = vec![symbols.remove(0)];
        while !symbols.is_empty() {
            let pos = symbols
                .iter()
                .position(|f| {
                    ordered
                        .iter()
                        .any(|g| bound.iter().any(|b| f.has(b) && g.has(b)))
                })
                .unwrap_or(0);
            ordered.push(symbols.remove(pos));
        }
        let kinds = t.kinds();
        let bound_kinds = t
            .bound()
            .iter()
            .map(|b| (b.clone(), kinds.get(b).copied().unwrap_or(Kind::Other)))
            .collect();
        // the unknowns of matching: the left side's names only
        let vars: BTreeSet<Name> = lhs_names.iter().map(internal).collect();
        let free: BTreeSet<Name> = rule.lhs.free_vars().iter().map(internal).collect();
        let rhs = rule.rhs.rename(&map);
        let unguarded = unguarded_projections(&t, &rhs, &free);
        Some(Pattern {
            name: rule.name.clone(),
            source: rule.source.clone(),
            symbols: ordered,
            powers,
            phase: t.phase().clone(),
            scalar: t.scalar(),
            bound: t.bound().to_vec(),
            bound_kinds,
            vars,
            free,
            rhs,
            unguarded,
        })
    }

    /// True when every free projection the rule assumes admissible is
    /// admissible in the term wherever the term is defined: a free
    /// variable (the domain assumes it), a summed one that another factor
    /// holds in a column of the same angular momentum, 0 for an integer j,
    /// or a number within a numeric j. Anything else (a compound form, a
    /// number against a symbolic j) could lose a zero of the left side.
    fn projections_admissible(&self, t: &Term, m: &Match) -> bool {
        let mut lattice: Option<PhaseLattice> = None;
        // another factor holds the projection, or its negative, in a
        // column of the same angular momentum: it is zero wherever the
        // projection does not fit
        let held_elsewhere = |l: &Lin, jv: &Lin| {
            let neg = -l;
            t.factors().iter().enumerate().any(|(i, f)| {
                !m.factors.contains(&i)
                    && f.columns()
                        .iter()
                        .any(|(cj, cm)| *cj == jv && (*cm == l || **cm == neg))
            })
        };
        self.unguarded.iter().all(|(p, j)| {
            let l = apply(&Lin::var(p.clone()), &m.subst);
            let jv = apply(j, &m.subst);
            if let Some((v, _)) = l.as_signed_var() {
                // a free projection is admissible for its free j (the
                // input's facts); with a summed j the sum runs over values
                // of j that the projection does not fit, which the dropped
                // column was zeroing: another column must still say so
                if !t.bound().contains(v) && !jv.vars().any(|x| t.bound().contains(x)) {
                    return true;
                }
            }
            if !l.is_constant() {
                // a summed projection or a compound form (`md+me`)
                return held_elsewhere(&l, &jv);
            }
            let c = l.constant_part();
            if jv.is_constant() {
                let jn = jv.constant_part();
                return c.abs() <= jn && (jn - c).is_integer();
            }
            // j integer by the rest of the term (not by the matched
            // symbols' own columns, whose zeros are what is at stake)
            c.is_zero()
                && lattice
                    .get_or_insert_with(|| {
                        let mut rest = t.parts();
                        rest.phase = Lin::zero();
                        rest.factors = t
                            .factors()
                            .iter()
                            .enumerate()
                            .filter(|(i, _)| !m.factors.contains(i))
                            .map(|(_, f)| f.clone())
                            .collect();
                        let rest = rest.normalized();
                        let (mut ints, zeros) = crate::algebra::lattice::integral_forms(&rest);
                        let all = t.all_vars();
                        ints.extend(crate::algebra::declare::declared_forms(&all));
                        PhaseLattice::new(&t.kinds(), &ints, &zeros)
                    })
                    .is_integer(&jv)
        })
    }

    /// Number of symbols in the pattern.
    pub fn size(&self) -> usize {
        self.symbols.len()
    }

    /// The internal name of a pattern variable (for `required` bindings).
    pub fn var(&self, n: &str) -> Name {
        internal(&Name::from(n))
    }

    /// Every match of the pattern in the term (at most `limit`), honouring
    /// `required` bindings of pattern variables.
    pub fn matches(&self, t: &Term, required: &Subst, regge: bool, limit: usize) -> Vec<Match> {
        let mut out = Vec::new();
        self.each_match(t, required, regge, &mut |m| {
            out.push(m);
            out.len() >= limit
        });
        out
    }

    /// Calls `accept` on each match until it returns true.
    pub fn each_match(
        &self,
        t: &Term,
        required: &Subst,
        regge: bool,
        accept: &mut dyn FnMut(Match) -> bool,
    ) {
        self.each_match_in(t, required, regge, None, accept)
    }

    /// `each_match` restricted to the factors with the given indices.
    pub fn each_match_in(
        &self,
        t: &Term,
        required: &Subst,
        regge: bool,
        allowed: Option<&[usize]>,
        accept: &mut dyn FnMut(Match) -> bool,
    ) {
        let mut used = vec![false; t.factors().len()];
        if let Some(a) = allowed {
            for (i, u) in used.iter_mut().enumerate() {
                *u = !a.contains(&i);
            }
        }
        // a quick count: the term needs at least the pattern's symbols of
        // each kind among the allowed factors
        for pat in &self.symbols {
            let need = self
                .symbols
                .iter()
                .filter(|p| std::mem::discriminant(*p) == std::mem::discriminant(pat))
                .count();
            let have = t
                .factors()
                .iter()
                .enumerate()
                .filter(|(i, f)| {
                    !used[*i] && std::mem::discriminant(*f) == std::mem::discriminant(pat)
                })
                .count();
            if have < need {
                return;
            }
        }
        // how many symbols hold each summed variable, of the pattern and of
        // the term: each summed pattern variable needs a summed term
        // variable found in exactly as many symbols (it may appear in no
        // others)
        let need_of = symbols_holding(&self.bound, &self.symbols);
        let have_of = symbols_holding(t.bound(), t.factors());
        let mut need: Vec<usize> = need_of.values().copied().collect();
        let mut have: Vec<usize> = have_of.values().copied().collect();
        need.sort_unstable();
        have.sort_unstable();
        for n in need {
            match have.iter().position(|h| *h == n) {
                Some(p) => {
                    have.remove(p);
                }
                None => return,
            }
        }
        let mut solver = Solver::default();
        for (k, v) in required {
            if !solver.add(&Lin::var(k.clone()), v, &self.vars) {
                return;
            }
        }
        let mut chosen: Vec<(usize, Image)> = Vec::new();
        // images only for the factors the pattern can use
        let kinds: Vec<std::mem::Discriminant<Factor>> =
            self.symbols.iter().map(std::mem::discriminant).collect();
        // a factor can stand for a pattern symbol only if it holds, for
        // each summed variable of that symbol, a summed term variable
        // found in exactly as many symbols
        let could_stand_for = |f: &Factor, pat: &Factor| {
            std::mem::discriminant(f) == std::mem::discriminant(pat)
                && self.bound.iter().filter(|b| pat.has(b)).all(|b| {
                    have_of
                        .iter()
                        .any(|(v, n)| *n == need_of[b] && f.has(v))
                })
        };
        let images: Vec<Vec<Image>> = t
            .factors()
            .iter()
            .enumerate()
            .map(|(i, f)| {
                if f.is_symbol()
                    && !used[i]
                    && kinds.contains(&std::mem::discriminant(f))
                    && self.symbols.iter().any(|pat| could_stand_for(f, pat))
                {
                    if regge {
                        regge_images(f)
                    } else {
                        classical_images(f)
                    }
                } else {
                    Vec::new()
                }
            })
            .collect();
        let mut done = false;
        self.search(
            t,
            &images,
            &solver,
            &mut used,
            &mut chosen,
            accept,
            &mut done,
        );
    }

    #[allow(clippy::too_many_arguments)]
    fn search(
        &self,
        t: &Term,
        images: &[Vec<Image>],
        solver: &Solver,
        used: &mut Vec<bool>,
        chosen: &mut Vec<(usize, Image)>,
        accept: &mut dyn FnMut(Match) -> bool,
        done: &mut bool,
    ) {
        if *done {
            return;
        }
        let k = chosen.len();
        if k == self.symbols.len() {
            if let Some(m) = self.finish(t, solver, chosen) {
                if self.projections_admissible(t, &m) {
                    *done = accept(m);
                }
            }
            return;
        }
        let pat = &self.symbols[k];
        // the term variables this symbol's summed variables already stand
        // for: a factor without one of them cannot be its image
        let held: Vec<&Name> = self
            .bound
            .iter()
            .filter(|b| pat.has(b))
            .filter_map(|b| solver.subst.get(b).and_then(|l| l.as_signed_var()))
            .map(|(v, _)| v)
            .collect();
        for (i, f) in t.factors().iter().enumerate() {
            if used[i]
                || std::mem::discriminant(f) != std::mem::discriminant(pat)
                || images[i].is_empty()
                || held.iter().any(|v| !f.has(v))
            {
                continue;
            }
            for img in &images[i] {
                if !self.slots_fit(k, &img.factor, t) {
                    continue;
                }
                let mut next = solver.clone();
                let ok = pat
                    .lins()
                    .iter()
                    .zip(img.factor.lins())
                    .all(|(p, x)| next.add(p, x, &self.vars))
                    && self.bound_ok(t, &next.subst, false);
                if ok {
                    chosen.push((i, img.clone()));
                    used[i] = true;
                    self.search(t, images, &next, used, chosen, accept, done);
                    used[i] = false;
                    chosen.pop();
                }
                if *done {
                    return;
                }
            }
        }
    }

    /// A quick filter: where the pattern has `±b` for a summed `b`, the
    /// image must have `±v` for a summed `v` of the term; where the
    /// pattern has a number, the image must have the same number.
    fn slots_fit(&self, k: usize, img: &Factor, t: &Term) -> bool {
        for (p, x) in self.symbols[k].lins().iter().zip(img.lins()) {
            if let Some((b, _)) = p.as_signed_var() {
                if self.bound_kinds.contains_key(b) {
                    match x.as_signed_var() {
                        Some((v, _)) if t.bound().contains(v) => {}
                        _ => return false,
                    }
                }
            } else if p.is_constant()
                && (!x.is_constant() || x.constant_part() != p.constant_part())
            {
                return false;
            }
        }
        true
    }

    /// Summed pattern variables land on distinct summed term variables.
    fn bound_ok(&self, t: &Term, s: &Subst, complete: bool) -> bool {
        let mut seen: BTreeSet<Name> = BTreeSet::new();
        for b in &self.bound {
            let Some(l) = s.get(b) else {
                if complete {
                    return false;
                }
                continue;
            };
            let Some((v, neg)) = l.as_signed_var() else {
                return false;
            };
            if !t.bound().contains(v) || !seen.insert(v.clone()) {
                return false;
            }
            if neg && self.bound_kinds.get(b) != Some(&Kind::Projection) {
                return false;
            }
        }
        // a free pattern variable must not reach a summed pattern variable's image
        if complete {
            for f in &self.free {
                if let Some(l) = s.get(f) {
                    if l.vars().any(|v| seen.contains(v)) {
                        return false;
                    }
                }
            }
        }
        true
    }

    fn finish(&self, t: &Term, solver: &Solver, chosen: &[(usize, Image)]) -> Option<Match> {
        let (s, complete) = solver.complete(&self.vars)?;
        if !complete || !self.bound_ok(t, &s, true) {
            return None;
        }
        let summed: Vec<Name> = self
            .bound
            .iter()
            .map(|b| s[b].as_signed_var().unwrap().0.clone())
            .collect();
        // the summed variables must not appear in unmatched symbols, deltas
        // or triangle factors
        let matched: BTreeSet<usize> = chosen.iter().map(|(i, _)| *i).collect();
        for (i, f) in t.factors().iter().enumerate() {
            if matched.contains(&i) || matches!(f, Factor::Power(..)) {
                continue;
            }
            if summed.iter().any(|v| f.has(v)) {
                return None;
            }
        }
        Some(Match {
            factors: chosen.iter().map(|(i, _)| *i).collect(),
            images: chosen.iter().map(|(_, img)| img.clone()).collect(),
            subst: s,
            summed,
        })
    }

    /// Rewrites the term at a match: the expression that replaces it, or
    /// `None` when the powers or the phase do not fit.
    pub fn rewrite(&self, t: &Term, m: &Match) -> Option<Expr> {
        let s = &m.subst;
        let summed: BTreeSet<Name> = m.summed.iter().cloned().collect();
        // powers: those of the pattern with summed variables must be in the
        // term exactly; the term must have no other power of those variables
        let mut rest_factors: Vec<Factor> = Vec::new();
        let matched: BTreeSet<usize> = m.factors.iter().copied().collect();
        let mut needed: Vec<(Lin, Q)> = Vec::new();
        let mut compensate: Vec<(Lin, Q)> = Vec::new();
        for (b, e) in &self.powers {
            let sb = apply(b, s);
            if sb.has_any(&summed) {
                needed.push((sb, *e));
            } else {
                compensate.push((sb, *e));
            }
        }
        // normalise the needed bases the way terms store them
        let norm = |b: &Lin, e: Q| -> (Lin, Q) {
            let t = Term::factor(Factor::Power(b.clone(), e));
            match t.factors() {
                [Factor::Power(nb, ne)] => (nb.clone(), *ne),
                _ => (b.clone(), e),
            }
        };
        let mut needed: Vec<(Lin, Q)> = needed.iter().map(|(b, e)| norm(b, *e)).collect();
        for (i, f) in t.factors().iter().enumerate() {
            if matched.contains(&i) {
                continue;
            }
            if let Factor::Power(b, e) = f {
                if b.has_any(&summed) {
                    let pos = needed.iter().position(|(nb, ne)| nb == b && ne == e)?;
                    needed.remove(pos);
                    continue;
                }
            }
            rest_factors.push(f.clone());
        }
        if !needed.is_empty() {
            return None;
        }
        // phase: term = (-1)^(e_T + Σ img) Π images; pattern brings σ(e_P)
        let mut d = t.phase().clone();
        for img in &m.images {
            d = &d + &img.phase;
        }
        d = &d - &apply(&self.phase, s);
        let first: Vec<Name> = m.summed.clone();
        let lattice = PhaseLattice::of_term_eliminating(t, &first);
        let d = lattice.eliminate(&d, &first)?;
        // the rest of the term, with the compensations
        let mut rest = t.parts();
        rest.factors = rest_factors;
        rest.bound.retain(|b| !summed.contains(b));
        rest.phase = d;
        for (b, e) in compensate {
            rest.factors.push(Factor::Power(b, -e));
        }
        let inv = self.scalar.recip()?;
        let rest = rest.normalized().scaled(&inv);
        let mut rhs = self.rhs.clone();
        for (v, by) in s {
            if self.free.contains(v) {
                rhs = rhs.substitute(v, by);
            }
        }
        let mut out = Expr::zero();
        for r in rhs.terms() {
            out.push(readable_bound(&rest.mul_inside(r)));
        }
        Some(out)
    }

    /// The first match that rewrites, and its result.
    pub fn apply_first(&self, t: &Term, required: &Subst, regge: bool) -> Option<(Match, Expr)> {
        self.apply_first_in(t, required, regge, None)
    }

    /// `apply_first` restricted to the factors with the given indices.
    pub fn apply_first_in(
        &self,
        t: &Term,
        required: &Subst,
        regge: bool,
        allowed: Option<&[usize]>,
    ) -> Option<(Match, Expr)> {
        let mut found = None;
        let mut tries = 0;
        self.each_match_in(t, required, regge, allowed, &mut |m| {
            tries += 1;
            if let Some(e) = self.rewrite(t, &m) {
                found = Some((m, e));
                return true;
            }
            tries >= 256
        });
        found
    }

    /// Of the matches that rewrite (at most `limit` tried), the one whose
    /// pattern variables take the simplest values (fewest terms, integer
    /// coefficients): through Regge's symmetries many images fit, and the
    /// plain one reads best.
    pub fn apply_simplest(
        &self,
        t: &Term,
        required: &Subst,
        regge: bool,
        limit: usize,
    ) -> Option<(Match, Expr)> {
        let score = |m: &Match| -> usize {
            self.free
                .iter()
                .filter_map(|v| m.subst.get(v))
                .map(|l| {
                    l.terms().count()
                        + l.terms().filter(|(_, c)| !c.is_integer()).count() * 2
                        + usize::from(!l.constant_part().is_integer())
                })
                .sum()
        };
        let ideal = self.free.len();
        let mut best: Option<(usize, Match, Expr)> = None;
        let mut tries = 0;
        self.each_match_in(t, required, regge, None, &mut |m| {
            tries += 1;
            if let Some(e) = self.rewrite(t, &m) {
                let sc = score(&m);
                if best.as_ref().is_none_or(|b| sc < b.0) {
                    best = Some((sc, m, e));
                }
            }
            best.as_ref().is_some_and(|b| b.0 <= ideal) || tries >= limit
        });
        best.map(|(_, m, e)| (m, e))
    }

    /// The local identity this match applies, for verification: the
    /// matched factors with the pattern's sums, and its right side.
    pub fn instance(&self, t: &Term, m: &Match) -> (Expr, Expr) {
        let s = &m.subst;
        let mut lhs = Term::constant(&self.scalar)
            .expect("a monomial pattern coefficient")
            .into_parts();
        lhs.phase = apply(&self.phase, s);
        for (k, _) in self.symbols.iter().enumerate() {
            let i = m.factors[k];
            lhs.factors.push(t.factors()[i].clone());
            lhs.phase = &lhs.phase - &m.images[k].phase;
        }
        for (b, e) in &self.powers {
            lhs.factors.push(Factor::Power(apply(b, s), *e));
        }
        lhs.bound = m.summed.clone();
        let mut rhs = self.rhs.clone();
        for (v, by) in s {
            if self.free.contains(v) {
                rhs = rhs.substitute(v, by);
            }
        }
        let rhs = Expr::merged(rhs.terms().iter().map(readable_bound));
        (Expr::from_term(lhs.normalized()), rhs)
    }
}

/// For each of `names`, how many symbols among `factors` hold it.
fn symbols_holding(names: &[Name], factors: &[Factor]) -> BTreeMap<Name, usize> {
    names
        .iter()
        .map(|b| {
            let n = factors.iter().filter(|f| f.is_symbol() && f.has(b)).count();
            (b.clone(), n)
        })
        .collect()
}
