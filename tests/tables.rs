//! Bulk 3j tables: canonical keys under the 72 symmetries, lookup of every
//! symbol, entry counts against an independent orbit enumeration, the
//! file layouts, and bad files.
//!
//! The symmetries checked here: odd column permutations and reversing all
//! projections cost (-1)^(j1+j2+j3) (Edmonds, Angular Momentum in Quantum
//! Mechanics, 3.7.5 and 3.7.6); the Regge square's rows and columns
//! permuted (odd: (-1)^J) and transposed (Regge, Nuovo Cimento 10, 544
//! (1958), from memory). Every lookup is compared with the exact value
//! of the symbol asked for, so a wrong sign rule fails.

use recoup::numeric::exact::three_j;
use recoup::table::build::Domain;
use recoup::table::regge::{canonical, square_of, Canonical};
use recoup::table::{Lookup, ThreeJTable};
use std::collections::HashMap;

/// Every 3j (doubled arguments) with doubled j up to `max_tj`, nonzero by
/// its selection rules, with `integer_only` only integer j.
fn symbols(max_tj: i64, integer_only: bool) -> Vec<([i64; 3], [i64; 3])> {
    let step = if integer_only { 2 } else { 1 };
    let mut out = Vec::new();
    for a in (0..=max_tj).step_by(step) {
        for b in (0..=max_tj).step_by(step) {
            for c in ((a - b).abs()..=(a + b).min(max_tj)).step_by(2) {
                if integer_only && c % 2 != 0 {
                    continue;
                }
                for ma in (-a..=a).step_by(2) {
                    for mb in (-b..=b).step_by(2) {
                        let mc = -ma - mb;
                        if mc.abs() <= c {
                            out.push(([a, b, c], [ma, mb, mc]));
                        }
                    }
                }
            }
        }
    }
    out
}

/// The 72 images of a Regge square with their signs, by brute force.
fn images(sq: [[i64; 3]; 3]) -> Vec<([[i64; 3]; 3], bool)> {
    let perms = [
        [0, 1, 2],
        [1, 2, 0],
        [2, 0, 1],
        [1, 0, 2],
        [0, 2, 1],
        [2, 1, 0],
    ];
    let odd = |i: usize| i >= 3;
    let sum: i64 = sq[0].iter().sum();
    let mut out = Vec::new();
    for t in [false, true] {
        for (ri, r) in perms.iter().enumerate() {
            for (ci, c) in perms.iter().enumerate() {
                let img = [0, 1, 2]
                    .map(|i| [0, 1, 2].map(|k| if t { sq[c[k]][r[i]] } else { sq[r[i]][c[k]] }));
                out.push((img, sum % 2 != 0 && odd(ri) != odd(ci)));
            }
        }
    }
    out
}

/// The number of orbits holding a symbol of the list whose symbol is not
/// zero by a sign-reversing symmetry: each orbit named by its least image.
fn orbits(list: &[([i64; 3], [i64; 3])]) -> usize {
    let mut seen: HashMap<[[i64; 3]; 3], bool> = HashMap::new();
    for (tj, tm) in list {
        let sq = square_of(*tj, *tm).expect("nonzero by selection rules");
        let imgs = images(sq);
        let least = imgs.iter().map(|x| x.0).min().unwrap();
        let signs: Vec<bool> = imgs.iter().filter(|x| x.0 == least).map(|x| x.1).collect();
        let vanishes = signs.iter().any(|&s| s != signs[0]);
        seen.insert(least, vanishes);
    }
    seen.values().filter(|v| !**v).count()
}

fn close(a: f64, b: f64) -> bool {
    (a - b).abs() <= 1e-13 * b.abs().max(1e-300) || (a - b).abs() < 1e-15
}

