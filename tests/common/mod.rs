//! Helpers shared by the simplification tests: disguising an expression
//! (renamed variables, shuffled factors, symbols in random symmetric
//! spellings), spot-check settings and counts of the sums left.

#![allow(dead_code)]

pub mod bare;
pub mod cubic;

use recoup::algebra::symmetry::classical_images;
use recoup::expr::{Expr, Kind, Name, Q};
use recoup::syntax::parse;
use recoup::verify::rng::Rng;
use recoup::verify::spot::SpotSettings;
use std::collections::BTreeMap;

/// Renames every variable (`m…` to `q1, q2, …`, others to `k1, k2, …`).
pub fn rename_all(e: &Expr) -> Expr {
    let mut out = Expr::zero();
    for t in e.terms() {
        let vars: Vec<Name> = t.all_vars().into_iter().collect();
        let map: BTreeMap<Name, Name> = vars
            .iter()
            .enumerate()
            .map(|(i, v)| {
                let p = if v.as_str().starts_with('m') {
                    "q"
                } else {
                    "k"
                };
                (v.clone(), Name::new(format!("{p}{}", i + 1)))
            })
            .collect();
        out.push(t.rename(&map));
    }
    out
}

/// Every symbol replaced by a random image under its group (with its
/// phase), factors shuffled.
pub fn respell(e: &Expr, rng: &mut Rng) -> Expr {
    let mut out = Expr::zero();
    for t in e.terms() {
        let mut u = t.parts();
        let mut phase = t.phase().clone();
        let mut fs = Vec::new();
        for f in t.factors() {
            if f.is_symbol() {
                let imgs = classical_images(f);
                let img = &imgs[rng.below(imgs.len() as u64) as usize];
                phase = &phase + &img.phase;
                fs.push(img.factor.clone());
            } else {
                fs.push(f.clone());
            }
        }
        for i in (1..fs.len()).rev() {
            let k = rng.below(i as u64 + 1) as usize;
            fs.swap(i, k);
        }
        u.factors = fs;
        u.phase = phase;
        out.push(u.normalized());
    }
    out
}

/// Renamed and respelled.
pub fn disguise(text: &str, rng: &mut Rng) -> Expr {
    respell(&rename_all(&parse(text).unwrap()), rng)
}

/// Spot-check settings with small j.
pub fn settings(seed: u64) -> SpotSettings {
    SpotSettings {
        max_j: Q::from_integer(2),
        samples: 24,
        exhaustive: false,
        seed,
        ..SpotSettings::default()
    }
}

/// The most sums any term of `e` still has, over variables of `kind`
/// (`None`: every kind).
pub fn sums_left(e: &Expr, kind: Option<Kind>) -> usize {
    e.terms()
        .iter()
        .map(|t| {
            let k = t.kinds();
            t.bound()
                .iter()
                .filter(|b| kind.is_none() || k.get(*b) == kind.as_ref())
                .count()
        })
        .max()
        .unwrap_or(0)
}

/// One identity of a block file (`[name] source`, the left side, `==` the
/// right side): tests/data/identities.txt and tests/data/wrong_claims.txt.
#[derive(Clone, Debug)]
pub struct Block {
    /// the entry's name
    pub name: String,
    /// its source (or, for wrong claims, the kind of mistake)
    pub tag: String,
    /// the left side as written
    pub lhs: String,
    /// the right side as written
    pub rhs: String,
}

/// The blocks of a block file.
pub fn blocks(text: &str) -> Vec<Block> {
    let mut out = Vec::new();
    let mut cur: Option<Block> = None;
    for line in text.lines().map(str::trim) {
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        if let Some(rest) = line.strip_prefix('[') {
            out.extend(cur.take());
            let (name, tag) = rest.split_once(']').unwrap();
            cur = Some(Block {
                name: name.into(),
                tag: tag.trim().into(),
                lhs: String::new(),
                rhs: String::new(),
            });
        } else if let Some(r) = line.strip_prefix("==") {
            cur.as_mut().unwrap().rhs = r.trim().into();
        } else {
            cur.as_mut().unwrap().lhs = line.into();
        }
    }
    out.extend(cur);
    out
}

/// Runs the recoup binary with arguments and standard input; exit code,
/// standard output and standard error.
pub fn run_binary(args: &[&str], stdin: Option<&str>) -> (i32, String, String) {
    use std::io::Write;
    use std::process::{Command, Stdio};
    let mut child = Command::new(env!("CARGO_BIN_EXE_recoup"))
        .args(args)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .expect("run recoup");
    if let Some(s) = stdin {
        child.stdin.take().unwrap().write_all(s.as_bytes()).unwrap();
    }
    drop(child.stdin.take());
    let out = child.wait_with_output().unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}
