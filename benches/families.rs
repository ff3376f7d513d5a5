//! Cost per value of whole families by recursion (`numeric::family`)
//! against a loop of single float values over the same members (recoup's
//! single-sum routine, and GSL 2.7's singles with `--features gsl-bench`,
//! with how many of them are wrong beyond 1e-10 against the recursion),
//! at j ~ 100, 1000 and 10^4; then single float values (`three_j_f64`,
//! `six_j_f64`, which take a member of the shortest family at j >= 200
//! when it is not small there) against the single sum on the same random
//! arguments. Run: `cargo bench --bench families [--features gsl-bench]`.
//! A benchmark: it asserts nothing about time.

use recoup::numeric::family::{six_j_over_j1, three_j_over_j1};
use recoup::numeric::float::{
    six_j_single_sum_f64 as six_j_f64, three_j_single_sum_f64 as three_j_f64,
};
use recoup::verify::rng::Rng;
use std::time::Instant;

#[cfg(feature = "gsl-bench")]
#[path = "support/gsl.rs"]
mod gsl;

/// GSL's single values over a family's members (`None` without the
/// feature): ns per value and how many differ from the recursion by more
/// than 1e-10 relative (to the family's largest member where the member
/// is tiny).
#[allow(unused_variables)]
fn gsl_loop(members: &[(i64, f64)], value: impl Fn(i64) -> f64) -> Option<(f64, usize)> {
    #[cfg(feature = "gsl-bench")]
    {
        let t = Instant::now();
        let mut sink = 0.0;
        for &(x, _) in members {
            sink += value(x);
        }
        std::hint::black_box(sink);
        let ns = t.elapsed().as_secs_f64() / members.len() as f64 * 1e9;
        let big = members.iter().fold(0.0f64, |a, m| a.max(m.1.abs()));
        let wrong = members
            .iter()
            .filter(|&&(x, v)| {
                let d = (value(x) - v).abs();
                d.is_nan() || d > 1e-10 * v.abs().max(1e-3 * big)
            })
            .count();
        return Some((ns, wrong));
    }
    #[allow(unreachable_code)]
    None
}

fn gsl_cell(g: Option<(f64, usize)>, n: usize) -> String {
    match g {
        None => "- | -".into(),
        Some((ns, 0)) => format!("{ns:.0} | 0 of {n}"),
        Some((ns, w)) => format!("({ns:.0}: wrong, no comparison) | {w} of {n}"),
    }
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(|a, b| a.partial_cmp(b).unwrap());
    v[v.len() / 2]
}

fn main() {
    #[cfg(feature = "gsl-bench")]
    unsafe {
        gsl::gsl_set_error_handler_off();
    }
    println!("| family | members | recursion ns/value | single values ns/value | ratio | GSL singles ns/value | GSL wrong |");
    println!("|---|---|---|---|---|---|---|");
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
        let f = three_j_over_j1(tj2, tj3, tm2, tm3);
        let members: Vec<(i64, f64)> = (0..n).map(|i| (f.argument(i), f.values[i])).collect();
        #[allow(unused_variables)]
        let g = gsl_loop(&members, |x| {
            #[cfg(feature = "gsl-bench")]
            unsafe {
                return gsl::gsl_sf_coupling_3j(
                    x as i32,
                    tj2 as i32,
                    tj3 as i32,
                    (-tm2 - tm3) as i32,
                    tm2 as i32,
                    tm3 as i32,
                );
            }
            #[allow(unreachable_code)]
            0.0
        });
        println!(
            "| 3j over j1, j2 = j3 = {j} | {n} | {per_rec:.1} | {per_single:.0} | {:.0}x | {} |",
            per_single / per_rec,
            gsl_cell(g, n)
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
        let members: Vec<(i64, f64)> = (0..n).map(|i| (f.argument(i), f.values[i])).collect();
        #[allow(unused_variables)]
        let g = gsl_loop(&members, |x| {
            #[cfg(feature = "gsl-bench")]
            unsafe {
                return gsl::gsl_sf_coupling_6j(
                    x as i32,
                    t6[0] as i32,
                    t6[1] as i32,
                    t6[2] as i32,
                    t6[3] as i32,
                    t6[4] as i32,
                );
            }
            #[allow(unreachable_code)]
            0.0
        });
        println!(
            "| 6j over j1, others ~ {j} | {n} | {per_rec:.1} | {per_single:.0} | {:.0}x | {} |",
            per_single / per_rec,
            gsl_cell(g, n)
        );
    }
    single_values();
    nine_j_values();
}

