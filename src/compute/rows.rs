//! From table rows to observations: filtering, level order, cells, and repeated trials.
//!
//! An observation is one value of y (or of x, for distributions) placed in a cell
//! (panel, x slot, colour group). Rows whose panel, x or colour value is missing cannot be
//! placed and are counted per layer; rows whose measured value is missing are counted per cell.

use std::collections::BTreeMap;

use crate::check::plan::{CatAxis, CatVar, Codebook, Collapse, Filter, LevelOrder, VarId};
use crate::data::{Codes, Column, Names, Numbers, Table};
use crate::diag::Diagnostic;

use super::ComputeError;

/// The levels of a categorical variable in display order.
#[derive(Debug, Clone, PartialEq)]
pub struct Levels {
    /// Level names as in the data, in display order.
    pub names: Vec<String>,
    /// Display text, in display order.
    pub labels: Vec<String>,
    /// Slot (display position) of each data code; `None` for a level not shown.
    slot_of_code: Vec<Option<usize>>,
}

impl Levels {
    pub fn len(&self) -> usize {
        self.names.len()
    }

    pub fn is_empty(&self) -> bool {
        self.names.is_empty()
    }

    /// A single unnamed level, for a figure without panels or colour.
    pub fn single() -> Levels {
        Levels {
            names: vec![String::new()],
            labels: vec![String::new()],
            slot_of_code: vec![Some(0)],
        }
    }

    /// The display slot of a data code; `None` when its level is not shown.
    pub fn slot(&self, code: u32) -> Option<usize> {
        self.slot_of_code.get(code as usize).copied().flatten()
    }
}

/// Codes of a categorical column, or an error naming the variable.
pub fn codes<'t>(
    table: &'t Table,
    book: &Codebook,
    var: VarId,
) -> Result<(&'t Codes, &'t Names), ComputeError> {
    let name = &book.var(var).name;
    match table.column(name) {
        Some(Column::Categorical { codes, levels })
        | Some(Column::Id {
            codes,
            values: levels,
        }) => Ok((codes, levels)),
        _ => Err(ComputeError::Internal(format!(
            "column `{name}` is not categorical in the table"
        ))),
    }
}

/// Values of a numeric column.
pub fn numbers<'t>(
    table: &'t Table,
    book: &Codebook,
    var: VarId,
) -> Result<&'t Numbers, ComputeError> {
    let name = &book.var(var).name;
    table.numeric(name).ok_or_else(|| {
        ComputeError::Internal(format!("column `{name}` is not numeric in the table"))
    })
}

/// Every level of a categorical variable in display order (`order(count)` counts kept rows).
pub fn levels(
    table: &Table,
    book: &Codebook,
    var: &CatVar,
    order: LevelOrder,
    keep: &[bool],
) -> Result<Levels, ComputeError> {
    ordered_levels(table, book, var, order, keep, |_| true)
}

/// The levels a figure shows on an axis, in panels or in its legend: every level except those
/// the figure's filter empties (a level with rows in the data and none kept). A declared level
/// with no rows at all stays, so an empty category is seen as empty.
pub fn shown_levels(
    table: &Table,
    book: &Codebook,
    var: &CatVar,
    order: LevelOrder,
    keep: &[bool],
) -> Result<Levels, ComputeError> {
    let (codes, names) = codes(table, book, var.var)?;
    let mut rows_of = vec![(0usize, 0usize); names.len()];
    for (code, kept) in codes.iter().zip(keep) {
        if let Some(c) = code {
            rows_of[c as usize].0 += 1;
            rows_of[c as usize].1 += usize::from(*kept);
        }
    }
    ordered_levels(table, book, var, order, keep, |code| {
        let (all, kept) = rows_of[code];
        all == 0 || kept > 0
    })
}

