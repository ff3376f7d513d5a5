//! Every element of every symbol's symmetry group, with the phase it
//! costs, checked by exact spot-evaluation: the classical groups (3j 12,
//! CG 4, 6j 24, 9j 72; Edmonds 1957 sections 3.7, 6.2, 6.4, common practice) and
//! Regge's (3j 72, 6j 144; Regge 1958/1959, from memory). Projections are
//! written with conservation solved (z = -x-y), the form in which the
//! symmetries are identities of functions.

use recoup::algebra::symmetry::{classical_images, regge_images};
use recoup::expr::{Expr, Term, Q};
use recoup::syntax::parse;
use recoup::verify::spot::{compare, SpotSettings};

fn check_all(
    symbol: &str,
    images: fn(&recoup::expr::Factor) -> Vec<recoup::algebra::symmetry::Image>,
    expect: usize,
) {
    let e = parse(symbol).unwrap();
    let f = e.terms()[0].factors()[0].clone();
    let imgs = images(&f);
    let mut distinct: Vec<_> = imgs.iter().map(|i| i.factor.clone()).collect();
    distinct.sort();
    distinct.dedup();
    assert_eq!(distinct.len(), expect, "{symbol}: group size");
    for (k, img) in imgs.iter().enumerate() {
        let t = Term::factor(img.factor.clone()).mul(&Term::minus_one_to(img.phase.clone()));
        let rhs = Expr::from_term(t);
        let s = SpotSettings {
            max_j: Q::from_integer(3),
            samples: 12,
            exhaustive: false,
            seed: 11 + k as u64,
            ..SpotSettings::default()
        };
        let rep = compare(&e, &rhs, &s).unwrap();
        assert!(
            rep.agrees(),
            "{symbol} image {k}: {rhs} differs: {:?}",
            rep.mismatches.first()
        );
    }
}

#[test]
fn three_j_classical_and_regge() {
    check_all("(a, b, c; x, y, -x-y)", classical_images, 12);
    check_all("(a, b, c; x, y, -x-y)", regge_images, 72);
}

#[test]
fn clebsch_gordan_classical() {
    check_all("<a, x; b, y | c, x+y>", classical_images, 4);
}

#[test]
fn six_j_classical_and_regge() {
    check_all("{a, b, c; d, e, f}", classical_images, 24);
    check_all("{a, b, c; d, e, f}", regge_images, 144);
}

#[test]
fn nine_j_classical() {
    check_all("{a, b, c; d, e, f; g, h, i}", classical_images, 72);
}
