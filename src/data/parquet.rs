//! Reading an Apache Parquet file into a [`Table`], with the `parquet` crate's column API (no
//! Arrow).
//!
//! The header is the schema: a flat column is found by its name, a column inside a group by
//! its dotted path (`visit.date`). Only the columns that are read are decoded, a batch of rows
//! at a time, so memory holds the columns being built and one batch. Rows are numbered from 1
//! (a Parquet file has no header row).
//!
//! Stored types: numbers (integers, also unsigned; decimals; floats and doubles) are numbers;
//! strings are read like a text file's cells (so a number stored as text is still a number);
//! booleans are `true` and `false`; dates and timestamps are refused for numeric variables and
//! read as ISO 8601 text (`2024-03-01`, `2024-03-01 14:30:00`) for categorical ones. Lists,
//! maps, times of day, INT96 timestamps, half floats and other binary data are refused with
//! `D0027`, once per column, before any row is read. A null is a missing value.
//!
//! A file the crate cannot decode is `D0026`; should the crate panic on a damaged file, the
//! panic is caught and reported the same way.

use crate::diag::Code;
use std::fmt::Write as _;
use std::panic::{catch_unwind, AssertUnwindSafe};

use parquet::basic::{ConvertedType, LogicalType, TimeUnit, Type as Physical};
use parquet::column::reader::ColumnReader;
use parquet::data_type::{ByteArray, FixedLenByteArray};
use parquet::file::reader::{ChunkReader, FileReader, SerializedFileReader};
use parquet::schema::types::ColumnDescriptor;

use super::cells::{number_text, Cell};
use super::header::{self, Header, HeaderAt};
use super::load::{Input, Opened, ReadLimits};
use super::messages::{self, RowAt};
use super::reading::{CellPlace, Reading};
use super::report::Report;
use super::spec::{ColumnKind, DecimalMark, TableSpec};
use super::table::{RowPlace, Table};

/// Rows decoded per batch.
const BATCH: usize = 8192;

/// What a column stores, as far as reading it goes.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Stored {
    Bool,
    Int {
        unsigned: bool,
    },
    /// An integer or big-endian bytes scaled by 10^-scale.
    Decimal {
        scale: i32,
    },
    Float,
    Text,
    /// Days since 1970-01-01.
    Date,
    /// Units since 1970-01-01 00:00, `per_second` units a second.
    Timestamp {
        per_second: i64,
    },
    /// Anything else, in words.
    Unsupported(&'static str),
}

impl Stored {
    fn of(column: &ColumnDescriptor) -> Stored {
        if column.max_rep_level() > 0 {
            return Stored::Unsupported("lists of values");
        }
        let logical = column.logical_type_ref();
        let converted = column.converted_type();
        if let Some(LogicalType::Decimal(d)) = logical {
            return Stored::Decimal { scale: d.scale };
        }
        if converted == ConvertedType::DECIMAL {
            return Stored::Decimal {
                scale: column.type_scale(),
            };
        }
        match (column.physical_type(), logical) {
            (_, Some(LogicalType::Date)) => Stored::Date,
            (_, Some(LogicalType::Timestamp(t))) => Stored::Timestamp {
                per_second: match t.unit {
                    TimeUnit::MILLIS => 1_000,
                    TimeUnit::MICROS => 1_000_000,
                    TimeUnit::NANOS => 1_000_000_000,
                },
            },
            (_, Some(LogicalType::Time(_))) => Stored::Unsupported("times of day"),
            (_, Some(LogicalType::Float16)) => Stored::Unsupported("half-precision floats"),
            (_, Some(LogicalType::Integer(i))) => Stored::Int {
                unsigned: !i.is_signed,
            },
            (Physical::BOOLEAN, _) => Stored::Bool,
            (Physical::INT32 | Physical::INT64, _) => match converted {
                ConvertedType::DATE => Stored::Date,
                ConvertedType::TIMESTAMP_MILLIS => Stored::Timestamp { per_second: 1_000 },
                ConvertedType::TIMESTAMP_MICROS => Stored::Timestamp {
                    per_second: 1_000_000,
                },
                ConvertedType::TIME_MILLIS | ConvertedType::TIME_MICROS => {
                    Stored::Unsupported("times of day")
                }
                ConvertedType::UINT_8
                | ConvertedType::UINT_16
                | ConvertedType::UINT_32
                | ConvertedType::UINT_64 => Stored::Int { unsigned: true },
                _ => Stored::Int { unsigned: false },
            },
            (Physical::FLOAT | Physical::DOUBLE, _) => Stored::Float,
            (Physical::BYTE_ARRAY, Some(LogicalType::Uuid)) => Stored::Unsupported("UUIDs"),
            (Physical::BYTE_ARRAY, _) => Stored::Text,
            (Physical::INT96, _) => Stored::Unsupported("INT96 timestamps"),
            (Physical::FIXED_LEN_BYTE_ARRAY, _) => Stored::Unsupported("fixed-length bytes"),
        }
    }

