//! The first simplifier: normal form, special values, exact values, each
//! step verified; symmetric spellings of a symbol give one printed result;
//! a deliberately wrong rule is caught by the verification, never applied.

use recoup::algebra::symmetry::classical_images;
use recoup::expr::{Expr, Term};
use recoup::rules::{Rule, RuleKind};
use recoup::simplify::{simplify, Options, SimplifyError};
use recoup::syntax::parse;

fn simp(s: &str) -> String {
    simplify(&parse(s).unwrap(), &Options::default())
        .unwrap_or_else(|e| panic!("{s}: {e}"))
        .result
        .to_string()
}

/// Every image of the symbol, with its phase, as a spelling of the same value.
fn spellings(symbol: &str) -> Vec<String> {
    let e = parse(symbol).unwrap();
    let f = e.terms()[0].factors()[0].clone();
    classical_images(&f)
        .into_iter()
        .map(|img| {
            let t = Term::factor(img.factor).mul(&Term::minus_one_to(img.phase));
            Expr::from_term(t).to_string()
        })
        .collect()
}

#[test]
fn symmetric_spellings_simplify_to_one_canonical_form() {
    let symbols = [
        "(j1, j2, j3; m1, m2, -m1-m2)",
        "<ja, ma; jb, mb | J, ma+mb>",
        "{a, b, c; d, e, f}",
        "{l1, s1, j1; l2, s2, j2; L, S, J}",
        "{a, b, x; c, d, 1/2}",
    ];
    let mut out = Vec::new();
    for s in symbols {
        let all = spellings(s);
        let first = simp(&all[0]);
        for sp in &all {
            assert_eq!(simp(sp), first, "{sp} is a spelling of {s}");
        }
        out.push(format!("{s}  ({} spellings)  =>  {first}", all.len()));
    }
    insta::assert_snapshot!(out.join("\n"));
}

#[test]
fn special_values_in_any_spelling() {
    // 6j-zero (Edmonds 6.3.2) with the zero moved by symmetry
    assert_eq!(simp("{0, b, d; c, e, a}"), simp("{a, b, c; d, e, 0}"));
    let r = simp("{x, y, z; 0, z, y}");
    assert!(!r.contains('{'), "{r}");
    // 3j-zero (Edmonds 1957 section 3.7, from memory) with the zero column first and m flipped
    assert_eq!(simp("(0, j, j; 0, m, -m)"), simp("(j, j, 0; m, -m, 0)"));
    assert_eq!(simp("(0, j, j; 0, -m, m)"), "(-1)^(j+m) / hat(j)");
    assert_eq!(simp("(j, j, 0; m, -m, 0)"), "(-1)^(j-m) / hat(j)");
    // 6j-half (Edmonds Table 5) renamed and permuted
    let r = simp("{q-1/2, 1/2, q; p, r, p+1/2}");
    assert!(!r.contains('{'), "{r}");
    // a numeric symbol is evaluated: {1 1 1; 1 1 1} = 1/6 (SymPy fixture)
    assert_eq!(simp("{1, 1, 1; 1, 1, 1} hat(j)"), "hat(j) / 6");
    // 9j-zero (Edmonds 6.4.14) leaves a 6j
    let r = simp("{a, b, c; d, e, c; g, g, 0}");
    assert!(r.contains('{') && !r.contains("; g, g"), "{r}");
}

#[test]
fn phases_and_selection_rules_in_the_normal_form() {
    // phases modulo integrality (common practice, no source)
    assert_eq!(simp("(-1)^(4*j) {j, a, b; c, d, e}"), "{a, b, j; d, e, c}");
    assert_eq!(
        simp("(-1)^(2*(a+b+c)) {a, b, c; d, e, f}"),
        "{a, b, c; d, e, f}"
    );
    assert_eq!(
        simp("(-1)^(2*m) (j, j, 1; m, -m, 0)"),
        simp("(-1)^(2*j) (j, j, 1; m, -m, 0)")
    );
    assert_eq!(
        simp("(-1)^(-a-b-c) {a, b, c; d, e, f}"),
        "(-1)^(a+b+c) {a, b, c; d, e, f}"
    );
    // selection rules: zero for every assignment
    assert_eq!(simp("(a, a, 1; 0, 0, 0)"), "0");
    assert_eq!(simp("(a, b, c; 1, 0, 0)"), "0");
    assert_eq!(simp("{a, b, c; d, e, f} tri(a, a+2, 1)"), "0");
    assert_eq!(simp("(a, b, 1/2; m, -m, 1/2)"), "0");
    // triads that give s both parities (s + 7 + 1/2 and s + 1/2 + 1/2
    // integers): zero everywhere, not a phase (-1)^(1/2)
    assert_eq!(simp("(-1)^(s) {s, 7, 1/2; t, 1/2, 1/2}"), "0");
    // a literal projection that does not belong to its j is bad input
    let e = parse("(a, a, 1/2; m, -m, 0)").unwrap_err();
    assert_eq!(e.column, 20, "{e}");
    // like terms merge; a sum that cancels prints 0
    assert_eq!(simp("{a, b, c; d, e, f} - {b, a, c; e, d, f}"), "0");
    assert_eq!(
        simp("sum(x: (2*x+1) {a, b, x; c, d, e}) - sum(y: (2*y+1) {b, a, y; d, c, e})"),
        "0"
    );
    // deltas on summed variables are eliminated
    assert_eq!(
        simp("sum(x: delta(x, p) (2*x+1) {a, b, x; c, d, e})"),
        "(2*p+1) {a, b, p; c, d, e}"
    );
}

