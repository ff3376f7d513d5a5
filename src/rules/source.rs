//! Where a rule comes from, as a typed value: citations of published works
//! (a key into the bibliography below and a place in the work, such as
//! an equation or a section) and a remark ("from memory", "read right to
//! left", "derived from ..."). Text, LaTeX and JSON print a source the
//! same way; the README's list of references is the bibliography in
//! full (a test keeps the two in step).

use serde::Serialize;

/// One published work.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
pub struct Work {
    /// the key used in the catalog (`edmonds1957`)
    pub key: &'static str,
    /// how a citation names it in text (`Edmonds 1957`)
    pub short: &'static str,
    /// the full reference
    pub full: &'static str,
}

/// The works the catalog and the engine cite. Bibliographic details are
/// recalled from memory.
pub const BIBLIOGRAPHY: &[Work] = &[
    Work {
        key: "edmonds1957",
        short: "Edmonds 1957",
        full: "A. R. Edmonds, Angular Momentum in Quantum Mechanics (Princeton University Press, Princeton, 1957)",
    },
    Work {
        key: "racah1942",
        short: "Racah 1942",
        full: "G. Racah, Theory of Complex Spectra II, Phys. Rev. 62, 438 (1942)",
    },
    Work {
        key: "biedenharn1953",
        short: "Biedenharn 1953",
        full: "L. C. Biedenharn, An identity satisfied by the Racah coefficients, J. Math. Phys. 31, 287 (1953)",
    },
    Work {
        key: "elliott1953",
        short: "Elliott 1953",
        full: "J. P. Elliott, Theoretical studies in nuclear structure III, Proc. R. Soc. London A 218, 345 (1953)",
    },
    Work {
        key: "regge1958",
        short: "Regge 1958",
        full: "T. Regge, Symmetry properties of Clebsch-Gordan's coefficients, Nuovo Cimento 10, 544 (1958)",
    },
    Work {
        key: "regge1959",
        short: "Regge 1959",
        full: "T. Regge, Symmetry properties of Racah's coefficients, Nuovo Cimento 11, 116 (1959)",
    },
    Work {
        key: "yutsis1962",
        short: "Yutsis, Levinson and Vanagas 1962",
        full: "A. P. Yutsis, I. B. Levinson and V. V. Vanagas, Mathematical Apparatus of the Theory of Angular Momentum (Israel Program for Scientific Translations, Jerusalem, 1962; Russian original, Vilnius, 1960)",
    },
    Work {
        key: "varshalovich1988",
        short: "Varshalovich, Moskalev and Khersonskii 1988",
        full: "D. A. Varshalovich, A. N. Moskalev and V. K. Khersonskii, Quantum Theory of Angular Momentum (World Scientific, Singapore, 1988)",
    },
    Work {
        key: "schulten1975",
        short: "Schulten and Gordon 1975",
        full: "K. Schulten and R. G. Gordon, Exact recursive evaluation of 3j- and 6j-coefficients for quantum-mechanical coupling of angular momenta, J. Math. Phys. 16, 1961 (1975)",
    },
    Work {
        key: "luscombe1998",
        short: "Luscombe and Luban 1998",
        full: "J. H. Luscombe and M. Luban, Simplified recursive algorithm for Wigner 3j and 6j symbols, Phys. Rev. E 57, 7274 (1998)",
    },
    Work {
        key: "condon1935",
        short: "Condon and Shortley 1935",
        full: "E. U. Condon and G. H. Shortley, The Theory of Atomic Spectra (Cambridge University Press, Cambridge, 1935)",
    },
];

/// The work with this key.
pub fn work(key: &str) -> Option<&'static Work> {
    BIBLIOGRAPHY.iter().find(|w| w.key == key)
}

/// A place in a published work.
#[derive(Clone, Debug, PartialEq, Eq, Serialize)]
pub struct Citation {
    /// the work
    pub work: &'static Work,
    /// where in it (`eq. 6.2.9`, `Table 5`, `section 3.7`), may be empty
    pub place: String,
}