#[test]
fn every_symbol_up_to_the_bound_is_found_with_its_exact_value() {
    for integer_only in [false, true] {
        let max_tj = if integer_only { 12 } else { 9 };
        let domain = Domain {
            max_tj,
            integer_only,
        };
        let table = ThreeJTable::build(domain);
        let list = symbols(max_tj, integer_only);
        assert_eq!(table.len(), orbits(&list), "entries = orbits ({domain:?})");
        for (tj, tm) in &list {
            let exact = three_j(*tj, *tm).to_f64();
            let got = table
                .three_j(*tj, *tm)
                .unwrap_or_else(|| panic!("{tj:?} {tm:?} missing"));
            assert!(
                close(got, exact),
                "{tj:?} {tm:?}: table {got}, exact {exact}"
            );
            if exact == 0.0 {
                continue;
            }
            assert!(
                matches!(table.locate(*tj, *tm), Lookup::Entry { .. }),
                "{tj:?} {tm:?}"
            );
        }
        // a symbol beyond the bound is outside (its orbit holds none within)
        let big = max_tj + 2 - max_tj % 2;
        assert_eq!(table.three_j([big, big, big - 2], [0, 0, 0]), None);
        // selection-rule zeros are zero, not outside
        assert_eq!(table.three_j([2, 2, 2], [2, 2, 0]), Some(0.0));
        assert_eq!(table.three_j([2, 2, 8], [0, 0, 0]), Some(0.0));
    }
}

#[test]
fn canonical_keys_agree_across_each_orbit_and_signs_follow_the_values() {
    // every image of a square has the same key, with the sign its own
    // value carries relative to the square's
    for (tj, tm) in symbols(7, false).iter().step_by(7) {
        let sq = square_of(*tj, *tm).unwrap();
        let v0 = three_j(*tj, *tm).to_f64();
        let base = canonical(&sq);
        for (img, _) in images(sq) {
            let (itj, itm) = recoup::table::regge::three_j_of(&img);
            let v = three_j(itj, itm).to_f64();
            match (canonical(&img), base) {
                (Canonical::Zero, Canonical::Zero) => assert!(v0 == 0.0 && v == 0.0),
                (Canonical::At { key, sign }, Canonical::At { key: k0, sign: s0 }) => {
                    assert_eq!(key, k0);
                    assert!(close(v * sign as f64, v0 * s0 as f64), "{img:?}");
                }
                other => panic!("{other:?} for {img:?}"),
            }
        }
    }
}

#[test]
fn clebsch_gordan_through_the_table_matches_the_exact_value() {
    let table = ThreeJTable::build(Domain {
        max_tj: 8,
        integer_only: false,
    });
    for (tj, tm) in symbols(8, false).iter().step_by(5) {
        let exact =
            recoup::numeric::exact::clebsch_gordan(tj[0], tm[0], tj[1], tm[1], tj[2], -tm[2])
                .to_f64();
        let got = table
            .clebsch_gordan(tj[0], tm[0], tj[1], tm[1], tj[2], -tm[2])
            .unwrap();
        assert!(close(got, exact), "{tj:?} {tm:?}: {got} vs {exact}");
    }
}

/// Runs the command line in-process.
fn run(args: &[&str]) -> (i32, String, String) {
    let mut stdin = std::io::Cursor::new(Vec::new());
    let (mut out, mut err) = (Vec::new(), Vec::new());
    let mut io = recoup::cli::Io {
        stdin: &mut stdin,
        out: &mut out,
        err: &mut err,
    };
    let mut all = vec!["recoup"];
    all.extend_from_slice(args);
    let code = recoup::cli::run_with(all, &mut io);
    (
        code,
        String::from_utf8_lossy(&out).into(),
        String::from_utf8_lossy(&err).into(),
    )
}

