//! The wording of every data error found while reading a file's rows: message, labels and help.
//!
//! Messages name the file, the row (in a text file the header is row 1; in a workbook the row
//! the sheet shows; in a Parquet file the data row), the column and the value, so they read well
//! even without the labelled excerpt. Labels point at the exact field in a text file, and at the
//! path in the spec for workbooks and Parquet files, which have no text to quote.

use crate::diag::{Code, Diagnostic, Span};

use super::cells::{level_hint, CellProblem, LevelHint};
use super::header::{Header, HeaderAt};
use super::load::{file_error, line_of};
use super::numbers::{is_common_missing_marker, NonFinite, NotNumberHint};
use super::report::{file_label, quoted, quoted_list, row_label};
use super::spec::{column_letters, ColumnKind, ColumnSpec, DecimalMark, Separator, TableSpec};

/// Most names listed in a help line.
const LISTED: usize = 12;

/// Where a row is, for messages.
#[derive(Debug, Clone, Copy)]
pub(super) enum RowAt<'a> {
    /// A text file's row and the line it starts on.
    Text { file_row: usize, line: usize },
    /// A workbook row (0-based, shown 1-based).
    Sheet { sheet: &'a str, row: u32 },
    /// A Parquet row (0-based, shown 1-based).
    Parquet { row: u64 },
}

impl RowAt<'_> {
    /// `reading.csv row 14 (line 15)`, `visits.xlsx sheet "Visits" row 14`, `visits.parquet row 14`
    pub(super) fn label(&self, file: &str) -> String {
        match *self {
            RowAt::Text { file_row, line } => row_label(file, file_row, line),
            RowAt::Sheet { sheet, row } => {
                format!("{file} sheet {} row {}", quoted(sheet), u64::from(row) + 1)
            }
            RowAt::Parquet { row } => format!("{file} row {}", row + 1),
        }
    }
}

/// One cell with a problem.
pub(super) struct CellAt<'a> {
    pub(super) file: &'a str,
    pub(super) row: RowAt<'a>,
    /// The workbook column (0-based) of the cell, shown as `(cell C14)`.
    pub(super) sheet_column: Option<u32>,
    pub(super) column: &'a ColumnSpec,
    pub(super) value: &'a str,
    /// The field in a text file, or the path in the spec.
    pub(super) span: Span,
    pub(super) decimal: DecimalMark,
    /// The cap on distinct values without declared levels.
    pub(super) max_levels: usize,
}

impl CellAt<'_> {
    /// `speeds.csv row 14, column "medium"`, with `(cell C14)` in a workbook.
    fn place(&self) -> String {
        let cell = match (self.sheet_column, self.row) {
            (Some(column), RowAt::Sheet { row, .. }) => {
                format!(" (cell {}{})", column_letters(column), u64::from(row) + 1)
            }
            _ => String::new(),
        };
        format!(
            "{}, column {}{cell}",
            self.row.label(self.file),
            quoted(&self.column.header)
        )
    }

    fn error(&self, code: Code, what: String, label: &str, help: String) -> Diagnostic {
        Diagnostic::new(code, format!("{}: {what}", self.place()))
            .with_label(self.span, label)
            .with_help(help)
    }
}

/// The diagnostic for a bad cell.
pub(super) fn cell_problem(cell: &CellAt, problem: CellProblem) -> Diagnostic {
    let value = quoted(cell.value);
    let name = &cell.column.name;
    match problem {
        CellProblem::NotALevel => cell.error(
            Code::NotALevel,
            format!("{value} is not a declared level"),
            &format!("not a level of {name}"),
            not_a_level_help(cell),
        ),
        CellProblem::NotANumber(NotNumberHint::Date) => cell.error(
            Code::NotANumber,
            format!("{value} is a date, not a number"),
            "a date",
            format!(
                "{name} is numeric; store the value as a number (such as days since a start \
                 date), or declare {name} nominal or ordinal to read dates as categories"
            ),
        ),
        CellProblem::NotANumber(hint) => cell.error(
            Code::NotANumber,
            format!("{value} is not a number"),
            "not a number",
            not_a_number_help(cell, hint),
        ),
        CellProblem::NotFinite(NonFinite::Overflow) => cell.error(
            Code::NotFinite,
            format!("{value} is too large for a number"),
            "too large",
            "numbers must lie within ±1.7976931348623157e308; check the value".to_owned(),
        ),
        CellProblem::NotFinite(NonFinite::NotANumber | NonFinite::Infinity) => cell.error(
            Code::NotFinite,
            format!("{value} is not a finite number"),
            "not a finite number",
            format!(
                "every value must be a finite number; if {value} marks a missing value, \
                 add it to missing(...) in the data block"
            ),
        ),
        CellProblem::Negative => cell.error(
            Code::NegativeRatio,
            format!("{value} is negative, but {name} is a ratio variable"),
            "negative",
            format!(
                "a ratio variable has a true zero, so it cannot be negative; correct the value, \
                 or declare {name} interval if negative values are meaningful"
            ),
        ),
        CellProblem::MissingId => cell.error(
            Code::MissingId,
            format!("the id is missing ({value} is a missing token)"),
            &format!("missing {name}"),
            "every row needs the id of its observational unit; fill it in or remove the row"
                .to_owned(),
        ),
        CellProblem::TooManyLevels => too_many_levels(cell),
    }
}

