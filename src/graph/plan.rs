//! Choosing the next interchange by search. The shape of a projection
//! graph alone decides how many sums a reduction leaves: every interchange
//! adds one, loops, bubbles, triangles and closed 6j pieces add none, and
//! a closed K3,3 piece (a 9j) adds none, or one where 9j symbols are to be
//! written as sums over 6j. This module searches the orders of interchanges
//! on the bare graph (vertices and lines, no angular momenta) by iterative
//! deepening, within a budget of visited graphs, and names the first
//! interchange of a reduction with the fewest sums; the reduction then
//! makes that rewrite symbolically (and verifies it). Past the budget it
//! says nothing and the caller keeps its own choice.
//!
//! Interchanges are tried on lines that lie on a shortest cycle of the
//! graph or on one a line longer (common practice in graphical reduction:
//! shortening short cycles is what removes vertices).

use super::Graph;

/// The end of a slot: the `(vertex, slot)` it is joined to, `None` for an
/// external leg.
type End = Option<(usize, usize)>;

/// An interchange: the `(vertex, slot)` of the leg that stays, of the leg
/// that moves, and the graph after it.
type Move = ((usize, usize), (usize, usize), Bare);

/// A cubic graph with external legs and nothing else.
#[derive(Clone, Debug, PartialEq, Eq, Hash)]
struct Bare {
    adj: Vec<Option<[End; 3]>>,
}

/// The first interchange of a reduction with the fewest sums: on the line
/// joining `keep.0` and `moved.0`, the leg in slot `keep.1` stays at its
/// vertex and the leg in slot `moved.1` of the other vertex moves across.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Choice {
    /// index of the line in the graph's `lines`
    pub line: usize,
    /// `(vertex, slot)` of the leg that stays
    pub keep: (usize, usize),
    /// `(vertex, slot)` of the leg that moves
    pub moved: (usize, usize),
    /// the sums the whole reduction leaves, this one included
    pub sums: usize,
}

/// How the search counts.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct Measure {
    /// a closed 9j piece counts as one sum (9j written as 6j sums)
    pub nine_j_is_a_sum: bool,
    /// most graphs visited
    pub budget: usize,
}

impl Bare {
    fn of(g: &Graph) -> Bare {
        let mut adj: Vec<Option<[End; 3]>> = vec![Some([None; 3]); g.vertices.len()];
        for l in &g.lines {
            adj[l.tail.0].as_mut().unwrap()[l.tail.1] = Some(l.head);
            adj[l.head.0].as_mut().unwrap()[l.head.1] = Some(l.tail);
        }
        Bare { adj }
    }

