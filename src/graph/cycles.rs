//! Shortest cycles of a projection-sum graph (petgraph breadth-first
//! search around each line), used to choose where to reduce next.

use super::Graph;
use petgraph::graph::{NodeIndex, UnGraph};
use std::collections::VecDeque;

/// A cycle: vertices `v_0 … v_{L-1}` and lines `l_i` from `v_i` to
/// `v_{i+1 mod L}`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Cycle {
    /// the vertices in order
    pub vertices: Vec<usize>,
    /// the lines in order (`lines[i]` joins `vertices[i]` and the next)
    pub lines: Vec<usize>,
}

impl Cycle {
    /// The number of lines.
    pub fn len(&self) -> usize {
        self.lines.len()
    }

    /// True for no lines.
    pub fn is_empty(&self) -> bool {
        self.lines.is_empty()
    }
}

/// The graph as a petgraph multigraph (edge weight = line index).
pub fn to_petgraph(g: &Graph) -> UnGraph<usize, usize> {
    let mut pg = UnGraph::<usize, usize>::new_undirected();
    let nodes: Vec<NodeIndex> = (0..g.vertices.len()).map(|i| pg.add_node(i)).collect();
    for (li, l) in g.lines.iter().enumerate() {
        pg.add_edge(nodes[l.tail.0], nodes[l.head.0], li);
    }
    pg
}

/// A shortest cycle through the line `e` (BFS from one end to the other
/// without using `e`), if any.
fn cycle_through(pg: &UnGraph<usize, usize>, g: &Graph, e: usize) -> Option<Cycle> {
    let (u, v) = (g.lines[e].tail.0, g.lines[e].head.0);
    if u == v {
        return Some(Cycle {
            vertices: vec![u],
            lines: vec![e],
        });
    }
    let n = pg.node_count();
    let mut prev: Vec<Option<(usize, usize)>> = vec![None; n]; // (vertex, line)
    let mut seen = vec![false; n];
    let mut q = VecDeque::new();
    seen[u] = true;
    q.push_back(u);
    while let Some(x) = q.pop_front() {
        if x == v {
            break;
        }
        for er in pg.edges(NodeIndex::new(x)) {
            let li = *er.weight();
            if li == e {
                continue;
            }
            let y = if petgraph::visit::EdgeRef::source(&er).index() == x {
                petgraph::visit::EdgeRef::target(&er).index()
            } else {
                petgraph::visit::EdgeRef::source(&er).index()
            };
            if !seen[y] {
                seen[y] = true;
                prev[y] = Some((x, li));
                q.push_back(y);
            }
        }
    }
    if !seen[v] {
        return None;
    }
    // path u -> ... -> v, then e back to u
    let mut path_v = vec![v];
    let mut path_l = Vec::new();
    let mut x = v;
    while x != u {
        let (p, li) = prev[x].unwrap();
        path_l.push(li);
        path_v.push(p);
        x = p;
    }
    path_v.reverse();
    path_l.reverse();
    // vertices u=path_v[0] ... v=path_v[k]; lines path_l[i] joins path_v[i], path_v[i+1]
    let mut vertices = path_v;
    let mut lines = path_l;
    lines.push(e);
    // the last line e joins v (last vertex) and u (first)
    vertices.truncate(lines.len());
    Some(Cycle { vertices, lines })
}

/// A shortest cycle of the graph (ties: the one through the lowest line).
pub fn shortest_cycle(g: &Graph) -> Option<Cycle> {
    let pg = to_petgraph(g);
    let mut best: Option<Cycle> = None;
    for e in 0..g.lines.len() {
        if let Some(c) = cycle_through(&pg, g, e) {
            if best.as_ref().is_none_or(|b| c.len() < b.len()) {
                best = Some(c);
            }
        }
    }
    best
}

/// Every shortest cycle through each line (one per line), for choosing.
pub fn cycles_by_line(g: &Graph) -> Vec<Cycle> {
    let pg = to_petgraph(g);
    (0..g.lines.len())
        .filter_map(|e| cycle_through(&pg, g, e))
        .collect()
}
