//! Evaluation of whole expressions at an assignment of their free
//! variables, exactly (`Surd`) or in f64: phases, powers and hats, deltas,
//! triangle factors, symbols, and sums over projections and angular
//! momenta with ranges inferred from the term (triangle rules, projection
//! ranges, conservation and deltas). Checks user-given values for
//! admissibility first. Terms are compiled once (variables by index,
//! constraints by variable) and symbol values cached; exact products are
//! kept in factored form so a sum of many products costs vector additions.

use super::exact::{projection_ok2, triangle2};
use super::factored::{Factored, FactoredSum};
use super::{exact, float, Surd};
use crate::algebra::selection::Range;
use crate::expr::term::{big_q, doubled, power_of_rational};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use num_traits::{One, Signed, Zero};
use std::cell::RefCell;
use std::collections::{BTreeMap, HashMap};
use std::rc::Rc;

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
    #[error("the sums visit more points than the evaluation budget allows; refusing to go on")]
    TooLarge,
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

/// Which numbers an evaluation produces, with a product type that is cheap
/// to multiply and an accumulator that is cheap to add to.
pub trait Field: Clone {
    /// a product of factors
    type Prod: Clone;
    /// a running sum of products
    type Acc;
    /// 0
    fn zero() -> Self;
    /// true for 0
    fn is_zero(&self) -> bool;
    /// sum
    fn add(&self, o: &Self) -> Self;
    /// product
    fn mul(&self, o: &Self) -> Self;
    /// an exact monomial value
    fn from_surd(s: &Surd) -> Self;
    /// a symbol value (doubled arguments)
    fn symbol(kind: SymbolKind, args: &[i64]) -> Self;
    /// the empty product
    fn prod_one() -> Self::Prod;
    /// a nonzero value as a product factor
    fn prod_of(v: &Self) -> Self::Prod;
    /// multiply in place
    fn prod_mul(p: &mut Self::Prod, o: &Self::Prod);
    /// negate in place
    fn prod_neg(p: &mut Self::Prod);
    /// the empty sum
    fn acc_new() -> Self::Acc;
    /// add a product
    fn acc_add(a: &mut Self::Acc, p: &Self::Prod);
    /// the value of the sum
    fn acc_finish(a: Self::Acc) -> Self;
}

/// An exact product: factored when every factor could be factored.
#[derive(Clone, Debug)]
pub enum SurdProd {
    /// `±sqrt(Π p^e)`
    Fast(Factored),
    /// a general value
    Slow(Surd),
}

/// An exact running sum.
#[derive(Clone, Debug, Default)]
pub struct SurdAcc {
    fast: FactoredSum,
    slow: Surd,
}

