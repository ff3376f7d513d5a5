//! Lowering of matrix elements from the grammar: states, operator
//! expressions and node references, with the checks that make a matrix
//! element meaningful (the ket's tree has the bra's shape, every operator
//! names one node of the bra's tree, a full matrix element selects a
//! component of its operator and a reduced one does not, components inside
//! products are summed, built-in operators have their rank and node).

use super::grammar::Rule;
use super::lower::{lower_leaf, parse_fraction, tree_node, Ctx, R};
use crate::expr::element::{node_paths, same_shape, subtree, NodePath};
use crate::expr::{
    CouplingTree, Factor, Lin, MatrixElement, Name, Operator, OperatorName, State, Q,
};
use num_traits::{One, Zero};
use pest::iterators::Pair;

/// Lowers a `matrix_element` or `reduced_element` pair to its factor.
pub(super) fn lower_element(ctx: &Ctx, p: Pair<Rule>) -> R<Factor> {
    let at = p.as_span().start();
    let reduced = p.as_rule() == Rule::reduced_element;
    let mut parts = p.into_inner();
    let (bra_pair, op_pair, ket_pair) = (
        parts.next().unwrap(),
        parts.next().unwrap(),
        parts.next().unwrap(),
    );
    let ket_at = ket_pair.as_span().start();
    let bra = lower_state(ctx, bra_pair)?;
    let ket = lower_state(ctx, ket_pair)?;
    if !same_shape(&bra.tree, &ket.tree) {
        return Err(ctx.err(
            ket_at,
            "the ket's coupling tree must have the bra's shape (partners stand at the same places)",
        ));
    }
    let op_at = op_pair.as_span().start();
    let op = lower_operator(ctx, op_pair, &bra.tree)?;
    let e = MatrixElement { bra, op, ket };
    check_components(ctx, &e.op, op_at, !reduced)?;
    if reduced && e.op.rank().is_none() {
        return Err(ctx.err(
            op_at,
            "the operator of a reduced matrix element needs one rank: every term the same [k]",
        ));
    }
    let _ = at;
    Ok(Factor::Element(Box::new(e)))
}

fn lower_state(ctx: &Ctx, p: Pair<Rule>) -> R<State> {
    match p.as_rule() {
        Rule::state => {
            let mut parts = p.into_inner();
            let tree = lower_state_tree(ctx, parts.next().unwrap())?;
            let projection = Some(lower_projection(ctx, parts.next().unwrap())?);
            Ok(State { tree, projection })
        }
        Rule::state_tree => Ok(State {
            tree: lower_state_tree(ctx, p)?,
            projection: None,
        }),
        r => unreachable!("state rule {r:?}"),
    }
}

fn lower_state_tree(ctx: &Ctx, p: Pair<Rule>) -> R<CouplingTree> {
    let inner = p.into_inner().next().unwrap();
    match inner.as_rule() {
        Rule::coupled => tree_node(ctx, inner),
        Rule::tree_leaf => Ok(CouplingTree::Leaf(lower_leaf(ctx, inner)?)),
        r => unreachable!("tree rule {r:?}"),
    }
}

/// A short linear form: atoms joined by signs.
fn lower_projection(ctx: &Ctx, p: Pair<Rule>) -> R<Lin> {
    let mut total = Lin::zero();
    let mut sign = Q::one();
    for q in p.into_inner() {
        match q.as_rule() {
            Rule::projection_sign => {
                sign = if q.as_str() == "-" {
                    -Q::one()
                } else {
                    Q::one()
                };
            }
            Rule::projection_atom => {
                let mut coefficient = Q::one();
                let mut name = None;
                for a in q.into_inner() {
                    match a.as_rule() {
                        Rule::fraction => {
                            coefficient = parse_fraction(ctx, &a)?.constant_part();
                        }
                        Rule::ident => name = Some(Name::new(a.as_str())),
                        _ => unreachable!(),
                    }
                }
                total = match name {
                    Some(n) => total.add_scaled(&Lin::var(n), sign * coefficient),
                    None => total.add_scaled(&Lin::constant(coefficient), sign),
                };
                sign = Q::one();
            }
            r => unreachable!("projection rule {r:?}"),
        }
    }
    Ok(total)
}

