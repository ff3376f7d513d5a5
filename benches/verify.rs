//! Speed of verification: `check` on an identity with five free angular
//! momenta at 200 points (j <= 4), and `simplify` on a 20-term expression.
//! Run: `cargo bench --bench verify`. A benchmark: it asserts nothing
//! about time.

use recoup::expr::Q;
use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::check::{check, Verdict};
use recoup::verify::spot::SpotSettings;
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap());
    v[v.len() / 2]
}

fn main() {
    // 6j-orthogonality at p = q (Edmonds 6.2.9): free a, b, c, d, p
    let lhs = parse("sum(x: (2*x+1) {a, b, x; c, d, p} {a, b, x; c, d, p})").unwrap();
    let rhs = parse("tri(a, d, p) tri(b, c, p) / (2*p+1)").unwrap();
    let s = SpotSettings {
        max_j: Q::from_integer(4),
        samples: 200,
        exhaustive: false,
        seed: 1,
    };
    let mut times = Vec::new();
    let mut last = None;
    for _ in 0..5 {
        let t = Instant::now();
        let r = check(&lhs, &rhs, &s).unwrap();
        times.push(t.elapsed().as_secs_f64());
        last = Some(r);
    }
    let r = last.unwrap();
    assert!(matches!(r.verdict, Verdict::Equal));
    println!(
        "check, 5 free angular momenta, {} points ({} nonzero), j <= 4: median {:.3} s",
        r.checked,
        r.nonzero,
        median(times)
    );
    // biedenharn-elliott (Edmonds 6.2.12): 9 free, 200 points
    let lhs = parse("sum(x: (-1)^(a+b+c+d+e+f+p+q+r+x) (2*x+1) {a, b, x; c, d, p} {c, d, x; e, f, q} {e, f, x; b, a, r})").unwrap();
    let rhs = parse("{p, q, r; e, a, d} {p, q, r; f, b, c}").unwrap();
    let t = Instant::now();
    let r = check(&lhs, &rhs, &s).unwrap();
    println!(
        "check, Biedenharn-Elliott (9 free), {} points ({} nonzero), j <= 4: {:.3} s",
        r.checked,
        r.nonzero,
        t.elapsed().as_secs_f64()
    );
    // a 20-term expression: symmetric spellings, special values, phases
    let pieces = [
        "{a, b, c; d, e, 0}",
        "(-1)^(4*j) (j, j, 0; m, -m, 0)",
        "{b, a, c; e, d, f}",
        "-{a, b, c; d, e, f}",
        "(-1)^(2*(a+b+c)) {c, b, a; f, e, d}",
        "(a, a, 1; 0, 0, 0)",
        "{1, 1, 1; 1, 1, 1} hat(j)",
        "(-1)^(-a-b-c) {a, b, c; d, e, f}",
        "{0, b, d; c, e, a}",
        "(0, j, j; 0, m, -m)",
        "sum(x: delta(x, p) (2*x+1) {a, b, x; c, d, e})",
        "-(2*p+1) {a, b, p; c, d, e}",
        "{q-1/2, 1/2, q; p, r, p+1/2}",
        "<ja, ma; jb, mb | J, ma+mb>",
        "-<jb, mb; ja, ma | J, ma+mb> (-1)^(ja+jb-J)",
        "{l1, s1, j1; l2, s2, j2; L, S, J}",
        "-{L, S, J; l1, s1, j1; l2, s2, j2}",
        "2 {a, b, c; d, e, f; g, h, 0}",
        "(j1, j2, j3; m1, m2, -m1-m2)",
        "(-1)^(j1+j2+j3) (j2, j1, j3; m2, m1, -m1-m2)",
    ];
    let text = pieces.join(" + ");
    let e = parse(&text).unwrap();
    assert_eq!(e.len(), 20, "{}", e);
    let mut times = Vec::new();
    let mut steps = 0;
    let mut result = String::new();
    for _ in 0..5 {
        let t = Instant::now();
        let out = simplify(&e, &Options::default()).unwrap();
        times.push(t.elapsed().as_secs_f64());
        steps = out.steps.len();
        result = out.result.to_string();
    }
    println!(
        "simplify, 20 terms, {steps} verified steps: median {:.3} s\n  result: {result}",
        median(times)
    );
}
