//! `recoup family EXPR --over VAR`: every admissible value of VAR with the
//! value of EXPR, one 3j, Clebsch–Gordan coefficient or 6j symbol whose
//! only free name is VAR. Where VAR is one angular momentum of the symbol,
//! or a projection paired with `c - VAR` in another column, the whole
//! family comes from one three-term recursion (`numeric::family`, O(1)
//! per member); elsewhere each member is evaluated on its own. `--exact`
//! adds exact values, each by the exact single-value formula.

use super::input::{parse_expr, read_arg};
use super::{outln, Failure, Io};
use crate::evaluate::{check_assignment, Assignment, Evaluator};
use crate::expr::{Factor, Lin, Name, Q};
use crate::numeric::family::{six_j_over_j1, three_j_over_j1, Family};
use crate::numeric::Surd;
use clap::Args;
use num_traits::Signed;

/// Most members a family may have.
const MAX_MEMBERS: i64 = 1_000_000;

#[derive(Args, Debug)]
pub struct FamilyArgs {
    /// one 3j, Clebsch-Gordan coefficient or 6j symbol with numbers in
    /// every slot but one name (`-` reads standard input)
    #[arg(allow_hyphen_values = true)]
    expr: String,
    /// the name that runs over the family
    #[arg(long)]
    over: String,
    /// also the exact value of every member (slow at large j)
    #[arg(long)]
    exact: bool,
    /// print JSON {"over": ..., "members": [{"value", "float", "exact"}]}
    #[arg(long)]
    json: bool,
}

/// A numeric argument, doubled (`None` for a name or a non-half-integer).
fn doubled_number(l: &Lin) -> Option<i64> {
    if l.is_constant() {
        crate::expr::term::doubled(l.constant_part())
    } else {
        None
    }
}

/// A factor each member is multiplied by (the CG's phase and hat), by the
/// member's doubled argument.
type MemberFactor = Box<dyn Fn(i64) -> f64>;

/// Where the running name sits and the family that recursion gives.
fn by_recursion(f: &Factor, v: &Name) -> Option<(Family, MemberFactor)> {
    let slot = |l: &Lin| l.as_var() == Some(v);
    let num = doubled_number;
    match f {
        Factor::ThreeJ(a) => {
            let k = (0..3).find(|&i| slot(&a[i]))?;
            // every other slot a number
            (0..6)
                .filter(|&i| i != k)
                .map(|i| num(&a[i]))
                .collect::<Option<Vec<_>>>()?;
            // bring the column to the front by an even (cyclic) permutation
            let (b, c) = ((k + 1) % 3, (k + 2) % 3);
            let (tb, tc, mb, mc) = (num(&a[b])?, num(&a[c])?, num(&a[3 + b])?, num(&a[3 + c])?);
            let ma = num(&a[3 + k])?;
            let fam = if ma + mb + mc == 0 {
                three_j_over_j1(tb, tc, mb, mc)
            } else {
                Family {
                    first: 0,
                    values: Vec::new(),
                }
            };
            Some((fam, Box::new(|_| 1.0)))
        }
        Factor::Cg(a) => {
            // <j1 m1; j2 m2 | J M> = (-1)^(j1-j2+M) hat(J) (J, j1, j2; -M, m1, m2)
            if !slot(&a[4]) {
                return None;
            }
            let (t1, m1, t2, m2, mm) = (
                num(&a[0])?,
                num(&a[1])?,
                num(&a[2])?,
                num(&a[3])?,
                num(&a[5])?,
            );
            let fam = if m1 + m2 == mm {
                three_j_over_j1(t1, t2, m1, m2)
            } else {
                Family {
                    first: 0,
                    values: Vec::new(),
                }
            };
            let e = (t1 - t2 + mm) / 2;
            let sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
            Some((fam, Box::new(move |tj| sign * ((tj + 1) as f64).sqrt())))
        }
        Factor::SixJ(a) => {
            let k = (0..6).find(|&i| slot(&a[i]))?;
            let mut t = [0i64; 6];
            for i in 0..6 {
                if i != k {
                    t[i] = num(&a[i])?;
                }
            }
            let u = crate::numeric::family::six_j_with_first(t, k);
            Some((
                six_j_over_j1(u[1], u[2], u[3], u[4], u[5]),
                Box::new(|_| 1.0),
            ))
        }
        _ => None,
    }
}

