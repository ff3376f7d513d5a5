use recoup::simplify::{simplify, Options};
use recoup::syntax::parse;
use recoup::verify::rng::Rng;

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
        // connected?
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

fn expr_of(n: usize, edges: &[(usize, usize)]) -> String {
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
    let args: Vec<String> = std::env::args().collect();
    let n: usize = args[1].parse().unwrap();
    let count: usize = args.get(2).map(|s| s.parse().unwrap()).unwrap_or(3);
    let mut rng = Rng::new(7);
    for _ in 0..count {
        let edges = random_cubic(n, &mut rng);
        let text = expr_of(n, &edges);
        let e = parse(&text).unwrap();
        let t = std::time::Instant::now();
        match simplify(&e, &Options::default()) {
            Ok(out) => {
                if std::env::var("SHOW").is_ok() {
                    println!("{text}");
                    println!("RESULT {}", out.result);
                }
                let sums: usize = out
                    .result
                    .terms
                    .iter()
                    .map(|t| t.bound.len())
                    .max()
                    .unwrap_or(0);
                println!(
                    "V={n}: {} steps, {} sums, checked {} nonzero {}, {:?} notes {:?}",
                    out.steps.len(),
                    sums,
                    out.checked,
                    out.nonzero,
                    t.elapsed(),
                    out.notes.len()
                );
                if n <= 6 {
                    println!("  {}", out.result);
                }
            }
            Err(err) => println!("V={n}: error {err} after {:?}", t.elapsed()),
        }
    }
}
#[allow(dead_code)]
fn unused() {}
