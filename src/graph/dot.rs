//! Drawing a projection-sum graph: Graphviz DOT with the j of each line as
//! its label, an arrow from the `+m` end to the `-m` end, vertex signs
//! (`+` for the written column order) and external legs; and the same as
//! JSON.

use super::Graph;
use crate::expr::Term;

/// DOT text of the graph of a term.
pub fn dot(t: &Term) -> String {
    let g = Graph::of_term(t);
    let mut s = String::from("graph recoup {\n  node [shape=circle, fontsize=10];\n");
    for (i, v) in g.vertices.iter().enumerate() {
        let js: Vec<String> = v.cols.iter().map(|(j, _)| j.to_string()).collect();
        s.push_str(&format!(
            "  v{i} [label=\"+\", xlabel=\"({})\"];\n",
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
            "  v{} -- v{} [label=\"{} ({})\", {dir}];\n",
            l.tail.0, l.head.0, l.j, l.var
        ));
    }
    for (k, leg) in g.legs.iter().enumerate() {
        s.push_str(&format!(
            "  e{k} [shape=point];\n  v{} -- e{k} [label=\"{} ({})\"];\n",
            leg.vertex, leg.j, leg.m
        ));
    }
    for n in &g.notes {
        s.push_str(&format!("  // {n}\n"));
    }
    s.push_str("}\n");
    s
}

/// The graph of a term as JSON: vertices (their columns), lines and legs.
pub fn json(t: &Term) -> serde_json::Value {
    let g = Graph::of_term(t);
    let vertices: Vec<serde_json::Value> = g
        .vertices
        .iter()
        .enumerate()
        .map(|(i, v)| {
            serde_json::json!({
                "id": i,
                "sign": "+",
                "columns": v.cols.iter().map(|(j, m)| serde_json::json!({"j": j.to_string(), "m": m.to_string()})).collect::<Vec<_>>(),
            })
        })
        .collect();
    let lines: Vec<serde_json::Value> = g
        .lines
        .iter()
        .map(|l| {
            serde_json::json!({
                "m": l.var.to_string(), "j": l.j.to_string(),
                "from": l.tail.0, "from_slot": l.tail.1,
                "to": l.head.0, "to_slot": l.head.1,
                "oriented": l.oriented,
            })
        })
        .collect();
    let legs: Vec<serde_json::Value> = g
        .legs
        .iter()
        .map(|l| serde_json::json!({"vertex": l.vertex, "slot": l.slot, "j": l.j.to_string(), "m": l.m.to_string()}))
        .collect();
    serde_json::json!({"vertices": vertices, "lines": lines, "legs": legs, "notes": g.notes})
}
