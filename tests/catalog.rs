//! Every entry of the built-in identity catalog (src/rules/catalog.txt,
//! sources beside each entry there) is spot-evaluated exactly: left side
//! against right side at random admissible points, so a wrong entry cannot
//! ship.

use recoup::expr::Q;
use recoup::rules::catalog;
use recoup::verify::spot::{compare, SpotSettings};

#[test]
fn every_catalog_entry_holds() {
    let all = catalog();
    assert!(all.len() >= 20, "{} entries", all.len());
    for r in all {
        let heavy = r.lhs.terms()[0].bound().len() > 5;
        let s = SpotSettings {
            max_j: Q::from_integer(if heavy { 2 } else { 3 }),
            samples: if heavy { 10 } else { 30 },
            exhaustive: false,
            seed: 17,
            ..SpotSettings::default()
        };
        let rep = compare(&r.lhs, &r.rhs, &s).unwrap_or_else(|e| panic!("{}: {e}", r.name));
        assert!(
            rep.mismatches.is_empty(),
            "{} ({}) fails: {:?}",
            r.name,
            r.source,
            rep.mismatches[0]
        );
        assert!(rep.nonzero > 0, "{}: nothing nonzero", r.name);
        assert!(
            !r.source.citations.is_empty(),
            "{} has no published source",
            r.name
        );
    }
}

/// The README's list of references is the bibliography in full, and every
/// work the bibliography holds is listed there.
#[test]
fn the_readme_lists_every_cited_work() {
    let readme = include_str!("../README.md");
    let section = readme
        .split("## References")
        .nth(1)
        .expect("the README has a References section");
    for w in recoup::rules::source::BIBLIOGRAPHY {
        let line = format!("- {}: {}", w.short, w.full);
        assert!(section.contains(&line), "the README lacks: {line}");
    }
    let listed = section
        .lines()
        .take_while(|l| !l.starts_with("## "))
        .filter(|l| l.starts_with("- "))
        .count();
    assert_eq!(listed, recoup::rules::source::BIBLIOGRAPHY.len());
    // no rule cites a working note instead of the literature
    for r in catalog() {
        let text = r.source.text();
        assert!(
            !text.contains(".md"),
            "{} cites a file, not a publication: {text}",
            r.name
        );
    }
}
