//! The independent evaluation of a matrix element at a point, from the
//! definitions alone: bra and ket are expanded into product states of
//! their subsystems with exact Clebsch–Gordan coefficients, each elementary
//! operator is applied on its own subsystem (the angular momentum by its
//! ladder action, the others by the Wigner–Eckart theorem on that
//! subsystem), coupled and scalar products are formed component by
//! component, and the overlap is summed. A reduced matrix element is the
//! Wigner–Eckart sum over all projections. Nothing here uses the symbolic
//! reduction, so it checks it.

use super::opaque;
use crate::expr::element::{subtree, tree_lins, NodePath};
use crate::expr::term::doubled;
use crate::expr::{CouplingTree, Lin, MatrixElement, Operator, OperatorName};
use crate::numeric::exact::{clebsch_gordan, three_j};
use crate::numeric::selection::triangle2;
use crate::numeric::Surd;
use num_bigint::BigInt;
use num_rational::BigRational;
use std::collections::HashMap;

/// Largest doubled angular momentum of a subsystem the direct evaluation
/// expands (its cost grows as a power of the dimension).
pub const MAX_DOUBLED_J: i64 = 40;

/// Most product states a state vector may hold.
const MAX_STATES: usize = 200_000;

/// A vector in the product basis: per subsystem its labels then `2m`.
type Vector = HashMap<Vec<i64>, Surd>;

/// Why a matrix element has no direct value here.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum DirectError {
    /// An argument that is not a number (the caller substitutes first).
    #[error("the matrix element still holds the unknown {0}")]
    NotNumeric(String),
    /// A form this evaluation does not cover.
    #[error("{0}")]
    Unsupported(String),
    /// Beyond the size this evaluation expands.
    #[error("the matrix element is too large to expand into product states ({0})")]
    TooLarge(String),
}

fn value2(l: &Lin) -> Result<i64, DirectError> {
    if !l.is_constant() {
        return Err(DirectError::NotNumeric(l.to_string()));
    }
    doubled(l.constant_part()).ok_or_else(|| DirectError::NotNumeric(l.to_string()))
}

/// The subsystems the product basis is built of: the leaves, except an
/// inner node that an operator other than `J[1]` acts on, which is one
/// subsystem with its labels.
struct Layout {
    units: Vec<NodePath>,
}

impl Layout {
    fn new(tree: &CouplingTree, op: &Operator) -> Result<Layout, DirectError> {
        let mut composite: Vec<NodePath> = Vec::new();
        for e in op.elementaries() {
            if let Operator::Elementary { name, node, .. } = e {
                let leaf = matches!(subtree(tree, node), Some(CouplingTree::Leaf(_)));
                if *name != OperatorName::AngularMomentum && !leaf && !composite.contains(node) {
                    composite.push(node.clone());
                }
            }
        }
        for e in op.elementaries() {
            if let Operator::Elementary { node, .. } = e {
                for c in &composite {
                    if node.len() > c.len() && node.starts_with(c) {
                        return Err(DirectError::Unsupported(
                            "an operator acts inside a subsystem that another operator (not J[1]) changes as a whole; write them on separate subsystems".into(),
                        ));
                    }
                    if c.len() > node.len() && c.starts_with(node) && !is_j(e) {
                        return Err(DirectError::Unsupported(
                            "two operators other than J[1] act on nested subsystems".into(),
                        ));
                    }
                }
            }
        }
        let mut units = Vec::new();
        collect_units(tree, &mut Vec::new(), &composite, &mut units);
        Ok(Layout { units })
    }

    fn unit_of(&self, path: &[bool]) -> Option<usize> {
        self.units.iter().position(|u| u.as_slice() == path)
    }

    fn units_under(&self, path: &[bool]) -> Vec<usize> {
        (0..self.units.len())
            .filter(|&i| self.units[i].starts_with(path))
            .collect()
    }
}

fn is_j(e: &Operator) -> bool {
    matches!(
        e,
        Operator::Elementary {
            name: OperatorName::AngularMomentum,
            ..
        }
    )
}

fn collect_units(
    t: &CouplingTree,
    at: &mut NodePath,
    composite: &[NodePath],
    out: &mut Vec<NodePath>,
) {
    match t {
        CouplingTree::Node(a, b, _) if !composite.contains(at) => {
            at.push(false);
            collect_units(a, at, composite, out);
            at.pop();
            at.push(true);
            collect_units(b, at, composite, out);
            at.pop();
        }
        _ => out.push(at.clone()),
    }
}

