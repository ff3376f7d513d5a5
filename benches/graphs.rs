//! Time to reduce and verify closed cubic graphs (random, connected, fixed
//! seed) of 4, 8, 12, 16 and 20 vertices, in line convention: median and
//! maximum over 20 graphs each, with the number of sums left. Run:
//! `cargo bench --bench graphs`. A benchmark: it asserts nothing about time.

use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::rng::Rng;
use std::time::Instant;

fn random_cubic(n: usize, rng: &mut Rng) -> Vec<(usize, usize)> {
    loop {
        let mut stubs: Vec<usize> = (0..n).flat_map(|v| [v, v, v]).collect();
        for i in (1..stubs.len()).rev() {
            let k = rng.below(i as u64 + 1) as usize;
            stubs.swap(i, k);
        }
        let edges: Vec<(usize, usize)> = stubs
            .chunks(2)
            .map(|c| (c[0].min(c[1]), c[0].max(c[1])))
            .collect();
        if edges.iter().any(|(a, b)| a == b) {
            continue;
        }
        let mut e2 = edges.clone();
        e2.sort();
        e2.dedup();
        if e2.len() != edges.len() {
            continue;
        }
        let mut seen = vec![false; n];
        let mut st = vec![0];
        seen[0] = true;
        while let Some(v) = st.pop() {
            for &(a, b) in &edges {
                let w = if a == v {
                    b
                } else if b == v {
                    a
                } else {
                    continue;
                };
                if !seen[w] {
                    seen[w] = true;
                    st.push(w);
                }
            }
        }
        if seen.iter().all(|x| *x) {
            return edges;
        }
    }
}

fn graph_expr(n: usize, edges: &[(usize, usize)]) -> String {
    let mut slots: Vec<Vec<(String, String)>> = vec![Vec::new(); n];
    let mut phase = Vec::new();
    let mut bound = Vec::new();
    for (k, &(a, b)) in edges.iter().enumerate() {
        let j = format!("j{}", k + 1);
        let m = format!("m{}", k + 1);
        slots[a].push((j.clone(), m.clone()));
        slots[b].push((j.clone(), format!("-{m}")));
        phase.push(format!("{j}-{m}"));
        bound.push(m);
    }
    let syms: Vec<String> = slots
        .iter()
        .map(|s| {
            format!(
                "({}, {}, {}; {}, {}, {})",
                s[0].0, s[1].0, s[2].0, s[0].1, s[1].1, s[2].1
            )
        })
        .collect();
    format!(
        "sum({}: (-1)^({}) {})",
        bound.join(", "),
        phase.join("+"),
        syms.join(" ")
    )
}

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
            let e = parse(&graph_expr(n, &random_cubic(n, &mut rng))).unwrap();
            let t = Instant::now();
            let out = simplify(&e, &Options::default()).unwrap();
            times.push(t.elapsed().as_secs_f64());
            sums.push(
                out.result
                    .terms
                    .iter()
                    .map(|t| t.bound.len())
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
