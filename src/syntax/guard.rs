//! Checks on the raw text before the grammar runs, so that no input can
//! exhaust the stack or be silently read as something else: the nesting
//! depth of brackets, runs of unary signs, and a line break that would
//! otherwise turn two expressions into their product.

use super::error::ParseError;

/// Deepest nesting of brackets an input may have.
pub const MAX_DEPTH: usize = 200;
/// Longest run of signs (`-`, `+`) in a row.
pub const MAX_SIGN_RUN: usize = 200;
/// Longest input accepted, in bytes.
pub const MAX_INPUT: usize = 1 << 20;

/// Checks the text of an expression (or a coupling tree).
pub fn check(input: &str) -> Result<(), ParseError> {
    if input.trim().is_empty() {
        return Err(ParseError::at(
            input,
            input.len(),
            "the text is empty (nothing to read)",
        ));
    }
    if input.len() > MAX_INPUT {
        return Err(ParseError::at(
            input,
            MAX_INPUT,
            format!("the input is longer than {MAX_INPUT} bytes; split it up"),
        ));
    }
    let bytes = input.as_bytes();
    let mut depth = 0usize;
    let mut signs = 0usize;
    for (i, &b) in bytes.iter().enumerate() {
        match b {
            b'(' | b'{' | b'<' | b'[' => {
                depth += 1;
                if depth > MAX_DEPTH {
                    return Err(ParseError::at(
                        input,
                        i,
                        format!("brackets nest deeper than {MAX_DEPTH} levels here"),
                    ));
                }
            }
            b')' | b'}' | b'>' | b']' => depth = depth.saturating_sub(1),
            _ => {}
        }
        match b {
            b'-' | b'+' => {
                signs += 1;
                if signs > MAX_SIGN_RUN {
                    return Err(ParseError::at(
                        input,
                        i,
                        format!("more than {MAX_SIGN_RUN} signs in a row here"),
                    ));
                }
            }
            b' ' | b'\t' | b'\r' | b'\n' => {}
            _ => signs = 0,
        }
    }
    split_across_lines(input)
}

/// A line break outside every bracket, between a complete operand and the
/// start of another, would read as a product: almost always two
/// expressions where one was meant (one per line belongs to `--batch`).
fn split_across_lines(input: &str) -> Result<(), ParseError> {
    let bytes = input.as_bytes();
    let mut depth = 0usize;
    let mut last_significant: Option<u8> = None;
    let mut newline_since_last = false;
    for (i, &b) in bytes.iter().enumerate() {
        match b {
            b' ' | b'\t' | b'\r' => continue,
            b'\n' => {
                if depth == 0 {
                    newline_since_last = true;
                }
                continue;
            }
            _ => {}
        }
        let starts_operand = b.is_ascii_alphanumeric() || matches!(b, b'(' | b'{' | b'<');
        if newline_since_last && starts_operand {
            if let Some(prev) = last_significant {
                // `;` and `,` outside brackets end or continue a declaration
                if !matches!(prev, b'+' | b'-' | b'*' | b'/' | b'^' | b';' | b',') {
                    return Err(ParseError::at(
                        input,
                        i,
                        "a new line starts a second expression here; one expression is read (join the lines, or end the first with * to continue a product; a batch of values takes one expression per line)",
                    ));
                }
            }
        }
        newline_since_last = false;
        match b {
            b'(' | b'{' | b'<' | b'[' => depth += 1,
            b')' | b'}' | b'>' | b']' => depth = depth.saturating_sub(1),
            _ => {}
        }
        last_significant = Some(b);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn deep_nesting_and_long_sign_runs_are_refused_with_a_position() {
        let deep = "sqrt(".repeat(10_000) + "1";
        let e = check(&deep).unwrap_err();
        assert_eq!(e.column, 5 * MAX_DEPTH + 5);
        let signs = "-".repeat(100_000) + "1";
        assert!(check(&signs)
            .unwrap_err()
            .message
            .contains("signs in a row"));
        assert!(check(&("-".repeat(50) + "1")).is_ok());
    }

    #[test]
    fn a_line_break_between_two_operands_is_an_error() {
        let e = check("1/2\n3").unwrap_err();
        assert_eq!((e.line, e.column), (2, 1));
        // continued lines: an operator at the end, or inside brackets
        assert!(check("1/2 *\n3").is_ok());
        assert!(check("1/2\n+ 3").is_ok());
        assert!(check("sum(x: (2*x+1)\n {a, b, x; a, b, c})").is_ok());
    }
}
