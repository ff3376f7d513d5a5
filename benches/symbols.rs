//! Speed of exact and floating-point 3j, 6j and 9j symbols at j ≈ 5, 20,
//! 100, 1000, and of `eval --batch`-style parsing plus evaluation, with
//! GSL 2.7's `gsl_sf_coupling_*` on the same argument lists when built with
//! `--features gsl-bench` (needs Debian's libgsl-dev). Prints a Markdown
//! table of median ns per value and ratios, plus GSL's largest relative
//! error against the exact values. Run:
//!
//!     cargo bench --bench symbols --features gsl-bench
//!
//! A benchmark, not a test: it asserts nothing about time.

use recoup::numeric::{exact, float, Surd};
use recoup::verify::rng::Rng;
use std::time::Instant;

#[cfg(feature = "gsl-bench")]
#[path = "support/gsl.rs"]
mod gsl;

fn tri(a: i64, b: i64, c: i64) -> bool {
    recoup::numeric::selection::triangle2(a, b, c)
}

fn args_3j(rng: &mut Rng, j: i64, n: usize) -> Vec<[i64; 6]> {
    let mut out = Vec::new();
    while out.len() < n {
        let spread = (j / 3).max(2) as u64;
        let a = (2 * j - 2 * rng.below(spread) as i64).max(0);
        let b = (2 * j - 2 * rng.below(spread) as i64).max(0);
        let lo = (a - b).abs();
        let c = lo + 2 * rng.below(((a + b - lo) / 2 + 1) as u64) as i64;
        let ma = -a + 2 * rng.below(a as u64 + 1) as i64;
        let mb = -b + 2 * rng.below(b as u64 + 1) as i64;
        let mc = -ma - mb;
        if mc.abs() <= c {
            out.push([a, b, c, ma, mb, mc]);
        }
    }
    out
}

fn args_6j(rng: &mut Rng, j: i64, n: usize) -> Vec<[i64; 6]> {
    let mut out = Vec::new();
    while out.len() < n {
        let spread = (j / 3).max(2) as u64;
        let mut t = [0i64; 6];
        for x in t.iter_mut() {
            *x = (2 * j - 2 * rng.below(spread) as i64).max(0) + rng.below(2) as i64;
        }
        if tri(t[0], t[1], t[2])
            && tri(t[0], t[4], t[5])
            && tri(t[3], t[1], t[5])
            && tri(t[3], t[4], t[2])
        {
            out.push(t);
        }
    }
    out
}

fn args_9j(rng: &mut Rng, j: i64, n: usize) -> Vec<[i64; 9]> {
    let mut out = Vec::new();
    while out.len() < n {
        let spread = (j / 3).max(2) as u64;
        let mut t = [0i64; 9];
        for x in t.iter_mut() {
            *x = (2 * j - 2 * rng.below(spread) as i64).max(0) + rng.below(2) as i64;
        }
        if exact::nine_j_triads_ok(&t) {
            out.push(t);
        }
    }
    out
}

/// Median over `reps` runs of the time per call of `f` over the list, ns.
fn time_per<T>(list: &[T], reps: usize, mut f: impl FnMut(&T) -> f64) -> f64 {
    let mut times = Vec::new();
    let mut sink = 0.0;
    for _ in 0..reps {
        let t = Instant::now();
        for a in list {
            sink += f(a);
        }
        times.push(t.elapsed().as_nanos() as f64 / list.len() as f64);
    }
    std::hint::black_box(sink);
    times.sort_by(|a, b| a.partial_cmp(b).unwrap());
    times[times.len() / 2]
}

fn fmt_ns(x: f64) -> String {
    if x.is_nan() {
        "-".into()
    } else if x < 1e3 {
        format!("{x:.0} ns")
    } else if x < 1e6 {
        format!("{:.1} µs", x / 1e3)
    } else if x < 1e9 {
        format!("{:.1} ms", x / 1e6)
    } else {
        format!("{:.2} s", x / 1e9)
    }
}

