//! Complete LaTeX documents around recoup's formulas: displayed equations
//! broken between terms to fit a text width (amsmath `multline*`), and a
//! standalone article that compiles with pdflatex. Shared by `run --latex`
//! and every `--latex --document` output.

use super::latex;
use crate::expr::Expr;

/// Rendered width a line of a displayed equation may take before the next
/// term or factor starts a new line, in characters of math at 10 pt as
/// `rendered_width` estimates them (an article's text width holds about
/// 75; the rest is a margin for the estimate's error).
pub const LINE_BUDGET: usize = 58;

/// The index just past the group that opens at `open` (`{` ... `}`).
fn group_end(b: &[u8], open: usize) -> usize {
    let mut depth = 0i64;
    for (k, c) in b.iter().enumerate().skip(open) {
        match c {
            b'{' => depth += 1,
            b'}' => {
                depth -= 1;
                if depth == 0 {
                    return k + 1;
                }
            }
            _ => {}
        }
    }
    b.len()
}

/// An estimate of the width of math-mode LaTeX when typeset, in
/// characters: commands count as the symbol they print, spacing commands
/// as their space, sub- and superscripts at 0.7, a matrix environment as
/// its widest row, braces and source spaces as nothing. A measure for
/// choosing line breaks, not a typesetter.
pub fn rendered_width(latex: &str) -> f64 {
    let b = latex.as_bytes();
    let mut w = 0.0;
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        match c {
            b'\\' => {
                let start = i + 1;
                let mut k = start;
                while k < b.len() && b[k].is_ascii_alphabetic() {
                    k += 1;
                }
                let name = &latex[start..k];
                if name.is_empty() {
                    // \, \; \! \\ and escaped characters
                    w += match b.get(start) {
                        Some(b',') | Some(b';') | Some(b':') => 0.3,
                        Some(b'!') => 0.0,
                        _ => 1.0,
                    };
                    i = start + 1;
                    continue;
                }
                if name == "begin" {
                    // a matrix: its widest row, plus the brackets
                    let env_end = latex[k..].find("\\end{").map_or(b.len(), |p| k + p);
                    let inner_start = group_end(b, k);
                    let inner = &latex[inner_start.min(env_end)..env_end];
                    let widest = inner
                        .split("\\\\")
                        .map(|row| {
                            row.split('&').map(rendered_width).sum::<f64>()
                                + 2.0 * row.matches('&').count() as f64
                        })
                        .fold(0.0, f64::max);
                    // column gaps of about two characters, and the brackets
                    w += widest + 3.0;
                    i = group_end(b, env_end + 4);
                    continue;
                }
                w += match name {
                    "quad" => 2.0,
                    "qquad" => 4.0,
                    "left" | "right" | "mathrm" | "mathit" | "text" | "hat" | "displaystyle" => 0.0,
                    "frac" => {
                        let a_end = group_end(b, k);
                        let b_end = group_end(b, a_end);
                        let num = rendered_width(&latex[k..a_end]);
                        let den = rendered_width(&latex[a_end..b_end]);
                        w += num.max(den) + 0.5;
                        i = b_end;
                        continue;
                    }
                    "sum" => 2.0,
                    _ => 1.0,
                };
                i = k;
            }
            b'_' | b'^' => {
                let (inner, next) = if b.get(i + 1) == Some(&b'{') {
                    let e = group_end(b, i + 1);
                    (&latex[i + 2..e.saturating_sub(1).max(i + 2)], e)
                } else {
                    (&latex[(i + 1).min(b.len())..(i + 2).min(b.len())], i + 2)
                };
                w += 0.7 * rendered_width(inner);
                i = next;
            }
            b'{' | b'}' | b' ' => i += 1,
            b'+' | b'-' | b'=' => {
                w += 1.6;
                i += 1;
            }
            _ => {
                w += 1.0;
                i += latex[i..].chars().next().map_or(1, char::len_utf8);
            }
        }
    }
    w
}

