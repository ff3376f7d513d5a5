//! Output formats: LaTeX for papers and the text layouts of reports.

pub mod arrange;
pub mod document;
pub mod latex;
pub mod table;
pub mod written;

/// A float the way numeric codes read it: plain for moderate magnitudes,
/// with an exponent otherwise (`8.267784316442887e-25`).
pub fn fmt_float(f: f64) -> String {
    if f != 0.0 && (f.abs() < 1e-4 || f.abs() >= 1e16) {
        format!("{f:e}")
    } else {
        format!("{f}")
    }
}
