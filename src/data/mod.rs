//! The `data` stage: one CSV or TSV file → a typed [`Table`], checked against the codebook.
//!
//! Input is a resolved [`TableSpec`] (path, missing tokens, declared columns); output is a
//! [`Table`] whose guarantees are listed on that type: exactly the declared columns,
//! categorical cells within the declared levels, finite numbers, non-negative ratio values,
//! no missing ids. Otherwise every data error of the file is returned (codes `D0001`–`D0016`
//! and `D0020`,
//! documented in `grammar/README.md`, §13), the first [`MAX_DIAGNOSTICS`] in full and the
//! rest summed up in one closing diagnostic.
//!
//! Reading rules: the first row is the header; a `.tsv` file is tab separated, any other file
//! comma separated; fields may be quoted (RFC 4180, doubled quotes inside); blank lines and
//! rows of empty fields are skipped (but count in row numbers, as in a spreadsheet); a UTF-8
//! byte-order mark is skipped; undeclared columns are ignored. The file must
//! be UTF-8 text without NUL bytes and at most [`MAX_FILE_BYTES`] long.
//!
//! When the file is UTF-8, its whole text (byte-order mark included) is added to the
//! [`SourceMap`], and every diagnostic about a row, a cell or the header points into it: a
//! cell's span is the field's bytes, quotes included.
//!
//! Invariant: the file is only ever opened for reading. Nothing here panics on any input.
//! The result depends only on the bytes and the spec (no hash order, clock or locale).

mod cells;
mod load;
mod messages;
mod numbers;
mod parse;
mod records;
mod report;
mod spec;
mod table;

pub use load::{ReadLimits, MAX_DIAGNOSTICS, MAX_FILE_BYTES};
pub use spec::{ColumnKind, ColumnSpec, TableSpec};
pub use table::{Column, RowPlace, Table};

use crate::diag::{Diagnostic, SourceMap};

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
    let bytes = load::read_bytes(spec, limits).map_err(|d| vec![d])?;
    parse_owned(spec, bytes, sources, limits)
}

/// Reads `bytes` as the content of `spec.path` (no file is opened), with the default
/// [`ReadLimits`]. `spec.path` still decides the separator and names the file in messages.
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
    load::check_size(spec, limits, bytes.len()).map_err(|d| vec![d])?;
    parse_owned(spec, bytes.to_vec(), sources, limits)
}

fn parse_owned(
    spec: &TableSpec,
    bytes: Vec<u8>,
    sources: &mut SourceMap,
    limits: &ReadLimits,
) -> Result<Table, Vec<Diagnostic>> {
    let text = load::decode(spec, bytes).map_err(|d| vec![d])?;
    let source = sources.add(&spec.path, text);
    parse::parse_text(spec, source, sources.text(source), limits)
}
