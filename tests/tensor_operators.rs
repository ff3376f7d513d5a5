//! Matrix elements of tensor operators, written as a physicist writes
//! them, reduced by `simplify` and compared with the published formulas;
//! the direct evaluation from the definitions against hand values; a
//! wrong hand formula caught by `check` with its diagnosis.
//!
//! Sources beside each case. The convention is Edmonds's:
//! `<j m | T[k, q] | j' m'> = (-1)^(j-m) (j, k, j'; -m, q, m') <j || T[k] || j'>`
//! (Edmonds 1957, eq. 5.4.1, from memory).

use recoup::evaluate::{eval_exact, Assignment};
use recoup::expr::{Factor, Name, Q};
use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::check::{check, Verdict};
use recoup::verify::spot::SpotSettings;

fn settings(triangles_hold: bool, seed: u64) -> SpotSettings {
    SpotSettings {
        max_j: Q::from_integer(2),
        samples: 30,
        exhaustive: false,
        seed,
        triangles_hold,
        ..SpotSettings::default()
    }
}

/// The matrix element reduces to a closed form (no sums over
/// projections left), and both it and the reduced form equal the
/// published formula. `physical`: the published formula is stated for
/// states that exist (triads of the couplings hold).
fn derives(input: &str, published: &str, physical: bool) -> String {
    let e = parse(input).unwrap_or_else(|err| panic!("{input}: {err}"));
    let out = simplify(&e, &Options::default()).unwrap_or_else(|err| panic!("{input}: {err}"));
    let result = out.result.to_string();
    let reduced = out.result.terms().iter().all(|t| {
        t.factors().iter().all(|f| match f {
            Factor::Element(m) => m.is_irreducible(),
            _ => true,
        })
    });
    assert!(
        reduced && !result.contains("sum(m"),
        "{input} was not reduced: {result}"
    );
    let p = parse(published).unwrap();
    for (what, lhs) in [("input", &e), ("result", &out.result)] {
        let r = check(lhs, &p, &settings(physical, 7)).unwrap();
        assert!(
            matches!(r.verdict, Verdict::Equal),
            "{input}: the {what} differs from the published {published}: {:?}",
            r.verdict
        );
    }
    result
}

#[test]
fn tensor_product_on_the_two_parts_is_a_9j() {
    // Edmonds 1957, eq. 7.1.5 (from memory)
    let r = derives(
        "<(j1, j2) J || [T[k1] @ j1 x U[k2] @ j2][k] || (j1', j2') J'>",
        "hat(J) hat(J') hat(k) {j1, j1', k1; j2, j2', k2; J, J', k} <j1 || T[k1] || j1'> <j2 || U[k2] || j2'>",
        false,
    );
    assert!(r.contains("{j1, j1', k1; j2, j2', k2; J, J', k}"), "{r}");
}

#[test]
fn an_operator_on_one_part_is_a_6j() {
    // Edmonds 1957, eq. 7.1.7 (from memory)
    derives(
        "<(j1, j2) J || T[k] @ j1 || (j1', j2') J'>",
        "(-1)^(j1+j2+J'+k) hat(J) hat(J') {j1, J, j2; J', j1', k} delta(j2, j2') <j1 || T[k] || j1'>",
        false,
    );
    // Edmonds 1957, eq. 7.1.8 (from memory)
    derives(
        "<(j1, j2) J || U[k] @ j2 || (j1', j2') J'>",
        "(-1)^(j1+j2'+J+k) hat(J) hat(J') {j2, J, j1; J', j2', k} delta(j1, j1') <j2 || U[k] || j2'>",
        false,
    );
}

#[test]
fn the_scalar_product() {
    // Edmonds 1957, eq. 7.1.6 (from memory; our first recollection had
    // {J, j2, j1'; k, j1, j2'}, which check refused and repaired by
    // swapping j2 and j2'); k is an integer (implied by the scalar product)
    derives(
        "<(j1, j2) J, M | (T[k] @ j1 . U[k] @ j2) | (j1', j2') J', M'>",
        "delta(J, J') delta(M, M') (-1)^(j1'+j2+J) {J, j2', j1'; k, j1, j2} <j1 || T[k] || j1'> <j2 || U[k] || j2'>",
        false,
    );
}

