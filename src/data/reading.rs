//! Reading data rows into typed columns, the part every file format shares: which columns are
//! read, one builder per column, the row cap, the place of every row, and the wording of a bad
//! cell's diagnostic (built only while under the report's cap).

use crate::diag::{Code, Span};

use super::cells::{Cell, ColumnBuilder, MissingTokens};
use super::load::ReadLimits;
use super::messages::{self, CellAt, RowAt};
use super::report::Report;
use super::spec::{DecimalMark, TableSpec};
use super::table::{Column, NamedColumn, RowPlace, RowPlaces, Table};

/// Where a bad cell is, worked out only when its diagnostic is written.
pub(super) struct CellPlace<'a> {
    pub(super) row: RowAt<'a>,
    /// The workbook column of the cell (0-based).
    pub(super) sheet_column: Option<u32>,
    /// The field in a text file's text, or the path in the spec.
    pub(super) span: Span,
}

/// The rows read so far of one file.
pub(super) struct Reading<'s> {
    spec: &'s TableSpec,
    missing: MissingTokens,
    /// (declared column, header field) of each column read, in the order of the fields.
    read: Vec<(usize, usize)>,
    builders: Vec<ColumnBuilder>,
    places: RowPlaces,
    decimal: DecimalMark,
    limits: ReadLimits,
}

impl<'s> Reading<'s> {
    /// Reads the declared columns that are to be read and were found at header `fields`.
    pub(super) fn new(
        spec: &'s TableSpec,
        fields: &[Option<usize>],
        decimal: DecimalMark,
        limits: &ReadLimits,
    ) -> Self {
        let mut read: Vec<(usize, usize)> = spec
            .columns
            .iter()
            .zip(fields)
            .enumerate()
            .filter_map(|(i, (column, field))| column.read.then_some((i, (*field)?)))
            .collect();
        read.sort_by_key(|&(_, field)| field);
        let builders = read
            .iter()
            .map(|&(i, _)| ColumnBuilder::new(&spec.columns[i].kind, decimal, limits.max_levels))
            .collect();
        Reading {
            spec,
            missing: MissingTokens::new(&spec.missing),
            read,
            builders,
            places: RowPlaces::default(),
            decimal,
            limits: *limits,
        }
    }

    /// (declared column, header field) of each column read, in the order of the fields.
    pub(super) fn columns(&self) -> &[(usize, usize)] {
        &self.read
    }

    pub(super) fn n_rows(&self) -> usize {
        self.places.len()
    }

    /// Starts a data row; `false`, with the error reported, when the file has more rows than
    /// the limit (reading must stop).
    pub(super) fn start_row(&mut self, place: RowPlace, report: &mut Report) -> bool {
        if self.places.len() >= self.limits.max_rows {
            let max_rows = self.limits.max_rows;
            report.add(Code::TooManyRows, |_| {
                messages::too_many_rows(self.spec, max_rows)
            });
            return false;
        }
        self.places.push(place);
        true
    }

    /// Reads the cell of the `k`-th column read (see [`Reading::columns`]) in the current row,
    /// reporting a bad one at the place `at` gives.
    pub(super) fn read_cell<'p>(
        &mut self,
        k: usize,
        cell: Cell,
        report: &mut Report,
        at: impl FnOnce() -> CellPlace<'p>,
    ) {
        let Err(problem) = self.builders[k].push(cell, &self.missing) else {
            return;
        };
        let column = &self.spec.columns[self.read[k].0];
        let (decimal, max_levels) = (self.decimal, self.limits.max_levels);
        report.add(problem.code(), |file| {
            let place = at();
            let value = cell.shown();
            messages::cell_problem(
                &CellAt {
                    file,
                    row: place.row,
                    sheet_column: place.sheet_column,
                    column,
                    value: &value,
                    span: place.span,
                    decimal,
                    max_levels,
                },
                problem,
            )
        });
    }

    /// The table: the columns read, in declaration order.
    pub(super) fn finish(self) -> Table {
        let mut columns: Vec<(usize, Column)> = self
            .read
            .iter()
            .zip(self.builders)
            .map(|(&(i, _), builder)| (i, builder.finish()))
            .collect();
        columns.sort_by_key(|(i, _)| *i);
        Table {
            path: self.spec.path.clone(),
            columns: columns
                .into_iter()
                .map(|(i, column)| NamedColumn {
                    name: self.spec.columns[i].name.clone(),
                    column,
                })
                .collect(),
            rows: self.places,
        }
    }
}
