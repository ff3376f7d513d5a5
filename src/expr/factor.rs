//! The factors a term multiplies: the symbols (3j, Clebsch–Gordan, 6j,
//! 9j), Kronecker deltas, triangle indicators and powers `Lin^(p/q)` (so
//! `hat(x)` is `(2x+1)^(1/2)`). Knows which slots hold angular momenta,
//! which hold projections, and which triads each symbol implies.

use super::element::MatrixElement;
use super::lin::{Lin, Q};
use super::name::Name;
use std::collections::BTreeMap;

/// One multiplicative factor of a term.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
pub enum Factor {
    /// `delta(a, b)`
    Delta(Lin, Lin),
    /// `tri(a, b, c)`: 1 when the triangle rule holds, else 0
    Tri([Lin; 3]),
    /// `base^exp` with a rational exponent (`hat(x) = (2x+1)^(1/2)`)
    Power(Lin, Q),
    /// `(j1, j2, j3; m1, m2, m3)` stored as `[j1, j2, j3, m1, m2, m3]`
    ThreeJ([Lin; 6]),
    /// `<j1, m1; j2, m2 | J, M>` stored as `[j1, m1, j2, m2, J, M]`
    Cg([Lin; 6]),
    /// `{j1, j2, j3; j4, j5, j6}`
    SixJ([Lin; 6]),
    /// `{a, b, c; d, e, f; g, h, i}` row by row
    NineJ([Lin; 9]),
    /// a matrix element `<BRA | OP | KET>` or reduced matrix element
    /// `<BRA || OP || KET>` of a tensor operator
    Element(Box<MatrixElement>),
}

/// What a variable is, inferred from the slots it occupies.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub enum Kind {
    /// appears in an angular-momentum slot somewhere
    AngularMomentum,
    /// appears only in projection slots (and perhaps phases, deltas, powers)
    Projection,
    /// appears in neither kind of slot
    Other,
}

impl Factor {
    /// Every linear-form argument, in slot order.
    pub fn lins(&self) -> Vec<&Lin> {
        match self {
            Factor::Delta(a, b) => vec![a, b],
            Factor::Tri(t) => t.iter().collect(),
            Factor::Power(b, _) => vec![b],
            Factor::ThreeJ(a) | Factor::Cg(a) | Factor::SixJ(a) => a.iter().collect(),
            Factor::NineJ(a) => a.iter().collect(),
            Factor::Element(e) => e.lins(),
        }
    }

    /// The same factor with `f` applied to every argument.
    pub fn map_lins(&self, f: &mut impl FnMut(&Lin) -> Lin) -> Factor {
        let m6 = |a: &[Lin; 6], f: &mut dyn FnMut(&Lin) -> Lin| -> [Lin; 6] {
            [f(&a[0]), f(&a[1]), f(&a[2]), f(&a[3]), f(&a[4]), f(&a[5])]
        };
        match self {
            Factor::Delta(a, b) => Factor::Delta(f(a), f(b)),
            Factor::Tri([a, b, c]) => Factor::Tri([f(a), f(b), f(c)]),
            Factor::Power(b, e) => Factor::Power(f(b), *e),
            Factor::ThreeJ(a) => Factor::ThreeJ(m6(a, f)),
            Factor::Cg(a) => Factor::Cg(m6(a, f)),
            Factor::SixJ(a) => Factor::SixJ(m6(a, f)),
            Factor::NineJ(a) => {
                let v: Vec<Lin> = a.iter().map(&mut *f).collect();
                Factor::NineJ(v.try_into().unwrap())
            }
            Factor::Element(e) => Factor::Element(Box::new(e.map_lins(&mut *f))),
        }
    }

    /// The same factor with arguments `i` and `k` (in `lins` order)
    /// exchanged.
    pub fn with_args_swapped(&self, i: usize, k: usize) -> Factor {
        let mut vals: Vec<Lin> = self.lins().into_iter().cloned().collect();
        vals.swap(i, k);
        let mut idx = 0;
        self.map_lins(&mut |_| {
            let v = vals[idx].clone();
            idx += 1;
            v
        })
    }

    /// Renames variables.
    pub fn rename(&self, map: &BTreeMap<Name, Name>) -> Factor {
        self.map_lins(&mut |l| l.rename(map))
    }

    /// Substitutes a variable by a linear form.
    pub fn substitute(&self, v: &Name, by: &Lin) -> Factor {
        self.map_lins(&mut |l| l.substitute(v, by))
    }

    /// True when variable `v` appears.
    pub fn has(&self, v: &Name) -> bool {
        self.lins().iter().any(|l| l.has(v))
    }

