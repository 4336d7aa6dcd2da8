//! A file's header and the declared columns found in it, for every file format.
//!
//! Every declared column is looked for, also one no figure being made reads, so a declaration
//! that the file lacks (`D0008`) or holds twice (`D0009`) is an error whatever is built.

use crate::diag::{Code, Span};

use super::messages;
use super::report::Report;
use super::spec::{Separator, TableSpec};

/// The names of a file's columns and where they are.
#[derive(Debug, Clone)]
pub(super) struct Header {
    pub(super) names: Vec<String>,
    pub(super) at: HeaderAt,
}

/// Where a header is, for labels.
#[derive(Debug, Clone)]
pub(super) enum HeaderAt {
    /// A text file's first row and each of its fields, in the file's text.
    Text { span: Span, fields: Vec<Span> },
    /// A workbook's header row (0-based) and the column of its first cell.
    Sheet { row: u32, first_column: u32 },
    /// A Parquet file's schema.
    Schema,
}

/// The header field of each declared column, in declaration order; `None` (reported) when the
/// header lacks it or has it more than once. `separator` is the text file's, for the help.
pub(super) fn locate(
    spec: &TableSpec,
    header: &Header,
    separator: Option<Separator>,
    report: &mut Report,
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
                        messages::missing_column(file, column, header, separator)
                    });
                    None
                }
                _ => {
                    report.add(Code::DuplicateHeader, |file| {
                        messages::duplicate_header(file, column, header, &found)
                    });
                    None
                }
            }
        })
        .collect()
}
