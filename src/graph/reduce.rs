//! The choice of the next graph step for a term with projection sums:
//! Clebsch–Gordan coefficients to 3j first, then closed pieces recognised
//! whole (theta, tetrahedron = one 6j, K3,3 = one 9j), loops (separation
//! on one line), bubbles and triangles, and otherwise an interchange on a shortest cycle that puts
//! the cycle's two legs on one vertex (shortening it by one, at the cost of
//! one sum over a new angular momentum and a 6j). Each step is a catalog
//! rule applied by the matcher; the driver verifies it.

use super::cycles::shortest_cycle;
use super::plan::{best_interchange, Measure};
use super::Graph;
use crate::algebra::unify::Subst;
use crate::expr::{Expr, Factor, Kind, Lin, Term};
use crate::rules::matcher::Pattern;
use crate::rules::rule;
use std::sync::OnceLock;

/// One graph step: the rule, the term's replacement and the local identity
/// it applies (for verification).
#[derive(Clone, Debug)]
pub struct GraphRewrite {
    /// the rule's name
    pub rule: String,
    /// its source
    pub source: crate::rules::Source,
    /// what replaces the term
    pub replacement: Expr,
    /// the instance of the rule: (left side, right side)
    pub instance: (Expr, Expr),
}

struct Patterns {
    cg: Pattern,
    theta: Pattern,
    self_loop: Pattern,
    bubble: Pattern,
    triangle: Pattern,
    tetrahedron: Pattern,
    nine_j: Pattern,
    interchange: Pattern,
}

fn patterns() -> &'static Patterns {
    static P: OnceLock<Patterns> = OnceLock::new();
    P.get_or_init(|| {
        let p = |n: &str| {
            crate::algebra::declare::suspended(|| Pattern::new(rule(n)))
                .unwrap_or_else(|| panic!("rule {n} is not a pattern"))
        };
        Patterns {
            cg: p("cg-to-3j"),
            theta: p("theta"),
            self_loop: p("separation-one-line"),
            bubble: p("bubble"),
            triangle: p("triangle"),
            tetrahedron: p("tetrahedron"),
            nine_j: p("9j-recognition"),
            interchange: p("interchange"),
        }
    })
}

fn rewrite_with(p: &Pattern, t: &Term, required: &Subst, regge: bool) -> Option<GraphRewrite> {
    rewrite_in(p, t, required, regge, None)
}

fn rewrite_in(
    p: &Pattern,
    t: &Term,
    required: &Subst,
    regge: bool,
    allowed: Option<&[usize]>,
) -> Option<GraphRewrite> {
    let (m, e) = p.apply_first_in(t, required, regge, allowed)?;
    Some(GraphRewrite {
        rule: p.name.clone(),
        source: p.source.clone(),
        replacement: e,
        instance: p.instance(t, &m),
    })
}

/// True when the term sums over a projection.
pub fn has_projection_sum(t: &Term) -> bool {
    let k = t.kinds();
    t.bound().iter().any(|b| k.get(b) == Some(&Kind::Projection))
}

/// Converts the first Clebsch–Gordan coefficient that shares a summed
/// projection into a 3j (cg-to-3j).
fn cg_step(t: &Term, regge: bool) -> Option<GraphRewrite> {
    let k = t.kinds();
    let summed: Vec<_> = t
        .bound()
        .iter()
        .filter(|b| k.get(*b) == Some(&Kind::Projection))
        .collect();
    let idx = t.factors().iter().position(|f| {
        matches!(f, Factor::Cg(_)) && f.m_slots().iter().any(|l| summed.iter().any(|b| l.has(b)))
    })?;
    cg_to_3j_at(t, idx, regge)
}

/// Converts the first Clebsch–Gordan coefficient that holds any summed
/// variable into a 3j (cg-to-3j): the sum identities are stated with 3j.
pub fn cg_in_sum_step(t: &Term) -> Option<GraphRewrite> {
    let idx = t
        .factors()
        .iter()
        .position(|f| matches!(f, Factor::Cg(_)) && t.bound().iter().any(|b| f.has(b)))?;
    cg_to_3j_at(t, idx, false)
}

fn cg_to_3j_at(t: &Term, idx: usize, regge: bool) -> Option<GraphRewrite> {
    // bind the pattern to this CG's arguments exactly
    let Factor::Cg(a) = &t.factors()[idx] else {
        return None;
    };
    let p = &patterns().cg;
    let mut req = Subst::new();
    for (name, l) in ["j1", "m1", "j2", "m2", "J", "M"].iter().zip(a.iter()) {
        req.insert(p.var(name), l.clone());
    }
    rewrite_with(p, t, &req, regge)
}

