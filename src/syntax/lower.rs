//! Lowering of pest pairs to the data model. Linear subexpressions stay
//! linear forms (so `(2*j+1)` is one factor and `j1+1/2` a symbol
//! argument); everything else becomes an expanded `Expr`. Semantic errors
//! (a nonlinear symbol argument, a wrong symbol shape, division by a
//! symbol) point at the offending span.

use super::error::ParseError;
use super::Rule;
use crate::expr::term::big_q;
use crate::expr::{CouplingTree, Expr, Factor, Lin, Name, Term, Q};
use crate::numeric::Surd;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, ToPrimitive, Zero};
use pest::iterators::Pair;
use pest::pratt_parser::{Assoc, Op, PrattParser};
use std::collections::BTreeMap;
use std::sync::OnceLock;

/// Most terms an expansion may produce before the input is refused.
pub const MAX_TERMS: usize = 20_000;
/// Most work the expansion of one input may cost, in factor operations
/// (each product of two terms costs the factors it handles).
pub const MAX_EXPANSION_WORK: u64 = 400_000;
/// Largest |n| of a power `x^n`, also after powers of one base merge.
pub const MAX_POWER: i64 = 64;
/// Largest magnitude of a numerator or denominator in a linear form.
const LIN_LIMIT: i64 = 1 << 20;

pub(super) fn pratt() -> &'static PrattParser<Rule> {
    static P: OnceLock<PrattParser<Rule>> = OnceLock::new();
    P.get_or_init(|| {
        PrattParser::new()
            .op(Op::infix(Rule::add, Assoc::Left) | Op::infix(Rule::sub, Assoc::Left))
            .op(Op::infix(Rule::mul, Assoc::Left)
                | Op::infix(Rule::div, Assoc::Left)
                | Op::infix(Rule::juxtapose, Assoc::Left))
            .op(Op::prefix(Rule::neg))
            .op(Op::postfix(Rule::power))
    })
}

/// A linear form with big rational coefficients (before range checks).
#[derive(Clone, Debug, Default)]
pub(super) struct BigLin {
    c0: BigRational,
    coeffs: BTreeMap<Name, BigRational>,
}

impl BigLin {
    fn constant(q: BigRational) -> Self {
        BigLin {
            c0: q,
            coeffs: BTreeMap::new(),
        }
    }
    fn var(n: Name) -> Self {
        let mut coeffs = BTreeMap::new();
        coeffs.insert(n, BigRational::one());
        BigLin {
            c0: BigRational::zero(),
            coeffs,
        }
    }
    fn is_constant(&self) -> bool {
        self.coeffs.is_empty()
    }
    fn add(&self, o: &BigLin, k: &BigRational) -> BigLin {
        let mut out = self.clone();
        out.c0 += &o.c0 * k;
        for (v, c) in &o.coeffs {
            let e = out
                .coeffs
                .entry(v.clone())
                .or_insert_with(BigRational::zero);
            *e += c * k;
            if e.is_zero() {
                out.coeffs.remove(v);
            }
        }
        out
    }
    fn scale(&self, k: &BigRational) -> BigLin {
        BigLin::default().add(self, k)
    }
}

fn small_q(q: &BigRational) -> Option<Q> {
    let n = q.numer().to_i64()?;
    let d = q.denom().to_i64()?;
    // unsigned magnitudes: abs overflows at i64::MIN
    if n.unsigned_abs() > LIN_LIMIT.unsigned_abs() || d > LIN_LIMIT {
        return None;
    }
    Some(Q::new(n, d))
}

/// The value of a subexpression during lowering.
#[derive(Clone, Debug)]
pub(super) enum Value {
    Lin(BigLin),
    Expr(Expr),
}

pub(super) struct Ctx<'a> {
    pub(super) input: &'a str,
    /// term products spent on expansions so far
    pub(super) work: std::cell::Cell<u64>,
}

pub(super) type R<T> = Result<T, ParseError>;

