//! 3j tables: building (in memory, j <= 40, every core), lookup cost of
//! random argument lists (Regge canonical key, numbering, rank, read)
//! against computing the same symbols in float, and the accuracy of
//! looked-up values against exact ones. With `RECOUP_TABLE=FILE` (a table
//! written by `recoup tabulate`) the lookups and the accuracy sample run
//! on that file instead. Run: `cargo bench --bench tables`. A benchmark:
//! it asserts nothing about time.

use recoup::numeric::exact::three_j;
use recoup::numeric::float::three_j_f64;
use recoup::table::build::Domain;
use recoup::table::ThreeJTable;
use recoup::verify::rng::Rng;
use std::time::Instant;

/// Random admissible 3j (doubled) with j at most `max_tj / 2`.
fn random_symbols(
    rng: &mut Rng,
    max_tj: i64,
    integer_only: bool,
    n: usize,
) -> Vec<([i64; 3], [i64; 3])> {
    let mut out = Vec::with_capacity(n);
    let step = if integer_only { 2 } else { 1 };
    while out.len() < n {
        let pick = |rng: &mut Rng| (rng.below((max_tj / step + 1) as u64) as i64) * step;
        let (a, b) = (pick(rng), pick(rng));
        let c = pick(rng);
        if c < (a - b).abs() || c > a + b || (a + b + c) % 2 != 0 {
            continue;
        }
        let ma = a - 2 * rng.below(a as u64 + 1) as i64;
        let mb = b - 2 * rng.below(b as u64 + 1) as i64;
        if (ma + mb).abs() > c {
            continue;
        }
        out.push(([a, b, c], [ma, mb, -ma - mb]));
    }
    out
}

fn main() {
    let t = Instant::now();
    let (table, source) = match std::env::var("RECOUP_TABLE") {
        Ok(path) => (
            ThreeJTable::read(std::path::Path::new(&path)).expect("a table file"),
            path,
        ),
        Err(_) => (
            ThreeJTable::build(Domain {
                max_tj: 80,
                integer_only: false,
            }),
            "built in memory".to_string(),
        ),
    };
    let d = table.domain();
    println!(
        "table: {} ({} entries, j <= {}{}), ready in {:.2} s",
        source,
        table.len(),
        d.max_tj as f64 / 2.0,
        if d.integer_only { ", integer j" } else { "" },
        t.elapsed().as_secs_f64()
    );
    let mut rng = Rng::new(7);
    if std::env::var("RECOUP_TABLE_PROFILE").is_ok() {
        let warm = random_symbols(&mut rng, 10.min(d.max_tj), false, 1_000_000);
        let mut sink = 0.0;
        for _ in 0..50 {
            for (tj, tm) in &warm {
                sink += table.three_j(*tj, *tm).unwrap_or(0.0);
            }
        }
        std::hint::black_box(sink);
        return;
    }
    let list = random_symbols(&mut rng, d.max_tj, d.integer_only, 1_000_000);
    let mut best_lookup = f64::MAX;
    let mut best_float = f64::MAX;
    for _ in 0..3 {
        let t = Instant::now();
        let mut sink = 0.0;
        for (tj, tm) in &list {
            sink += table.three_j(*tj, *tm).unwrap_or(0.0);
        }
        std::hint::black_box(sink);
        best_lookup = best_lookup.min(t.elapsed().as_secs_f64() / list.len() as f64 * 1e9);
        let t = Instant::now();
        let mut sink = 0.0;
        for (tj, tm) in list.iter().take(100_000) {
            sink += three_j_f64(*tj, *tm);
        }
        std::hint::black_box(sink);
        best_float = best_float.min(t.elapsed().as_secs_f64() / 100_000.0 * 1e9);
    }
    let t = Instant::now();
    let mut keys = 0i64;
    for (tj, tm) in &list {
        if let Some(sq) = recoup::table::regge::square_of(*tj, *tm) {
            if let recoup::table::regge::Canonical::At { key, .. } =
                recoup::table::regge::canonical(&sq)
            {
                keys += key.e;
            }
        }
    }
    std::hint::black_box(keys);
    println!(
        "canonical key alone: {:.0} ns",
        t.elapsed().as_secs_f64() / list.len() as f64 * 1e9
    );
    // warm: the symbols with j <= 5, whose entries stay in cache
    let warm = random_symbols(&mut rng, 10.min(d.max_tj), false, 1_000_000);
    let mut best_warm = f64::MAX;
    let mut best_warm_float = f64::MAX;
    for _ in 0..3 {
        let t = Instant::now();
        let mut sink = 0.0;
        for (tj, tm) in &warm {
            sink += table.three_j(*tj, *tm).unwrap_or(0.0);
        }
        std::hint::black_box(sink);
        best_warm = best_warm.min(t.elapsed().as_secs_f64() / warm.len() as f64 * 1e9);
        let t = Instant::now();
        let mut sink = 0.0;
        for (tj, tm) in &warm {
            sink += three_j_f64(*tj, *tm);
        }
        std::hint::black_box(sink);
        best_warm_float = best_warm_float.min(t.elapsed().as_secs_f64() / warm.len() as f64 * 1e9);
    }
    // rows: every m2 for random (j1, j2, j3, m1), as a code's inner loop
    let rows: Vec<([i64; 3], i64)> = list
        .iter()
        .take(20_000)
        .map(|(tj, tm)| (*tj, tm[0]))
        .collect();
    let mut best_rows = f64::MAX;
    let mut best_rows_float = f64::MAX;
    for _ in 0..3 {
        let (mut n, mut sink) = (0u64, 0.0);
        let t = Instant::now();
        for (tj, m1) in &rows {
            for m2 in (-tj[1]..=tj[1]).step_by(2) {
                sink += table.three_j(*tj, [*m1, m2, -m1 - m2]).unwrap_or(0.0);
                n += 1;
            }
        }
        std::hint::black_box(sink);
        best_rows = best_rows.min(t.elapsed().as_secs_f64() / n as f64 * 1e9);
        let (mut n, mut sink) = (0u64, 0.0);
        let t = Instant::now();
        for (tj, m1) in rows.iter().take(2000) {
            for m2 in (-tj[1]..=tj[1]).step_by(2) {
                sink += three_j_f64(*tj, [*m1, m2, -m1 - m2]);
                n += 1;
            }
        }
        std::hint::black_box(sink);
        best_rows_float = best_rows_float.min(t.elapsed().as_secs_f64() / n as f64 * 1e9);
    }
    println!("| access | lookup ns/value | float evaluation ns/value | ratio |");
    println!("|---|---|---|---|");
    println!(
        "| random over the whole table (memory-bound) | {best_lookup:.0} | {best_float:.0} | {:.1}x |",
        best_float / best_lookup
    );
    println!(
        "| every m2 of random (j1, j2, j3, m1) (a code's inner loop) | {best_rows:.0} | {best_rows_float:.0} | {:.1}x |",
        best_rows_float / best_rows
    );
    println!(
        "| random over j <= 5 (entries in cache) | {best_warm:.0} | {best_warm_float:.0} | {:.1}x |",
        best_warm_float / best_warm
    );
    // accuracy: relative error against exact values on a sample
    let mut worst = 0.0f64;
    let mut worst_at = None;
    let sample = 20_000;
    for (tj, tm) in list.iter().take(sample) {
        let exact = three_j(*tj, *tm).to_f64();
        let got = table.three_j(*tj, *tm).expect("inside the table");
        if exact != 0.0 {
            let e = ((got - exact) / exact).abs();
            if e > worst {
                worst = e;
                worst_at = Some((*tj, *tm));
            }
        } else {
            assert!(got.abs() < 1e-15, "{tj:?} {tm:?}: {got}");
        }
    }
    println!("worst relative error over {sample} random symbols: {worst:.1e} at {worst_at:?}");
    six_j_lookups();
}

