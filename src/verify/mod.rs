//! Verification: admissible assignments (random and exhaustive) and
//! spot-evaluation of two expressions against each other.

pub mod check;
pub mod diagnose;
pub mod gate;
pub mod rng;
pub mod sample;
pub mod spot;
