//! Linear forms `c0 + Σ ci·vi` with small rational coefficients: every
//! argument of a symbol, every phase exponent and every power base.

use super::name::Name;
use num_integer::Integer;
use num_rational::Ratio;
use num_traits::{One, Signed, Zero};
use std::collections::{BTreeMap, BTreeSet};
use std::fmt;

/// The rational type of linear-form coefficients.
pub type Q = Ratio<i64>;

/// `c0 + Σ ci·vi`; zero coefficients are never stored.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct Lin {
    coeffs: BTreeMap<Name, Q>,
    c0: Q,
}

impl Lin {
    /// The constant `c`.
    pub fn constant(c: Q) -> Lin {
        Lin {
            coeffs: BTreeMap::new(),
            c0: c,
        }
    }

    /// The integer `n`.
    pub fn int(n: i64) -> Lin {
        Lin::constant(Q::from_integer(n))
    }

    /// Zero.
    pub fn zero() -> Lin {
        Lin::default()
    }

    /// The variable `v`.
    pub fn var(v: impl Into<Name>) -> Lin {
        let mut coeffs = BTreeMap::new();
        coeffs.insert(v.into(), Q::one());
        Lin {
            coeffs,
            c0: Q::zero(),
        }
    }

    /// The constant part.
    pub fn constant_part(&self) -> Q {
        self.c0
    }

    /// The coefficient of `v` (0 when absent).
    pub fn coeff(&self, v: &Name) -> Q {
        self.coeffs.get(v).copied().unwrap_or_else(Q::zero)
    }

    /// `(variable, coefficient)` in name order.
    pub fn terms(&self) -> impl Iterator<Item = (&Name, &Q)> {
        self.coeffs.iter()
    }

    /// The variables with nonzero coefficient.
    pub fn vars(&self) -> impl Iterator<Item = &Name> {
        self.coeffs.keys()
    }

    /// True when no variable appears.
    pub fn is_constant(&self) -> bool {
        self.coeffs.is_empty()
    }

    /// True for the form 0.
    pub fn is_zero(&self) -> bool {
        self.coeffs.is_empty() && self.c0.is_zero()
    }

    /// True when `v` appears.
    pub fn has(&self, v: &Name) -> bool {
        self.coeffs.contains_key(v)
    }

    /// True when any of `vs` appears.
    pub fn has_any(&self, vs: &BTreeSet<Name>) -> bool {
        self.coeffs.keys().any(|k| vs.contains(k))
    }

    /// The single variable of a form `±v`, with its sign.
    pub fn as_signed_var(&self) -> Option<(&Name, bool)> {
        if self.c0.is_zero() && self.coeffs.len() == 1 {
            let (v, c) = self.coeffs.iter().next().unwrap();
            if *c == Q::one() {
                return Some((v, false));
            }
            if *c == -Q::one() {
                return Some((v, true));
            }
        }
        None
    }

    /// The variable of a form exactly `v`.
    pub fn as_var(&self) -> Option<&Name> {
        match self.as_signed_var() {
            Some((v, false)) => Some(v),
            _ => None,
        }
    }

    fn insert(&mut self, v: Name, c: Q) {
        if c.is_zero() {
            self.coeffs.remove(&v);
        } else {
            self.coeffs.insert(v, c);
        }
    }

    /// `self + k·other`.
    pub fn add_scaled(&self, other: &Lin, k: Q) -> Lin {
        let mut out = self.clone();
        for (v, c) in &other.coeffs {
            let nc = out.coeff(v) + *c * k;
            out.insert(v.clone(), nc);
        }
        out.c0 += other.c0 * k;
        out
    }

    /// `k·self`.
    pub fn scale(&self, k: Q) -> Lin {
        if k.is_zero() {
            return Lin::zero();
        }
        Lin {
            coeffs: self
                .coeffs
                .iter()
                .map(|(v, c)| (v.clone(), *c * k))
                .collect(),
            c0: self.c0 * k,
        }
    }

    /// Replaces variable `v` by the form `by`.
    pub fn substitute(&self, v: &Name, by: &Lin) -> Lin {
        let c = self.coeff(v);
        if c.is_zero() {
            return self.clone();
        }
        let mut out = self.clone();
        out.coeffs.remove(v);
        out.add_scaled(by, c)
    }

    /// Renames variables by a map (others kept).
    pub fn rename(&self, map: &BTreeMap<Name, Name>) -> Lin {
        let mut out = Lin::constant(self.c0);
        for (v, c) in &self.coeffs {
            let w = map.get(v).cloned().unwrap_or_else(|| v.clone());
            let nc = out.coeff(&w) + *c;
            out.insert(w, nc);
        }
        out
    }

    /// Value at an assignment; `None` when a variable has no value.
    pub fn eval(&self, at: &impl Fn(&Name) -> Option<Q>) -> Option<Q> {
        let mut s = self.c0;
        for (v, c) in &self.coeffs {
            s += *c * at(v)?;
        }
        Some(s)
    }

    /// Makes the variable part primitive: `self = k · prim` with integer,
    /// coprime coefficients in `prim` (constant included) and `k > 0`.
    pub fn primitive(&self) -> (Q, Lin) {
        if self.is_zero() {
            return (Q::one(), Lin::zero());
        }
        let mut den_lcm: i64 = 1;
        let mut num_gcd: i64 = 0;
        for c in self.coeffs.values().chain(std::iter::once(&self.c0)) {
            den_lcm = den_lcm.lcm(c.denom());
        }
        for c in self.coeffs.values().chain(std::iter::once(&self.c0)) {
            let n = (*c * Q::from_integer(den_lcm)).to_integer();
            num_gcd = num_gcd.gcd(&n);
        }
        let k = Q::new(num_gcd.abs(), den_lcm);
        (k, self.scale(k.recip()))
    }

