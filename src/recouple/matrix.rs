//! The exact transformation matrix between two coupled bases for numeric
//! leaves: for each allowed total J, rows are labelled by the first
//! scheme's intermediate values and columns by the second's; entries are
//! exact recoupling coefficients; each matrix is checked to be orthogonal
//! before it is shown.

use super::{recouple, RecoupleError};
use crate::evaluate::{Assignment, Evaluator};
use crate::expr::{CouplingTree, Name, Q};
use crate::numeric::Surd;
use crate::simplify::{Options, SimplifyError};
use num_traits::One;

/// Largest basis a matrix is printed for.
pub const MAX_DIM: usize = 200;

/// One block of the matrix, for one total J.
#[derive(Clone, Debug)]
pub struct Block {
    /// the total
    pub total: Q,
    /// the intermediate names of the first scheme
    pub row_names: Vec<Name>,
    /// the intermediate names of the second scheme
    pub col_names: Vec<Name>,
    /// row labels (values of the first scheme's intermediates)
    pub rows: Vec<Vec<Q>>,
    /// column labels
    pub cols: Vec<Vec<Q>>,
    /// entries
    pub entries: Vec<Vec<Surd>>,
}

fn qstr(q: &Q) -> String {
    crate::expr::lin::fmt_q(q)
}

/// Every assignment of a tree's intermediate labels allowed by the triangle
/// rules, for a given total (leaves numeric).
fn labelings(t: &CouplingTree) -> Vec<Vec<(Name, Q)>> {
    // returns (value of this node, assignments below) pairs
    fn go(t: &CouplingTree) -> Vec<(Q, Vec<(Name, Q)>)> {
        match t {
            CouplingTree::Leaf(l) => vec![(l.constant_part(), Vec::new())],
            CouplingTree::Node(a, b, l) => {
                let mut out = Vec::new();
                for (va, sa) in go(a) {
                    for (vb, sb) in go(b) {
                        let lo = if va > vb { va - vb } else { vb - va };
                        let mut v = lo;
                        while v <= va + vb {
                            let mut s = sa.clone();
                            s.extend(sb.iter().cloned());
                            match l.as_var() {
                                Some(n) => {
                                    s.push((n.clone(), v));
                                    out.push((v, s));
                                }
                                None => {
                                    if l.constant_part() == v {
                                        out.push((v, s));
                                    }
                                }
                            }
                            v += Q::one();
                        }
                    }
                }
                out
            }
        }
    }
    go(t)
        .into_iter()
        .map(|(v, mut s)| {
            // the root's own value goes last under the key ""
            s.push((Name::new("\u{3}total"), v));
            s
        })
        .collect()
}

/// The number of labelings of a tree for each value of its root, counted
/// without listing them (so a size limit can be checked first).
fn labeling_counts(t: &CouplingTree) -> std::collections::BTreeMap<Q, u128> {
    use std::collections::BTreeMap;
    match t {
        CouplingTree::Leaf(l) => BTreeMap::from([(l.constant_part(), 1)]),
        CouplingTree::Node(a, b, l) => {
            let (ca, cb) = (labeling_counts(a), labeling_counts(b));
            let mut out: BTreeMap<Q, u128> = BTreeMap::new();
            for (va, na) in &ca {
                for (vb, nb) in &cb {
                    let lo = if va > vb { va - vb } else { vb - va };
                    let mut v = lo;
                    while v <= va + vb {
                        if l.as_var().is_some() || l.constant_part() == v {
                            let e = out.entry(v).or_insert(0);
                            *e = e.saturating_add(na.saturating_mul(*nb));
                        }
                        v += Q::one();
                    }
                }
            }
            out
        }
    }
}

/// For numeric leaves: an error naming the allowed totals when no state of
/// the tree has its (numeric or fixed) labels.
pub fn reachable(t: &CouplingTree) -> Result<(), RecoupleError> {
    if !t.leaves().iter().all(|l| l.is_constant()) || !labeling_counts(t).is_empty() {
        return Ok(());
    }
    let allowed = labeling_counts(&with_free_root(t));
    if allowed.is_empty() {
        return Err(RecoupleError::NoStates(format!(
            "no state has the numeric intermediates given in {t}: one of its couplings breaks the triangle rule"
        )));
    }
    let totals: Vec<String> = allowed.keys().map(qstr).collect();
    Err(RecoupleError::NoStates(format!(
        "no state of these leaves has the total {}: the totals the triangle rules allow are {}",
        t.label(),
        totals.join(", ")
    )))
}

/// Most labelings (summed over every total) a matrix request may list.
pub const MAX_LABELINGS: u128 = 20_000;

