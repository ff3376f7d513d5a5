//! Recoupling coefficients: three standard ones exactly (Edmonds 1957,
//! eqs. 6.1.5 and 6.4.2, from memory); random pairs of trees with 3 to 12
//! leaves against an independent brute-force overlap of coupled states built
//! from Clebsch–Gordan coefficients; the number of sums for trees of 5 and
//! 6 leaves against the fewest over every reduction order; error cases.

mod common;

use common::bare::{fewest_six_j_sums, fewest_sums, Bare};
use recoup::evaluate::{Assignment, Evaluator};
use recoup::expr::{CouplingTree, Lin, Name, Q};
use recoup::numeric::float::clebsch_gordan_f64;
use recoup::numeric::Surd;
use recoup::recouple::{recouple, recouple_as, Form, Recoupling};
use recoup::simplify::Options;
use recoup::syntax::{parse, parse_tree};
use recoup::verify::check::{check, Verdict};
use recoup::verify::rng::Rng;
use std::collections::{BTreeMap, HashMap};

fn rc(from: &str, to: &str) -> Recoupling {
    recouple(
        &parse_tree(from).unwrap(),
        &parse_tree(to).unwrap(),
        &Options::default(),
    )
    .unwrap_or_else(|e| panic!("{from} | {to}: {e}"))
}

#[test]
fn the_three_recouplings_of_the_identity_list() {
    let cases = [
        (
            "((j1, j2) j12, j3) J",
            "(j1, (j2, j3) j23) J",
            "(-1)^(j1+j2+j3+J) hat(j12) hat(j23) {j1, j2, j12; j3, J, j23}",
        ),
        (
            "((j1, j2) j12, j3) J",
            "((j1, j3) j13, j2) J",
            "(-1)^(j2+j3+j12+j13) hat(j12) hat(j13) {j2, j1, j12; j3, J, j13}",
        ),
        (
            "((j1, j2) j12, (j3, j4) j34) J",
            "((j1, j3) j13, (j2, j4) j24) J",
            "hat(j12) hat(j34) hat(j13) hat(j24) {j1, j2, j12; j3, j4, j34; j13, j24, J}",
        ),
    ];
    let mut printed = Vec::new();
    for (from, to, want) in cases {
        let r = rc(from, to);
        assert_eq!(r.sums(), 0, "{}", r.outcome.result);
        let w = parse(want).unwrap();
        let s = recoup::verify::spot::SpotSettings {
            max_j: Q::from_integer(3),
            samples: 40,
            exhaustive: false,
            seed: 3,
            ..recoup::verify::spot::SpotSettings::default()
        };
        let res = check(&r.outcome.result, &w, &s).unwrap();
        assert!(
            matches!(res.verdict, Verdict::Equal),
            "{from} | {to}: {} vs {want}",
            r.outcome.result
        );
        printed.push(format!("<{from} | {to}> = {}", r.outcome.result));
    }
    insta::assert_snapshot!(printed.join("\n"));
}

// ---- an independent brute force: coupled states as vectors ----

/// A coupled state of a subtree: (doubled leaf projections in leaf order) -> amplitude.
type State = HashMap<Vec<i64>, f64>;

fn twice(q: Q) -> i64 {
    (q * Q::from_integer(2)).to_integer()
}

/// |subtree; j m> for the given values (doubled j and m).
fn state(t: &CouplingTree, vals: &BTreeMap<String, Q>, leaves: &[String], tm: i64) -> State {
    match t {
        CouplingTree::Leaf(l) => {
            let name = l.to_string();
            let mut v = vec![i64::MIN; leaves.len()];
            v[leaves.iter().position(|x| *x == name).unwrap()] = tm;
            let mut s = State::new();
            s.insert(v, 1.0);
            s
        }
        CouplingTree::Node(a, b, l) => {
            let tj = twice(vals[&l.to_string()]);
            let ta = twice(vals[&a.label().to_string()]);
            let tb = twice(vals[&b.label().to_string()]);
            let mut out = State::new();
            let mut ma = -ta;
            while ma <= ta {
                let mb = tm - ma;
                if mb.abs() <= tb {
                    let c = clebsch_gordan_f64(ta, ma, tb, mb, tj, tm);
                    if c != 0.0 {
                        let sa = state(a, vals, leaves, ma);
                        let sb = state(b, vals, leaves, mb);
                        for (ka, va) in &sa {
                            for (kb, vb) in &sb {
                                let k: Vec<i64> = ka
                                    .iter()
                                    .zip(kb)
                                    .map(|(x, y)| if *x == i64::MIN { *y } else { *x })
                                    .collect();
                                *out.entry(k).or_insert(0.0) += c * va * vb;
                            }
                        }
                    }
                }
                ma += 2;
            }
            out
        }
    }
}

