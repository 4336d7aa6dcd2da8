//! Reading a delimited text file (CSV, TSV and their dialects) into a [`Table`].
//!
//! One pass as the file streams in: the header is matched to the declared columns, then each
//! row is checked for its width and each cell of a column that is read goes to its column's
//! builder. Rows of empty fields only are skipped like blank lines. Every problem is reported
//! (up to the per-file cap, see [`super::report`]); a row of the wrong width is reported once
//! and its cells are not read, since they cannot be matched to columns. Memory holds the
//! columns being built and a buffer of about one chunk plus the longest row, never the file.

mod decode;
mod rows;

use crate::diag::{Code, SourceId};

use super::cells::Cell;
use super::header::{self, Header, HeaderAt};
use super::load::{check_size, line_of, Input, ReadLimits};
use super::messages::{self, RaggedRow, RowAt};
use super::reading::{CellPlace, Reading};
use super::report::Report;
use super::spec::{Separator, TableSpec, TextFormat};
use super::table::{RowPlace, Table};

use decode::{DecodeError, Decoder};
use rows::{Row, RowError, Rows};

/// Reads a text file; `None` when it cannot be read to the end (with the errors reported).
pub(super) fn read(
    spec: &TableSpec,
    format: &TextFormat,
    input: Input,
    limits: &ReadLimits,
    report: &mut Report,
) -> Option<Table> {
    let opened = match input.open(spec, limits) {
        Ok(opened) => opened,
        Err(error) => return report.refuse(error),
    };
    let decoder = Decoder::new(opened.reader(limits), format.encoding);
    let mut file = TextFile {
        spec,
        format,
        input,
        limits,
        rows: Rows::new(decoder, format.separator.byte(), limits.max_row_bytes),
        source: report.text_source(),
    };
    let header = file.read_header(report)?;
    let fields = header::locate(spec, &header, Some(format.separator), report);
    let mut reading = Reading::new(spec, &fields, format.decimal, limits);
    let rules = RowRules {
        header: &header,
        source: file.source,
        separator: format.separator,
    };
    let complete = loop {
        match file.rows.next_row() {
            Ok(Some(row)) => {
                if !read_row(&mut reading, &row, &rules, report) {
                    break false;
                }
            }
            Ok(None) => break true,
            Err(error) => {
                file.report_error(error, report);
                break false;
            }
        }
    };
    let n_bytes = usize::try_from(file.rows.bytes_read()).unwrap_or(usize::MAX);
    if let Err(error) = check_size(spec, limits, n_bytes) {
        return report.refuse(error);
    }
    if complete && reading.n_rows() == 0 {
        report.add(Code::HeaderOnly, |file| {
            messages::header_only(file, &header, spec)
        });
    }
    complete.then(|| reading.finish())
}

/// The whole text of the file, for quoting its lines in diagnostics; `None` when it cannot be
/// read or decoded again.
pub(super) fn whole_text(
    spec: &TableSpec,
    format: &TextFormat,
    input: Input,
    limits: &ReadLimits,
) -> Option<String> {
    decode::decode_whole(input.read_all(spec, limits).ok()?, format.encoding)
}

/// A text file being read.
struct TextFile<'a, 'b> {
    spec: &'a TableSpec,
    format: &'a TextFormat,
    input: Input<'b>,
    limits: &'a ReadLimits,
    rows: Rows<'b>,
    /// The id of the file's text, for labels.
    source: SourceId,
}

impl TextFile<'_, '_> {
    /// The header row, or `None` (with the error reported) when there is none to trust.
    fn read_header(&mut self, report: &mut Report) -> Option<Header> {
        let (spec, separator, source) = (self.spec, self.format.separator, self.source);
        let row = match self.rows.next_row() {
            Ok(Some(row)) => row,
            Ok(None) => {
                report.add(Code::EmptyFile, |file| {
                    messages::empty_file(spec, file, Some(separator))
                });
                return None;
            }
            Err(error) => {
                self.report_error(error, report);
                return None;
            }
        };
        if row.unclosed_quote {
            report.add(Code::Malformed, |file| unclosed_quote(file, &row, source));
            return None;
        }
        Some(Header {
            names: (0..row.len())
                .map(|i| row.field(i).unwrap_or_default().to_owned())
                .collect(),
            at: HeaderAt::Text {
                span: row.span_in(source),
                fields: row.field_spans(source),
            },
        })
    }

