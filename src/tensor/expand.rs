//! The symbolic route from a matrix element to a projection sum the graph
//! reduction knows:
//! - `split_sum`: a matrix element of a sum of operators whose terms do
//!   not share one rank and component is the sum of their elements;
//! - `wigner_eckart`: a full matrix element is a 3j symbol times the
//!   reduced matrix element (Edmonds's convention);
//! - `expand_reduced`: a reduced matrix element is the Wigner–Eckart sum
//!   over its projections of the full one, written out by expanding both
//!   coupled states in Clebsch–Gordan coefficients down to the subsystems
//!   the operators act on, the tensor products in their components, and
//!   each elementary operator by the Wigner–Eckart theorem on its own
//!   subsystem with its reduced matrix element (built-in, or an opaque
//!   symbol). Subsystems no operator touches give deltas.

use super::builtin::builtin;
use crate::expr::element::{subtree, NodePath};
use crate::expr::term::big_q;
use crate::expr::{
    CouplingTree, Expr, Factor, Lin, MatrixElement, Name, Operator, OperatorName, State, Term,
    TermParts,
};
use crate::rules::source::Source;
use num_rational::BigRational;
use std::collections::BTreeSet;

/// Why a matrix element cannot be written as a projection sum.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{0}")]
pub struct ExpandError(pub String);

/// Most elementary operators one matrix element may hold (each adds a
/// 3j, a summed component and possibly an intermediate state).
pub const MAX_OPERATORS: usize = 16;

/// Most products of elementary operators the expansion writes out.
pub const MAX_CHAINS: usize = 256;

/// The message of the size limits (the caller reports it as a limit).
pub fn size_problem(e: &MatrixElement) -> Option<String> {
    let n = e.op.elementaries().len();
    (n > MAX_OPERATORS).then(|| {
        format!(
            "a matrix element with {n} elementary operators is beyond what recoup expands ({MAX_OPERATORS})"
        )
    })
}

/// Names not yet in use.
struct Fresh {
    used: BTreeSet<Name>,
}

impl Fresh {
    fn name(&mut self, base: &str) -> Name {
        let mut n = Name::new(base);
        while self.used.contains(&n) {
            n = n.primed();
        }
        self.used.insert(n.clone());
        n
    }
}


/// One elementary operator's component inside a product.
#[derive(Clone)]
struct Component {
    name: OperatorName,
    rank: Lin,
    q: Lin,
    node: NodePath,
}

/// A product of elementary components (leftmost acts last) with its
/// coefficient.
#[derive(Clone)]
struct Chain {
    weight: TermParts,
    ops: Vec<Component>,
}

fn chains(op: &Operator, q: Option<&Lin>, fresh: &mut Fresh) -> Result<Vec<Chain>, ExpandError> {
    match op {
        Operator::Elementary {
            name,
            rank,
            component,
            node,
        } => {
            let q = q
                .or(component.as_ref())
                .ok_or_else(|| ExpandError("an operator needs a component here".into()))?;
            Ok(vec![Chain {
                weight: TermParts::default(),
                ops: vec![Component {
                    name: name.clone(),
                    rank: rank.clone(),
                    q: q.clone(),
                    node: node.clone(),
                }],
            }])
        }
        Operator::Coupled {
            left,
            right,
            rank,
            component,
        } => {
            let q = q
                .or(component.as_ref())
                .ok_or_else(|| ExpandError("a coupled product needs a component here".into()))?
                .clone();
            let (k1, k2) = (left.rank(), right.rank());
            let (Some(k1), Some(k2)) = (k1, k2) else {
                return Err(ExpandError(
                    "each factor of a coupled product needs one rank".into(),
                ));
            };
            // both components are summed names (the Clebsch-Gordan
            // coefficient keeps q1 + q2 = q): a graph line each
            let q1 = fresh.name("q");
            let q2 = fresh.name("q");
            let q1l = Lin::var(q1.clone());
            let q2l = Lin::var(q2.clone());
            let ls = chains(left, Some(&q1l), fresh)?;
            let rs = chains(right, Some(&q2l), fresh)?;
            let mut coupling = TermParts::default();
            coupling.factors.push(Factor::Cg([
                k1,
                q1l.clone(),
                k2,
                q2l.clone(),
                rank.clone(),
                q.clone(),
            ]));
            coupling.bound.push(q1);
            coupling.bound.push(q2);
            Ok(product(&coupling, &ls, &rs))
        }
        Operator::Scalar(a, b) => {
            let p = fresh.name("q");
            let pl = Lin::var(p.clone());
            let ls = chains(a, Some(&pl), fresh)?;
            let rs = chains(b, Some(&-&pl), fresh)?;
            let mut coupling = TermParts {
                phase: pl.clone(),
                ..Default::default()
            };
            coupling.bound.push(p);
            Ok(product(&coupling, &ls, &rs))
        }
        Operator::Sum(terms) => {
            let mut out = Vec::new();
            for (c, o) in terms {
                for mut ch in chains(o, q, fresh)? {
                    ch.weight.coef = &ch.weight.coef * &big_q(*c);
                    out.push(ch);
                }
            }
            Ok(out)
        }
    }
}

