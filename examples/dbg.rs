use recoup::numeric::{exact, float};
use std::time::Instant;
fn main() {
    let mut rng = recoup::verify::rng::Rng::new(5);
    for &jmax in &[100i64, 1000, 10000] {
        let mut worst = 0f64;
        let t0 = Instant::now();
        let mut n = 0;
        let mut tf = 0.0;
        while n < 3 {
            // random 3j with all j near jmax
            let a = 2 * jmax - 2 * (rng.below(jmax as u64 / 10 + 1) as i64);
            let b = 2 * jmax - 2 * (rng.below(jmax as u64 / 10 + 1) as i64);
            let lo = (a - b).abs();
            let c = lo + 2 * (rng.below(((a + b - lo) / 2 + 1) as u64) as i64);
            let ma = -a + 2 * (rng.below(a as u64 + 1) as i64);
            let mb = -b + 2 * (rng.below(b as u64 + 1) as i64);
            let mc = -ma - mb;
            if mc.abs() > c {
                continue;
            }
            let e = exact::three_j([a, b, c], [ma, mb, mc]);
            let t1 = Instant::now();
            let f = float::three_j_f64([a, b, c], [ma, mb, mc]);
            tf += t1.elapsed().as_secs_f64();
            let ev = e.to_f64();
            let rel = if ev == 0.0 {
                f.abs()
            } else {
                ((f - ev) / ev).abs()
            };
            worst = worst.max(rel);
            n += 1;
            println!("  3j j~{jmax}: {ev:e} rel {rel:e}");
        }
        println!(
            "3j j~{jmax}: worst rel {worst:e}, total {:?}, float {tf}",
            t0.elapsed()
        );
    }
}