impl Ctx<'_> {
    pub(super) fn err(&self, pos: usize, msg: impl Into<String>) -> ParseError {
        ParseError::at(self.input, pos, msg)
    }

    fn to_lin(&self, b: &BigLin, pos: usize) -> R<Lin> {
        let too_big = || self.err(pos, "a number in this linear form is too large");
        let mut l = Lin::constant(small_q(&b.c0).ok_or_else(too_big)?);
        for (v, c) in &b.coeffs {
            let q = small_q(c).ok_or_else(too_big)?;
            l = l.add_scaled(&Lin::var(v.clone()), q);
        }
        Ok(l)
    }

    pub(super) fn to_expr(&self, v: Value, pos: usize) -> R<Expr> {
        match v {
            Value::Expr(e) => Ok(e),
            Value::Lin(b) => {
                if b.is_constant() {
                    Ok(Expr::constant(&Surd::from_rational(b.c0)))
                } else {
                    let l = self.to_lin(&b, pos)?;
                    Ok(Expr::from_term(Term::factor(Factor::Power(l, Q::one()))))
                }
            }
        }
    }

    /// A value that must be linear (symbol arguments, phase exponents).
    fn as_lin(&self, v: Value, pos: usize, what: &str) -> R<Lin> {
        match v {
            Value::Lin(b) => self.to_lin(&b, pos),
            Value::Expr(e) => match e.as_lin() {
                Some(l) => Ok(l),
                None => Err(self.err(
                    pos,
                    format!("{what} must be a linear combination of names and numbers"),
                )),
            },
        }
    }

    fn lower(&self, pair: Pair<Rule>) -> R<Value> {
        debug_assert_eq!(pair.as_rule(), Rule::expr);
        pratt()
            .map_primary(|p| self.primary(p))
            .map_prefix(|op, rhs| {
                let rhs = rhs?;
                let _ = op;
                Ok(neg(rhs))
            })
            .map_postfix(|lhs, op| {
                let lhs = lhs?;
                let at = op.as_span().start();
                let (n, halves) = self.power_exponent(op)?;
                if halves {
                    // x^(p/2) = sqrt(x)^p
                    let root = self.sqrt(lhs, at)?;
                    self.power(root, n, at)
                } else {
                    self.power(lhs, n, at)
                }
            })
            .map_infix(|lhs, op, rhs| {
                let lhs = lhs?;
                let rhs = rhs?;
                let at = op.as_span().start();
                match op.as_rule() {
                    Rule::add => self.add(lhs, rhs, false, at),
                    Rule::sub => self.add(lhs, rhs, true, at),
                    Rule::mul | Rule::juxtapose => self.mul(lhs, rhs, at),
                    Rule::div => self.div(lhs, rhs, at),
                    _ => unreachable!("operator rule"),
                }
            })
            .parse(pair.into_inner())
    }

    /// The exponent of a `power` pair: `n` and whether it counts halves
    /// (`x^(n/2)`); other denominators are refused.
    pub(super) fn power_exponent(&self, op: Pair<Rule>) -> R<(i64, bool)> {
        let at = op.as_span().start();
        let ex = op.into_inner().next().unwrap();
        let txt: String = ex
            .as_str()
            .chars()
            .filter(|c| *c != '(' && *c != ')' && !c.is_whitespace())
            .collect();
        let (num, den) = txt.split_once('/').unwrap_or((&txt, "1"));
        let n: i64 = num
            .parse()
            .map_err(|_| self.err(at, "this exponent is too large"))?;
        match den {
            "1" => Ok((n, false)),
            "2" => Ok((n, true)),
            _ => Err(self.err(
                at,
                "an exponent is an integer or half an integer, such as (-1/2) or (3/2)",
            )),
        }
    }

    fn add(&self, a: Value, b: Value, sub: bool, at: usize) -> R<Value> {
        let k = if sub {
            -BigRational::one()
        } else {
            BigRational::one()
        };
        match (a, b) {
            (Value::Lin(x), Value::Lin(y)) => Ok(Value::Lin(x.add(&y, &k))),
            (a, b) => {
                let x = self.to_expr(a, at)?;
                let y = self.to_expr(b, at)?;
                self.spend(x.len() + y.len(), at)?;
                let y = if sub { y.neg() } else { y };
                let e = x.add(&y);
                self.check_size(&e, at)?;
                Ok(Value::Expr(e))
            }
        }
    }

    /// Charges `n` term products to the expansion budget.
    fn spend(&self, n: usize, at: usize) -> R<()> {
        crate::limits::check_now();
        let w = self.work.get().saturating_add(n as u64);
        self.work.set(w);
        if w > MAX_EXPANSION_WORK {
            return Err(self.err(
                at,
                format!(
                    "expanding the products here is too large (more than {MAX_EXPANSION_WORK} factor operations); write fewer or smaller powers of sums"
                ),
            ));
        }
        Ok(())
    }

    fn check_size(&self, e: &Expr, at: usize) -> R<()> {
        if e.len() > MAX_TERMS {
            return Err(self.err(
                at,
                format!("the expansion has more than {MAX_TERMS} terms; refusing to go on"),
            ));
        }
        // powers of one base merge: the merged exponent obeys the limit too
        for t in e.terms() {
            for f in t.factors() {
                if let Factor::Power(b, ex) = f {
                    if ex.abs() > Q::from_integer(MAX_POWER) {
                        return Err(self.err(
                            at,
                            format!(
                                "this makes the power ({b})^({}) with an exponent beyond the limit |n| <= {MAX_POWER}",
                                crate::expr::lin::fmt_q(ex)
                            ),
                        ));
                    }
                }
            }
        }
        Ok(())
    }

    fn mul(&self, a: Value, b: Value, at: usize) -> R<Value> {
        match (&a, &b) {
            (Value::Lin(x), Value::Lin(y)) if x.is_constant() => Ok(Value::Lin(y.scale(&x.c0))),
            (Value::Lin(x), Value::Lin(y)) if y.is_constant() => Ok(Value::Lin(x.scale(&y.c0))),
            _ => {
                let x = self.to_expr(a, at)?;
                let y = self.to_expr(b, at)?;
                self.spend(product_cost(&x, &y), at)?;
                if x.len().saturating_mul(y.len()) > MAX_TERMS {
                    return Err(self.err(
                        at,
                        format!("the expansion has more than {MAX_TERMS} terms; refusing to go on"),
                    ));
                }
                let e = x.mul(&y);
                self.check_size(&e, at)?;
                Ok(Value::Expr(e))
            }
        }
    }

    fn div(&self, a: Value, b: Value, at: usize) -> R<Value> {
        if let Value::Lin(y) = &b {
            if y.is_constant() {
                if y.c0.is_zero() {
                    return Err(self.err(at, "division by zero"));
                }
                let inv = y.c0.recip();
                return match a {
                    Value::Lin(x) => Ok(Value::Lin(x.scale(&inv))),
                    Value::Expr(e) => Ok(Value::Expr(
                        e.mul(&Expr::constant(&Surd::from_rational(inv))),
                    )),
                };
            }
        }
        let inv = self.invert(b, at)?;
        let x = self.to_expr(a, at)?;
        let e = x.mul(&Expr::from_term(inv));
        self.check_size(&e, at)?;
        Ok(Value::Expr(e))
    }

    /// `1/b` for a single term made of a constant, a phase and powers.
    fn invert(&self, b: Value, at: usize) -> R<Term> {
        let e = self.to_expr(b, at)?;
        if e.len() != 1 {
            return Err(self.err(
                at,
                "only a product of numbers, powers, hats and phases can be divided by",
            ));
        }
        let t = &e.terms()[0];
        if !t.bound().is_empty() {
            return Err(self.err(at, "a sum cannot be divided by"));
        }
        let mut out = Term::constant(&t.scalar().recip().expect("nonzero monomial"))
            .expect("the inverse of a monomial is a monomial")
            .into_parts();
        out.phase = -t.phase();
        for f in t.factors() {
            match f {
                Factor::Power(base, ex) => out.factors.push(Factor::Power(base.clone(), -*ex)),
                other => {
                    return Err(self.err(
                        at,
                        format!("cannot divide by a {}: it may be zero", other.kind_name()),
                    ))
                }
            }
        }
        Ok(out.normalized())
    }

    fn power(&self, base: Value, n: i64, at: usize) -> R<Value> {
        if n.abs() > MAX_POWER {
            return Err(self.err(at, format!("powers are limited to |n| <= {MAX_POWER}")));
        }
        match base {
            Value::Lin(b) if b.is_constant() => {
                if b.c0.is_zero() && n < 0 {
                    return Err(self.err(at, "division by zero"));
                }
                let bits = b.c0.numer().bits().max(b.c0.denom().bits());
                if bits.saturating_mul(n.unsigned_abs()) > 1 << 16 {
                    return Err(self.err(at, "this power of a number has more than 65536 bits"));
                }
                let mut p = BigRational::one();
                for _ in 0..n.abs() {
                    p *= &b.c0;
                }
                if n < 0 {
                    p = p.recip();
                }
                Ok(Value::Lin(BigLin::constant(p)))
            }
            Value::Lin(b) => {
                let l = self.to_lin(&b, at)?;
                if n == 0 {
                    return Ok(Value::Lin(BigLin::constant(BigRational::one())));
                }
                Ok(Value::Expr(Expr::from_term(Term::factor(Factor::Power(
                    l,
                    Q::from_integer(n),
                )))))
            }
            Value::Expr(e) => {
                let (base, k) = if n < 0 {
                    (Expr::from_term(self.invert(Value::Expr(e), at)?), -n)
                } else {
                    (e, n)
                };
                let mut acc = Expr::constant(&Surd::one());
                for _ in 0..k {
                    if acc.len().saturating_mul(base.len()) > MAX_TERMS {
                        return Err(self.err(
                            at,
                            format!(
                                "the expansion has more than {MAX_TERMS} terms; refusing to go on"
                            ),
                        ));
                    }
                    self.spend(product_cost(&acc, &base), at)?;
                    acc = acc.mul(&base);
                    self.check_size(&acc, at)?;
                }
                Ok(Value::Expr(acc))
            }
        }
    }

    fn row(&self, pair: Pair<Rule>, what: &str, at: &mut Vec<usize>) -> R<Vec<Lin>> {
        let mut out = Vec::new();
        for e in pair.into_inner() {
            let pos = e.as_span().start();
            let v = self.lower(e)?;
            out.push(self.as_lin(v, pos, what)?);
            at.push(pos);
        }
        Ok(out)
    }

    /// A symbol whose literal arguments are physics (see
    /// `literal_problem`); the error points at the offending argument.
    fn symbol(&self, f: Factor, at: &[usize]) -> R<Value> {
        if let Some((slot, msg)) = literal_problem(&f) {
            return Err(self.err(at.get(slot).copied().unwrap_or(at[0]), msg));
        }
        Ok(Value::Expr(Expr::from_term(Term::factor(f))))
    }

    pub(super) fn primary(&self, p: Pair<Rule>) -> R<Value> {
        let at = p.as_span().start();
        match p.as_rule() {
            Rule::number => {
                let n: BigInt = p.as_str().parse().unwrap();
                Ok(Value::Lin(BigLin::constant(BigRational::from_integer(n))))
            }
            Rule::ident => Ok(Value::Lin(BigLin::var(Name::new(p.as_str())))),
            Rule::phase => {
                let ex = p.into_inner().next().unwrap();
                let inner = ex.into_inner().next().unwrap();
                let eat = inner.as_span().start();
                let v = self.primary(inner)?;
                let l = self.as_lin(v, eat, "the exponent of a phase")?;
                Ok(Value::Expr(Expr::from_term(Term::minus_one_to(l))))
            }
            Rule::group => {
                let rows: Vec<Pair<Rule>> = p.into_inner().collect();
                let entries: Vec<usize> = rows
                    .iter()
                    .map(|r| r.clone().into_inner().count())
                    .collect();
                if entries == [1] {
                    // a parenthesised expression
                    let inner = rows
                        .into_iter()
                        .next()
                        .unwrap()
                        .into_inner()
                        .next()
                        .unwrap();
                    return self.lower(inner);
                }
                if rows.len() == 1 {
                    return Err(self.err(
                        at,
                        format!(
                            "a parenthesised list of {} entries is not an expression; a 3j symbol has two rows separated by ';', as in (j1, j2, j3; m1, m2, m3)",
                            entries[0]
                        ),
                    ));
                }
                if entries != [3, 3] {
                    return Err(self.err(
                        at,
                        format!(
                            "a 3j symbol has two rows of three entries, (j1, j2, j3; m1, m2, m3); this one has {}",
                            entries.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(" and ")
                        ),
                    ));
                }
                let mut rows = rows.into_iter();
                let mut pos = Vec::new();
                let r1 = self.row(rows.next().unwrap(), "an argument of a 3j symbol", &mut pos)?;
                let r2 = self.row(rows.next().unwrap(), "an argument of a 3j symbol", &mut pos)?;
                let a: Vec<Lin> = r1.into_iter().chain(r2).collect();
                self.symbol(Factor::ThreeJ(a.try_into().unwrap()), &pos)
            }
            Rule::braces => {
                let mut rows = Vec::new();
                let mut pos = Vec::new();
                for r in p.into_inner() {
                    rows.push(self.row(r, "an entry of a 6j or 9j symbol", &mut pos)?);
                }
                let shape: Vec<usize> = rows.iter().map(|r| r.len()).collect();
                let all: Vec<Lin> = rows.into_iter().flatten().collect();
                let f = match shape.as_slice() {
                    [3, 3] => Factor::SixJ(all.try_into().unwrap()),
                    [3, 3, 3] => Factor::NineJ(all.try_into().unwrap()),
                    _ => {
                        return Err(self.err(
                            at,
                            format!(
                                "braces hold a 6j symbol (two rows of three) or a 9j symbol (three rows of three); these rows have {} entries",
                                shape.iter().map(|n| n.to_string()).collect::<Vec<_>>().join(", ")
                            ),
                        ))
                    }
                };
                self.symbol(f, &pos)
            }
            Rule::clebsch_gordan => {
                let mut a = Vec::new();
                let mut pos = Vec::new();
                for e in p.into_inner() {
                    let eat = e.as_span().start();
                    let v = self.lower(e)?;
                    a.push(self.as_lin(v, eat, "an argument of a Clebsch-Gordan coefficient")?);
                    pos.push(eat);
                }
                self.symbol(Factor::Cg(a.try_into().unwrap()), &pos)
            }
            Rule::sum => self.sum(p),
            Rule::call => self.call(p),
            Rule::matrix_element | Rule::reduced_element => {
                let f = super::element::lower_element(self, p)?;
                Ok(Value::Expr(Expr::from_term(Term::factor(f))))
            }
            r => unreachable!("primary rule {r:?}"),
        }
    }

    fn sum(&self, p: Pair<Rule>) -> R<Value> {
        let mut names = Vec::new();
        let mut body = None;
        for q in p.into_inner() {
            match q.as_rule() {
                Rule::ident => {
                    let n = Name::new(q.as_str());
                    if names.contains(&n) {
                        return Err(self.err(
                            q.as_span().start(),
                            format!("{n} is listed twice in this sum"),
                        ));
                    }
                    names.push(n);
                }
                Rule::expr => body = Some(q),
                _ => unreachable!(),
            }
        }
        let body = body.unwrap();
        let bat = body.as_span().start();
        let v = self.lower(body)?;
        let e = self.to_expr(v, bat)?;
        let mut out = Expr::zero();
        for t in e.terms() {
            let mut t = t.clone();
            for n in &names {
                if t.bound().contains(n) {
                    // an inner sum over the same name: rename the inner one
                    t = t.freshen(&[n.clone()].into_iter().collect());
                }
            }
            let mut parts = t.into_parts();
            parts.bound.extend(names.iter().cloned());
            out.push(parts.normalized());
        }
        Ok(Value::Expr(out))
    }

    fn call(&self, p: Pair<Rule>) -> R<Value> {
        let at = p.as_span().start();
        let mut it = p.into_inner();
        let fname = it.next().unwrap().as_str().to_string();
        let args: Vec<Pair<Rule>> = it.collect();
        let want = match fname.as_str() {
            "hat" | "sqrt" => 1,
            "delta" => 2,
            "tri" => 3,
            _ => unreachable!(),
        };
        if args.len() != want {
            return Err(self.err(
                at,
                format!(
                    "{fname} takes {want} argument{}, not {}",
                    if want == 1 { "" } else { "s" },
                    args.len()
                ),
            ));
        }
        let mut vals = Vec::new();
        for a in args {
            let aat = a.as_span().start();
            vals.push((self.lower(a)?, aat));
        }
        match fname.as_str() {
            "hat" => {
                let (v, aat) = vals.pop().unwrap();
                let l = self.as_lin(v, aat, "the argument of hat")?;
                admissible_literal(&l, true).map_err(|m| self.err(aat, m))?;
                let base = l
                    .scale(Q::from_integer(2))
                    .add_scaled(&Lin::int(1), Q::one());
                if base.is_constant() {
                    let c = big_q(base.constant_part());
                    if c.is_negative() {
                        return Err(self.err(aat, "hat(j) needs j >= -1/2"));
                    }
                    return self.sqrt_constant(c, aat);
                }
                Ok(Value::Expr(Expr::from_term(Term::factor(Factor::Power(
                    base,
                    Q::new(1, 2),
                )))))
            }
            "sqrt" => {
                let (v, aat) = vals.pop().unwrap();
                self.sqrt(v, aat)
            }
            "delta" => {
                let mut ls = Vec::new();
                for (v, aat) in vals {
                    ls.push(self.as_lin(v, aat, "an argument of delta")?);
                }
                let b = ls.pop().unwrap();
                let a = ls.pop().unwrap();
                Ok(Value::Expr(Expr::from_term(Term::factor(Factor::Delta(
                    a, b,
                )))))
            }
            "tri" => {
                let mut ls = Vec::new();
                let mut pos = Vec::new();
                for (v, aat) in vals {
                    ls.push(self.as_lin(v, aat, "an argument of tri")?);
                    pos.push(aat);
                }
                self.symbol(Factor::Tri(ls.try_into().unwrap()), &pos)
            }
            _ => unreachable!(),
        }
    }

    fn sqrt_constant(&self, c: BigRational, at: usize) -> R<Value> {
        let s = Surd::signed_sqrt(false, &c).map_err(|e| self.err(at, e.to_string()))?;
        match s.as_rational() {
            Some(r) => Ok(Value::Lin(BigLin::constant(r))),
            None => Ok(Value::Expr(Expr::constant(&s))),
        }
    }

    fn sqrt(&self, v: Value, at: usize) -> R<Value> {
        match v {
            Value::Lin(b) if b.is_constant() => {
                if b.c0.is_negative() {
                    return Err(self.err(at, "square root of a negative number"));
                }
                self.sqrt_constant(b.c0, at)
            }
            Value::Lin(b) => {
                let l = self.to_lin(&b, at)?;
                Ok(Value::Expr(Expr::from_term(Term::factor(Factor::Power(
                    l,
                    Q::new(1, 2),
                )))))
            }
            Value::Expr(e) => {
                let bad = || {
                    self.err(
                        at,
                        "sqrt takes a number or a product of powers of linear forms (a sum of such terms has no exact root here)",
                    )
                };
                if e.len() != 1 {
                    return Err(bad());
                }
                let t = &e.terms()[0];
                if !t.bound().is_empty() || !t.phase().is_zero() {
                    return Err(bad());
                }
                let (neg, _) = t.scalar().as_signed_square().unwrap();
                let mut factors = t.factors().to_vec();
                let mut coef = t.coef().clone();
                // the light normal form moves signs out of linear factors
                // (b+c-a becomes -(a-b-c)), which is harmless in a product
                // but not under a root: each odd power is turned back to
                // read as a triangle-type form (more plus than minus signs),
                // keeping the product's sign, so that no factor under the
                // root is negative where the whole is not
                let score = |l: &Lin| {
                    l.terms()
                        .map(|(_, c)| if *c > Q::zero() { -1 } else { 1 })
                        .sum::<i32>()
                };
                let odd: Vec<(usize, i32)> = factors
                    .iter()
                    .enumerate()
                    .filter_map(|(i, f)| match f {
                        Factor::Power(b, e) if e.is_integer() && e.to_integer() % 2 != 0 => {
                            Some((i, score(b)))
                        }
                        _ => None,
                    })
                    .collect();
                let mut flip: Vec<usize> = odd
                    .iter()
                    .filter(|(_, s)| *s > 0)
                    .map(|(i, _)| *i)
                    .collect();
                if (flip.len() % 2 == 1) != neg {
                    // one more or one fewer: the factor nearest a tie
                    let Some(&(i, _)) = odd.iter().min_by_key(|(_, s)| s.abs()) else {
                        return Err(self.err(at, "square root of a negative number"));
                    };
                    match flip.iter().position(|x| *x == i) {
                        Some(k) => {
                            flip.remove(k);
                        }
                        None => flip.push(i),
                    }
                }
                for &i in &flip {
                    if let Factor::Power(b, e) = &factors[i] {
                        factors[i] = Factor::Power(-b, *e);
                    }
                    coef = -coef;
                }
                // sqrt(q sqrt(s)) needs s = 1
                if !t.root().is_one() {
                    return Err(bad());
                }
                let r = Surd::signed_sqrt(false, &coef).map_err(|e| self.err(at, e.to_string()))?;
                let mut out = Term::constant(&r)
                    .expect("the root of a rational is a monomial")
                    .into_parts();
                for f in &factors {
                    match f {
                        Factor::Power(b, ex) => out
                            .factors
                            .push(Factor::Power(b.clone(), *ex / Q::from_integer(2))),
                        _ => return Err(bad()),
                    }
                }
                Ok(Value::Expr(Expr::from_term(out.normalized())))
            }
        }
    }
}

