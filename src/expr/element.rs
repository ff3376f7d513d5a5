//! Matrix elements of tensor operators between coupled states: the
//! states (a coupling tree with an optional projection), the operator
//! expressions (elementary tensor operators on a node of the tree, coupled
//! and scalar products, sums with rational coefficients) and the matrix
//! element `<BRA | OP | KET>` or reduced matrix element `<BRA || OP || KET>`
//! that the factor `Factor::Element` holds. Knows the traversal order of
//! every linear form inside (so a factor can be renamed and substituted
//! like any other), the triads a matrix element implies and when one is
//! irreducible (an opaque operator alone, reduced).

use super::lin::{Lin, Q};
use super::tree::CouplingTree;

/// A path from the root of a coupling tree: `false` goes left, `true` right.
pub type NodePath = Vec<bool>;

/// A coupled state: a coupling tree and, in a full matrix element, the
/// projection of its total angular momentum.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
pub struct State {
    /// the coupling scheme with its labels
    pub tree: CouplingTree,
    /// the projection `M` (absent in a reduced matrix element)
    pub projection: Option<Lin>,
}

/// The built-in operators and the opaque ones.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
pub enum OperatorName {
    /// `J[1]`: the angular momentum of the node it acts on
    AngularMomentum,
    /// `C[k]`: Racah's renormalised spherical harmonic (an orbital node)
    Spherical,
    /// `u[k]`: the unit tensor
    Unit,
    /// any other name: its single-node reduced matrix element stays a symbol
    Opaque(String),
}

impl OperatorName {
    /// The operator name as written.
    pub fn text(&self) -> &str {
        match self {
            OperatorName::AngularMomentum => "J",
            OperatorName::Spherical => "C",
            OperatorName::Unit => "u",
            OperatorName::Opaque(s) => s,
        }
    }

    /// The name as written, to the operator it means.
    pub fn from_text(s: &str) -> OperatorName {
        match s {
            "J" => OperatorName::AngularMomentum,
            "C" => OperatorName::Spherical,
            "u" => OperatorName::Unit,
            _ => OperatorName::Opaque(s.to_string()),
        }
    }
}

/// An operator expression.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
pub enum Operator {
    /// `T[k] @ node` or `T[k, q] @ node`
    Elementary {
        /// which operator
        name: OperatorName,
        /// its rank
        rank: Lin,
        /// its component, when one is selected
        component: Option<Lin>,
        /// the node of the bra's tree it acts on
        node: NodePath,
    },
    /// `[A x B][k]` or `[A x B][k, q]`
    Coupled {
        /// the left factor
        left: Box<Operator>,
        /// the right factor
        right: Box<Operator>,
        /// the rank of the product
        rank: Lin,
        /// its component, when one is selected
        component: Option<Lin>,
    },
    /// `(A . B)`: `sum(q: (-1)^q A[k, q] B[k, -q])`
    Scalar(Box<Operator>, Box<Operator>),
    /// `c1 A + c2 B + ...`
    Sum(Vec<(Q, Operator)>),
}

impl Operator {
    /// The rank of the operator, when all its terms agree on one.
    pub fn rank(&self) -> Option<Lin> {
        match self {
            Operator::Elementary { rank, .. } | Operator::Coupled { rank, .. } => {
                Some(rank.clone())
            }
            Operator::Scalar(..) => Some(Lin::zero()),
            Operator::Sum(terms) => shared(terms, Operator::rank),
        }
    }

    /// The selected component, when all terms agree on one (a scalar
    /// product has component 0).
    pub fn component(&self) -> Option<Lin> {
        match self {
            Operator::Elementary { component, .. } | Operator::Coupled { component, .. } => {
                component.clone()
            }
            Operator::Scalar(..) => Some(Lin::zero()),
            Operator::Sum(terms) => shared(terms, Operator::component),
        }
    }