#[test]
fn two_operators_on_one_system_sum_over_the_intermediate_state() {
    // Edmonds 1957, eq. 7.1.1 (from memory)
    let r = derives(
        "<j || [T[k1] @ j x U[k2] @ j][k] || j'>",
        "(-1)^(j+k+j') hat(k) sum(j'': {k1, k2, k; j', j, j''} <j || T[k1] || j''> <j'' || U[k2] || j'>)",
        false,
    );
    assert!(r.contains("sum(j''"), "{r}");
}

#[test]
fn spin_orbit_and_hyperfine_come_out_as_the_textbook_polynomials() {
    // l.s = (j(j+1) - l(l+1) - s(s+1))/2 (common practice, no source)
    let r = derives(
        "<(l, s) j, m | (J[1] @ l . J[1] @ s) | (l, s) j, m>",
        "(j (j+1) - l (l+1) - s (s+1)) / 2",
        true,
    );
    assert!(!r.contains('{') && !r.contains("sqrt"), "{r}");
    // the magnetic hyperfine factor I.J = (F(F+1) - I(I+1) - J(J+1))/2
    // (common practice, no source)
    let r = derives(
        "<(I, J) F, M | (J[1] @ I . J[1] @ J) | (I, J) F, M>",
        "(F (F+1) - I (I+1) - J (J+1)) / 2",
        true,
    );
    assert!(!r.contains('{'), "{r}");
}

#[test]
fn the_lande_factor_by_the_projection_theorem() {
    // g_J M with g_J = 1 + (J(J+1) + S(S+1) - L(L+1)) / (2 J(J+1)) for
    // g_s = 2 (Condon and Shortley 1935, the Lande formula; from memory)
    let r = derives(
        "<(L, S) J, M | J[1, 0] @ L + 2 J[1, 0] @ S | (L, S) J, M>",
        "tri(1, J, J) M (1 + (J (J+1) + S (S+1) - L (L+1)) / (2 J (J+1)))",
        true,
    );
    assert!(!r.contains('{'), "{r}");
}

#[test]
fn the_electric_dipole_in_ls_coupling() {
    // Edmonds 1957, eqs. 7.1.7 and 5.4.5 (from memory)
    derives(
        "<(L, S) J || C[1] @ L || (L', S) J'>",
        "(-1)^(L+S+J'+1) hat(J) hat(J') {L, J, S; J', L', 1} (-1)^L hat(L) hat(L') (L, 1, L'; 0, 0, 0)",
        false,
    );
}

#[test]
fn a_wrong_hand_formula_is_caught_with_its_missing_phase() {
    // eq. 7.1.7 with the phase (-1)^(j1+j2+J'+k) dropped
    let lhs = parse("<(j1, j2) J || T[k] @ j1 || (j1', j2) J'>").unwrap();
    let rhs = parse("hat(J) hat(J') {j1, J, j2; J', j1', k} <j1 || T[k] || j1'>").unwrap();
    let r = check(&lhs, &rhs, &settings(false, 3)).unwrap();
    let Verdict::Different { diagnosis, .. } = &r.verdict else {
        panic!("a wrong formula passed: {:?}", r.verdict);
    };
    let text = format!("{diagnosis:?}");
    assert!(text.contains("(-1)^"), "no phase in the diagnosis: {text}");
}

fn at(pairs: &[(&str, i64, i64)]) -> Assignment {
    pairs
        .iter()
        .map(|(n, a, b)| (Name::new(*n), Q::new(*a, *b)))
        .collect()
}