impl Field for Surd {
    type Prod = SurdProd;
    type Acc = SurdAcc;
    fn zero() -> Self {
        Surd::zero()
    }
    fn is_zero(&self) -> bool {
        Surd::is_zero(self)
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
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
    fn prod_one() -> SurdProd {
        SurdProd::Fast(Factored::one())
    }
    fn prod_of(v: &Self) -> SurdProd {
        match Factored::of(v) {
            Some(f) => SurdProd::Fast(f),
            None => SurdProd::Slow(v.clone()),
        }
    }
    fn prod_mul(p: &mut SurdProd, o: &SurdProd) {
        match (&mut *p, o) {
            (SurdProd::Fast(a), SurdProd::Fast(b)) => a.mul_assign(b),
            _ => {
                let x = to_surd(p) * to_surd(o);
                *p = SurdProd::Slow(x);
            }
        }
    }
    fn prod_neg(p: &mut SurdProd) {
        match p {
            SurdProd::Fast(a) => a.neg = !a.neg,
            SurdProd::Slow(s) => *s = -&*s,
        }
    }
    fn acc_new() -> SurdAcc {
        SurdAcc::default()
    }
    fn acc_add(a: &mut SurdAcc, p: &SurdProd) {
        match p {
            SurdProd::Fast(f) => a.fast.add(f),
            SurdProd::Slow(s) => a.slow = &a.slow + s,
        }
    }
    fn acc_finish(a: SurdAcc) -> Surd {
        &a.fast.finish() + &a.slow
    }
}

fn to_surd(p: &SurdProd) -> Surd {
    match p {
        SurdProd::Slow(s) => s.clone(),
        SurdProd::Fast(f) => {
            let mut acc = FactoredSum::new();
            acc.add(f);
            acc.finish()
        }
    }
}

impl Field for f64 {
    type Prod = f64;
    type Acc = (f64, f64);
    fn zero() -> Self {
        0.0
    }
    fn is_zero(&self) -> bool {
        *self == 0.0
    }
    fn add(&self, o: &Self) -> Self {
        self + o
    }
    fn mul(&self, o: &Self) -> Self {
        self * o
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
    fn prod_one() -> f64 {
        1.0
    }
    fn prod_of(v: &f64) -> f64 {
        *v
    }
    fn prod_mul(p: &mut f64, o: &f64) {
        *p *= o;
    }
    fn prod_neg(p: &mut f64) {
        *p = -*p;
    }
    fn acc_new() -> (f64, f64) {
        (0.0, 0.0)
    }
    fn acc_add(a: &mut (f64, f64), p: &f64) {
        // compensated (Kahan-Babuska) summation
        let t = a.0 + p;
        if a.0.abs() >= p.abs() {
            a.1 += (a.0 - t) + p;
        } else {
            a.1 += (p - t) + a.0;
        }
        a.0 = t;
    }
    fn acc_finish(a: (f64, f64)) -> f64 {
        a.0 + a.1
    }
}

/// A linear form over variable indices.
#[derive(Clone, Debug)]
struct CLin {
    c0: Q,
    t: Vec<(usize, Q)>,
}

impl CLin {
    fn new(l: &Lin, index: &BTreeMap<Name, usize>) -> CLin {
        CLin {
            c0: l.constant_part(),
            t: l.terms().map(|(n, c)| (index[n], *c)).collect(),
        }
    }
    #[inline]
    fn eval(&self, env: &[Q]) -> Q {
        let mut s = self.c0;
        for (i, c) in &self.t {
            s += *c * env[*i];
        }
        s
    }
    /// `a·v + b` when every other variable is assigned.
    #[inline]
    fn split(&self, v: usize, env: &[Q], assigned: &[bool]) -> Option<(Q, Q)> {
        let mut a = Q::zero();
        let mut b = self.c0;
        for (i, c) in &self.t {
            if *i == v {
                a = *c;
            } else if assigned[*i] {
                b += *c * env[*i];
            } else {
                return None;
            }
        }
        if a.is_zero() {
            None
        } else {
            Some((a, b))
        }
    }
}

#[derive(Clone, Debug)]
enum CFactor {
    Delta(CLin, CLin),
    Tri([CLin; 3]),
    Power(CLin, Q, String),
    Symbol(SymbolKind, Vec<CLin>),
}

/// A term compiled for repeated evaluation.
#[derive(Clone, Debug)]
struct CTerm {
    names: Vec<Name>,
    free: Vec<usize>,
    bound: Vec<usize>,
    factors: Vec<CFactor>,
    phase: Option<(CLin, String)>,
    scalar: Surd,
    ge: Vec<Vec<CLin>>,
    eq: Vec<Vec<CLin>>,
    integral: Vec<Vec<CLin>>,
}

impl CTerm {
    fn new(t: &Term) -> CTerm {
        let names: Vec<Name> = t.all_vars().into_iter().collect();
        let index: BTreeMap<Name, usize> = names.iter().cloned().enumerate().map(|(i, n)| (n, i)).collect();
        let cl = |l: &Lin| CLin::new(l, &index);
        let mut cheap = Vec::new();
        let mut powers = Vec::new();
        let mut symbols = Vec::new();
        for f in &t.factors {
            match f {
                Factor::Delta(a, b) => cheap.push(CFactor::Delta(cl(a), cl(b))),
                Factor::Tri([a, b, c]) => cheap.push(CFactor::Tri([cl(a), cl(b), cl(c)])),
                Factor::Power(b, e) => powers.push(CFactor::Power(cl(b), *e, b.to_string())),
                Factor::ThreeJ(_) => symbols.push(CFactor::Symbol(SymbolKind::ThreeJ, f.lins().iter().map(|l| cl(l)).collect())),
                Factor::Cg(_) => symbols.push(CFactor::Symbol(SymbolKind::Cg, f.lins().iter().map(|l| cl(l)).collect())),
                Factor::SixJ(_) => symbols.push(CFactor::Symbol(SymbolKind::SixJ, f.lins().iter().map(|l| cl(l)).collect())),
                Factor::NineJ(_) => symbols.push(CFactor::Symbol(SymbolKind::NineJ, f.lins().iter().map(|l| cl(l)).collect())),
            }
        }
        let mut factors = cheap;
        factors.extend(powers);
        factors.extend(symbols);
        let n = names.len();
        let mut ge = vec![Vec::new(); n];
        let mut eq = vec![Vec::new(); n];
        let mut integral = vec![Vec::new(); n];
        if !t.bound.is_empty() {
            let c = crate::algebra::selection::Constraints::of(&t.factors);
            for (src, dst) in [(&c.ge, &mut ge), (&c.eq, &mut eq), (&c.integral, &mut integral)] {
                for l in src {
                    let x = cl(l);
                    for (i, _) in &x.t {
                        dst[*i].push(x.clone());
                    }
                }
            }
        }
        let bound: Vec<usize> = t.bound.iter().map(|b| index[b]).collect();
        let free: Vec<usize> = (0..n).filter(|i| !bound.contains(i)).collect();
        CTerm {
            free,
            bound,
            factors,
            phase: (!t.phase.is_zero()).then(|| (cl(&t.phase), t.phase.to_string())),
            scalar: t.scalar(),
            ge,
            eq,
            integral,
            names,
        }
    }