    /// The same operator with its top-level component set (each term of a
    /// sum; a scalar product keeps its implicit 0).
    pub fn with_component(&self, q: Option<Lin>) -> Operator {
        match self {
            Operator::Elementary {
                name, rank, node, ..
            } => Operator::Elementary {
                name: name.clone(),
                rank: rank.clone(),
                component: q,
                node: node.clone(),
            },
            Operator::Coupled {
                left, right, rank, ..
            } => Operator::Coupled {
                left: left.clone(),
                right: right.clone(),
                rank: rank.clone(),
                component: q,
            },
            Operator::Scalar(..) => self.clone(),
            Operator::Sum(terms) => Operator::Sum(
                terms
                    .iter()
                    .map(|(c, o)| (*c, o.with_component(q.clone())))
                    .collect(),
            ),
        }
    }

    /// Every elementary operator inside, left to right.
    pub fn elementaries(&self) -> Vec<&Operator> {
        match self {
            Operator::Elementary { .. } => vec![self],
            Operator::Coupled { left, right, .. } | Operator::Scalar(left, right) => {
                let mut v = left.elementaries();
                v.extend(right.elementaries());
                v
            }
            Operator::Sum(terms) => terms.iter().flat_map(|(_, o)| o.elementaries()).collect(),
        }
    }

    fn lins_into<'a>(&'a self, out: &mut Vec<&'a Lin>) {
        match self {
            Operator::Elementary {
                rank, component, ..
            } => {
                out.push(rank);
                out.extend(component.iter());
            }
            Operator::Coupled {
                left,
                right,
                rank,
                component,
            } => {
                left.lins_into(out);
                right.lins_into(out);
                out.push(rank);
                out.extend(component.iter());
            }
            Operator::Scalar(a, b) => {
                a.lins_into(out);
                b.lins_into(out);
            }
            Operator::Sum(terms) => terms.iter().for_each(|(_, o)| o.lins_into(out)),
        }
    }

    fn map_lins(&self, f: &mut dyn FnMut(&Lin) -> Lin) -> Operator {
        match self {
            Operator::Elementary {
                name,
                rank,
                component,
                node,
            } => {
                let rank = f(rank);
                let component = component.as_ref().map(&mut *f);
                Operator::Elementary {
                    name: name.clone(),
                    rank,
                    component,
                    node: node.clone(),
                }
            }
            Operator::Coupled {
                left,
                right,
                rank,
                component,
            } => {
                let left = Box::new(left.map_lins(f));
                let right = Box::new(right.map_lins(f));
                let rank = f(rank);
                let component = component.as_ref().map(&mut *f);
                Operator::Coupled {
                    left,
                    right,
                    rank,
                    component,
                }
            }
            Operator::Scalar(a, b) => {
                let a = Box::new(a.map_lins(f));
                Operator::Scalar(a, Box::new(b.map_lins(f)))
            }
            Operator::Sum(terms) => {
                Operator::Sum(terms.iter().map(|(c, o)| (*c, o.map_lins(f))).collect())
            }
        }
    }

    /// The (rank, component) pairs of every component written or implied.
    fn columns_into<'a>(&'a self, out: &mut Vec<(&'a Lin, &'a Lin)>) {
        match self {
            Operator::Elementary {
                rank,
                component: Some(q),
                ..
            } => out.push((rank, q)),
            Operator::Elementary { .. } => {}
            Operator::Coupled {
                left,
                right,
                rank,
                component,
            } => {
                left.columns_into(out);
                right.columns_into(out);
                if let Some(q) = component {
                    out.push((rank, q));
                }
            }
            Operator::Scalar(a, b) => {
                a.columns_into(out);
                b.columns_into(out);
            }
            Operator::Sum(terms) => terms.iter().for_each(|(_, o)| o.columns_into(out)),
        }
    }
}

/// `<BRA | OP | KET>` (projections present) or `<BRA || OP || KET>`.
#[derive(Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Debug)]
pub struct MatrixElement {
    /// the bra state
    pub bra: State,
    /// the operator
    pub op: Operator,
    /// the ket state (the bra's tree shape)
    pub ket: State,
}

