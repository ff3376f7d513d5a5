//! Matching a rule's left side against a term: the pattern's symbol is
//! compared with every image of each symbol of the term under its
//! symmetry group, and the pattern variables are solved for by linear
//! unification. A match replaces the symbol by the right side, with the
//! phase the symmetry cost.

use super::Rule;
use crate::algebra::symmetry::{classical_images, regge_images};
use crate::algebra::unify::unify;
use crate::expr::{Expr, Factor, Lin, Name, Term};
use std::collections::{BTreeMap, BTreeSet};

/// Renames the pattern variables to names no input can contain.
fn internal(n: &Name) -> Name {
    Name::new(format!("\u{2}{n}"))
}

/// The rule with its variables renamed apart from any target.
pub struct Prepared<'a> {
    /// the rule
    pub rule: &'a Rule,
    pattern: Factor,
    coef_term: Term,
    rhs: Expr,
    vars: BTreeSet<Name>,
    /// only symbols that hold no summed variable (closed forms)
    outside_sums: bool,
}

impl<'a> Prepared<'a> {
    /// Prepares a single-symbol rule (`None` for other shapes).
    pub fn new(rule: &'a Rule) -> Option<Prepared<'a>> {
        let map: BTreeMap<Name, Name> = rule
            .vars()
            .iter()
            .map(|v| (v.clone(), internal(v)))
            .collect();
        let lhs = rule.lhs.rename(&map);
        let t = &lhs.terms()[0];
        if !t.bound().is_empty() || t.factors().len() != 1 || !t.factors()[0].is_symbol() {
            return None;
        }
        let mut coef_term = t.parts();
        coef_term.factors.clear();
        let coef_term = coef_term.normalized();
        Some(Prepared {
            rule,
            pattern: t.factors()[0].clone(),
            coef_term,
            rhs: rule.rhs.rename(&map),
            vars: map.values().cloned().collect(),
            outside_sums: rule.kind == super::RuleKind::ClosedForm,
        })
    }

    /// The first rewrite of a term by this rule: the expression that
    /// replaces the term, or `None`.
    pub fn rewrite(&self, t: &Term, regge: bool) -> Option<Expr> {
        for (i, f) in t.factors().iter().enumerate() {
            if std::mem::discriminant(f) != std::mem::discriminant(&self.pattern) {
                continue;
            }
            if self.outside_sums && t.bound().iter().any(|b| f.has(b)) {
                continue;
            }
            let images = if regge {
                regge_images(f)
            } else {
                classical_images(f)
            };
            for img in images {
                let pl = self.pattern.lins();
                let tl = img.factor.lins();
                let Some(s) = unify(&pl, &tl, &self.vars) else {
                    continue;
                };
                // t = (-1)^phase img ... and img = coef_term * rhs / pattern coef
                let mut rest = t.parts();
                rest.factors.remove(i);
                rest.phase = &rest.phase + &img.phase;
                let rest = rest.normalized();
                let mut rhs = self.rhs.clone();
                for (v, by) in &s {
                    rhs = rhs.substitute(v, by);
                }
                // divide by the pattern's own constant and phase
                let inv = self
                    .coef_term
                    .scalar()
                    .recip()
                    .expect("nonzero pattern coefficient");
                let mut scale = Term::constant(&inv)
                    .expect("a monomial pattern coefficient")
                    .into_parts();
                scale.phase = -&substitute_lin(self.coef_term.phase(), &s);
                let rest = rest.mul_inside(&scale.normalized());
                let mut out = Expr::zero();
                for r in rhs.terms() {
                    out.push(rest.mul_inside(r));
                }
                return Some(out);
            }
        }
        None
    }
}

fn substitute_lin(l: &Lin, s: &BTreeMap<Name, Lin>) -> Lin {
    crate::algebra::unify::apply(l, s)
}