fn lower_operator(ctx: &Ctx, p: Pair<Rule>, bra: &CouplingTree) -> R<Operator> {
    let mut terms: Vec<(Q, Operator)> = Vec::new();
    let mut sign = Q::one();
    for q in p.into_inner() {
        match q.as_rule() {
            Rule::operator_sign => {
                sign = if q.as_str() == "-" {
                    -Q::one()
                } else {
                    Q::one()
                };
            }
            Rule::operator_term => {
                let mut coefficient = Q::one();
                let mut op = None;
                for a in q.into_inner() {
                    match a.as_rule() {
                        Rule::fraction => coefficient = parse_fraction(ctx, &a)?.constant_part(),
                        _ => op = Some(lower_factor(ctx, a, bra)?),
                    }
                }
                let c = sign * coefficient;
                if !c.is_zero() {
                    terms.push((c, op.unwrap()));
                }
                sign = Q::one();
            }
            r => unreachable!("operator rule {r:?}"),
        }
    }
    if terms.len() == 1 && terms[0].0.is_one() {
        return Ok(terms.pop().unwrap().1);
    }
    Ok(Operator::Sum(terms))
}

fn indices(ctx: &Ctx, p: Pair<Rule>) -> R<(Lin, Option<Lin>)> {
    let mut parts = p.into_inner();
    let rank = lower_projection(ctx, parts.next().unwrap())?;
    let component = parts.next().map(|c| lower_projection(ctx, c)).transpose()?;
    Ok((rank, component))
}

fn lower_factor(ctx: &Ctx, p: Pair<Rule>, bra: &CouplingTree) -> R<Operator> {
    let at = p.as_span().start();
    match p.as_rule() {
        Rule::elementary_operator => {
            let mut parts = p.into_inner();
            let name = OperatorName::from_text(parts.next().unwrap().as_str());
            let index_pair = parts.next().unwrap();
            let index_at = index_pair.as_span().start();
            let (rank, component) = indices(ctx, index_pair)?;
            let node = match parts.next() {
                Some(node_pair) => resolve_node(ctx, node_pair, bra)?,
                None => NodePath::new(),
            };
            if name == OperatorName::AngularMomentum && rank != Lin::int(1) {
                return Err(ctx.err(
                    index_at,
                    "J is the angular momentum, a tensor of rank 1: write J[1] or J[1, q]",
                ));
            }
            if name == OperatorName::Spherical
                && !matches!(subtree(bra, &node), Some(CouplingTree::Leaf(_)))
            {
                return Err(ctx.err(
                    at,
                    "C[k] acts on one orbital angular momentum: a leaf of the tree, not a coupled node",
                ));
            }
            if rank.is_constant() && rank.constant_part() < Q::zero() {
                return Err(ctx.err(index_at, "a rank cannot be negative"));
            }
            Ok(Operator::Elementary {
                name,
                rank,
                component,
                node,
            })
        }
        Rule::coupled_operator => {
            let mut parts = p.into_inner();
            let left = lower_operator(ctx, parts.next().unwrap(), bra)?;
            let right = lower_operator(ctx, parts.next().unwrap(), bra)?;
            let (rank, component) = indices(ctx, parts.next().unwrap())?;
            for side in [&left, &right] {
                if side.rank().is_none() {
                    return Err(ctx.err(
                        at,
                        "each factor of a coupled product needs one rank: every term the same [k]",
                    ));
                }
            }
            Ok(Operator::Coupled {
                left: Box::new(left),
                right: Box::new(right),
                rank,
                component,
            })
        }
        Rule::parenthesised_operator => {
            let mut parts = p.into_inner();
            let first = lower_operator(ctx, parts.next().unwrap(), bra)?;
            match parts.next() {
                None => Ok(first),
                Some(_dot) => {
                    let second = lower_operator(ctx, parts.next().unwrap(), bra)?;
                    match (first.rank(), second.rank()) {
                        (Some(a), Some(b)) if a == b => {}
                        (Some(_), Some(_)) => {
                            return Err(ctx.err(
                                at,
                                "a scalar product (A . B) couples two operators of the same rank",
                            ))
                        }
                        _ => {
                            return Err(ctx.err(
                                at,
                                "each factor of a scalar product needs one rank: every term the same [k]",
                            ))
                        }
                    }
                    Ok(Operator::Scalar(Box::new(first), Box::new(second)))
                }
            }
        }
        r => unreachable!("operator factor {r:?}"),
    }
}

