//! Evaluation of whole expressions at an assignment of their free
//! variables, exactly (`Surd`) or in f64: phases, powers and hats, deltas,
//! triangle factors, symbols, and sums over projections and angular
//! momenta with ranges inferred from the term (triangle rules, projection
//! ranges, conservation and deltas). Checks user-given values for
//! admissibility first.

use super::exact::{projection_ok2, triangle2};
use super::{exact, float, Surd};
use crate::algebra::selection::{range_indexed, Constraints, Indexed, Range};
use crate::expr::term::{big_q, doubled, power_of_rational};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use num_traits::{Signed, Zero};
use std::cell::RefCell;
use std::collections::{BTreeMap, HashMap};

/// Values of variables.
pub type Assignment = BTreeMap<Name, Q>;

/// Most summation points one evaluation may visit.
pub const MAX_POINTS: u64 = 50_000_000;

/// Why an expression could not be evaluated.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum EvalError {
    /// A free variable without a value.
    #[error("{0} has no value (give it with --at {0}=...)")]
    Unassigned(Name),
    /// A value that is not a multiple of 1/2.
    #[error("{name} = {value} is not a multiple of 1/2")]
    NotHalfInteger {
        /// the variable
        name: Name,
        /// its value
        value: String,
    },
    /// A negative angular momentum.
    #[error("{name} = {value} is an angular momentum and cannot be negative")]
    NegativeJ {
        /// the variable
        name: Name,
        /// its value
        value: String,
    },
    /// A projection outside its range or of the wrong parity.
    #[error("{name} = {value} is not an allowed projection of {j} = {jvalue} (needs |m| <= j and j - m an integer)")]
    Projection {
        /// the projection
        name: Name,
        /// its value
        value: String,
        /// the angular momentum it projects
        j: String,
        /// that angular momentum's value
        jvalue: String,
    },
    /// A phase whose exponent is not an integer.
    #[error("the phase (-1)^({exponent}) has the non-integer exponent {value} here")]
    PhaseNotInteger {
        /// the exponent as written
        exponent: String,
        /// its value
        value: String,
    },
    /// A summed variable with no finite range.
    #[error("the summed variable {0} is not bounded by any triangle rule or projection range in its term")]
    Unbounded(Name),
    /// A square root of a negative number or a division by zero.
    #[error("{0}")]
    Arithmetic(String),
    /// A sum with too many points.
    #[error("the sum visits more than {MAX_POINTS} points; refusing to go on")]
    TooLarge,
}

/// Which numbers an evaluation produces.
pub trait Field: Clone {
    /// 0
    fn zero() -> Self;
    /// 1
    fn one() -> Self;
    /// true for 0
    fn is_zero(&self) -> bool;
    /// product
    fn mul(&self, o: &Self) -> Self;
    /// sum
    fn add(&self, o: &Self) -> Self;
    /// negation
    fn neg(&self) -> Self;
    /// an exact monomial value
    fn from_surd(s: &Surd) -> Self;
    /// a symbol value (doubled arguments)
    fn symbol(kind: SymbolKind, args: &[i64]) -> Self;
}

/// The four symbol kinds.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
pub enum SymbolKind {
    /// 3j
    ThreeJ,
    /// Clebsch–Gordan
    Cg,
    /// 6j
    SixJ,
    /// 9j
    NineJ,
}