/// D0022: the value past the cap on distinct values of a column without declared levels.
fn too_many_levels(cell: &CellAt) -> Diagnostic {
    let name = &cell.column.name;
    cell.error(
        Code::TooManyLevels,
        format!(
            "{} is one more distinct value than {name} may have without declared levels ({})",
            quoted(cell.value),
            cell.max_levels
        ),
        "one value too many",
        format!(
            "a figure cannot show so many categories; if {name} identifies units, declare it \
             `id`; otherwise list the levels you need with levels(...)"
        ),
    )
}

fn not_a_level_help(cell: &CellAt) -> String {
    let levels: &[String] = match &cell.column.kind {
        ColumnKind::Categorical {
            levels: Some(levels),
            ..
        } => levels,
        _ => &[],
    };
    let value = quoted(cell.value);
    match level_hint(cell.value, levels) {
        LevelHint::CaseOrSpacing(level) => format!(
            "did you mean {}? levels must match exactly, in letter case and spacing too",
            quoted(level)
        ),
        LevelHint::Close(level) => format!("did you mean {}?", quoted(level)),
        LevelHint::List if is_common_missing_marker(cell.value) => format!(
            "if {value} marks a missing value, add it to missing(...) in the data block; \
             the declared levels of {} are {}",
            cell.column.name,
            quoted_list(levels.iter().map(String::as_str), LISTED)
        ),
        LevelHint::List => format!(
            "the declared levels of {} are {}; add {value} to levels(...) if it is one",
            cell.column.name,
            quoted_list(levels.iter().map(String::as_str), LISTED)
        ),
    }
}

fn not_a_number_help(cell: &CellAt, hint: NotNumberHint) -> String {
    let value = quoted(cell.value);
    match hint {
        NotNumberHint::Separators => match cell.decimal {
            DecimalMark::Point => "write numbers with a decimal point and no thousands \
                 separators: 1234.5, not 1,234.5, 1 234.5 or 1234,5; if the file uses decimal \
                 commas, say `decimal comma` in the data block"
                .to_owned(),
            DecimalMark::Comma => "the data block says `decimal comma`: write numbers with a \
                 decimal comma and no thousands separators: 1234,5, not 1.234,5 or 1234.5"
                .to_owned(),
        },
        NotNumberHint::Unit => {
            "write the number alone; the unit belongs in unit(\"...\") in the declaration"
                .to_owned()
        }
        NotNumberHint::MissingMarker => {
            format!("if {value} marks a missing value, add it to missing(...) in the data block")
        }
        NotNumberHint::SpreadsheetError => "the cell holds a spreadsheet error value; fix the \
             formula, or leave the cell empty when there is no value"
            .to_owned(),
        NotNumberHint::Date | NotNumberHint::Other => format!(
            "{} is numeric, so each cell must be a number such as 12, -3.5 or 1.2e3, or a \
             missing token; declare it nominal if it holds categories",
            cell.column.name
        ),
    }
}