fn ordered_levels(
    table: &Table,
    book: &Codebook,
    var: &CatVar,
    order: LevelOrder,
    keep: &[bool],
    shown: impl Fn(usize) -> bool,
) -> Result<Levels, ComputeError> {
    let (codes, names) = codes(table, book, var.var)?;
    let decl = book.var(var.var);
    let label_of = |i: usize| -> String {
        decl.labels
            .as_ref()
            .and_then(|l| l.get(i).cloned())
            .unwrap_or_else(|| names[i].to_owned())
    };
    let mut order_codes: Vec<usize> = (0..names.len()).filter(|&c| shown(c)).collect();
    match order {
        LevelOrder::Levels => {}
        LevelOrder::Count => {
            let mut counts = vec![0usize; names.len()];
            for (code, _) in codes.iter().zip(keep).filter(|(_, k)| **k) {
                if let Some(c) = code {
                    counts[c as usize] += 1;
                }
            }
            order_codes.sort_by(|a, b| counts[*b].cmp(&counts[*a]));
        }
        LevelOrder::Name => order_codes.sort_by_key(|&i| label_of(i).to_lowercase()),
    }
    let mut slot_of_code = vec![None; names.len()];
    for (slot, &code) in order_codes.iter().enumerate() {
        slot_of_code[code] = Some(slot);
    }
    Ok(Levels {
        names: order_codes.iter().map(|&i| names[i].to_owned()).collect(),
        labels: order_codes.iter().map(|&i| label_of(i)).collect(),
        slot_of_code,
    })
}

/// Levels shown on a categorical x axis (see [`shown_levels`]).
pub fn axis_levels(
    table: &Table,
    book: &Codebook,
    axis: &CatAxis,
    keep: &[bool],
) -> Result<Levels, ComputeError> {
    shown_levels(table, book, &axis.var, axis.order, keep)
}

/// Which rows pass the figure's filter. Missing values never satisfy a comparison.
pub fn filter_rows(
    table: &Table,
    book: &Codebook,
    filter: Option<&Filter>,
) -> Result<Vec<bool>, ComputeError> {
    let n = table.n_rows();
    match filter {
        None => Ok(vec![true; n]),
        Some(f) => (0..n)
            .map(|row| eval(table, book, f, row).map(|v| v == Some(true)))
            .collect(),
    }
}

/// Three-valued: `None` when a value the test needs is missing (`not` of missing stays missing).
fn eval(
    table: &Table,
    book: &Codebook,
    f: &Filter,
    row: usize,
) -> Result<Option<bool>, ComputeError> {
    Ok(match f {
        Filter::Levels { var, keep } => {
            let (codes, _) = codes(table, book, *var)?;
            codes.get(row).map(|c| keep.contains(&(c as usize)))
        }
        Filter::Numeric { var, op, value } => {
            let values = numbers(table, book, *var)?;
            values.get(row).map(|v| {
                use crate::syntax::ast::CompareOp::*;
                match op {
                    Eq => v == *value,
                    Ne => v != *value,
                    Lt => v < *value,
                    Le => v <= *value,
                    Gt => v > *value,
                    Ge => v >= *value,
                }
            })
        }
        Filter::Not(inner) => eval(table, book, inner, row)?.map(|b| !b),
        Filter::And(a, b) => match (eval(table, book, a, row)?, eval(table, book, b, row)?) {
            (Some(false), _) | (_, Some(false)) => Some(false),
            (Some(true), Some(true)) => Some(true),
            _ => None,
        },
        Filter::Or(a, b) => match (eval(table, book, a, row)?, eval(table, book, b, row)?) {
            (Some(true), _) | (_, Some(true)) => Some(true),
            (Some(false), Some(false)) => Some(false),
            _ => None,
        },
    })
}

/// A cell: panel slot, x slot (0 when x is numeric) and colour group slot.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Cell {
    pub panel: usize,
    pub x: usize,
    pub group: usize,
}

/// One placed value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Obs {
    pub cell: Cell,
    /// The first table row it came from (1-based data rows start at 2 with the header).
    pub row: usize,
    /// The subject's code, when the data declares a subject.
    pub subject: Option<u32>,
    pub value: f64,
}