fn brute_overlap(from: &CouplingTree, to: &CouplingTree, vals: &BTreeMap<String, Q>) -> f64 {
    let leaves: Vec<String> = from.leaves().iter().map(|l| l.to_string()).collect();
    let tj = twice(vals[&from.label().to_string()]);
    let a = state(from, vals, &leaves, tj);
    let b = state(to, vals, &leaves, tj);
    a.iter()
        .map(|(k, v)| v * b.get(k).copied().unwrap_or(0.0))
        .sum()
}

fn random_tree(leaves: &[String], prefix: &str, rng: &mut Rng) -> String {
    recoup::recouple::random_tree_over(leaves, prefix, rng)
}

/// Random admissible values of every label of a tree (returns the root's).
fn random_values(t: &CouplingTree, vals: &mut BTreeMap<String, Q>, rng: &mut Rng) -> Q {
    match t {
        CouplingTree::Leaf(l) => vals[&l.to_string()],
        CouplingTree::Node(a, b, l) => {
            let va = random_values(a, vals, rng);
            let vb = random_values(b, vals, rng);
            let lo = if va > vb { va - vb } else { vb - va };
            let n = ((va + vb - lo).to_integer() + 1) as u64;
            let v = lo + Q::from_integer(rng.below(n) as i64);
            vals.insert(l.to_string(), v);
            v
        }
    }
}

/// Compares a recoupling result with the brute-force overlap at a few
/// random admissible values; returns the number of value choices tried.
fn agree_with_brute(
    from_s: &str,
    to_s: &str,
    leaves: &[String],
    form: Form,
    rng: &mut Rng,
) -> usize {
    let n = leaves.len();
    let from = parse_tree(from_s).unwrap();
    let to = parse_tree(to_s).unwrap();
    let mut r = recouple_as(&from, &to, &Options::default(), form)
        .unwrap_or_else(|e| panic!("{from_s} | {to_s}: {e}"));
    // the arrangement for reading (with the phases its spellings cost) is
    // what is printed: compare that with the brute-force overlap
    recoup::recouple::arrange_for_reading(&mut r, from_s, to_s, &Options::default())
        .unwrap_or_else(|e| panic!("{from_s} | {to_s}: arrangement: {e}"));
    // the result names nothing the trees do not (the total projection aside)
    let mut names: Vec<String> = leaves.to_vec();
    for t in [&from, &to] {
        names.extend(t.internal_labels().iter().map(|l| l.to_string()));
    }
    for v in r.outcome.result.free_vars() {
        assert!(
            names.contains(&v.to_string()) || v.as_str() == "M",
            "{from_s} | {to_s}: {v} is not a name of the trees: {}",
            r.outcome.result
        );
    }
    if form == Form::SixJOnly {
        let nine = r
            .outcome
            .result
            .terms()
            .iter()
            .flat_map(|t| t.factors())
            .any(|f| matches!(f, recoup::expr::Factor::NineJ(_)));
        assert!(
            !nine,
            "{from_s} | {to_s}: a 9j is left: {}",
            r.outcome.result
        );
    }
    let ev = Evaluator::<Surd>::new();
    let mut tried = 0;
    let mut attempts = 0;
    while tried < 3 && attempts < 200 {
        attempts += 1;
        let mut vals: BTreeMap<String, Q> = BTreeMap::new();
        for l in leaves {
            let half = n > 8 || rng.coin();
            vals.insert(
                l.clone(),
                if half {
                    Q::new(1, 2)
                } else {
                    Q::from_integer(1)
                },
            );
        }
        let jf = random_values(&from, &mut vals, rng);
        let mut v2 = vals.clone();
        let jt = random_values(&to, &mut v2, rng);
        if jf != jt {
            continue;
        }
        for (k, v) in v2 {
            vals.entry(k).or_insert(v);
        }
        let brute = brute_overlap(&from, &to, &vals);
        let mut at = Assignment::new();
        for (k, v) in &vals {
            at.insert(Name::new(k.clone()), *v);
        }
        for v in r.outcome.result.free_vars() {
            at.entry(v).or_insert(jf);
        }
        let ours = ev.eval(&r.outcome.result, &at).unwrap().to_f64();
        assert!(
            (ours - brute).abs() < 1e-9,
            "{from_s} | {to_s} at {vals:?}: {ours} vs {brute}\n{}",
            r.outcome.result
        );
        tried += 1;
    }
    tried
}