/// Float 9j at j ~ 100 and 1000: the median time of `nine_j_f64`, and how
/// many of the symbols the family path (three 6j recursions over x)
/// answered under its error bound, against the median of the rest.
fn nine_j_values() {
    use recoup::numeric::float::{nine_j_by_families, nine_j_f64};
    println!();
    println!("| 9j | n | by families | median, by families | median, others |");
    println!("|---|---|---|---|---|");
    let mut rng = Rng::new(99);
    for (j, n) in [(100i64, 20usize), (1000, 6)] {
        let (mut fam, mut other) = (Vec::new(), Vec::new());
        let mut done = 0;
        while done < n {
            let mut t = [0i64; 9];
            for x in t.iter_mut() {
                *x = 2 * j - 2 * rng.below((j / 10).max(1) as u64) as i64 + rng.below(2) as i64;
            }
            if !recoup::numeric::exact::nine_j_triads_ok(&t) {
                continue;
            }
            done += 1;
            let by_families = nine_j_by_families(&t).is_some();
            let secs = timed(|| nine_j_f64(t));
            if by_families {
                fam.push(secs);
            } else {
                other.push(secs);
            }
        }
        let med = |v: Vec<f64>| {
            if v.is_empty() {
                "-".to_string()
            } else {
                format!("{:.1} us", median(v) * 1e6)
            }
        };
        println!(
            "| j ~ {j} | {n} | {} | {} | {} |",
            fam.len(),
            med(fam),
            med(other)
        );
    }
}

/// A 3j's doubled angular momenta and projections.
type ThreeJArgs = ([i64; 3], [i64; 3]);

/// Random admissible 3j and 6j with every j near `j` (doubled).
fn random_symbols(rng: &mut Rng, j: i64, n: usize) -> (Vec<ThreeJArgs>, Vec<[i64; 6]>) {
    let mut threes = Vec::new();
    while threes.len() < n {
        let spread = (j / 5).max(1) as u64;
        let a = 2 * j - 2 * rng.below(spread) as i64;
        let b = 2 * j - 2 * rng.below(spread) as i64;
        let lo = (a - b).abs();
        let c = lo + 2 * rng.below(((a + b - lo) / 2 + 1) as u64) as i64;
        let ma = -a + 2 * rng.below(a as u64 + 1) as i64;
        let mb = -b + 2 * rng.below(b as u64 + 1) as i64;
        if (ma + mb).abs() <= c {
            threes.push(([a, b, c], [ma, mb, -ma - mb]));
        }
    }
    let mut sixes = Vec::new();
    let tri = |a: i64, b: i64, c: i64| (a + b + c) % 2 == 0 && c >= (a - b).abs() && c <= a + b;
    while sixes.len() < n {
        let mut t = [0i64; 6];
        for x in t.iter_mut() {
            *x = 2 * j - 2 * rng.below((j / 5).max(1) as u64) as i64;
        }
        if tri(t[0], t[1], t[2])
            && tri(t[0], t[4], t[5])
            && tri(t[3], t[1], t[5])
            && tri(t[3], t[4], t[2])
        {
            sixes.push(t);
        }
    }
    (threes, sixes)
}

fn timed(f: impl Fn() -> f64) -> f64 {
    let t = Instant::now();
    std::hint::black_box(f());
    t.elapsed().as_secs_f64()
}

fn single_values() {
    use recoup::numeric::float::{six_j_f64 as six_fast, three_j_f64 as three_fast};
    println!();
    println!("| single values | n | median now | median single sum | ratio |");
    println!("|---|---|---|---|---|");
    let mut rng = Rng::new(2027);
    for (j, n) in [(1000i64, 30usize), (10000, 8)] {
        let (threes, sixes) = random_symbols(&mut rng, j, n);
        let now: Vec<f64> = threes
            .iter()
            .map(|&(a, m)| timed(|| three_fast(a, m)))
            .collect();
        let old: Vec<f64> = threes
            .iter()
            .map(|&(a, m)| timed(|| three_j_f64(a, m)))
            .collect();
        let (a, b) = (median(now), median(old));
        println!(
            "| 3j, j ~ {j} | {n} | {:.1} us | {:.1} us | {:.0}x |",
            a * 1e6,
            b * 1e6,
            b / a
        );
        let now: Vec<f64> = sixes.iter().map(|&t| timed(|| six_fast(t))).collect();
        let old: Vec<f64> = sixes.iter().map(|&t| timed(|| six_j_f64(t))).collect();
        let (a, b) = (median(now), median(old));
        println!(
            "| 6j, j ~ {j} | {n} | {:.1} us | {:.1} us | {:.0}x |",
            a * 1e6,
            b * 1e6,
            b / a
        );
    }
}
