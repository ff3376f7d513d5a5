//! Families by recursion (`numeric::family`, `recoup family`): every
//! member against the exact value (the Racah single-sum formula of this
//! crate, itself checked against published tables elsewhere in the suite)
//! at small and moderate j, and against the single-value float routine at
//! j ~ 10^4. Accuracy: relative error <= 1e-13 where the value is at
//! least 1e-2 of the family's largest, and every member within 1e-14 of
//! the family's largest in absolute terms (near a zero of the family the
//! recursion's relative error grows as the value shrinks: a value 2e-3 of
//! the largest was seen with relative error 1.1e-13); the worst cases are
//! printed with --nocapture.

use recoup::numeric::exact::{six_j, three_j};
use recoup::numeric::family::{six_j_over_j1, three_j_over_j1, three_j_over_m2, Family};
use recoup::numeric::float::{six_j_single_sum_f64, three_j_single_sum_f64};
use recoup::verify::rng::Rng;

/// The worst relative error among members at least 1e-2 of the largest,
/// and the worst absolute error of any member over the largest.
fn worst(f: &Family, want: &dyn Fn(i64) -> f64) -> (f64, f64) {
    let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    let (mut rel, mut abs) = (0.0f64, 0.0f64);
    for (i, v) in f.values.iter().enumerate() {
        let w = want(f.argument(i));
        abs = abs.max((v - w).abs() / biggest);
        if w.abs() >= biggest * 1e-2 {
            rel = rel.max((v - w).abs() / w.abs());
        }
    }
    (rel, abs)
}

#[test]
fn three_j_families_equal_the_exact_values() {
    let mut rng = Rng::new(41);
    let mut worst_seen = (0.0f64, 0.0f64);
    for _ in 0..60 {
        let tj2 = rng.below(61) as i64;
        let tj3 = rng.below(61) as i64;
        let tm2 = tj2 - 2 * rng.below(tj2 as u64 + 1) as i64;
        let tm3 = tj3 - 2 * rng.below(tj3 as u64 + 1) as i64;
        let f = three_j_over_j1(tj2, tj3, tm2, tm3);
        let w = worst(&f, &|tj1| {
            three_j([tj1, tj2, tj3], [-tm2 - tm3, tm2, tm3]).to_f64()
        });
        worst_seen = (worst_seen.0.max(w.0), worst_seen.1.max(w.1));
        assert!(
            w.0 <= 1e-13 && w.1 <= 1e-14,
            "({tj2}, {tj3}, {tm2}, {tm3})/2: {w:?}"
        );
    }
    println!(
        "3j families, j <= 30: worst relative error {:.2e}, worst absolute/largest {:.2e}",
        worst_seen.0, worst_seen.1
    );
}

#[test]
fn six_j_families_equal_the_exact_values() {
    let mut rng = Rng::new(43);
    let mut worst_seen = (0.0f64, 0.0f64);
    let mut tried = 0;
    while tried < 40 {
        let t: Vec<i64> = (0..5).map(|_| rng.below(41) as i64).collect();
        let f = six_j_over_j1(t[0], t[1], t[2], t[3], t[4]);
        if f.values.is_empty() {
            continue;
        }
        tried += 1;
        let w = worst(&f, &|tj1| {
            six_j([tj1, t[0], t[1], t[2], t[3], t[4]]).to_f64()
        });
        worst_seen = (worst_seen.0.max(w.0), worst_seen.1.max(w.1));
        assert!(w.0 <= 1e-13 && w.1 <= 1e-14, "{t:?}: {w:?}");
    }
    println!(
        "6j families, j <= 20: worst relative error {:.2e}, worst absolute/largest {:.2e}",
        worst_seen.0, worst_seen.1
    );
}

#[test]
fn large_families_agree_with_single_values() {
    // every 500th member against the single-sum float routine (accurate
    // to 1e-15 at these j; BENCHMARKS.md), which shares nothing with the
    // recursion
    for (tj2, tj3, tm2, tm3) in [(20000, 20000, 200, -200), (15001, 9001, -51, 3001)] {
        let f = three_j_over_j1(tj2, tj3, tm2, tm3);
        let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
        for i in (0..f.values.len()).step_by(500) {
            let w = three_j_single_sum_f64([f.argument(i), tj2, tj3], [-tm2 - tm3, tm2, tm3]);
            let err = (f.values[i] - w).abs() / w.abs().max(biggest * 1e-8);
            assert!(err <= 1e-12, "member {i}: {} vs {w}", f.values[i]);
        }
    }
    let f = six_j_over_j1(4000, 4002, 3000, 3998, 4004);
    let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    for i in (0..f.values.len()).step_by(400) {
        let w = six_j_single_sum_f64([f.argument(i), 4000, 4002, 3000, 3998, 4004]);
        let err = (f.values[i] - w).abs() / w.abs().max(biggest * 1e-8);
        assert!(err <= 1e-12, "6j member {i}: {} vs {w}", f.values[i]);
    }
}