/// The first literal argument of a symbol that is not physics, by slot
/// (in `Factor::lins` order), with what is wrong: angular momenta must be
/// nonnegative multiples of 1/2, projections multiples of 1/2 with
/// `j - m` an integer. A literal projection with |m| > j is allowed: the
/// symbol is 0 by convention.
pub fn literal_problem(f: &Factor) -> Option<(usize, String)> {
    let lins = f.lins();
    let slot = |l: &Lin| lins.iter().position(|x| std::ptr::eq(*x, l)).unwrap_or(0);
    for l in f.j_slots() {
        if let Err(m) = admissible_literal(l, true) {
            return Some((slot(l), m));
        }
    }
    for l in f.m_slots() {
        if let Err(m) = admissible_literal(l, false) {
            return Some((slot(l), m));
        }
    }
    for (j, m) in f.columns() {
        let diff = j - m;
        if diff.is_constant() && !diff.constant_part().is_integer() {
            return Some((
                slot(m),
                format!(
                    "the projection {m} does not belong to the angular momentum {j}: j - m = {} is not an integer",
                    crate::expr::lin::fmt_q(&diff.constant_part())
                ),
            ));
        }
    }
    None
}

/// Checks a literal argument: in an angular-momentum slot (`j`) a
/// constant must be a nonnegative multiple of 1/2, in a projection slot a
/// multiple of 1/2; a form with integer coefficients must have a constant
/// part that is a multiple of 1/2 (else no value of its names fits).
fn admissible_literal(l: &Lin, j: bool) -> Result<(), String> {
    let c = l.constant_part();
    let half = (c * Q::from_integer(2)).is_integer();
    let what = if j {
        "an angular momentum"
    } else {
        "a projection"
    };
    if l.is_constant() {
        if !half {
            return Err(format!("{what} must be a multiple of 1/2; this one is {l}"));
        }
        if j && c < Q::zero() {
            return Err(format!(
                "an angular momentum cannot be negative; this one is {l}"
            ));
        }
        return Ok(());
    }
    if l.terms().all(|(_, k)| k.is_integer()) && !half {
        return Err(format!(
            "{what} must be a multiple of 1/2, and {l} is not one for any values of its names"
        ));
    }
    Ok(())
}

