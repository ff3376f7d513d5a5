//! Time to reduce and verify closed cubic graphs (random, connected, fixed
//! seed) of 4, 8, 12, 16 and 20 vertices, in line convention: median and
//! maximum over 20 graphs each, with the number of sums left. Run:
//! `cargo bench --bench graphs`. A benchmark: it asserts nothing about time.

use recoup::graph::samples::{cubic_graph_sum, random_cubic};
use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::rng::Rng;
use std::time::Instant;

fn main() {
    let mut rng = Rng::new(2028);
    println!(
        "| vertices | median time | max time | median sums | points in final check (median) |"
    );
    println!("|---|---|---|---|---|");
    for n in [4usize, 8, 12, 16, 20] {
        let mut times = Vec::new();
        let mut sums = Vec::new();
        let mut checked = Vec::new();
        for _ in 0..20 {
            let e = parse(&cubic_graph_sum(n, &random_cubic(n, &mut rng))).unwrap();
            let t = Instant::now();
            let out = simplify(&e, &Options::default()).unwrap();
            times.push(t.elapsed().as_secs_f64());
            sums.push(
                out.result
                    .terms()
                    .iter()
                    .map(|t| t.bound().len())
                    .max()
                    .unwrap_or(0),
            );
            checked.push(out.checked);
        }
        times.sort_by(|a, b| a.partial_cmp(b).unwrap());
        sums.sort();
        checked.sort();
        println!(
            "| {n} | {:.3} s | {:.3} s | {} | {} |",
            times[10], times[19], sums[10], checked[10]
        );
    }
}