    /// What the column holds, in words, when a variable of `kind` cannot be read from it.
    fn refusal(self, kind: &ColumnKind) -> Option<&'static str> {
        match (self, kind) {
            (Stored::Unsupported(what), _) => Some(what),
            (Stored::Bool, ColumnKind::Numeric { .. }) => Some("true/false values"),
            (Stored::Date | Stored::Timestamp { .. }, ColumnKind::Numeric { .. }) => Some("dates"),
            _ => None,
        }
    }
}

/// Reads the file; `None` when it cannot be read (with the errors reported).
pub(super) fn read(
    spec: &TableSpec,
    input: Input,
    limits: &ReadLimits,
    report: &mut Report,
) -> Option<Table> {
    let result = match input.open(spec, limits) {
        Ok(Opened::File(file)) => guarded(spec, || read_from(spec, file, limits, report)),
        Ok(Opened::Memory(bytes)) => {
            let bytes = bytes::Bytes::copy_from_slice(bytes);
            guarded(spec, || read_from(spec, bytes, limits, report))
        }
        Err(error) => Err(error),
    };
    result.unwrap_or_else(|error| report.refuse(error))
}

/// Runs `read`, turning a panic of the Parquet crate into a diagnostic.
fn guarded<T>(
    spec: &TableSpec,
    read: impl FnOnce() -> Result<T, crate::diag::Diagnostic>,
) -> Result<T, crate::diag::Diagnostic> {
    catch_unwind(AssertUnwindSafe(read))
        .unwrap_or_else(|_| Err(messages::not_parquet(spec, "the file is damaged")))
}

fn read_from<R: ChunkReader + 'static>(
    spec: &TableSpec,
    chunks: R,
    limits: &ReadLimits,
    report: &mut Report,
) -> Result<Option<Table>, crate::diag::Diagnostic> {
    let damaged = |e: parquet::errors::ParquetError| messages::not_parquet(spec, &e.to_string());
    let file = SerializedFileReader::new(chunks).map_err(damaged)?;
    let metadata = file.metadata();
    let schema = metadata.file_metadata().schema_descr();
    let header = Header {
        names: schema.columns().iter().map(|c| c.path().string()).collect(),
        at: HeaderAt::Schema,
    };
    let fields = header::locate(spec, &header, None, report);
    let reading = Reading::new(spec, &fields, DecimalMark::Point, limits);
    let stored: Vec<Stored> = reading
        .columns()
        .iter()
        .map(|&(_, field)| Stored::of(&schema.column(field)))
        .collect();
    let mut refused = false;
    for (&(declared, _), kind) in reading.columns().iter().zip(&stored) {
        let column = &spec.columns[declared];
        if let Some(what) = kind.refusal(&column.kind) {
            report.add(Code::ColumnType, |_| {
                messages::column_type(spec, column, what)
            });
            refused = true;
        }
    }
    let n_rows = usize::try_from(metadata.file_metadata().num_rows()).unwrap_or(usize::MAX);
    if n_rows > limits.max_rows {
        report.add(Code::TooManyRows, |_| {
            messages::too_many_rows(spec, limits.max_rows)
        });
        return Ok(None);
    }
    if refused {
        return Ok(None);
    }
    let mut rows = ParquetRows {
        reading,
        stored,
        next_row: 0,
    };
    for group in 0..file.num_row_groups() {
        let group = file.get_row_group(group).map_err(damaged)?;
        let group_rows = usize::try_from(group.metadata().num_rows()).unwrap_or(0);
        let mut columns = rows
            .reading
            .columns()
            .iter()
            .zip(&rows.stored)
            .map(|(&(_, field), &stored)| {
                let descriptor = schema.column(field);
                Ok(ColumnBatch::new(
                    group.get_column_reader(field)?,
                    stored,
                    descriptor.max_def_level(),
                ))
            })
            .collect::<Result<Vec<_>, parquet::errors::ParquetError>>()
            .map_err(damaged)?;
        if !rows
            .read_group(&mut columns, group_rows, spec, report)
            .map_err(damaged)?
        {
            return Ok(None);
        }
    }
    if rows.reading.n_rows() == 0 {
        report.add(Code::HeaderOnly, |file| {
            messages::header_only(file, &header, spec)
        });
    }
    Ok(Some(rows.reading.finish()))
}