/// Doubled labels of a subtree in pre-order.
fn labels2(t: &CouplingTree) -> Result<Vec<i64>, DirectError> {
    let mut ls = Vec::new();
    tree_lins(t, &mut ls);
    ls.into_iter().map(value2).collect()
}

/// Every coupling of the tree satisfies the triangle rule.
fn tree_ok(t: &CouplingTree) -> Result<bool, DirectError> {
    Ok(match t {
        CouplingTree::Leaf(l) => value2(l)? >= 0,
        CouplingTree::Node(a, b, l) => {
            triangle2(value2(a.label())?, value2(b.label())?, value2(l)?)
                && tree_ok(a)?
                && tree_ok(b)?
        }
    })
}

/// The coupled state `|tree, m>` in the product basis of the layout.
fn expand(
    t: &CouplingTree,
    at: &mut NodePath,
    m2: i64,
    layout: &Layout,
) -> Result<Vec<(Vec<i64>, Surd)>, DirectError> {
    if layout.unit_of(at).is_some() {
        let mut key = labels2(t)?;
        key.push(m2);
        return Ok(vec![(key, Surd::one())]);
    }
    let CouplingTree::Node(a, b, l) = t else {
        unreachable!("a leaf is always a unit");
    };
    let (ja, jb, jc) = (value2(a.label())?, value2(b.label())?, value2(l)?);
    let mut out = Vec::new();
    let mut ma = -ja;
    while ma <= ja {
        let mb = m2 - ma;
        if mb.abs() <= jb {
            let cg = clebsch_gordan(ja, ma, jb, mb, jc, m2);
            if !cg.is_zero() {
                at.push(false);
                let left = expand(a, at, ma, layout)?;
                at.pop();
                at.push(true);
                let right = expand(b, at, mb, layout)?;
                at.pop();
                for (kl, vl) in &left {
                    for (kr, vr) in &right {
                        let mut k = kl.clone();
                        k.extend(kr);
                        out.push((k, &(&cg * vl) * vr));
                    }
                }
            }
        }
        ma += 2;
    }
    if out.len() > MAX_STATES {
        return Err(DirectError::TooLarge(format!(
            "{} product states",
            out.len()
        )));
    }
    Ok(out)
}

/// Offsets of each unit's entries in a key.
fn offsets(key_template: &CouplingTree, layout: &Layout) -> Result<Vec<usize>, DirectError> {
    let mut out = Vec::new();
    let mut at = 0;
    for u in &layout.units {
        out.push(at);
        let t = subtree(key_template, u).expect("units are nodes of the tree");
        at += labels2(t)?.len() + 1;
    }
    Ok(out)
}

fn sqrt_q(n: i64, d: i64) -> Surd {
    Surd::signed_sqrt(false, &BigRational::new(BigInt::from(n), BigInt::from(d)))
        .expect("a nonnegative rational has an exact root")
}

fn sign(odd: bool) -> Surd {
    Surd::from_int(if odd { -1 } else { 1 })
}

/// What the evaluation needs besides the operator: the trees, offsets.
struct Frame<'a> {
    bra: &'a CouplingTree,
    layout: Layout,
    offsets: Vec<usize>,
}