/// The source of a rule or a step.
#[derive(Clone, Debug, PartialEq, Eq, Serialize, Default)]
pub struct Source {
    /// the works cited, in order
    pub citations: Vec<Citation>,
    /// a remark: "from memory", "read right to left", "derived: ..."
    pub note: Option<String>,
}

/// Why a source text does not parse.
#[derive(Debug, Clone, thiserror::Error)]
#[error("{0}")]
pub struct SourceError(pub String);

impl Source {
    /// A source of citations only.
    pub fn cite(citations: Vec<Citation>) -> Source {
        Source {
            citations,
            note: None,
        }
    }

    /// The same source with a remark added.
    pub fn noted(mut self, note: &str) -> Source {
        self.note = Some(match self.note.take() {
            Some(n) => format!("{n}; {note}"),
            None => note.to_string(),
        });
        self
    }

    /// Parses the catalog's notation: citations separated by `;`, each a
    /// bibliography key and a place (`edmonds1957 eq. 6.2.9`), then
    /// optionally `-- remark`.
    pub fn parse(text: &str) -> Result<Source, SourceError> {
        let (cites, note) = match text.split_once("--") {
            Some((c, n)) => (c, Some(n.trim().to_string()).filter(|n| !n.is_empty())),
            None => (text, None),
        };
        let mut citations = Vec::new();
        for c in cites.split(';').map(str::trim).filter(|c| !c.is_empty()) {
            let (key, place) = c.split_once(' ').unwrap_or((c, ""));
            let w = work(key)
                .ok_or_else(|| SourceError(format!("'{key}' is not in the bibliography")))?;
            citations.push(Citation {
                work: w,
                place: place.trim().to_string(),
            });
        }
        if citations.is_empty() && note.is_none() {
            return Err(SourceError("a rule needs a published source".into()));
        }
        Ok(Source { citations, note })
    }

    /// The source in words: `Edmonds 1957, eq. 6.2.9; Racah 1942 (from
    /// memory)`.
    pub fn text(&self) -> String {
        let cites: Vec<String> = self
            .citations
            .iter()
            .map(|c| {
                if c.place.is_empty() {
                    c.work.short.to_string()
                } else {
                    format!("{}, {}", c.work.short, c.place)
                }
            })
            .collect();
        match (&self.note, cites.is_empty()) {
            (Some(n), true) => n.clone(),
            (Some(n), false) => format!("{} ({n})", cites.join("; ")),
            (None, _) => cites.join("; "),
        }
    }

    /// The source for LaTeX: the same words with the few characters TeX
    /// treats specially escaped.
    pub fn latex(&self) -> String {
        let mut out = String::new();
        for ch in self.text().chars() {
            match ch {
                '&' | '%' | '$' | '#' | '_' | '{' | '}' => {
                    out.push('\\');
                    out.push(ch);
                }
                '~' => out.push_str("\\textasciitilde{}"),
                '^' => out.push_str("\\textasciicircum{}"),
                '\\' => out.push_str("\\textbackslash{}"),
                c => out.push(c),
            }
        }
        out
    }
}

impl std::fmt::Display for Source {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.text())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sources_parse_and_print_one_way() {
        let s = Source::parse("edmonds1957 eq. 6.2.12; biedenharn1953; elliott1953 -- from memory")
            .unwrap();
        assert_eq!(
            s.text(),
            "Edmonds 1957, eq. 6.2.12; Biedenharn 1953; Elliott 1953 (from memory)"
        );
        assert_eq!(s.citations[0].place, "eq. 6.2.12");
        assert_eq!(s.note.as_deref(), Some("from memory"));
        assert!(Source::parse("nobody2001 eq. 1").is_err());
        assert!(Source::parse("").is_err());
    }
}