/// The next graph step for a term, if any.
pub fn next_step(t: &Term, regge: bool) -> Option<GraphRewrite> {
    next_step_skipping(t, regge, &[])
}

/// `next_step` without the steps named in `skip` (for example
/// `9j-recognition`, when a 9j would be written as a sum of 6j anyway).
pub fn next_step_skipping(t: &Term, regge: bool, skip: &[String]) -> Option<GraphRewrite> {
    if !has_projection_sum(t) {
        return None;
    }
    if let Some(r) = cg_step(t, regge) {
        return Some(r);
    }
    let g = Graph::of_term(t);
    if g.lines.is_empty() {
        return None;
    }
    let ps = patterns();
    let none = Subst::new();
    let comps = g.components();
    let factors_of =
        |vs: &[usize]| -> Vec<usize> { vs.iter().map(|&v| g.vertices[v].factor).collect() };
    // closed pieces recognised whole
    for c in &comps {
        if g.legs_of(c) != 0 {
            continue;
        }
        let p = match c.len() {
            2 => &ps.theta,
            4 => &ps.tetrahedron,
            6 => &ps.nine_j,
            _ => continue,
        };
        if skip.contains(&p.name) {
            continue;
        }
        if let Some(r) = rewrite_in(p, t, &none, regge, Some(&factors_of(c))) {
            return Some(r);
        }
    }
    // a line from a vertex to itself: separation on one line (the
    // vertex's third leg must carry j = 0)
    for l in g.lines.iter().filter(|l| l.tail.0 == l.head.0) {
        if let Some(r) = rewrite_in(
            &ps.self_loop,
            t,
            &none,
            regge,
            Some(&factors_of(&[l.tail.0])),
        ) {
            return Some(r);
        }
    }
    let cycles = crate::graph::cycles::cycles_by_line(&g);
    // bubbles, then triangles, on the shortest cycles
    for len in [2usize, 3] {
        for c in cycles.iter().filter(|c| c.len() == len) {
            let p = if len == 2 { &ps.bubble } else { &ps.triangle };
            if let Some(r) = rewrite_in(p, t, &none, regge, Some(&factors_of(&c.vertices))) {
                return Some(r);
            }
        }
    }
    // the interchange that starts a reduction with the fewest sums, when
    // the search finds one within its budget: counted with 9j as sums of
    // 6j, and where 9j symbols may stay, counted with them as no sum (a
    // 9j is kept only where it saves a sum)
    let as_six_j = |nine_j_is_a_sum| Measure {
        nine_j_is_a_sum,
        budget: PLAN_BUDGET,
    };
    // past PLAN_MAX_VERTICES the search would rarely finish within its
    // budget: the shortest-cycle choice below is kept there
    let small =
        g.vertices.len() <= PLAN_MAX_VERTICES && !skip.iter().any(|s| s == INTERCHANGE_SEARCH);
    let six_j_plan = if small {
        best_interchange(&g, &as_six_j(true))
    } else {
        None
    };
    let plan = match six_j_plan {
        Some(a) if !skip.iter().any(|s| s == "9j-recognition") => {
            match best_interchange(&g, &as_six_j(false)) {
                Some(b) if b.sums < a.sums => Some(b),
                _ => Some(a),
            }
        }
        other => other,
    };
    if let Some(c) = plan {
        let ma = &g.vertices[c.keep.0].cols[c.keep.1].1;
        let md = &g.vertices[c.moved.0].cols[c.moved.1].1;
        let r = interchange_at(t, &g, c.line, [c.keep.0, c.moved.0], ma, md, regge);
        if r.is_some() {
            return r;
        }
    }
    let c = shortest_cycle(&g)?;
    if c.len() < 3 {
        return None;
    }
    let n = c.len();
    for i in 0..n {
        let x = c.lines[i];
        let prev = c.lines[(i + n - 1) % n];
        let next = c.lines[(i + 1) % n];
        let a = c.vertices[i];
        let b = c.vertices[(i + 1) % n];
        let ma = &g.vertices[a].cols[g.slot_of(prev, a)].1;
        let md = &g.vertices[b].cols[g.slot_of(next, b)].1;
        if let Some(r) = interchange_at(t, &g, x, [a, b], ma, md, regge) {
            return Some(r);
        }
    }
    None
}

