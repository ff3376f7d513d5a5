//! Cost per value of whole families by recursion (`numeric::family`)
//! against a loop of single float values over the same members (recoup's
//! own single-value routine; GSL is not linked here), at j ~ 100, 1000
//! and 10^4. Run: `cargo bench --bench families`. A benchmark: it asserts
//! nothing about time.

use recoup::numeric::family::{six_j_over_j1, three_j_over_j1};
use recoup::numeric::float::{
    six_j_single_sum_f64 as six_j_f64, three_j_single_sum_f64 as three_j_f64,
};
use std::time::Instant;

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap());
    v[v.len() / 2]
}

fn main() {
    println!("| family | members | recursion ns/value | single values ns/value | ratio |");
    println!("|---|---|---|---|---|");
    for j in [100i64, 1000, 10000] {
        let (tj2, tj3, tm2, tm3) = (2 * j, 2 * j, 2 * (j / 10), -2 * (j / 7));
        let mut rec = Vec::new();
        let mut n = 0;
        for _ in 0..5 {
            let t = Instant::now();
            let f = three_j_over_j1(tj2, tj3, tm2, tm3);
            rec.push(t.elapsed().as_secs_f64());
            n = f.values.len();
        }
        let per_rec = median(rec) / n as f64 * 1e9;
        // single values: every member at j <= 1000, a sample of 200 above
        let step = if j > 1000 { n / 200 } else { 1 };
        let t = Instant::now();
        let mut count = 0;
        let mut sink = 0.0;
        let lo = (tj2 - tj3).abs().max((tm2 + tm3).abs());
        for i in (0..n).step_by(step.max(1)) {
            sink += three_j_f64([lo + 2 * i as i64, tj2, tj3], [-tm2 - tm3, tm2, tm3]);
            count += 1;
        }
        let per_single = t.elapsed().as_secs_f64() / count as f64 * 1e9;
        std::hint::black_box(sink);
        println!(
            "| 3j over j1, j2 = j3 = {j} | {n} | {per_rec:.1} | {per_single:.0} | {:.0}x |",
            per_single / per_rec
        );
    }
    for j in [100i64, 1000, 10000] {
        let t6 = [2 * j, 2 * j + 2, 2 * (j * 3 / 4), 2 * j - 2, 2 * j + 4];
        let mut rec = Vec::new();
        let mut n = 0;
        for _ in 0..5 {
            let t = Instant::now();
            let f = six_j_over_j1(t6[0], t6[1], t6[2], t6[3], t6[4]);
            rec.push(t.elapsed().as_secs_f64());
            n = f.values.len();
        }
        let per_rec = median(rec) / n as f64 * 1e9;
        let step = if j >= 1000 { (n / 50).max(1) } else { 1 };
        let f = six_j_over_j1(t6[0], t6[1], t6[2], t6[3], t6[4]);
        let t = Instant::now();
        let mut count = 0;
        let mut sink = 0.0;
        for i in (0..n).step_by(step) {
            sink += six_j_f64([f.argument(i), t6[0], t6[1], t6[2], t6[3], t6[4]]);
            count += 1;
        }
        let per_single = t.elapsed().as_secs_f64() / count as f64 * 1e9;
        std::hint::black_box(sink);
        println!(
            "| 6j over j1, others ~ {j} | {n} | {per_rec:.1} | {per_single:.0} | {:.0}x |",
            per_single / per_rec
        );
    }
}
