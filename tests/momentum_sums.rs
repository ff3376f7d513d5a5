//! Sums over angular momenta collapsed by the catalog's identities
//! (sums over angular momenta, Edmonds 1957 equation numbers
//! recalled from memory there): each identity renamed, respelled, with a
//! spectator 6j and hat, and wrapped in an outer sum; a two-level case
//! where a projection-sum reduction yields the sum; a near miss that is not
//! an identity and stays a sum with the same value.

mod common;

use common::{disguise, settings};
use recoup::expr::{Expr, Kind};
use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::check::{check, Verdict};
use recoup::verify::rng::Rng;

const IDENTITIES: &[(&str, &str, &str)] = &[
    ("6j-orthogonality", "sum(x: (2*x+1) (2*p+1) {a, b, x; c, d, p} {a, b, x; c, d, q})", "delta(p, q) tri(a, d, p) tri(b, c, p)"),
    ("6j-orthogonality-crossed", "sum(x: (2*x+1) {a, b, x; c, d, p} {c, d, x; a, b, q})", "delta(p, q) tri(a, d, p) tri(b, c, p) / (2*p+1)"),
    ("racah-sum-rule", "sum(x: (-1)^(p+q+x) (2*x+1) {a, b, x; c, d, p} {a, b, x; d, c, q})", "{a, c, q; b, d, p}"),
    ("biedenharn-elliott", "sum(x: (-1)^(a+b+c+d+e+f+p+q+r+x) (2*x+1) {a, b, x; c, d, p} {c, d, x; e, f, q} {e, f, x; b, a, r})", "{p, q, r; e, a, d} {p, q, r; f, b, c}"),
    ("6j-sum-phase", "sum(x: (-1)^(a+b+x) (2*x+1) {a, b, x; b, a, c})", "hat(a) hat(b) delta(c, 0)"),
    ("6j-sum-plain", "sum(x: (2*x+1) {a, b, x; a, b, c})", "(-1)^(2*a+2*b) tri(a, b, c)"),
    ("9j-orthogonality", "sum(c, f: (2*c+1) (2*f+1) (2*g+1) (2*h+1) {a, b, c; d, e, f; g, h, i} {a, b, c; d, e, f; g', h', i})", "delta(g, g') delta(h, h') tri(a, d, g) tri(b, e, h) tri(g, h, i)"),
    ("9j-from-6j-sum", "sum(x: (-1)^(2*x) (2*x+1) {a, b, c; f, i, x} {d, e, f; b, x, h} {g, h, i; x, a, d})", "{a, b, c; d, e, f; g, h, i}"),
    ("3j-completeness", "sum(j3, m3: (2*j3+1) (j1, j2, j3; m1, m2, m3) (j1, j2, j3; m1', m2', m3))", "delta(m1, m1') delta(m2, m2')"),
    // Edmonds 6.4.3 with 6.2.9 (from memory)
    ("9j-6j-sum", "sum(x: (2*x+1) {a, b, x; d, e, f; g, h, i} {a, b, x; f, i, y})", "(-1)^(2*y) {d, e, f; b, y, h} {g, h, i; y, a, d}"),
    // Edmonds 6.1.5 with 6.2.9 (from memory): the coupled state expanded back
    ("coupled-state-recoupling", "sum(x, mx: (-1)^(x-mx) (2*x+1) {j1, j2, x; j3, J, y} (j1, j2, x; m1, m2, mx) (x, j3, J; -mx, m3, M))", "sum(my: (-1)^(2*j3) (-1)^(y-my) (j1, J, y; m1, M, my) (y, j3, j2; -my, m3, m2))"),
];

fn sums_left(e: &Expr) -> usize {
    common::sums_left(e, None)
}

fn j_sums_left(e: &Expr) -> usize {
    common::sums_left(e, Some(Kind::AngularMomentum))
}

fn equal(a: &Expr, b: &Expr, seed: u64) -> bool {
    matches!(
        check(a, b, &settings(seed)).unwrap().verdict,
        Verdict::Equal
    )
}

/// True when the named rule, or (for the crossed form of 6j-orthogonality,
/// whose 6j are the same symbols up to symmetry) its standard form, applied.
fn used_rule(out: &recoup::simplify::Outcome, name: &str) -> bool {
    out.steps.iter().any(|s| {
        s.rule == name
            || (name == "6j-orthogonality-crossed" && s.rule == "6j-orthogonality")
            || (name == "3j-completeness" && s.rule == "3j-completeness-pinned")
    })
}

#[test]
fn each_identity_as_stated_renamed_and_respelled() {
    let mut rng = Rng::new(5151);
    for (name, lhs, rhs) in IDENTITIES {
        let stated = parse(lhs).unwrap();
        let out = simplify(&stated, &Options::default()).unwrap();
        assert_eq!(sums_left(&out.result), 0, "{name}: {}", out.result);
        assert!(
            used_rule(&out, name),
            "{name}: steps {:?}",
            out.steps.iter().map(|s| &s.rule).collect::<Vec<_>>()
        );
        assert!(
            equal(&out.result, &parse(rhs).unwrap(), 1),
            "{name}: {}",
            out.result
        );
        for v in 0..3 {
            let input = disguise(lhs, &mut rng);
            let out =
                simplify(&input, &Options::default()).unwrap_or_else(|e| panic!("{name} {v}: {e}"));
            assert_eq!(
                sums_left(&out.result),
                0,
                "{name} variant {v}: {} from {}",
                out.result,
                input
            );
            assert!(equal(&out.result, &input, 2 + v), "{name} variant {v}");
        }
    }
}