fn resolve_node(ctx: &Ctx, p: Pair<Rule>, bra: &CouplingTree) -> R<NodePath> {
    let at = p.as_span().start();
    let text = p.as_str();
    let inner = p.into_inner().next().unwrap();
    let label = match inner.as_rule() {
        Rule::ident => Lin::var(Name::new(inner.as_str())),
        _ => parse_fraction(ctx, &inner)?,
    };
    let found: Vec<NodePath> = node_paths(bra)
        .into_iter()
        .filter(|path| subtree(bra, path).map(|t| t.label()) == Some(&label))
        .collect();
    match found.len() {
        1 => Ok(found.into_iter().next().unwrap()),
        0 => Err(ctx.err(
            at,
            format!("the bra's coupling tree has no node named {text}; an operator acts on a node of the bra"),
        )),
        _ => Err(ctx.err(
            at,
            format!("{text} names {} nodes of the bra's tree; give them different names", found.len()),
        )),
    }
}

/// A full matrix element selects a component of every top-level term
/// (a scalar product has component 0); a reduced one selects none; the
/// factors of a product never do (their components are summed).
fn check_components(ctx: &Ctx, op: &Operator, at: usize, full: bool) -> R<()> {
    components_at(ctx, op, at, Some(full))
}

/// One walk for both places: `top` is `Some(full)` for the operator's
/// own terms, `None` inside a product (whose components are summed).
fn components_at(ctx: &Ctx, op: &Operator, at: usize, top: Option<bool>) -> R<()> {
    let own = |component: &Option<Lin>| match top {
        Some(full) => top_component(ctx, component, at, full),
        None => inner_component(ctx, component, at),
    };
    match op {
        Operator::Sum(terms) => {
            for (_, o) in terms {
                components_at(ctx, o, at, top)?;
            }
            Ok(())
        }
        Operator::Scalar(a, b) => {
            components_at(ctx, a, at, None)?;
            components_at(ctx, b, at, None)
        }
        Operator::Elementary { component, .. } => own(component),
        Operator::Coupled {
            left,
            right,
            component,
            ..
        } => {
            components_at(ctx, left, at, None)?;
            components_at(ctx, right, at, None)?;
            own(component)
        }
    }
}

fn top_component(ctx: &Ctx, component: &Option<Lin>, at: usize, full: bool) -> R<()> {
    match (component, full) {
        (None, true) => Err(ctx.err(
            at,
            "a matrix element between states with projections needs the operator's component: write T[k, q]",
        )),
        (Some(_), false) => Err(ctx.err(
            at,
            "a reduced matrix element takes the operator without a component: write T[k]",
        )),
        _ => Ok(()),
    }
}

fn inner_component(ctx: &Ctx, component: &Option<Lin>, at: usize) -> R<()> {
    match component {
        Some(_) => Err(ctx.err(
            at,
            "the components of the factors of a product are summed: write T[k] inside [A x B][k, q] and (A . B)",
        )),
        None => Ok(()),
    }
}