#[test]
fn the_direct_evaluation_agrees_with_hand_values() {
    // J+1 = -J+/sqrt(2): <1 1 | J[1, 1] | 1 0> = -1 (Condon-Shortley
    // phases; common practice, no source)
    let e = parse("<j, m | J[1, 1] @ j | j, m - 1>").unwrap();
    assert_eq!(
        eval_exact(&e, &at(&[("j", 1, 1), ("m", 1, 1)]))
            .unwrap()
            .to_string(),
        "-1"
    );
    // l.s in p3/2: (15/4 - 2 - 3/4)/2 = 1/2 (common practice, no source)
    let e = parse("<(l, s) j, m | (J[1] @ l . J[1] @ s) | (l, s) j, m>").unwrap();
    let v = eval_exact(
        &e,
        &at(&[("l", 1, 1), ("s", 1, 2), ("j", 3, 2), ("m", -1, 2)]),
    )
    .unwrap();
    assert_eq!(v.to_string(), "1/2");
    // <1 || C[1] || 0> = (-1)^1 hat(1) hat(0) (1, 1, 0; 0, 0, 0) = 1,
    // since (1, 1, 0; 0, 0, 0) = -1/sqrt(3) (Edmonds 1957, eq. 3.7.9;
    // from memory)
    let e = parse("<l || C[1] || l'>").unwrap();
    assert_eq!(
        eval_exact(&e, &at(&[("l", 1, 1), ("l'", 0, 1)]))
            .unwrap()
            .to_string(),
        "1"
    );
    // a state that does not exist (the triad fails) gives 0
    let e = parse("<(a, b) c, m | J[1, 0] @ a | (a, b) c, m>").unwrap();
    assert_eq!(
        eval_exact(
            &e,
            &at(&[("a", 1, 2), ("b", 1, 2), ("c", 2, 1), ("m", 0, 1)])
        )
        .unwrap()
        .to_string(),
        "0"
    );
}

#[test]
fn opaque_reduced_matrix_elements_are_consistent_and_vanish_off_their_triangle() {
    let e = parse("<j || T[k] || j'>").unwrap();
    let p = at(&[("j", 1, 1), ("k", 1, 1), ("j'", 2, 1)]);
    let a = eval_exact(&e, &p).unwrap();
    assert!(!a.is_zero());
    assert_eq!(eval_exact(&e, &p).unwrap(), a);
    let off = at(&[("j", 1, 1), ("k", 1, 1), ("j'", 3, 1)]);
    assert!(eval_exact(&e, &off).unwrap().is_zero());
}

#[test]
fn text_round_trips() {
    for text in [
        "<(j1, j2) J || [T[k1] @ j1 x U[k2] @ j2][k] || (j1', j2') J'>",
        "<(l, s) j, m | (J[1] @ l . J[1] @ s) | (l, s) j, m>",
        "<(L, S) J, M | J[1, 0] @ L + 2 J[1, 0] @ S | (L, S) J, M'>",
        "<j || T[k] || j'>",
        "<((l, 1/2) j, I) F || 1/2 C[2] @ l - u[2] @ l || ((l', 1/2) j', I) F'>",
    ] {
        let e = parse(text).unwrap();
        assert_eq!(parse(&e.to_string()).unwrap(), e, "{text} -> {e}");
    }
}

#[test]
fn malformed_matrix_elements_are_refused_with_a_position() {
    for (text, words) in [
        (
            "<(a, b) c, m | T[1, 0] @ d | (a, b) c, m>",
            "no node named d",
        ),
        ("<(a, b) c || T[1] @ a || a'>", "shape"),
        ("<(a, b) c, m | T[1] @ a | (a, b) c, m>", "component"),
        (
            "<(a, b) c || T[1, 0] @ a || (a, b) c>",
            "without a component",
        ),
        ("<(a, b) c || J[2] @ a || (a, b) c>", "rank 1"),
        ("<(a, b) c || C[1] @ c || (a, b) c>", "leaf"),
        (
            "<(a, b) c || [T[1, 0] @ a x U[1] @ b][1] || (a, b) c>",
            "summed",
        ),
        (
            "<(a, b) c || (T[1] @ a . U[2] @ b) || (a, b) c>",
            "same rank",
        ),
        ("<(a, a) c || T[1] @ a || (a, a) c>", "names 2 nodes"),
    ] {
        let err = parse(text).expect_err(text).to_string();
        assert!(err.contains(words), "{text}: {err}");
        assert!(err.contains("line 1"), "{text}: {err}");
    }
}
