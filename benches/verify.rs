//! Speed of verification: `check` on an identity with five free angular
//! momenta at 200 points (j <= 4), `simplify` on a 20-term expression, and
//! `simplify` of every sum identity of the catalog (as stated, with a
//! spectator, inside an outer sum), all including verification.
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
        ..SpotSettings::default()
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
    println!("\n| sum identity | as stated | with spectator 6j and hat | inside an outer sum |");
    println!("|---|---|---|---|");
    let ids = [
        ("6j-orthogonality", "sum(x: (2*x+1) (2*p+1) {a, b, x; c, d, p} {a, b, x; c, d, q})"),
        ("6j-orthogonality-crossed", "sum(x: (2*x+1) {a, b, x; c, d, p} {c, d, x; a, b, q})"),
        ("racah-sum-rule", "sum(x: (-1)^(p+q+x) (2*x+1) {a, b, x; c, d, p} {a, b, x; d, c, q})"),
        ("biedenharn-elliott", "sum(x: (-1)^(a+b+c+d+e+f+p+q+r+x) (2*x+1) {a, b, x; c, d, p} {c, d, x; e, f, q} {e, f, x; b, a, r})"),
        ("6j-sum-phase", "sum(x: (-1)^(a+b+x) (2*x+1) {a, b, x; b, a, c})"),
        ("6j-sum-plain", "sum(x: (2*x+1) {a, b, x; a, b, c})"),
        ("9j-orthogonality", "sum(c, f: (2*c+1) (2*f+1) (2*g+1) (2*h+1) {a, b, c; d, e, f; g, h, i} {a, b, c; d, e, f; g', h', i})"),
        ("9j-from-6j-sum", "sum(x: (-1)^(2*x) (2*x+1) {a, b, c; f, i, x} {d, e, f; b, x, h} {g, h, i; x, a, d})"),
        ("3j-completeness", "sum(j3, m3: (2*j3+1) (j1, j2, j3; m1, m2, m3) (j1, j2, j3; m1', m2', m3))"),
    ];
    let time = |text: &str| {
        let e = parse(text).unwrap();
        let mut ts = Vec::new();
        for _ in 0..5 {
            let t = Instant::now();
            simplify(&e, &Options::default()).unwrap();
            ts.push(t.elapsed().as_secs_f64() * 1e3);
        }
        median(ts)
    };
    for (name, lhs) in ids {
        let a = time(lhs);
        let b = time(&format!("hat(zz) {{zz, u1, u2; u3, u4, u5}} {lhs}"));
        let c = time(&format!("sum(y: (2*y+1) {{y, u1, u2; u3, u4, u5}} {lhs})"));
        println!("| {name} | {a:.1} ms | {b:.1} ms | {c:.1} ms |");
    }
}
