//! The number core: exact values of symbols (`Surd`), the prime-exponent
//! arithmetic behind them, the Racah formulas, families by recursion and
//! fast floating point, all on doubled integer arguments. It imports
//! nothing from the crate but the time limit (`limits`): expressions are
//! evaluated one layer up, in `evaluate`.

pub mod exact;
pub mod factored;
pub mod family;
pub mod primes;
pub mod racah;
pub mod selection;
pub mod surd;
pub mod wide;

pub use surd::Surd;
pub mod dd;
pub mod float;