fn product(coupling: &TermParts, ls: &[Chain], rs: &[Chain]) -> Vec<Chain> {
    let mut out = Vec::new();
    for l in ls {
        for r in rs {
            let mut ops = l.ops.clone();
            ops.extend(r.ops.iter().cloned());
            out.push(Chain {
                weight: coupling.times(&l.weight).times(&r.weight),
                ops,
            });
        }
    }
    out
}

/// Replaces `J[1]` on a node above another operator's node by the sum of
/// `J[1]` on the leaves below it (the total angular momentum is the sum
/// of its parts), until no two nodes of a chain are nested.
fn unnest(chain: Chain, tree: &CouplingTree) -> Result<Vec<Chain>, ExpandError> {
    let nested = chain.ops.iter().enumerate().find_map(|(i, a)| {
        chain
            .ops
            .iter()
            .any(|b| b.node.len() > a.node.len() && b.node.starts_with(&a.node))
            .then_some(i)
    });
    let Some(i) = nested else {
        return Ok(vec![chain]);
    };
    if chain.ops[i].name != OperatorName::AngularMomentum {
        return Err(ExpandError(
            "an operator other than J[1] acts on a subsystem that contains another operator's subsystem; write the operators on separate subsystems".into(),
        ));
    }
    let top = subtree(tree, &chain.ops[i].node).expect("the node exists");
    let mut out = Vec::new();
    for leaf in leaf_paths(top, &chain.ops[i].node) {
        let mut c = chain.clone();
        c.ops[i].node = leaf;
        out.extend(unnest(c, tree)?);
    }
    Ok(out)
}

fn leaf_paths(t: &CouplingTree, at: &NodePath) -> Vec<NodePath> {
    match t {
        CouplingTree::Leaf(_) => vec![at.clone()],
        CouplingTree::Node(a, b, _) => {
            let mut l = at.clone();
            l.push(false);
            let mut r = at.clone();
            r.push(true);
            let mut v = leaf_paths(a, &l);
            v.extend(leaf_paths(b, &r));
            v
        }
    }
}

/// The projection name of a node: `m_` and its label's name (`m_l`,
/// `m_j1`; LaTeX `m_{l}`, `m_{j_1}`).
fn projection_base(label: &Lin, ket: bool) -> String {
    let base = match label.as_var() {
        Some(n) => format!("m_{}", n.as_str().trim_end_matches('\'')),
        None => "m".to_string(),
    };
    if ket {
        format!("{base}'")
    } else {
        base
    }
}