#[test]
fn a_deliberately_wrong_rule_is_caught_and_named() {
    let wrong = Rule::new(
        "wrong-6j-zero",
        RuleKind::Special,
        "-- a test's invention",
        "{a, b, c; d, e, 0}",
        "delta(a, e) delta(b, d) tri(a, b, c) / (hat(a) hat(b))",
    )
    .unwrap();
    let opts = Options {
        extra_rules: vec![wrong],
        ..Options::default()
    };
    let err = simplify(&parse("{a, b, c; d, e, 0}").unwrap(), &opts).unwrap_err();
    match err {
        SimplifyError::Unverified(u) => assert_eq!(u.rule, "wrong-6j-zero"),
        other => panic!("unexpected {other}"),
    }
}

#[test]
fn every_step_is_recorded_with_its_source_and_verification() {
    let out = simplify(
        &parse("{a, b, c; d, e, 0} + (-1)^(4*j) (j, j, 0; m, -m, 0) {b, a, c; e, d, f}").unwrap(),
        &Options::default(),
    )
    .unwrap();
    let names: Vec<&str> = out.steps.iter().map(|s| s.rule.as_str()).collect();
    assert_eq!(names, ["normal-form", "3j-zero", "6j-zero"]);
    for s in &out.steps {
        assert!(
            !s.source.citations.is_empty() && s.checked > 0,
            "{}",
            s.rule
        );
    }
    assert!(out.nonzero > 0);
}

/// The trace tells the truth: for every left side of the identity list
/// (sources in tests/data/identities.txt) the last step is exactly the
/// result, and each step starts where the one before ended.
#[test]
fn the_last_step_is_the_printed_result() {
    let text = include_str!("data/identities.txt");
    let mut n = 0;
    for line in text.lines().map(str::trim) {
        if line.is_empty() || line.starts_with('#') || line.starts_with('[') {
            continue;
        }
        let e = parse(line.trim_start_matches("==").trim()).unwrap();
        let out = simplify(&e, &Options::default()).unwrap_or_else(|err| panic!("{line}: {err}"));
        if let Some(last) = out.steps.last() {
            assert_eq!(last.after, out.result, "{line}");
            n += 1;
        }
        for w in out.steps.windows(2) {
            assert_eq!(
                w[0].after, w[1].before,
                "{line}: {} then {}",
                w[0].rule, w[1].rule
            );
        }
    }
    assert!(n >= 20, "only {n} inputs had steps");
    // the reported case: a sum step followed by the normal form's tidy
    let e = parse("sum(x: (2*x+1) {a, b, x; a, b, c})").unwrap();
    let out = simplify(&e, &Options::default()).unwrap();
    assert_eq!(out.steps.last().unwrap().after, out.result);
    assert_eq!(out.result.to_string(), "(-1)^(2*c) tri(a, b, c)");
}

#[test]
fn a_sum_over_a_projection_its_symbol_pins_has_one_term() {
    // a Clebsch-Gordan coefficient vanishes unless M = m1 + m2, a 3j unless
    // m1 + m2 + m3 = 0 (common practice, no source): one term is left
    assert_eq!(
        simp("sum(M: <j1, m1; j2, m2 | J, M>)"),
        simp("<j1, m1; j2, m2 | J, m1+m2>")
    );
    assert_eq!(
        simp("sum(m3: (j1, j2, j3; m1, m2, m3))"),
        "(j1, j2, j3; m1, m2, -m1-m2)"
    );
    // factors of the summed projection go along
    let s = simp("sum(M: hat(M) <j1, m1; j2, m2 | J, M> delta(M, K))");
    assert!(!s.contains("sum("), "{s}");
    // a projection shared with another summed one stays summed: the
    // conservation law does not pin it to free variables
    assert!(simp("sum(m2, m3: (j1, j2, j3; m1, m2, m3))").contains("sum("));
    // a line between two vertices whose other legs are free is pinned too
    // (a bridge of the graph: no graph step needs it)
    let s = simp("sum(m: (a, b, c; m1, m2, m) (c, d, e; -m, m4, m5))");
    assert!(!s.contains("sum("), "{s}");
    assert!(s.contains("m1+m2"), "{s}");
}

#[test]
fn symbols_with_a_small_argument_take_their_closed_form_outside_sums() {
    // Edmonds 1957, Table 2 (from memory): (j, 1, j; -m, 0, m) =
    // (-1)^(j-m) m / sqrt(j (j+1) (2j+1)), here with tri(1, j, j) kept
    let s = simp("(j, 1, j; -m, 0, m)");
    assert_eq!(s, "(-1)^(j-m) tri(1, j, j) m / (sqrt(j) sqrt(j+1) hat(j))");
    // a Table 5 entry in a spelling of its own (columns permuted)
    let s = simp("{1, c-1, c; a, b, b-1}");
    assert!(!s.contains('{'), "{s}");
    // inside a sum over its projection the symbol stays a symbol
    assert!(simp("sum(m: (j, 1, j; -m, 0, m) (j, 1, j; -m, 0, m))").contains("(j, j, 1;"));
}

#[test]
fn a_root_of_a_product_keeps_its_factors_nonnegative() {
    // (b+c-a-1)(b+c-a) is 2 at a = 0, b = c = 1; the normal form of the
    // product reads (a-b-c+1)(a-b-c), whose factors are negative there: the
    // root must not be split into roots of negative numbers
    use recoup::evaluate::eval_exact;
    let e = parse("sqrt((b+c-a-1)*(b+c-a))").unwrap();
    let at = [("a", 0), ("b", 1), ("c", 1)]
        .iter()
        .map(|(n, v)| {
            (
                recoup::expr::Name::new(*n),
                recoup::expr::Q::from_integer(*v),
            )
        })
        .collect();
    assert_eq!(eval_exact(&e, &at).unwrap().to_string(), "sqrt(2)");
}
