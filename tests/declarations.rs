//! Declared parities (`integer k;`, `half-odd s;`, `--integer`,
//! `--half-odd`): they join the phase lattice, the sampler's domain, the
//! normal form and the evaluator, in the library and on the command line.
//! Facts used: `(-1)^(2k) = 1` for integer k and `-1` for half-odd k
//! (common practice, no source).

use recoup::algebra::declare::{scoped, Declarations, Parity};
use recoup::algebra::normal::canonical_expr;
use recoup::evaluate::{eval_exact, EvalError};
use recoup::expr::{Name, Q};
use recoup::syntax::{parse, parse_declared};
use recoup::verify::check::{check, Verdict};
use recoup::verify::sample::{Count, Sampler};
use recoup::verify::spot::SpotSettings;
use std::collections::BTreeMap;

fn declared(integer: &[&str], half_odd: &[&str]) -> Declarations {
    let mut d = Declarations::new();
    for n in integer {
        d.declare(Name::new(*n), Parity::Integer).unwrap();
    }
    for n in half_odd {
        d.declare(Name::new(*n), Parity::HalfOdd).unwrap();
    }
    d
}

fn canonical_text(text: &str, d: &Declarations) -> String {
    let e = parse(text).unwrap();
    scoped(d, || canonical_expr(&e, false).to_string())
}

#[test]
fn a_declared_parity_joins_the_phase_lattice() {
    let text = "(-1)^(2*k) {a, b, k; c, d, e}";
    let none = Declarations::new();
    assert_eq!(
        canonical_text(text, &declared(&["k"], &[])),
        "{a, b, k; c, d, e}"
    );
    assert_eq!(
        canonical_text(text, &declared(&[], &["k"])),
        "-{a, b, k; c, d, e}"
    );
    // undeclared, 2k is only known to be an integer
    assert!(canonical_text(text, &none).contains("(-1)^"));
    // (-1)^k (-1)^(-k) is 1 either way; (-1)^(k+q) with both integer and
    // q = k modulo 1 folds as the lattice says
    assert_eq!(
        canonical_text(
            "(-1)^(3*k) (-1)^(k) {a, b, k; c, d, e}",
            &declared(&["k"], &[])
        ),
        "{a, b, k; c, d, e}"
    );
}

#[test]
fn declarations_that_contradict_the_symbols_make_the_term_zero() {
    // the triad (1/2, 1/2, k) makes k an integer: declared half-odd, the
    // symbol vanishes everywhere (common practice, no source)
    assert_eq!(
        canonical_text("{1/2, 1/2, k; 1/2, 1/2, e}", &declared(&[], &["k"])),
        "0"
    );
    assert_ne!(
        canonical_text("{1/2, 1/2, k; 1/2, 1/2, e}", &declared(&["k"], &[])),
        "0"
    );
}

#[test]
fn the_sampler_domain_keeps_declared_parities_only() {
    let e = parse("(-1)^(2*k) {a, b, k; c, d, e}").unwrap();
    let max_j = Q::from_integer(2);
    let count = |d: &Declarations| {
        scoped(d, || match Sampler::new(&[&e]).count(max_j, u64::MAX) {
            Count::Exactly(n) => n,
            other => panic!("{other:?}"),
        })
    };
    // six variables with values 0, 1/2, ..., 2: 5^6 points; k integer
    // leaves 0, 1, 2 and half-odd 1/2, 3/2
    assert_eq!(count(&Declarations::new()), 15625);
    assert_eq!(count(&declared(&["k"], &[])), 3 * 3125);
    assert_eq!(count(&declared(&[], &["k"])), 2 * 3125);
    // and every point it enumerates has the declared parity
    let d = declared(&["k"], &["e"]);
    scoped(&d, || {
        let s = Sampler::new(&[&e]);
        let mut seen = 0;
        s.for_each_point(max_j, &mut |p| {
            assert!(p[&Name::new("k")].is_integer());
            assert!(!p[&Name::new("e")].is_integer());
            seen += 1;
            true
        });
        assert_eq!(seen, 3 * 2 * 625);
    });
}

#[test]
fn check_decides_by_the_declared_domain() {
    let lhs = parse("(-1)^(2*k) {a, b, k; c, d, e}").unwrap();
    let rhs = parse("{a, b, k; c, d, e}").unwrap();
    let minus = parse("-{a, b, k; c, d, e}").unwrap();
    let s = SpotSettings::default();
    let verdict = |d: &Declarations, r: &recoup::expr::Expr| {
        scoped(d, || check(&lhs, r, &s).unwrap().verdict)
    };
    assert!(matches!(
        verdict(&Declarations::new(), &rhs),
        Verdict::Different { .. }
    ));
    assert!(matches!(
        verdict(&declared(&["k"], &[]), &rhs),
        Verdict::Equal
    ));
    assert!(matches!(
        verdict(&declared(&[], &["k"]), &rhs),
        Verdict::Different { .. }
    ));
    assert!(matches!(
        verdict(&declared(&[], &["k"]), &minus),
        Verdict::Equal
    ));
}

#[test]
fn the_evaluator_refuses_values_against_a_declaration() {
    let e = parse("(-1)^k hat(k)").unwrap();
    let at: BTreeMap<Name, Q> = [(Name::new("k"), Q::new(1, 2))].into_iter().collect();
    let d = declared(&["k"], &[]);
    let r = scoped(&d, || eval_exact(&e, &at));
    assert!(
        matches!(r, Err(EvalError::AgainstDeclaration { .. })),
        "{r:?}"
    );
    // undeclared, the phase is what is wrong, and the point is named
    let r = eval_exact(&e, &at);
    match r {
        Err(EvalError::PhaseNotInteger { at, .. }) => {
            assert_eq!(at, vec![(Name::new("k"), Q::new(1, 2))])
        }
        other => panic!("{other:?}"),
    }
}

#[test]
fn the_language_reads_declarations_before_the_expression() {
    let (d, e) = parse_declared("integer k, q;\nhalf-odd s; (-1)^(k+s) hat(q)").unwrap();
    assert_eq!(d, declared(&["k", "q"], &["s"]));
    assert_eq!(d.to_string(), "integer k, q; half-odd s;");
    assert_eq!(
        e.to_string(),
        parse("(-1)^(k+s) hat(q)").unwrap().to_string()
    );
    // a name called `integer` is still a name where no declaration is meant
    assert!(parse("integer k").is_ok());
    assert!(parse("integers; 1").is_err());
    // a clash names the place of the second declaration
    let err = parse_declared("integer k; half-odd k; 1").unwrap_err();
    assert_eq!((err.line, err.column), (1, 21));
    // the plain parser does not drop declarations silently
    assert!(parse("integer k; k").is_err());
}

#[test]
fn a_declaration_lets_a_sum_reduce_that_is_not_an_identity_without_it() {
    // sum over x of (2x+1) (a, b, x; 0, 0, 0)^2 is 1 for integer a, b
    // (3j completeness, Edmonds 1957 eq. 3.7.7, from memory) and 0 where a
    // or b is half-odd (a projection 0 needs an integer j): undeclared it
    // must stay a sum
    use recoup::simplify::{simplify, Options};
    let text = "sum(x: (2*x+1) (a, b, x; 0, 0, 0) (a, b, x; 0, 0, 0))";
    let e = parse(text).unwrap();
    let undeclared = simplify(&e, &Options::default()).unwrap();
    assert!(undeclared.result.to_string().starts_with("sum("));
    let d = declared(&["a", "b"], &[]);
    let out = scoped(&d, || simplify(&e, &Options::default()).unwrap());
    assert_eq!(out.result.to_string(), "1");
}