/// The full matrix element `<bra, M | chain | ket, M'>` written out.
fn chain_term(
    chain: &Chain,
    bra: &CouplingTree,
    ket: &CouplingTree,
    m: &Lin,
    mk: &Lin,
    avoid: &BTreeSet<Name>,
    fresh: &mut Fresh,
) -> Result<Term, ExpandError> {
    let active: Vec<&NodePath> = chain.ops.iter().map(|c| &c.node).collect();
    let mut b = chain.weight.clone();
    let mut extra: Vec<Term> = Vec::new();
    // walk both trees together from the root; a node is expanded when an
    // active node lies strictly below it
    struct Walk<'a> {
        active: Vec<&'a NodePath>,
        b: TermParts,
        fresh: &'a mut Fresh,
        frontier: Vec<(NodePath, Lin, Lin)>,
    }
    fn walk(
        w: &mut Walk,
        bt: &CouplingTree,
        kt: &CouplingTree,
        at: &mut NodePath,
        m: Lin,
        mk: Lin,
    ) {
        let below = w
            .active
            .iter()
            .any(|p| p.len() > at.len() && p.starts_with(at));
        match (bt, kt, below) {
            (CouplingTree::Node(ba, bb, bl), CouplingTree::Node(ka, kb, kl), true) => {
                let names = [
                    projection_base(ba.label(), false),
                    projection_base(bb.label(), false),
                ];
                let (ma, mb) = (w.fresh.name(&names[0]), w.fresh.name(&names[1]));
                // a child no operator reaches keeps its projection on both
                // sides; otherwise the ket side gets its own name
                let reached = |side: bool, w: &Walk| {
                    let mut p = at.clone();
                    p.push(side);
                    w.active.iter().any(|a| a.starts_with(&p))
                };
                let mka = if reached(false, w) {
                    w.fresh.name(&projection_base(ka.label(), true))
                } else {
                    ma.clone()
                };
                let mkb = if reached(true, w) {
                    w.fresh.name(&projection_base(kb.label(), true))
                } else {
                    mb.clone()
                };
                for n in [&ma, &mb, &mka, &mkb] {
                    if !w.b.bound.contains(n) {
                        w.b.bound.push(n.clone());
                    }
                }
                let (lma, lmb, lmka, lmkb) =
                    (Lin::var(ma), Lin::var(mb), Lin::var(mka), Lin::var(mkb));
                w.b.factors.push(Factor::Cg([
                    ba.label().clone(),
                    lma.clone(),
                    bb.label().clone(),
                    lmb.clone(),
                    bl.clone(),
                    m,
                ]));
                w.b.factors.push(Factor::Cg([
                    ka.label().clone(),
                    lmka.clone(),
                    kb.label().clone(),
                    lmkb.clone(),
                    kl.clone(),
                    mk,
                ]));
                at.push(false);
                walk(w, ba, ka, at, lma, lmka);
                at.pop();
                at.push(true);
                walk(w, bb, kb, at, lmb, lmkb);
                at.pop();
            }
            _ => {
                if w.active.iter().any(|p| p.as_slice() == at.as_slice()) {
                    w.frontier.push((at.clone(), m, mk));
                } else {
                    // untouched: equal labels, equal projection
                    let mut bl = Vec::new();
                    let mut kl = Vec::new();
                    crate::expr::element::tree_lins(bt, &mut bl);
                    crate::expr::element::tree_lins(kt, &mut kl);
                    for (x, y) in bl.into_iter().zip(kl) {
                        if x != y {
                            w.b.factors.push(Factor::Delta(x.clone(), y.clone()));
                        }
                    }
                    if m != mk {
                        w.b.factors.push(Factor::Delta(m, mk));
                    }
                }
            }
        }
    }
    let mut w = Walk {
        active,
        b: TermParts::default(),
        fresh,
        frontier: Vec::new(),
    };
    walk(&mut w, bra, ket, &mut Vec::new(), m.clone(), mk.clone());
    let Walk {
        b: coupling,
        frontier,
        fresh,
        ..
    } = w;
    b = b.times(&coupling);
    for (path, mb, mkb) in frontier {
        let ops: Vec<&Component> = chain.ops.iter().filter(|c| c.node == path).collect();
        let bsub = subtree(bra, &path).expect("the node exists");
        let ksub = subtree(ket, &path).expect("the ket has the bra's shape");
        let inner = matches!(bsub, CouplingTree::Node(..));
        if inner && ops.len() > 1 && ops.iter().any(|c| c.name != OperatorName::AngularMomentum) {
            return Err(ExpandError(
                "two operators on one coupled subsystem: only J[1] may act there more than once"
                    .into(),
            ));
        }
        // states between consecutive operators: fresh labels and projections
        let mut labels: Vec<Lin> = vec![bsub.label().clone()];
        let mut projections: Vec<Lin> = vec![mb.clone()];
        for _ in 1..ops.len() {
            let base = match bsub.label().as_var() {
                Some(n) => format!("{}''", n.as_str().trim_end_matches('\'')),
                None => "j''".to_string(),
            };
            let x = fresh.name(&base);
            let mu = fresh.name(&projection_base(&Lin::var(x.clone()), false));
            b.bound.push(x.clone());
            b.bound.push(mu.clone());
            labels.push(Lin::var(x));
            projections.push(Lin::var(mu));
        }
        labels.push(ksub.label().clone());
        projections.push(mkb.clone());
        for (i, c) in ops.iter().enumerate() {
            let (x, y) = (&labels[i], &labels[i + 1]);
            let (mx, my) = (&projections[i], &projections[i + 1]);
            // <x mx | T[k, q] | y my> = (-1)^(x-mx) (x, k, y; -mx, q, my) <x || T || y>
            b.phase = &(&b.phase + x) - mx;
            b.factors.push(Factor::ThreeJ([
                x.clone(),
                c.rank.clone(),
                y.clone(),
                -mx,
                c.q.clone(),
                my.clone(),
            ]));
            let last = i + 1 == ops.len();
            match &c.name {
                OperatorName::Opaque(_) => {
                    let side = |t: &CouplingTree, label: &Lin| match t {
                        CouplingTree::Leaf(_) => CouplingTree::Leaf(label.clone()),
                        CouplingTree::Node(l, r, _) => {
                            CouplingTree::Node(l.clone(), r.clone(), label.clone())
                        }
                    };
                    let bra_side = side(bsub, x);
                    let ket_side = if last { ksub.clone() } else { side(bsub, y) };
                    b.factors.push(Factor::Element(Box::new(MatrixElement {
                        bra: State {
                            tree: bra_side,
                            projection: None,
                        },
                        op: Operator::Elementary {
                            name: c.name.clone(),
                            rank: c.rank.clone(),
                            component: None,
                            node: Vec::new(),
                        },
                        ket: State {
                            tree: ket_side,
                            projection: None,
                        },
                    })));
                }
                name => {
                    let entry = builtin(name).expect("every named operator is built in");
                    let rme = entry.instance(x, y, &c.rank, avoid);
                    match rme.terms() {
                        [t] if t.bound().is_empty() => extra.push(t.clone()),
                        [] => b.coef = BigRational::from_integer(0.into()),
                        _ => {
                            return Err(ExpandError(
                                "a built-in reduced matrix element must be one product".into(),
                            ))
                        }
                    }
                    if last && inner {
                        // the operator leaves the parts of a coupled
                        // subsystem as they are
                        let mut bl = Vec::new();
                        let mut kl = Vec::new();
                        crate::expr::element::tree_lins(bsub, &mut bl);
                        crate::expr::element::tree_lins(ksub, &mut kl);
                        for (u, v) in bl.into_iter().zip(kl).skip(1) {
                            if u != v {
                                b.factors.push(Factor::Delta(u.clone(), v.clone()));
                            }
                        }
                    }
                }
            }
        }
    }
    let mut t = b.normalized();
    for x in &extra {
        t = t.mul_inside(x);
    }
    Ok(t)
}

