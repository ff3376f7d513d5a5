//! Output formats: LaTeX for papers and the text layouts of reports.

pub mod latex;
pub mod table;
