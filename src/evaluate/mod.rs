//! Evaluation of whole expressions at an assignment of their free
//! variables, exactly (`Surd`) or in f64: phases, powers and hats, deltas,
//! triangle factors, symbols, and sums over projections and angular
//! momenta with ranges inferred from the term (triangle rules, projection
//! ranges, conservation and deltas). Checks user-given values for
//! admissibility first. Terms are compiled once (variables by index,
//! constraints by variable) and symbol values cached; exact products are
//! kept in factored form so a sum of many products costs vector additions.

use crate::expr::term::{big_q, doubled, power_of_rational};
use crate::expr::{Expr, Factor, Kind, Lin, Name, Term, Q};
use crate::numeric::factored::{Factored, FactoredSum};
use crate::numeric::selection::{projection_ok2, triangle2};
use crate::numeric::{exact, float, Surd};
use num_traits::{Signed, Zero};
use std::cell::RefCell;
use std::collections::{BTreeMap, HashMap};
use std::rc::Rc;

/// Values of variables.
pub type Assignment = BTreeMap<Name, Q>;

/// Symbol values an evaluator keeps before it forgets them all (a bound
/// on memory: about 60 MB of exact values).
pub const MAX_CACHED_SYMBOLS: usize = 200_000;

/// Bytes of symbol values an evaluator keeps (roughly) before it forgets
/// them all.
pub const MAX_CACHE_BYTES: usize = 24 << 20;

/// Largest |value| of a variable given by the user (2^20).
pub const MAX_VALUE: i64 = 1 << 20;

/// Most summation points one evaluation may visit.
pub const MAX_POINTS: u64 = 50_000_000;

/// Largest j (or |m|) of a symbol evaluated exactly (an exact 3j at
/// j = 10^4 takes about 0.4 s; beyond 2·10^4 the exact path is refused).
pub const MAX_EXACT_J: i64 = 20_000;

/// Largest j of a symbol evaluated in floating point (a 6j at j = 10^5 with
/// heavy cancellation needs about 25 s of big-integer fixed point).
pub const MAX_FLOAT_J: i64 = 50_000;

/// Why an expression could not be evaluated.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum EvalError {
    /// A free variable without a value.
    #[error("{0} has no value")]
    Unassigned(Name),
    /// A value that is not a multiple of 1/2.
    #[error("{name} = {value} is not a multiple of 1/2")]
    NotHalfInteger {
        /// the variable
        name: Name,
        /// its value
        value: String,
    },
    /// A value beyond what is evaluated.
    #[error("{name} = {value} is larger than any value recoup evaluates (|value| <= 2^20)")]
    ValueTooLarge {
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
    #[error(
        "the phase (-1)^({exponent}) has the non-integer exponent {value} at {}",
        point_text(at)
    )]
    PhaseNotInteger {
        /// the exponent (as in the normal form)
        exponent: String,
        /// its value
        value: String,
        /// every variable's value at that point (summed ones included)
        at: Vec<(Name, Q)>,
    },
    /// A value against the variable's declared parity.
    #[error("{name} = {value} is not {parity}, and {name} is declared {parity}")]
    AgainstDeclaration {
        /// the variable
        name: Name,
        /// its value
        value: String,
        /// the declared parity in words
        parity: &'static str,
    },
    /// A summed variable with no finite range.
    #[error("the summed variable {0} is not bounded by any triangle rule or projection range in its term")]
    Unbounded(Name),
    /// A square root of a negative number or a division by zero.
    #[error("{0}")]
    Arithmetic(String),
    /// A matrix element the direct evaluation does not cover.
    #[error("{0}")]
    Element(String),
    /// A matrix element too large for the direct evaluation.
    #[error("{0}")]
    ElementTooLarge(String),
    /// A symbol too large to evaluate this way.
    #[error("a symbol with j or m up to {0} is too large to evaluate here (the limit is j = {1}: 20000 exact, 50000 in floating point)")]
    SymbolTooLarge(String, i64),
    /// A symbol that would take longer than the time left.
    #[error(
        "{what} takes about {estimate:.0} s here, more than the {left:.1} s left of the time limit"
    )]
    TooSlow {
        /// the symbol, in words
        what: String,
        /// the estimated time, seconds
        estimate: f64,
        /// the time left, seconds
        left: f64,
    },
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

