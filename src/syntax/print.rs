//! Plain-text printing of the data model. The output parses back to the
//! same `Expr` (a property test checks it); factors that do not involve a
//! summed variable are printed outside the `sum(...)`.

use crate::expr::element::subtree;
use crate::expr::factor::is_hat_base;
use crate::expr::lin::fmt_q;
use crate::expr::{CouplingTree, Expr, Factor, Lin, MatrixElement, Operator, State, Term, Q};
use crate::numeric::surd::fmt_rational;
use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};
use std::fmt;

fn row(ls: &[Lin]) -> String {
    ls.iter()
        .map(|l| l.to_string())
        .collect::<Vec<_>>()
        .join(", ")
}

/// A power `base^e` with `e > 0`, written with `hat`, `sqrt` or `^`.
fn print_power(base: &Lin, e: Q) -> String {
    let twice = (e * Q::from_integer(2)).to_integer();
    if twice % 2 != 0 {
        let root = if is_hat_base(base) {
            let l = base.add_scaled(&Lin::int(-1), Q::one()).scale(Q::new(1, 2));
            format!("hat({l})")
        } else {
            format!("sqrt({base})")
        };
        if twice == 1 {
            root
        } else {
            format!("{root}^{twice}")
        }
    } else {
        let n = twice / 2;
        let b = if base.as_var().is_some() {
            base.to_string()
        } else {
            format!("({base})")
        };
        if n == 1 {
            b
        } else {
            format!("{b}^{n}")
        }
    }
}

/// One factor in plain text (a power with a negative exponent prints as
/// its positive counterpart; the caller puts it in a denominator).
pub fn print_factor(f: &Factor) -> String {
    match f {
        Factor::Delta(a, b) => format!("delta({a}, {b})"),
        Factor::Tri([a, b, c]) => format!("tri({a}, {b}, {c})"),
        Factor::Power(b, e) => print_power(b, e.abs()),
        Factor::ThreeJ(a) => format!("({}; {})", row(&a[..3]), row(&a[3..])),
        Factor::Cg(a) => format!(
            "<{}, {}; {}, {} | {}, {}>",
            a[0], a[1], a[2], a[3], a[4], a[5]
        ),
        Factor::SixJ(a) => format!("{{{}; {}}}", row(&a[..3]), row(&a[3..])),
        Factor::NineJ(a) => format!("{{{}; {}; {}}}", row(&a[..3]), row(&a[3..6]), row(&a[6..])),
        Factor::Element(e) => print_element(e),
    }
}

/// A state: its tree, then `, M` when it has a projection.
fn print_state(s: &State) -> String {
    match &s.projection {
        Some(m) => format!("{}, {m}", s.tree),
        None => s.tree.to_string(),
    }
}

/// `rank` or `rank, component` inside the brackets of an operator.
fn rank_text(rank: &Lin, component: &Option<Lin>) -> String {
    match component {
        Some(q) => format!("[{rank}, {q}]"),
        None => format!("[{rank}]"),
    }
}

/// An operator expression; `nested` puts a sum in parentheses.
pub fn print_operator(op: &Operator, bra: &CouplingTree, nested: bool) -> String {
    match op {
        Operator::Elementary {
            name,
            rank,
            component,
            node,
        } => {
            // an operator on the root acts on the whole state: no `@`
            let at = match subtree(bra, node) {
                Some(t) if !node.is_empty() => format!(" @ {}", t.label()),
                _ => String::new(),
            };
            format!("{}{}{at}", name.text(), rank_text(rank, component))
        }
        Operator::Coupled {
            left,
            right,
            rank,
            component,
        } => format!(
            "[{} x {}]{}",
            print_operator(left, bra, true),
            print_operator(right, bra, true),
            rank_text(rank, component)
        ),
        Operator::Scalar(a, b) => format!(
            "({} . {})",
            print_operator(a, bra, true),
            print_operator(b, bra, true)
        ),
        Operator::Sum(terms) => {
            let mut out = String::new();
            for (i, (c, o)) in terms.iter().enumerate() {
                let body = print_operator(o, bra, true);
                let a = c.abs();
                let coefficient = if a.is_one() {
                    String::new()
                } else {
                    format!("{} ", fmt_q(&a))
                };
                let sign = match (i, *c < Q::zero()) {
                    (0, true) => "-",
                    (0, false) => "",
                    (_, true) => " - ",
                    (_, false) => " + ",
                };
                out.push_str(&format!("{sign}{coefficient}{body}"));
            }
            if nested {
                format!("({out})")
            } else {
                out
            }
        }
    }
}

