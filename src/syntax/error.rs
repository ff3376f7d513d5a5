//! Parse errors with one-based line and column, the offending line, a caret
//! under the spot and what was expected, in words.

use super::Rule;
use std::collections::BTreeSet;
use std::fmt;

/// A parse or lowering error at a position of the input.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub struct ParseError {
    /// one-based line
    pub line: usize,
    /// one-based column (in characters)
    pub column: usize,
    /// what went wrong, in words
    pub message: String,
    /// the text of the offending line
    pub source_line: String,
}

/// Characters of the offending line shown on each side of the caret.
const EXCERPT_HALF: usize = 40;

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        writeln!(
            f,
            "line {}, column {}: {}",
            self.line, self.column, self.message
        )?;
        // a long line is shown as a window around the spot
        let chars: Vec<char> = self.source_line.chars().collect();
        let col = self.column.saturating_sub(1);
        let start = col.saturating_sub(EXCERPT_HALF);
        let end = (col + EXCERPT_HALF).min(chars.len());
        let mut shown: String = chars[start.min(end)..end].iter().collect();
        let mut caret = col - start;
        if start > 0 {
            shown = format!("...{shown}");
            caret += 3;
        }
        if end < chars.len() {
            shown.push_str("...");
        }
        writeln!(f, "  {shown}")?;
        write!(f, "  {}^", " ".repeat(caret))
    }
}

impl ParseError {
    /// An error at a byte offset of the input.
    pub fn at(input: &str, offset: usize, message: impl Into<String>) -> ParseError {
        let offset = offset.min(input.len());
        let before = &input[..offset];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map(|i| i + 1).unwrap_or(0);
        let column = input[line_start..offset].chars().count() + 1;
        let line_end = input[line_start..]
            .find('\n')
            .map(|i| line_start + i)
            .unwrap_or(input.len());
        ParseError {
            line,
            column,
            message: message.into(),
            source_line: input[line_start..line_end].to_string(),
        }
    }
}

/// Friendly names of the rules a user may be told were expected.
fn rule_words(rule: Rule) -> Option<&'static str> {
    Some(match rule {
        Rule::expr | Rule::row | Rule::group | Rule::phase_exponent => "an expression",
        Rule::braces | Rule::clebsch_gordan | Rule::sum | Rule::call => "an expression",
        Rule::phase => "an expression",
        Rule::number => "a number",
        Rule::ident => "a name",
        Rule::function => "a function name",
        Rule::add | Rule::sub | Rule::mul | Rule::div | Rule::juxtapose => "an operator",
        Rule::neg => "an expression",
        Rule::power => "an operator",
        Rule::power_exponent | Rule::signed_integer => "an integer exponent",
        Rule::EOI => "the end of the input",
        Rule::coupled => "a coupling like (j1, j2) j12",
        Rule::tree_child | Rule::tree_leaf => "an angular momentum (a name or a number)",
        Rule::tree_label => "the name of the coupled angular momentum",
        Rule::fraction => "a number",
        Rule::declaration => "a declaration like `integer k, q;`",
        Rule::parity_word => "`integer` or `half-odd`",
        _ => return None,
    })
}

fn token_words(t: &str) -> String {
    match t {
        "," => "a comma".into(),
        ";" => "a semicolon".into(),
        ":" => "a colon".into(),
        ")" => "a closing parenthesis".into(),
        "(" => "an opening parenthesis".into(),
        "}" => "a closing brace".into(),
        ">" => "'>'".into(),
        "|" => "'|'".into(),
        "^" => "'^'".into(),
        other => format!("'{other}'"),
    }
}

/// Converts a pest error into a `ParseError` with words for what was expected.
pub(super) fn from_pest(input: &str, e: pest::error::Error<Rule>) -> ParseError {
    let offset = match e.location {
        pest::error::InputLocation::Pos(p) => p,
        pest::error::InputLocation::Span((s, _)) => s,
    };
    let mut words: BTreeSet<String> = BTreeSet::new();
    let mut at = offset;
    if let Some(attempts) = e.parse_attempts() {
        at = attempts.max_position.max(offset);
        for tok in attempts.expected_tokens() {
            let s = tok.to_string();
            let w = match s.as_str() {
                "sum" | "hat" | "delta" | "tri" | "sqrt" => continue,
                "+" | "-" | "*" | "/" => "an operator".to_string(),
                _ if s.chars().all(|c| c.is_ascii_punctuation()) => token_words(&s),
                _ => continue,
            };
            words.insert(w);
        }
    }
    if let pest::error::ErrorVariant::ParsingError { positives, .. } = &e.variant {
        for r in positives {
            if let Some(w) = rule_words(*r) {
                words.insert(w.to_string());
            }
        }
    }
    // single characters that only continue a name or start a juxtaposed
    // factor are covered by "an operator"
    if words.contains("an operator") {
        for noise in ["'<'", "'{'", "an opening parenthesis", "'^'"] {
            words.remove(noise);
        }
    }
    words.remove("'\''");
    words.remove("'_'");
    let ws: Vec<String> = words.into_iter().collect();
    let expected = join_or(&ws);
    let found = input[at.min(input.len())..]
        .chars()
        .next()
        .map(|c| format!("found '{c}'"))
        .unwrap_or_else(|| "found the end of the input".to_string());
    let message = if expected.is_empty() {
        format!("unexpected input; {found}")
    } else {
        format!("expected {expected}; {found}")
    };
    ParseError::at(input, at, message)
}

fn join_or(ws: &[String]) -> String {
    match ws.len() {
        0 => String::new(),
        1 => ws[0].clone(),
        _ => format!("{} or {}", ws[..ws.len() - 1].join(", "), ws[ws.len() - 1]),
    }
}