#[test]
fn the_indexed_file_reads_back_and_bad_files_are_refused() {
    let dir = std::env::temp_dir().join(format!("recoup-tables-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("t.r3j");
    let (code, out, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "5",
        "--output",
        path.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(
        out.contains("symmetry-unique 3j symbols with j <= 5"),
        "{out}"
    );
    let table = ThreeJTable::read(&path).unwrap();
    let built = ThreeJTable::build(Domain {
        max_tj: 10,
        integer_only: false,
    });
    assert_eq!(table.values(), built.values());
    // a check value: (1 1 0; 1 -1 0) = 1/sqrt(3) (Edmonds Table 2, from memory)
    let v = table.three_j([2, 2, 0], [2, -2, 0]).unwrap();
    assert!(close(v, 1.0 / 3f64.sqrt()));

    let bytes = std::fs::read(&path).unwrap();
    let mut wrong_magic = bytes.clone();
    wrong_magic[0] = b'X';
    assert!(ThreeJTable::from_bytes(&wrong_magic).is_err());
    assert!(ThreeJTable::from_bytes(&bytes[..bytes.len() - 8]).is_err());
    assert!(ThreeJTable::from_bytes(&bytes[..10]).is_err());
    let mut huge = bytes.clone();
    huge[16..24].copy_from_slice(&i64::MAX.to_le_bytes());
    assert!(ThreeJTable::from_bytes(&huge).is_err());
    let mut flipped = bytes.clone();
    flipped[64] ^= 1; // one bit of the index: the count no longer agrees
    assert!(ThreeJTable::from_bytes(&flipped).is_err());
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn record_files_list_representatives_within_the_domain() {
    let dir = std::env::temp_dir().join(format!("recoup-records-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let csv = dir.join("t.csv");
    let (code, _, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "3",
        "--integer-j",
        "-o",
        csv.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("j1,j2,j3,m1,m2,m3,value"));
    let rows: Vec<Vec<f64>> = lines
        .map(|l| l.split(',').map(|x| x.parse::<f64>().unwrap()).collect())
        .collect();
    assert_eq!(rows.len(), orbits(&symbols(6, true)));
    for r in &rows {
        let tj = [0, 1, 2].map(|k| (2.0 * r[k]) as i64);
        let tm = [3, 4, 5].map(|k| (2.0 * r[k]) as i64);
        assert!(tj.iter().all(|&t| t % 2 == 0 && t <= 6), "{r:?}");
        assert!(close(r[6], three_j(tj, tm).to_f64()), "{r:?}");
    }
    // .npy: the header names the fields and the shape, 36-byte rows follow
    let npy = dir.join("t.npy");
    let (code, _, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "3",
        "--integer-j",
        "-o",
        npy.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let bytes = std::fs::read(&npy).unwrap();
    assert_eq!(&bytes[..8], b"\x93NUMPY\x01\x00");
    let hl = u16::from_le_bytes([bytes[8], bytes[9]]) as usize;
    let head = std::str::from_utf8(&bytes[10..10 + hl]).unwrap();
    assert!(
        head.contains(&format!("'shape': ({},)", rows.len())),
        "{head}"
    );
    assert_eq!((10 + hl) % 64, 0);
    assert_eq!(bytes.len() - 10 - hl, rows.len() * 32);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn bad_requests_are_refused_with_their_reason() {
    let (code, _, err) = run(&["tabulate", "3j", "--max-j", "1/3", "-o", "/tmp/x.r3j"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("--max-j"), "{err}");
    let (code, _, err) = run(&["tabulate", "3j", "--max-j", "400", "-o", "/tmp/x.r3j"]);
    assert_eq!(code, 3, "{err}");
    assert!(err.contains("positions"), "{err}");
    let (code, _, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "30",
        "-o",
        "/tmp/recoup-big.csv",
    ]);
    assert_eq!(code, 3, "{err}");
    assert!(err.contains(".npy"), "{err}");
    let (code, _, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "2",
        "-o",
        "/nonexistent-dir/x.r3j",
    ]);
    assert_eq!(code, 2, "{err}");
}

/// Every 6j (doubled) with entries up to `max_t` whose four triads hold.
fn six_js(max_t: i64, integer_only: bool) -> Vec<[i64; 6]> {
    let step = if integer_only { 2 } else { 1 };
    let r: Vec<i64> = (0..=max_t).step_by(step).collect();
    let tri = recoup::numeric::selection::triangle2;
    let mut out = Vec::new();
    for &a in &r {
        for &b in &r {
            for &c in &r {
                if !tri(a, b, c) {
                    continue;
                }
                for &d in &r {
                    for &e in &r {
                        for &f in &r {
                            if tri(a, e, f) && tri(d, b, f) && tri(d, e, c) {
                                out.push([a, b, c, d, e, f]);
                            }
                        }
                    }
                }
            }
        }
    }
    out
}

/// The 24 images of a 6j: columns permuted, rows swapped in two columns
/// (Edmonds 6.2.4, 6.2.5, from memory), by brute force.
fn six_j_images(t: [i64; 6]) -> Vec<[i64; 6]> {
    let perms = [
        [0, 1, 2],
        [1, 2, 0],
        [2, 0, 1],
        [1, 0, 2],
        [0, 2, 1],
        [2, 1, 0],
    ];
    let flips = [
        [false, false, false],
        [true, true, false],
        [true, false, true],
        [false, true, true],
    ];
    let mut out = Vec::new();
    for p in perms {
        for fl in flips {
            let mut u = [0; 6];
            for k in 0..3 {
                let (top, bottom) = (t[p[k]], t[3 + p[k]]);
                (u[k], u[3 + k]) = if fl[k] { (bottom, top) } else { (top, bottom) };
            }
            out.push(u);
        }
    }
    out
}

#[test]
fn every_six_j_up_to_the_bound_is_found_with_its_exact_value() {
    use recoup::table::six_j::SixJDomain;
    use recoup::table::SixJTable;
    for (max_t, integer_only) in [(7, false), (12, true)] {
        let table = SixJTable::build(SixJDomain {
            max_t,
            integer_only,
        });
        let list = six_js(max_t, integer_only);
        // entries = orbits, each named by its largest image
        let orbits: std::collections::HashSet<[i64; 6]> = list
            .iter()
            .map(|t| six_j_images(*t).into_iter().max().unwrap())
            .collect();
        assert_eq!(table.len(), orbits.len(), "max_t {max_t}");
        for t in &list {
            let exact = recoup::numeric::exact::six_j(*t).to_f64();
            let got = table.six_j(*t).unwrap_or_else(|| panic!("{t:?} missing"));
            assert!(close(got, exact), "{t:?}: table {got}, exact {exact}");
        }
        let big = max_t + 2 - max_t % 2;
        assert_eq!(table.six_j([big, big, big, big, big, big]), None);
        assert_eq!(
            table.six_j([2, 2, 8, 2, 2, 2]),
            Some(0.0),
            "a broken triad is zero"
        );
    }
}

#[test]
fn six_j_files_read_back_and_list_records() {
    use recoup::table::SixJTable;
    let dir = std::env::temp_dir().join(format!("recoup-6j-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join("t.r6j");
    let (code, out, err) = run(&[
        "tabulate",
        "6j",
        "--max-j",
        "4",
        "--integer-j",
        "-o",
        path.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    assert!(out.contains("6j symbols of integer j with j <= 4"), "{out}");
    let table = SixJTable::read(&path).unwrap();
    // {1 1 1; 1 1 1} = 1/6 (Edmonds Table 5, from memory)
    assert!(close(table.six_j([2, 2, 2, 2, 2, 2]).unwrap(), 1.0 / 6.0));
    let bytes = std::fs::read(&path).unwrap();
    assert!(SixJTable::from_bytes(&bytes[..bytes.len() - 1]).is_err());
    assert!(
        ThreeJTable::from_bytes(&bytes).is_err(),
        "a 6j file is not a 3j table"
    );
    let mut huge = bytes.clone();
    huge[40..48].copy_from_slice(&u64::MAX.to_le_bytes());
    assert!(SixJTable::from_bytes(&huge).is_err());
    let csv = dir.join("t.csv");
    let (code, _, err) = run(&[
        "tabulate",
        "6j",
        "--max-j",
        "2",
        "-o",
        csv.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = text.lines();
    assert_eq!(lines.next(), Some("j1,j2,j3,l1,l2,l3,value"));
    let mut n = 0;
    for l in lines {
        let r: Vec<f64> = l.split(',').map(|x| x.parse().unwrap()).collect();
        let t = [0, 1, 2, 3, 4, 5].map(|k| (2.0 * r[k]) as i64);
        assert!(
            close(r[6], recoup::numeric::exact::six_j(t).to_f64()),
            "{l}"
        );
        n += 1;
    }
    assert_eq!(
        n,
        SixJTable::build(recoup::table::six_j::SixJDomain {
            max_t: 4,
            integer_only: false
        })
        .len()
    );
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_table_past_its_time_limit_stops_with_exit_3_and_leaves_no_file() {
    let path = std::env::temp_dir().join(format!("recoup-late-{}.r3j", std::process::id()));
    let (code, out, err) = run(&[
        "tabulate",
        "3j",
        "--max-j",
        "60",
        "--time-limit",
        "0.05",
        "-o",
        path.to_str().unwrap(),
    ]);
    assert_eq!(code, 3, "{out} {err}");
    assert!(out.is_empty() && err.contains("time limit"), "{err}");
    assert!(!path.exists(), "a partial table was left behind");
}