    /// True when the leading term (first variable, or the constant) is negative.
    pub fn leading_negative(&self) -> bool {
        match self.coeffs.values().next() {
            Some(c) => c.is_negative(),
            None => self.c0.is_negative(),
        }
    }
}

impl std::ops::Add for &Lin {
    type Output = Lin;
    fn add(self, o: &Lin) -> Lin {
        self.add_scaled(o, Q::one())
    }
}

impl std::ops::Sub for &Lin {
    type Output = Lin;
    fn sub(self, o: &Lin) -> Lin {
        self.add_scaled(o, -Q::one())
    }
}

impl std::ops::Neg for &Lin {
    type Output = Lin;
    fn neg(self) -> Lin {
        self.scale(-Q::one())
    }
}

/// Writes a rational as `n` or `n/d`.
pub fn fmt_q(q: &Q) -> String {
    if q.is_integer() {
        q.numer().to_string()
    } else {
        format!("{}/{}", q.numer(), q.denom())
    }
}

thread_local! {
    /// The order in which the user's text names its variables, while a
    /// result is printed for reading (see `with_reading_order`).
    static READING_ORDER: std::cell::RefCell<Option<BTreeMap<Name, usize>>> =
        const { std::cell::RefCell::new(None) };
}

/// Runs `f` with phase exponents printed with their variables in the
/// order of `ranks` (the order in which the user's text names them;
/// variables it does not name come after, in name order). Only the
/// printing of phases changes; values, normal forms and every other
/// printed form stay as they are.
pub fn with_reading_order<T>(ranks: &BTreeMap<Name, usize>, f: impl FnOnce() -> T) -> T {
    struct Restore(Option<BTreeMap<Name, usize>>);
    impl Drop for Restore {
        fn drop(&mut self) {
            let old = self.0.take();
            READING_ORDER.with(|r| *r.borrow_mut() = old);
        }
    }
    let old = READING_ORDER.with(|r| r.replace(Some(ranks.clone())));
    let _restore = Restore(old);
    f()
}

impl Lin {
    /// The variables with their coefficients in the reading order in force
    /// (name order outside `with_reading_order`): those with a positive
    /// coefficient first (`j1+j2-J`, not `-J+j1+j2`), each group in the
    /// order the user names them.
    pub fn terms_for_reading(&self) -> Vec<(&Name, &Q)> {
        let mut v: Vec<(&Name, &Q)> = self.coeffs.iter().collect();
        READING_ORDER.with(|r| {
            if let Some(ranks) = &*r.borrow() {
                // stable: unnamed variables keep name order, at the end
                v.sort_by_key(|(n, c)| {
                    (c.is_negative(), ranks.get(*n).copied().unwrap_or(usize::MAX))
                });
            }
        });
        v
    }

    /// Plain text with the variables in the reading order in force (for a
    /// phase exponent).
    pub fn reading_text(&self) -> String {
        let mut s = String::new();
        write_form(&mut s, self.terms_for_reading(), &self.c0).expect("writing to a string");
        s
    }
}

/// Writes `Σ c v + c0` compactly: `j1+j2-j3`, `2*x+1`, `-m`, `x/2`, `j+1/2`.
fn write_form<'a>(
    f: &mut impl fmt::Write,
    terms: impl IntoIterator<Item = (&'a Name, &'a Q)>,
    c0: &Q,
) -> fmt::Result {
    let mut first = true;
    for (v, c) in terms {
        let neg = c.is_negative();
        let a = c.abs();
        if neg {
            f.write_str("-")?;
        } else if !first {
            f.write_str("+")?;
        }
        if a.is_one() {
            write!(f, "{v}")?;
        } else if a.is_integer() {
            write!(f, "{}*{v}", a.numer())?;
        } else if a.numer().is_one() {
            write!(f, "{v}/{}", a.denom())?;
        } else {
            write!(f, "{}*{v}/{}", a.numer(), a.denom())?;
        }
        first = false;
    }
    if !c0.is_zero() || first {
        if c0.is_negative() {
            f.write_str("-")?;
        } else if !first {
            f.write_str("+")?;
        }
        f.write_str(&fmt_q(&c0.abs()))?;
    }
    Ok(())
}

impl fmt::Display for Lin {
    /// Compact plain text: `j1+j2-j3`, `2*x+1`, `-m`, `x/2`, `j+1/2`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write_form(f, &self.coeffs, &self.c0)
    }
}

impl fmt::Debug for Lin {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Lin({self})")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn prints_compactly() {
        let l = &(&Lin::var("j1") + &Lin::var("j2")) - &Lin::var("j3");
        assert_eq!(l.to_string(), "j1+j2-j3");
        let h = Lin::var("x")
            .scale(Q::from_integer(2))
            .add_scaled(&Lin::int(1), Q::one());
        assert_eq!(h.to_string(), "2*x+1");
        assert_eq!((-&Lin::var("m")).to_string(), "-m");
        assert_eq!(Lin::var("x").scale(Q::new(1, 2)).to_string(), "x/2");
        assert_eq!(Lin::zero().to_string(), "0");
        assert_eq!(Lin::constant(Q::new(-3, 2)).to_string(), "-3/2");
    }

    #[test]
    fn primitive_part_pulls_out_the_content() {
        let l = Lin::var("x")
            .scale(Q::new(1, 2))
            .add_scaled(&Lin::int(1), Q::new(1, 4));
        let (k, p) = l.primitive();
        assert_eq!(k, Q::new(1, 4));
        assert_eq!(p.to_string(), "2*x+1");
    }
}
