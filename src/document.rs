//! Derivation documents (`recoup run FILE`): the plain-text format and
//! its reading into items with their line numbers. Running and printing
//! belong to the command line (`cli::run`).
//!
//! The format (our own; one item per line, `\` at the end of a line
//! continues it on the next, `#` starts a comment line):
//!
//! ```text
//! integer k, q;                     declarations, in force for the rest of the file
//! half-odd s;
//! let W = sum(q: (-1)^q ...)        a named expression: later items may use W
//! claim scalar: W = (-1)^k / hat(a) a claim, checked by exact spot-evaluation
//! claim LHS = RHS                   (the label before `:` is optional)
//! simplify W                        simplified, every step verified
//! simplify lande: W = 3/2           ... and the result checked equal to the expected form
//! ```
//!
//! A name defined by `let` is replaced, as a whole word, by its expression
//! in parentheses wherever a later item uses it.

/// One item of a document.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Item {
    /// `integer ...;` or `half-odd ...;` lines, as written
    Declare(String),
    /// `let NAME = EXPR`
    Define {
        /// the name
        name: String,
        /// the expression's text (names already expanded)
        text: String,
    },
    /// `claim [LABEL:] LHS = RHS`
    Claim {
        /// the label, if one was given
        label: Option<String>,
        /// the left side (expanded)
        lhs: String,
        /// the right side (expanded)
        rhs: String,
    },
    /// `simplify [LABEL:] EXPR [= EXPECTED]`
    Simplify {
        /// the label, if one was given
        label: Option<String>,
        /// the expression (expanded)
        expr: String,
        /// the expected result (expanded), if given
        expected: Option<String>,
    },
}

/// An item and the line it starts on (one-based).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Located {
    /// first line of the item
    pub line: usize,
    /// the item
    pub item: Item,
}

/// A line that is not an item of the format.
#[derive(Clone, Debug, PartialEq, Eq, thiserror::Error)]
#[error("line {line}: {message}")]
pub struct DocumentError {
    /// one-based line
    pub line: usize,
    /// what is wrong, in words
    pub message: String,
}

/// Most items a document may hold.
pub const MAX_ITEMS: usize = 10_000;
/// Most bytes an item may expand to once its names are replaced (the
/// parser's own input limit): names defined through each other would
/// otherwise double at every step.
pub const MAX_EXPANDED: usize = 1 << 20;

fn is_name_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_' || c == '\''
}

fn valid_name(s: &str) -> bool {
    s.chars().next().is_some_and(|c| c.is_ascii_alphabetic()) && s.chars().all(is_name_char)
}

/// Replaces each defined name, as a whole word, by its text in
/// parentheses; `None` past `MAX_EXPANDED` bytes.
fn expand(text: &str, defined: &[(String, String)]) -> Option<String> {
    let mut out = text.to_string();
    for (name, body) in defined.iter().rev() {
        let mut next = String::with_capacity(out.len());
        let chars: Vec<char> = out.chars().collect();
        let name_chars: Vec<char> = name.chars().collect();
        let mut i = 0;
        while i < chars.len() {
            let fits = chars[i..].starts_with(&name_chars)
                && (i == 0 || !is_name_char(chars[i - 1]))
                && chars
                    .get(i + name_chars.len())
                    .is_none_or(|c| !is_name_char(*c));
            if fits {
                if next.len() + body.len() + 2 > MAX_EXPANDED {
                    return None;
                }
                next.push('(');
                next.push_str(body);
                next.push(')');
                i += name_chars.len();
            } else {
                next.push(chars[i]);
                i += 1;
            }
        }
        out = next;
    }
    Some(out)
}

/// Splits `[LABEL:] REST` (a label is one word followed by `:` and a
/// space, before any bracket).
fn label_of(rest: &str) -> (Option<String>, &str) {
    if let Some((head, tail)) = rest.split_once(": ") {
        let head = head.trim();
        if !head.is_empty()
            && !head.contains(char::is_whitespace)
            && !head.contains(['(', '{', '<', '['])
        {
            return (Some(head.to_string()), tail.trim());
        }
    }
    (None, rest.trim())
}

/// Splits at the one `=` of a line (the expression language has none).
fn sides(rest: &str, line: usize, what: &str) -> Result<(String, Option<String>), DocumentError> {
    let parts: Vec<&str> = rest.split('=').collect();
    match parts.as_slice() {
        [one] => Ok((one.trim().to_string(), None)),
        [l, r] if !l.trim().is_empty() && !r.trim().is_empty() => {
            Ok((l.trim().to_string(), Some(r.trim().to_string())))
        }
        _ => Err(DocumentError {
            line,
            message: format!("{what} takes `LEFT = RIGHT` with one `=` and both sides written"),
        }),
    }
}

fn too_big(line: usize) -> DocumentError {
    DocumentError {
        line,
        message: format!(
            "with its named expressions replaced this item is longer than {} bytes",
            MAX_EXPANDED
        ),
    }
}

