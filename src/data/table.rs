//! The typed table the data stage produces.
//!
//! Guarantees of a [`Table`] returned by [`crate::data::read_table`]:
//! - it holds exactly the declared columns that are read, in declaration order, each
//!   `n_rows()` long;
//! - every code of a categorical or id column indexes its `levels`/`values`; a missing cell is
//!   `None` from `get(row)` (columns are plain `f64`s or `u32`s with a bitmap of missing cells,
//!   see [`super::column`]);
//! - categorical cells are declared levels (when levels were declared); numeric cells are
//!   finite, `-0.0` is stored as `0.0`, and ratio cells are `>= 0`; id cells are never missing;
//! - nothing depends on hash order: levels and id values are in order of declaration or first
//!   appearance, so the same bytes always give the same table.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use super::column::{Codes, Names, Numbers};

/// One column's cells.
#[derive(Debug, Clone, PartialEq)]
pub enum Column {
    /// Identifiers, interned: `values[code]` is the text of a cell, in order of first appearance.
    Id { codes: Codes, values: Names },
    /// Categories: `levels[code]`, declared or in order of first appearance.
    Categorical { codes: Codes, levels: Names },
    /// Numbers, with their missing cells.
    Numeric(Numbers),
}

impl Column {
    /// Number of cells (the table's row count).
    pub fn len(&self) -> usize {
        match self {
            Column::Id { codes, .. } | Column::Categorical { codes, .. } => codes.len(),
            Column::Numeric(values) => values.len(),
        }
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// The codes of an id or categorical column.
    pub fn codes(&self) -> Option<&Codes> {
        match self {
            Column::Id { codes, .. } | Column::Categorical { codes, .. } => Some(codes),
            Column::Numeric(_) => None,
        }
    }

    /// The levels of a categorical column, or the distinct values of an id column.
    pub fn levels(&self) -> Option<&Names> {
        match self {
            Column::Id { values, .. } => Some(values),
            Column::Categorical { levels, .. } => Some(levels),
            Column::Numeric(_) => None,
        }
    }

    /// The numbers of a numeric column.
    pub fn numbers(&self) -> Option<&Numbers> {
        match self {
            Column::Numeric(values) => Some(values),
            _ => None,
        }
    }

    /// The text of an id or categorical cell (`None` when missing, out of range or numeric).
    pub fn text_at(&self, row: usize) -> Option<&str> {
        let code = self.codes()?.get(row)?;
        self.levels()?.get(code as usize)
    }

    /// Number of missing cells.
    pub fn n_missing(&self) -> usize {
        match self {
            Column::Id { codes, .. } | Column::Categorical { codes, .. } => codes.n_missing(),
            Column::Numeric(values) => values.n_missing(),
        }
    }
}

/// Where a data row is in its file, for later stages' messages.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct RowPlace {
    /// 1-based row of the file as a spreadsheet shows it: in a text file the header is row 1,
    /// blank lines count as rows, a line break inside quotes does not start a new row; in a
    /// workbook the sheet's row; in a Parquet file the data row.
    pub file_row: usize,
    /// 1-based line where the row starts (the row itself in workbooks and Parquet files).
    pub line: usize,
}

/// The place of every data row, stored as runs: a new entry only where the row or line number
/// does not follow on from the previous row's (after blank lines, skipped rows, quoted line
/// breaks), so a plain file costs a few bytes whatever its length.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub(super) struct RowPlaces {
    n_rows: usize,
    /// (first data row of the run, its place).
    runs: Vec<(usize, RowPlace)>,
    /// The place of the last row pushed.
    last: Option<RowPlace>,
}

impl RowPlaces {
    pub(super) fn push(&mut self, place: RowPlace) {
        let follows = self
            .last
            .is_some_and(|p| p.file_row + 1 == place.file_row && p.line + 1 == place.line);
        if !follows {
            self.runs.push((self.n_rows, place));
        }
        self.last = Some(place);
        self.n_rows += 1;
    }

    pub(super) fn len(&self) -> usize {
        self.n_rows
    }

    pub(super) fn get(&self, row: usize) -> Option<RowPlace> {
        if row >= self.n_rows {
            return None;
        }
        let run = self.runs.partition_point(|(first, _)| *first <= row);
        let (first, place) = self.runs.get(run.checked_sub(1)?)?;
        let ahead = row - first;
        Some(RowPlace {
            file_row: place.file_row + ahead,
            line: place.line + ahead,
        })
    }
}