/// A 3j or CG whose running name is a projection `x` with the other
/// projection of its pair `c - x` (the third fixed): the family over that
/// projection by the recursion in m (`three_j_over_m2`), as (2x, value)
/// in increasing x.
fn by_projection_recursion(f: &Factor, v: &Name) -> Option<Vec<(i64, f64)>> {
    let num = doubled_number;
    let x = Lin::var(v.clone());
    // as a 3j (j, m columns) with a constant factor
    let (cols, factor): ([(Lin, Lin); 3], f64) = match f {
        Factor::ThreeJ(a) => (
            [
                (a[0].clone(), a[3].clone()),
                (a[1].clone(), a[4].clone()),
                (a[2].clone(), a[5].clone()),
            ],
            1.0,
        ),
        Factor::Cg(a) => {
            // <j1 m1; j2 m2 | J M> = (-1)^(j1-j2+M) hat(J) (j1, j2, J; m1, m2, -M)
            let (t1, t2, tjj, tmm) = (num(&a[0])?, num(&a[2])?, num(&a[4])?, num(&a[5])?);
            let e = (t1 - t2 + tmm) / 2;
            let sign = if e.rem_euclid(2) == 0 { 1.0 } else { -1.0 };
            (
                [
                    (a[0].clone(), a[1].clone()),
                    (a[2].clone(), a[3].clone()),
                    (a[4].clone(), -&a[5]),
                ],
                sign * ((tjj + 1) as f64).sqrt(),
            )
        }
        _ => return None,
    };
    let tj: Vec<i64> = cols.iter().map(|(j, _)| num(j)).collect::<Option<_>>()?;
    // the fixed column, and the pair (x, c - x)
    let fixed = (0..3).find(|&k| num(&cols[k].1).is_some())?;
    let (p, q) = ((fixed + 1) % 3, (fixed + 2) % 3);
    let tm_fixed = num(&cols[fixed].1)?;
    let minus_fixed = Lin::constant(Q::new(-tm_fixed, 2));
    let conserved = |a: &Lin, b: &Lin| &(a + b) - &minus_fixed == Lin::zero();
    if !conserved(&cols[p].1, &cols[q].1) {
        return None;
    }
    // cyclic order (fixed, p, q): the family runs over m_p
    let fam = crate::numeric::family::three_j_over_m2(tj[fixed], tj[p], tj[q], tm_fixed);
    let to_x: Box<dyn Fn(i64) -> i64> = if cols[p].1 == x {
        Box::new(|m| m)
    } else if cols[q].1 == x {
        Box::new(move |m| -tm_fixed - m)
    } else {
        return None;
    };
    let mut out: Vec<(i64, f64)> = fam
        .values
        .iter()
        .enumerate()
        .map(|(i, val)| (to_x(fam.argument(i)), val * factor))
        .collect();
    out.sort_by_key(|(t, _)| *t);
    Some(out)
}

fn q_text(doubled: i64) -> String {
    crate::expr::lin::fmt_q(&Q::new(doubled, 2))
}