/// Reads a document into its items.
pub fn read(text: &str) -> Result<Vec<Located>, DocumentError> {
    let mut items = Vec::new();
    let mut defined: Vec<(String, String)> = Vec::new();
    let lines: Vec<&str> = text.lines().collect();
    let mut i = 0;
    while i < lines.len() {
        let start = i + 1;
        let mut joined = String::new();
        loop {
            let l = lines[i].trim_end();
            i += 1;
            match l.strip_suffix('\\') {
                Some(head) if i < lines.len() => {
                    joined.push_str(head);
                    joined.push(' ');
                }
                Some(head) => {
                    joined.push_str(head);
                    break;
                }
                None => {
                    joined.push_str(l);
                    break;
                }
            }
        }
        let body = joined.trim();
        if body.is_empty() || body.starts_with('#') {
            continue;
        }
        if items.len() >= MAX_ITEMS {
            return Err(DocumentError {
                line: start,
                message: format!("a document holds at most {MAX_ITEMS} items"),
            });
        }
        let (word, rest) = body.split_once(char::is_whitespace).unwrap_or((body, ""));
        let item = match word {
            "integer" | "half-odd" => Item::Declare(body.to_string()),
            "let" => {
                let (name, value) = rest.split_once('=').ok_or_else(|| DocumentError {
                    line: start,
                    message: "let takes `let NAME = EXPRESSION`".into(),
                })?;
                let name = name.trim().to_string();
                if !valid_name(&name) {
                    return Err(DocumentError {
                        line: start,
                        message: format!(
                            "let names one name (a letter, then letters, digits, _ or '); got {name:?}"
                        ),
                    });
                }
                let text = expand(value.trim(), &defined).ok_or_else(|| too_big(start))?;
                if text.is_empty() {
                    return Err(DocumentError {
                        line: start,
                        message: format!("{name} is defined as nothing"),
                    });
                }
                defined.retain(|(n, _)| *n != name);
                defined.push((name.clone(), text.clone()));
                Item::Define { name, text }
            }
            "claim" => {
                let (label, rest) = label_of(rest);
                let (lhs, rhs) = sides(rest, start, "claim")?;
                let rhs = rhs.ok_or_else(|| DocumentError {
                    line: start,
                    message: "claim takes `LEFT = RIGHT`".into(),
                })?;
                Item::Claim {
                    label,
                    lhs: expand(&lhs, &defined).ok_or_else(|| too_big(start))?,
                    rhs: expand(&rhs, &defined).ok_or_else(|| too_big(start))?,
                }
            }
            "simplify" => {
                let (label, rest) = label_of(rest);
                let (expr, expected) = sides(rest, start, "simplify")?;
                if expr.is_empty() {
                    return Err(DocumentError {
                        line: start,
                        message: "simplify takes an expression".into(),
                    });
                }
                let expected = match expected {
                    Some(x) => Some(expand(&x, &defined).ok_or_else(|| too_big(start))?),
                    None => None,
                };
                Item::Simplify {
                    label,
                    expr: expand(&expr, &defined).ok_or_else(|| too_big(start))?,
                    expected,
                }
            }
            other => {
                return Err(DocumentError {
                    line: start,
                    message: format!(
                        "a line starts with integer, half-odd, let, claim, simplify or # (a comment); got {other:?}"
                    ),
                })
            }
        };
        items.push(Located { line: start, item });
    }
    Ok(items)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn items_labels_continuations_and_names() {
        let doc = "# a comment\ninteger k;\nlet W = a + \\\n b\nclaim one: W = b + a\nsimplify W' + W\nsimplify two: W = 1\n";
        let items = read(doc).unwrap();
        assert_eq!(items.len(), 5);
        assert_eq!(
            items[0],
            Located {
                line: 2,
                item: Item::Declare("integer k;".into())
            }
        );
        assert_eq!(
            items[2],
            Located {
                line: 5,
                item: Item::Claim {
                    label: Some("one".into()),
                    lhs: "(a +   b)".into(),
                    rhs: "b + a".into()
                }
            }
        );
        // W' is another name: only the whole word W is replaced
        assert_eq!(
            items[3].item,
            Item::Simplify {
                label: None,
                expr: "W' + (a +   b)".into(),
                expected: None
            }
        );
        assert!(matches!(&items[4].item, Item::Simplify { expected: Some(x), .. } if x == "1"));
    }

    #[test]
    fn bad_lines_name_their_line() {
        assert_eq!(read("claim a = b = c").unwrap_err().line, 1);
        assert_eq!(read("\n\nprove a = b").unwrap_err().line, 3);
        assert_eq!(read("let 2x = 1").unwrap_err().line, 1);
        assert_eq!(read("claim a").unwrap_err().line, 1);
        assert!(read("claim sum(x: (2*x+1) {a, b, x; a, b, c}) = 1").is_ok());
        // names defined through each other double at every step: refused
        let mut doubling = String::from("let A0 = x\n");
        for k in 1..40 {
            doubling.push_str(&format!("let A{k} = A{} A{}\n", k - 1, k - 1));
        }
        let e = read(&doubling).unwrap_err();
        assert!(e.message.contains("longer than"), "{e}");
        assert!(e.line < 40);
    }
}
