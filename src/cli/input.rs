//! Reading the user's text: an EXPR argument or standard input (`-`),
//! with comment lines, a leading byte-order mark and invalid UTF-8 handled
//! explicitly, and the parsed expression's literal-zero notes.

use super::{Failure, Io};
use crate::algebra::declare;
use crate::evaluate::EvalError;
use crate::expr::Expr;

/// Decodes bytes as UTF-8, or says where the first invalid byte is.
pub fn decode(bytes: &[u8], what: &str) -> Result<String, String> {
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.strip_prefix('\u{feff}').unwrap_or(s).to_string()),
        Err(e) => {
            let at = e.valid_up_to();
            let before = &bytes[..at];
            let line = before.iter().filter(|b| **b == b'\n').count() + 1;
            let line_start = before
                .iter()
                .rposition(|b| *b == b'\n')
                .map_or(0, |i| i + 1);
            let column = String::from_utf8_lossy(&bytes[line_start..at])
                .chars()
                .count()
                + 1;
            let place = if bytes.contains(&b'\n') {
                format!("line {line}, column {column}")
            } else {
                format!("column {column}")
            };
            Err(format!(
                "{what} is not valid UTF-8: byte 0x{:02x} at {place}",
                bytes[at]
            ))
        }
    }
}

/// Reads an EXPR argument, `-` meaning standard input (where lines that
/// start with `#` are comments, as in the sample files; they are blanked
/// so that error positions keep the file's line numbers).
pub fn read_arg(s: &str, io: &mut Io) -> Result<String, Failure> {
    if s != "-" {
        return Ok(s.strip_prefix('\u{feff}').unwrap_or(s).to_string());
    }
    let mut buf = Vec::new();
    io.stdin
        .read_to_end(&mut buf)
        .map_err(|e| Failure::input(format!("cannot read standard input: {e}")))?;
    let text = decode(&buf, "standard input").map_err(Failure::input)?;
    let lines: Vec<&str> = text
        .split('\n')
        .map(|l| {
            let l = l.strip_suffix('\r').unwrap_or(l);
            if l.trim_start().starts_with('#') {
                ""
            } else {
                l
            }
        })
        .collect();
    let joined = lines.join("\n");
    if joined.trim().is_empty() {
        return Err(Failure::input(
            "standard input holds no expression (only blank or # comment lines)",
        ));
    }
    Ok(joined.trim_end().to_string())
}

/// Parses an expression, mapping parse errors to bad input; declarations
/// in the text join those in force (from --integer and --half-odd) for the
/// rest of the command.
pub fn parse_expr(text: &str) -> Result<Expr, Failure> {
    let (declared, e) = crate::syntax::parse_declared(text)
        .map_err(|e| Failure::input(format!("parse error at {e}")))?;
    declare::add_to_current(&declared).map_err(|c| Failure::input(c.to_string()))?;
    // the ranks of a scalar product's factors are integers
    let mut implied = declare::Declarations::new();
    for name in crate::tensor::implied_integers(&e) {
        implied
            .declare(name, declare::Parity::Integer)
            .map_err(|c| Failure::input(c.to_string()))?;
    }
    declare::add_to_current(&implied).map_err(|c| {
        Failure::input(format!(
            "{c}: the rank of a factor of a scalar product (A . B), and the rank and orbital angular momentum of C[k], are integers"
        ))
    })?;
    if let Some(problem) = crate::api::summed_declaration_problem(&e) {
        return Err(Failure::input(problem));
    }
    Ok(e)
}

/// Turns a phase with a non-integer exponent into a message about the
/// phase as the user wrote it, at the point, with the declaration that
/// would rule such points out.
pub fn explain_phase(text: &str, e: &Expr, err: EvalError) -> Failure {
    let Some((msg, names)) = crate::api::explain_phase(text, e, &err) else {
        return err.into();
    };
    if names.is_empty() {
        return Failure::input(msg);
    }
    Failure::input(format!(
        "{msg}. If {} only take{} integer values, declare so: --integer {} (or begin the expression with `integer {};`)",
        crate::api::spoken_list(&names),
        if names.len() == 1 { "s" } else { "" },
        names.join(","),
        names.join(", ")
    ))
}

/// Says on standard error which symbols are 0 because a literal
/// projection exceeds its angular momentum (the usual convention).
pub fn validate_literals(e: &Expr, _text: &str, io: &mut Io) -> Result<(), Failure> {
    for note in crate::syntax::literal_zero_notes(e) {
        writeln!(io.err, "recoup: note: {note}")?;
    }
    Ok(())
}
