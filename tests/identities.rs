//! Every identity of the shared identity list, checked by exact
//! spot-evaluation at random admissible points (sources beside each entry
//! in tests/data/identities.txt).

mod common;

use recoup::expr::Q;
use recoup::syntax::parse;
use recoup::verify::spot::{compare, SpotSettings};

fn cases() -> Vec<common::Block> {
    common::blocks(include_str!("data/identities.txt"))
}

#[test]
fn every_identity_holds_at_random_admissible_points() {
    let all = cases();
    assert!(all.len() >= 35, "{} cases", all.len());
    for c in &all {
        let lhs = parse(&c.lhs).unwrap_or_else(|e| panic!("{}: {e}", c.name));
        let rhs = parse(&c.rhs).unwrap_or_else(|e| panic!("{}: {e}", c.name));
        let heavy = c.lhs.matches('(').count() > 14;
        let s = SpotSettings {
            max_j: Q::from_integer(if heavy { 3 } else { 4 }) / Q::from_integer(2)
                * Q::from_integer(2),
            samples: if heavy { 12 } else { 40 },
            exhaustive: false,
            seed: 7,
            ..SpotSettings::default()
        };
        let rep = compare(&lhs, &rhs, &s).unwrap_or_else(|e| panic!("{}: {e}", c.name));
        assert!(
            rep.mismatches.is_empty(),
            "{} ({}) fails at {:?}",
            c.name,
            c.tag,
            rep.mismatches[0]
        );
        assert!(
            rep.nonzero * 3 >= rep.checked && rep.checked >= s.samples / 2,
            "{}: only {} of {} points nonzero",
            c.name,
            rep.nonzero,
            rep.checked
        );
    }
}
