//! Levels of categorical variables in display order, and the columns they come from.
//!
//! A figure shows a categorical variable's levels in declared (or first-appearance) order, by
//! count or by name; a level that the figure's filter empties is not shown, while a declared
//! level with no rows at all stays, so an empty category is seen as empty.

use crate::check::plan::{CatAxis, CatVar, Codebook, LevelOrder, VarId};
use crate::data::{Codes, Column, Names, Numbers, Table};

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
        if let Some(slot) = code.and_then(|c| rows_of.get_mut(c as usize)) {
            slot.0 += 1;
            slot.1 += usize::from(*kept);
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
        LevelOrder::Name => {
            order_codes.sort_by_key(|&i| crate::markup::plain(&label_of(i)).to_lowercase())
        }
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
