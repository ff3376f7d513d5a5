//! LaTeX of an input as the user wrote it: sums over the names in the
//! written order, factors and terms where they stand, parentheses kept,
//! `a/b` as a fraction. Each operand is a lowered `Expr` printed by
//! `render::latex`, so names, symbols and numbers look as in results.
//! Used for the first line of a derivation and the left side of an
//! equation, where the reader compares with what was typed.

use super::latex;
use crate::expr::lin::fmt_q;
use crate::expr::Expr;
use crate::syntax::{Infix, Layout};

/// The LaTeX of `text` as written, or of `fallback` (its normal form)
/// when the text does not parse as an expression.
pub fn latex_as_written(text: &str, fallback: &Expr) -> String {
    match crate::syntax::layout(text) {
        Some(l) => render(&l),
        None => latex::expr(fallback),
    }
}

fn render(l: &Layout) -> String {
    match l {
        Layout::Operand(e) => latex::expr(e),
        Layout::Phase(x) => format!("(-1)^{{{}}}", render(x)),
        Layout::Sum(names, body) => {
            let names: Vec<String> = names.iter().map(latex::name).collect();
            let inner = render(body);
            let inner = if is_additive(body) {
                format!("\\left[{inner}\\right]")
            } else {
                inner
            };
            format!("\\sum_{{{}}} {inner}", names.join(", "))
        }
        Layout::Parenthesised(x) => format!("\\left({}\\right)", render(x)),
        Layout::Negated(x) => {
            if is_additive(x) {
                format!("-\\left({}\\right)", render(x))
            } else {
                format!("-{}", render(x))
            }
        }
        Layout::Power(base, e) => {
            let b = render(base);
            let simple = matches!(&**base, Layout::Operand(x) if x.len() == 1) && is_atom(&b);
            let b = if simple || matches!(&**base, Layout::Parenthesised(_)) {
                b
            } else {
                format!("\\left({b}\\right)")
            };
            format!("{b}^{{{}}}", fmt_q(e))
        }
        Layout::Infix(a, op, b) => match op {
            Infix::Add => format!("{} + {}", render(a), render(b)),
            Infix::Sub => format!("{} - {}", render(a), render(b)),
            Infix::Mul => format!("{} {}", render(a), render(b)),
            Infix::Div => format!("\\frac{{{}}}{{{}}}", unwrapped(a), unwrapped(b)),
        },
    }
}

/// A fraction's numerator or denominator: its own parentheses dropped.
fn unwrapped(l: &Layout) -> String {
    match l {
        Layout::Parenthesised(x) => render(x),
        other => render(other),
    }
}

/// True for a sum or difference at the top (it needs brackets inside a
/// product, a sum or behind a minus).
fn is_additive(l: &Layout) -> bool {
    matches!(l, Layout::Infix(_, Infix::Add | Infix::Sub, _))
}

/// True for the LaTeX of a name, a number or a call such as `\\hat{j}`
/// (no spaces, sign or fraction): a power needs no parentheses.
fn is_atom(latex: &str) -> bool {
    !latex.contains(' ') && !latex.starts_with('-') && !latex.contains("\\frac")
}

#[cfg(test)]
mod tests {
    use super::*;

    fn shown(text: &str) -> String {
        latex_as_written(text, &Expr::zero())
    }

    #[test]
    fn sums_factors_and_phases_stay_in_the_written_order() {
        assert_eq!(
            shown("sum(m2, m1: (-1)^(j2-m1) <j2, m2; j1, m1 | J, M> (j1, j2, J; m1, m2, -M))"),
            "\\sum_{m_2, m_1} (-1)^{j_2 - m_1} \\langle j_2\\, m_2,\\, j_1\\, m_1 | J\\, M \\rangle \\begin{pmatrix} j_1 & j_2 & J \\\\ m_1 & m_2 & -M \\end{pmatrix}"
        );
    }

    #[test]
    fn fractions_powers_and_brackets() {
        assert_eq!(shown("1/(2*j+1)"), "\\frac{1}{2 j + 1}");
        assert_eq!(shown("(2*j+1)^(-1/2)"), "\\left(2 j + 1\\right)^{-1/2}");
        assert_eq!(shown("sum(x: a + b)"), "\\sum_{x} \\left[a + b\\right]");
        assert_eq!(shown("-(a+b) c"), "-\\left(a + b\\right) c");
    }

    #[test]
    fn text_that_does_not_parse_falls_back() {
        assert_eq!(shown("(a,"), "0");
    }
}