impl Frame<'_> {
    /// Applies an operator (component `q2` when the caller selects one).
    fn apply(&self, op: &Operator, q2: Option<i64>, v: &Vector) -> Result<Vector, DirectError> {
        // exact arithmetic on long vectors makes single calls slow: look at
        // the clock every time
        crate::limits::check_now();
        match op {
            Operator::Elementary {
                name,
                rank,
                component,
                node,
            } => {
                let q2 = selected_component(q2, component)?;
                let k2 = value2(rank)?;
                if q2.abs() > k2 || (k2 - q2) % 2 != 0 {
                    return Ok(Vector::new());
                }
                if *name == OperatorName::AngularMomentum {
                    if k2 != 2 {
                        return Ok(Vector::new());
                    }
                    let mut out = Vector::new();
                    for u in self.layout.units_under(node) {
                        add_into(&mut out, &self.ladder(u, q2, v));
                    }
                    return Ok(out);
                }
                let u = self
                    .layout
                    .unit_of(node)
                    .expect("an operator other than J[1] acts on a unit");
                self.tensor(name, k2, q2, u, v)
            }
            Operator::Coupled {
                left,
                right,
                rank,
                component,
            } => {
                let q2 = selected_component(q2, component)?;
                let k2 = value2(rank)?;
                let (k1, kk2) = (rank_of(left)?, rank_of(right)?);
                let mut out = Vector::new();
                let mut q1 = -k1;
                while q1 <= k1 {
                    let qq2 = q2 - q1;
                    if qq2.abs() <= kk2 {
                        let cg = clebsch_gordan(k1, q1, kk2, qq2, k2, q2);
                        if !cg.is_zero() {
                            let inner = self.apply(right, Some(qq2), v)?;
                            let outer = self.apply(left, Some(q1), &inner)?;
                            add_scaled(&mut out, &outer, &cg);
                        }
                    }
                    q1 += 2;
                }
                Ok(out)
            }
            Operator::Scalar(a, b) => {
                if q2.is_some_and(|q| q != 0) {
                    return Ok(Vector::new());
                }
                let (ka, kb) = (rank_of(a)?, rank_of(b)?);
                if ka % 2 != 0 || kb % 2 != 0 {
                    return Err(DirectError::Unsupported(
                        "a scalar product of half-odd rank".into(),
                    ));
                }
                let k = ka.min(kb);
                let mut out = Vector::new();
                let mut q = -k;
                while q <= k {
                    let inner = self.apply(b, Some(-q), v)?;
                    let outer = self.apply(a, Some(q), &inner)?;
                    add_scaled(&mut out, &outer, &sign((q / 2).rem_euclid(2) == 1));
                    q += 2;
                }
                Ok(out)
            }
            Operator::Sum(terms) => {
                let mut out = Vector::new();
                for (c, o) in terms {
                    let w = Surd::from_rational(crate::expr::term::big_q(*c));
                    add_scaled(&mut out, &self.apply(o, q2, v)?, &w);
                }
                Ok(out)
            }
        }
    }

    /// The spherical component `q` of the angular momentum of unit `u`:
    /// `J0 = Jz`, `J+1 = -J+/sqrt(2)`, `J-1 = J-/sqrt(2)` with
    /// `J± |j m> = sqrt((j ∓ m)(j ± m + 1)) |j m±1>` (Condon–Shortley;
    /// Edmonds 1957, eqs. 2.3.1 and 5.1.2, from memory).
    fn ladder(&self, u: usize, q2: i64, v: &Vector) -> Vector {
        let mut out = Vector::new();
        let off = self.offsets[u];
        let len = self.unit_len(u);
        for (key, c) in v {
            let j2 = key[off];
            let m2 = key[off + len - 1];
            let (factor, new_m2) = match q2 {
                0 => (
                    Surd::from_rational(BigRational::new(BigInt::from(m2), BigInt::from(2))),
                    m2,
                ),
                2 => {
                    // -(1/sqrt 2) sqrt((j-m)(j+m+1))
                    let n = (j2 - m2) * (j2 + m2 + 2);
                    (-sqrt_q(n, 8), m2 + 2)
                }
                _ => {
                    let n = (j2 + m2) * (j2 - m2 + 2);
                    (sqrt_q(n, 8), m2 - 2)
                }
            };
            if factor.is_zero() || new_m2.abs() > j2 {
                continue;
            }
            let mut k = key.clone();
            k[off + len - 1] = new_m2;
            let add = c * &factor;
            let e = out.entry(k).or_insert_with(Surd::zero);
            *e = &*e + &add;
        }
        out.retain(|_, c| !c.is_zero());
        out
    }

    fn unit_len(&self, u: usize) -> usize {
        let next = self.offsets.get(u + 1).copied();
        match next {
            Some(n) => n - self.offsets[u],
            None => {
                let t = subtree(self.bra, &self.layout.units[u]).unwrap();
                let mut ls = Vec::new();
                tree_lins(t, &mut ls);
                ls.len() + 1
            }
        }
    }

    /// A tensor operator other than `J[1]` on unit `u` by the
    /// Wigner–Eckart theorem on that subsystem.
    fn tensor(
        &self,
        name: &OperatorName,
        k2: i64,
        q2: i64,
        u: usize,
        v: &Vector,
    ) -> Result<Vector, DirectError> {
        let off = self.offsets[u];
        let len = self.unit_len(u);
        let bra_unit = subtree(self.bra, &self.layout.units[u]).unwrap();
        let bra_labels = labels2(bra_unit)?;
        let mut out = Vector::new();
        for (key, c) in v {
            crate::limits::tick();
            let ket_labels = &key[off..off + len - 1];
            // the first label in pre-order is the unit's own j
            let (j2, m2) = (ket_labels[0], key[off + len - 1]);
            let new_m2 = m2 + q2;
            // images: any j'' in the triangle for a leaf; for a composite
            // unit, the bra's labels (the only ones the overlap keeps)
            let images: Vec<Vec<i64>> = if len == 2 {
                let mut v = Vec::new();
                let mut x = (j2 - k2).abs();
                while x <= j2 + k2 {
                    v.push(vec![x]);
                    x += 2;
                }
                v
            } else {
                vec![bra_labels.clone()]
            };
            for image in images {
                let x2 = image[0];
                if new_m2.abs() > x2 {
                    continue;
                }
                let rme = reduced_value(name, k2, &image, ket_labels)?;
                if rme.is_zero() {
                    continue;
                }
                let tj = three_j([x2, k2, j2], [-new_m2, q2, m2]);
                if tj.is_zero() {
                    continue;
                }
                let phase = sign(((x2 - new_m2) / 2).rem_euclid(2) == 1);
                let mut k = key.clone();
                k.splice(off..off + len - 1, image.iter().copied());
                k[off + len - 1] = new_m2;
                let add = &(&(c * &tj) * &rme) * &phase;
                let e = out.entry(k).or_insert_with(Surd::zero);
                *e = &*e + &add;
            }
        }
        out.retain(|_, c| !c.is_zero());
        if out.len() > MAX_STATES {
            return Err(DirectError::TooLarge(format!(
                "{} product states",
                out.len()
            )));
        }
        Ok(out)
    }
}

