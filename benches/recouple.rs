//! Median time to derive and verify recoupling coefficients between random
//! pairs of coupling trees with 4 to 16 leaves (seeded; 11 pairs per size,
//! 5 from 14 leaves on), with
//! the number of sums left. Run: `cargo bench --bench recouple`. A
//! benchmark: it asserts nothing about time.

use recoup::recouple::{random_tree, recouple};
use recoup::simplify::Options;
use recoup::syntax::parse_tree;
use recoup::verify::rng::Rng;
use std::time::Instant;

fn main() {
    let mut rng = Rng::new(99);
    println!("| leaves | median time | max time | median sums | max sums | all sums |");
    println!("|---|---|---|---|---|---|");
    for n in [4usize, 6, 8, 10, 12, 14, 16] {
        let pairs = if n >= 14 { 5 } else { 11 };
        let mut times = Vec::new();
        let mut sums = Vec::new();
        for _ in 0..pairs {
            let f = parse_tree(&random_tree(n, "a", &mut rng)).unwrap();
            let t = parse_tree(&random_tree(n, "b", &mut rng)).unwrap();
            let start = Instant::now();
            let r = recouple(&f, &t, &Options::default()).unwrap();
            times.push(start.elapsed().as_secs_f64());
            sums.push(r.sums());
        }
        times.sort_by(|a, b| a.partial_cmp(b).unwrap());
        sums.sort();
        println!(
            "| {n} | {:.3} s | {:.3} s | {} | {} | {} |",
            times[pairs / 2],
            times[pairs - 1],
            sums[pairs / 2],
            sums[pairs - 1],
            sums.iter().sum::<usize>()
        );
    }
}
