//! Every connected simple cubic graph on n vertices, one per isomorphism
//! class, for the comparisons with the exhaustive search over reduction
//! orders.
//!
//! Generation: every labelling in breadth-first order from vertex 0 (each
//! vertex's free slots are filled, in label order, by later vertices that
//! still have a free slot or by the next new vertex), which reaches every
//! connected cubic graph. Classes: a graph is kept when its invariant (per
//! vertex, the closed walks of lengths 3 to n and the distances to every
//! other vertex, sorted) is new, and then tested for isomorphism against
//! the graphs kept with the same invariant by backtracking, so two graphs
//! are merged only when they are isomorphic.

use std::collections::BTreeMap;

/// Edges of every connected simple cubic graph on `n` vertices (n even,
/// 4..=12 in practice), one per isomorphism class, in a fixed order.
pub fn connected_cubic_graphs(n: usize) -> Vec<Vec<(usize, usize)>> {
    assert!(n >= 4 && n.is_multiple_of(2));
    let mut adj = vec![Vec::with_capacity(3); n];
    let mut kept: BTreeMap<Vec<Vec<u64>>, Vec<Vec<Vec<usize>>>> = BTreeMap::new();
    let mut order = Vec::new();
    adj[0] = vec![1, 2, 3];
    for row in &mut adj[1..=3] {
        row.push(0);
    }
    extend(&mut adj, 1, 4, &mut |g: &Vec<Vec<usize>>| {
        let key = invariant(g);
        let bucket = kept.entry(key.clone()).or_default();
        if bucket.iter().all(|h| !isomorphic(g, h)) {
            bucket.push(g.clone());
            order.push(g.clone());
        }
    });
    order
        .into_iter()
        .map(|g| {
            let mut edges = Vec::new();
            for (v, ns) in g.iter().enumerate() {
                for &w in ns {
                    if v < w {
                        edges.push((v, w));
                    }
                }
            }
            edges
        })
        .collect()
}

/// Fills the free slots of vertex `v` (and then of the later vertices);
/// `next` is the label a new vertex gets.
fn extend(
    adj: &mut Vec<Vec<usize>>,
    v: usize,
    next: usize,
    found: &mut dyn FnMut(&Vec<Vec<usize>>),
) {
    let n = adj.len();
    if v == n {
        if next == n {
            found(adj);
        }
        return;
    }
    if v >= next {
        // vertex v was never reached: the graph would not be connected
        return;
    }
    if adj[v].len() == 3 {
        extend(adj, v + 1, next, found);
        return;
    }
    // the smallest neighbour chosen for v's slots so far among later
    // vertices: slots are filled in increasing order of the neighbour
    let floor = adj[v].iter().copied().filter(|&w| w > v).max().unwrap_or(v);
    for w in floor + 1..=next.min(n - 1) {
        if w == next && next == n {
            break;
        }
        if adj[v].contains(&w) || (w < next && adj[w].len() == 3) {
            continue;
        }
        let new = usize::from(w == next);
        adj[v].push(w);
        adj[w].push(v);
        extend(adj, v, next + new, found);
        adj[v].pop();
        adj[w].pop();
    }
}

/// A labelling-independent invariant: per vertex, the closed walks of
/// lengths 3..=n and the distance profile, then sorted.
fn invariant(g: &[Vec<usize>]) -> Vec<Vec<u64>> {
    let n = g.len();
    let mut walks = vec![vec![0u64; n]; n];
    for (v, row) in walks.iter_mut().enumerate() {
        row[v] = 1;
    }
    let mut per_vertex = vec![Vec::new(); n];
    for len in 1..=n {
        let mut nextw = vec![vec![0u64; n]; n];
        for v in 0..n {
            for u in 0..n {
                nextw[v][u] = g[u].iter().map(|&w| walks[v][w]).sum();
            }
        }
        walks = nextw;
        if len >= 3 {
            for (v, pv) in per_vertex.iter_mut().enumerate() {
                pv.push(walks[v][v]);
            }
        }
    }
    for (v, pv) in per_vertex.iter_mut().enumerate() {
        let mut dist = vec![u64::MAX; n];
        dist[v] = 0;
        let mut queue = std::collections::VecDeque::from([v]);
        while let Some(x) = queue.pop_front() {
            for &y in &g[x] {
                if dist[y] == u64::MAX {
                    dist[y] = dist[x] + 1;
                    queue.push_back(y);
                }
            }
        }
        let mut profile = vec![0u64; n];
        for d in dist {
            profile[d as usize] += 1;
        }
        pv.extend(profile);
    }
    per_vertex.sort();
    per_vertex
}

/// Whether two cubic graphs on the same number of vertices are isomorphic
/// (backtracking over vertex maps that keep adjacency).
fn isomorphic(a: &[Vec<usize>], b: &[Vec<usize>]) -> bool {
    fn go(
        a: &[Vec<usize>],
        b: &[Vec<usize>],
        map: &mut Vec<Option<usize>>,
        used: &mut [bool],
        v: usize,
    ) -> bool {
        if v == a.len() {
            return true;
        }
        for w in 0..b.len() {
            if used[w] {
                continue;
            }
            let fits = (0..v).all(|u| {
                let mu = map[u].unwrap();
                a[v].contains(&u) == b[w].contains(&mu)
            });
            if !fits {
                continue;
            }
            map[v] = Some(w);
            used[w] = true;
            if go(a, b, map, used, v + 1) {
                return true;
            }
            map[v] = None;
            used[w] = false;
        }
        false
    }
    let n = a.len();
    go(a, b, &mut vec![None; n], &mut vec![false; n], 0)
}