/// The LaTeX of an expression as lines of whole terms, each line within
/// `LINE_BUDGET` where a term allows.
pub fn term_lines(e: &Expr) -> Vec<String> {
    let whole = latex::expr(e);
    if fits(&whole, LINE_BUDGET) {
        return vec![whole];
    }
    if e.terms().len() < 2 {
        return packed_lines(&whole, LINE_BUDGET);
    }
    let mut lines: Vec<String> = Vec::new();
    let mut current = String::new();
    for (i, t) in e.terms().iter().enumerate() {
        let text = latex::expr(&Expr::from_term(t.clone()));
        let piece = match (i, text.strip_prefix('-')) {
            (0, _) => text.clone(),
            (_, Some(rest)) => format!("- {}", rest.trim_start()),
            (_, None) => format!("+ {text}"),
        };
        if !current.is_empty() && !fits(&format!("{current} {piece}"), LINE_BUDGET) {
            lines.push(std::mem::take(&mut current));
        }
        if !fits(&piece, LINE_BUDGET) {
            // a term longer than a line breaks between its factors
            let mut parts = packed_lines(&piece, LINE_BUDGET);
            let last = parts.pop().unwrap_or_default();
            lines.extend(parts);
            current = last;
            continue;
        }
        if !current.is_empty() {
            current.push(' ');
        }
        current.push_str(&piece);
    }
    lines.push(current);
    lines
}

/// Places where one term's LaTeX may break over lines: spaces outside
/// every brace group, environment and `\left ... \right` pair (between
/// factors of a product, after a sum's sign). Returns the pieces.
pub fn breakable_pieces(latex: &str) -> Vec<String> {
    let mut pieces = Vec::new();
    let mut current = String::new();
    let mut depth: i64 = 0;
    let b = latex.as_bytes();
    let mut i = 0;
    while i < b.len() {
        let rest = &latex[i..];
        for (open, close) in [
            ("\\begin{", "\\end{"),
            ("\\left", "\\right"),
            ("\\langle", "\\rangle"),
        ] {
            if rest.starts_with(open) {
                depth += 1;
            } else if rest.starts_with(close) {
                depth -= 1;
            }
        }
        let c = rest.chars().next().expect("inside the string");
        match c {
            '{' => depth += 1,
            '}' => depth -= 1,
            ' ' if depth == 0 && !current.is_empty() => {
                pieces.push(std::mem::take(&mut current));
                i += 1;
                continue;
            }
            _ => {}
        }
        current.push(c);
        i += c.len_utf8();
    }
    if !current.is_empty() {
        pieces.push(current);
    }
    pieces
}

/// One term's LaTeX packed into lines within `budget` characters of
/// estimated width, broken only between factors (a factor wider than the
/// budget keeps its line).
pub fn packed_lines(latex: &str, budget: usize) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut current = String::new();
    for piece in breakable_pieces(latex) {
        // a sign or a lone operator stays with what follows it
        let joins = current.ends_with('-') || current.ends_with('+') || current.ends_with('=');
        if !current.is_empty() && !joins && !fits(&format!("{current} {piece}"), budget) {
            lines.push(std::mem::take(&mut current));
        }
        if !current.is_empty() {
            current.push(' ');
        }
        current.push_str(&piece);
    }
    if !current.is_empty() {
        lines.push(current);
    }
    lines
}

/// True when `latex` is estimated to fit in `budget` characters.
fn fits(latex: &str, budget: usize) -> bool {
    rendered_width(latex) <= budget as f64
}

/// `lhs = rhs` (or `rhs` alone) as a `multline*`, broken between terms.
pub fn equation(lhs: &[String], rhs: &Expr) -> String {
    let mut lines = lhs.to_vec();
    for (i, r) in term_lines(rhs).into_iter().enumerate() {
        let lead = if i == 0 && !lhs.is_empty() { "= " } else { "" };
        lines.push(format!("{lead}{r}"));
    }
    multline(&lines)
}

