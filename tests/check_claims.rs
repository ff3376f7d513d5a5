//! `check` on the identities of the shared list: true as stated; false
//! when a phase, a factor or an argument is changed, with the diagnosis
//! repairing every wrong-phase, wrong-factor and swapped variant (each
//! repair re-checked at other points). Sources: tests/data/identities.txt.

mod common;

use common::blocks;
use recoup::expr::Q;
use recoup::syntax::parse;
use recoup::verify::check::{check, Verdict};
use recoup::verify::spot::SpotSettings;

fn settings(lhs: &str, seed: u64) -> SpotSettings {
    let heavy = lhs.matches('(').count() > 14 || lhs.matches('<').count() > 4;
    SpotSettings {
        max_j: Q::from_integer(if heavy { 2 } else { 3 }),
        samples: if heavy { 12 } else { 30 },
        exhaustive: false,
        seed,
        ..SpotSettings::default()
    }
}

#[test]
fn every_identity_checks_equal() {
    for b in blocks(include_str!("data/identities.txt")) {
        let (name, source, lhs, rhs) = (b.name, b.tag, b.lhs, b.rhs);
        let l = parse(&lhs).unwrap();
        let r = parse(&rhs).unwrap();
        let res = check(&l, &r, &settings(&lhs, 21)).unwrap();
        assert!(
            matches!(res.verdict, Verdict::Equal),
            "{name} ({source}) not equal: {:?}",
            res.verdict
        );
    }
}

#[test]
fn wrong_variants_are_caught_and_repaired() {
    let cases = blocks(include_str!("data/wrong_claims.txt"));
    assert!(cases.len() >= 20, "{} variants", cases.len());
    for b in cases {
        let (name, tag, lhs, rhs) = (b.name, b.tag, b.lhs, b.rhs);
        let l = parse(&lhs).unwrap();
        let r = parse(&rhs).unwrap();
        let res = check(&l, &r, &settings(&lhs, 33)).unwrap();
        let Verdict::Different { diagnosis, .. } = res.verdict else {
            panic!("{name}: the wrong claim was not caught");
        };
        let d = diagnosis.unwrap_or_else(|| panic!("{name}: no diagnosis"));
        assert!(d.confirmed.agrees(), "{name}: repair not confirmed");
        let said = match tag.as_str() {
            "swap" => d.text.contains("swapping"),
            "phase" => d.text.contains("(-1)^"),
            "factor" => d.text.contains("times") && !d.text.contains("swapping"),
            t => panic!("unknown tag {t}"),
        };
        assert!(said, "{name}: expected a {tag} repair, got: {}", d.text);
    }
}
