//! The identity catalog: every identity as data (name, kind, published
//! source, both sides in the expression language), parsed and validated
//! when the catalog is built, and the machinery that matches a rule's left
//! side against a term modulo renaming and the symmetries of the symbols.
//! Adding an identity means adding an entry to `catalog.txt`.

pub mod apply;
pub mod matcher;
pub mod source;

pub use source::Source;

use crate::expr::{Expr, Name};
use crate::syntax::parse;
use std::collections::BTreeSet;
use std::sync::OnceLock;

/// What a rule rewrites.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RuleKind {
    /// a single symbol with special arguments
    Special,
    /// a closed form of a single symbol with a small argument, used only
    /// where the symbol holds no summed variable (inside a sum it would
    /// hide the structure the graph and the sum identities need)
    ClosedForm,
    /// a sum over projections
    ProjectionSum,
    /// a sum over angular momenta
    MomentumSum,
    /// a definition used to bring input to a standard form (cg-to-3j)
    Definition,
}

/// One identity of the catalog.
#[derive(Clone, Debug)]
pub struct Rule {
    /// kebab-case name, as it appears in traces
    pub name: String,
    /// what it rewrites
    pub kind: RuleKind,
    /// the published source
    pub source: Source,
    /// left side (the pattern)
    pub lhs: Expr,
    /// right side (the replacement)
    pub rhs: Expr,
}

/// Why an entry is not a valid rule.
#[derive(Debug, Clone, thiserror::Error)]
#[error("rule {name}: {message}")]
pub struct RuleError {
    /// the entry's name
    pub name: String,
    /// what is wrong
    pub message: String,
}

impl Rule {
    /// Builds and validates a rule: a kebab-case name, both sides parse,
    /// the left side is one term, and both sides have the same free
    /// variables (a variable on one side only is an error).
    pub fn new(
        name: &str,
        kind: RuleKind,
        source: &str,
        lhs: &str,
        rhs: &str,
    ) -> Result<Rule, RuleError> {
        Self::with_unused(name, kind, source, lhs, rhs, &[])
    }

    /// `new`, allowing the listed left-side variables to be absent on the
    /// right (declared, so an accidental omission is still an error).
    pub fn with_unused(
        name: &str,
        kind: RuleKind,
        source: &str,
        lhs: &str,
        rhs: &str,
        unused: &[Name],
    ) -> Result<Rule, RuleError> {
        let err = |m: String| RuleError {
            name: name.to_string(),
            message: m,
        };
        let kebab = !name.is_empty()
            && name
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
            && !name.starts_with('-')
            && !name.ends_with('-');
        if !kebab {
            return Err(err("the name must be kebab-case".into()));
        }
        let l = parse(lhs).map_err(|e| err(format!("left side: {e}")))?;
        let r = parse(rhs).map_err(|e| err(format!("right side: {e}")))?;
        if l.len() != 1 {
            return Err(err("the left side must be a single term".into()));
        }
        let lv: BTreeSet<Name> = l.free_vars();
        let mut rv: BTreeSet<Name> = r.free_vars();
        for u in unused {
            if !lv.contains(u) || rv.contains(u) {
                return Err(err(format!(
                    "{u} is declared unused but is not a left-side variable missing on the right"
                )));
            }
            rv.insert(u.clone());
        }
        if lv != rv {
            let only_l: Vec<String> = lv.difference(&rv).map(|n| n.to_string()).collect();
            let only_r: Vec<String> = rv.difference(&lv).map(|n| n.to_string()).collect();
            return Err(err(format!(
                "a variable on one side only (left only: [{}], right only: [{}])",
                only_l.join(", "),
                only_r.join(", ")
            )));
        }
        let source = if source.trim().is_empty() {
            Source::default()
        } else {
            Source::parse(source).map_err(|e| err(format!("source: {e}")))?
        };
        Ok(Rule {
            name: name.to_string(),
            kind,
            source,
            lhs: l,
            rhs: r,
        })
    }

