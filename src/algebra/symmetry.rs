//! Symmetries of the symbols and their canonical forms. 3j: 12 classical
//! (column permutations, sign of all projections; odd ones cost
//! `(-1)^(j1+j2+j3)`) and Regge's 72; CG: 4 (swap of the coupled pair and
//! sign of all projections, each costing `(-1)^(j1+j2-J)`); 6j: 24 (column
//! permutations, swap of upper and lower entries in two columns) and
//! Regge's 144; 9j: 72 (row and column permutations, transposition; odd
//! ones cost `(-1)^(sum of all nine)`). The canonical form is the orbit
//! member with the least key; the phase it costs is returned with it.

use crate::expr::{Factor, Lin, Q};
use std::cmp::Ordering;
use std::collections::HashMap;

/// A factor together with the phase exponent it costs to reach it.
#[derive(Clone, Debug)]
pub struct Image {
    /// the transformed symbol
    pub factor: Factor,
    /// `(-1)^phase` times the image equals the original
    pub phase: Lin,
}

const PERMS3: [[usize; 3]; 6] = [
    [0, 1, 2],
    [1, 2, 0],
    [2, 0, 1],
    [1, 0, 2],
    [0, 2, 1],
    [2, 1, 0],
];

fn odd3(i: usize) -> bool {
    i >= 3
}

fn sum(ls: &[&Lin]) -> Lin {
    let mut s = Lin::zero();
    for l in ls {
        s = &s + l;
    }
    s
}

/// Every image of a symbol under its classical group (3j: 12, CG: 4, 6j:
/// 24, 9j: 72); other factors map to themselves.
pub fn classical_images(f: &Factor) -> Vec<Image> {
    match f {
        Factor::ThreeJ(a) => {
            let jsum = sum(&[&a[0], &a[1], &a[2]]);
            let mut out = Vec::with_capacity(12);
            for (pi, p) in PERMS3.iter().enumerate() {
                for flip in [false, true] {
                    let m = |k: usize| {
                        if flip {
                            -&a[3 + p[k]]
                        } else {
                            a[3 + p[k]].clone()
                        }
                    };
                    let args = [
                        a[p[0]].clone(),
                        a[p[1]].clone(),
                        a[p[2]].clone(),
                        m(0),
                        m(1),
                        m(2),
                    ];
                    let phase = if odd3(pi) != flip {
                        jsum.clone()
                    } else {
                        Lin::zero()
                    };
                    out.push(Image {
                        factor: Factor::ThreeJ(args),
                        phase,
                    });
                }
            }
            out
        }
        Factor::Cg(a) => {
            // <j1 m1; j2 m2 | J M>: swap costs (-1)^(j1+j2-J), so does flipping
            let cost = &(&a[0] + &a[2]) - &a[4];
            let mut out = Vec::with_capacity(4);
            for swap in [false, true] {
                for flip in [false, true] {
                    let (j1, m1, j2, m2) = if swap {
                        (&a[2], &a[3], &a[0], &a[1])
                    } else {
                        (&a[0], &a[1], &a[2], &a[3])
                    };
                    let neg = |l: &Lin| if flip { -l } else { l.clone() };
                    let args = [
                        j1.clone(),
                        neg(m1),
                        j2.clone(),
                        neg(m2),
                        a[4].clone(),
                        neg(&a[5]),
                    ];
                    let phase = if swap != flip {
                        cost.clone()
                    } else {
                        Lin::zero()
                    };
                    out.push(Image {
                        factor: Factor::Cg(args),
                        phase,
                    });
                }
            }
            out
        }
        Factor::SixJ(a) => {
            let mut out = Vec::with_capacity(24);
            for p in PERMS3.iter() {
                // columns (upper, lower)
                let cols: Vec<(Lin, Lin)> = p
                    .iter()
                    .map(|&k| (a[k].clone(), a[3 + k].clone()))
                    .collect();
                for swap in [
                    [false, false, false],
                    [true, true, false],
                    [true, false, true],
                    [false, true, true],
                ] {
                    let mut args: Vec<Lin> = vec![Lin::zero(); 6];
                    for k in 0..3 {
                        let (u, l) = &cols[k];
                        if swap[k] {
                            args[k] = l.clone();
                            args[3 + k] = u.clone();
                        } else {
                            args[k] = u.clone();
                            args[3 + k] = l.clone();
                        }
                    }
                    out.push(Image {
                        factor: Factor::SixJ(args.try_into().unwrap()),
                        phase: Lin::zero(),
                    });
                }
            }
            out
        }
        Factor::NineJ(a) => {
            let s = sum(&a.iter().collect::<Vec<_>>());
            let square: [[Lin; 3]; 3] =
                std::array::from_fn(|r| std::array::from_fn(|c| a[3 * r + c].clone()));
            square_images(&square)
                .into_iter()
                .map(|(sq, odd)| Image {
                    factor: Factor::NineJ(std::array::from_fn(|k| sq[k / 3][k % 3].clone())),
                    phase: if odd { s.clone() } else { Lin::zero() },
                })
                .collect()
        }
        other => vec![Image {
            factor: other.clone(),
            phase: Lin::zero(),
        }],
    }
}

