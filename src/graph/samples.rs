//! Sample graphs for tests, benchmarks and experiments: a closed cubic
//! graph given by its edges written as a projection sum in line convention
//! (line k has angular momentum jk and runs from its first vertex, `+mk`,
//! to its second, `-mk`, with the metric `(-1)^(jk-mk)`), and random
//! connected simple cubic graphs from a seeded generator.

use crate::verify::rng::Rng;

/// The cube on 8 vertices, one of the two cubic graphs of the 12j symbols
/// (common practice, no source).
pub const CUBE: [(usize, usize); 12] = [
    (0, 1),
    (1, 2),
    (2, 3),
    (3, 0),
    (4, 5),
    (5, 6),
    (6, 7),
    (7, 4),
    (0, 4),
    (1, 5),
    (2, 6),
    (3, 7),
];

/// The twisted (Moebius) prism on 8 vertices, the other 12j graph (common
/// practice, no source).
pub const TWISTED_PRISM: [(usize, usize); 12] = [
    (0, 1),
    (1, 2),
    (2, 3),
    (3, 4),
    (4, 5),
    (5, 6),
    (6, 7),
    (7, 0),
    (0, 4),
    (1, 5),
    (2, 6),
    (3, 7),
];

/// K3,3, the graph of the 9j symbol (common practice, no source).
pub const K33: [(usize, usize); 9] = [
    (0, 3),
    (0, 4),
    (0, 5),
    (1, 3),
    (1, 4),
    (1, 5),
    (2, 3),
    (2, 4),
    (2, 5),
];

/// The projection sum of a closed cubic graph on `n` vertices.
pub fn cubic_graph_sum(n: usize, edges: &[(usize, usize)]) -> String {
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

/// A random connected simple cubic graph on `n` vertices (n even, n >= 4),
/// by pairing half-edges at random until the pairing is simple and connected.
pub fn random_cubic(n: usize, rng: &mut Rng) -> Vec<(usize, usize)> {
    assert!(
        n >= 4 && n.is_multiple_of(2),
        "a cubic graph needs an even number >= 4 of vertices"
    );
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
        let mut sorted = edges.clone();
        sorted.sort();
        sorted.dedup();
        if sorted.len() != edges.len() {
            continue;
        }
        let mut seen = vec![false; n];
        let mut stack = vec![0];
        seen[0] = true;
        while let Some(v) = stack.pop() {
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
                    stack.push(w);
                }
            }
        }
        if seen.iter().all(|x| *x) {
            return edges;
        }
    }
}