/// Observations of one measured variable, placed in cells.
#[derive(Debug, Clone, Default)]
pub struct Placed {
    pub obs: Vec<Obs>,
    /// Rows of each cell whose measured value is missing.
    pub missing_by_cell: BTreeMap<Cell, usize>,
    /// Kept rows that could not be placed (missing panel, x or colour value).
    pub unplaced: usize,
}

/// How rows are sorted into cells.
pub struct Placement<'a> {
    pub panel: Option<(&'a Codes, &'a Levels)>,
    pub x: Option<(&'a Codes, &'a Levels)>,
    pub group: Option<(&'a Codes, &'a Levels)>,
    pub subject: Option<&'a Codes>,
}

impl Placement<'_> {
    fn cell(&self, row: usize) -> Option<Cell> {
        let slot = |part: &Option<(&Codes, &Levels)>| -> Option<usize> {
            match part {
                None => Some(0),
                Some((codes, levels)) => codes.get(row).and_then(|c| levels.slot(c)),
            }
        };
        Some(Cell {
            panel: slot(&self.panel)?,
            x: slot(&self.x)?,
            group: slot(&self.group)?,
        })
    }
}

/// Places every kept row's value in its cell.
pub fn place(
    values: impl IntoIterator<Item = Option<f64>>,
    keep: &[bool],
    placement: &Placement,
) -> Placed {
    let mut out = Placed::default();
    for (row, value) in values.into_iter().enumerate() {
        if !keep[row] {
            continue;
        }
        let Some(cell) = placement.cell(row) else {
            out.unplaced += 1;
            continue;
        };
        match value {
            Some(v) => out.obs.push(Obs {
                cell,
                row,
                subject: placement.subject.and_then(|s| s.get(row)),
                value: v,
            }),
            None => *out.missing_by_cell.entry(cell).or_default() += 1,
        }
    }
    out
}

/// Collapses repeated trials: one value per subject per cell (mean or median of its trials).
pub fn collapse(placed: &mut Placed, how: Collapse) {
    let mut by_key: BTreeMap<(Cell, u32), Vec<Obs>> = BTreeMap::new();
    let mut without_subject = Vec::new();
    for o in placed.obs.drain(..) {
        match o.subject {
            Some(s) => by_key.entry((o.cell, s)).or_default().push(o),
            None => without_subject.push(o),
        }
    }
    let mut out: Vec<Obs> = by_key
        .into_values()
        .map(|trials| {
            let mut values: Vec<f64> = trials.iter().map(|o| o.value).collect();
            let value = match how {
                Collapse::Mean => crate::stats::mean(&values).unwrap_or(values[0]),
                Collapse::Median => {
                    values.sort_by(f64::total_cmp);
                    crate::stats::quantile_sorted(&values, 0.5).unwrap_or(values[0])
                }
            };
            Obs { value, ..trials[0] }
        })
        .collect();
    out.extend(without_subject);
    out.sort_by_key(|o| o.row);
    placed.obs = out;
}

/// The first subject with more than one value in a cell, if any: (subject code, cell, rows).
pub fn repeated_subject(placed: &Placed) -> Option<(u32, Cell, usize, usize)> {
    let mut seen: BTreeMap<(Cell, u32), usize> = BTreeMap::new();
    for o in &placed.obs {
        let Some(s) = o.subject else { continue };
        if let Some(first) = seen.insert((o.cell, s), o.row) {
            return Some((s, o.cell, first, o.row));
        }
    }
    None
}

/// A diagnostic for a subject with two values in one cell (rule 7, found in the data); `rows`
/// are the two rows of the data file (header = row 1).
pub fn repeated_subject_error(
    subject: &str,
    cell: &str,
    rows: (usize, usize),
    layer_span: crate::diag::Span,
) -> Diagnostic {
    Diagnostic::error(
        crate::check::codes::SUBJECT_REPEATED_IN_CELL,
        format!("subject \"{subject}\" has more than one value in cell {cell} (data rows {} and {})", rows.0, rows.1),
    )
    .with_label(layer_span, "joins one value per subject and cell")
    .with_help("if these are repeated trials, declare `replicates TRIAL collapse(mean)` in the data block; otherwise correct the data")
}