/// `<BRA | O | KET>` for a full matrix element, or the Wigner–Eckart sum
/// for a reduced one, as a projection sum.
pub fn expand_reduced(e: &MatrixElement, avoid: &BTreeSet<Name>) -> Result<Expr, ExpandError> {
    if !e.is_reduced() || e.is_irreducible() {
        return Err(ExpandError(
            "only a reduced matrix element of a composite operator is expanded".into(),
        ));
    }
    let k =
        e.op.rank()
            .ok_or_else(|| ExpandError("the operator needs one rank".into()))?;
    let mut used = avoid.clone();
    for l in e.lins() {
        used.extend(l.vars().cloned());
    }
    let mut fresh = Fresh { used };
    let big_m = fresh.name(&projection_base(e.bra.tree.label(), false));
    let big_mk = fresh.name(&projection_base(e.ket.tree.label(), true));
    let q = fresh.name("q");
    let (lm, lmk, lq) = (
        Lin::var(big_m.clone()),
        Lin::var(big_mk.clone()),
        Lin::var(q.clone()),
    );
    // (-1)^(J-M) (J, k, J'; -M, q, M')
    let mut outer = TermParts {
        phase: e.bra.tree.label() - &lm,
        ..Default::default()
    };
    outer.factors.push(Factor::ThreeJ([
        e.bra.tree.label().clone(),
        k,
        e.ket.tree.label().clone(),
        -&lm,
        lq.clone(),
        lmk.clone(),
    ]));
    outer.bound.extend([big_m, big_mk, q]);
    // a coupled state exists only where every coupling satisfies the
    // triangle rule; inside a subsystem left unexpanded no Clebsch-Gordan
    // coefficient says so (the normal form drops the implied ones)
    for t in e.triads_of_trees() {
        outer.factors.push(Factor::Tri(t));
    }
    let mut out = Expr::zero();
    let all_avoid = fresh.used.clone();
    let all = chains(&e.op, Some(&lq), &mut fresh)?;
    if all.len() > MAX_CHAINS {
        return Err(ExpandError(format!(
            "the operator multiplies out to {} products of elementary operators, beyond the {MAX_CHAINS} recoup expands",
            all.len()
        )));
    }
    for chain in all {
        for chain in unnest(chain, &e.bra.tree)? {
            let t = chain_term(
                &chain,
                &e.bra.tree,
                &e.ket.tree,
                &lm,
                &lmk,
                &all_avoid,
                &mut fresh,
            )?;
            out.push(outer.clone().normalized().mul_inside(&t));
        }
    }
    Ok(out)
}

