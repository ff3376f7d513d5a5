//! Single symbols by their doubled arguments (`2j`, `2m`: 3 for 3/2),
//! exact and in floating point, with the arguments validated: a negative
//! angular momentum, an odd-even mismatch of `j` and `m` is no error (the
//! symbol is 0 by its selection rules, the usual convention), but an
//! argument beyond what is evaluated is `Error::Limit` and a negative
//! angular momentum `Error::Input`.
//!
//! Floats are accurate to about 1e-13 relative to the value (see
//! BENCHMARKS.md); exact values are `Surd`s (a signed square root of a
//! rational for every symbol).

use super::Error;
pub use crate::evaluate::{MAX_EXACT_J, MAX_FLOAT_J};
use crate::numeric::{exact, float, Surd};

/// Largest doubled argument of a float 3j, 6j or CG.
pub const MAX_FLOAT_DOUBLED: i64 = 2 * MAX_FLOAT_J;
/// Largest doubled argument of a float 9j.
pub const MAX_FLOAT_DOUBLED_9J: i64 = 2 * MAX_FLOAT_J / 10;
/// Largest doubled argument of an exact 3j, 6j or CG.
pub const MAX_EXACT_DOUBLED: i64 = 2 * MAX_EXACT_J;
/// Largest doubled argument of an exact 9j.
pub const MAX_EXACT_DOUBLED_9J: i64 = 2 * MAX_EXACT_J / 100;

/// Angular momenta nonnegative and every argument within `limit`
/// (doubled).
pub fn validate(js: &[i64], ms: &[i64], limit: i64, what: &str) -> Result<(), Error> {
    if let Some(j) = js.iter().find(|j| **j < 0) {
        return Err(Error::Input(format!(
            "an angular momentum of a {what} cannot be negative (doubled value {j})"
        )));
    }
    if js.iter().chain(ms).any(|x| x.abs() > limit) {
        return Err(Error::Limit(format!(
            "an argument of this {what} is beyond the largest evaluated here (j up to {})",
            crate::expr::lin::fmt_q(&crate::expr::Q::new(limit, 2))
        )));
    }
    Ok(())
}

/// The 3j symbol in double precision.
///
/// ```
/// use recoup::api::symbols::{exact_3j, float_3j};
///
/// // (1/2 1/2 1; 1/2 -1/2 0) = sqrt(1/6) (Edmonds 1957, Table 2, from
/// // memory): arguments doubled
/// assert_eq!(exact_3j([1, 1, 2], [1, -1, 0]).unwrap().to_string(), "sqrt(1/6)");
/// assert!((float_3j([1, 1, 2], [1, -1, 0]).unwrap() - (1.0f64 / 6.0).sqrt()).abs() < 1e-15);
/// ```
pub fn float_3j(tj: [i64; 3], tm: [i64; 3]) -> Result<f64, Error> {
    validate(&tj, &tm, MAX_FLOAT_DOUBLED, "3j symbol")?;
    Ok(float::three_j_f64(tj, tm))
}

/// The Clebsch–Gordan coefficient `<j1 m1; j2 m2 | J M>` in double
/// precision.
pub fn float_cg(t: [i64; 6]) -> Result<f64, Error> {
    let [j1, m1, j2, m2, j, m] = t;
    validate(
        &[j1, j2, j],
        &[m1, m2, m],
        MAX_FLOAT_DOUBLED,
        "Clebsch–Gordan coefficient",
    )?;
    Ok(float::clebsch_gordan_f64(j1, m1, j2, m2, j, m))
}

/// The 6j symbol `{a b c; d e f}` in double precision.
pub fn float_6j(t: [i64; 6]) -> Result<f64, Error> {
    validate(&t, &[], MAX_FLOAT_DOUBLED, "6j symbol")?;
    Ok(float::six_j_f64(t))
}

/// The 9j symbol (row by row) in double precision.
pub fn float_9j(t: [i64; 9]) -> Result<f64, Error> {
    validate(&t, &[], MAX_FLOAT_DOUBLED_9J, "9j symbol")?;
    Ok(float::nine_j_f64(t))
}

/// The exact 3j symbol.
pub fn exact_3j(tj: [i64; 3], tm: [i64; 3]) -> Result<Surd, Error> {
    validate(&tj, &tm, MAX_EXACT_DOUBLED, "3j symbol")?;
    Ok(exact::three_j(tj, tm))
}

/// The exact Clebsch–Gordan coefficient `<j1 m1; j2 m2 | J M>`.
pub fn exact_cg(t: [i64; 6]) -> Result<Surd, Error> {
    let [j1, m1, j2, m2, j, m] = t;
    validate(
        &[j1, j2, j],
        &[m1, m2, m],
        MAX_EXACT_DOUBLED,
        "Clebsch–Gordan coefficient",
    )?;
    Ok(exact::clebsch_gordan(j1, m1, j2, m2, j, m))
}

/// The exact 6j symbol.
pub fn exact_6j(t: [i64; 6]) -> Result<Surd, Error> {
    validate(&t, &[], MAX_EXACT_DOUBLED, "6j symbol")?;
    Ok(exact::six_j(t))
}

/// The exact 9j symbol (row by row).
pub fn exact_9j(t: [i64; 9]) -> Result<Surd, Error> {
    validate(&t, &[], MAX_EXACT_DOUBLED_9J, "9j symbol")?;
    Ok(exact::nine_j(t))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn values_and_refusals() {
        // (1/2 1/2 1; 1/2 -1/2 0) = sqrt(1/6) (Edmonds 1957, Table 2,
        // from memory)
        let v = exact_3j([1, 1, 2], [1, -1, 0]).unwrap();
        assert_eq!(v.to_string(), "sqrt(1/6)");
        assert!((float_3j([1, 1, 2], [1, -1, 0]).unwrap() - (1.0f64 / 6.0).sqrt()).abs() < 1e-15);
        assert!(matches!(
            float_6j([-2, 2, 2, 2, 2, 2]),
            Err(Error::Input(_))
        ));
        assert!(matches!(float_9j([20_000; 9]), Err(Error::Limit(_))));
        // an m beyond its j is 0, not an error (the usual convention)
        assert_eq!(float_3j([2, 2, 2], [4, -4, 0]).unwrap(), 0.0);
    }
}