    /// The pattern variables (free variables of the left side).
    pub fn vars(&self) -> BTreeSet<Name> {
        self.lhs.free_vars()
    }
}

/// The catalog rule of the given name.
pub fn rule(name: &str) -> &'static Rule {
    catalog()
        .iter()
        .find(|r| r.name == name)
        .unwrap_or_else(|| panic!("no rule {name} in the catalog"))
}

/// Parses catalog text (the format of `catalog.txt`).
pub fn parse_catalog(text: &str) -> Result<Vec<Rule>, RuleError> {
    let mut out = Vec::new();
    type Head = (String, RuleKind, String, Vec<Name>);
    let mut head: Option<Head> = None;
    let mut lhs = String::new();
    let flush = |head: &mut Option<Head>,
                 lhs: &mut String,
                 rhs: &str,
                 out: &mut Vec<Rule>|
     -> Result<(), RuleError> {
        if let Some((n, k, s, unused)) = head.take() {
            out.push(Rule::with_unused(
                &n,
                k,
                &s,
                lhs.trim(),
                rhs.trim(),
                &unused,
            )?);
        }
        lhs.clear();
        Ok(())
    };
    for line in text.lines() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        if let Some(rest) = line.strip_prefix('[') {
            let (name, tail) = rest.split_once(']').ok_or_else(|| RuleError {
                name: rest.to_string(),
                message: "missing ]".into(),
            })?;
            let (kind, source) = tail.split_once('|').unwrap_or((tail, ""));
            let kind = match kind.trim() {
                "special" => RuleKind::Special,
                "closed-form" => RuleKind::ClosedForm,
                "projection" => RuleKind::ProjectionSum,
                "sum" => RuleKind::MomentumSum,
                "definition" => RuleKind::Definition,
                k => {
                    return Err(RuleError {
                        name: name.to_string(),
                        message: format!("unknown kind '{k}'"),
                    })
                }
            };
            let (source, unused) = match source.split_once("| unused:") {
                Some((s, u)) => (
                    s,
                    u.split(',')
                        .map(|x| Name::new(x.trim()))
                        .filter(|n| !n.as_str().is_empty())
                        .collect(),
                ),
                None => (source, Vec::new()),
            };
            if source.trim().is_empty() {
                return Err(RuleError {
                    name: name.to_string(),
                    message: "a catalog rule needs a published source".into(),
                });
            }
            head = Some((name.to_string(), kind, source.trim().to_string(), unused));
        } else if let Some(r) = line.strip_prefix("==") {
            flush(&mut head, &mut lhs, r, &mut out)?;
        } else {
            lhs.push_str(line);
            lhs.push(' ');
        }
    }
    Ok(out)
}

/// The built-in catalog (validated on first use).
pub fn catalog() -> &'static [Rule] {
    static C: OnceLock<Vec<Rule>> = OnceLock::new();
    // the catalog's names are not the user's: build it with nothing declared
    C.get_or_init(|| {
        crate::algebra::declare::suspended(|| {
            parse_catalog(include_str!("catalog.txt"))
                .unwrap_or_else(|e| panic!("the built-in catalog is invalid: {e}"))
        })
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn building_a_rule_validates_it() {
        assert!(Rule::new(
            "ok-rule",
            RuleKind::Special,
            "",
            "{a, b, c; d, e, 0}",
            "delta(a, e) delta(b, d) tri(a, b, c) c"
        )
        .is_ok());
        let e =
            Rule::new("one-side", RuleKind::Special, "", "{a, b, c; d, e, 0}", "x").unwrap_err();
        assert!(e.message.contains("one side only"), "{e}");
        assert!(Rule::new("Bad_Name", RuleKind::Special, "", "x", "x").is_err());
        assert!(Rule::new(
            "two-terms",
            RuleKind::Special,
            "",
            "x + {a, b, c; d, e, f}",
            "x"
        )
        .is_err());
    }

    #[test]
    fn the_built_in_catalog_builds() {
        assert!(catalog().len() >= 5);
    }
}