/// A full matrix element whose operator has one rank and one component:
/// `(-1)^(J-M) (J, k, J'; -M, q, M') <BRA || O || KET>` (Edmonds 1957,
/// eq. 5.4.1).
pub fn wigner_eckart(e: &MatrixElement) -> Option<Expr> {
    let (m, mk) = (e.bra.projection.as_ref()?, e.ket.projection.as_ref()?);
    let k = e.op.rank()?;
    let q = e.op.component()?;
    let reduced = MatrixElement {
        bra: State {
            tree: e.bra.tree.clone(),
            projection: None,
        },
        op: e.op.with_component(None),
        ket: State {
            tree: e.ket.tree.clone(),
            projection: None,
        },
    };
    let mut t = TermParts {
        phase: e.bra.tree.label() - m,
        ..Default::default()
    };
    t.factors.push(Factor::ThreeJ([
        e.bra.tree.label().clone(),
        k,
        e.ket.tree.label().clone(),
        -m,
        q,
        mk.clone(),
    ]));
    t.factors.push(Factor::Element(Box::new(reduced)));
    Some(Expr::from_term(t.normalized()))
}

/// A full matrix element of a sum whose terms differ in rank or component:
/// the sum of the terms' elements.
pub fn split_sum(e: &MatrixElement) -> Option<Expr> {
    if e.is_reduced() || (e.op.rank().is_some() && e.op.component().is_some()) {
        return None;
    }
    let Operator::Sum(terms) = &e.op else {
        return None;
    };
    let mut out = Expr::zero();
    for (c, o) in terms {
        let mut b = TermParts {
            coef: big_q(*c),
            ..Default::default()
        };
        b.factors.push(Factor::Element(Box::new(MatrixElement {
            bra: e.bra.clone(),
            op: o.clone(),
            ket: e.ket.clone(),
        })));
        out.push(b.normalized());
    }
    Some(out)
}

/// The source of the Wigner–Eckart step.
pub fn wigner_eckart_source() -> Source {
    Source::parse("edmonds1957 eq. 5.4.1 -- the Wigner-Eckart theorem; from memory")
        .expect("parses")
}

/// The source of the expansion of a reduced matrix element.
pub fn expansion_source() -> Source {
    Source::parse(
        "edmonds1957 eqs. 3.5.2, 5.1.6 and 5.4.1 -- coupled states in Clebsch-Gordan coefficients, tensor products by their components, each operator by the Wigner-Eckart theorem on its own subsystem, summed over projections with 3j orthogonality (eq. 3.7.8); from memory",
    )
    .expect("parses")
}

/// The source of the splitting of a sum of operators.
pub fn linearity_source() -> Source {
    Source::default()
        .noted("a matrix element is linear in its operator (common practice, no source)")
}
