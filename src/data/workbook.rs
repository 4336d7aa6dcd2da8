//! Reading a sheet of an Excel workbook (`.xlsx`) into a [`Table`], with `calamine`.
//!
//! The sheet is the one the data block names (`sheet "Visits"`), or the first; `cells "B2:F200"`
//! limits reading to a block of cells. The first row with a value (within the block) is the
//! header; rows without a value are skipped, like blank lines. Cells are streamed in sheet
//! order, so memory holds the columns being built, the workbook's shared strings and one row.
//!
//! Cell values: numbers are numbers; text is read like a text file's cell (so `"12.5"` stored
//! as text is still a number, and `n/a` gets its hint); `TRUE`/`FALSE` are text; error values
//! (`#DIV/0!`) are their text; dates and times are refused in numeric columns and read as ISO
//! 8601 text (`2024-03-01`, `2024-03-01 14:30:00`) in categorical ones; a time span is its
//! number of days. Rows are numbered as the sheet shows them, and a bad cell is named by its
//! reference (`C14`).
//!
//! Before the workbook is opened, its zip directory is checked: parts that unpack to more than
//! [`ReadLimits::max_unpacked_bytes`] in all are refused (`D0024`), so a small file cannot
//! unpack into gigabytes (the unpacking itself stops at the declared sizes).

use crate::diag::Code;
use std::io::{Read, Seek};

use calamine::{DataRef, Reader, Xlsx};

use super::cells::{number_text, Cell};
use super::header::{self, Header, HeaderAt};
use super::load::{Input, Opened, ReadLimits};
use super::messages::{self, RowAt};
use super::reading::{CellPlace, Reading};
use super::report::Report;
use super::spec::{CellRange, DecimalMark, TableSpec, WorkbookFormat};
use super::table::{RowPlace, Table};

/// A cell's value, owned (shared strings are borrowed from the workbook otherwise).
#[derive(Debug, Clone, PartialEq)]
enum Value {
    Text(String),
    Number(f64),
    Date(String),
}

impl Value {
    fn of(data: &DataRef) -> Option<Value> {
        Some(match data {
            DataRef::Int(i) => Value::Number(*i as f64),
            DataRef::Float(f) => Value::Number(*f),
            DataRef::String(s) => Value::Text(s.clone()),
            DataRef::SharedString(s) => Value::Text((*s).to_owned()),
            DataRef::Bool(true) => Value::Text("TRUE".to_owned()),
            DataRef::Bool(false) => Value::Text("FALSE".to_owned()),
            DataRef::DateTime(dt) if dt.is_duration() => Value::Number(dt.as_f64()),
            DataRef::DateTime(dt) => Value::Date(match dt.as_datetime() {
                Some(t) if t.format("%H:%M:%S").to_string() == "00:00:00" => {
                    t.format("%Y-%m-%d").to_string()
                }
                Some(t) => t.format("%Y-%m-%d %H:%M:%S").to_string(),
                None => number_text(dt.as_f64()),
            }),
            DataRef::DateTimeIso(s) => Value::Date(s.clone()),
            DataRef::DurationIso(s) => Value::Text(s.clone()),
            DataRef::Error(e) => Value::Text(e.to_string()),
            DataRef::Empty => return None,
        })
    }

    fn cell(&self) -> Cell<'_> {
        match self {
            Value::Text(text) => Cell::Text(text),
            Value::Number(value) => Cell::Number(*value),
            Value::Date(text) => Cell::Date(text),
        }
    }

    /// Whether the value shows nothing (empty or spaces only text).
    fn is_blank(&self) -> bool {
        matches!(self, Value::Text(t) if t.trim().is_empty())
    }

    fn text(&self) -> String {
        self.cell().shown()
    }
}

/// One sheet row: (column, value) of its cells with a value, in column order.
type SheetRow = Vec<(u32, Value)>;

/// Reads the workbook's sheet; `None` when it cannot be read (with the errors reported).
pub(super) fn read(
    spec: &TableSpec,
    format: &WorkbookFormat,
    input: Input,
    limits: &ReadLimits,
    report: &mut Report,
) -> Option<Table> {
    let result = match input.open(spec, limits) {
        Ok(Opened::File(file)) => {
            read_from(spec, format, std::io::BufReader::new(file), limits, report)
        }
        Ok(Opened::Memory(bytes)) => {
            read_from(spec, format, std::io::Cursor::new(bytes), limits, report)
        }
        Err(error) => Err(error),
    };
    result.unwrap_or_else(|error| report.refuse(error))
}