/// D0003: bytes that are not text in the file's encoding.
pub(super) fn not_text(
    spec: &TableSpec,
    encoding: &str,
    bytes: &[u8],
    bad_at: usize,
) -> Diagnostic {
    let bad_byte = bytes.get(bad_at).copied().unwrap_or(0);
    let line = line_of(bytes, bad_at);
    let utf8 = encoding == "UTF-8";
    let help = if bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]) {
        "the file is UTF-16 text; save it as CSV in UTF-8".to_owned()
    } else if bytes.starts_with(b"PK\x03\x04") {
        "this looks like a spreadsheet workbook, not a CSV file; name it .xlsx to read it as a \
         workbook, or export the sheet as CSV in UTF-8"
            .to_owned()
    } else if utf8 {
        format!(
            "save the file as CSV in UTF-8, or name its encoding with `encoding \"...\"` in the \
             data block, e.g. `encoding \"windows-1252\"` (the bytes near it are {})",
            quoted(&String::from_utf8_lossy(context(bytes, bad_at)))
        )
    } else {
        format!(
            "check the encoding named in the data block (the bytes near it are {})",
            quoted(&String::from_utf8_lossy(context(bytes, bad_at)))
        )
    };
    let what = if utf8 {
        "UTF-8 text".to_owned()
    } else {
        format!("{encoding} text")
    };
    file_error(
        spec,
        Code::NotUtf8,
        format!(
            "data file {} is not {what}: byte 0x{bad_byte:02X} at line {line}, byte offset {bad_at}",
            file_label(&spec.path)
        ),
        help,
    )
}

/// Up to 20 bytes on each side of `at`, within its line.
fn context(bytes: &[u8], at: usize) -> &[u8] {
    let at = at.min(bytes.len());
    let line_start = bytes[..at]
        .iter()
        .rposition(|&b| b == b'\n')
        .map_or(0, |i| i + 1);
    let line_end = bytes[at..]
        .iter()
        .position(|&b| b == b'\n')
        .map_or(bytes.len(), |i| at + i);
    let start = line_start.max(at.saturating_sub(20));
    let end = line_end.min(at.saturating_add(20));
    &bytes[start..end.max(start)]
}

/// D0004: a NUL character, at `line` and byte offset `offset` of the text.
pub(super) fn nul_byte(spec: &TableSpec, line: usize, offset: u64) -> Diagnostic {
    file_error(
        spec,
        Code::NulByte,
        format!(
            "data file {} holds a NUL byte at line {line}, byte offset {offset}",
            file_label(&spec.path)
        ),
        "it looks like UTF-16 text or a file that is not text; save it as CSV in UTF-8",
    )
}

/// D0020: a character that text cannot hold (it could not be written into an SVG).
pub(super) fn not_text_char(spec: &TableSpec, c: char, line: usize, offset: u64) -> Diagnostic {
    file_error(
        spec,
        Code::NotTextChar,
        format!(
            "data file {} holds the character U+{:04X} at line {line}, byte offset {offset}, \
             which text cannot hold",
            file_label(&spec.path),
            c as u32
        ),
        "remove it: control characters cannot be drawn or written into an SVG file; \
         a file that holds many was probably not saved as plain CSV",
    )
}

/// D0001: the file could not be read to its end.
pub(super) fn read_failed(spec: &TableSpec, error: &std::io::Error) -> Diagnostic {
    file_error(
        spec,
        Code::Unreadable,
        format!(
            "data file {} could not be read to its end: {error}",
            file_label(&spec.path)
        ),
        "check that the file is complete and readable",
    )
}

/// D0005: no header row at all (an empty file or sheet).
pub(super) fn empty_file(spec: &TableSpec, file: &str, separator: Option<Separator>) -> Diagnostic {
    let headers = quoted_list(spec.columns.iter().map(|c| c.header.as_str()), LISTED);
    let first_row = match separator {
        Some(s) => format!(
            "the first row must name the columns, separated by {}",
            s.plural()
        ),
        None => "the first row must name the columns".to_owned(),
    };
    let help = if headers.is_empty() {
        first_row
    } else {
        format!("{first_row}: {headers}")
    };
    Diagnostic::new(
        Code::EmptyFile,
        format!("data file {file} is empty: it has no header row"),
    )
    .with_label(spec.path_span, "data file")
    .with_help(help)
    .with_file(&spec.path)
}

/// D0006: a header and nothing else.
pub(super) fn header_only(file: &str, header: &Header, spec: &TableSpec) -> Diagnostic {
    let (span, text) = match &header.at {
        HeaderAt::Text { span, .. } => (*span, "the only row"),
        _ => (spec.path_span, "data file"),
    };
    Diagnostic::new(
        Code::HeaderOnly,
        format!("{file} has a header row but no data rows"),
    )
    .with_label(span, text)
    .with_help("add the data below the header; a figure needs at least one row")
    .with_file(&spec.path)
}

