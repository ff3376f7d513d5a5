//! Projection sums as graphs (the Yutsis-graph picture): every 3j of a
//! term is a vertex whose three columns, in order, are its legs; a summed
//! projection that fills one slot of two vertices (as `m` in one and `-m`
//! in the other, or with equal signs) is a line between them; every other
//! slot is an external leg. The reduction (`reduce`) rewrites the term with
//! the graph steps (Yutsis, Levinson and Vanagas 1962) chosen from this picture; `dot`
//! draws it.

pub mod cycles;
pub mod dot;
pub mod plan;
pub mod reduce;
pub mod samples;

use crate::expr::{Factor, Kind, Lin, Name, Term};

/// A 3j of the term.
#[derive(Clone, Debug)]
pub struct Vertex {
    /// index of the factor in the term
    pub factor: usize,
    /// the columns (j, m) in order (the vertex's cyclic orientation)
    pub cols: [(Lin, Lin); 3],
}

/// A summed projection joining two slots.
#[derive(Clone, Debug)]
pub struct Line {
    /// the summed projection
    pub var: Name,
    /// its angular momentum
    pub j: Lin,
    /// `(vertex, slot)` of the end written `+m` (or the first end)
    pub tail: (usize, usize),
    /// `(vertex, slot)` of the end written `-m` (or the second end)
    pub head: (usize, usize),
    /// false when both ends carry the same sign
    pub oriented: bool,
}

/// A slot that is not on a line.
#[derive(Clone, Debug)]
pub struct Leg {
    /// its vertex
    pub vertex: usize,
    /// its slot (column)
    pub slot: usize,
    /// the angular momentum
    pub j: Lin,
    /// the projection as written
    pub m: Lin,
}

/// The graph of a term.
#[derive(Clone, Debug, Default)]
pub struct Graph {
    /// the 3j symbols
    pub vertices: Vec<Vertex>,
    /// the summed projections that join two slots
    pub lines: Vec<Line>,
    /// the other slots
    pub legs: Vec<Leg>,
    /// summed projections that are not lines, and why
    pub notes: Vec<String>,
}

impl Graph {
    /// The graph of a term's 3j symbols and summed projections.
    pub fn of_term(t: &Term) -> Graph {
        let mut g = Graph::default();
        for (i, f) in t.factors().iter().enumerate() {
            if let Factor::ThreeJ(a) = f {
                g.vertices.push(Vertex {
                    factor: i,
                    cols: [
                        (a[0].clone(), a[3].clone()),
                        (a[1].clone(), a[4].clone()),
                        (a[2].clone(), a[5].clone()),
                    ],
                });
            }
        }
        let kinds = t.kinds();
        let mut on_line: Vec<[bool; 3]> = vec![[false; 3]; g.vertices.len()];
        for v in t.bound() {
            if kinds.get(v) != Some(&Kind::Projection) {
                continue;
            }
            let mut ends = Vec::new();
            let mut compound = false;
            for (vi, vx) in g.vertices.iter().enumerate() {
                for (s, (_, m)) in vx.cols.iter().enumerate() {
                    if !m.has(v) {
                        continue;
                    }
                    match m.as_signed_var() {
                        Some((_, neg)) => ends.push((vi, s, neg)),
                        None => compound = true,
                    }
                }
            }
            let elsewhere = t
                .factors()
                .iter()
                .any(|f| !matches!(f, Factor::ThreeJ(_) | Factor::Power(..)) && f.has(v));
            if compound || elsewhere {
                g.notes.push(format!(
                    "the summed projection {v} appears inside a compound argument or outside a 3j; it is left as it is"
                ));
                continue;
            }
            if ends.len() != 2 {
                g.notes.push(format!(
                    "the summed projection {v} appears in {} 3j symbols (a line needs exactly two); it is left as it is",
                    ends.len()
                ));
                continue;
            }
            let (a, b) = (ends[0], ends[1]);
            let ja = &g.vertices[a.0].cols[a.1].0;
            let jb = &g.vertices[b.0].cols[b.1].0;
            if ja != jb {
                g.notes.push(format!(
                    "the summed projection {v} belongs to {ja} in one symbol and to {jb} in the other; it is left as it is"
                ));
                continue;
            }
            let (tail, head) = if !a.2 { (a, b) } else { (b, a) };
            on_line[a.0][a.1] = true;
            on_line[b.0][b.1] = true;
            g.lines.push(Line {
                var: v.clone(),
                j: ja.clone(),
                tail: (tail.0, tail.1),
                head: (head.0, head.1),
                oriented: a.2 != b.2,
            });
        }
        for (vi, vx) in g.vertices.iter().enumerate() {
            for (s, (j, m)) in vx.cols.iter().enumerate() {
                if !on_line[vi][s] {
                    g.legs.push(Leg {
                        vertex: vi,
                        slot: s,
                        j: j.clone(),
                        m: m.clone(),
                    });
                }
            }
        }
        g
    }

    /// The lines at a vertex.
    pub fn lines_at(&self, v: usize) -> Vec<usize> {
        (0..self.lines.len())
            .filter(|&l| self.lines[l].tail.0 == v || self.lines[l].head.0 == v)
            .collect()
    }

    /// The slot of line `l` at vertex `v` (the first, for a loop).
    pub fn slot_of(&self, l: usize, v: usize) -> usize {
        let line = &self.lines[l];
        if line.tail.0 == v {
            line.tail.1
        } else {
            line.head.1
        }
    }

    /// Connected components as lists of vertices.
    pub fn components(&self) -> Vec<Vec<usize>> {
        let n = self.vertices.len();
        let mut comp = vec![usize::MAX; n];
        let mut out = Vec::new();
        for s in 0..n {
            if comp[s] != usize::MAX {
                continue;
            }
            let id = out.len();
            let mut stack = vec![s];
            let mut members = Vec::new();
            comp[s] = id;
            while let Some(v) = stack.pop() {
                members.push(v);
                for l in self.lines_at(v) {
                    let line = &self.lines[l];
                    let w = if line.tail.0 == v {
                        line.head.0
                    } else {
                        line.tail.0
                    };
                    if comp[w] == usize::MAX {
                        comp[w] = id;
                        stack.push(w);
                    }
                }
            }
            members.sort_unstable();
            out.push(members);
        }
        out
    }

    /// Number of external legs of the given vertices.
    pub fn legs_of(&self, vs: &[usize]) -> usize {
        self.legs.iter().filter(|l| vs.contains(&l.vertex)).count()
    }
}
