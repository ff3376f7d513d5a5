//! The layout of an expression as the user wrote it: sums with their
//! names in the written order, parentheses, operators and operands in
//! place. Each operand (a symbol, a name, a call, a phase's exponent) is
//! lowered on its own, so the layout shows the user's arrangement while
//! every piece is a checked `Expr`. Printers use it to echo the input.

use super::grammar::Rule;
use super::lower::{pratt, Ctx, R};
use crate::expr::{Expr, Name, Q};
use pest::iterators::Pair;

/// An infix operator as written.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Infix {
    /// `+`
    Add,
    /// `-`
    Sub,
    /// `*` or two operands side by side
    Mul,
    /// `/`
    Div,
}

/// An expression as written.
#[derive(Clone, Debug)]
pub enum Layout {
    /// an operand lowered on its own
    Operand(Expr),
    /// `(-1)^exponent`, the exponent as written
    Phase(Box<Layout>),
    /// `sum(names: body)`, names in the written order
    Sum(Vec<Name>, Box<Layout>),
    /// `(inner)`
    Parenthesised(Box<Layout>),
    /// `-inner`
    Negated(Box<Layout>),
    /// `base^exponent`
    Power(Box<Layout>, Q),
    /// `left op right`
    Infix(Box<Layout>, Infix, Box<Layout>),
}

impl Ctx<'_> {
    /// The layout of an `expr` pair.
    pub(super) fn layout(&self, pair: Pair<Rule>) -> R<Layout> {
        pratt()
            .map_primary(|p| self.layout_operand(p))
            .map_prefix(|_, rhs| Ok(Layout::Negated(Box::new(rhs?))))
            .map_postfix(|lhs, op| {
                let (n, halves) = self.power_exponent(op)?;
                let exponent = Q::new(n, if halves { 2 } else { 1 });
                Ok(Layout::Power(Box::new(lhs?), exponent))
            })
            .map_infix(|lhs, op, rhs| {
                let op = match op.as_rule() {
                    Rule::add => Infix::Add,
                    Rule::sub => Infix::Sub,
                    Rule::div => Infix::Div,
                    _ => Infix::Mul,
                };
                Ok(Layout::Infix(Box::new(lhs?), op, Box::new(rhs?)))
            })
            .parse(pair.into_inner())
    }

    fn layout_operand(&self, p: Pair<Rule>) -> R<Layout> {
        let at = p.as_span().start();
        match p.as_rule() {
            Rule::sum => {
                let mut names = Vec::new();
                let mut body = None;
                for q in p.into_inner() {
                    match q.as_rule() {
                        Rule::ident => names.push(Name::new(q.as_str())),
                        _ => body = Some(q),
                    }
                }
                let body = body.expect("a sum has a body");
                Ok(Layout::Sum(names, Box::new(self.layout(body)?)))
            }
            Rule::group => {
                let rows: Vec<Pair<Rule>> = p.clone().into_inner().collect();
                if let [row] = rows.as_slice() {
                    let items: Vec<Pair<Rule>> = row.clone().into_inner().collect();
                    if let [inner] = items.as_slice() {
                        return Ok(Layout::Parenthesised(Box::new(self.layout(inner.clone())?)));
                    }
                }
                self.operand(p, at)
            }
            Rule::phase => {
                let exponent = p.clone().into_inner().next().unwrap();
                let inner = exponent.into_inner().next().unwrap();
                let shown = match inner.as_rule() {
                    Rule::group => match self.layout_operand(inner)? {
                        Layout::Parenthesised(x) => *x,
                        other => other,
                    },
                    _ => self.layout_operand(inner)?,
                };
                Ok(Layout::Phase(Box::new(shown)))
            }
            _ => self.operand(p, at),
        }
    }

    fn operand(&self, p: Pair<Rule>, at: usize) -> R<Layout> {
        let v = self.primary(p)?;
        Ok(Layout::Operand(self.to_expr(v, at)?))
    }
}