/// D0007: a quoted field that is never closed (it swallows the rest of the file).
pub(super) fn unclosed_quote(
    file: &str,
    file_row: usize,
    line: usize,
    quote_at: Span,
) -> Diagnostic {
    Diagnostic::new(
        Code::Malformed,
        format!(
            "{}: a quoted field is never closed",
            row_label(file, file_row, line)
        ),
    )
    .with_label(
        quote_at,
        "this quote opens a field that runs to the end of the file",
    )
    .with_help("close the quote; a double quote inside a quoted value is written twice (\"\")")
}

/// D0008: a declared column the header lacks.
pub(super) fn missing_column(
    file: &str,
    column: &ColumnSpec,
    header: &Header,
    separator: Option<Separator>,
) -> Diagnostic {
    let read_for = if column.header == column.name {
        String::new()
    } else {
        format!(" (read for {})", column.name)
    };
    let mut diagnostic = Diagnostic::new(
        Code::MissingColumn,
        format!("{file} has no column {}{read_for}", quoted(&column.header)),
    )
    .with_label(column.decl_span, "declared here");
    if let HeaderAt::Text { span, .. } = &header.at {
        diagnostic = diagnostic.with_label(*span, "header row");
    }
    diagnostic.with_help(missing_column_help(file, column, header, separator))
}

fn missing_column_help(
    file: &str,
    column: &ColumnSpec,
    header: &Header,
    separator: Option<Separator>,
) -> String {
    let names = &header.names;
    if let Some(padded) = names.iter().find(|h| h.trim() == column.header) {
        return format!(
            "the header has {} with spaces around the name; remove them, or write column({})",
            quoted(padded),
            quoted(padded)
        );
    }
    if let (Some(separator), [only]) = (separator, names.as_slice()) {
        if let Some(other) = Separator::ALL
            .into_iter()
            .find(|s| *s != separator && only.contains(char::from(s.byte())))
        {
            return format!(
                "the header row is one field that holds {}; a .tsv file is read with tabs and \
                 any other file with commas, unless the data block says otherwise: write \
                 `separator {}` in it",
                other.plural(),
                other.word()
            );
        }
    }
    match crate::diag::did_you_mean(&column.header, names.iter().map(String::as_str)) {
        Some(close) => format!(
            "did you mean {}? write column({}) in the declaration of {}, or rename the column \
             in the file",
            quoted(close),
            quoted(close),
            column.name
        ),
        None => format!(
            "the columns of {file} are {}",
            quoted_list(names.iter().map(String::as_str), LISTED)
        ),
    }
}

/// D0009: a declared column's header appears more than once (at header fields `found`).
pub(super) fn duplicate_header(
    file: &str,
    column: &ColumnSpec,
    header: &Header,
    found: &[usize],
) -> Diagnostic {
    let name = quoted(&column.header);
    let where_ = match &header.at {
        HeaderAt::Sheet {
            row, first_column, ..
        } => {
            let cells: Vec<String> = found
                .iter()
                .map(|&i| {
                    let column = first_column.saturating_add(u32::try_from(i).unwrap_or(u32::MAX));
                    format!("{}{}", column_letters(column), u64::from(*row) + 1)
                })
                .collect();
            format!(" (cells {})", cells.join(", "))
        }
        _ => String::new(),
    };
    let mut diagnostic = Diagnostic::new(
        Code::DuplicateHeader,
        format!("{file} has {} columns named {name}{where_}", found.len()),
    );
    if let HeaderAt::Text { fields, .. } = &header.at {
        for (n, &i) in found.iter().enumerate() {
            let text = if n == 0 {
                format!("a column named {name}")
            } else {
                "another one".to_owned()
            };
            if let Some(span) = fields.get(i) {
                diagnostic = diagnostic.with_label(*span, text);
            }
        }
    }
    diagnostic
        .with_label(column.decl_span, "declared here")
        .with_help(format!(
            "rename the columns so each name is used once; {} could be read from either",
            column.name
        ))
}

/// A row whose field count differs from the header's.
pub(super) struct RaggedRow {
    pub(super) file_row: usize,
    pub(super) line: usize,
    pub(super) span: Span,
    pub(super) n_fields: usize,
    /// The fields past the header's width are all empty (separators at the end of the row).
    pub(super) extra_fields_empty: bool,
}