impl SymbolKind {
    /// The kind in words.
    pub fn words(&self) -> &'static str {
        match self {
            SymbolKind::ThreeJ => "3j symbol",
            SymbolKind::Cg => "Clebsch-Gordan coefficient",
            SymbolKind::SixJ => "6j symbol",
            SymbolKind::NineJ => "9j symbol",
        }
    }
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
    /// the largest doubled argument a symbol is evaluated for (beyond it
    /// the evaluation is refused rather than left to run for minutes)
    fn max_doubled_arg() -> i64;
    /// a rough cost in seconds of one symbol with this largest doubled
    /// argument, for symbols slow enough to be refused up front when the
    /// time left is shorter (measured on the project's machines)
    fn estimated_seconds(kind: SymbolKind, largest_doubled: i64) -> f64;
    /// `exact` or `floating-point`, for messages
    fn arithmetic() -> &'static str;
    /// the empty product
    fn prod_one() -> Self::Prod;
    /// a nonzero value as a product factor
    fn prod_of(v: &Self) -> Self::Prod;
    /// multiply in place
    fn prod_mul(p: &mut Self::Prod, o: &Self::Prod);
    /// negate in place
    fn prod_neg(p: &mut Self::Prod);
    /// roughly how many bytes a product occupies (for cache budgets)
    fn prod_bytes(p: &Self::Prod) -> usize;
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
    fn max_doubled_arg() -> i64 {
        2 * MAX_EXACT_J
    }
    fn arithmetic() -> &'static str {
        "exact"
    }
    fn estimated_seconds(kind: SymbolKind, largest_doubled: i64) -> f64 {
        // exact 9j: 0.5 s at j = 500, 3.6 s at j = 1000, about j^2.9
        let j = largest_doubled as f64 / 2.0;
        match kind {
            SymbolKind::NineJ => 7.2e-9 * j.powf(2.9),
            _ => 0.0,
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
    fn prod_bytes(p: &SurdProd) -> usize {
        match p {
            SurdProd::Fast(f) => 56 + 4 * f.exps.len() + 16 * f.large.len(),
            SurdProd::Slow(s) => 64 + s.to_string().len(),
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
    fn max_doubled_arg() -> i64 {
        2 * MAX_FLOAT_J
    }
    fn arithmetic() -> &'static str {
        "floating-point"
    }
    fn estimated_seconds(kind: SymbolKind, largest_doubled: i64) -> f64 {
        // float 9j: about 9 s at j = 1000, growing as j^2
        let j = largest_doubled as f64 / 2.0;
        match kind {
            SymbolKind::NineJ => 9e-6 * j * j,
            _ => 0.0,
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
    fn prod_bytes(_: &f64) -> usize {
        8
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

/// A linear form over variable indices in doubled integer units: with
/// `t_i = 2 v_i`, the value of `2 L` is `(a0 + Σ a_i t_i) / den`.
#[derive(Clone, Debug)]
struct CLin {
    a0: i64,
    t: Vec<(usize, i64)>,
    den: i64,
}

/// Largest common denominator and scaled coefficient of a compiled linear
/// form: with values below `MAX_VALUE` (doubled below 2^22) every sum of
/// a few dozen products stays far inside `i64`.
const CLIN_LIMIT: i128 = 1 << 30;

impl CLin {
    /// The compiled form, or `None` when its numbers are too large to
    /// evaluate in 64-bit arithmetic.
    fn new(l: &Lin, index: &BTreeMap<Name, usize>) -> Option<CLin> {
        let gcd = |a: i128, b: i128| -> i128 {
            let (mut a, mut b) = (a.abs(), b.abs());
            while b != 0 {
                (a, b) = (b, a % b);
            }
            a
        };
        let lcm = |a: i128, b: i128| a / gcd(a, b) * b;
        let mut den: i128 = 1;
        for (_, c) in l.terms() {
            den = lcm(den, *c.denom() as i128);
            if den > CLIN_LIMIT {
                return None;
            }
        }
        let two_c0 = l.constant_part() * Q::from_integer(2);
        den = lcm(den, *two_c0.denom() as i128);
        if den > CLIN_LIMIT {
            return None;
        }
        let scaled = |q: Q| -> Option<i64> {
            let v = *q.numer() as i128 * (den / *q.denom() as i128);
            (v.abs() <= CLIN_LIMIT).then_some(v as i64)
        };
        let mut t = Vec::new();
        for (n, c) in l.terms() {
            t.push((index[n], scaled(*c)?));
        }
        Some(CLin {
            a0: scaled(two_c0)?,
            t,
            den: den as i64,
        })
    }
    /// `den · 2L` at the doubled assignment.
    #[inline]
    fn num(&self, env: &[i64]) -> i64 {
        let mut s = self.a0;
        for (i, c) in &self.t {
            s += c * env[*i];
        }
        s
    }
    /// `2L` when it is an integer.
    #[inline]
    fn doubled(&self, env: &[i64]) -> Option<i64> {
        let n = self.num(env);
        if self.den == 1 {
            Some(n)
        } else if n % self.den == 0 {
            Some(n / self.den)
        } else {
            None
        }
    }
    /// `L` as a rational.
    fn value(&self, env: &[i64]) -> Q {
        Q::new(self.num(env), 2 * self.den)
    }
    /// `L >= 0`.
    #[inline]
    fn nonneg(&self, env: &[i64]) -> bool {
        self.num(env) >= 0
    }
    /// `L = 0`.
    #[inline]
    fn zero(&self, env: &[i64]) -> bool {
        self.num(env) == 0
    }
    /// `L` is an integer.
    #[inline]
    fn integral(&self, env: &[i64]) -> bool {
        self.num(env) % (2 * self.den) == 0
    }
    fn coeff(&self, v: usize) -> i64 {
        self.t.iter().find(|(i, _)| *i == v).map_or(0, |(_, c)| *c)
    }
}

#[derive(Clone, Debug)]
enum CFactor {
    Delta(CLin, CLin),
    Tri([CLin; 3]),
    Power(CLin, Q, String),
    Symbol(SymbolKind, Vec<CLin>),
    /// a matrix element: evaluated directly from its definition
    Element(Box<crate::expr::MatrixElement>, Vec<CLin>),
}

/// One level of the nested summation: the variable, how it is found, and
/// the constraints whose last variable it is (checked right there).
#[derive(Clone, Debug)]
struct Level {
    var: usize,
    /// an equality that fixes it (conservation, delta), if any
    pin: Option<CLin>,
    eq: Vec<CLin>,
    ge: Vec<CLin>,
    integral: Vec<CLin>,
}

/// A term compiled for repeated evaluation.
#[derive(Clone, Debug)]
struct CTerm {
    /// the summation order (`Err(var)` when a summed variable is unbounded)
    order: Result<Vec<Level>, usize>,
    names: Vec<Name>,
    free: Vec<usize>,
    factors: Vec<CFactor>,
    phase: Option<(CLin, String)>,
    scalar: Surd,
    /// some linear form has numbers too large for 64-bit evaluation
    too_wide: bool,
}

impl CTerm {
    fn new(t: &Term) -> CTerm {
        let names: Vec<Name> = t.all_vars().into_iter().collect();
        let index: BTreeMap<Name, usize> = names
            .iter()
            .cloned()
            .enumerate()
            .map(|(i, n)| (n, i))
            .collect();
        let too_wide = std::cell::Cell::new(false);
        let cl = |l: &Lin| {
            CLin::new(l, &index).unwrap_or_else(|| {
                too_wide.set(true);
                CLin {
                    a0: 0,
                    t: Vec::new(),
                    den: 1,
                }
            })
        };
        let mut cheap = Vec::new();
        let mut powers = Vec::new();
        let mut symbols = Vec::new();
        for f in t.factors() {
            let args = || f.lins().iter().map(|l| cl(l)).collect::<Vec<_>>();
            match f {
                Factor::Delta(a, b) => cheap.push(CFactor::Delta(cl(a), cl(b))),
                Factor::Tri([a, b, c]) => cheap.push(CFactor::Tri([cl(a), cl(b), cl(c)])),
                Factor::Power(b, e) => powers.push(CFactor::Power(cl(b), *e, b.to_string())),
                Factor::ThreeJ(_) => symbols.push(CFactor::Symbol(SymbolKind::ThreeJ, args())),
                Factor::Cg(_) => symbols.push(CFactor::Symbol(SymbolKind::Cg, args())),
                Factor::SixJ(_) => symbols.push(CFactor::Symbol(SymbolKind::SixJ, args())),
                Factor::NineJ(_) => symbols.push(CFactor::Symbol(SymbolKind::NineJ, args())),
                Factor::Element(e) => symbols.push(CFactor::Element(e.clone(), args())),
            }
        }
        let mut factors = cheap;
        factors.extend(powers);
        factors.extend(symbols);
        let n = names.len();
        let bound: Vec<usize> = t.bound().iter().map(|b| index[b]).collect();
        let free: Vec<usize> = (0..n).filter(|i| !bound.contains(i)).collect();
        let order = if bound.is_empty() {
            Ok(Vec::new())
        } else {
            let c = crate::algebra::selection::Constraints::of(t.factors());
            let all_eq: Vec<CLin> = c.eq.iter().map(&cl).collect();
            let all_ge: Vec<CLin> = c.ge.iter().map(&cl).collect();
            let all_int: Vec<CLin> = c.integral.iter().map(&cl).collect();
            static_order(n, &free, &bound, &all_eq, &all_ge, &all_int)
        };
        let phase = (!t.phase().is_zero()).then(|| (cl(t.phase()), t.phase().to_string()));
        CTerm {
            order,
            free,
            factors,
            phase,
            scalar: t.scalar(),
            names,
            too_wide: too_wide.get(),
        }
    }
}

/// The summation order of a term: a variable pinned by an equality whose
/// other variables are known first, else one bounded on both sides; every
/// constraint is attached to the level of its last variable.
fn static_order(
    n: usize,
    free: &[usize],
    bound: &[usize],
    eq: &[CLin],
    ge: &[CLin],
    integral: &[CLin],
) -> Result<Vec<Level>, usize> {
    let mut assigned = vec![false; n];
    for &f in free {
        assigned[f] = true;
    }
    let known_except = |l: &CLin, v: usize, a: &[bool]| {
        l.t.iter().all(|(i, _)| *i == v || a[*i]) && l.t.iter().any(|(i, _)| *i == v)
    };
    let mut todo: Vec<usize> = bound.to_vec();
    let mut out = Vec::new();
    while !todo.is_empty() {
        let mut pick: Option<(usize, Option<CLin>)> = None;
        'pin: for (k, &v) in todo.iter().enumerate() {
            for l in eq {
                if known_except(l, v, &assigned) {
                    pick = Some((k, Some(l.clone())));
                    break 'pin;
                }
            }
        }
        if pick.is_none() {
            for (k, &v) in todo.iter().enumerate() {
                let mut lo = false;
                let mut hi = false;
                for l in ge {
                    if known_except(l, v, &assigned) {
                        if l.coeff(v) > 0 {
                            lo = true;
                        } else {
                            hi = true;
                        }
                    }
                }
                if lo && hi {
                    pick = Some((k, None));
                    break;
                }
            }
        }
        let Some((k, pin)) = pick else {
            return Err(todo[0]);
        };
        let v = todo.remove(k);
        assigned[v] = true;
        let last =
            |l: &CLin| l.t.iter().any(|(i, _)| *i == v) && l.t.iter().all(|(i, _)| assigned[*i]);
        out.push(Level {
            var: v,
            pin,
            eq: eq.iter().filter(|l| last(l)).cloned().collect(),
            ge: ge.iter().filter(|l| last(l)).cloned().collect(),
            integral: integral.iter().filter(|l| last(l)).cloned().collect(),
        });
    }
    Ok(out)
}

/// A fast multiplicative hasher for small integer keys (the symbol cache
/// is hit once per factor per summation point).
#[derive(Default, Clone, Copy)]
pub struct FastHasher(u64);

impl std::hash::Hasher for FastHasher {
    #[inline]
    fn write(&mut self, bytes: &[u8]) {
        for chunk in bytes.chunks(8) {
            let mut b = [0u8; 8];
            b[..chunk.len()].copy_from_slice(chunk);
            self.write_u64(u64::from_le_bytes(b));
        }
    }
    #[inline]
    fn write_u64(&mut self, x: u64) {
        self.0 = (self.0.rotate_left(5) ^ x).wrapping_mul(0x51_7c_c1_b7_27_22_0a_95);
    }
    #[inline]
    fn write_i64(&mut self, x: i64) {
        self.write_u64(x as u64);
    }
    #[inline]
    fn write_usize(&mut self, x: usize) {
        self.write_u64(x as u64);
    }
    #[inline]
    fn finish(&self) -> u64 {
        self.0
    }
}

type FastMap<K, V> = HashMap<K, V, std::hash::BuildHasherDefault<FastHasher>>;

/// Cached symbol values: `None` for a symbol that is zero.
type SymbolCache<P> = FastMap<(SymbolKind, [i64; 9]), Option<P>>;

/// Evaluates expressions, caching symbol values and compiled terms.
pub struct Evaluator<F: Field> {
    cache: RefCell<SymbolCache<F::Prod>>,
    cache_bytes: std::cell::Cell<usize>,
    powers: RefCell<HashMap<(Q, Q), F::Prod>>,
    compiled: RefCell<HashMap<Term, Rc<CTerm>>>,
    points: RefCell<u64>,
    /// most summation points one `eval` may visit
    pub budget: u64,
}

impl<F: Field> Default for Evaluator<F> {
    fn default() -> Self {
        Evaluator {
            cache: RefCell::new(FastMap::default()),
            cache_bytes: std::cell::Cell::new(0),
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

/// `a = 1, m = -1/2` for a point.
pub fn point_text(at: &[(Name, Q)]) -> String {
    let parts: Vec<String> = at
        .iter()
        .map(|(n, q)| format!("{n} = {}", qstr(q)))
        .collect();
    parts.join(", ")
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
        if val.abs() > Q::from_integer(MAX_VALUE) {
            return Err(EvalError::ValueTooLarge {
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
        if let Some(p) = crate::algebra::declare::parity_of(v) {
            if !p.admits(*val) {
                return Err(EvalError::AgainstDeclaration {
                    name: v.clone(),
                    value: qstr(val),
                    parity: p.word(),
                });
            }
        }
    }
    let get = |n: &Name| at.get(n).copied();
    for t in e.terms() {
        for f in t.factors() {
            for (j, m) in f.columns() {
                let Some((mv, _)) = m.as_signed_var() else {
                    continue;
                };
                if t.bound().contains(mv) || j.vars().any(|x| t.bound().contains(x)) {
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

    /// Summation points visited by the last `eval`.
    pub fn points_visited(&self) -> u64 {
        *self.points.borrow()
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
        for t in e.terms() {
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
        if c.too_wide {
            return Err(EvalError::Arithmetic(
                "a linear form in this term has numbers too large to evaluate (coefficients and denominators up to 2^30)".into(),
            ));
        }
        let n = c.names.len();
        let mut env = vec![0i64; n];
        for &i in &c.free {
            let name = &c.names[i];
            let v = at
                .get(name)
                .ok_or_else(|| EvalError::Unassigned(name.clone()))?;
            env[i] = doubled(*v).ok_or_else(|| EvalError::NotHalfInteger {
                name: name.clone(),
                value: qstr(v),
            })?;
        }
        let order = match &c.order {
            Ok(o) => o,
            Err(v) => return Err(EvalError::Unbounded(c.names[*v].clone())),
        };
        let mut acc = F::acc_new();
        self.level(&c, order, 0, &mut env, &mut acc)?;
        let v = F::acc_finish(acc);
        if v.is_zero() {
            return Ok(v);
        }
        Ok(v.mul(&F::from_surd(&c.scalar)))
    }

    fn level(
        &self,
        c: &CTerm,
        order: &[Level],
        k: usize,
        env: &mut Vec<i64>,
        acc: &mut F::Acc,
    ) -> Result<(), EvalError> {
        crate::limits::tick();
        // every node of the summation tree counts against the budget
        {
            let mut p = self.points.borrow_mut();
            *p += 1;
            if *p > self.budget {
                return Err(EvalError::TooLarge);
            }
        }
        if k == order.len() {
            if let Some(p) = self.product(c, env)? {
                F::acc_add(acc, &p);
            }
            return Ok(());
        }
        let lv = &order[k];
        let v = lv.var;
        env[v] = 0;
        // the candidate doubled values t = start, start+step, ..., <= hi
        let (start, step, hi) = if let Some(pin) = &lv.pin {
            // a t + rest = 0
            let a = pin.coeff(v);
            let rest = pin.num(env);
            if rest % a != 0 {
                return Ok(());
            }
            let x = -rest / a;
            (x, 1, x)
        } else {
            let mut lo = i64::MIN;
            let mut hi = i64::MAX;
            for l in &lv.ge {
                // a t + rest >= 0
                let a = l.coeff(v);
                let rest = l.num(env);
                if a > 0 {
                    lo = lo.max(num_integer::Integer::div_ceil(&-rest, &a));
                } else {
                    hi = hi.min(num_integer::Integer::div_floor(&rest, &-a));
                }
            }
            if lo == i64::MIN || hi == i64::MAX {
                return Err(EvalError::Unbounded(c.names[v].clone()));
            }
            let mut start = lo;
            let mut step = 1;
            for l in &lv.integral {
                // L integer: num ≡ 0 (mod 2 den); with a unit coefficient
                // (a = ±den) it fixes the parity of t
                let a = l.coeff(v);
                if a.abs() == l.den {
                    let rest = l.num(env);
                    // a t + rest ≡ 0 (mod 2 den)  ⇒  t ≡ -rest/a (mod 2)
                    if rest % l.den != 0 {
                        return Ok(());
                    }
                    let target = (-rest / a).rem_euclid(2);
                    if start.rem_euclid(2) != target {
                        start += 1;
                    }
                    step = 2;
                    break;
                }
            }
            if hi >= start && (hi - start) / step > 20_000_000 {
                return Err(EvalError::TooLarge);
            }
            (start, step, hi)
        };
        let mut x = start;
        while x <= hi {
            env[v] = x;
            let ok = lv.eq.iter().all(|l| l.zero(env))
                && lv.ge.iter().all(|l| l.nonneg(env))
                && lv.integral.iter().all(|l| l.integral(env));
            if ok {
                self.level(c, order, k + 1, env, acc)?;
            }
            x += step;
        }
        Ok(())
    }

    /// The product at a full assignment (`None` for zero).
    fn product(&self, c: &CTerm, env: &[i64]) -> Result<Option<F::Prod>, EvalError> {
        let mut acc = F::prod_one();
        // a power that is undefined here (a root of a negative number, a
        // division by zero) is an error only if no other factor is zero: a
        // symbol outside its selection rules makes the term 0, as a rule's
        // right side assumes where it keeps a symbol for that purpose
        let mut undefined: Option<EvalError> = None;
        for f in &c.factors {
            match f {
                CFactor::Delta(a, b) => {
                    if a.value(env) != b.value(env) {
                        return Ok(None);
                    }
                }
                CFactor::Tri([a, b, cc]) => {
                    match (a.doubled(env), b.doubled(env), cc.doubled(env)) {
                        (Some(x), Some(y), Some(z)) if triangle2(x, y, z) => {}
                        _ => return Ok(None),
                    }
                }
                CFactor::Power(base, e, text) => {
                    let b = base.value(env);
                    if b.is_zero() {
                        if e.is_negative() {
                            undefined.get_or_insert(EvalError::Arithmetic(format!(
                                "division by zero: {text} is 0 here"
                            )));
                            continue;
                        }
                        return Ok(None);
                    }
                    if b.is_negative() && !e.is_integer() {
                        undefined.get_or_insert(EvalError::Arithmetic(format!(
                            "square root of a negative number: {text} = {} here",
                            qstr(&b)
                        )));
                        continue;
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
                                    EvalError::Arithmetic(format!(
                                        "cannot raise {text} to {}",
                                        qstr(e)
                                    ))
                                })?
                            };
                            let p = F::prod_of(&F::from_surd(&v));
                            self.powers.borrow_mut().insert(key, p.clone());
                            p
                        }
                    };
                    F::prod_mul(&mut acc, &p);
                }
                CFactor::Element(e, args) => {
                    let mut values = args.iter().map(|l| l.value(env));
                    let numeric = e.map_lins(&mut |_| {
                        Lin::constant(values.next().expect("one value per form"))
                    });
                    let v = crate::tensor::direct::value(&numeric).map_err(|err| match err {
                        crate::tensor::direct::DirectError::TooLarge(_) => {
                            EvalError::ElementTooLarge(err.to_string())
                        }
                        _ => EvalError::Element(err.to_string()),
                    })?;
                    if v.is_zero() {
                        return Ok(None);
                    }
                    F::prod_mul(&mut acc, &F::prod_of(&F::from_surd(&v)));
                }
                CFactor::Symbol(kind, args) => {
                    let mut a = [0i64; 9];
                    for (i, l) in args.iter().enumerate() {
                        match l.doubled(env) {
                            Some(d) => a[i] = d,
                            None => return Ok(None),
                        }
                    }
                    let limit = F::max_doubled_arg();
                    if a.iter().any(|x| x.abs() > limit) {
                        let biggest = a.iter().map(|x| x.abs()).max().unwrap_or(0);
                        return Err(EvalError::SymbolTooLarge(
                            crate::expr::lin::fmt_q(&Q::new(biggest, 2)),
                            limit / 2,
                        ));
                    }
                    let key = (*kind, a);
                    let cached = self.cache.borrow().get(&key).cloned();
                    let p = match cached {
                        Some(p) => p,
                        None => {
                            let biggest = a.iter().map(|x| x.abs()).max().unwrap_or(0);
                            let cost = F::estimated_seconds(*kind, biggest);
                            if cost > 1.0 {
                                if let Some(left) = crate::limits::seconds_left() {
                                    if cost > left {
                                        return Err(EvalError::TooSlow {
                                            what: format!(
                                                "the {} {} with j up to {}",
                                                F::arithmetic(),
                                                kind.words(),
                                                crate::expr::lin::fmt_q(&Q::new(biggest, 2))
                                            ),
                                            estimate: cost,
                                            left,
                                        });
                                    }
                                }
                            }
                            let v = F::symbol(*kind, &a[..args.len()]);
                            let p = (!v.is_zero()).then(|| F::prod_of(&v));
                            let mut m = self.cache.borrow_mut();
                            let bytes = 96 + p.as_ref().map_or(0, F::prod_bytes);
                            if m.len() >= MAX_CACHED_SYMBOLS
                                || self.cache_bytes.get() + bytes > MAX_CACHE_BYTES
                            {
                                m.clear();
                                self.cache_bytes.set(0);
                            }
                            self.cache_bytes.set(self.cache_bytes.get() + bytes);
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
        if let Some(e) = undefined {
            return Err(e);
        }
        if let Some((ph, text)) = &c.phase {
            let n = ph.num(env);
            let d2 = 2 * ph.den;
            if n % d2 != 0 {
                return Err(EvalError::PhaseNotInteger {
                    exponent: text.clone(),
                    value: qstr(&ph.value(env)),
                    at: c
                        .names
                        .iter()
                        .zip(env.iter())
                        .map(|(n, v)| (n.clone(), Q::new(*v, 2)))
                        .collect(),
                });
            }
            if (n / d2).rem_euclid(2) == 1 {
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