#[test]
fn random_tree_pairs_agree_with_the_brute_force_overlap() {
    let mut rng = Rng::new(8080);
    let mut cases = 0;
    for n in 3..=12usize {
        let pairs = if n <= 8 { 3 } else { 1 };
        for _ in 0..pairs {
            let leaves: Vec<String> = (1..=n).map(|k| format!("j{k}")).collect();
            let from_s = random_tree(&leaves, "a", &mut rng);
            let to_s = random_tree(&leaves, "b", &mut rng);
            cases += agree_with_brute(&from_s, &to_s, &leaves, Form::Symbols, &mut rng);
        }
    }
    assert!(cases >= 40, "only {cases} value choices");
}

/// Leaves and intermediates named like the summation variables the engine
/// brings in (x, y, primes): nothing may be captured, in either form.
#[test]
fn names_like_the_engines_own_are_never_captured() {
    let mut rng = Rng::new(4242);
    let pool = ["x", "y", "x'", "y''", "x''", "y'", "m_x", "M'"];
    let mut cases = 0;
    for n in 4..=6usize {
        for round in 0..3 {
            let leaves: Vec<String> = pool[..n].iter().map(|s| s.to_string()).collect();
            let from_s = random_tree(&leaves, "z", &mut rng);
            let to_s = random_tree(&leaves, "w", &mut rng);
            let form = if round % 2 == 0 {
                Form::SixJOnly
            } else {
                Form::Symbols
            };
            cases += agree_with_brute(&from_s, &to_s, &leaves, form, &mut rng);
        }
    }
    // the two reported cases
    let leaves: Vec<String> = ["x", "j2", "j3", "j4"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    cases += agree_with_brute(
        "((x, j2) j12, (j3, j4) j34) J",
        "((x, j3) j13, (j2, j4) j24) J",
        &leaves,
        Form::SixJOnly,
        &mut rng,
    );
    let leaves: Vec<String> = ["a", "b", "c", "d", "e"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    cases += agree_with_brute(
        "((((a, b) p, c) q, d) r, e) J",
        "((((e, b) s, c) t, d) u, a) J",
        &leaves,
        Form::SixJOnly,
        &mut rng,
    );
    assert!(cases >= 20, "only {cases} value choices");
}

/// Every binary tree shape over leaves in the given order.
fn shapes(leaves: &[String], prefix: &str, counter: &mut usize) -> Vec<String> {
    if leaves.len() == 1 {
        return vec![leaves[0].clone()];
    }
    let mut out = Vec::new();
    for k in 1..leaves.len() {
        for a in shapes(&leaves[..k], prefix, counter) {
            for b in shapes(&leaves[k..], prefix, counter) {
                *counter += 1;
                out.push(format!("({a}, {b}) {prefix}{counter}"));
            }
        }
    }
    out
}

fn all_shapes(n: usize, prefix: &str) -> Vec<String> {
    let leaves: Vec<String> = (1..=n).map(|k| format!("j{k}")).collect();
    let mut c = 0;
    shapes(&leaves, prefix, &mut c)
        .into_iter()
        .map(|s| {
            // the outermost label is the total J
            let i = s.rfind(')').unwrap();
            format!("{} J", &s[..=i])
        })
        .collect()
}

fn permuted(tree: &str, n: usize, rng: &mut Rng) -> String {
    let mut p: Vec<usize> = (1..=n).collect();
    for i in (1..n).rev() {
        let k = rng.below(i as u64 + 1) as usize;
        p.swap(i, k);
    }
    // rename j_k -> j_p(k) via placeholders
    let mut s = tree.to_string();
    for k in (1..=n).rev() {
        s = s.replace(&format!("j{k}"), &format!("@{k}@"));
    }
    for k in 1..=n {
        s = s.replace(&format!("@{k}@"), &format!("j{}", p[k - 1]));
    }
    s
}

fn bare_of(r: &Recoupling) -> Bare {
    let e = recoup::graph::reduce::with_cg_as_3j(&r.overlap);
    let t = &e.terms()[0];
    let g = recoup::graph::Graph::of_term(t);
    let mut slots = vec![[None; 3]; g.vertices.len()];
    for (li, l) in g.lines.iter().enumerate() {
        slots[l.tail.0][l.tail.1] = Some(li);
        slots[l.head.0][l.head.1] = Some(li);
    }
    Bare::from_slots(&slots)
}

#[test]
fn interchanges_for_five_and_six_leaves_against_the_fewest_over_every_order() {
    let mut rng = Rng::new(606);
    let mut report = Vec::new();
    let (mut total, mut exact) = (0, 0);
    for n in [5usize, 6] {
        let froms = all_shapes(n, "a");
        let tos = all_shapes(n, "b");
        for (i, f) in froms.iter().enumerate() {
            let partners = if n == 5 { 3 } else { 2 };
            for k in 0..partners {
                let t = &tos[(i * 7 + k * 5 + 1) % tos.len()];
                let t = permuted(t, n, &mut rng);
                let r = rc(f, &t);
                // the interchanges the engine made (each brings one sum; a
                // sum of three 6j may later fold into a 9j, so the result
                // can have fewer sums than interchanges)
                let ours = r
                    .outcome
                    .steps
                    .iter()
                    .filter(|s| s.rule == "interchange")
                    .count();
                assert!(r.sums() <= ours, "{f} | {t}: more sums than interchanges");
                // an independent search, allowed beyond the engine's count
                let best = fewest_sums(&bare_of(&r), ours + 2).unwrap_or_else(|| {
                    panic!("{f} | {t}: no order with at most {} interchanges", ours + 2)
                });
                total += 1;
                // fewer interchanges than the fewest would mean one of the
                // two searches is wrong
                assert!(
                    ours >= best,
                    "{f} | {t}: ours {ours}, fewest {best}: {}",
                    r.outcome.result
                );
                // the printed sums: recouple keeps the reduction with the
                // fewest (the searched one reaches `best` interchanges; the
                // shortest-cycle one may fold sums into 9j later)
                if r.sums() <= best {
                    exact += 1;
                }
                report.push(format!(
                    "{n} leaves: {f} | {t}: {ours} interchanges, {} sums (fewest interchanges {best})",
                    r.sums()
                ));
            }
        }
    }
    eprintln!(
        "{}\nsums at or below the fewest interchanges on {exact} of {total}",
        report.join("\n")
    );
    assert!(total >= 100);
    // measured: interchanges at the fewest on 112 of 126 with the greedy
    // choice alone; sums at or below it on 126 of 126 since the
    // interchange is chosen by search (src/graph/plan.rs)
    assert_eq!(
        exact, total,
        "the engine reached the fewest on only {exact} of {total}"
    );
}

#[test]
fn the_matrix_is_orthogonal_and_matches_the_brute_force() {
    let from = parse_tree("((1/2, 1/2) s, 1) J").unwrap();
    let to = parse_tree("(1/2, (1/2, 1) t) J").unwrap();
    let blocks = recoup::recouple::matrix::matrices(&from, &to).unwrap();
    assert_eq!(blocks.len(), 3);
    // the same coefficient by brute force, with the leaves named
    let fromn = parse_tree("((a, b) s, c) J").unwrap();
    let ton = parse_tree("(a, (b, c) t) J").unwrap();
    for b in &blocks {
        for (ri, r) in b.rows.iter().enumerate() {
            for (ci, c) in b.cols.iter().enumerate() {
                let mut vals: BTreeMap<String, Q> = BTreeMap::new();
                vals.insert("a".into(), Q::new(1, 2));
                vals.insert("b".into(), Q::new(1, 2));
                vals.insert("c".into(), Q::from_integer(1));
                vals.insert("J".into(), b.total);
                vals.insert("s".into(), r[0]);
                vals.insert("t".into(), c[0]);
                let brute = brute_overlap(&fromn, &ton, &vals);
                assert!((b.entries[ri][ci].to_f64() - brute).abs() < 1e-12);
            }
        }
    }
    let _ = Lin::zero();
}

#[test]
fn the_12j_and_15j_of_the_first_kind_come_back_as_one_sum_of_6j() {
    // the recouplings whose graphs are the Moebius ladders on 8 and 10
    // vertices: one sum over four, resp. five, 6j symbols (Yutsis, Levinson
    // and Vanagas 1962; Varshalovich et al. 1988, ch. 10; from memory)
    let cases = [
        (
            "((((a, b) p, c) q, d) r, e) J",
            "((((e, b) s, c) t, d) u, a) J",
            4,
        ),
        (
            "(((((a, b) p, c) q, d) r, e) s, f) J",
            "(((((f, b) t, c) u, d) v, e) w, a) J",
            5,
        ),
    ];
    let mut printed = Vec::new();
    for (from, to, six_js) in cases {
        for form in [Form::Symbols, Form::SixJOnly] {
            let r = recouple_as(
                &parse_tree(from).unwrap(),
                &parse_tree(to).unwrap(),
                &Options::default(),
                form,
            )
            .unwrap();
            assert_eq!(r.sums(), 1, "{form:?}: {}", r.outcome.result);
            assert_eq!(r.symbols(), (six_js, 0), "{form:?}: {}", r.outcome.result);
            assert!(r.outcome.nonzero > 0);
            if form == Form::Symbols {
                printed.push(format!("<{from} | {to}> = {}", r.outcome.result));
            }
        }
    }
    insta::assert_snapshot!(printed.join("\n"));
}

/// Random pairs per number of leaves in the comparisons with the
/// exhaustive search: 6 by default (CI), more through
/// `RECOUP_EXHAUSTIVE_PAIRS` for the benchmark report.
fn pairs_per_size() -> usize {
    std::env::var("RECOUP_EXHAUSTIVE_PAIRS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(6)
}

#[test]
fn sums_for_four_to_eight_leaves_against_the_fewest_over_every_order() {
    // random pairs of trees, in both forms, against an independent search
    // over every order of interchanges: the default form (9j kept, a
    // closed 9j free) against the fewest interchanges, and the 6j-only
    // form against the fewest sums of 6j (a 9j counting one sum)
    let mut rng = Rng::new(707);
    let mut tally: BTreeMap<usize, [usize; 3]> = BTreeMap::new();
    let mut report = Vec::new();
    for n in [4usize, 5, 6, 7, 8] {
        let leaves: Vec<String> = (1..=n).map(|k| format!("j{k}")).collect();
        for _ in 0..pairs_per_size() {
            let f = random_tree(&leaves, "a", &mut rng);
            let t = random_tree(&leaves, "b", &mut rng);
            let (from, to) = (parse_tree(&f).unwrap(), parse_tree(&t).unwrap());
            let r6 = recouple_as(&from, &to, &Options::default(), Form::SixJOnly)
                .unwrap_or_else(|e| panic!("{f} | {t}: {e}"));
            let ours6 = r6.sums();
            let best6 = fewest_six_j_sums(&bare_of(&r6), ours6 + 1)
                .unwrap_or_else(|| panic!("{f} | {t}: no order with {} sums", ours6 + 1));
            let r = recouple_as(&from, &to, &Options::default(), Form::Symbols)
                .unwrap_or_else(|e| panic!("{f} | {t}: {e}"));
            // the printed sums against the fewest interchanges: a sum of
            // three 6j folded into a 9j prints fewer sums than the
            // interchanges it took, so the search may find none within
            // the limit (the printed form is then below it)
            let ours = r.sums();
            let best = fewest_sums(&bare_of(&r), ours + 1).unwrap_or(usize::MAX);
            let e = tally.entry(n).or_default();
            e[0] += 1;
            // a sum identity may even remove a sum the graph needs
            e[1] += usize::from(ours <= best);
            e[2] += usize::from(ours6 <= best6);
            if ours > best || ours6 > best6 {
                report.push(format!(
                    "{n} leaves: {f} | {t}: sums {ours} (fewest interchanges {best}), 6j sums {ours6} (fewest {best6})"
                ));
            }
        }
    }
    for (n, [all, at, at6]) in &tally {
        eprintln!("{n} leaves: {all} pairs; sums at or below the fewest interchanges {at}; 6j sums at the fewest {at6}");
    }
    assert!(report.is_empty(), "{}", report.join("\n"));
}