pub fn run(a: FamilyArgs, io: &mut Io) -> Result<(), Failure> {
    let text = read_arg(&a.expr, io)?;
    let e = parse_expr(&text)?;
    let v = Name::new(a.over.trim());
    let free = e.free_vars();
    if free.len() != 1 || !free.contains(&v) {
        return Err(Failure::input(format!(
            "family needs an expression whose only free name is {v}; it has {}",
            if free.is_empty() {
                "none".to_string()
            } else {
                free.iter()
                    .map(|n| n.to_string())
                    .collect::<Vec<_>>()
                    .join(", ")
            }
        )));
    }
    let [t] = e.terms() else {
        return Err(Failure::input(
            "family takes one symbol (a 3j, a Clebsch-Gordan coefficient or a 6j), not a sum",
        ));
    };
    let symbols: Vec<&Factor> = t.factors().iter().filter(|f| f.is_symbol()).collect();
    let one_symbol = symbols.len() == 1
        && t.factors().len() == 1
        && t.bound().is_empty()
        && t.phase().is_zero()
        && t.scalar() == Surd::one()
        && !matches!(symbols[0], Factor::NineJ(_));
    if !one_symbol {
        return Err(Failure::input(
            "family takes one symbol (a 3j, a Clebsch-Gordan coefficient or a 6j) with no other factor",
        ));
    }
    let f = symbols[0];
    let mut members: Vec<(i64, f64)> = Vec::new();
    if let Some((fam, factor)) = by_recursion(f, &v) {
        for (i, x) in fam.values.iter().enumerate() {
            let tj = fam.argument(i);
            members.push((tj, x * factor(tj)));
        }
    } else if let Some(found) = by_projection_recursion(f, &v) {
        members = found;
    } else {
        // each member on its own: every multiple of 1/2 the symbol's
        // numbers allow
        let bound: i64 = f
            .lins()
            .iter()
            .map(|l| l.constant_part().abs() * Q::from_integer(2))
            .map(|q| q.to_integer() + 1)
            .sum();
        if bound > MAX_MEMBERS {
            return Err(Failure::limit(format!(
                "a family over more than {MAX_MEMBERS} values is beyond what family lists"
            )));
        }
        let ev = Evaluator::<f64>::new();
        for tx in -bound..=bound {
            let mut at = Assignment::new();
            at.insert(v.clone(), Q::new(tx, 2));
            if check_assignment(&e, &at).is_err() {
                continue;
            }
            let admissible = f.triads().iter().all(|[x, y, z]| {
                let val = |l: &Lin| {
                    l.eval(&|n: &Name| at.get(n).copied())
                        .and_then(crate::expr::term::doubled)
                };
                match (val(x), val(y), val(z)) {
                    (Some(p), Some(q), Some(r)) => crate::numeric::selection::triangle2(p, q, r),
                    _ => false,
                }
            }) && f.columns().iter().all(|(j, m)| {
                let val = |l: &Lin| {
                    l.eval(&|n: &Name| at.get(n).copied())
                        .and_then(crate::expr::term::doubled)
                };
                matches!((val(j), val(m)), (Some(p), Some(q)) if crate::numeric::selection::projection_ok2(p, q))
            });
            if !admissible {
                continue;
            }
            let x = ev.eval(&e, &at)?;
            members.push((tx, x));
        }
    }
    let exact: Vec<Option<String>> = if a.exact {
        let ev = Evaluator::<Surd>::new();
        members
            .iter()
            .map(|(tx, _)| {
                let mut at = Assignment::new();
                at.insert(v.clone(), Q::new(*tx, 2));
                ev.eval(&e, &at).map(|s| Some(s.to_string()))
            })
            .collect::<Result<_, _>>()?
    } else {
        vec![None; members.len()]
    };
    if a.json {
        let report = crate::api::report::FamilyReport {
            over: v.to_string(),
            members: members
                .iter()
                .zip(&exact)
                .map(|((tx, x), ex)| crate::api::report::FamilyMember {
                    value: q_text(*tx),
                    float: *x,
                    exact: ex.clone(),
                })
                .collect(),
        };
        outln!(io, "{}", super::json_text(&report)?)?;
    } else {
        for ((tx, x), ex) in members.iter().zip(&exact) {
            let f = crate::render::fmt_float(*x);
            match ex {
                Some(s) => outln!(io, "{}\t{s}\t{f}", q_text(*tx))?,
                None => outln!(io, "{}\t{f}", q_text(*tx))?,
            }
        }
    }
    Ok(())
}
