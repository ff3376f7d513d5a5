//! Time to reduce and verify the matrix elements of the tensor-operator
//! tests (Edmonds 1957 ch. 7, spin-orbit, hyperfine, Lande, LS electric
//! dipole): median of 5 runs each, with the steps taken and the points of
//! the final check. Run: `cargo bench --bench matrix_elements`. A
//! benchmark: it asserts nothing about time.

use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use std::time::Instant;

const CASES: &[(&str, &str)] = &[
    (
        "tensor product on two parts (9j)",
        "<(j1, j2) J || [T[k1] @ j1 x U[k2] @ j2][k] || (j1', j2') J'>",
    ),
    (
        "operator on part 1 (6j)",
        "<(j1, j2) J || T[k] @ j1 || (j1', j2') J'>",
    ),
    (
        "operator on part 2 (6j)",
        "<(j1, j2) J || U[k] @ j2 || (j1', j2') J'>",
    ),
    (
        "scalar product",
        "<(j1, j2) J, M | (T[k] @ j1 . U[k] @ j2) | (j1', j2') J', M'>",
    ),
    (
        "two operators on one system",
        "<j || [T[k1] @ j x U[k2] @ j][k] || j'>",
    ),
    (
        "spin-orbit",
        "<(l, s) j, m | (J[1] @ l . J[1] @ s) | (l, s) j, m>",
    ),
    (
        "magnetic hyperfine",
        "<(I, J) F, M | (J[1] @ I . J[1] @ J) | (I, J) F, M>",
    ),
    (
        "Lande factor",
        "<(L, S) J, M | J[1, 0] @ L + 2 J[1, 0] @ S | (L, S) J, M>",
    ),
    (
        "electric dipole in LS coupling",
        "<(L, S) J || C[1] @ L || (L', S) J'>",
    ),
    (
        "quadrupole between hyperfine levels",
        "<((la, sa) ja, Ib) F || C[2] @ la || ((la', sa) ja', Ib) F'>",
    ),
];

fn main() {
    println!("| matrix element | median time | steps | points in final check |");
    println!("|---|---|---|---|");
    for (what, text) in CASES {
        let e = parse(text).unwrap();
        let mut times = Vec::new();
        let mut steps = 0;
        let mut checked = 0;
        for _ in 0..5 {
            let t = Instant::now();
            let out = simplify(&e, &Options::default()).unwrap();
            times.push(t.elapsed().as_secs_f64());
            steps = out.steps.len();
            checked = out.checked;
        }
        times.sort_by(|a, b| a.partial_cmp(b).unwrap());
        println!(
            "| {what} | {:.3} s | {steps} | {checked} |",
            times[times.len() / 2]
        );
    }
}
