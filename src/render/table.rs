//! The Clebsch–Gordan table for numeric j1, j2: every coupled state
//! `|J M>` as its expansion in the product basis `|m1 m2> = |j1 m1>|j2 m2>`,
//! grouped by M so that each column holds one product state, plus the
//! same entries as JSON and CSV.

use crate::numeric::{exact, Surd};
use serde::Serialize;

/// One coefficient of the table.
#[derive(Clone, Debug, Serialize)]
pub struct Entry {
    /// doubled m1
    #[serde(skip)]
    pub tm1: i64,
    /// doubled m2
    #[serde(skip)]
    pub tm2: i64,
    /// doubled J
    #[serde(skip)]
    pub tj: i64,
    /// doubled M
    #[serde(skip)]
    pub tmm: i64,
    /// m1 as text
    pub m1: String,
    /// m2 as text
    pub m2: String,
    /// J as text
    #[serde(rename = "J")]
    pub j: String,
    /// M as text
    #[serde(rename = "M")]
    pub m: String,
    /// exact value
    pub exact: String,
    /// the value in floating point
    pub float: f64,
    #[serde(skip)]
    value: Surd,
}

/// A doubled value as text: `3`, `1/2`, `-3/2`.
pub fn half(t: i64) -> String {
    if t % 2 == 0 {
        (t / 2).to_string()
    } else {
        format!("{t}/2")
    }
}

/// All coefficients `<j1 m1; j2 m2 | J M>` for doubled j1, j2, ordered by
/// M descending, J descending, m1 descending.
pub fn entries(tj1: i64, tj2: i64) -> Vec<Entry> {
    let mut out = Vec::new();
    let tjmax = tj1 + tj2;
    let tjmin = (tj1 - tj2).abs();
    let mut tmm = tjmax;
    while tmm >= -tjmax {
        let mut tj = tjmax;
        while tj >= tjmin.max(tmm.abs()) {
            let mut tm1 = tj1;
            while tm1 >= -tj1 {
                let tm2 = tmm - tm1;
                if tm2.abs() <= tj2 {
                    let v = exact::clebsch_gordan(tj1, tm1, tj2, tm2, tj, tmm);
                    out.push(Entry {
                        tm1,
                        tm2,
                        tj,
                        tmm,
                        m1: half(tm1),
                        m2: half(tm2),
                        j: half(tj),
                        m: half(tmm),
                        exact: v.to_string(),
                        float: v.to_f64(),
                        value: v,
                    });
                }
                tm1 -= 2;
            }
            tj -= 2;
        }
        tmm -= 2;
    }
    out
}

fn signed_half(t: i64) -> String {
    if t > 0 {
        format!("+{}", half(t))
    } else {
        half(t)
    }
}

/// The text layout: one block per M, one line per J, one column per
/// product state, coefficients aligned in their columns.
pub fn text(tj1: i64, tj2: i64) -> String {
    let es = entries(tj1, tj2);
    let mut s = format!(
        "Clebsch-Gordan coefficients for j1 = {}, j2 = {} (Condon-Shortley phases)\n\
         |J M> = sum over m1 + m2 = M of <j1 m1; j2 m2 | J M> |m1 m2>, where |m1 m2> = |j1 m1> |j2 m2>\n",
        half(tj1),
        half(tj2)
    );
    let jw = es.iter().map(|e| e.j.len()).max().unwrap_or(1);
    let mw = es
        .iter()
        .map(|e| signed_half(e.tmm).len())
        .max()
        .unwrap_or(1);
    let mut tmm = tj1 + tj2;
    while tmm >= -(tj1 + tj2) {
        let block: Vec<&Entry> = es.iter().filter(|e| e.tmm == tmm).collect();
        s.push_str(&format!("\nM = {}\n", half(tmm)));
        // columns: m1 descending
        let mut cols: Vec<i64> = block.iter().map(|e| e.tm1).collect();
        cols.sort_unstable_by(|a, b| b.cmp(a));
        cols.dedup();
        let cell = |e: &Entry, first: bool| -> String {
            if e.value.is_zero() {
                return String::new();
            }
            let txt = e.exact.clone();
            let ket = format!("|{},{}>", signed_half(e.tm1), signed_half(e.tm2));
            let (sign, mag) = match txt.strip_prefix('-') {
                Some(r) => ("-", r.to_string()),
                None => (if first { " " } else { "+" }, txt),
            };
            let mag = if mag == "1" {
                String::new()
            } else {
                format!("{mag} ")
            };
            format!("{sign} {mag}{ket}")
        };
        let mut js: Vec<i64> = block.iter().map(|e| e.tj).collect();
        js.sort_unstable_by(|a, b| b.cmp(a));
        js.dedup();
        // widths per column
        let mut widths = vec![0usize; cols.len()];
        for (ci, &c) in cols.iter().enumerate() {
            for e in block.iter().filter(|e| e.tm1 == c) {
                widths[ci] = widths[ci].max(cell(e, ci == 0).len());
            }
        }
        for &tj in &js {
            let mut line = format!(
                "  |{:>jw$} {:>mw$}> =",
                half(tj),
                signed_half(tmm),
                jw = jw,
                mw = mw
            );
            let mut first = true;
            for (ci, &c) in cols.iter().enumerate() {
                let e = block.iter().find(|e| e.tj == tj && e.tm1 == c).unwrap();
                let txt = cell(e, first);
                if !txt.is_empty() {
                    first = false;
                }
                line.push_str(&format!(" {:<w$}", txt, w = widths[ci]));
            }
            s.push_str(line.trim_end());
            s.push('\n');
        }
        tmm -= 2;
    }
    s
}

/// CSV with columns j1, j2, m1, m2, J, M, exact, float.
pub fn csv(tj1: i64, tj2: i64) -> String {
    let mut s = String::from("j1,j2,m1,m2,J,M,exact,float\n");
    for e in entries(tj1, tj2) {
        s.push_str(&format!(
            "{},{},{},{},{},{},{},{}\n",
            half(tj1),
            half(tj2),
            e.m1,
            e.m2,
            e.j,
            e.m,
            e.exact,
            super::fmt_float(e.float)
        ));
    }
    s
}

/// A Clebsch–Gordan table as a serialisable shape: `{"j1", "j2",
/// "entries": [...]}`.
#[derive(Clone, Debug, serde::Serialize)]
pub struct TableShape {
    /// the first angular momentum
    pub j1: String,
    /// the second
    pub j2: String,
    /// every coefficient
    pub entries: Vec<Entry>,
}

/// The table of `j1 x j2` as its shape.
pub fn shape(tj1: i64, tj2: i64) -> TableShape {
    TableShape {
        j1: half(tj1),
        j2: half(tj2),
        entries: entries(tj1, tj2),
    }
}