    fn alive(&self) -> impl Iterator<Item = usize> + '_ {
        (0..self.adj.len()).filter(|v| self.adj[*v].is_some())
    }

    fn slots(&self, v: usize) -> [End; 3] {
        self.adj[v].expect("a live vertex")
    }

    fn set(&mut self, at: End, to: End) {
        if let Some((v, s)) = at {
            self.adj[v].as_mut().expect("a live vertex")[s] = to;
        }
    }

    /// Joins two ends (either may be an external leg).
    fn join(&mut self, a: End, b: End) {
        self.set(a, b);
        self.set(b, a);
    }

    /// `(v, s, w, t)` for every line between two distinct vertices.
    fn lines(&self) -> Vec<(usize, usize, usize, usize)> {
        let mut out = Vec::new();
        for v in self.alive() {
            for (s, e) in self.slots(v).iter().enumerate() {
                if let Some((w, t)) = *e {
                    if (v, s) < (w, t) {
                        out.push((v, s, w, t));
                    }
                }
            }
        }
        out
    }

    fn neighbours(&self, v: usize) -> impl Iterator<Item = usize> + '_ {
        self.slots(v).into_iter().flatten().map(|(w, _)| w)
    }

    /// Removes a loop at a vertex (its third leg then carries 0 and the
    /// vertex at that leg's other end joins its two other ends).
    fn loop_step(&mut self) -> bool {
        for v in self.alive().collect::<Vec<_>>() {
            let sl = self.slots(v);
            for (s, e) in sl.iter().enumerate() {
                let Some((w, t)) = *e else { continue };
                if w != v || t == s {
                    continue;
                }
                let third = sl[3 - s - t];
                self.adj[v] = None;
                if let Some((y, u)) = third {
                    let ys = self.slots(y);
                    let o: Vec<usize> = (0..3).filter(|x| *x != u).collect();
                    let (b, c) = (ys[o[0]], ys[o[1]]);
                    self.adj[y] = None;
                    if b != Some((y, o[1])) {
                        self.join(b, c);
                    }
                }
                return true;
            }
        }
        false
    }

    /// Removes a bubble (two vertices joined by two lines): their third
    /// ends join.
    fn bubble_step(&mut self) -> bool {
        for v in self.alive().collect::<Vec<_>>() {
            let sl = self.slots(v);
            for i in 0..3 {
                for k in i + 1..3 {
                    let (Some((w1, _)), Some((w2, _))) = (sl[i], sl[k]) else {
                        continue;
                    };
                    if w1 != w2 || w1 == v {
                        continue;
                    }
                    let w = w1;
                    let ws = self.slots(w);
                    let third_w = (0..3).find(|s| ws[*s].map(|x| x.0) != Some(v)).unwrap_or(0);
                    let a = sl[3 - i - k];
                    let b = ws[third_w];
                    self.adj[v] = None;
                    self.adj[w] = None;
                    if a.map(|x| x.0) != Some(w) {
                        self.join(a, b);
                    }
                    return true;
                }
            }
        }
        false
    }

    /// Contracts a triangle to one vertex.
    fn triangle_step(&mut self) -> bool {
        for v in self.alive().collect::<Vec<_>>() {
            let sl = self.slots(v);
            for i in 0..3 {
                for k in 0..3 {
                    let (Some((w, _)), Some((x, _))) = (sl[i], sl[k]) else {
                        continue;
                    };
                    if i == k || w == x || w == v || x == v {
                        continue;
                    }
                    if !self.neighbours(w).any(|y| y == x) {
                        continue;
                    }
                    let outer = |me: usize, a: usize, b: usize, g: &Bare| {
                        g.slots(me)
                            .into_iter()
                            .find(|y| y.map(|y| y.0) != Some(a) && y.map(|y| y.0) != Some(b))
                            .flatten()
                    };
                    let ends = [
                        outer(v, w, x, self),
                        outer(w, v, x, self),
                        outer(x, v, w, self),
                    ];
                    self.adj[w] = None;
                    self.adj[x] = None;
                    self.adj[v] = Some(ends);
                    for (s, o) in ends.iter().enumerate() {
                        self.set(*o, Some((v, s)));
                    }
                    return true;
                }
            }
        }
        false
    }

    fn components(&self) -> Vec<Vec<usize>> {
        let mut seen = vec![false; self.adj.len()];
        let mut out = Vec::new();
        for s in self.alive().collect::<Vec<_>>() {
            if seen[s] {
                continue;
            }
            seen[s] = true;
            let mut stack = vec![s];
            let mut c = Vec::new();
            while let Some(v) = stack.pop() {
                c.push(v);
                for w in self.neighbours(v).collect::<Vec<_>>() {
                    if !seen[w] {
                        seen[w] = true;
                        stack.push(w);
                    }
                }
            }
            out.push(c);
        }
        out
    }

    /// Removes closed 4-vertex pieces (6j) and closed K3,3 pieces (9j);
    /// returns the sums the 9j pieces count for.
    fn closed_step(&mut self, m: &Measure) -> Option<usize> {
        for c in self.components() {
            let closed = c.iter().all(|&v| self.slots(v).iter().all(|e| e.is_some()));
            if !closed {
                continue;
            }
            let k33 = c.len() == 6 && self.bipartite(&c);
            if c.len() == 4 || k33 {
                for v in c {
                    self.adj[v] = None;
                }
                return Some(usize::from(k33 && m.nine_j_is_a_sum));
            }
        }
        None
    }

    fn bipartite(&self, c: &[usize]) -> bool {
        let mut side = vec![None; self.adj.len()];
        side[c[0]] = Some(false);
        let mut stack = vec![c[0]];
        while let Some(v) = stack.pop() {
            let me = side[v].unwrap();
            for w in self.neighbours(v).collect::<Vec<_>>() {
                match side[w] {
                    None => {
                        side[w] = Some(!me);
                        stack.push(w);
                    }
                    Some(x) if x == me => return false,
                    _ => {}
                }
            }
        }
        true
    }

    /// Applies every step that adds no sum (and closed 9j pieces, which
    /// may count); returns the sums counted.
    fn reduce_free(&mut self, m: &Measure) -> usize {
        let mut sums = 0;
        loop {
            crate::limits::tick();
            if self.loop_step() || self.bubble_step() || self.triangle_step() {
                continue;
            }
            match self.closed_step(m) {
                Some(s) => sums += s,
                None => return sums,
            }
        }
    }

    /// Length of the shortest cycle through the line (v, s)-(w, t).
    fn cycle_through(&self, v: usize, s: usize, w: usize) -> usize {
        let mut dist = vec![usize::MAX; self.adj.len()];
        dist[v] = 0;
        let mut queue = std::collections::VecDeque::from([v]);
        while let Some(x) = queue.pop_front() {
            for (k, e) in self.slots(x).iter().enumerate() {
                let Some((y, _)) = *e else { continue };
                if x == v && k == s {
                    continue;
                }
                if dist[y] == usize::MAX {
                    dist[y] = dist[x] + 1;
                    if y == w {
                        return dist[y] + 1;
                    }
                    queue.push_back(y);
                }
            }
        }
        usize::MAX
    }

    /// The interchanges worth trying, with the graphs they give.
    fn interchanges(&self) -> Vec<Move> {
        let lines = self.lines();
        let lengths: Vec<usize> = lines
            .iter()
            .map(|&(v, s, w, _)| self.cycle_through(v, s, w))
            .collect();
        let girth = lengths.iter().copied().min().unwrap_or(usize::MAX);
        let mut out = Vec::new();
        for (&(v, s, w, t), &len) in lines.iter().zip(&lengths) {
            if len == usize::MAX || len > girth.saturating_add(1) {
                continue;
            }
            let sv: Vec<usize> = (0..3).filter(|x| *x != s).collect();
            let sw: Vec<usize> = (0..3).filter(|x| *x != t).collect();
            let (keep, give) = (sv[0], sv[1]);
            for &take in &sw {
                let a = self.slots(v)[give];
                let b = self.slots(w)[take];
                // a leg joined to the other vertex cannot cross
                if a.map(|x| x.0) == Some(w) || b.map(|x| x.0) == Some(v) {
                    continue;
                }
                let mut g = self.clone();
                g.adj[v].as_mut().unwrap()[give] = b;
                g.set(b, Some((v, give)));
                g.adj[w].as_mut().unwrap()[take] = a;
                g.set(a, Some((w, take)));
                out.push(((v, keep), (w, take), g));
            }
        }
        out
    }
}

