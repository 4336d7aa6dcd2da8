//! Reading a data file's text into a [`Table`], checking every cell against the codebook.
//!
//! One pass over the rows: the header is matched to the declared columns, then each row is
//! checked for its width and each declared cell is read by its column's builder. Rows of empty
//! fields only are skipped like blank lines. Every problem is reported (up to the per-file
//! cap, see [`super::report`]); a row of the wrong width is reported once and its cells are
//! not read, since they cannot be matched to columns.

use std::borrow::Cow;

use crate::diag::{Code, Diagnostic, SourceId, Span};

use super::cells::ColumnBuilder;
use super::load::ReadLimits;
use super::messages::{self, CellAt, HeaderRow, RaggedRow};
use super::records::{Row, Rows};
use super::report::Report;
use super::spec::{delimiter_for, TableSpec};
use super::table::{NamedColumn, RowPlace, Table};

const BYTE_ORDER_MARK: char = '\u{feff}';

/// Reads `text`, the whole file as added to the source map under `source`.
pub(super) fn parse_text(
    spec: &TableSpec,
    source: SourceId,
    text: &str,
    limits: &ReadLimits,
) -> Result<Table, Vec<Diagnostic>> {
    let mut report = Report::new(&spec.path, spec.path_span, limits.max_diagnostics);
    let delimiter = delimiter_for(spec);
    let (body, body_offset) = match text.strip_prefix(BYTE_ORDER_MARK) {
        Some(body) => (body, BYTE_ORDER_MARK.len_utf8()),
        None => (text, 0),
    };
    let mut rows = Rows::new(body, body_offset, source, delimiter);
    let Some(header) = read_header(spec, &mut rows, &mut report, delimiter) else {
        return Err(report.finish());
    };
    let fields = locate_columns(spec, &header, &mut report, delimiter);
    let mut reading = Reading {
        spec,
        header: &header,
        fields: &fields,
        order: reading_order(&fields),
        builders: spec
            .columns
            .iter()
            .map(|c| ColumnBuilder::new(&c.kind))
            .collect(),
        places: Vec::new(),
        delimiter,
    };
    loop {
        match rows.next_row() {
            Ok(Some(row)) => reading.read_row(&row, &mut report),
            Ok(None) => break,
            Err(error) => {
                report.add(Code::Malformed, |file| {
                    messages::not_csv(spec, file, &error)
                });
                break;
            }
        }
    }
    if reading.places.is_empty() {
        report.add(Code::HeaderOnly, |file| {
            messages::header_only(file, &header)
        });
    }
    if !report.is_empty() {
        return Err(report.finish());
    }
    Ok(reading.finish(source, &header))
}

/// The header row, or `None` (with the error reported) when there is none to trust.
fn read_header(
    spec: &TableSpec,
    rows: &mut Rows,
    report: &mut Report,
    delimiter: u8,
) -> Option<HeaderRow> {
    let row = match rows.next_row() {
        Ok(Some(row)) => row,
        Ok(None) => {
            report.add(Code::EmptyFile, |file| {
                messages::empty_file(spec, file, delimiter)
            });
            return None;
        }
        Err(error) => {
            report.add(Code::Malformed, |file| {
                messages::not_csv(spec, file, &error)
            });
            return None;
        }
    };
    if row.unclosed_quote {
        report.add(Code::Malformed, |file| unclosed_quote(file, &row));
        return None;
    }
    Some(HeaderRow {
        names: (0..row.len())
            .map(|i| row.field(i).map(Cow::into_owned).unwrap_or_default())
            .collect(),
        spans: (0..row.len()).map(|i| row.field_span(i)).collect(),
        span: row.span,
    })
}

fn unclosed_quote(file: &str, row: &Row) -> Diagnostic {
    // The open field is the row's last; its first byte is the opening quote.
    let field = row.field_span(row.len().saturating_sub(1));
    let quote_at = Span::new(field.source, field.start, (field.start + 1).min(field.end));
    messages::unclosed_quote(file, row.file_row, row.line, quote_at)
}

