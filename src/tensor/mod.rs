//! Tensor operators and their matrix elements between coupled states:
//! the independent evaluation from the definitions (`direct`), the values
//! of opaque reduced matrix elements (`opaque`), the built-in reduced
//! matrix elements (`builtin`) and the lowering of a matrix element to a
//! projection sum the graph reduction knows (`expand`).

pub mod direct;
pub mod opaque;