impl MatrixElement {
    /// True for a reduced matrix element (no projections).
    pub fn is_reduced(&self) -> bool {
        self.bra.projection.is_none()
    }

    /// True for a reduced matrix element of an opaque operator acting on
    /// the root: a symbol no rule reduces further.
    pub fn is_irreducible(&self) -> bool {
        self.is_reduced()
            && matches!(&self.op, Operator::Elementary { name: OperatorName::Opaque(_), node, .. } if node.is_empty())
    }

    /// Every linear form inside, in a fixed order: bra labels (pre-order),
    /// bra projection, operator forms, ket labels, ket projection.
    pub fn lins(&self) -> Vec<&Lin> {
        let mut out = Vec::new();
        tree_lins(&self.bra.tree, &mut out);
        out.extend(self.bra.projection.iter());
        self.op.lins_into(&mut out);
        tree_lins(&self.ket.tree, &mut out);
        out.extend(self.ket.projection.iter());
        out
    }

    /// The same element with `f` applied to every linear form, in `lins`
    /// order.
    pub fn map_lins(&self, f: &mut dyn FnMut(&Lin) -> Lin) -> MatrixElement {
        let bra_tree = map_tree(&self.bra.tree, f);
        let bra_projection = self.bra.projection.as_ref().map(&mut *f);
        let op = self.op.map_lins(f);
        let ket_tree = map_tree(&self.ket.tree, f);
        let ket_projection = self.ket.projection.as_ref().map(&mut *f);
        MatrixElement {
            bra: State {
                tree: bra_tree,
                projection: bra_projection,
            },
            op,
            ket: State {
                tree: ket_tree,
                projection: ket_projection,
            },
        }
    }

    /// The forms in angular-momentum places: tree labels and ranks.
    pub fn j_slots(&self) -> Vec<&Lin> {
        let mut out = Vec::new();
        tree_lins(&self.bra.tree, &mut out);
        tree_lins(&self.ket.tree, &mut out);
        collect_ranks(&self.op, &mut out);
        out
    }

    /// The forms in projection places: the projections and components.
    pub fn m_slots(&self) -> Vec<&Lin> {
        self.columns().into_iter().map(|(_, m)| m).collect()
    }

    /// The `(j, m)` pairs whose inadmissibility makes the element 0: total
    /// angular momenta with their projections, and the rank with its
    /// component when the operator is one term (in a sum, a term with an
    /// inadmissible component vanishes alone).
    pub fn columns(&self) -> Vec<(&Lin, &Lin)> {
        let mut out = Vec::new();
        if let Some(m) = &self.bra.projection {
            out.push((self.bra.tree.label(), m));
        }
        if !matches!(self.op, Operator::Sum(_)) {
            self.op.columns_into(&mut out);
        }
        if let Some(m) = &self.ket.projection {
            out.push((self.ket.tree.label(), m));
        }
        out
    }

    /// The projection conservation `-M + q + M'` of a full element whose
    /// operator has one component.
    pub fn conservation(&self) -> Option<Lin> {
        let (m, mk) = (self.bra.projection.as_ref()?, self.ket.projection.as_ref()?);
        let q = self.op.component()?;
        Some(&(&q + mk) - m)
    }

    /// The triads implied: every coupling of the bra and of the ket, and
    /// `(J, k, J')` when the operator has one rank.
    pub fn triads(&self) -> Vec<[&Lin; 3]> {
        let mut out = Vec::new();
        tree_triads(&self.bra.tree, &mut out);
        tree_triads(&self.ket.tree, &mut out);
        if let Some(k) = self.uniform_rank() {
            out.push([self.bra.tree.label(), k, self.ket.tree.label()]);
        }
        out
    }

    /// Every coupling of the bra's and the ket's trees as a triad (owned).
    pub fn triads_of_trees(&self) -> Vec<[Lin; 3]> {
        let mut out = Vec::new();
        tree_triads(&self.bra.tree, &mut out);
        tree_triads(&self.ket.tree, &mut out);
        out.into_iter()
            .map(|[a, b, c]| [a.clone(), b.clone(), c.clone()])
            .collect()
    }