/// The matrices for every total J.
pub fn matrices(from: &CouplingTree, to: &CouplingTree) -> Result<Vec<Block>, RecoupleError> {
    for l in from.leaves() {
        if !l.is_constant() {
            return Err(RecoupleError::Label(format!(
                "{l}: the transformation matrix needs numeric leaves such as (1/2, (1, 1/2) x) J"
            )));
        }
    }
    crate::recouple::validate(from, to)?;
    // sizes first: no block larger than MAX_DIM, no listing beyond the limit
    reachable(from)?;
    let counts_from = labeling_counts(from);
    let counts_to = labeling_counts(to);
    for (jt, n) in &counts_from {
        if *n > MAX_DIM as u128 {
            return Err(RecoupleError::Limit(format!(
                "the basis for J = {} has {} states; at most {MAX_DIM} are printed (choose a fixed total or smaller leaves)",
                qstr(jt),
                n
            )));
        }
    }
    let listed: u128 = counts_from.values().chain(counts_to.values()).sum();
    if listed > MAX_LABELINGS {
        return Err(RecoupleError::Limit(format!(
            "the two bases have {listed} states over all totals; at most {MAX_LABELINGS} are listed (give the total a value or use smaller leaves)"
        )));
    }
    let r = recouple(from, to, &Options::default())?;
    let f = &r.outcome.result;
    let root = from.label().as_var().cloned();
    let lf = labelings(from);
    let lt = labelings(to);
    let total_of = |s: &Vec<(Name, Q)>| s.last().unwrap().1;
    let mut totals: Vec<Q> = lf.iter().map(total_of).collect();
    totals.sort();
    totals.dedup();
    let ev = Evaluator::<Surd>::new();
    let mut out = Vec::new();
    for jt in totals {
        let rows: Vec<&Vec<(Name, Q)>> = lf.iter().filter(|s| total_of(s) == jt).collect();
        let cols: Vec<&Vec<(Name, Q)>> = lt.iter().filter(|s| total_of(s) == jt).collect();
        if rows.len() > MAX_DIM {
            return Err(RecoupleError::Limit(format!(
                "the basis for J = {} has {} states; at most {MAX_DIM} are printed",
                qstr(&jt),
                rows.len()
            )));
        }
        let mut entries = Vec::new();
        for rs in &rows {
            let mut line = Vec::new();
            for cs in &cols {
                let mut at = Assignment::new();
                for (n, v) in rs.iter().chain(cs.iter()) {
                    if !n.as_str().starts_with('\u{3}') {
                        at.insert(n.clone(), *v);
                    }
                }
                if let Some(rn) = &root {
                    at.insert(rn.clone(), jt);
                }
                // the total projection, if it survived, is set to J
                for v in f.free_vars() {
                    at.entry(v).or_insert(jt);
                }
                let v = ev
                    .eval(f, &at)
                    .map_err(|e| RecoupleError::from(SimplifyError::from(e)))?;
                line.push(v);
            }
            entries.push(line);
        }
        // orthogonality: Σ_k A_ik A_jk = δ_ij (real orthogonal)
        let n = rows.len();
        if cols.len() != n {
            return Err(RecoupleError::Internal(format!(
                "the two bases for J = {} have {} and {} states",
                qstr(&jt),
                n,
                cols.len()
            )));
        }
        for i in 0..n {
            for k in 0..n {
                let mut s = Surd::zero();
                for c in 0..n {
                    s = &s + &(&entries[i][c] * &entries[k][c]);
                }
                let want = if i == k { Surd::one() } else { Surd::zero() };
                if s != want {
                    return Err(RecoupleError::Internal(format!(
                        "the matrix for J = {} is not orthogonal (row {i} with row {k} gives {s})",
                        qstr(&jt)
                    )));
                }
            }
        }
        let shown = |n: &Name| !n.as_str().starts_with('\u{3}') && Some(n) != root.as_ref();
        let names = |s: &Vec<(Name, Q)>| -> Vec<Name> {
            s.iter()
                .filter(|(n, _)| shown(n))
                .map(|(n, _)| n.clone())
                .collect()
        };
        let values = |s: &Vec<(Name, Q)>| -> Vec<Q> {
            s.iter()
                .filter(|(n, _)| shown(n))
                .map(|(_, v)| *v)
                .collect()
        };
        out.push(Block {
            total: jt,
            row_names: rows.first().map(|s| names(s)).unwrap_or_default(),
            col_names: cols.first().map(|s| names(s)).unwrap_or_default(),
            rows: rows.iter().map(|s| values(s)).collect(),
            cols: cols.iter().map(|s| values(s)).collect(),
            entries,
        });
    }
    Ok(out)
}

/// The same tree with its root label made a name (every total allowed).
fn with_free_root(t: &CouplingTree) -> CouplingTree {
    match t {
        CouplingTree::Node(a, b, _) => CouplingTree::Node(
            a.clone(),
            b.clone(),
            crate::expr::Lin::var(Name::new("\u{3}root")),
        ),
        leaf => leaf.clone(),
    }
}

fn label(names: &[Name], vals: &[Q]) -> String {
    names
        .iter()
        .zip(vals)
        .map(|(n, v)| format!("{n}={}", qstr(v)))
        .collect::<Vec<_>>()
        .join(" ")
}

