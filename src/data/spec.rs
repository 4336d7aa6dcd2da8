//! What the data stage is asked to read: one file and the columns the codebook declares.
//!
//! The checker builds a [`TableSpec`] from a resolved `data` block. Everything here is already
//! resolved: the path is absolute (or relative to the working folder), defaults are applied to
//! the missing tokens, and every column knows the header it is read from.

use std::path::PathBuf;

use crate::diag::Span;

/// One data file and the columns to read from it.
#[derive(Debug, Clone, PartialEq)]
pub struct TableSpec {
    /// The file to read, already resolved against the spec file's folder.
    pub path: PathBuf,
    /// The path string in the spec; errors about the file as a whole point here.
    pub path_span: Span,
    /// Cell texts read as missing (the codebook default is `""` and `"NA"`).
    pub missing: Vec<String>,
    /// The declared columns, in declaration order. Undeclared columns of the file are ignored.
    pub columns: Vec<ColumnSpec>,
}

/// One declared variable and the file column it is read from.
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnSpec {
    /// The variable's name in the spec.
    pub name: String,
    /// The header it is read from: `column("...")` when given, else the name.
    pub header: String,
    /// The declaration in the spec.
    pub decl_span: Span,
    pub kind: ColumnKind,
}

/// How the cells of a column are read.
#[derive(Debug, Clone, PartialEq)]
pub enum ColumnKind {
    /// Identifies the observational unit; any text except a missing token.
    Id,
    /// Nominal or ordinal categories.
    Categorical {
        /// The declared levels, complete and in display order; `None` = the distinct values in
        /// order of first appearance.
        levels: Option<Vec<String>>,
        ordered: bool,
    },
    /// Interval or ratio numbers; `ratio` columns have a true zero and reject negative values.
    Numeric { ratio: bool },
}

/// The field separator: tab for a `.tsv` file (any letter case), comma for everything else.
pub(super) fn delimiter_for(spec: &TableSpec) -> u8 {
    let is_tsv = spec
        .path
        .extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("tsv"));
    if is_tsv {
        b'\t'
    } else {
        b','
    }
}