/// The rows read so far.
struct ParquetRows<'s> {
    reading: Reading<'s>,
    stored: Vec<Stored>,
    next_row: u64,
}

impl ParquetRows<'_> {
    /// Reads one row group, batch by batch; `Ok(false)` when reading must stop.
    /// `group_rows` is the row count the group's metadata gives (its rows when no column of
    /// it is read).
    fn read_group(
        &mut self,
        columns: &mut [ColumnBatch],
        group_rows: usize,
        spec: &TableSpec,
        report: &mut Report,
    ) -> parquet::errors::Result<bool> {
        let mut left = group_rows;
        loop {
            let counts = columns
                .iter_mut()
                .map(ColumnBatch::read_batch)
                .collect::<parquet::errors::Result<Vec<usize>>>()?;
            let n = match counts.first() {
                Some(&n) if counts.iter().all(|&c| c == n) => n,
                Some(_) => {
                    return Err(parquet::errors::ParquetError::General(
                        "the columns of a row group hold different numbers of rows".to_owned(),
                    ))
                }
                None => std::mem::take(&mut left),
            };
            if n == 0 {
                return Ok(true);
            }
            for i in 0..n {
                let row = self.next_row;
                self.next_row += 1;
                let place = RowPlace {
                    file_row: usize::try_from(row + 1).unwrap_or(usize::MAX),
                    line: usize::try_from(row + 1).unwrap_or(usize::MAX),
                };
                if !self.reading.start_row(place, report) {
                    return Ok(false);
                }
                for (k, column) in columns.iter_mut().enumerate() {
                    let kind = &spec.columns[self.reading.columns()[k].0].kind;
                    let numeric = matches!(kind, ColumnKind::Numeric { .. });
                    let cell = column.cell(i, numeric);
                    let cell = cell.as_cell();
                    self.reading.read_cell(k, cell, report, || CellPlace {
                        row: RowAt::Parquet { row },
                        sheet_column: None,
                        span: spec.path_span,
                    });
                }
            }
        }
    }
}

/// Decoded values of one column, a batch at a time.
enum Values {
    Bool(Vec<bool>),
    I32(Vec<i32>),
    I64(Vec<i64>),
    F32(Vec<f32>),
    F64(Vec<f64>),
    Bytes(Vec<ByteArray>),
    Fixed(Vec<FixedLenByteArray>),
    None,
}

/// One column of a row group being read.
struct ColumnBatch {
    reader: ColumnReader,
    stored: Stored,
    max_def: i16,
    defs: Vec<i16>,
    values: Values,
    /// The next non-null value of the batch.
    next_value: usize,
    /// Text of the current cell, reused.
    text: String,
}