    /// The rank of the operator as a form stored inside (so it can be
    /// borrowed), when there is one.
    fn uniform_rank(&self) -> Option<&Lin> {
        let k = self.op.rank()?;
        let mut cols = Vec::new();
        collect_ranks(&self.op, &mut cols);
        let scalar_zero = matches!(self.op, Operator::Scalar(..));
        if scalar_zero {
            return None;
        }
        cols.into_iter().find(|l| **l == k)
    }
}

/// The value every term of a sum agrees on, if they agree.
fn shared(terms: &[(Q, Operator)], of: impl Fn(&Operator) -> Option<Lin>) -> Option<Lin> {
    let first = of(&terms.first()?.1)?;
    terms
        .iter()
        .all(|(_, o)| of(o).as_ref() == Some(&first))
        .then_some(first)
}

fn collect_ranks<'a>(op: &'a Operator, out: &mut Vec<&'a Lin>) {
    match op {
        Operator::Elementary { rank, .. } => out.push(rank),
        Operator::Coupled {
            left, right, rank, ..
        } => {
            collect_ranks(left, out);
            collect_ranks(right, out);
            out.push(rank);
        }
        Operator::Scalar(a, b) => {
            collect_ranks(a, out);
            collect_ranks(b, out);
        }
        Operator::Sum(terms) => terms.iter().for_each(|(_, o)| collect_ranks(o, out)),
    }
}

/// The labels of a tree in pre-order (node label, then left, then right).
pub fn tree_lins<'a>(t: &'a CouplingTree, out: &mut Vec<&'a Lin>) {
    match t {
        CouplingTree::Leaf(l) => out.push(l),
        CouplingTree::Node(a, b, l) => {
            out.push(l);
            tree_lins(a, out);
            tree_lins(b, out);
        }
    }
}

fn map_tree(t: &CouplingTree, f: &mut dyn FnMut(&Lin) -> Lin) -> CouplingTree {
    match t {
        CouplingTree::Leaf(l) => CouplingTree::Leaf(f(l)),
        CouplingTree::Node(a, b, l) => {
            let l = f(l);
            let a = map_tree(a, f);
            CouplingTree::Node(Box::new(a), Box::new(map_tree(b, f)), l)
        }
    }
}

fn tree_triads<'a>(t: &'a CouplingTree, out: &mut Vec<[&'a Lin; 3]>) {
    if let CouplingTree::Node(a, b, l) = t {
        out.push([a.label(), b.label(), l]);
        tree_triads(a, out);
        tree_triads(b, out);
    }
}

/// The subtree at a path, if the path exists.
pub fn subtree<'a>(t: &'a CouplingTree, path: &[bool]) -> Option<&'a CouplingTree> {
    match (path.split_first(), t) {
        (None, _) => Some(t),
        (Some((false, rest)), CouplingTree::Node(a, _, _)) => subtree(a, rest),
        (Some((true, rest)), CouplingTree::Node(_, b, _)) => subtree(b, rest),
        _ => None,
    }
}

/// Every node path of a tree in pre-order.
pub fn node_paths(t: &CouplingTree) -> Vec<NodePath> {
    fn go(t: &CouplingTree, at: &mut NodePath, out: &mut Vec<NodePath>) {
        out.push(at.clone());
        if let CouplingTree::Node(a, b, _) = t {
            at.push(false);
            go(a, at, out);
            at.pop();
            at.push(true);
            go(b, at, out);
            at.pop();
        }
    }
    let mut out = Vec::new();
    go(t, &mut Vec::new(), &mut out);
    out
}

/// True when two trees have the same shape.
pub fn same_shape(a: &CouplingTree, b: &CouplingTree) -> bool {
    match (a, b) {
        (CouplingTree::Leaf(_), CouplingTree::Leaf(_)) => true,
        (CouplingTree::Node(a1, a2, _), CouplingTree::Node(b1, b2, _)) => {
            same_shape(a1, b1) && same_shape(a2, b2)
        }
        _ => false,
    }
}