fn read_from<R: Read + Seek>(
    spec: &TableSpec,
    format: &WorkbookFormat,
    mut reader: R,
    limits: &ReadLimits,
    report: &mut Report,
) -> Result<Option<Table>, crate::diag::Diagnostic> {
    check_unpacked_size(spec, &mut reader, limits.max_unpacked_bytes)?;
    let mut workbook: Xlsx<R> =
        Xlsx::new(reader).map_err(|e| messages::not_a_workbook(spec, &e.to_string()))?;
    let sheets = workbook.sheet_names();
    let sheet = match &format.sheet {
        Some(wanted) if sheets.contains(wanted) => wanted.clone(),
        Some(wanted) => return Err(messages::no_such_sheet(spec, wanted, &sheets)),
        None => match sheets.first() {
            Some(first) => first.clone(),
            None => return Err(messages::no_such_sheet(spec, "", &sheets)),
        },
    };
    let mut cells = workbook
        .worksheet_cells_reader(&sheet)
        .map_err(|e| messages::not_a_workbook(spec, &e.to_string()))?;
    let mut rows = SheetRows {
        cells: &mut cells,
        range: format.cells,
        pending: None,
        done: false,
    };
    let sheet_error = |e: calamine::XlsxError| messages::not_a_workbook(spec, &e.to_string());
    let Some((header_row, header_cells)) = rows.next_row().map_err(sheet_error)? else {
        report.add(Code::EmptyFile, |file| {
            messages::empty_file(spec, file, None)
        });
        return Ok(None);
    };
    let first_column = format.cells.map_or(0, |r| r.first_column);
    let header = sheet_header(header_row, first_column, &header_cells);
    let fields = header::locate(spec, &header, None, report);
    let mut reading = Reading::new(spec, &fields, DecimalMark::Point, limits);
    let columns: Vec<u32> = reading
        .columns()
        .iter()
        .map(|&(_, field)| first_column.saturating_add(u32::try_from(field).unwrap_or(u32::MAX)))
        .collect();
    while let Some((row, cells)) = rows.next_row().map_err(sheet_error)? {
        let place = RowPlace {
            file_row: row as usize + 1,
            line: row as usize + 1,
        };
        if !reading.start_row(place, report) {
            return Ok(None);
        }
        for (k, &column) in columns.iter().enumerate() {
            let value = cells
                .binary_search_by_key(&column, |(c, _)| *c)
                .ok()
                .map(|i| &cells[i].1);
            let cell = value.map_or(Cell::Empty, Value::cell);
            reading.read_cell(k, cell, report, || CellPlace {
                row: RowAt::Sheet { sheet: &sheet, row },
                sheet_column: Some(column),
                span: spec.path_span,
            });
        }
    }
    if reading.n_rows() == 0 {
        report.add(Code::HeaderOnly, |file| {
            messages::header_only(file, &header, spec)
        });
    }
    Ok(Some(reading.finish()))
}

/// The header: the names of the cells from `first_column` to the last one with a value.
fn sheet_header(row: u32, first_column: u32, cells: &SheetRow) -> Header {
    let width = cells.last().map_or(0, |(c, _)| c - first_column + 1) as usize;
    let mut names = vec![String::new(); width];
    for (column, value) in cells {
        names[(column - first_column) as usize] = value.text();
    }
    Header {
        names,
        at: HeaderAt::Sheet { row, first_column },
    }
}

/// The rows of a sheet with at least one value, within the range.
struct SheetRows<'c, 'a, RS: Read + Seek> {
    cells: &'c mut calamine::XlsxCellReader<'a, RS>,
    range: Option<CellRange>,
    /// The first cell of the next row, read while finishing the previous one.
    pending: Option<(u32, u32, Value)>,
    /// The sheet (or the range) has no more cells.
    done: bool,
}

impl<RS: Read + Seek> SheetRows<'_, '_, RS> {
    /// The next cell with a value inside the range; `None` past the range or the sheet.
    fn next_cell(&mut self) -> Result<Option<(u32, u32, Value)>, calamine::XlsxError> {
        if let Some(cell) = self.pending.take() {
            return Ok(Some(cell));
        }
        while !self.done {
            let Some(cell) = self.cells.next_cell()? else {
                self.done = true;
                break;
            };
            let (row, column) = cell.get_position();
            if self.range.is_some_and(|r| row > r.last_row) {
                self.done = true;
                break;
            }
            let inside = self.range.is_none_or(|r| r.contains(row, column));
            if let (true, Some(value)) = (inside, Value::of(cell.get_value())) {
                return Ok(Some((row, column, value)));
            }
        }
        Ok(None)
    }

    /// The next row with a value that is not blank: its row number and cells.
    fn next_row(&mut self) -> Result<Option<(u32, SheetRow)>, calamine::XlsxError> {
        loop {
            let Some((row, column, value)) = self.next_cell()? else {
                return Ok(None);
            };
            let mut cells = vec![(column, value)];
            while let Some((next_row, column, value)) = self.next_cell()? {
                if next_row != row {
                    self.pending = Some((next_row, column, value));
                    break;
                }
                cells.push((column, value));
            }
            // Cells come in column order within a row; keep it so even for odd files.
            cells.sort_by_key(|(c, _)| *c);
            cells.dedup_by_key(|(c, _)| *c);
            if !cells.iter().all(|(_, v)| v.is_blank()) {
                return Ok(Some((row, cells)));
            }
        }
    }
}

/// Refuses a workbook whose parts would unpack to more than `most` bytes.
fn check_unpacked_size<R: Read + Seek>(
    spec: &TableSpec,
    reader: &mut R,
    most: u64,
) -> Result<(), crate::diag::Diagnostic> {
    let mut archive = zip::ZipArchive::new(&mut *reader)
        .map_err(|e| messages::not_a_workbook(spec, &e.to_string()))?;
    let unpacked: u64 = (0..archive.len())
        .filter_map(|i| archive.by_index_raw(i).ok().map(|f| f.size()))
        .fold(0u64, u64::saturating_add);
    drop(archive);
    reader
        .rewind()
        .map_err(|e| messages::not_a_workbook(spec, &e.to_string()))?;
    if unpacked > most {
        return Err(messages::not_a_workbook(
            spec,
            &format!("its parts unpack to {unpacked} bytes, more than the limit of {most}"),
        ));
    }
    Ok(())
}