impl Field for Surd {
    fn zero() -> Self {
        Surd::zero()
    }
    fn one() -> Self {
        Surd::one()
    }
    fn is_zero(&self) -> bool {
        Surd::is_zero(self)
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn neg(&self) -> Self {
        -self
    }
    fn from_surd(s: &Surd) -> Self {
        s.clone()
    }
    fn symbol(kind: SymbolKind, a: &[i64]) -> Self {
        match kind {
            SymbolKind::ThreeJ => exact::three_j([a[0], a[1], a[2]], [a[3], a[4], a[5]]),
            SymbolKind::Cg => exact::clebsch_gordan(a[0], a[1], a[2], a[3], a[4], a[5]),
            SymbolKind::SixJ => exact::six_j(a.try_into().unwrap()),
            SymbolKind::NineJ => exact::nine_j(a.try_into().unwrap()),
        }
    }
}

impl Field for f64 {
    fn zero() -> Self {
        0.0
    }
    fn one() -> Self {
        1.0
    }
    fn is_zero(&self) -> bool {
        *self == 0.0
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn neg(&self) -> Self {
        -self
    }
    fn from_surd(s: &Surd) -> Self {
        s.to_f64()
    }
    fn symbol(kind: SymbolKind, a: &[i64]) -> Self {
        match kind {
            SymbolKind::ThreeJ => float::three_j_f64([a[0], a[1], a[2]], [a[3], a[4], a[5]]),
            SymbolKind::Cg => float::clebsch_gordan_f64(a[0], a[1], a[2], a[3], a[4], a[5]),
            SymbolKind::SixJ => float::six_j_f64(a.try_into().unwrap()),
            SymbolKind::NineJ => float::nine_j_f64(a.try_into().unwrap()),
        }
    }
}

/// Evaluates expressions, caching symbol values across calls.
pub struct Evaluator<F: Field> {
    cache: RefCell<HashMap<(SymbolKind, [i64; 9]), F>>,
    points: RefCell<u64>,
    /// summation constraints per term, keyed by the term's contents
    ranges: RefCell<HashMap<Term, std::rc::Rc<Indexed>>>,
}

impl<F: Field> Default for Evaluator<F> {
    fn default() -> Self {
        Evaluator {
            cache: RefCell::new(HashMap::new()),
            points: RefCell::new(0),
            ranges: RefCell::new(HashMap::new()),
        }
    }
}

fn qstr(q: &Q) -> String {
    crate::expr::lin::fmt_q(q)
}

/// Checks user-given values: every free variable has a value that is a
/// multiple of 1/2, angular momenta are nonnegative, and a projection
/// written alone (or negated) in a column has |m| <= j and j - m integer.
pub fn check_assignment(e: &Expr, at: &Assignment) -> Result<(), EvalError> {
    let kinds = e.kinds();
    for (v, k) in &kinds {
        let Some(val) = at.get(v) else {
            return Err(EvalError::Unassigned(v.clone()));
        };
        if doubled(*val).is_none() {
            return Err(EvalError::NotHalfInteger {
                name: v.clone(),
                value: qstr(val),
            });
        }
        if *k == Kind::AngularMomentum && val.is_negative() {
            return Err(EvalError::NegativeJ {
                name: v.clone(),
                value: qstr(val),
            });
        }
    }
    let get = |n: &Name| at.get(n).copied();
    for t in &e.terms {
        for f in &t.factors {
            for (j, m) in f.columns() {
                let Some((mv, _)) = m.as_signed_var() else {
                    continue;
                };
                if t.bound.contains(mv) || j.vars().any(|x| t.bound.contains(x)) {
                    continue;
                }
                let (Some(jval), Some(mval)) = (j.eval(&get), m.eval(&get)) else {
                    continue;
                };
                let ok = match (doubled(jval), doubled(mval)) {
                    (Some(tj), Some(tm)) => projection_ok2(tj, tm),
                    _ => false,
                };
                if !ok {
                    return Err(EvalError::Projection {
                        name: mv.clone(),
                        value: qstr(&at[mv]),
                        j: j.to_string(),
                        jvalue: qstr(&jval),
                    });
                }
            }
        }
    }
    Ok(())
}

impl<F: Field> Evaluator<F> {
    /// A fresh evaluator.
    pub fn new() -> Self {
        Self::default()
    }

    /// Evaluates after checking the assignment.
    pub fn eval_checked(&self, e: &Expr, at: &Assignment) -> Result<F, EvalError> {
        check_assignment(e, at)?;
        self.eval(e, at)
    }

    /// Evaluates (the assignment is trusted to be admissible).
    pub fn eval(&self, e: &Expr, at: &Assignment) -> Result<F, EvalError> {
        *self.points.borrow_mut() = 0;
        let mut acc = F::zero();
        for t in &e.terms {
            let v = self.eval_term(t, at)?;
            acc = acc.add(&v);
        }
        Ok(acc)
    }

    /// Evaluates one term.
    pub fn eval_term(&self, t: &Term, at: &Assignment) -> Result<F, EvalError> {
        let mut env = at.clone();
        let mut todo: Vec<Name> = t.bound.clone();
        let scalar = F::from_surd(&t.scalar());
        if todo.is_empty() {
            let v = self.product(t, &env)?;
            return Ok(scalar.mul(&v));
        }
        let cached = self.ranges.borrow().get(t).cloned();
        let ix = match cached {
            Some(ix) => ix,
            None => {
                let ix = std::rc::Rc::new(Indexed::new(&Constraints::of(&t.factors)));
                self.ranges.borrow_mut().insert(t.clone(), ix.clone());
                ix
            }
        };
        let v = self.sum_over(t, &ix, &mut env, &mut todo)?;
        Ok(scalar.mul(&v))
    }

    fn sum_over(
        &self,
        t: &Term,
        ix: &Indexed,
        env: &mut Assignment,
        todo: &mut Vec<Name>,
    ) -> Result<F, EvalError> {
        if todo.is_empty() {
            {
                let mut p = self.points.borrow_mut();
                *p += 1;
                if *p > MAX_POINTS {
                    return Err(EvalError::TooLarge);
                }
            }
            return self.product(t, env);
        }
        let (idx, range) = choose_next(ix, env, todo)?;
        let v = todo.remove(idx);
        let mut acc = F::zero();
        for val in range {
            env.insert(v.clone(), val);
            let r = self.sum_over(t, ix, env, todo);
            match r {
                Ok(x) => acc = acc.add(&x),
                Err(e) => {
                    env.remove(&v);
                    todo.insert(idx, v);
                    return Err(e);
                }
            }
        }
        env.remove(&v);
        todo.insert(idx, v);
        Ok(acc)
    }

