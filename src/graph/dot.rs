//! Drawing a projection-sum graph: Graphviz DOT with the j of each line as
//! its label, an arrow from the `+m` end to the `-m` end, vertex signs
//! (`+` for the written column order) with the column number (1, 2, 3) at
//! each line end, external legs, a legend, several terms as clusters of
//! one picture; and the same as JSON.

use super::Graph;
use crate::expr::Term;

/// The legend drawn under every picture, a line each.
const LEGEND: [&str; 3] = [
    "each vertex is a 3j symbol; the numbers 1, 2, 3 at its line ends are its columns in the order written (the + sign)",
    "a line is a summed projection, labelled j (m), drawn from its +m end to its -m end, dashed where both ends carry the same sign",
    "a dot ends a free leg",
];

/// The vertices, lines and legs of one term's graph, with node names
/// prefixed by `p` (so several terms can share a picture).
fn body(t: &Term, p: &str) -> String {
    let g = Graph::of_term(t);
    let mut s = String::new();
    for (i, v) in g.vertices.iter().enumerate() {
        let js: Vec<String> = v.cols.iter().map(|(j, _)| j.to_string()).collect();
        s.push_str(&format!(
            "  {p}v{i} [label=\"+\", xlabel=\"({})\"];\n",
            js.join(", ")
        ));
    }
    for l in &g.lines {
        let dir = if l.oriented {
            "dir=forward, arrowhead=normal"
        } else {
            "dir=none, style=dashed"
        };
        s.push_str(&format!(
            "  {p}v{} -- {p}v{} [label=\"{} ({})\", taillabel=\"{}\", headlabel=\"{}\", {dir}];\n",
            l.tail.0,
            l.head.0,
            l.j,
            l.var,
            l.tail.1 + 1,
            l.head.1 + 1
        ));
    }
    for (k, leg) in g.legs.iter().enumerate() {
        s.push_str(&format!(
            "  {p}e{k} [shape=point];\n  {p}v{} -- {p}e{k} [label=\"{} ({})\", taillabel=\"{}\"];\n",
            leg.vertex,
            leg.j,
            leg.m,
            leg.slot + 1
        ));
    }
    for n in &g.notes {
        s.push_str(&format!("  // {n}\n"));
    }
    s
}

fn quoted(text: &str) -> String {
    text.replace('\\', "\\\\").replace('"', "\\\"")
}

/// DOT text of the graph of a term.
pub fn dot(t: &Term) -> String {
    dot_terms(std::slice::from_ref(t))
}

/// DOT text of one picture: one term as it is, several terms as labelled
/// clusters side by side; a legend under it.
pub fn dot_terms(terms: &[Term]) -> String {
    let mut s = String::from(
        "graph recoup {\n  node [shape=circle, fontsize=10];\n  edge [fontsize=10, labelfontsize=9];\n",
    );
    // one line of the legend each, joined by DOT's line break
    let legend: Vec<String> = LEGEND.iter().map(|l| quoted(l)).collect();
    s.push_str(&format!(
        "  label=\"{}\";\n  labelloc=b;\n  fontsize=9;\n",
        legend.join("\\n")
    ));
    if let [t] = terms {
        s.push_str(&body(t, ""));
    } else {
        for (i, t) in terms.iter().enumerate() {
            s.push_str(&format!(
                "  subgraph cluster_{i} {{\n  label=\"term {}: {}\";\n",
                i + 1,
                quoted(&crate::syntax::print_term(t))
            ));
            s.push_str(&body(t, &format!("t{i}_")));
            s.push_str("  }\n");
        }
    }
    s.push_str("}\n");
    s
}

/// One column of a vertex: its angular momentum and projection.
#[derive(Clone, Debug, serde::Serialize)]
pub struct ColumnShape {
    /// the angular momentum
    pub j: String,
    /// the projection
    pub m: String,
}

/// A vertex (one 3j symbol) of a term's graph.
#[derive(Clone, Debug, serde::Serialize)]
pub struct VertexShape {
    /// its number
    pub id: usize,
    /// its orientation (always `+`: the columns are in the symbol's order)
    pub sign: &'static str,
    /// its three columns
    pub columns: Vec<ColumnShape>,
}

/// A line: a summed projection joining two columns.
#[derive(Clone, Debug, serde::Serialize)]
pub struct LineShape {
    /// the summed projection
    pub m: String,
    /// its angular momentum
    pub j: String,
    /// the vertex it leaves
    pub from: usize,
    /// the column there
    pub from_slot: usize,
    /// the vertex it enters
    pub to: usize,
    /// the column there
    pub to_slot: usize,
    /// true when a phase orients it
    pub oriented: bool,
}

/// A leg: a free projection at one column.
#[derive(Clone, Debug, serde::Serialize)]
pub struct LegShape {
    /// the vertex
    pub vertex: usize,
    /// the column
    pub slot: usize,
    /// its angular momentum
    pub j: String,
    /// its projection
    pub m: String,
}

/// The graph of a term: vertices (their columns), lines and legs.
#[derive(Clone, Debug, serde::Serialize)]
pub struct GraphShape {
    /// the vertices
    pub vertices: Vec<VertexShape>,
    /// the lines
    pub lines: Vec<LineShape>,
    /// the legs
    pub legs: Vec<LegShape>,
    /// remarks on factors the graph does not show
    pub notes: Vec<String>,
}

/// The graph of a term as a serialisable shape.
pub fn shape(t: &Term) -> GraphShape {
    let g = Graph::of_term(t);
    GraphShape {
        vertices: g
            .vertices
            .iter()
            .enumerate()
            .map(|(i, v)| VertexShape {
                id: i,
                sign: "+",
                columns: v
                    .cols
                    .iter()
                    .map(|(j, m)| ColumnShape {
                        j: j.to_string(),
                        m: m.to_string(),
                    })
                    .collect(),
            })
            .collect(),
        lines: g
            .lines
            .iter()
            .map(|l| LineShape {
                m: l.var.to_string(),
                j: l.j.to_string(),
                from: l.tail.0,
                from_slot: l.tail.1,
                to: l.head.0,
                to_slot: l.head.1,
                oriented: l.oriented,
            })
            .collect(),
        legs: g
            .legs
            .iter()
            .map(|l| LegShape {
                vertex: l.vertex,
                slot: l.slot,
                j: l.j.to_string(),
                m: l.m.to_string(),
            })
            .collect(),
        notes: g.notes.clone(),
    }
}