/// The 72 images of a 3x3 square under row permutations, column
/// permutations and transposition, each with whether its row and column
/// permutations differ in parity (the odd images of a 9j or a Regge
/// square, which cost a phase).
fn square_images(sq: &[[Lin; 3]; 3]) -> Vec<([[Lin; 3]; 3], bool)> {
    let mut out = Vec::with_capacity(72);
    for (ri, r) in PERMS3.iter().enumerate() {
        for (ci, c) in PERMS3.iter().enumerate() {
            for transpose in [false, true] {
                let image = std::array::from_fn(|i| {
                    std::array::from_fn(|k| {
                        let (row, col) = if transpose {
                            (c[k], r[i])
                        } else {
                            (r[i], c[k])
                        };
                        sq[row][col].clone()
                    })
                });
                out.push((image, odd3(ri) != odd3(ci)));
            }
        }
    }
    out
}

/// The Regge square of a 3j: rows `(-j1+j2+j3, j1-j2+j3, j1+j2-j3)`,
/// `(j_i - m_i)`, `(j_i + m_i)`.
fn regge_square(a: &[Lin; 6]) -> [[Lin; 3]; 3] {
    let j = |i: usize| &a[i];
    let m = |i: usize| &a[3 + i];
    let t = [
        &(&-j(0) + j(1)) + j(2),
        &(j(0) - j(1)) + j(2),
        &(j(0) + j(1)) - j(2),
    ];
    [
        t,
        [j(0) - m(0), j(1) - m(1), j(2) - m(2)],
        [j(0) + m(0), j(1) + m(1), j(2) + m(2)],
    ]
}

fn from_square(s: &[[Lin; 3]; 3]) -> [Lin; 6] {
    let half = Q::new(1, 2);
    let j = |k: usize| (&s[1][k] + &s[2][k]).scale(half);
    let m = |k: usize| (&s[2][k] - &s[1][k]).scale(half);
    [j(0), j(1), j(2), m(0), m(1), m(2)]
}

/// Every image of a 3j under Regge's 72 symmetries (row and column
/// permutations of the Regge square, odd ones costing `(-1)^(j1+j2+j3)`,
/// and its transposition), or of a 6j under Regge's 144 (the classical 24
/// composed with `{a b c; d e f} = {a, s-e, s-f; d, s-b, s-c}`,
/// `s = (b+c+e+f)/2`, Regge 1959, from memory). Others: classical images.
pub fn regge_images(f: &Factor) -> Vec<Image> {
    match f {
        Factor::ThreeJ(a) => {
            let jsum = sum(&[&a[0], &a[1], &a[2]]);
            square_images(&regge_square(a))
                .into_iter()
                .map(|(sq, odd)| Image {
                    factor: Factor::ThreeJ(from_square(&sq)),
                    phase: if odd { jsum.clone() } else { Lin::zero() },
                })
                .collect()
        }
        Factor::SixJ(_) => {
            let mut seen: HashMap<Factor, ()> = HashMap::new();
            let mut out = Vec::new();
            let mut frontier = vec![f.clone()];
            while let Some(x) = frontier.pop() {
                for img in classical_images(&x) {
                    if seen.contains_key(&img.factor) {
                        continue;
                    }
                    seen.insert(img.factor.clone(), ());
                    let r = regge_six_j(&img.factor);
                    if !seen.contains_key(&r) {
                        frontier.push(r);
                    }
                    out.push(img);
                }
            }
            out
        }
        other => classical_images(other),
    }
}

/// Regge's generator for the 6j.
pub fn regge_six_j(f: &Factor) -> Factor {
    let Factor::SixJ(a) = f else {
        return f.clone();
    };
    let s = (&(&a[1] + &a[2]) + &(&a[4] + &a[5])).scale(Q::new(1, 2));
    Factor::SixJ([
        a[0].clone(),
        &s - &a[4],
        &s - &a[5],
        a[3].clone(),
        &s - &a[1],
        &s - &a[2],
    ])
}

/// Ordering key of a linear form in canonical symbols: variables before
/// numbers, names in natural order, positive coefficients first.
fn lin_cmp(x: &Lin, y: &Lin) -> Ordering {
    let xc = x.is_constant();
    let yc = y.is_constant();
    xc.cmp(&yc).then_with(|| {
        let xs: Vec<_> = x.terms().map(|(n, c)| (n.clone(), -*c)).collect();
        let ys: Vec<_> = y.terms().map(|(n, c)| (n.clone(), -*c)).collect();
        xs.cmp(&ys)
            .then_with(|| (-x.constant_part()).cmp(&-y.constant_part()))
    })
}

/// Total order on factors of one kind used to pick the canonical image.
pub fn factor_cmp(a: &Factor, b: &Factor) -> Ordering {
    let la = a.lins();
    let lb = b.lins();
    for (x, y) in la.iter().zip(&lb) {
        let o = lin_cmp(x, y);
        if o != Ordering::Equal {
            return o;
        }
    }
    la.len().cmp(&lb.len())
}

/// The canonical image of a factor (least key over its classical group,
/// or over Regge's group when `regge` is set).
pub fn canonical(f: &Factor, regge: bool) -> Image {
    let imgs = if regge {
        regge_images(f)
    } else {
        classical_images(f)
    };
    imgs.into_iter()
        .min_by(|a, b| factor_cmp(&a.factor, &b.factor))
        .unwrap()
}
