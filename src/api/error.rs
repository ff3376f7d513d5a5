//! The library's typed error: what went wrong, in the library's words
//! (no command-line options are named), sorted into the four kinds a
//! caller acts on differently.

use crate::evaluate::EvalError;
use crate::recouple::RecoupleError;
use crate::simplify::SimplifyError;
use crate::syntax::ParseError;
use crate::verify::check::CheckError;

/// An error of the library API.
#[derive(Debug, Clone, thiserror::Error)]
pub enum Error {
    /// The text is not in the language, with its line and column.
    #[error("parse error at {0}")]
    Parse(ParseError),
    /// Well-formed input the library refuses: values out of range or of
    /// the wrong parity, a declaration that conflicts, a form the engine
    /// does not rewrite.
    #[error("{0}")]
    Input(String),
    /// A limit on the size or time of the work was reached.
    #[error("{0}")]
    Limit(String),
    /// A defect in recoup: an internal invariant failed, or a rewrite
    /// failed its verification (nothing unverified is returned).
    #[error("internal error: {0}")]
    Internal(String),
}

impl Error {
    /// The kind in one word: `parse`, `input`, `limit` or `internal`.
    pub fn kind(&self) -> &'static str {
        match self {
            Error::Parse(_) => "parse",
            Error::Input(_) => "input",
            Error::Limit(_) => "limit",
            Error::Internal(_) => "internal",
        }
    }

    /// The one-based line and column of a parse error.
    pub fn position(&self) -> Option<(usize, usize)> {
        match self {
            Error::Parse(p) => Some((p.line, p.column)),
            _ => None,
        }
    }
}

impl From<ParseError> for Error {
    fn from(e: ParseError) -> Self {
        Error::Parse(e)
    }
}

impl From<EvalError> for Error {
    fn from(e: EvalError) -> Self {
        match e {
            EvalError::TooLarge
            | EvalError::SymbolTooLarge(..)
            | EvalError::ElementTooLarge(_)
            | EvalError::TooSlow { .. } => Error::Limit(e.to_string()),
            other => Error::Input(other.to_string()),
        }
    }
}

impl From<SimplifyError> for Error {
    fn from(e: SimplifyError) -> Self {
        match e {
            SimplifyError::Eval(e) => e.into(),
            SimplifyError::Limit(m) => Error::Limit(m),
            SimplifyError::Unsupported(m) => Error::Input(m),
            other @ (SimplifyError::Unverified(_) | SimplifyError::Internal(_)) => {
                Error::Internal(other.to_string())
            }
        }
    }
}

impl From<RecoupleError> for Error {
    fn from(e: RecoupleError) -> Self {
        match e {
            RecoupleError::Simplify(s) => (*s).into(),
            RecoupleError::Limit(m) => Error::Limit(m),
            RecoupleError::Internal(m) => Error::Internal(m),
            other => Error::Input(other.to_string()),
        }
    }
}

impl From<CheckError> for Error {
    fn from(e: CheckError) -> Self {
        match e {
            CheckError::Eval(e) => e.into(),
            too_many @ CheckError::TooManyPoints { .. } => Error::Limit(too_many.to_string()),
        }
    }
}

impl From<crate::algebra::declare::Conflict> for Error {
    fn from(c: crate::algebra::declare::Conflict) -> Self {
        Error::Input(c.to_string())
    }
}

impl From<crate::limits::TimeUp> for Error {
    fn from(t: crate::limits::TimeUp) -> Self {
        Error::Limit(t.to_string())
    }
}
