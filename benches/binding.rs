//! The Rust side of the Python binding's benchmark
//! (python/bench/binding.py, which writes the argument rows and runs this):
//! float 3j, 6j and 9j through `recoup::api::symbols` over the very rows
//! the Python run evaluated, serial and spread over all cores with rayon
//! (as the binding does), medians of 3 runs. Prints one line per kind:
//! `KIND ROWS SERIAL_S PARALLEL_S`. Needs `RECOUP_BINDING_ROWS` (the
//! directory of `3j.i64`, `6j.i64`, `9j.i64`: little-endian int64 rows of
//! doubled arguments). A benchmark: it asserts nothing about time.

use rayon::prelude::*;
use recoup::api::symbols;
use std::time::Instant;

fn value(kind: &str, a: &[i64]) -> f64 {
    let r = match kind {
        "3j" => symbols::float_3j([a[0], a[1], a[2]], [a[3], a[4], a[5]]),
        "6j" => symbols::float_6j(a.try_into().unwrap()),
        _ => symbols::float_9j(a.try_into().unwrap()),
    };
    r.unwrap_or(f64::NAN)
}

fn median(mut f: impl FnMut() -> f64) -> f64 {
    let mut t: Vec<f64> = (0..3).map(|_| f()).collect();
    t.sort_by(f64::total_cmp);
    t[1]
}

fn main() {
    let Ok(dir) = std::env::var("RECOUP_BINDING_ROWS") else {
        println!("set RECOUP_BINDING_ROWS (python/bench/binding.py does)");
        return;
    };
    for (kind, width) in [("3j", 6usize), ("6j", 6), ("9j", 9)] {
        let path = std::path::Path::new(&dir).join(format!("{kind}.i64"));
        let Ok(bytes) = std::fs::read(&path) else {
            println!("no rows at {}", path.display());
            continue;
        };
        let data: Vec<i64> = bytes
            .chunks_exact(8)
            .map(|b| i64::from_le_bytes(b.try_into().unwrap()))
            .collect();
        let rows = data.len() / width;
        let serial = median(|| {
            let t = Instant::now();
            let s: f64 = data.chunks_exact(width).map(|r| value(kind, r)).sum();
            std::hint::black_box(s);
            t.elapsed().as_secs_f64()
        });
        let parallel = median(|| {
            let t = Instant::now();
            let v: Vec<f64> = data
                .par_chunks_exact(width)
                .map(|r| value(kind, r))
                .collect();
            std::hint::black_box(v);
            t.elapsed().as_secs_f64()
        });
        println!("{kind} {rows} {serial:.6} {parallel:.6}");
    }
}