/// What the search has learnt: graphs (after their free steps, by their
/// signature) that cannot be finished with a number of sums, and the
/// graphs visited.
#[derive(Default)]
struct Search {
    fails_with: std::collections::HashMap<u64, usize>,
    visited: usize,
}

impl Bare {
    /// A signature equal for isomorphic graphs: colour refinement started
    /// from each vertex's external legs and distance profile. Different
    /// graphs may share one (then the search may miss an order, never
    /// make a wrong rewrite: every rewrite is verified symbolically).
    fn signature(&self) -> u64 {
        use std::hash::{Hash, Hasher};
        let h = |x: &dyn Fn(&mut std::collections::hash_map::DefaultHasher)| {
            let mut s = std::collections::hash_map::DefaultHasher::new();
            x(&mut s);
            s.finish()
        };
        let n = self.adj.len();
        let alive: Vec<usize> = self.alive().collect();
        let mut colour = vec![0u64; n];
        for &v in &alive {
            // vertices and legs at each distance
            let mut dist = vec![usize::MAX; n];
            dist[v] = 0;
            let mut queue = std::collections::VecDeque::from([v]);
            let mut profile: Vec<(usize, usize)> = Vec::new();
            while let Some(x) = queue.pop_front() {
                let d = dist[x];
                if profile.len() <= d {
                    profile.resize(d + 1, (0, 0));
                }
                profile[d].0 += 1;
                for e in self.slots(x) {
                    match e {
                        None => profile[d].1 += 1,
                        Some((y, _)) if dist[y] == usize::MAX => {
                            dist[y] = d + 1;
                            queue.push_back(y);
                        }
                        _ => {}
                    }
                }
            }
            colour[v] = h(&|s| profile.hash(s));
        }
        for _ in 0..3 {
            let next: Vec<u64> = (0..n)
                .map(|v| {
                    if self.adj[v].is_none() {
                        return 0;
                    }
                    let mut around: Vec<u64> = self
                        .slots(v)
                        .iter()
                        .map(|e| e.map_or(1, |(w, _)| colour[w]))
                        .collect();
                    around.sort_unstable();
                    h(&|s| (colour[v], &around).hash(s))
                })
                .collect();
            colour = next;
        }
        let mut all: Vec<u64> = alive.iter().map(|&v| colour[v]).collect();
        all.sort_unstable();
        h(&|s| all.hash(s))
    }
}

/// Can `g` be reduced with at most `k` more sums? `None` past the budget.
fn within(g: &Bare, k: usize, m: &Measure, s: &mut Search) -> Option<bool> {
    s.visited += 1;
    if s.visited > m.budget {
        return None;
    }
    let mut g = g.clone();
    let spent = g.reduce_free(m);
    if spent > k {
        return Some(false);
    }
    let k = k - spent;
    if g.lines().is_empty() {
        return Some(true);
    }
    if k == 0 {
        return Some(false);
    }
    let sig = g.signature();
    if s.fails_with.get(&sig).is_some_and(|&f| f >= k) {
        return Some(false);
    }
    for (_, _, h) in g.interchanges() {
        if within(&h, k - 1, m, s)? {
            return Some(true);
        }
    }
    // interchanges commute often: remember the dead end
    s.fails_with.insert(sig, k);
    Some(false)
}