/// A cell of a batch, owning what it needs.
enum BatchCell<'a> {
    Text(&'a str),
    Number(f64),
    Date(&'a str),
    Empty,
}

impl BatchCell<'_> {
    fn as_cell(&self) -> Cell<'_> {
        match self {
            BatchCell::Text(t) => Cell::Text(t),
            BatchCell::Number(v) => Cell::Number(*v),
            BatchCell::Date(t) => Cell::Date(t),
            BatchCell::Empty => Cell::Empty,
        }
    }
}

macro_rules! read_typed {
    ($reader:expr, $defs:expr, $values:expr, $variant:ident) => {{
        let mut values = Vec::with_capacity(BATCH);
        let (records, _, _) = $reader.read_records(BATCH, Some($defs), None, &mut values)?;
        $values = Values::$variant(values);
        records
    }};
}

impl ColumnBatch {
    fn new(reader: ColumnReader, stored: Stored, max_def: i16) -> Self {
        ColumnBatch {
            reader,
            stored,
            max_def,
            defs: Vec::with_capacity(BATCH),
            values: Values::None,
            next_value: 0,
            text: String::new(),
        }
    }

    /// Decodes the next batch; the number of rows in it (0 at the end of the row group).
    fn read_batch(&mut self) -> parquet::errors::Result<usize> {
        self.defs.clear();
        self.next_value = 0;
        let defs = &mut self.defs;
        let records = match &mut self.reader {
            ColumnReader::BoolColumnReader(r) => read_typed!(r, defs, self.values, Bool),
            ColumnReader::Int32ColumnReader(r) => read_typed!(r, defs, self.values, I32),
            ColumnReader::Int64ColumnReader(r) => read_typed!(r, defs, self.values, I64),
            ColumnReader::FloatColumnReader(r) => read_typed!(r, defs, self.values, F32),
            ColumnReader::DoubleColumnReader(r) => read_typed!(r, defs, self.values, F64),
            ColumnReader::ByteArrayColumnReader(r) => read_typed!(r, defs, self.values, Bytes),
            ColumnReader::FixedLenByteArrayColumnReader(r) => {
                read_typed!(r, defs, self.values, Fixed)
            }
            ColumnReader::Int96ColumnReader(_) => 0,
        };
        Ok(records)
    }

    /// Row `i` of the batch (rows must be asked for in order), for a numeric variable or not.
    fn cell(&mut self, i: usize, numeric: bool) -> BatchCell<'_> {
        let present = self.max_def == 0 || self.defs.get(i) == Some(&self.max_def);
        if !present {
            return BatchCell::Empty;
        }
        let v = self.next_value;
        self.next_value += 1;
        self.text.clear();
        let text = &mut self.text;
        match (&self.values, self.stored) {
            (Values::Bool(b), _) => BatchCell::Text(if b[v] { "true" } else { "false" }),
            (Values::I32(x), Stored::Date) => date_cell(text, i64::from(x[v]) * 86_400, 1),
            (Values::I64(x), Stored::Date) => date_cell(text, x[v].saturating_mul(86_400), 1),
            (Values::I64(x), Stored::Timestamp { per_second }) => date_cell(text, x[v], per_second),
            (Values::I32(x), Stored::Decimal { scale }) => decimal(text, i128::from(x[v]), scale),
            (Values::I64(x), Stored::Decimal { scale }) => decimal(text, i128::from(x[v]), scale),
            (Values::I32(x), Stored::Int { unsigned: true }) => {
                integer(text, i128::from(x[v] as u32), numeric)
            }
            (Values::I64(x), Stored::Int { unsigned: true }) => {
                integer(text, i128::from(x[v] as u64), numeric)
            }
            (Values::I32(x), _) => integer(text, i128::from(x[v]), numeric),
            (Values::I64(x), _) => integer(text, i128::from(x[v]), numeric),
            (Values::F32(x), _) => BatchCell::Number(f64::from(x[v])),
            (Values::F64(x), _) => BatchCell::Number(x[v]),
            (Values::Bytes(x), Stored::Decimal { scale }) => {
                decimal(text, big_endian(x[v].data()), scale)
            }
            (Values::Fixed(x), Stored::Decimal { scale }) => {
                decimal(text, big_endian(x[v].data()), scale)
            }
            (Values::Bytes(x), _) => match std::str::from_utf8(x[v].data()) {
                Ok(s) => BatchCell::Text(s),
                // Binary data that is not text is shown (and told apart) by its bytes.
                Err(_) => {
                    text.push_str("0x");
                    x[v].data().iter().for_each(|b| {
                        let _ = write!(text, "{b:02x}");
                    });
                    BatchCell::Text(text)
                }
            },
            (Values::Fixed(_) | Values::None, _) => BatchCell::Empty,
        }
    }
}