    /// The arguments in angular-momentum slots.
    pub fn j_slots(&self) -> Vec<&Lin> {
        match self {
            Factor::ThreeJ(a) => vec![&a[0], &a[1], &a[2]],
            Factor::Cg(a) => vec![&a[0], &a[2], &a[4]],
            Factor::SixJ(a) => a.iter().collect(),
            Factor::NineJ(a) => a.iter().collect(),
            Factor::Tri(t) => t.iter().collect(),
            Factor::Element(e) => e.j_slots(),
            // hat(j) = sqrt(2j+1) says j is an angular momentum; a root of
            // a form in several names (sqrt(2j-2m+1)) says nothing of them
            Factor::Power(b, e) if is_hat_base(b) && e.denom() == &2 && b.terms().count() == 1 => {
                vec![b]
            }
            _ => vec![],
        }
    }

    /// The arguments in projection slots.
    pub fn m_slots(&self) -> Vec<&Lin> {
        match self {
            Factor::ThreeJ(a) => vec![&a[3], &a[4], &a[5]],
            Factor::Cg(a) => vec![&a[1], &a[3], &a[5]],
            Factor::Element(e) => e.m_slots(),
            _ => vec![],
        }
    }

    /// The `(j, m)` columns of a 3j or Clebsch–Gordan coefficient.
    pub fn columns(&self) -> Vec<(&Lin, &Lin)> {
        match self {
            Factor::ThreeJ(a) => vec![(&a[0], &a[3]), (&a[1], &a[4]), (&a[2], &a[5])],
            Factor::Cg(a) => vec![(&a[0], &a[1]), (&a[2], &a[3]), (&a[4], &a[5])],
            Factor::Element(e) => e.columns(),
            _ => vec![],
        }
    }

    /// The projection-conservation form that must vanish
    /// (`m1+m2+m3` for a 3j, `m1+m2-M` for a CG).
    pub fn conservation(&self) -> Option<Lin> {
        match self {
            Factor::ThreeJ(a) => Some(&(&a[3] + &a[4]) + &a[5]),
            Factor::Cg(a) => Some(&(&a[1] + &a[3]) - &a[5]),
            Factor::Element(e) => e.conservation(),
            _ => None,
        }
    }

    /// The triads the factor requires to satisfy the triangle rule.
    pub fn triads(&self) -> Vec<[&Lin; 3]> {
        match self {
            Factor::ThreeJ(a) => vec![[&a[0], &a[1], &a[2]]],
            Factor::Cg(a) => vec![[&a[0], &a[2], &a[4]]],
            Factor::Tri([a, b, c]) => vec![[a, b, c]],
            Factor::SixJ(a) => vec![
                [&a[0], &a[1], &a[2]],
                [&a[0], &a[4], &a[5]],
                [&a[3], &a[1], &a[5]],
                [&a[3], &a[4], &a[2]],
            ],
            Factor::NineJ(a) => vec![
                [&a[0], &a[1], &a[2]],
                [&a[3], &a[4], &a[5]],
                [&a[6], &a[7], &a[8]],
                [&a[0], &a[3], &a[6]],
                [&a[1], &a[4], &a[7]],
                [&a[2], &a[5], &a[8]],
            ],
            Factor::Element(e) => e.triads(),
            _ => vec![],
        }
    }

    /// True for 3j, CG, 6j and 9j.
    pub fn is_symbol(&self) -> bool {
        matches!(
            self,
            Factor::ThreeJ(_) | Factor::Cg(_) | Factor::SixJ(_) | Factor::NineJ(_)
        )
    }

    /// A short name for messages ("3j symbol", "6j symbol", ...).
    pub fn kind_name(&self) -> &'static str {
        match self {
            Factor::Delta(..) => "delta",
            Factor::Tri(_) => "triangle factor",
            Factor::Power(..) => "power",
            Factor::ThreeJ(_) => "3j symbol",
            Factor::Cg(_) => "Clebsch-Gordan coefficient",
            Factor::SixJ(_) => "6j symbol",
            Factor::NineJ(_) => "9j symbol",
            Factor::Element(e) if e.is_reduced() => "reduced matrix element",
            Factor::Element(_) => "matrix element",
        }
    }
}

/// True when a power base has the shape `2L+1` of a `hat` (all variable
/// coefficients even integers, odd integer constant).
pub fn is_hat_base(b: &Lin) -> bool {
    !b.is_constant()
        && b.terms()
            .all(|(_, c)| c.is_integer() && c.to_integer() % 2 == 0)
        && b.constant_part().is_integer()
        && b.constant_part().to_integer() % 2 != 0
}