/// The single-subsystem reduced matrix element `<bra || T[k] || ket>` of a
/// built-in or opaque operator, labels doubled in pre-order.
pub fn reduced_value(
    name: &OperatorName,
    k2: i64,
    bra: &[i64],
    ket: &[i64],
) -> Result<Surd, DirectError> {
    let (j2, jk2) = (bra[0], ket[0]);
    if !triangle2(j2, k2, jk2) {
        return Ok(Surd::zero());
    }
    Ok(match name {
        OperatorName::AngularMomentum => {
            // <j || J[1] || j'> = delta(j, j') sqrt(j (j+1) (2j+1))
            if bra != ket || k2 != 2 {
                Surd::zero()
            } else {
                sqrt_q(j2 * (j2 + 2) * (j2 + 1), 4)
            }
        }
        OperatorName::Spherical => {
            // <l || C[k] || l'> = (-1)^l hat(l) hat(l') (l, k, l'; 0, 0, 0)
            if bra.len() != 1 || j2 % 2 != 0 || jk2 % 2 != 0 {
                Surd::zero()
            } else {
                let tj = three_j([j2, k2, jk2], [0, 0, 0]);
                let hats = sqrt_q((j2 + 1) * (jk2 + 1), 1);
                &(&tj * &hats) * &sign((j2 / 2) % 2 == 1)
            }
        }
        OperatorName::Unit => {
            if bra == ket {
                Surd::one()
            } else {
                Surd::zero()
            }
        }
        OperatorName::Opaque(n) => opaque::value(n, k2, bra, ket),
    })
}

/// The component an operator is applied with: the one its product
/// selects, else the one written on it (doubled).
fn selected_component(q2: Option<i64>, written: &Option<Lin>) -> Result<i64, DirectError> {
    match (q2, written) {
        (Some(q), _) => Ok(q),
        (None, Some(c)) => value2(c),
        (None, None) => Err(DirectError::Unsupported(
            "an operator without a component in a full matrix element".into(),
        )),
    }
}

fn rank_of(op: &Operator) -> Result<i64, DirectError> {
    match op.rank() {
        Some(k) => value2(&k),
        None => Err(DirectError::Unsupported(
            "a sum of operators of different ranks inside a product".into(),
        )),
    }
}

fn add_into(out: &mut Vector, v: &Vector) {
    add_scaled(out, v, &Surd::one());
}

fn add_scaled(out: &mut Vector, v: &Vector, w: &Surd) {
    for (k, c) in v {
        let add = c * w;
        let e = out.entry(k.clone()).or_insert_with(Surd::zero);
        *e = &*e + &add;
    }
    out.retain(|_, c| !c.is_zero());
}