/// The field index of each declared column; `None` (reported) when the header lacks it or
/// has it more than once.
fn locate_columns(
    spec: &TableSpec,
    header: &HeaderRow,
    report: &mut Report,
    delimiter: u8,
) -> Vec<Option<usize>> {
    spec.columns
        .iter()
        .map(|column| {
            let found: Vec<usize> = (0..header.names.len())
                .filter(|&i| header.names[i] == column.header)
                .collect();
            match found.as_slice() {
                [index] => Some(*index),
                [] => {
                    report.add(Code::MissingColumn, |file| {
                        messages::missing_column(file, column, header, delimiter)
                    });
                    None
                }
                _ => {
                    let spans: Vec<Span> = found.iter().map(|&i| header.spans[i]).collect();
                    report.add(Code::DuplicateHeader, |file| {
                        messages::duplicate_header(file, column, &spans)
                    });
                    None
                }
            }
        })
        .collect()
}

/// Declared columns in the order their cells appear in a row (left to right, then the
/// columns the header lacks), so a row's errors are reported in reading order.
fn reading_order(fields: &[Option<usize>]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..fields.len()).collect();
    order.sort_by_key(|&i| fields[i].unwrap_or(usize::MAX));
    order
}

/// A row of separators and spaces only (`,,,`, as spreadsheets export trailing empty rows):
/// it carries nothing, so it is skipped like a blank line rather than read as missing cells.
fn is_empty_row(row: &Row) -> bool {
    !row.unclosed_quote && (0..row.len()).all(|i| row.field(i).is_some_and(|f| f.trim().is_empty()))
}

/// The state of one pass over the data rows.
struct Reading<'a> {
    spec: &'a TableSpec,
    header: &'a HeaderRow,
    fields: &'a [Option<usize>],
    order: Vec<usize>,
    builders: Vec<ColumnBuilder>,
    places: Vec<RowPlace>,
    delimiter: u8,
}

impl Reading<'_> {
    fn read_row(&mut self, row: &Row, report: &mut Report) {
        if is_empty_row(row) {
            return;
        }
        self.places.push(RowPlace {
            file_row: row.file_row,
            line: row.line,
            span: row.span,
        });
        let readable = self.check_shape(row, report);
        for &col in &self.order {
            let field = self.fields[col].filter(|_| readable);
            let value = field.and_then(|i| row.field(i));
            let Err(problem) = self.builders[col].push(value.as_deref(), &self.spec.missing) else {
                continue;
            };
            report.add(problem.code(), |file| {
                let cell = CellAt {
                    file,
                    file_row: row.file_row,
                    line: row.line,
                    column: &self.spec.columns[col],
                    value: value.as_deref().unwrap_or_default(),
                    span: field.map_or(row.span, |i| row.field_span(i)),
                };
                messages::cell_problem(&cell, problem)
            });
        }
    }

    /// Reports a row whose quote never closes or whose width differs from the header's;
    /// `false` when its cells cannot be read.
    fn check_shape(&self, row: &Row, report: &mut Report) -> bool {
        if row.unclosed_quote {
            report.add(Code::Malformed, |file| unclosed_quote(file, row));
            return false;
        }
        let n_header = self.header.names.len();
        if row.len() == n_header {
            return true;
        }
        let ragged = RaggedRow {
            file_row: row.file_row,
            line: row.line,
            span: row.span,
            n_fields: row.len(),
            extra_fields_empty: (n_header..row.len())
                .all(|i| row.field(i).is_some_and(|f| f.trim().is_empty())),
        };
        report.add(Code::RaggedRow, |file| {
            messages::ragged_row(file, &ragged, self.header, self.delimiter)
        });
        false
    }

    fn finish(self, source: SourceId, header: &HeaderRow) -> Table {
        let columns = self
            .spec
            .columns
            .iter()
            .zip(self.builders)
            .zip(self.fields)
            .map(|((spec, builder), field)| NamedColumn {
                name: spec.name.clone(),
                header_span: field.map_or(header.span, |i| header.spans[i]),
                column: builder.finish(),
            })
            .collect();
        Table {
            path: self.spec.path.clone(),
            source,
            columns,
            rows: self.places,
        }
    }
}
