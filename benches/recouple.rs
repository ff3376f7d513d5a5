//! Median time to derive and verify recoupling coefficients between random
//! pairs of coupling trees with 4, 6, 8, 10 and 12 leaves (seeded), with
//! the number of sums left. Run: `cargo bench --bench recouple`. A
//! benchmark: it asserts nothing about time.

use recoup::recouple::recouple;
use recoup::simplify::Options;
use recoup::syntax::parse_tree;
use recoup::verify::rng::Rng;
use std::time::Instant;

fn random_tree(n: usize, prefix: &str, rng: &mut Rng) -> String {
    let mut items: Vec<String> = (1..=n).map(|k| format!("j{k}")).collect();
    for i in (1..items.len()).rev() {
        let k = rng.below(i as u64 + 1) as usize;
        items.swap(i, k);
    }
    let mut count = 0;
    while items.len() > 1 {
        let i = rng.below(items.len() as u64 - 1) as usize;
        let a = items.remove(i);
        let b = items.remove(i);
        count += 1;
        let label = if items.is_empty() {
            "J".to_string()
        } else {
            format!("{prefix}{count}")
        };
        items.insert(i, format!("({a}, {b}) {label}"));
    }
    items.pop().unwrap()
}

fn main() {
    let mut rng = Rng::new(99);
    println!("| leaves | median time | max time | median sums | max sums |");
    println!("|---|---|---|---|---|");
    for n in [4usize, 6, 8, 10, 12] {
        let mut times = Vec::new();
        let mut sums = Vec::new();
        for _ in 0..11 {
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
            "| {n} | {:.3} s | {:.3} s | {} | {} |",
            times[5], times[10], sums[5], sums[10]
        );
    }
}
