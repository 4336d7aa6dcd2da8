//! The `data` stage: one data file → a typed [`Table`], checked against the codebook.
//!
//! Input is a resolved [`TableSpec`] (path, format, missing tokens, declared columns, and which
//! of them to read); output is a [`Table`] whose guarantees are listed on that type: exactly the
//! declared columns that are read, categorical cells within the declared levels, finite
//! numbers, non-negative ratio values, no missing ids. Otherwise every data error of the file is
//! returned (codes `D0001`–`D0027`, documented in `grammar/README.md`, §13), the first
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