/// The first interchange of a reduction of `g` with the fewest sums, when
/// the graph needs one and the search finishes within its budget.
pub fn best_interchange(g: &Graph, m: &Measure) -> Option<Choice> {
    let bare = Bare::of(g);
    // only a graph the reduction would interchange on now: nothing free
    // may be left to do first
    let mut reduced = bare.clone();
    if reduced.reduce_free(m) > 0 || reduced != bare || bare.lines().is_empty() {
        return None;
    }
    let options = bare.interchanges();
    let mut search = Search::default();
    // a reduction planned at an earlier step already proved how many sums
    // this graph needs: start there instead of proving it again
    let sig = bare.signature();
    let start = PROVEN.with(|p| p.borrow().get(&(sig, m.nine_j_is_a_sum)).copied());
    for k in start.unwrap_or(1).max(1)..=bare.adj.len() {
        for (keep, moved, h) in &options {
            if within(h, k - 1, m, &mut search)? {
                let line = g.lines.iter().position(|l| {
                    (l.tail.0 == keep.0 && l.head.0 == moved.0)
                        || (l.tail.0 == moved.0 && l.head.0 == keep.0)
                })?;
                // what the graph after this interchange (and its free
                // steps) needs, for the next step
                let mut next = h.clone();
                let spent = next.reduce_free(m);
                if start.is_none() || start == Some(k) {
                    PROVEN.with(|p| {
                        let mut p = p.borrow_mut();
                        if p.len() > 10_000 {
                            p.clear();
                        }
                        p.insert(
                            (next.signature(), m.nine_j_is_a_sum),
                            (k - 1).saturating_sub(spent),
                        );
                    });
                }
                return Some(Choice {
                    line,
                    keep: *keep,
                    moved: *moved,
                    sums: k,
                });
            }
        }
    }
    None
}

thread_local! {
    /// Sums proved necessary and sufficient for graphs met as the next
    /// graph of a planned reduction (by signature and measure).
    static PROVEN: std::cell::RefCell<std::collections::HashMap<(u64, bool), usize>> =
        std::cell::RefCell::new(std::collections::HashMap::new());
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::graph::samples::{cubic_graph_sum, CUBE, K33};
    use crate::syntax::parse;

    /// The triangular prism: two triangles joined by three lines.
    const PRISM: [(usize, usize); 9] = [
        (0, 1),
        (1, 2),
        (2, 0),
        (3, 4),
        (4, 5),
        (5, 3),
        (0, 3),
        (1, 4),
        (2, 5),
    ];

    /// The fewest sums a reduction of `g` leaves under `m`, when the
    /// search finishes within its budget.
    fn fewest_sums(g: &Graph, m: &Measure) -> Option<usize> {
        let bare = Bare::of(g);
        let mut search = Search::default();
        (0..=bare.adj.len()).find_map(|k| match within(&bare, k, m, &mut search) {
            Some(true) => Some(Some(k)),
            Some(false) => None,
            None => Some(None),
        })?
    }

    fn fewest(n: usize, edges: &[(usize, usize)], nine_j_is_a_sum: bool) -> Option<usize> {
        let e = parse(&cubic_graph_sum(n, edges)).unwrap();
        let g = Graph::of_term(&e.terms()[0]);
        fewest_sums(
            &g,
            &Measure {
                nine_j_is_a_sum,
                budget: 100_000,
            },
        )
    }

    #[test]
    fn the_measure_counts_a_9j_as_one_sum_of_6j_only_when_asked() {
        // K4 is a 6j, the prism reduces by triangles, K3,3 is a 9j: one sum
        // of 6j when written with 6j only (common practice, no source)
        let k4 = [(0, 1), (0, 2), (0, 3), (1, 2), (1, 3), (2, 3)];
        assert_eq!(fewest(4, &k4, true), Some(0));
        assert_eq!(fewest(6, &PRISM, true), Some(0));
        assert_eq!(fewest(6, &K33, false), Some(0));
        assert_eq!(fewest(6, &K33, true), Some(1));
        // the cube (a 12j graph) needs one interchange either way
        assert_eq!(fewest(8, &CUBE, true), Some(1));
    }

    #[test]
    fn a_choice_is_offered_only_where_an_interchange_is_next() {
        let e = parse(&cubic_graph_sum(6, &PRISM)).unwrap();
        let g = Graph::of_term(&e.terms()[0]);
        let m = Measure {
            nine_j_is_a_sum: true,
            budget: 1000,
        };
        // a triangle comes first: no interchange to choose
        assert_eq!(best_interchange(&g, &m), None);
    }
}