/// A whole number: the number itself for a numeric variable, else its text.
fn integer(text: &mut String, value: i128, numeric: bool) -> BatchCell<'_> {
    if numeric {
        return BatchCell::Number(value as f64);
    }
    let _ = write!(text, "{value}");
    BatchCell::Text(text)
}

/// `unscaled` × 10^-scale, read from its decimal text so it is correctly rounded.
fn decimal(text: &mut String, unscaled: i128, scale: i32) -> BatchCell<'_> {
    let _ = write!(text, "{unscaled}e{}", -i64::from(scale));
    match text.parse::<f64>() {
        Ok(value) => BatchCell::Number(value),
        Err(_) => BatchCell::Empty,
    }
}

/// A two's-complement big-endian integer of at most 16 bytes (longer ones saturate).
fn big_endian(bytes: &[u8]) -> i128 {
    if bytes.len() > 16 {
        return if bytes.first().is_some_and(|b| b & 0x80 != 0) {
            i128::MIN
        } else {
            i128::MAX
        };
    }
    let negative = bytes.first().is_some_and(|b| b & 0x80 != 0);
    let mut buf = if negative { [0xFF; 16] } else { [0; 16] };
    buf[16 - bytes.len()..].copy_from_slice(bytes);
    i128::from_be_bytes(buf)
}

/// `units` since 1970-01-01 00:00 (`per_second` a second) as ISO 8601 text: the date alone
/// at midnight, else date and time to the second.
fn date_cell(text: &mut String, units: i64, per_second: i64) -> BatchCell<'_> {
    let seconds = units.div_euclid(per_second);
    let nanos = units.rem_euclid(per_second) * (1_000_000_000 / per_second);
    let Some(time) = chrono::DateTime::from_timestamp(seconds, nanos as u32) else {
        let _ = write!(text, "{}", number_text(units as f64));
        return BatchCell::Date(text);
    };
    let time = time.naive_utc();
    let shown = if time.format("%H:%M:%S%.f").to_string() == "00:00:00" {
        time.format("%Y-%m-%d")
    } else {
        time.format("%Y-%m-%d %H:%M:%S")
    };
    let _ = write!(text, "{shown}");
    BatchCell::Date(text)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decimals_and_big_endian_integers() {
        let mut text = String::new();
        assert!(matches!(decimal(&mut text, 12345, 2), BatchCell::Number(v) if v == 123.45));
        assert_eq!(big_endian(&[0x01, 0x00]), 256);
        assert_eq!(big_endian(&[0xFF, 0x38]), -200);
        assert_eq!(big_endian(&[]), 0);
    }

    #[test]
    fn dates_are_iso_text() {
        // 19783 days after 1970-01-01 is 2024-03-01 (common practice: Unix day numbers).
        let mut text = String::new();
        assert!(matches!(
            date_cell(&mut text, 19_783 * 86_400, 1),
            BatchCell::Date("2024-03-01")
        ));
        let mut text = String::new();
        let millis = (19_783 * 86_400 + 14 * 3600 + 30 * 60) * 1000;
        assert!(matches!(
            date_cell(&mut text, millis, 1000),
            BatchCell::Date("2024-03-01 14:30:00")
        ));
    }
}