struct Row {
    what: String,
    exact: f64,
    float: f64,
    gsl: f64,
    gsl_err: f64,
    ours_err: f64,
    /// GSL values off by more than 1e-10 relative (or not finite)
    gsl_wrong: usize,
    count: usize,
}

fn rel(f: f64, e: f64) -> f64 {
    if e == 0.0 {
        f.abs()
    } else if !f.is_finite() {
        f64::INFINITY
    } else {
        ((f - e) / e).abs()
    }
}

#[allow(unused_variables)]
fn gsl3(a: &[i64; 6]) -> f64 {
    #[cfg(feature = "gsl-bench")]
    unsafe {
        return gsl::gsl_sf_coupling_3j(
            a[0] as i32,
            a[1] as i32,
            a[2] as i32,
            a[3] as i32,
            a[4] as i32,
            a[5] as i32,
        );
    }
    #[allow(unreachable_code)]
    f64::NAN
}

#[allow(unused_variables)]
fn gsl6(a: &[i64; 6]) -> f64 {
    #[cfg(feature = "gsl-bench")]
    unsafe {
        return gsl::gsl_sf_coupling_6j(
            a[0] as i32,
            a[1] as i32,
            a[2] as i32,
            a[3] as i32,
            a[4] as i32,
            a[5] as i32,
        );
    }
    #[allow(unreachable_code)]
    f64::NAN
}

#[allow(unused_variables)]
fn gsl9(a: &[i64; 9]) -> f64 {
    #[cfg(feature = "gsl-bench")]
    unsafe {
        return gsl::gsl_sf_coupling_9j(
            a[0] as i32,
            a[1] as i32,
            a[2] as i32,
            a[3] as i32,
            a[4] as i32,
            a[5] as i32,
            a[6] as i32,
            a[7] as i32,
            a[8] as i32,
        );
    }
    #[allow(unreachable_code)]
    f64::NAN
}

/// Times exact, float and GSL on one list (`reps` = exact and float/GSL
/// repetitions) and measures GSL's and recoup's float errors against the
/// exact values.
fn measure<T>(
    what: String,
    list: &[T],
    reps: (usize, usize),
    exact_value: impl Fn(&T) -> Surd,
    float_value: impl Fn(&T) -> f64,
    gsl: impl Fn(&T) -> f64,
) -> Row {
    let ex: Vec<f64> = list.iter().map(|a| exact_value(a).to_f64()).collect();
    let max_error = |f: &dyn Fn(&T) -> f64| {
        list.iter()
            .zip(&ex)
            .map(|(a, e)| rel(f(a), *e))
            .fold(0.0, f64::max)
    };
    let gsl_wrong = list
        .iter()
        .zip(&ex)
        .filter(|(a, e)| {
            let r = rel(gsl(a), **e);
            r.is_nan() || r > 1e-10
        })
        .count();
    Row {
        what,
        gsl_wrong,
        count: list.len(),
        exact: time_per(list, reps.0, |a| exact_value(a).terms().count() as f64),
        float: time_per(list, reps.1, &float_value),
        gsl: time_per(list, reps.1, &gsl),
        gsl_err: max_error(&gsl),
        ours_err: max_error(&float_value),
    }
}