#[test]
fn each_identity_with_spectators_and_inside_an_outer_sum() {
    for (name, lhs, _) in IDENTITIES {
        // a spectator 6j and hat that do not involve the summed variables
        let spectator = format!("hat(zz) {{zz, u1, u2; u3, u4, u5}} {lhs}");
        let input = parse(&spectator).unwrap();
        let out = simplify(&input, &Options::default()).unwrap_or_else(|e| panic!("{name}: {e}"));
        assert_eq!(
            sums_left(&out.result),
            0,
            "{name} with spectators: {}",
            out.result
        );
        assert!(
            out.result.to_string().contains("{u1, u2, zz; u3, u4, u5}")
                || out.result.to_string().contains("zz"),
            "{name}: spectator lost: {}",
            out.result
        );
        assert!(equal(&out.result, &input, 7), "{name} with spectators");
        // wrapped inside an outer sum over y
        let wrapped = format!("sum(y: (2*y+1) {{y, u1, u2; u3, u4, u5}} {lhs})");
        let input = parse(&wrapped).unwrap();
        let out =
            simplify(&input, &Options::default()).unwrap_or_else(|e| panic!("{name} wrapped: {e}"));
        let inner_left = out
            .result
            .terms()
            .iter()
            .any(|t| t.bound().iter().any(|b| b.as_str() != "y"));
        assert!(!inner_left, "{name} wrapped: {}", out.result);
        assert!(
            used_rule(&out, name),
            "{name} wrapped: {:?}",
            out.steps.iter().map(|s| &s.rule).collect::<Vec<_>>()
        );
        assert!(equal(&out.result, &input, 8), "{name} wrapped");
    }
}

#[test]
fn a_projection_sum_whose_reduction_yields_a_j_sum_that_collapses() {
    // six 3j: a 6j as its tetrahedral projection sum (Edmonds 1957 section 6.2;
    // 6j-as-projection-sum) sharing x with a second 6j, times a bubble;
    // the graph steps give sum(x: ... {..x..} {..x..}) and orthogonality
    // (Edmonds 6.2.9) removes it
    let ortho = "sum(x, m1, m2, m3, m4, m5, m6, n1, n2: (2*x+1) (2*p+1) {a, b, x; c, d, p} (-1)^(a-m1+b-m2+x-m3+c-m4+d-m5+q-m6) (a, b, x; -m1, -m2, -m3) (a, d, q; m1, -m5, m6) (c, b, q; m4, m2, -m6) (c, d, x; -m4, m5, m3) (e, f, g; n1, n2, n3) (e, f, g'; n1, n2, n3'))";
    let input = parse(ortho).unwrap();
    let out = simplify(&input, &Options::default()).unwrap();
    assert_eq!(sums_left(&out.result), 0, "{}", out.result);
    assert!(
        used_rule(&out, "tetrahedron")
            && used_rule(&out, "bubble")
            && used_rule(&out, "6j-orthogonality"),
        "{:?}",
        out.steps.iter().map(|s| &s.rule).collect::<Vec<_>>()
    );
    assert!(equal(&out.result, &input, 3));
    // the same with Biedenharn-Elliott (Edmonds 6.2.12)
    let be = "sum(x, m1, m2, m3, m4, m5, m6, n1, n2: (-1)^(a+b+c+d+e+f+p+q+r+x) (2*x+1) {a, b, x; c, d, p} {c, d, x; e, f, q} (-1)^(e-m1+f-m2+x-m3+b-m4+a-m5+r-m6) (e, f, x; -m1, -m2, -m3) (e, a, r; m1, -m5, m6) (b, f, r; m4, m2, -m6) (b, a, x; -m4, m5, m3) (k, l, s; n1, n2, n3) (k, l, s'; n1, n2, n3'))";
    let input = parse(be).unwrap();
    let out = simplify(&input, &Options::default()).unwrap();
    assert_eq!(sums_left(&out.result), 0, "{}", out.result);
    assert!(
        used_rule(&out, "biedenharn-elliott"),
        "{:?}",
        out.steps.iter().map(|s| &s.rule).collect::<Vec<_>>()
    );
    assert!(equal(&out.result, &input, 4));
}

