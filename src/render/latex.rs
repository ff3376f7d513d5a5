//! LaTeX for expressions (amsmath): `pmatrix` for 3j symbols, `Bmatrix`
//! for 6j and 9j, `\langle … | … \rangle` for Clebsch–Gordan coefficients,
//! `\sum_{m_1, m_2}` for sums; names by `name` (subscripts from trailing
//! digits and from `_`, Greek names and `ell` as letters, other words of
//! several letters whole).

use crate::expr::element::subtree;
use crate::expr::factor::is_hat_base;
use crate::expr::{
    CouplingTree, Expr, Factor, Lin, MatrixElement, Name, Operator, OperatorName, State, Term, Q,
};
use num_rational::BigRational;
use num_traits::{One, Signed, Zero};

const GREEK: &[&str] = &[
    "alpha", "beta", "gamma", "delta", "epsilon", "zeta", "eta", "theta", "iota", "kappa",
    "lambda", "mu", "nu", "xi", "pi", "rho", "sigma", "tau", "upsilon", "phi", "chi", "psi",
    "omega", "Gamma", "Delta", "Theta", "Lambda", "Xi", "Pi", "Sigma", "Phi", "Psi", "Omega",
];

/// A variable name in LaTeX: trailing digits are a subscript (`j12` →
/// `j_{12}`), `_` starts a subscript whose parts are names themselves
/// (`j_alpha` → `j_{\alpha}`, `m_j1` → `m_{j_1}`, `J_tot` →
/// `J_{\mathrm{tot}}`), Greek names and `ell` are their letters, any other
/// name of several letters stays one italic word (`ab` → `\mathit{ab}`,
/// never `a_b`); primes are kept.
pub fn name(n: &Name) -> String {
    let s = n.as_str();
    let base_end = s.find('\'').unwrap_or(s.len());
    let (body, primes) = s.split_at(base_end);
    let mut parts = body.split('_').filter(|p| !p.is_empty());
    let head = parts.next().unwrap_or("");
    let rest: Vec<&str> = parts.collect();
    let mut out = word(head, false);
    if !rest.is_empty() {
        let sub: Vec<String> = rest.iter().map(|p| word(p, true)).collect();
        let sub = sub.join(",");
        if sub.chars().count() == 1 {
            out.push('_');
            out.push_str(&sub);
        } else {
            out.push_str(&format!("_{{{sub}}}"));
        }
    }
    out.push_str(primes);
    out
}

/// One part of a name: letters then digits (the digits a subscript).
/// Inside a subscript, a word of several letters that is not a letter's
/// name is upright (`tot` → `\mathrm{tot}`).
fn word(part: &str, in_subscript: bool) -> String {
    let alpha_end = part
        .find(|c: char| c.is_ascii_digit())
        .unwrap_or(part.len());
    let (alpha, digits) = part.split_at(alpha_end);
    let letters = if GREEK.contains(&alpha) || alpha == "ell" {
        format!("\\{alpha}")
    } else if alpha.chars().count() <= 1 {
        alpha.to_string()
    } else if in_subscript {
        format!("\\mathrm{{{alpha}}}")
    } else {
        format!("\\mathit{{{alpha}}}")
    };
    match digits.len() {
        _ if letters.is_empty() => digits.to_string(),
        0 => letters,
        1 => format!("{letters}_{digits}"),
        _ => format!("{letters}_{{{digits}}}"),
    }
}

fn frac(q: &Q) -> String {
    if q.is_integer() {
        q.numer().to_string()
    } else {
        format!("\\tfrac{{{}}}{{{}}}", q.numer(), q.denom())
    }
}

/// A linear form: `j_1+j_2-j_3`, `2x+1`, `j+\tfrac{1}{2}`.
pub fn lin(l: &Lin) -> String {
    lin_of_terms(l.terms(), l)
}

/// A phase exponent in LaTeX, its variables in the reading order in force
/// (`expr::lin::with_reading_order`).
fn phase_exponent(l: &Lin) -> String {
    lin_of_terms(l.terms_for_reading(), l)
}

