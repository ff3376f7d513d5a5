//! Binary coupling trees: `((j1, j2) j12, j3) J` is the state where j1 and
//! j2 couple to j12, and j12 with j3 to J. Leaves are names or numbers.

use super::lin::Lin;
use std::fmt;

/// A leaf or an intermediate/total angular momentum label.
pub type TreeLeaf = Lin;

/// A binary coupling tree.
#[derive(Clone, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum CouplingTree {
    /// an angular momentum being coupled
    Leaf(TreeLeaf),
    /// `(left, right) label`
    Node(Box<CouplingTree>, Box<CouplingTree>, TreeLeaf),
}

impl CouplingTree {
    /// The label of this node or the leaf itself.
    pub fn label(&self) -> &TreeLeaf {
        match self {
            CouplingTree::Leaf(l) => l,
            CouplingTree::Node(_, _, l) => l,
        }
    }

    /// The leaves from left to right.
    pub fn leaves(&self) -> Vec<&TreeLeaf> {
        match self {
            CouplingTree::Leaf(l) => vec![l],
            CouplingTree::Node(a, b, _) => {
                let mut v = a.leaves();
                v.extend(b.leaves());
                v
            }
        }
    }

    /// The labels of the internal nodes, root last (post-order).
    pub fn internal_labels(&self) -> Vec<&TreeLeaf> {
        match self {
            CouplingTree::Leaf(_) => vec![],
            CouplingTree::Node(a, b, l) => {
                let mut v = a.internal_labels();
                v.extend(b.internal_labels());
                v.push(l);
                v
            }
        }
    }
}

impl fmt::Display for CouplingTree {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            CouplingTree::Leaf(l) => write!(f, "{l}"),
            CouplingTree::Node(a, b, l) => write!(f, "({a}, {b}) {l}"),
        }
    }
}
