//! The data model: linear forms, factors, terms and sums, and coupling
//! trees. Everything after `syntax` works on these types.

pub mod element;
pub mod factor;
pub mod lin;
pub mod name;
pub mod term;
pub mod tree;

pub use element::{MatrixElement, Operator, OperatorName, State};
pub use factor::{Factor, Kind};
pub use lin::{Lin, Q};
pub use name::Name;
pub use term::{Expr, Term, TermParts};
pub use tree::{CouplingTree, TreeLeaf};