/// The work of expanding `x * y`: every pair of terms, each costing the
/// factors it combines.
fn product_cost(x: &Expr, y: &Expr) -> usize {
    let factors = |e: &Expr| e.terms().iter().map(|t| t.factors().len() + 1).sum::<usize>();
    factors(x)
        .saturating_mul(y.len())
        .saturating_add(factors(y).saturating_mul(x.len()))
}

fn neg(v: Value) -> Value {
    match v {
        Value::Lin(b) => Value::Lin(b.scale(&-BigRational::one())),
        Value::Expr(e) => Value::Expr(e.neg()),
    }
}

/// Lowers the `expr` pair of a whole input.
/// Every phase `(-1)^e` written in the text under `pair`, with its
/// exponent and byte offset.
pub(super) fn written_phases(input: &str, pair: Pair<Rule>, out: &mut Vec<(String, Lin, usize)>) {
    let ctx = Ctx {
        input,
        work: std::cell::Cell::new(0),
    };
    let mut stack = vec![pair];
    while let Some(p) = stack.pop() {
        if p.as_rule() == Rule::phase {
            let text = p.as_str().to_string();
            let at = p.as_span().start();
            let ex = p.clone().into_inner().next().unwrap();
            let inner = ex.into_inner().next().unwrap();
            let eat = inner.as_span().start();
            if let Ok(l) = ctx
                .primary(inner)
                .and_then(|v| ctx.as_lin(v, eat, "the exponent of a phase"))
            {
                out.push((text, l, at));
            }
            continue;
        }
        stack.extend(p.into_inner());
    }
    out.sort_by_key(|w| w.2);
}