/// A row or column label in LaTeX: `L = 1,\ S = 0`.
fn latex_label(names: &[Name], vals: &[Q]) -> String {
    if names.is_empty() {
        return "\\cdot".into();
    }
    names
        .iter()
        .zip(vals)
        .map(|(n, v)| {
            format!(
                "{} = {}",
                crate::render::latex::name(n),
                crate::render::latex::lin(&crate::expr::Lin::constant(*v))
            )
        })
        .collect::<Vec<_>>()
        .join(",\\ ")
}

/// The matrices in LaTeX: one displayed `array` per total, rows labelled
/// by the first scheme's intermediate values, columns by the second's.
pub fn latex(blocks: &[Block]) -> String {
    let mut s = String::new();
    for b in blocks {
        s.push_str(&format!(
            "\\[\n J = {}:\\quad\n\\begin{{array}}{{c|{}}}\n",
            crate::render::latex::lin(&crate::expr::Lin::constant(b.total)),
            "c".repeat(b.cols.len())
        ));
        let heads: Vec<String> = b.cols.iter().map(|c| latex_label(&b.col_names, c)).collect();
        s.push_str(&format!("  & {} \\\\ \\hline\n", heads.join(" & ")));
        for (r, row) in b.rows.iter().zip(&b.entries) {
            let cells: Vec<String> = row
                .iter()
                .map(|v| crate::render::latex::expr(&crate::expr::Expr::constant(v)))
                .collect();
            s.push_str(&format!(
                "  {} & {} \\\\\n",
                latex_label(&b.row_names, r),
                cells.join(" & ")
            ));
        }
        s.push_str("\\end{array}\n\\]\n");
    }
    s
}

/// The matrices as text: one block per total, rows and columns labelled.
pub fn text(blocks: &[Block]) -> String {
    let mut s = String::new();
    for b in blocks {
        s.push_str(&format!(
            "J = {}: rows {} (first scheme), columns {} (second scheme); orthogonality checked\n",
            qstr(&b.total),
            if b.row_names.is_empty() {
                "-".to_string()
            } else {
                b.row_names
                    .iter()
                    .map(|n| n.to_string())
                    .collect::<Vec<_>>()
                    .join(", ")
            },
            if b.col_names.is_empty() {
                "-".to_string()
            } else {
                b.col_names
                    .iter()
                    .map(|n| n.to_string())
                    .collect::<Vec<_>>()
                    .join(", ")
            },
        ));
        let rl: Vec<String> = b.rows.iter().map(|r| label(&b.row_names, r)).collect();
        let cl: Vec<String> = b.cols.iter().map(|c| label(&b.col_names, c)).collect();
        let cells: Vec<Vec<String>> = b
            .entries
            .iter()
            .map(|r| r.iter().map(|v| v.to_string()).collect())
            .collect();
        let w0 = rl.iter().map(|x| x.len()).max().unwrap_or(0).max(1);
        let mut widths: Vec<usize> = cl.iter().map(|c| c.len()).collect();
        for r in &cells {
            for (k, c) in r.iter().enumerate() {
                widths[k] = widths[k].max(c.len());
            }
        }
        s.push_str(&format!("  {:w0$}", "", w0 = w0));
        for (k, c) in cl.iter().enumerate() {
            s.push_str(&format!("  {:>w$}", c, w = widths[k]));
        }
        s.push('\n');
        for (i, r) in cells.iter().enumerate() {
            s.push_str(&format!("  {:<w0$}", rl[i], w0 = w0));
            for (k, c) in r.iter().enumerate() {
                s.push_str(&format!("  {:>w$}", c, w = widths[k]));
            }
            s.push('\n');
        }
        s.push('\n');
    }
    s
}

/// One block of the transformation as a serialisable shape: the total,
/// the labels of each row and column, and the entries.
#[derive(Clone, Debug, serde::Serialize)]
pub struct BlockShape {
    /// the total angular momentum
    #[serde(rename = "J")]
    pub total: String,
    /// each row's intermediate values (name to value)
    pub rows: Vec<std::collections::BTreeMap<String, String>>,
    /// each column's intermediate values
    pub columns: Vec<std::collections::BTreeMap<String, String>>,
    /// the entries, row by row
    pub entries: Vec<Vec<String>>,
}

/// The matrices as a serialisable shape.
#[derive(Clone, Debug, serde::Serialize)]
pub struct MatrixShape {
    /// one block per total
    pub blocks: Vec<BlockShape>,
}

/// The matrices' shape.
pub fn shape(blocks: &[Block]) -> MatrixShape {
    fn labels(
        names: &[Name],
        values: &[Vec<Q>],
    ) -> Vec<std::collections::BTreeMap<String, String>> {
        values
            .iter()
            .map(|r| {
                names
                    .iter()
                    .zip(r)
                    .map(|(n, v)| (n.to_string(), qstr(v)))
                    .collect()
            })
            .collect()
    }
    MatrixShape {
        blocks: blocks
            .iter()
            .map(|b| BlockShape {
                total: qstr(&b.total),
                rows: labels(&b.row_names, &b.rows),
                columns: labels(&b.col_names, &b.cols),
                entries: b
                    .entries
                    .iter()
                    .map(|r| r.iter().map(|v| v.to_string()).collect())
                    .collect(),
            })
            .collect(),
    }
}
