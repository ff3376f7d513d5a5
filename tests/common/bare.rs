//! An independent search for the fewest sums on bare cubic graphs (no
//! angular momenta, no phases): every order of loops (separation on one
//! line), bubbles, triangles, closed 6j/9j pieces and interchanges, by
//! iterative deepening on the number of interchanges. Shared by the graph and recoupling tests.

/// A cubic multigraph with external legs: `adj[v][s]` is `Some((w, t))`
/// when slot s of v is joined to slot t of w, `None` for an external leg.
/// `(vertex, slot)` at the other end of a line, `None` for an external leg.
type End = Option<(usize, usize)>;

#[derive(Clone, Debug)]
pub struct Bare {
    adj: Vec<Option<[End; 3]>>,
}

impl Bare {
    pub fn from_edges(n: usize, edges: &[(usize, usize)]) -> Bare {
        let mut adj = vec![Some([None; 3]); n];
        let mut fill = vec![0usize; n];
        for &(a, b) in edges {
            let (sa, sb) = (fill[a], fill[b]);
            adj[a].as_mut().unwrap()[sa] = Some((b, sb));
            adj[b].as_mut().unwrap()[sb] = Some((a, sa));
            fill[a] += 1;
            fill[b] += 1;
        }
        Bare { adj }
    }
    fn alive(&self) -> Vec<usize> {
        (0..self.adj.len())
            .filter(|v| self.adj[*v].is_some())
            .collect()
    }
    fn slots(&self, v: usize) -> [Option<(usize, usize)>; 3] {
        self.adj[v].unwrap()
    }
    fn lines(&self) -> Vec<(usize, usize, usize, usize)> {
        let mut out = Vec::new();
        for v in self.alive() {
            for (s, x) in self.slots(v).iter().enumerate() {
                if let Some((w, t)) = x {
                    if (v, s) < (*w, *t) {
                        out.push((v, s, *w, *t));
                    }
                }
            }
        }
        out
    }
    /// Joins two slot ends (either may be external = None).
    fn join(&mut self, a: Option<(usize, usize)>, b: Option<(usize, usize)>) {
        if let Some((v, s)) = a {
            self.adj[v].as_mut().unwrap()[s] = b;
        }
        if let Some((w, t)) = b {
            self.adj[w].as_mut().unwrap()[t] = a;
        }
    }
    /// Free reductions: closed pieces of 2, 4 or 6 vertices, bubbles,
    /// triangles. Returns true when one applied.
    fn free_step(&mut self) -> bool {
        self.free_step_counting(&mut 0, false)
    }
    /// `free_step`, adding 1 to `sums` for a closed K3,3 (a 9j) when
    /// `nine_j_is_a_sum`.
    fn free_step_counting(&mut self, sums: &mut usize, nine_j_is_a_sum: bool) -> bool {
        // a loop at a vertex (separation on one line): the third leg
        // carries j = 0, so its other end joins its two remaining lines
        for v in self.alive() {
            let sl = self.slots(v);
            for s in 0..3 {
                let Some((w, t)) = sl[s] else { continue };
                if w != v {
                    continue;
                }
                let third = 3 - s - t;
                let a = sl[third];
                self.adj[v] = None;
                if let Some((y, u)) = a {
                    let ys = self.slots(y);
                    let others: Vec<usize> = (0..3).filter(|x| *x != u).collect();
                    let (b, c) = (ys[others[0]], ys[others[1]]);
                    self.adj[y] = None;
                    if b != Some((y, others[1])) {
                        self.join(b, c);
                    }
                }
                return true;
            }
        }
        // bubble: v, w joined by two lines
        for v in self.alive() {
            let sl = self.slots(v);
            for i in 0..3 {
                for k in i + 1..3 {
                    if let (Some((w1, _)), Some((w2, _))) = (sl[i], sl[k]) {
                        if w1 == w2 && w1 != v {
                            let w = w1;
                            let third_v = 3 - i - k;
                            let ws = self.slots(w);
                            let third_w =
                                (0..3).find(|s| ws[*s].map(|x| x.0) != Some(v)).unwrap_or(0);
                            let a = sl[third_v];
                            let b = ws[third_w];
                            self.adj[v] = None;
                            self.adj[w] = None;
                            if a.map(|x| x.0) == Some(w) {
                                return true; // theta
                            }
                            self.join(a, b);
                            return true;
                        }
                    }
                }
            }
        }
        // triangle: v-w-x-v
        for v in self.alive() {
            let sl = self.slots(v);
            for i in 0..3 {
                for k in 0..3 {
                    if i == k {
                        continue;
                    }
                    let (Some((w, _)), Some((x, _))) = (sl[i], sl[k]) else {
                        continue;
                    };
                    if w == x || w == v || x == v {
                        continue;
                    }
                    let ws = self.slots(w);
                    if !ws.iter().any(|y| y.map(|y| y.0) == Some(x)) {
                        continue;
                    }
                    // outer ends of the three vertices
                    let outer = |me: usize, a: usize, b: usize, g: &Bare| {
                        g.slots(me)
                            .iter()
                            .find(|y| y.map(|y| y.0) != Some(a) && y.map(|y| y.0) != Some(b))
                            .copied()
                            .flatten()
                    };
                    let ov = outer(v, w, x, self);
                    let ow = outer(w, v, x, self);
                    let ox = outer(x, v, w, self);
                    self.adj[w] = None;
                    self.adj[x] = None;
                    self.adj[v] = Some([ov, ow, ox]);
                    for (s, o) in [ov, ow, ox].iter().enumerate() {
                        if let Some((y, t)) = o {
                            self.adj[*y].as_mut().unwrap()[*t] = Some((v, s));
                        }
                    }
                    return true;
                }
            }
        }
        // closed K4 or K3,3 components (6j, 9j)
        for c in self.components() {
            let closed = c.iter().all(|&v| self.slots(v).iter().all(|x| x.is_some()));
            if closed && (c.len() == 4 || c.len() == 6) {
                let bip = c.len() == 6 && self.girth_of(&c) == 4;
                if c.len() == 4 || bip {
                    for v in c {
                        self.adj[v] = None;
                    }
                    if bip && nine_j_is_a_sum {
                        *sums += 1;
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
        for s in self.alive() {
            if seen[s] {
                continue;
            }
            let mut st = vec![s];
            seen[s] = true;
            let mut c = Vec::new();
            while let Some(v) = st.pop() {
                c.push(v);
                for x in self.slots(v).iter().flatten() {
                    if !seen[x.0] {
                        seen[x.0] = true;
                        st.push(x.0);
                    }
                }
            }
            out.push(c);
        }
        out
    }
    fn girth_of(&self, c: &[usize]) -> usize {
        let mut best = usize::MAX;
        for &s in c {
            let mut dist = vec![usize::MAX; self.adj.len()];
            let mut par = vec![usize::MAX; self.adj.len()];
            dist[s] = 0;
            let mut q = std::collections::VecDeque::from([s]);
            while let Some(v) = q.pop_front() {
                for x in self.slots(v).iter().flatten() {
                    let w = x.0;
                    if dist[w] == usize::MAX {
                        dist[w] = dist[v] + 1;
                        par[w] = v;
                        q.push_back(w);
                    } else if par[v] != w {
                        best = best.min(dist[v] + dist[w] + 1);
                    }
                }
            }
        }
        best
    }
    fn reduce_free(&mut self) {
        while self.free_step() {}
    }
    fn done(&self) -> bool {
        self.lines().is_empty()
    }
    /// The two recouplings of the line (v,s)-(w,t): swap one other leg of v
    /// with one other leg of w (two distinct results).
    fn interchanges(&self) -> Vec<Bare> {
        let mut out = Vec::new();
        for (v, s, w, t) in self.lines() {
            if v == w {
                continue;
            }
            let sv: Vec<usize> = (0..3).filter(|x| *x != s).collect();
            let sw: Vec<usize> = (0..3).filter(|x| *x != t).collect();
            for &kw in &sw {
                let kv = sv[1];
                let mut g = self.clone();
                let a = g.slots(v)[kv];
                let b = g.slots(w)[kw];
                if a.map(|x| x.0) == Some(w) || b.map(|x| x.0) == Some(v) {
                    continue;
                }
                g.adj[v].as_mut().unwrap()[kv] = b;
                if let Some((y, u)) = b {
                    g.adj[y].as_mut().unwrap()[u] = Some((v, kv));
                }
                g.adj[w].as_mut().unwrap()[kw] = a;
                if let Some((y, u)) = a {
                    g.adj[y].as_mut().unwrap()[u] = Some((w, kw));
                }
                out.push(g);
            }
        }
        out
    }
}

/// The fewest sums over every order when every 9j is written as a sum
/// over three 6j (a closed K3,3 counts one sum), by iterative deepening.
pub fn fewest_six_j_sums(g: &Bare, limit: usize) -> Option<usize> {
    fn can(g: &Bare, k: usize) -> bool {
        let mut g = g.clone();
        let mut spent = 0;
        while g.free_step_counting(&mut spent, true) {}
        if spent > k {
            return false;
        }
        if g.done() {
            return true;
        }
        if k == spent {
            return false;
        }
        g.interchanges().iter().any(|h| can(h, k - spent - 1))
    }
    (0..=limit).find(|&k| can(g, k))
}

/// The fewest interchanges over every order (iterative deepening).
pub fn fewest_sums(g: &Bare, limit: usize) -> Option<usize> {
    fn can(g: &Bare, k: usize) -> bool {
        let mut g = g.clone();
        g.reduce_free();
        if g.done() {
            return true;
        }
        if k == 0 {
            return false;
        }
        g.interchanges().iter().any(|h| can(h, k - 1))
    }
    (0..=limit).find(|&k| can(g, k))
}

impl Bare {
    /// A bare graph from vertices' slots: `slots[v][s]` is the line id at
    /// that slot or `None` for an external leg; each line id appears twice.
    pub fn from_slots(slots: &[[Option<usize>; 3]]) -> Bare {
        let mut ends: std::collections::BTreeMap<usize, Vec<(usize, usize)>> = Default::default();
        for (v, sl) in slots.iter().enumerate() {
            for (s, l) in sl.iter().enumerate() {
                if let Some(l) = l {
                    ends.entry(*l).or_default().push((v, s));
                }
            }
        }
        let mut adj = vec![Some([None; 3]); slots.len()];
        for (_, e) in ends {
            if e.len() == 2 {
                let (a, b) = (e[0], e[1]);
                adj[a.0].as_mut().unwrap()[a.1] = Some(b);
                adj[b.0].as_mut().unwrap()[b.1] = Some(a);
            }
        }
        Bare { adj }
    }
}
