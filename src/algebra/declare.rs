//! Declarations: names the user declares integer or half-odd (`--integer
//! k,q`, `--half-odd s`, or `integer k, q;` before an expression).
//!
//! A declaration is a fact about a name wherever it occurs, so it lives in
//! a scope rather than in each term: `scoped` runs a closure with a set of
//! declarations in force on this thread, and the places that decide what
//! is an integer read it: the phase lattice (`integral_forms`), the point
//! sampler (the domain of free variables) and the evaluator (a value of the
//! wrong parity is bad input). Outside any scope nothing is declared, so
//! library callers that declare nothing see no change; the identity
//! catalog and the rule patterns are built with declarations suspended,
//! since their variable names are not the user's.
//!
//! A summed variable keeps its name only up to renaming, so its declaration
//! must follow from the term itself (from the free declarations and the
//! triads and columns it sits in); `unimplied_summed` finds one that does
//! not, which the command line reports as bad input.

use crate::expr::{Expr, Lin, Name, Term, Q};
use std::cell::RefCell;
use std::collections::BTreeMap;
use std::fmt;
use std::rc::Rc;

/// The two parities a name may be declared to have.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Parity {
    /// 0, 1, 2, ...: `v` is an integer
    Integer,
    /// 1/2, 3/2, ...: `v - 1/2` is an integer
    HalfOdd,
}

impl Parity {
    /// The word used in messages and in the language (`integer`, `half-odd`).
    pub fn word(&self) -> &'static str {
        match self {
            Parity::Integer => "integer",
            Parity::HalfOdd => "half-odd",
        }
    }

    /// True when `q` has this parity.
    pub fn admits(&self, q: Q) -> bool {
        match self {
            Parity::Integer => q.is_integer(),
            Parity::HalfOdd => (q - Q::new(1, 2)).is_integer(),
        }
    }

    /// The linear form that is an integer exactly when `v` has this parity.
    pub fn form(&self, v: &Name) -> Lin {
        match self {
            Parity::Integer => Lin::var(v.clone()),
            Parity::HalfOdd => &Lin::var(v.clone()) - &Lin::constant(Q::new(1, 2)),
        }
    }
}

/// A name declared with both parities.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("{name} is declared both integer and half-odd")]
pub struct Conflict {
    /// the name
    pub name: Name,
}

/// A set of declarations.
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Declarations {
    parity: BTreeMap<Name, Parity>,
}

impl Declarations {
    /// No declarations.
    pub fn new() -> Declarations {
        Declarations::default()
    }

    /// Declares `name` with `parity`; declaring it again the same way is
    /// harmless, the other way is a conflict.
    pub fn declare(&mut self, name: Name, parity: Parity) -> Result<(), Conflict> {
        match self.parity.get(&name) {
            Some(p) if *p != parity => Err(Conflict { name }),
            _ => {
                self.parity.insert(name, parity);
                Ok(())
            }
        }
    }

    /// Adds every declaration of `other`.
    pub fn extend(&mut self, other: &Declarations) -> Result<(), Conflict> {
        for (n, p) in &other.parity {
            self.declare(n.clone(), *p)?;
        }
        Ok(())
    }

    /// The declared parity of `name`.
    pub fn get(&self, name: &Name) -> Option<Parity> {
        self.parity.get(name).copied()
    }

    /// True when nothing is declared.
    pub fn is_empty(&self) -> bool {
        self.parity.is_empty()
    }

    /// The declarations in name order.
    pub fn iter(&self) -> impl Iterator<Item = (&Name, Parity)> {
        self.parity.iter().map(|(n, p)| (n, *p))
    }
}

impl fmt::Display for Declarations {
    /// In the language: `integer k, q; half-odd s;`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut first = true;
        for p in [Parity::Integer, Parity::HalfOdd] {
            let names: Vec<&str> = self
                .parity
                .iter()
                .filter(|(_, q)| **q == p)
                .map(|(n, _)| n.as_str())
                .collect();
            if !names.is_empty() {
                if !first {
                    f.write_str(" ")?;
                }
                write!(f, "{} {};", p.word(), names.join(", "))?;
                first = false;
            }
        }
        Ok(())
    }
}

thread_local! {
    static CURRENT: RefCell<Rc<Declarations>> = RefCell::new(Rc::new(Declarations::new()));
}