fn lin_of_terms<'a>(terms: impl IntoIterator<Item = (&'a Name, &'a Q)>, l: &Lin) -> String {
    let mut s = String::new();
    let mut first = true;
    for (v, c) in terms {
        let a = c.abs();
        if c.is_negative() {
            s.push('-');
        } else if !first {
            s.push('+');
        }
        if !a.is_one() {
            s.push_str(&frac(&a));
        }
        s.push_str(&name(v));
        first = false;
    }
    let c0 = l.constant_part();
    if !c0.is_zero() || first {
        if c0.is_negative() {
            s.push('-');
        } else if !first {
            s.push('+');
        }
        s.push_str(&frac(&c0.abs()));
    }
    s
}

fn row(ls: &[Lin]) -> String {
    ls.iter().map(lin).collect::<Vec<_>>().join(" & ")
}

fn power(base: &Lin, e: Q) -> String {
    let twice = (e * Q::from_integer(2)).to_integer();
    if twice % 2 != 0 {
        let r = if is_hat_base(base) {
            let l = base.add_scaled(&Lin::int(-1), Q::one()).scale(Q::new(1, 2));
            match l.as_var() {
                Some(v) => {
                    let n = name(v);
                    // \hat{j}_{12}: put the hat on the head only
                    match n.find(['_', '\'']) {
                        Some(i) => format!("\\hat{{{}}}{}", &n[..i], &n[i..]),
                        None => format!("\\hat{{{n}}}"),
                    }
                }
                None => format!("\\sqrt{{{}}}", lin(base)),
            }
        } else {
            format!("\\sqrt{{{}}}", lin(base))
        };
        if twice == 1 {
            r
        } else {
            format!("{r}^{{{twice}}}")
        }
    } else {
        let n = twice / 2;
        let b = if base.as_var().is_some() {
            lin(base)
        } else {
            format!("({})", lin(base))
        };
        if n == 1 {
            b
        } else {
            format!("{b}^{{{n}}}")
        }
    }
}

/// One factor in LaTeX (negative powers as their positive counterpart).
pub fn factor(f: &Factor) -> String {
    match f {
        Factor::Delta(a, b) => format!("\\delta_{{{},{}}}", lin(a), lin(b)),
        // written out, so it is never read as a 6j-like brace
        Factor::Tri([a, b, c]) => {
            format!("\\operatorname{{tri}}({}, {}, {})", lin(a), lin(b), lin(c))
        }
        Factor::Power(b, e) => power(b, e.abs()),
        Factor::ThreeJ(a) => format!(
            "\\begin{{pmatrix}} {} \\\\ {} \\end{{pmatrix}}",
            row(&a[..3]),
            row(&a[3..])
        ),
        Factor::Cg(a) => format!(
            "\\langle {}\\, {},\\, {}\\, {} | {}\\, {} \\rangle",
            lin(&a[0]),
            lin(&a[1]),
            lin(&a[2]),
            lin(&a[3]),
            lin(&a[4]),
            lin(&a[5])
        ),
        Factor::SixJ(a) => format!(
            "\\begin{{Bmatrix}} {} \\\\ {} \\end{{Bmatrix}}",
            row(&a[..3]),
            row(&a[3..])
        ),
        Factor::NineJ(a) => format!(
            "\\begin{{Bmatrix}} {} \\\\ {} \\\\ {} \\end{{Bmatrix}}",
            row(&a[..3]),
            row(&a[3..6]),
            row(&a[6..])
        ),
        Factor::Element(e) => element(e),
    }
}

fn tree(t: &CouplingTree) -> String {
    match t {
        CouplingTree::Leaf(l) => lin(l),
        CouplingTree::Node(a, b, l) => format!("({}, {})\\,{}", tree(a), tree(b), lin(l)),
    }
}

fn state(s: &State) -> String {
    match &s.projection {
        Some(m) => format!("{}, {}", tree(&s.tree), lin(m)),
        None => tree(&s.tree),
    }
}

