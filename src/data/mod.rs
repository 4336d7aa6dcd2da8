//! The `data` stage: one data file → a typed [`Table`], checked against the codebook.
//!
//! Input is a resolved [`TableSpec`] (path, format, missing tokens, declared columns, and which
//! of them to read); output is a [`Table`] whose guarantees are listed on that type: exactly the
//! declared columns that are read, categorical cells within the declared levels, finite
//! numbers, non-negative ratio values, no missing ids. Otherwise every data error of the file is
//! returned (codes `D0001`–`D0026`, documented in `grammar/README.md`, §13), the first
//! [`MAX_DIAGNOSTICS`] in full and the rest summed up in one closing diagnostic.
//!
//! Formats ([`FileFormat`]): delimited text (`text`: CSV, TSV, any separator, a decimal comma,
//! any ASCII-compatible encoding), Excel workbooks (`workbook`, `.xlsx`), Parquet files
//! (`parquet`). Each reads its file as a stream into compact typed columns (`column`): memory
//! is the columns read plus a small buffer, not the file. Columns no figure being made uses are
//! only looked for in the header. Caps on rows, row length and distinct values
//! ([`ReadLimits`]) are data errors with their own codes.
//!
//! Diagnostics about a text file's rows and cells point into its text; that text is read into
//! the [`SourceMap`] again only when such a diagnostic is kept (see `report`), so a file
//! that reads cleanly is never held in memory.
//!
//! Invariant: the file is only ever opened for reading. Nothing here panics on any input.
//! The result depends only on the bytes and the spec (no hash order, clock or locale).

mod cells;
mod column;
mod header;
mod load;
mod messages;
mod numbers;
mod parquet;
mod reading;
mod report;
mod spec;
mod table;
mod text;
mod workbook;

pub use column::{Cells, Codes, MissingMask, Names, Numbers};
pub use load::{
    ReadLimits, MAX_DIAGNOSTICS, MAX_FILE_BYTES, MAX_LEVELS, MAX_ROWS, MAX_ROW_BYTES,
    MAX_UNPACKED_BYTES,
};
pub use spec::{
    column_letters, CellRange, ColumnKind, ColumnSpec, DecimalMark, FileFormat, Separator,
    TableSpec, TextFormat, WorkbookFormat,
};
pub use table::{Column, RowPlace, Table};

use crate::diag::{Diagnostic, SourceMap};

use load::Input;
use report::Report;

/// The stable codes of data errors (see `grammar/README.md`, §13).
pub mod codes {
    /// The file is missing, a folder, or cannot be read.
    pub const UNREADABLE: &str = "D0001";
    /// The file is larger than the size limit.
    pub const TOO_LARGE: &str = "D0002";
    /// The file is not UTF-8 text.
    pub const NOT_UTF8: &str = "D0003";
    /// The file holds a NUL byte (UTF-16 or not text).
    pub const NUL_BYTE: &str = "D0004";
    /// The file has no header row.
    pub const EMPTY_FILE: &str = "D0005";
    /// The file has a header row and no data rows.
    pub const HEADER_ONLY: &str = "D0006";
    /// A quoted field is never closed.
    pub const MALFORMED: &str = "D0007";
    /// A declared column is not in the header.
    pub const MISSING_COLUMN: &str = "D0008";
    /// A declared column's header appears more than once.
    pub const DUPLICATE_HEADER: &str = "D0009";
    /// A row has more or fewer fields than the header.
    pub const RAGGED_ROW: &str = "D0010";
    /// A categorical value outside the declared levels.
    pub const NOT_A_LEVEL: &str = "D0011";
    /// A non-numeric value in a numeric column.
    pub const NOT_A_NUMBER: &str = "D0012";
    /// `nan`, `inf` or a number too large for a double.
    pub const NOT_FINITE: &str = "D0013";
    /// A negative value in a ratio column.
    pub const NEGATIVE_RATIO: &str = "D0014";
    /// A missing id.
    pub const MISSING_ID: &str = "D0015";
    /// The summary of errors past the per-file cap.
    pub const MORE_ERRORS: &str = "D0016";
    /// A row of a text file longer than the row limit.
    pub const ROW_TOO_LONG: &str = "D0020";
    /// More distinct values than the cap in a categorical column without declared levels.
    pub const TOO_MANY_LEVELS: &str = "D0021";
    /// More data rows than the row limit.
    pub const TOO_MANY_ROWS: &str = "D0022";
    /// A workbook that cannot be read (not `.xlsx`, damaged, encrypted, too large unpacked).
    pub const NOT_A_WORKBOOK: &str = "D0023";
    /// The sheet the data block names is not in the workbook.
    pub const NO_SHEET: &str = "D0024";
    /// A Parquet file that cannot be read.
    pub const NOT_PARQUET: &str = "D0025";
    /// A Parquet column whose stored type cannot hold the declared variable's values.
    pub const COLUMN_TYPE: &str = "D0026";
}

/// Reads the file `spec.path` into a table, with the default [`ReadLimits`].
pub fn read_table(spec: &TableSpec, sources: &mut SourceMap) -> Result<Table, Vec<Diagnostic>> {
    read_table_with(spec, sources, &ReadLimits::default())
}

/// Reads the file `spec.path` into a table.
pub fn read_table_with(
    spec: &TableSpec,
    sources: &mut SourceMap,
    limits: &ReadLimits,
) -> Result<Table, Vec<Diagnostic>> {
    read(spec, Input::File, sources, limits)
}

/// Reads `bytes` as the content of `spec.path` (no file is opened), with the default
/// [`ReadLimits`]. `spec.path` still names the file in messages.
pub fn parse_table(
    spec: &TableSpec,
    bytes: &[u8],
    sources: &mut SourceMap,
) -> Result<Table, Vec<Diagnostic>> {
    parse_table_with(spec, bytes, sources, &ReadLimits::default())
}

/// Reads `bytes` as the content of `spec.path` (no file is opened).
pub fn parse_table_with(
    spec: &TableSpec,
    bytes: &[u8],
    sources: &mut SourceMap,
    limits: &ReadLimits,
) -> Result<Table, Vec<Diagnostic>> {
    read(spec, Input::Memory(bytes), sources, limits)
}

fn read(
    spec: &TableSpec,
    input: Input,
    sources: &mut SourceMap,
    limits: &ReadLimits,
) -> Result<Table, Vec<Diagnostic>> {
    let mut report = Report::new(&spec.path, spec.path_span, limits.max_diagnostics, sources);
    let table = match &spec.format {
        FileFormat::Text(format) => text::read(spec, format, input, limits, &mut report),
        FileFormat::Workbook(format) => workbook::read(spec, format, input, limits, &mut report),
        FileFormat::Parquet => parquet::read(spec, input, limits, &mut report),
    };
    if let (Some(table), true) = (table, report.is_empty()) {
        return Ok(table);
    }
    let text = match &spec.format {
        FileFormat::Text(format) if report.quotes_text() => {
            text::whole_text(spec, format, input, limits)
        }
        _ => None,
    };
    Err(report.finish(text, sources))
}