/// D0010: a row with more or fewer fields than the header.
pub(super) fn ragged_row(
    file: &str,
    row: &RaggedRow,
    header: &Header,
    separator: Separator,
) -> Diagnostic {
    let n_header = header.names.len();
    let fields = |n: usize| {
        if n == 1 {
            "1 field".to_owned()
        } else {
            format!("{n} fields")
        }
    };
    let help = if row.n_fields < n_header {
        "give every row one field per column; leave a field empty for a missing value".to_owned()
    } else if row.extra_fields_empty {
        "the row ends with extra separators; remove them".to_owned()
    } else {
        let holds = match separator {
            Separator::Comma => "a comma",
            Separator::Semicolon => "a semicolon",
            Separator::Tab => "a tab",
            Separator::Pipe => "a vertical bar",
        };
        format!("a value that holds {holds} must be in double quotes")
    };
    let mut diagnostic = Diagnostic::new(
        Code::RaggedRow,
        format!(
            "{}: {}, but the header has {}",
            row_label(file, row.file_row, row.line),
            fields(row.n_fields),
            fields(n_header)
        ),
    )
    .with_label(row.span, fields(row.n_fields));
    if let HeaderAt::Text { span, .. } = &header.at {
        diagnostic = diagnostic.with_label(*span, format!("header: {}", fields(n_header)));
    }
    diagnostic.with_help(help)
}

/// D0021: a row of a text file longer than the limit.
pub(super) fn row_too_long(
    file: &str,
    file_row: usize,
    line: usize,
    at: Span,
    max_bytes: usize,
) -> Diagnostic {
    Diagnostic::new(
        Code::RowTooLong,
        format!(
            "{}: the row is longer than the limit of {max_bytes} bytes",
            row_label(file, file_row, line)
        ),
    )
    .with_label(at, "this row")
    .with_help(
        "a row this long is not a table row: look for a quote that opens a field and never \
         closes, or a file that is not a table",
    )
}

/// D0023: more data rows than the limit.
pub(super) fn too_many_rows(spec: &TableSpec, max_rows: usize) -> Diagnostic {
    file_error(
        spec,
        Code::TooManyRows,
        format!(
            "data file {} has more than {max_rows} data rows",
            file_label(&spec.path)
        ),
        "a figure needs far fewer rows; read a summary or a sample of the file",
    )
}

/// D0024: a workbook that cannot be read.
pub(super) fn not_a_workbook(spec: &TableSpec, why: &str) -> Diagnostic {
    file_error(
        spec,
        Code::NotAWorkbook,
        format!(
            "data file {} cannot be read as an .xlsx workbook: {why}",
            file_label(&spec.path)
        ),
        "save it again as an Excel workbook (.xlsx), without a password, or export the sheet \
         as CSV",
    )
}

/// D0025: the sheet or cells the data block names are not in the workbook.
pub(super) fn no_such_sheet(spec: &TableSpec, wanted: &str, sheets: &[String]) -> Diagnostic {
    let help = match crate::diag::did_you_mean(wanted, sheets.iter().map(String::as_str)) {
        Some(close) => format!("did you mean {}? sheet names match exactly", quoted(close)),
        None if sheets.is_empty() => "the workbook has no sheets".to_owned(),
        None => format!(
            "the sheets of the workbook are {}",
            quoted_list(sheets.iter().map(String::as_str), LISTED)
        ),
    };
    file_error(
        spec,
        Code::NoSheet,
        format!(
            "data file {} has no sheet named {}",
            file_label(&spec.path),
            quoted(wanted)
        ),
        help,
    )
}

/// D0026: a Parquet file that cannot be read.
pub(super) fn not_parquet(spec: &TableSpec, why: &str) -> Diagnostic {
    file_error(
        spec,
        Code::NotParquet,
        format!(
            "data file {} cannot be read as a Parquet file: {why}",
            file_label(&spec.path)
        ),
        "write the file again with a current Parquet writer (compression none, snappy, gzip, \
         lz4 or zstd), or export the table as CSV",
    )
}

/// D0027: a Parquet column whose type cannot hold the declared variable's values.
pub(super) fn column_type(spec: &TableSpec, column: &ColumnSpec, stored: &str) -> Diagnostic {
    let wanted = match column.kind {
        ColumnKind::Numeric { .. } => "numbers",
        ColumnKind::Categorical { .. } => "categories (text, whole numbers or true/false)",
        ColumnKind::Id => "ids (text or whole numbers)",
    };
    Diagnostic::new(
        Code::ColumnType,
        format!(
            "{} column {} holds {stored}, which cannot be read as {wanted}",
            file_label(&spec.path),
            quoted(&column.header)
        ),
    )
    .with_label(column.decl_span, "declared here")
    .with_help(format!(
        "store {} as a flat column of {wanted}, or declare it with the scale its values have",
        column.name
    ))
    .with_file(&spec.path)
}
