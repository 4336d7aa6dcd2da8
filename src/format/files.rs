//! Formatting files: finding specs, comparing them with their canonical text, rewriting them.
//!
//! Guarantees: a file is rewritten only when its text changes, atomically (a temporary file in
//! the same folder, then a rename); in [`Mode::Check`] nothing is written. A file that does
//! not parse is left alone and its syntax errors are returned.

use std::path::PathBuf;

use crate::build::{load, write_atomic, BuildError};
use crate::diag::{Diagnostic, SourceMap};

use super::{format_source, FormatError};

/// Whether files are rewritten or only compared.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mode {
    Write,
    Check,
}

/// The outcome of formatting a set of files.
#[derive(Debug, Default)]
pub struct FormatReport {
    /// Every spec text read (diagnostics point into it).
    pub sources: SourceMap,
    /// Syntax errors of files that could not be formatted.
    pub diagnostics: Vec<Diagnostic>,
    /// Files whose text differs from the canonical one (rewritten in [`Mode::Write`]).
    pub changed: Vec<PathBuf>,
    /// Files already in the canonical layout.
    pub unchanged: Vec<PathBuf>,
}

/// Formats every spec file named in `paths` or found in the folders named there.
pub fn format_paths(paths: &[PathBuf], mode: Mode) -> Result<FormatReport, BuildError> {
    let mut report = FormatReport::default();
    for path in load::find_specs(paths)? {
        let text = load::read_spec_text(&path)?;
        let id = report.sources.add(&path, text);
        match format_source(id, report.sources.text(id)) {
            Ok(formatted) if formatted == report.sources.text(id) => report.unchanged.push(path),
            Ok(formatted) => {
                if mode == Mode::Write {
                    write_atomic(&path, formatted.as_bytes())?;
                }
                report.changed.push(path);
            }
            Err(FormatError::Syntax(diags)) => report.diagnostics.extend(diags),
            Err(FormatError::Internal(message)) => {
                return Err(BuildError::Internal(format!(
                    "{}: {message}",
                    path.display()
                )))
            }
        }
    }
    Ok(report)
}