/// 6j: a table of every 6j with j <= 20 built in memory, lookups of
/// random symbols against float evaluation, and accuracy against exact.
fn six_j_lookups() {
    use recoup::numeric::exact::six_j;
    use recoup::numeric::float::six_j_f64;
    use recoup::numeric::selection::triangle2;
    use recoup::table::six_j::SixJDomain;
    use recoup::table::SixJTable;
    let t = Instant::now();
    let table = SixJTable::build(SixJDomain {
        max_t: 40,
        integer_only: false,
    });
    println!(
        "\n6j table: built in memory ({} entries, j <= 20) in {:.2} s",
        table.len(),
        t.elapsed().as_secs_f64()
    );
    let mut rng = Rng::new(11);
    let mut list = Vec::new();
    while list.len() < 1_000_000 {
        let t: [i64; 6] = std::array::from_fn(|_| rng.below(41) as i64);
        let [a, b, c, d, e, f] = t;
        if triangle2(a, b, c) && triangle2(a, e, f) && triangle2(d, b, f) && triangle2(d, e, c) {
            list.push(t);
        }
    }
    let (mut best_lookup, mut best_float) = (f64::MAX, f64::MAX);
    for _ in 0..3 {
        let t = Instant::now();
        let mut sink = 0.0;
        for x in &list {
            sink += table.six_j(*x).unwrap_or(0.0);
        }
        std::hint::black_box(sink);
        best_lookup = best_lookup.min(t.elapsed().as_secs_f64() / list.len() as f64 * 1e9);
        let t = Instant::now();
        let mut sink = 0.0;
        for x in list.iter().take(100_000) {
            sink += six_j_f64(*x);
        }
        std::hint::black_box(sink);
        best_float = best_float.min(t.elapsed().as_secs_f64() / 100_000.0 * 1e9);
    }
    println!("| 6j, j <= 20 | lookup ns/value | float evaluation ns/value | ratio |");
    println!("|---|---|---|---|");
    println!(
        "| random over the whole table | {best_lookup:.0} | {best_float:.0} | {:.1}x |",
        best_float / best_lookup
    );
    let mut worst = 0.0f64;
    for x in list.iter().take(20_000) {
        let e = six_j(*x).to_f64();
        let got = table.six_j(*x).expect("inside the table");
        if e != 0.0 {
            worst = worst.max(((got - e) / e).abs());
        }
    }
    println!("worst relative error over 20000 random 6j: {worst:.1e}");
}

/// Only the warm lookups, for profiling: `RECOUP_TABLE_WARM_ONLY=1`.
#[allow(dead_code)]
fn unused() {}