/// Adds the names of one `integer a, b;` / `half-odd s;` declaration.
pub(super) fn lower_declaration(
    input: &str,
    pair: Pair<Rule>,
    into: &mut crate::algebra::declare::Declarations,
) -> R<()> {
    use crate::algebra::declare::Parity;
    let mut inner = pair.into_inner();
    let word = inner.next().unwrap();
    let parity = if word.as_str() == "integer" {
        Parity::Integer
    } else {
        Parity::HalfOdd
    };
    for name in inner {
        let at = name.as_span().start();
        into.declare(Name::new(name.as_str()), parity)
            .map_err(|c| ParseError::at(input, at, c.to_string()))?;
    }
    Ok(())
}

pub(super) fn lower_expr(input: &str, pair: Pair<Rule>) -> R<Expr> {
    let ctx = Ctx {
        input,
        work: std::cell::Cell::new(0),
    };
    let at = pair.as_span().start();
    let v = ctx.lower(pair)?;
    ctx.to_expr(v, at)
}

pub(super) fn parse_fraction(ctx: &Ctx, p: &Pair<Rule>) -> R<Lin> {
    let s = p.as_str();
    let at = p.as_span().start();
    let (n, d) = match s.split_once('/') {
        Some((n, d)) => (n, d),
        None => (s, "1"),
    };
    let n: i64 = n
        .parse()
        .map_err(|_| ctx.err(at, "this number is too large"))?;
    let d: i64 = d
        .parse()
        .map_err(|_| ctx.err(at, "this number is too large"))?;
    if d == 0 {
        return Err(ctx.err(at, "division by zero"));
    }
    if n > LIN_LIMIT || d > LIN_LIMIT {
        return Err(ctx.err(at, "this number is too large"));
    }
    Ok(Lin::constant(Q::new(n, d)))
}

