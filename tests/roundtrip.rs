//! Printing and parsing: the plain text recoup prints parses back to the
//! same expression (property test over generated expressions), and the
//! printed form of a corpus of inputs (snapshot).

use num_bigint::BigInt;
use num_rational::BigRational;
use proptest::prelude::*;
use recoup::expr::{Expr, Factor, Lin, Name, Term, TermParts, Q};
use recoup::syntax::parse;

const VARS: &[&str] = &["a", "b", "j1", "j12", "J'", "m", "m_a", "x"];

fn lin() -> impl Strategy<Value = Lin> {
    (
        proptest::collection::vec(
            (
                0..VARS.len(),
                -3i64..=3,
                prop::sample::select(vec![1i64, 2]),
            ),
            0..3,
        ),
        -4i64..=4,
        prop::sample::select(vec![1i64, 2]),
    )
        .prop_map(|(ts, c, d)| {
            let mut l = Lin::constant(Q::new(c, d));
            for (v, k, den) in ts {
                l = l.add_scaled(&Lin::var(VARS[v]), Q::new(k, den));
            }
            l
        })
}

fn factor() -> impl Strategy<Value = Factor> {
    prop_oneof![
        (lin(), lin()).prop_map(|(a, b)| Factor::Delta(a, b)),
        (lin(), lin(), lin()).prop_map(|(a, b, c)| Factor::Tri([a, b, c])),
        (
            lin(),
            prop::sample::select(vec![
                Q::new(1, 2),
                Q::new(-1, 2),
                Q::from_integer(1),
                Q::from_integer(-1),
                Q::new(3, 2),
                Q::from_integer(2)
            ])
        )
            .prop_filter("a power of a constant is folded", |(b, _)| !b.is_constant())
            .prop_map(|(b, e)| Factor::Power(b, e)),
        proptest::collection::vec(lin(), 6).prop_map(|v| Factor::ThreeJ(v.try_into().unwrap())),
        proptest::collection::vec(lin(), 6).prop_map(|v| Factor::Cg(v.try_into().unwrap())),
        proptest::collection::vec(lin(), 6).prop_map(|v| Factor::SixJ(v.try_into().unwrap())),
        proptest::collection::vec(lin(), 9).prop_map(|v| Factor::NineJ(v.try_into().unwrap())),
    ]
}

fn term() -> impl Strategy<Value = Term> {
    (
        -5i64..=5,
        1i64..=6,
        prop::sample::select(vec![1u32, 1, 2, 3, 6]),
        lin(),
        proptest::collection::vec(factor(), 0..4),
        proptest::collection::vec(0..VARS.len(), 0..3),
    )
        .prop_map(|(n, d, root, phase, factors, bound)| {
            let n = if n == 0 { 1 } else { n };
            TermParts {
                coef: BigRational::new(BigInt::from(n), BigInt::from(d)),
                root: root.into(),
                phase,
                factors,
                bound: bound.into_iter().map(|i| Name::from(VARS[i])).collect(),
            }
            .normalized()
        })
}

/// Expressions whose literal arguments are physics (the parser refuses
/// the others, with the same test).
fn expr() -> impl Strategy<Value = Expr> {
    proptest::collection::vec(
        term().prop_filter("literal arguments that are not physics do not parse", |t| {
            t.factors()
                .iter()
                .all(|f| recoup::syntax::literal_problem(f).is_none())
        }),
        0..4,
    )
    .prop_map(|ts| {
        let mut e = Expr::zero();
        for t in ts {
            e.push(t);
        }
        e
    })
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]
    #[test]
    fn printed_text_parses_back_to_the_same_expression(e in expr()) {
        let text = e.to_string();
        let back = parse(&text).map_err(|err| TestCaseError::fail(format!("{text}\n{err}")))?;
        prop_assert_eq!(&back, &e, "printed: {}", text);
    }
}

#[test]
fn printed_forms_of_a_corpus() {
    let inputs = [
        "(-1)^(j1-j2+M) hat(J) (j1, j2, J; m1, m2, -M)",
        "sum(x: (-1)^(2*x) (2*x+1) {a, b, c; f, i, x} {d, e, f; b, x, h} {g, h, i; x, a, d})",
        "delta(a, e) delta(b, d) tri(a, b, c) (-1)^(a+b+c) / (hat(a) hat(b))",
        "(-1)^(a+b+c) sqrt((a+b+c+1)*(b+c-a) / (2*b*(2*b+1)*2*c*(2*c+1)))",
        "2 x + 3 x - 1/2",
        "-sqrt(2/3) <1, 0; 1/2, 1/2 | 3/2, 1/2>",
        "(-1)^(j+3) (j, j, 0; m, -m, 0) + (-1)^(j+1) (j, j, 0; m, -m, 0)",
        "sum(m: (-1)^(j-m) (j1, j2, j; m1, m2, -m) (j, j3, j4; m, m3, m4)) / 3",
        "hat(j)^3 (2*j+1)^-2",
        "sum(x: 1) sum(x: x)",
        "((a+b)/2)^2",
        "{1, 1, 1; 1, 1, 1} - 1/6",
    ];
    let out: Vec<String> = inputs
        .iter()
        .map(|s| format!("{s}\n  => {}", parse(s).unwrap()))
        .collect();
    insta::assert_snapshot!(out.join("\n"));
}
