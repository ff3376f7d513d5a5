//! Algebra on the data model that needs no numbers: selection rules as
//! linear constraints (and, later, phases modulo integrality and symmetry
//! canonical forms).

pub mod declare;
pub mod lattice;
pub mod normal;
pub mod selection;
pub mod symmetry;
pub mod unify;