/// Most bare graphs the interchange search visits per step. 30 000 (was
/// 100 000) gives the same sums on every pair of `cargo bench --bench
/// recouple` (4 to 16 leaves) and on the exhaustive comparisons of the
/// tests, at a third of the cost where the search runs out (16 leaves:
/// median 1.7 s against 2.2 s, measured side by side).
const PLAN_BUDGET: usize = 30_000;

/// The name under which `Options::skip_rules` switches the interchange
/// search off (the shortest-cycle choice alone).
pub const INTERCHANGE_SEARCH: &str = "interchange-search";

/// Largest graph (in vertices) the interchange search is run on.
const PLAN_MAX_VERTICES: usize = 16;

/// The interchange on line `x` between vertices `ends`: the leg `ma` of the
/// first stays, the leg `md` of the second moves across.
fn interchange_at(
    t: &Term,
    g: &Graph,
    x: usize,
    ends: [usize; 2],
    ma: &Lin,
    md: &Lin,
    regge: bool,
) -> Option<GraphRewrite> {
    let p = &patterns().interchange;
    let v = Lin::var(g.lines[x].var.clone());
    let allowed: Vec<usize> = ends.iter().map(|&e| g.vertices[e].factor).collect();
    // each of the three may enter the pattern with either sign (the
    // images of a vertex include its sign flip)
    for signs in 0..8u8 {
        let pick = |l: &Lin, bit: u8| if signs >> bit & 1 == 0 { l.clone() } else { -l };
        let mut req = Subst::new();
        req.insert(p.var("ma"), pick(ma, 0));
        req.insert(p.var("md"), pick(md, 1));
        req.insert(p.var("mx"), pick(&v, 2));
        if let Some(r) = rewrite_in(p, t, &req, regge, Some(&allowed)) {
            return Some(r);
        }
    }
    None
}

/// The expression with every Clebsch–Gordan coefficient written as its 3j
/// (cg-to-3j), for drawing.
pub fn with_cg_as_3j(e: &Expr) -> Expr {
    let p = &patterns().cg;
    let mut out = Expr::zero();
    for t in e.terms() {
        let mut cur = Expr::from_term(t.clone());
        loop {
            let mut next = Expr::zero();
            let mut changed = false;
            for u in cur.terms() {
                let idx = u.factors().iter().position(|f| matches!(f, Factor::Cg(_)));
                let Some(idx) = idx else {
                    next.push(u.clone());
                    continue;
                };
                let Factor::Cg(a) = &u.factors()[idx] else {
                    unreachable!()
                };
                let mut req = Subst::new();
                for (name, l) in ["j1", "m1", "j2", "m2", "J", "M"].iter().zip(a.iter()) {
                    req.insert(p.var(name), l.clone());
                }
                match p.apply_first(u, &req, false) {
                    Some((_, r)) => {
                        for x in r.into_terms() {
                            next.push(x);
                        }
                        changed = true;
                    }
                    None => next.push(u.clone()),
                }
            }
            cur = next;
            if !changed {
                break;
            }
        }
        for x in cur.into_terms() {
            out.push(x);
        }
    }
    out
}

/// The expression with every 3j whose projections are all free written as
/// a Clebsch–Gordan coefficient (3j-to-cg), or `None` when there is none.
pub fn with_3j_as_cg(e: &Expr) -> Option<Expr> {
    let p = Pattern::new(rule("3j-to-cg"))?;
    let mut out = Expr::zero();
    let mut changed = false;
    for t in e.terms() {
        let mut cur = t.clone();
        loop {
            let idx = cur.factors().iter().position(|f| {
                matches!(f, Factor::ThreeJ(_))
                    && f.m_slots()
                        .iter()
                        .all(|l| !l.has_any(&cur.bound().iter().cloned().collect()))
            });
            let Some(idx) = idx else { break };
            let Factor::ThreeJ(a) = &cur.factors()[idx] else {
                unreachable!()
            };
            let mut req = Subst::new();
            for (name, l) in ["j1", "j2", "J", "m1", "m2", "M"].iter().zip(a.iter()) {
                req.insert(p.var(name), l.clone());
            }
            match p.apply_first(&cur, &req, false) {
                Some((_, r)) if r.len() == 1 => {
                    cur = r.terms()[0].clone();
                    changed = true;
                }
                _ => break,
            }
        }
        out.push(cur);
    }
    changed.then_some(out)
}
