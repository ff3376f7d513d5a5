//! The selection rules of the symbols on doubled arguments: the triangle
//! rule and the range of a projection. The leaf of the number core: the
//! Racah formulas, the exact and float symbols and the evaluation of
//! expressions all read them from here.

/// True when `(a, b, c)` (doubled) satisfy the triangle rule and `a+b+c`
/// is an integer.
pub fn triangle2(a: i64, b: i64, c: i64) -> bool {
    a >= 0 && b >= 0 && c >= 0 && (a + b + c) % 2 == 0 && c <= a + b && c >= (a - b).abs()
}

/// True when the doubled projection `m` is allowed for the doubled `j`.
pub fn projection_ok2(j: i64, m: i64) -> bool {
    j >= 0 && m.abs() <= j && (j - m) % 2 == 0
}