/// Restores the previous declarations when dropped (also on unwinding).
struct Restore(Option<Rc<Declarations>>);

impl Drop for Restore {
    fn drop(&mut self) {
        if let Some(prev) = self.0.take() {
            CURRENT.with(|c| *c.borrow_mut() = prev);
        }
    }
}

fn replace(d: Rc<Declarations>) -> Restore {
    Restore(Some(
        CURRENT.with(|c| std::mem::replace(&mut *c.borrow_mut(), d)),
    ))
}

/// Runs `f` with `d` in force on this thread (replacing what was in force).
pub fn scoped<R>(d: &Declarations, f: impl FnOnce() -> R) -> R {
    let _restore = replace(Rc::new(d.clone()));
    f()
}

/// Runs `f` with nothing declared (for work on names that are not the
/// user's, such as building the identity catalog).
pub fn suspended<R>(f: impl FnOnce() -> R) -> R {
    scoped(&Declarations::new(), f)
}

/// The declarations in force.
pub fn current() -> Declarations {
    CURRENT.with(|c| (*c.borrow()).as_ref().clone())
}

/// Adds declarations to those in force for the rest of the enclosing scope
/// (the command line adds those an expression's text makes).
pub fn add_to_current(d: &Declarations) -> Result<(), Conflict> {
    if d.is_empty() {
        return Ok(());
    }
    let mut now = current();
    now.extend(d)?;
    CURRENT.with(|c| *c.borrow_mut() = Rc::new(now));
    Ok(())
}

/// The declared parity of `name`, if any.
pub fn parity_of(name: &Name) -> Option<Parity> {
    CURRENT.with(|c| {
        let c = c.borrow();
        if c.is_empty() {
            None
        } else {
            c.get(name)
        }
    })
}

/// True when nothing is declared in this scope.
pub fn nothing_declared() -> bool {
    CURRENT.with(|c| c.borrow().is_empty())
}

/// The integrality forms of the declared variables among `vars`.
pub fn declared_forms<'a>(vars: impl IntoIterator<Item = &'a Name>) -> Vec<Lin> {
    if nothing_declared() {
        return Vec::new();
    }
    vars.into_iter()
        .filter_map(|v| parity_of(v).map(|p| p.form(v)))
        .collect()
}

/// A summed variable whose declared parity the term does not imply (from
/// its triads, its columns and the declarations of the other names), with
/// that parity and the term it sits in.
pub fn unimplied_summed(e: &Expr) -> Option<(Name, Parity, Term)> {
    use crate::algebra::lattice::{integral_forms_except, PhaseLattice};
    if nothing_declared() {
        return None;
    }
    for t in e.terms() {
        for b in t.bound() {
            let Some(p) = parity_of(b) else { continue };
            let (ints, zeros) = integral_forms_except(t, Some(b));
            let lattice = PhaseLattice::new(&t.kinds(), &ints, &zeros);
            if !lattice.is_integer(&p.form(b)) {
                return Some((b.clone(), p, t.clone()));
            }
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_scope_holds_its_declarations_and_restores_the_outer_ones() {
        let mut d = Declarations::new();
        d.declare(Name::new("k"), Parity::Integer).unwrap();
        assert_eq!(parity_of(&Name::new("k")), None);
        scoped(&d, || {
            assert_eq!(parity_of(&Name::new("k")), Some(Parity::Integer));
            suspended(|| assert_eq!(parity_of(&Name::new("k")), None));
            let mut more = Declarations::new();
            more.declare(Name::new("s"), Parity::HalfOdd).unwrap();
            add_to_current(&more).unwrap();
            assert_eq!(parity_of(&Name::new("s")), Some(Parity::HalfOdd));
            let mut clash = Declarations::new();
            clash.declare(Name::new("k"), Parity::HalfOdd).unwrap();
            assert!(add_to_current(&clash).is_err());
        });
        assert_eq!(parity_of(&Name::new("s")), None);
        assert_eq!(d.to_string(), "integer k;");
    }

    #[test]
    fn parities_admit_their_values_only() {
        assert!(Parity::Integer.admits(Q::from_integer(3)));
        assert!(!Parity::Integer.admits(Q::new(3, 2)));
        assert!(Parity::HalfOdd.admits(Q::new(-1, 2)));
        assert!(!Parity::HalfOdd.admits(Q::from_integer(0)));
    }
}