/// Lines of LaTeX as a `multline*`.
pub fn multline(lines: &[String]) -> String {
    format!(
        "\\begin{{multline*}}\n{}\n\\end{{multline*}}\n",
        lines.join(" \\\\\n")
    )
}

/// Plain text made safe for LaTeX's text mode.
pub fn text(s: &str) -> String {
    s.chars()
        .map(|c| match c {
            '_' | '%' | '&' | '#' | '$' | '{' | '}' => format!("\\{c}"),
            '\\' => "\\textbackslash{}".into(),
            '^' | '~' => format!("\\{c}{{}}"),
            c => c.to_string(),
        })
        .collect()
}

/// A standalone article (amsmath, amssymb) with a section title and the
/// body as given (LaTeX).
pub fn article(title: &str, body: &str) -> String {
    format!(
        "\\documentclass{{article}}\n\\usepackage{{amsmath,amssymb}}\n\\begin{{document}}\n\\section*{{{}}}\n{}\\end{{document}}\n",
        text(title),
        body
    )
}

/// A derivation as an `align*` chain that fits a text width: the input,
/// then each step's result (broken between factors where long), each
/// followed by its label (the published source) on a line of its own in
/// small type.
pub fn chain(input: &str, steps: &[(Expr, String)]) -> String {
    let mut out = String::from("\\begin{align*}\n");
    let write = |out: &mut String, e: &str, lead: &str, label: Option<&str>, last: bool| {
        let lines = packed_lines(e, LINE_BUDGET - 14);
        for (i, l) in lines.iter().enumerate() {
            let head = if i == 0 { lead } else { "&\\quad " };
            let end = if i + 1 == lines.len() && label.is_none() && last {
                ""
            } else {
                " \\\\"
            };
            out.push_str(&format!("  {head}{l}{end}\n"));
        }
        if let Some(label) = label {
            let end = if last { "" } else { " \\\\" };
            out.push_str(&format!(
                "  &\\qquad \\parbox[t]{{0.8\\linewidth}}{{\\raggedright\\footnotesize ({label})}}{end}\n"
            ));
        }
    };
    write(&mut out, input, "& ", None, steps.is_empty());
    for (i, (after, label)) in steps.iter().enumerate() {
        write(&mut out, &latex::expr(after), "&= ", Some(label), i + 1 == steps.len());
    }
    out.push_str("\\end{align*}\n");
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn breaks_fall_between_factors_only() {
        let e = crate::syntax::parse(
            "sum(ma, mb, mc, mx, my: <a, ma; b, mb | x, mx> <a, ma; y, my | J, M> (b, c, y; mb, mc, -my) {a, b, x; c, J, y} <x, mx; c, mc | J, M>)",
        )
        .unwrap();
        let whole = latex::expr(&e);
        let lines = packed_lines(&whole, 30);
        assert!(lines.len() > 2, "{lines:?}");
        // nothing is lost or reordered
        assert_eq!(lines.join(" "), breakable_pieces(&whole).join(" "));
        for l in &lines {
            // every bracket, environment and group closes on its line
            assert_eq!(l.matches("\\langle").count(), l.matches("\\rangle").count(), "{l}");
            assert_eq!(l.matches("\\begin{").count(), l.matches("\\end{").count(), "{l}");
            assert_eq!(l.matches('{').count(), l.matches('}').count(), "{l}");
        }
    }

    #[test]
    fn a_matrix_is_as_wide_as_its_widest_row() {
        let three_j = "\\begin{pmatrix} a & b & c \\\\ m_a & m_b & -m_c \\end{pmatrix}";
        let w = rendered_width(three_j);
        // the lower row: three entries with subscripts, a sign, two
        // column gaps, and the brackets
        assert!((8.0..16.0).contains(&w), "{w}");
        assert!(rendered_width("\\langle a\\, m_a | J\\, M \\rangle") < 12.0);
        assert!(rendered_width("x") == 1.0);
    }
}
