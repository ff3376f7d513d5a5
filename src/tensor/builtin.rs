//! The reduced matrix elements of the built-in operators on one
//! subsystem, as data in the expression language with their published
//! sources (the convention of the Wigner–Eckart theorem is Edmonds's; see
//! the README). `BRA` and `KET` stand for the subsystem's angular momentum
//! on either side, `RANK` for the rank.

use crate::expr::{Expr, Lin, Name, OperatorName};
use crate::rules::source::Source;
use crate::syntax::parse;
use std::collections::BTreeSet;

/// One built-in reduced matrix element.
pub struct Builtin {
    /// the operator
    pub name: OperatorName,
    /// `<BRA || op[RANK] || KET>` in the expression language
    pub formula: &'static str,
    /// where it is published
    pub source: &'static str,
}

/// The built-in operators' reduced matrix elements.
pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: OperatorName::AngularMomentum,
        formula: "delta(BRA, KET) sqrt(BRA) sqrt(BRA+1) hat(BRA)",
        source: "edmonds1957 eq. 5.4.3 -- <j || J || j'> = delta(j, j') sqrt(j (j+1) (2j+1)); from memory",
    },
    Builtin {
        name: OperatorName::Spherical,
        formula: "(-1)^BRA hat(BRA) hat(KET) (BRA, RANK, KET; 0, 0, 0)",
        source: "edmonds1957 eq. 5.4.5 -- the renormalised spherical harmonic C[k] = sqrt(4 pi/(2k+1)) Y[k]; from memory",
    },
    Builtin {
        name: OperatorName::Unit,
        formula: "delta(BRA, KET)",
        source: "racah1942 -- the unit tensor, <l || u[k] || l'> = delta(l, l'); from memory",
    },
];

/// The entry of a built-in operator.
pub fn builtin(name: &OperatorName) -> Option<&'static Builtin> {
    BUILTINS.iter().find(|b| &b.name == name)
}

impl Builtin {
    /// The reduced matrix element with `BRA`, `KET` and `RANK` replaced
    /// (names in `avoid` are never captured).
    pub fn instance(&self, bra: &Lin, ket: &Lin, rank: &Lin, avoid: &BTreeSet<Name>) -> Expr {
        let e = parse(self.formula).expect("a built-in formula parses");
        // rename the placeholders apart from every name in use first, so
        // one substitution never captures the image of another
        let mut used = avoid.clone();
        used.extend(bra.vars().cloned());
        used.extend(ket.vars().cloned());
        used.extend(rank.vars().cloned());
        let mut map = std::collections::BTreeMap::new();
        let mut images = Vec::new();
        for (placeholder, by) in [("BRA", bra), ("KET", ket), ("RANK", rank)] {
            let mut fresh = Name::new(format!("{placeholder}0"));
            let mut n = 0;
            while used.contains(&fresh) {
                n += 1;
                fresh = Name::new(format!("{placeholder}{n}"));
            }
            used.insert(fresh.clone());
            map.insert(Name::new(placeholder), fresh.clone());
            images.push((fresh, by));
        }
        let mut e = e.rename(&map);
        for (fresh, by) in images {
            e = e.substitute(&fresh, by);
        }
        e
    }

    /// The source as a typed value.
    pub fn source(&self) -> Source {
        Source::parse(self.source).expect("a built-in's source parses")
    }
}