#[test]
fn empty_and_single_member_families() {
    // m2 out of range, and a parity mismatch: no member
    assert!(three_j_over_j1(2, 2, 4, 0).values.is_empty());
    assert!(six_j_over_j1(1, 2, 2, 2, 2).values.is_empty());
    // j2 = 0: the one member (j, 0, j; -m, 0, m) = (-1)^(j-m)/hat(j)... here
    // j3 = 1, m3 = 1: (1, 0, 1; -1, 0, 1) = 1/sqrt(3) (Edmonds 1957,
    // eq. 3.7.9, from memory)
    let f = three_j_over_j1(0, 2, 0, 2);
    assert_eq!(f.values.len(), 1);
    assert!((f.values[0] - 1.0 / 3f64.sqrt()).abs() < 1e-15);
}

#[test]
fn single_values_at_large_j_keep_their_sign_when_the_family_tails_underflow() {
    // a 6j at j ~ 10^4 whose families end in members below 1e-308: the
    // single float value (from its shortest family) against the single
    // sum, and every family through it against the same value (a sign
    // taken from an underflowed end member once flipped some of these)
    use recoup::numeric::family::six_j_with_first;
    use recoup::numeric::float::{six_j_f64, three_j_f64};
    let t = [16008i64, 19726, 19070, 18840, 19392, 17202];
    let want = six_j_single_sum_f64(t);
    assert!((six_j_f64(t) - want).abs() <= 1e-13 * want.abs());
    for p in 0..6 {
        let u = six_j_with_first(t, p);
        let f = six_j_over_j1(u[1], u[2], u[3], u[4], u[5]);
        let i = ((u[0] - f.first) / 2) as usize;
        assert!(
            (f.values[i] - want).abs() <= 1e-13 * want.abs(),
            "position {p}"
        );
    }
    // random large symbols: the family path against the single sum
    let mut rng = Rng::new(7);
    for _ in 0..12 {
        let j = 500 + rng.below(4000) as i64;
        let a = 2 * j;
        let b = 2 * j - 2 * rng.below(200) as i64;
        let c = (a - b).abs() + 2 * rng.below(((a + b - (a - b).abs()) / 2 + 1) as u64) as i64;
        let ma = -a + 2 * rng.below(a as u64 + 1) as i64;
        let mb = -b + 2 * rng.below(b as u64 + 1) as i64;
        let mc = -ma - mb;
        if mc.abs() > c {
            continue;
        }
        let (tj, tm) = ([a, b, c], [ma, mb, mc]);
        let want = three_j_single_sum_f64(tj, tm);
        let got = three_j_f64(tj, tm);
        assert!(
            (got - want).abs() <= 1e-13 * want.abs().max(1e-300),
            "{tj:?} {tm:?}: {got} vs {want}"
        );
    }
}

#[test]
fn three_j_families_over_a_projection_equal_the_exact_values() {
    let mut rng = Rng::new(47);
    let mut worst_seen = (0.0f64, 0.0f64);
    let mut tried = 0;
    while tried < 40 {
        let t1 = rng.below(41) as i64;
        let t2 = rng.below(41) as i64;
        let lo = (t1 - t2).abs();
        let t3 = lo + 2 * rng.below(((t1 + t2 - lo) / 2 + 1) as u64) as i64;
        let m1 = t1 - 2 * rng.below(t1 as u64 + 1) as i64;
        let f = three_j_over_m2(t1, t2, t3, m1);
        if f.values.is_empty() {
            continue;
        }
        tried += 1;
        let w = worst(&f, &|m2| three_j([t1, t2, t3], [m1, m2, -m1 - m2]).to_f64());
        worst_seen = (worst_seen.0.max(w.0), worst_seen.1.max(w.1));
        assert!(
            w.0 <= 1e-13 && w.1 <= 1e-13, // m recursion: absolute error up to 1.3e-14 of the largest
            "({t1}, {t2}, {t3}; {m1})/2: {w:?}"
        );
    }
    println!(
        "3j families over m2, j <= 20: worst relative error {:.2e}, worst absolute/largest {:.2e}",
        worst_seen.0, worst_seen.1
    );
    // at j ~ 10^4 against the single sum, every 400th member
    let (t1, t2, t3, m1) = (20000, 19000, 18000, 300);
    let f = three_j_over_m2(t1, t2, t3, m1);
    let biggest = f.values.iter().fold(0.0f64, |a, v| a.max(v.abs()));
    for i in (0..f.values.len()).step_by(400) {
        let m2 = f.argument(i);
        let w = three_j_single_sum_f64([t1, t2, t3], [m1, m2, -m1 - m2]);
        let err = (f.values[i] - w).abs() / w.abs().max(biggest * 1e-8);
        assert!(err <= 1e-12, "member {i}: {} vs {w}", f.values[i]);
    }
}
