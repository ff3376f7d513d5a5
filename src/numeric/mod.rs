//! Numbers: exact values of symbols and expressions (`Surd`), the
//! prime-exponent arithmetic behind them, and fast floating point.
//! Nothing here depends on simplification or verification.

pub mod exact;
pub mod factored;
pub mod family;
pub mod primes;
pub mod racah;
pub mod surd;
pub mod wide;

pub use surd::Surd;
pub mod dd;
pub mod eval;
pub mod float;
