//! The wording of every data error found while reading a file's rows: message, labels and help.
//!
//! Messages name the file, the row (header = row 1), the column and the value, so they read
//! well even without the labelled excerpt; labels point at the exact field in the data file.

use crate::diag::{Code, Diagnostic, Span};

use super::cells::{level_hint, CellProblem, LevelHint};
use super::numbers::{is_common_missing_marker, NonFinite, NotNumberHint};
use super::report::{quoted, quoted_list, row_label};
use super::spec::{ColumnKind, ColumnSpec, TableSpec};

/// Most names listed in a help line.
const LISTED: usize = 12;

/// The separator a file is read with, in words.
fn separator_words(delimiter: u8) -> &'static str {
    if delimiter == b'\t' {
        "tabs"
    } else {
        "commas"
    }
}

/// One cell with a problem.
pub(super) struct CellAt<'a> {
    pub(super) file: &'a str,
    pub(super) file_row: usize,
    pub(super) line: usize,
    pub(super) column: &'a ColumnSpec,
    pub(super) value: &'a str,
    pub(super) span: Span,
}

impl CellAt<'_> {
    /// `speeds.csv row 14, column "medium"`
    fn place(&self) -> String {
        format!(
            "{}, column {}",
            row_label(self.file, self.file_row, self.line),
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
    }
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
        NotNumberHint::Separators => "write numbers with a decimal point and no thousands \
             separators: 1234.5, not 1,234.5, 1 234.5 or 1234,5"
            .to_owned(),
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
        NotNumberHint::Other => format!(
            "{} is numeric, so each cell must be a number such as 12, -3.5 or 1.2e3, or a \
             missing token; declare it nominal if it holds categories",
            cell.column.name
        ),
    }
}

/// The header row, owned, as needed for the header checks.
pub(super) struct HeaderRow {
    pub(super) names: Vec<String>,
    pub(super) spans: Vec<Span>,
    pub(super) span: Span,
}

/// D0005: no header row at all.
pub(super) fn empty_file(spec: &TableSpec, file: &str, delimiter: u8) -> Diagnostic {
    let headers = quoted_list(spec.columns.iter().map(|c| c.header.as_str()), LISTED);
    let help = if headers.is_empty() {
        format!(
            "the first row must name the columns, separated by {}",
            separator_words(delimiter)
        )
    } else {
        format!(
            "the first row must name the columns, separated by {}: {headers}",
            separator_words(delimiter)
        )
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
pub(super) fn header_only(file: &str, header: &HeaderRow) -> Diagnostic {
    Diagnostic::new(
        Code::HeaderOnly,
        format!("{file} has a header row but no data rows"),
    )
    .with_label(header.span, "the only row")
    .with_help("add the data below the header; a figure needs at least one row")
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

/// D0007: anything else the CSV reader refuses.
pub(super) fn not_csv(spec: &TableSpec, file: &str, error: &csv::Error) -> Diagnostic {
    Diagnostic::new(
        Code::Malformed,
        format!("{file} could not be read as CSV: {error}"),
    )
    .with_label(spec.path_span, "data file")
    .with_help("save the file as CSV (or TSV) in UTF-8")
    .with_file(&spec.path)
}

/// D0008: a declared column the header lacks.
pub(super) fn missing_column(
    file: &str,
    column: &ColumnSpec,
    header: &HeaderRow,
    delimiter: u8,
) -> Diagnostic {
    let read_for = if column.header == column.name {
        String::new()
    } else {
        format!(" (read for {})", column.name)
    };
    Diagnostic::new(
        Code::MissingColumn,
        format!("{file} has no column {}{read_for}", quoted(&column.header)),
    )
    .with_label(column.decl_span, "declared here")
    .with_label(header.span, "header row")
    .with_help(missing_column_help(file, column, header, delimiter))
}

fn missing_column_help(
    file: &str,
    column: &ColumnSpec,
    header: &HeaderRow,
    delimiter: u8,
) -> String {
    let names = &header.names;
    if let Some(padded) = names.iter().find(|h| h.trim() == column.header) {
        return format!(
            "the header has {} with spaces around the name; remove them, or write column({})",
            quoted(padded),
            quoted(padded)
        );
    }
    if let [only] = names.as_slice() {
        if let Some(words) = other_separator(only, delimiter) {
            return format!(
                "the header row is one field that holds {words}; a .tsv file is read with tabs \
                 and any other file with commas"
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

/// When a one-field header holds another common separator, that separator in words.
fn other_separator(field: &str, delimiter: u8) -> Option<&'static str> {
    [(';', "semicolons"), ('\t', "tabs"), (',', "commas")]
        .into_iter()
        .find(|&(sep, _)| sep as u32 != u32::from(delimiter) && field.contains(sep))
        .map(|(_, words)| words)
}

/// D0009: a declared column's header appears more than once.
pub(super) fn duplicate_header(file: &str, column: &ColumnSpec, spans: &[Span]) -> Diagnostic {
    let header = quoted(&column.header);
    let mut diagnostic = Diagnostic::new(
        Code::DuplicateHeader,
        format!("{file} has {} columns named {header}", spans.len()),
    );
    for (i, span) in spans.iter().enumerate() {
        let text = if i == 0 {
            format!("a column named {header}")
        } else {
            "another one".to_owned()
        };
        diagnostic = diagnostic.with_label(*span, text);
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
    header: &HeaderRow,
    delimiter: u8,
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
        format!(
            "a value that holds {} must be in double quotes",
            if delimiter == b'\t' {
                "a tab"
            } else {
                "a comma"
            }
        )
    };
    Diagnostic::new(
        Code::RaggedRow,
        format!(
            "{}: {}, but the header has {}",
            row_label(file, row.file_row, row.line),
            fields(row.n_fields),
            fields(n_header)
        ),
    )
    .with_label(row.span, fields(row.n_fields))
    .with_label(header.span, format!("header: {}", fields(n_header)))
    .with_help(help)
}