/// A matrix element `<BRA | OP | KET>` or reduced `<BRA || OP || KET>`.
pub fn print_element(e: &MatrixElement) -> String {
    let bar = if e.is_reduced() { "||" } else { "|" };
    format!(
        "<{} {bar} {} {bar} {}>",
        print_state(&e.bra),
        print_operator(&e.op, &e.bra.tree, false),
        print_state(&e.ket)
    )
}

fn print_phase(p: &Lin) -> String {
    let simple = p.as_var().is_some()
        || (p.is_constant() && p.constant_part() >= Q::zero() && p.constant_part().is_integer());
    let p = p.reading_text();
    if simple {
        format!("(-1)^{p}")
    } else {
        format!("(-1)^({p})")
    }
}

fn is_negative_power(f: &Factor) -> bool {
    matches!(f, Factor::Power(_, e) if *e < Q::zero())
}

/// Prints `coef sqrt(root) phase factors` (no sum), with a leading `-`
/// for negative values.
fn print_product(
    coef: &BigRational,
    root: &num_bigint::BigUint,
    phase: Option<&Lin>,
    factors: &[&Factor],
) -> String {
    let negative = coef.is_negative();
    let a = coef.abs();
    let mut num: Vec<String> = Vec::new();
    let mut den: Vec<String> = Vec::new();
    if !root.is_one() {
        // sqrt(a^2 root) as one radical
        let sq = &a * &a * BigRational::from_integer(BigInt::from(root.clone()));
        num.push(format!("sqrt({})", fmt_rational(&sq)));
    } else {
        if !a.numer().is_one() {
            num.push(a.numer().to_string());
        }
        if !a.denom().is_one() {
            den.push(a.denom().to_string());
        }
    }
    if let Some(p) = phase {
        if !p.is_zero() {
            num.push(print_phase(p));
        }
    }
    for f in factors {
        if is_negative_power(f) {
            den.push(print_factor(f));
        } else {
            num.push(print_factor(f));
        }
    }
    let digits = |x: &String| x.chars().all(|c| c.is_ascii_digit());
    let body = if num.is_empty() {
        "1".to_string()
    } else {
        num.join(" ")
    };
    let body = match den.len() {
        0 => body,
        1 if num.len() <= 1 && digits(&body) && digits(&den[0]) => format!("{body}/{}", den[0]),
        1 => format!("{body} / {}", den[0]),
        _ => format!("{body} / ({})", den.join(" ")),
    };
    if negative {
        format!("-{body}")
    } else {
        body
    }
}

/// One term in plain text.
pub fn print_term(t: &Term) -> String {
    // a lone linear form prints as one: 5*x-1/2
    if t.bound().is_empty() && t.phase().is_zero() && t.root().is_one() {
        if let [Factor::Power(l, e)] = t.factors() {
            if *e == Q::one() {
                if let (Ok(n), Ok(d)) = (
                    i64::try_from(t.coef().numer().clone()),
                    i64::try_from(t.coef().denom().clone()),
                ) {
                    return l.scale(Q::new(n, d)).to_string();
                }
            }
        }
    }
    t.write_with(print_product, |names, inside| {
        let names: Vec<String> = names.iter().map(|n| n.to_string()).collect();
        format!("sum({}: {})", names.join(", "), inside)
    })
}

impl fmt::Display for Term {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&print_term(self))
    }
}

impl fmt::Display for Expr {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.terms().is_empty() {
            return f.write_str("0");
        }
        for (i, t) in self.terms().iter().enumerate() {
            let s = print_term(t);
            if i == 0 {
                f.write_str(&s)?;
            } else if let Some(rest) = s.strip_prefix('-') {
                write!(f, " - {rest}")?;
            } else {
                write!(f, " + {s}")?;
            }
        }
        Ok(())
    }
}