    /// Reports why the rows stopped.
    fn report_error(&self, error: RowError, report: &mut Report) {
        let spec = self.spec;
        let diagnostic = match error {
            RowError::Decode(DecodeError::Io(e)) => messages::read_failed(spec, &e),
            RowError::Decode(DecodeError::NotText { file_offset }) => {
                match self.input.read_all(spec, self.limits) {
                    Ok(bytes) => {
                        let at = usize::try_from(file_offset).unwrap_or(usize::MAX);
                        messages::not_text(spec, self.format.encoding.name(), &bytes, at)
                    }
                    Err(e) => e,
                }
            }
            RowError::Decode(DecodeError::Nul) => {
                // In every encoding read here a NUL character is a 0 byte in the file.
                match self.input.read_all(spec, self.limits) {
                    Ok(bytes) => {
                        let at = memchr::memchr(0, &bytes).unwrap_or(0);
                        messages::nul_byte(spec, line_of(&bytes, at), at as u64)
                    }
                    Err(e) => e,
                }
            }
            RowError::Decode(DecodeError::NotTextChar(c)) => {
                match self.input.read_all(spec, self.limits) {
                    Ok(bytes) => {
                        let text = String::from_utf8_lossy(&bytes);
                        let at = text.find(c).unwrap_or(0);
                        messages::not_text_char(spec, c, line_of(text.as_bytes(), at), at as u64)
                    }
                    Err(e) => e,
                }
            }
            RowError::TooLong { file_row, line, .. } => {
                // Labelled at the path: quoting a line this long would copy it whole.
                let max = self.limits.max_row_bytes;
                let file = super::report::file_label(&spec.path);
                messages::row_too_long(&file, file_row, line, spec.path_span, max)
                    .with_file(&spec.path)
            }
        };
        report.add(diagnostic.code, |_| diagnostic);
    }
}

fn unclosed_quote(file: &str, row: &Row, source: SourceId) -> crate::diag::Diagnostic {
    messages::unclosed_quote(file, row.file_row, row.line, row.open_quote_span(source))
}

/// What every row is checked against: the header, the text's source id, the separator.
struct RowRules<'h> {
    header: &'h Header,
    source: SourceId,
    separator: Separator,
}

/// Reads one data row; `false` when reading must stop (too many rows).
fn read_row(reading: &mut Reading, row: &Row, rules: &RowRules, report: &mut Report) -> bool {
    let source = rules.source;
    if !row.unclosed_quote && row.is_blank() {
        return true;
    }
    let place = RowPlace {
        file_row: row.file_row,
        line: row.line,
    };
    if !reading.start_row(place, report) {
        return false;
    }
    let readable = check_shape(row, rules, report);
    for k in 0..reading.columns().len() {
        let field = reading.columns()[k].1;
        let cell = match readable {
            true => row.field(field).map_or(Cell::Unread, Cell::Text),
            false => Cell::Unread,
        };
        reading.read_cell(k, cell, report, || CellPlace {
            row: RowAt::Text {
                file_row: row.file_row,
                line: row.line,
            },
            sheet_column: None,
            span: row.field_span(source, field),
        });
    }
    true
}

/// Reports a row whose quote never closes or whose width differs from the header's;
/// `false` when its cells cannot be read.
fn check_shape(row: &Row, rules: &RowRules, report: &mut Report) -> bool {
    let (header, source, separator) = (rules.header, rules.source, rules.separator);
    if row.unclosed_quote {
        report.add(Code::Malformed, |file| unclosed_quote(file, row, source));
        return false;
    }
    let n_header = header.names.len();
    if row.len() == n_header {
        return true;
    }
    report.add(Code::RaggedRow, |file| {
        let ragged = RaggedRow {
            file_row: row.file_row,
            line: row.line,
            span: row.span_in(source),
            n_fields: row.len(),
            extra_fields_empty: row.blank_from(n_header),
        };
        messages::ragged_row(file, &ragged, header, separator)
    });
    false
}