pub(super) fn lower_leaf(ctx: &Ctx, p: Pair<Rule>) -> R<Lin> {
    let inner = p.into_inner().next().unwrap();
    match inner.as_rule() {
        Rule::ident => Ok(Lin::var(Name::new(inner.as_str()))),
        Rule::fraction => {
            let l = parse_fraction(ctx, &inner)?;
            admissible_literal(&l, true).map_err(|m| ctx.err(inner.as_span().start(), m))?;
            Ok(l)
        }
        _ => unreachable!(),
    }
}

/// Lowers a `coupled` pair; every node must be binary and labelled.
pub(super) fn lower_tree(input: &str, pair: Pair<Rule>, _root: bool) -> R<CouplingTree> {
    let ctx = Ctx {
        input,
        work: std::cell::Cell::new(0),
    };
    tree_node(&ctx, pair)
}

pub(super) fn tree_node(ctx: &Ctx, pair: Pair<Rule>) -> R<CouplingTree> {
    let at = pair.as_span().start();
    let mut children = Vec::new();
    let mut label = None;
    for q in pair.into_inner() {
        match q.as_rule() {
            Rule::tree_child => {
                let c = q.into_inner().next().unwrap();
                match c.as_rule() {
                    Rule::coupled => children.push(tree_node(ctx, c)?),
                    Rule::tree_leaf => children.push(CouplingTree::Leaf(lower_leaf(ctx, c)?)),
                    _ => unreachable!(),
                }
            }
            Rule::tree_label => label = Some(lower_leaf(ctx, q)?),
            _ => unreachable!(),
        }
    }
    if children.len() != 2 {
        return Err(ctx.err(
            at,
            format!(
                "a coupling joins exactly two angular momenta, (a, b) c; this one joins {}",
                children.len()
            ),
        ));
    }
    let Some(label) = label else {
        let end = at + 1;
        return Err(ctx.err(
            end.min(ctx.input.len()),
            "this coupling needs the name of its resultant after the closing parenthesis, as in (j1, j2) j12",
        ));
    };
    let b = children.pop().unwrap();
    let a = children.pop().unwrap();
    Ok(CouplingTree::Node(Box::new(a), Box::new(b), label))
}