/// The value of a matrix element whose every argument is a number.
pub fn value(e: &MatrixElement) -> Result<Surd, DirectError> {
    if e.is_irreducible() {
        let Operator::Elementary { name, rank, .. } = &e.op else {
            unreachable!()
        };
        if !tree_ok(&e.bra.tree)? || !tree_ok(&e.ket.tree)? {
            return Ok(Surd::zero());
        }
        return reduced_value(
            name,
            value2(rank)?,
            &labels2(&e.bra.tree)?,
            &labels2(&e.ket.tree)?,
        );
    }
    if let Some(problem) = super::expand::size_problem(e) {
        return Err(DirectError::TooLarge(problem));
    }
    let all = e.lins();
    for l in &all {
        let d = value2(l)?;
        if d.abs() > MAX_DOUBLED_J * 4 {
            return Err(DirectError::TooLarge(format!("an argument {l}")));
        }
    }
    let mut labels = Vec::new();
    tree_lins(&e.bra.tree, &mut labels);
    tree_lins(&e.ket.tree, &mut labels);
    for l in labels {
        if value2(l)? > MAX_DOUBLED_J {
            return Err(DirectError::TooLarge(format!(
                "an angular momentum {l} above {}",
                MAX_DOUBLED_J / 2
            )));
        }
    }
    if !tree_ok(&e.bra.tree)? || !tree_ok(&e.ket.tree)? {
        return Ok(Surd::zero());
    }
    let layout = Layout::new(&e.bra.tree, &e.op)?;
    for el in e.op.elementaries() {
        if let Operator::Elementary {
            name: OperatorName::Spherical,
            node,
            ..
        } = el
        {
            if layout.unit_of(node).is_some()
                && !matches!(subtree(&e.bra.tree, node), Some(CouplingTree::Leaf(_)))
            {
                return Err(DirectError::Unsupported(
                    "C[k] acts on a single orbital angular momentum (a leaf of the tree)".into(),
                ));
            }
        }
    }
    let offsets = offsets(&e.bra.tree, &layout)?;
    let frame = Frame {
        bra: &e.bra.tree,
        layout,
        offsets,
    };
    let (jb, jk) = (value2(e.bra.tree.label())?, value2(e.ket.tree.label())?);
    match (&e.bra.projection, &e.ket.projection) {
        (Some(m), Some(mk)) => {
            let (m2, mk2) = (value2(m)?, value2(mk)?);
            if m2.abs() > jb || mk2.abs() > jk || (jb - m2) % 2 != 0 || (jk - mk2) % 2 != 0 {
                return Ok(Surd::zero());
            }
            full(&frame, e, &e.op, m2, mk2)
        }
        _ => {
            // <J || O || J'> = sum over M, q, M' of
            // (-1)^(J-M) (J, k, J'; -M, q, M') <J M | O_q | J' M'>
            // (Edmonds 1957, eq. 5.4.1, summed with 3j orthogonality 3.7.8)
            let k2 = rank_of(&e.op).map_err(|_| {
                DirectError::Unsupported(
                    "a reduced matrix element needs an operator of one rank".into(),
                )
            })?;
            if !triangle2(jb, k2, jk) {
                return Ok(Surd::zero());
            }
            let mut total = Surd::zero();
            let mut m2 = -jb;
            while m2 <= jb {
                let mut mk2 = -jk;
                while mk2 <= jk {
                    let q2 = m2 - mk2;
                    if q2.abs() <= k2 {
                        let tj = three_j([jb, k2, jk], [-m2, q2, mk2]);
                        if !tj.is_zero() {
                            let op = with_component2(&e.op, q2);
                            let v = full(&frame, e, &op, m2, mk2)?;
                            let phase = sign(((jb - m2) / 2).rem_euclid(2) == 1);
                            total = &total + &(&(&tj * &v) * &phase);
                        }
                    }
                    mk2 += 2;
                }
                m2 += 2;
            }
            Ok(total)
        }
    }
}

fn with_component2(op: &Operator, q2: i64) -> Operator {
    op.with_component(Some(Lin::constant(crate::expr::Q::new(q2, 2))))
}

fn full(
    frame: &Frame,
    e: &MatrixElement,
    op: &Operator,
    m2: i64,
    mk2: i64,
) -> Result<Surd, DirectError> {
    let ket: Vector = merge(expand(&e.ket.tree, &mut Vec::new(), mk2, &frame.layout)?);
    let bra = merge(expand(&e.bra.tree, &mut Vec::new(), m2, &frame.layout)?);
    let image = frame.apply(op, None, &ket)?;
    let mut total = Surd::zero();
    for (k, c) in &bra {
        if let Some(d) = image.get(k) {
            total = &total + &(c * d);
        }
    }
    Ok(total)
}

fn merge(v: Vec<(Vec<i64>, Surd)>) -> Vector {
    let mut out = Vector::new();
    for (k, c) in v {
        let e = out.entry(k).or_insert_with(Surd::zero);
        *e = &*e + &c;
    }
    out.retain(|_, c| !c.is_zero());
    out
}