#[test]
fn a_sum_that_is_not_an_identity_stays_a_sum_with_the_same_value() {
    // 6j-orthogonality with one argument changed (d -> e in the second 6j)
    let near = "sum(x: (2*x+1) (2*p+1) {a, b, x; c, d, p} {a, b, x; c, e, q})";
    let input = parse(near).unwrap();
    let out = simplify(&input, &Options::default()).unwrap();
    assert_eq!(j_sums_left(&out.result), 1, "{}", out.result);
    assert!(
        out.notes.iter().any(|n| n.contains("no identity")),
        "{:?}",
        out.notes
    );
    assert!(equal(&out.result, &input, 5));
    // Biedenharn-Elliott with a wrong phase: a sum still, never mangled
    let wrong = "sum(x: (2*x+1) {a, b, x; c, d, p} {c, d, x; e, f, q} {e, f, x; b, a, r})";
    let input = parse(wrong).unwrap();
    let out = simplify(&input, &Options::default()).unwrap();
    assert_eq!(j_sums_left(&out.result), 1, "{}", out.result);
    assert!(equal(&out.result, &input, 6));
}

#[test]
fn the_graphical_route_works_without_the_closed_form_identities() {
    // with the closed forms switched off, the driver's graphical route (a
    // 6j written out as its tetrahedral projection sum, then 3j-completeness
    // or the interchange read backwards, then the graph reduction) still
    // removes the sum, and the result is verified
    let skip: Vec<String> = [
        "6j-orthogonality",
        "6j-orthogonality-crossed",
        "racah-sum-rule",
        "6j-sum-plain",
    ]
    .iter()
    .map(|s| s.to_string())
    .collect();
    let opts = Options {
        skip_rules: skip,
        ..Options::default()
    };
    let mut rng = Rng::new(77);
    for (name, lhs, rhs) in IDENTITIES.iter().filter(|(n, _, _)| {
        [
            "6j-orthogonality",
            "6j-orthogonality-crossed",
            "racah-sum-rule",
            "6j-sum-plain",
        ]
        .contains(n)
    }) {
        for variant in 0..2 {
            let input = if variant == 0 {
                parse(lhs).unwrap()
            } else {
                disguise(lhs, &mut rng)
            };
            let out = simplify(&input, &opts).unwrap_or_else(|e| panic!("{name}: {e}"));
            assert_eq!(
                sums_left(&out.result),
                0,
                "{name} variant {variant}: {}",
                out.result
            );
            assert!(
                used_rule(&out, "graphical-route"),
                "{name}: {:?}",
                out.steps.iter().map(|s| &s.rule).collect::<Vec<_>>()
            );
            let want = if variant == 0 {
                parse(rhs).unwrap()
            } else {
                input.clone()
            };
            assert!(
                equal(&out.result, &want, 11),
                "{name} variant {variant}: {}",
                out.result
            );
        }
    }
}

#[test]
fn sums_written_with_clebsch_gordan_coefficients() {
    // the summed projection is pinned by the conservation law (one term
    // left), the coefficients are written as 3j for the identity, and back
    for (lhs, want) in [
        // completeness of the Clebsch-Gordan coefficients (common practice, no source)
        (
            "sum(J, M: <j1, m1; j2, m2 | J, M> <j1, m1'; j2, m2' | J, M>)",
            "delta(m1, m1') delta(m2, m2')",
        ),
        // a state ((j1, j2) j12, j3) J expanded back into (j1, (j2, j3) j23) J
        // with the recoupling coefficient of Edmonds eq. 6.1.5 (from memory)
        (
            "sum(j12, m12: (-1)^(j1+j2+j3+J) hat(j12) hat(j23) {j1, j2, j12; j3, J, j23} <j1, m1; j2, m2 | j12, m12> <j12, m12; j3, m3 | J, M>)",
            "<j1, m1; j23, m2+m3 | J, M> <j2, m2; j3, m3 | j23, m2+m3>",
        ),
    ] {
        let input = parse(lhs).unwrap();
        let out = simplify(&input, &Options::default()).unwrap();
        assert_eq!(out.result.to_string(), want, "{lhs}");
        assert!(equal(&input, &parse(want).unwrap(), 77), "{lhs}");
        // and in a disguise: renamed, respelled, factors shuffled
        let mut rng = Rng::new(404);
        let disguised = disguise(lhs, &mut rng);
        let out = simplify(&disguised, &Options::default()).unwrap();
        assert_eq!(sums_left(&out.result), 0, "{disguised}: {}", out.result);
        assert!(equal(&disguised, &out.result, 78));
    }
}

#[test]
fn a_sum_is_recognised_through_a_regge_symmetry_without_being_asked() {
    // 6j orthogonality (Edmonds 6.2.9, from memory) with the second 6j
    // written through a Regge symmetry that keeps the summed column
    // (Regge 1959, from memory; the spelling is checked equal first)
    let plain = "{x, a, b; q, c, d}";
    let regge = "{x, (a+b+c-d)/2, (a+b-c+d)/2; q, (c+d+a-b)/2, (c+d-a+b)/2}";
    assert!(equal(&parse(plain).unwrap(), &parse(regge).unwrap(), 31));
    let input = parse(&format!(
        "sum(x: (2*x+1) (2*p+1) {{x, a, b; p, c, d}} {regge})"
    ))
    .unwrap();
    let out = simplify(&input, &Options::default()).unwrap();
    assert_eq!(
        out.result.to_string(),
        "delta(p, q) tri(a, d, p) tri(b, c, p)"
    );
    assert!(out
        .steps
        .iter()
        .any(|s| s.source.text().contains("Regge symmetry")));
}