    /// The values of a summed variable given the assigned ones.
    fn range(&self, v: usize, env: &[Q], assigned: &[bool]) -> Range {
        let mut fixed: Option<Q> = None;
        for l in &self.eq[v] {
            if let Some((a, b)) = l.split(v, env, assigned) {
                let x = -b / a;
                match fixed {
                    None => fixed = Some(x),
                    Some(y) if y != x => return Range::Empty,
                    _ => {}
                }
            }
        }
        let mut lo: Option<Q> = None;
        let mut hi: Option<Q> = None;
        for l in &self.ge[v] {
            if let Some((a, b)) = l.split(v, env, assigned) {
                let bound = -b / a;
                if a.is_positive() {
                    lo = Some(lo.map_or(bound, |x: Q| x.max(bound)));
                } else {
                    hi = Some(hi.map_or(bound, |x: Q| x.min(bound)));
                }
            }
        }
        let mut parity: Option<Q> = None;
        for l in &self.integral[v] {
            if let Some((a, b)) = l.split(v, env, assigned) {
                if a.abs() == Q::one() {
                    let target = -b / a;
                    parity = Some(target - target.floor());
                    break;
                }
            }
        }
        let half = Q::new(1, 2);
        let two = Q::from_integer(2);
        if let Some(x) = fixed {
            let ok = lo.is_none_or(|l| x >= l)
                && hi.is_none_or(|h| x <= h)
                && (x * two).is_integer()
                && parity.is_none_or(|p| x - x.floor() == p);
            return if ok { Range::Fixed(x) } else { Range::Empty };
        }
        match (lo, hi) {
            (Some(l), Some(h)) => {
                let mut start = Q::new((l * two).ceil().to_integer(), 2);
                let step = match parity {
                    Some(p) => {
                        if start - start.floor() != p {
                            start += half;
                        }
                        Q::one()
                    }
                    None => half,
                };
                let hi = Q::new((h * two).floor().to_integer(), 2);
                if start > hi {
                    Range::Empty
                } else {
                    Range::Steps { start, step, hi }
                }
            }
            (lo, hi) => Range::Unbounded { lo, hi },
        }
    }
}

/// Evaluates expressions, caching symbol values and compiled terms.
pub struct Evaluator<F: Field> {
    cache: RefCell<HashMap<(SymbolKind, [i64; 9]), Option<F::Prod>>>,
    powers: RefCell<HashMap<(Q, Q), F::Prod>>,
    compiled: RefCell<HashMap<Term, Rc<CTerm>>>,
    points: RefCell<u64>,
    /// most summation points one `eval` may visit
    pub budget: u64,
}

impl<F: Field> Default for Evaluator<F> {
    fn default() -> Self {
        Evaluator {
            cache: RefCell::new(HashMap::new()),
            powers: RefCell::new(HashMap::new()),
            compiled: RefCell::new(HashMap::new()),
            points: RefCell::new(0),
            budget: MAX_POINTS,
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

    fn compiled(&self, t: &Term) -> Rc<CTerm> {
        if let Some(c) = self.compiled.borrow().get(t) {
            return c.clone();
        }
        let c = Rc::new(CTerm::new(t));
        let mut m = self.compiled.borrow_mut();
        if m.len() > 10_000 {
            m.clear();
        }
        m.insert(t.clone(), c.clone());
        c
    }

    /// Evaluates one term.
    pub fn eval_term(&self, t: &Term, at: &Assignment) -> Result<F, EvalError> {
        let c = self.compiled(t);
        let n = c.names.len();
        let mut env = vec![Q::zero(); n];
        let mut assigned = vec![false; n];
        for &i in &c.free {
            match at.get(&c.names[i]) {
                Some(v) => {
                    env[i] = *v;
                    assigned[i] = true;
                }
                None => return Err(EvalError::Unassigned(c.names[i].clone())),
            }
        }
        let mut acc = F::acc_new();
        let mut todo = c.bound.clone();
        self.sum_over(&c, &mut env, &mut assigned, &mut todo, &mut acc)?;
        let v = F::acc_finish(acc);
        if v.is_zero() {
            return Ok(v);
        }
        Ok(v.mul(&F::from_surd(&c.scalar)))
    }

    fn sum_over(
        &self,
        c: &CTerm,
        env: &mut Vec<Q>,
        assigned: &mut Vec<bool>,
        todo: &mut Vec<usize>,
        acc: &mut F::Acc,
    ) -> Result<(), EvalError> {
        if todo.is_empty() {
            {
                let mut p = self.points.borrow_mut();
                *p += 1;
                if *p > self.budget {
                    return Err(EvalError::TooLarge);
                }
            }
            if let Some(p) = self.product(c, env)? {
                F::acc_add(acc, &p);
            }
            return Ok(());
        }
        // the summed variable with the fewest values next
        let mut best: Option<(usize, u64, Range)> = None;
        for (k, &v) in todo.iter().enumerate() {
            let r = c.range(v, env, assigned);
            let Some(n) = r.count() else { continue };
            if n > 10_000_000 {
                return Err(EvalError::TooLarge);
            }
            if best.as_ref().is_none_or(|b| n < b.1) {
                let stop = n <= 1;
                best = Some((k, n, r));
                if stop {
                    break;
                }
            }
        }
        let Some((k, _, r)) = best else {
            return Err(EvalError::Unbounded(c.names[todo[0]].clone()));
        };
        let v = todo.remove(k);
        assigned[v] = true;
        let mut result = Ok(());
        for x in r.values().unwrap() {
            env[v] = x;
            if let Err(e) = self.sum_over(c, env, assigned, todo, acc) {
                result = Err(e);
                break;
            }
        }
        assigned[v] = false;
        todo.insert(k, v);
        result
    }

    /// The product at a full assignment (`None` for zero).
    fn product(&self, c: &CTerm, env: &[Q]) -> Result<Option<F::Prod>, EvalError> {
        let mut acc = F::prod_one();
        for f in &c.factors {
            match f {
                CFactor::Delta(a, b) => {
                    if a.eval(env) != b.eval(env) {
                        return Ok(None);
                    }
                }
                CFactor::Tri([a, b, cc]) => {
                    match (doubled(a.eval(env)), doubled(b.eval(env)), doubled(cc.eval(env))) {
                        (Some(x), Some(y), Some(z)) if triangle2(x, y, z) => {}
                        _ => return Ok(None),
                    }
                }
                CFactor::Power(base, e, text) => {
                    let b = base.eval(env);
                    if b.is_zero() {
                        if e.is_negative() {
                            return Err(EvalError::Arithmetic(format!("division by zero: {text} is 0 here")));
                        }
                        return Ok(None);
                    }
                    if b.is_negative() && !e.is_integer() {
                        return Err(EvalError::Arithmetic(format!(
                            "square root of a negative number: {text} = {} here",
                            qstr(&b)
                        )));
                    }
                    let key = (b, *e);
                    let cached = self.powers.borrow().get(&key).cloned();
                    let p = match cached {
                        Some(p) => p,
                        None => {
                            let v = if b.is_negative() {
                                let m = power_of_rational(-b, *e).unwrap();
                                if e.to_integer() % 2 != 0 {
                                    -m
                                } else {
                                    m
                                }
                            } else {
                                power_of_rational(b, *e).ok_or_else(|| {
                                    EvalError::Arithmetic(format!("cannot raise {text} to {}", qstr(e)))
                                })?
                            };
                            let p = F::prod_of(&F::from_surd(&v));
                            self.powers.borrow_mut().insert(key, p.clone());
                            p
                        }
                    };
                    F::prod_mul(&mut acc, &p);
                }
                CFactor::Symbol(kind, args) => {
                    let mut a = [0i64; 9];
                    for (i, l) in args.iter().enumerate() {
                        match doubled(l.eval(env)) {
                            Some(d) => a[i] = d,
                            None => return Ok(None),
                        }
                    }
                    let key = (*kind, a);
                    let cached = self.cache.borrow().get(&key).cloned();
                    let p = match cached {
                        Some(p) => p,
                        None => {
                            let v = F::symbol(*kind, &a[..args.len()]);
                            let p = (!v.is_zero()).then(|| F::prod_of(&v));
                            let mut m = self.cache.borrow_mut();
                            if m.len() > 1_000_000 {
                                m.clear();
                            }
                            m.insert(key, p.clone());
                            p
                        }
                    };
                    match p {
                        Some(p) => F::prod_mul(&mut acc, &p),
                        None => return Ok(None),
                    }
                }
            }
        }
        if let Some((ph, text)) = &c.phase {
            let p = ph.eval(env);
            if !p.is_integer() {
                return Err(EvalError::PhaseNotInteger {
                    exponent: text.clone(),
                    value: qstr(&p),
                });
            }
            if p.to_integer().rem_euclid(2) == 1 {
                F::prod_neg(&mut acc);
            }
        }
        Ok(Some(acc))
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