fn operator(op: &Operator, bra: &CouplingTree, nested: bool) -> String {
    let superscript = |rank: &Lin, component: &Option<Lin>| match component {
        Some(q) => format!("^{{({})}}_{{{}}}", lin(rank), lin(q)),
        None => format!("^{{({})}}", lin(rank)),
    };
    match op {
        Operator::Elementary {
            name,
            rank,
            component,
            node,
        } => {
            let symbol = match name {
                OperatorName::AngularMomentum => "J".to_string(),
                OperatorName::Spherical => "C".to_string(),
                OperatorName::Unit => "u".to_string(),
                OperatorName::Opaque(s) if s.len() == 1 => s.clone(),
                OperatorName::Opaque(s) => format!("\\mathrm{{{s}}}"),
            };
            // the root needs no name: the operator acts on the whole state
            let label = match subtree(bra, node) {
                Some(t) if !node.is_empty() => format!("({})", lin(t.label())),
                _ => String::new(),
            };
            format!("{symbol}{}{label}", superscript(rank, component))
        }
        Operator::Coupled {
            left,
            right,
            rank,
            component,
        } => format!(
            "\\left[{} \\times {}\\right]{}",
            operator(left, bra, true),
            operator(right, bra, true),
            superscript(rank, component)
        ),
        Operator::Scalar(a, b) => format!(
            "\\left({} \\cdot {}\\right)",
            operator(a, bra, true),
            operator(b, bra, true)
        ),
        Operator::Sum(terms) => {
            let mut out = String::new();
            for (i, (c, o)) in terms.iter().enumerate() {
                let a = c.abs();
                let coefficient = if a == Q::from_integer(1) {
                    String::new()
                } else if a.is_integer() {
                    format!("{} ", a.numer())
                } else {
                    format!("\\tfrac{{{}}}{{{}}} ", a.numer(), a.denom())
                };
                let sign = match (i, *c < Q::from_integer(0)) {
                    (0, true) => "-",
                    (0, false) => "",
                    (_, true) => " - ",
                    (_, false) => " + ",
                };
                out.push_str(&format!("{sign}{coefficient}{}", operator(o, bra, true)));
            }
            if nested {
                format!("\\left({out}\\right)")
            } else {
                out
            }
        }
    }
}

fn element(e: &MatrixElement) -> String {
    let bar = if e.is_reduced() { "\\|" } else { "|" };
    format!(
        "\\langle {} {bar} {} {bar} {} \\rangle",
        state(&e.bra),
        operator(&e.op, &e.bra.tree, false),
        state(&e.ket)
    )
}

fn product(
    coef: &BigRational,
    root: &num_bigint::BigUint,
    phase: Option<&Lin>,
    fs: &[&Factor],
) -> String {
    let neg = coef.is_negative();
    let a = coef.abs();
    let mut num: Vec<String> = Vec::new();
    let mut den: Vec<String> = Vec::new();
    if !root.is_one() {
        // n sqrt(r) / d with r square-free, as a journal prints it
        if !a.numer().is_one() {
            num.push(a.numer().to_string());
        }
        num.push(format!("\\sqrt{{{root}}}"));
        if !a.denom().is_one() {
            den.push(a.denom().to_string());
        }
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
            num.push(format!("(-1)^{{{}}}", phase_exponent(p)));
        }
    }
    for f in fs {
        let s = factor(f);
        if matches!(f, Factor::Power(_, e) if e.is_negative()) {
            den.push(s);
        } else {
            num.push(s);
        }
    }
    let n = if num.is_empty() {
        "1".to_string()
    } else {
        num.join(" ")
    };
    // a lone parenthesised linear form needs no parentheses in a fraction
    if den.len() == 1 && den[0].starts_with('(') && den[0].ends_with(')') && !den[0].contains(")^")
    {
        den[0] = den[0][1..den[0].len() - 1].to_string();
    }
    let body = if den.is_empty() {
        n
    } else {
        format!("\\frac{{{}}}{{{}}}", n, den.join(" "))
    };
    if neg {
        format!("-{body}")
    } else {
        body
    }
}

/// One term in LaTeX.
pub fn term(t: &Term) -> String {
    t.write_with(product, |names, inside| {
        let names: Vec<String> = names.iter().map(name).collect();
        format!("\\sum_{{{}}} {}", names.join(", "), inside)
    })
}

/// A whole expression in LaTeX (math mode content, no delimiters).
pub fn expr(e: &Expr) -> String {
    if e.is_zero() {
        return "0".into();
    }
    let mut s = String::new();
    for (i, t) in e.terms().iter().enumerate() {
        let x = term(t);
        if i == 0 {
            s.push_str(&x);
        } else if let Some(r) = x.strip_prefix('-') {
            s.push_str(" - ");
            s.push_str(r);
        } else {
            s.push_str(" + ");
            s.push_str(&x);
        }
    }
    s
}