fn main() {
    #[cfg(feature = "gsl-bench")]
    unsafe {
        gsl::gsl_set_error_handler_off();
    }
    let quick = std::env::args().any(|a| a == "--quick");
    let mut rng = Rng::new(42);
    let mut rows = Vec::new();
    for &j in &[5i64, 20, 100, 1000, 10000] {
        let n = match j {
            5 => 2000,
            20 => 500,
            100 => 50,
            1000 => 6,
            _ => 3,
        };
        let reps = if quick || j >= 10000 { 3 } else { 11 };
        let l = args_3j(&mut rng, j, n);
        let three = |a: &[i64; 6]| ([a[0], a[1], a[2]], [a[3], a[4], a[5]]);
        rows.push(measure(
            format!("3j, j ≈ {j}"),
            &l,
            (reps, reps),
            |a| {
                let (tj, tm) = three(a);
                exact::three_j(tj, tm)
            },
            |a| {
                let (tj, tm) = three(a);
                float::three_j_f64(tj, tm)
            },
            gsl3,
        ));
        let l = args_6j(&mut rng, j, n);
        rows.push(measure(
            format!("6j, j ≈ {j}"),
            &l,
            (reps, reps),
            |a| exact::six_j(*a),
            |a| float::six_j_f64(*a),
            gsl6,
        ));
        // 9j up to j ≈ 100 (its exact value is a sum over 6j products)
        if j <= 100 {
            let n9 = match j {
                5 => 300,
                20 => 20,
                _ => 2,
            };
            let l = args_9j(&mut rng, j, n9);
            rows.push(measure(
                format!("9j, j ≈ {j}"),
                &l,
                (reps.min(5), reps),
                |a| exact::nine_j(*a),
                |a| float::nine_j_f64(*a),
                gsl9,
            ));
        }
    }
    println!("| symbol | recoup exact | recoup float | GSL 2.7 | exact/GSL | float/GSL | GSL wrong (> 1e-10) | GSL max rel. error | recoup float max rel. error |");
    println!("|---|---|---|---|---|---|---|---|---|");
    for r in &rows {
        // where GSL is wrong its time is no comparison: the ratio is marked
        let ratio = |x: f64| {
            if r.gsl_wrong > 0 {
                format!("({:.2}, GSL wrong)", x / r.gsl)
            } else {
                format!("{:.2}", x / r.gsl)
            }
        };
        println!(
            "| {} | {} | {} | {} | {} | {} | {} of {} | {:.1e} | {:.1e} |",
            r.what,
            fmt_ns(r.exact),
            fmt_ns(r.float),
            fmt_ns(r.gsl),
            ratio(r.exact),
            ratio(r.float),
            r.gsl_wrong,
            r.count,
            r.gsl_err,
            r.ours_err
        );
    }
    batch_throughput(quick);
}

/// Lines per second of parse + exact evaluation, as `eval --batch` does.
fn batch_throughput(quick: bool) {
    let mut rng = Rng::new(7);
    let mut lines = Vec::new();
    for i in 0..if quick { 500 } else { 3000 } {
        let a = args_3j(&mut rng, 4, 1)[0];
        let s = match i % 3 {
            0 => format!(
                "({}/2, {}/2, {}/2; {}/2, {}/2, {}/2)",
                a[0], a[1], a[2], a[3], a[4], a[5]
            ),
            1 => {
                let b = args_6j(&mut rng, 4, 1)[0];
                format!(
                    "{{{}/2, {}/2, {}/2; {}/2, {}/2, {}/2}}",
                    b[0], b[1], b[2], b[3], b[4], b[5]
                )
            }
            _ => format!(
                "<{}/2, {}/2; {}/2, {}/2 | {}/2, {}/2>",
                a[0], a[3], a[1], a[4], a[2], -a[5]
            ),
        };
        lines.push(s);
    }
    let t = Instant::now();
    let ev = recoup::evaluate::Evaluator::<recoup::numeric::Surd>::new();
    let empty = recoup::evaluate::Assignment::new();
    let mut out = String::new();
    for l in &lines {
        let e = recoup::syntax::parse(l).unwrap();
        let v = ev.eval(&e, &empty).unwrap();
        out.push_str(&format!("{v}\t{}\n", v.to_f64()));
    }
    let secs = t.elapsed().as_secs_f64();
    std::hint::black_box(out);
    println!("\neval --batch work (parse + exact + float + formatting, in process): {:.0} lines/s over {} lines of j <= 4 symbols", lines.len() as f64 / secs, lines.len());
}