/// A declared column of a [`Table`].
#[derive(Debug, Clone, PartialEq)]
pub(super) struct NamedColumn {
    pub(super) name: String,
    pub(super) column: Column,
}

/// A data file read into typed columns.
#[derive(Debug, Clone, PartialEq)]
pub struct Table {
    pub(super) path: PathBuf,
    pub(super) columns: Vec<NamedColumn>,
    pub(super) rows: RowPlaces,
}

impl Table {
    /// Number of data rows (the header is not counted).
    pub fn n_rows(&self) -> usize {
        self.rows.len()
    }

    /// The file the table was read from.
    pub fn path(&self) -> &Path {
        &self.path
    }

    /// The column of a declared variable.
    pub fn column(&self, name: &str) -> Option<&Column> {
        self.columns
            .iter()
            .find(|c| c.name == name)
            .map(|c| &c.column)
    }

    /// The declared columns, in declaration order.
    pub fn columns(&self) -> impl Iterator<Item = (&str, &Column)> + '_ {
        self.columns.iter().map(|c| (c.name.as_str(), &c.column))
    }

    /// The numbers of a numeric column.
    pub fn numeric(&self, name: &str) -> Option<&Numbers> {
        self.column(name)?.numbers()
    }

    /// The codes and levels of a categorical column.
    pub fn categorical(&self, name: &str) -> Option<(&Codes, &Names)> {
        match self.column(name)? {
            Column::Categorical { codes, levels } => Some((codes, levels)),
            _ => None,
        }
    }

    /// The codes and distinct values of an id column.
    pub fn id(&self, name: &str) -> Option<(&Codes, &Names)> {
        match self.column(name)? {
            Column::Id { codes, values } => Some((codes, values)),
            _ => None,
        }
    }

    /// Where data row `row` (0-based) is in the file.
    pub fn row_place(&self, row: usize) -> Option<RowPlace> {
        self.rows.get(row)
    }

    /// How the file is named in messages: its file name (`speeds.csv`).
    pub fn file_label(&self) -> String {
        super::report::file_label(&self.path)
    }

    /// `speeds.csv row 14` (with `(line L)` when the line differs), for messages of later stages.
    pub fn row_label(&self, row: usize) -> Option<String> {
        let place = self.row_place(row)?;
        Some(super::report::row_label(
            &super::report::file_label(&self.path),
            place.file_row,
            place.line,
        ))
    }

    /// A deterministic text form of the whole table: one line per column with its kind,
    /// levels and cells (`.` = missing; numbers as the shortest text that reads back the same
    /// double). Equal tables give equal text; suitable for hashing and for test expectations.
    pub fn canonical_text(&self) -> String {
        let mut out = String::new();
        let _ = writeln!(out, "rows {}", self.n_rows());
        for named in &self.columns {
            let _ = write!(out, "{}: ", named.name);
            write_column(&mut out, &named.column);
            out.push('\n');
        }
        out
    }
}

fn write_column(out: &mut String, column: &Column) {
    match column {
        Column::Id { codes, values } => {
            out.push_str("id ");
            write_codes(out, codes, values);
        }
        Column::Categorical { codes, levels } => {
            out.push_str("categorical ");
            write_codes(out, codes, levels);
        }
        Column::Numeric(values) => {
            out.push_str("numeric");
            for value in values.iter() {
                match value {
                    Some(v) => {
                        let _ = write!(out, " {v:?}");
                    }
                    None => out.push_str(" ."),
                }
            }
        }
    }
}

fn write_codes(out: &mut String, codes: &Codes, names: &Names) {
    out.push('[');
    for (i, name) in names.iter().enumerate() {
        if i > 0 {
            out.push_str(", ");
        }
        let _ = write!(out, "{name:?}");
    }
    out.push(']');
    for code in codes.iter() {
        match code {
            Some(c) => {
                let _ = write!(out, " {c}");
            }
            None => out.push_str(" ."),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn row_places_are_stored_as_runs() {
        let places = [(2, 2), (3, 3), (5, 5), (6, 7), (7, 8), (8, 9)];
        let mut rows = RowPlaces::default();
        for (file_row, line) in places {
            rows.push(RowPlace { file_row, line });
        }
        assert_eq!(rows.len(), 6);
        assert_eq!(rows.runs.len(), 3);
        for (i, (file_row, line)) in places.into_iter().enumerate() {
            assert_eq!(rows.get(i), Some(RowPlace { file_row, line }));
        }
        assert_eq!(rows.get(6), None);
    }
}