    /// The product of the phase and the factors at a full assignment.
    fn product(&self, t: &Term, env: &Assignment) -> Result<F, EvalError> {
        let get = |n: &Name| env.get(n).copied();
        let val = |l: &Lin| -> Result<Q, EvalError> {
            l.eval(&get).ok_or_else(|| {
                let missing = l.vars().find(|v| !env.contains_key(*v)).unwrap();
                EvalError::Unassigned(missing.clone())
            })
        };
        let mut acc = F::one();
        // cheap factors first, so a zero skips the symbols
        for f in &t.factors {
            match f {
                Factor::Delta(a, b) if val(a)? != val(b)? => return Ok(F::zero()),
                Factor::Tri([a, b, c]) => {
                    let d: Vec<Option<i64>> = [val(a)?, val(b)?, val(c)?]
                        .iter()
                        .map(|q| doubled(*q))
                        .collect();
                    match (d[0], d[1], d[2]) {
                        (Some(x), Some(y), Some(z)) if triangle2(x, y, z) => {}
                        _ => return Ok(F::zero()),
                    }
                }
                _ => {}
            }
        }
        for f in &t.factors {
            let (kind, lins): (SymbolKind, Vec<&Lin>) = match f {
                Factor::ThreeJ(_) => (SymbolKind::ThreeJ, f.lins()),
                Factor::Cg(_) => (SymbolKind::Cg, f.lins()),
                Factor::SixJ(_) => (SymbolKind::SixJ, f.lins()),
                Factor::NineJ(_) => (SymbolKind::NineJ, f.lins()),
                Factor::Power(base, e) => {
                    let b = val(base)?;
                    if b.is_zero() {
                        if e.is_negative() {
                            return Err(EvalError::Arithmetic(format!(
                                "division by zero: {base} is 0 here"
                            )));
                        }
                        return Ok(F::zero());
                    }
                    if b.is_negative() && !e.is_integer() {
                        return Err(EvalError::Arithmetic(format!(
                            "square root of a negative number: {base} = {} here",
                            qstr(&b)
                        )));
                    }
                    let p = if b.is_negative() {
                        // integer power of a negative base
                        let m = power_of_rational(-b, *e).unwrap();
                        if e.to_integer() % 2 != 0 {
                            -m
                        } else {
                            m
                        }
                    } else {
                        power_of_rational(b, *e).ok_or_else(|| {
                            EvalError::Arithmetic(format!("cannot raise {base} to {}", qstr(e)))
                        })?
                    };
                    acc = acc.mul(&F::from_surd(&p));
                    continue;
                }
                _ => continue,
            };
            let mut args = [0i64; 9];
            for (i, l) in lins.iter().enumerate() {
                match doubled(val(l)?) {
                    Some(d) => args[i] = d,
                    None => return Ok(F::zero()),
                }
            }
            let key = (kind, args);
            let cached = self.cache.borrow().get(&key).cloned();
            let v = match cached {
                Some(v) => v,
                None => {
                    let v = F::symbol(kind, &args[..lins.len()]);
                    let mut c = self.cache.borrow_mut();
                    if c.len() > 1_000_000 {
                        c.clear();
                    }
                    c.insert(key, v.clone());
                    v
                }
            };
            if v.is_zero() {
                return Ok(F::zero());
            }
            acc = acc.mul(&v);
        }
        if !t.phase.is_zero() {
            let p = val(&t.phase)?;
            if !p.is_integer() {
                return Err(EvalError::PhaseNotInteger {
                    exponent: t.phase.to_string(),
                    value: qstr(&p),
                });
            }
            if p.to_integer().rem_euclid(2) == 1 {
                acc = acc.neg();
            }
        }
        Ok(acc)
    }
}

/// Picks the next summed variable to enumerate (a fixed one first, else
/// the one with the fewest values) and its values.
fn choose_next(
    ix: &Indexed,
    env: &Assignment,
    todo: &[Name],
) -> Result<(usize, Vec<Q>), EvalError> {
    let mut best: Option<(usize, u64, Range)> = None;
    for (i, v) in todo.iter().enumerate() {
        let r = range_indexed(v, ix, env, None, None);
        let Some(n) = r.count() else {
            continue;
        };
        if n > 10_000_000 {
            return Err(EvalError::TooLarge);
        }
        if best.as_ref().is_none_or(|b| n < b.1) {
            let done = n <= 1;
            best = Some((i, n, r));
            if done {
                break;
            }
        }
    }
    match best {
        Some((i, _, r)) => Ok((i, r.values().unwrap())),
        None => Err(EvalError::Unbounded(todo[0].clone())),
    }
}

/// Exact value of an expression at a user assignment (checked).
pub fn eval_exact(e: &Expr, at: &Assignment) -> Result<Surd, EvalError> {
    Evaluator::<Surd>::new().eval_checked(e, at)
}

/// f64 value of an expression at a user assignment (checked), using the
/// floating-point symbols (fast at large j).
pub fn eval_f64(e: &Expr, at: &Assignment) -> Result<f64, EvalError> {
    Evaluator::<f64>::new().eval_checked(e, at)
}

/// Converts a small rational to `BigRational` (re-exported for callers).
pub fn q_to_big(q: Q) -> num_rational::BigRational {
    big_q(q)
}
