//! `difference from("LEVEL")`: per x level (other than the reference) and colour group, the
//! difference of its mean from the reference level's, with a t interval.
//!
//! - Paired (x a within factor of the data's subjects): the subjects with a value in both the
//!   level's cell and the reference's cell of their panel and colour group; the estimate is the
//!   mean of their differences `level − reference`, the interval the t interval of those
//!   differences (Student 1908; [`stats::paired_interval`]).
//! - Otherwise Welch (1947): the level's mean minus the reference's, with the
//!   Welch–Satterthwaite interval ([`stats::welch_interval`]).
//!
//! Small n: a difference needs one pair (paired) or a value on each side (Welch); its interval
//! needs two pairs, or two values on each side with some spread. A difference without its
//! interval is drawn alone, has no `df`, `ci_low` or `ci_high` row, and the key says why. A
//! reference cell without values gives no difference in its panel and group, and the warning
//! W0016.
//!
//! Summary rows per x level other than the reference, and colour group: `n` (pairs, or the
//! level's values), `n_missing` (the level's missing values, and paired, its values whose
//! subject has none at the reference), then `difference`, `df`, `ci_low`, `ci_high` when
//! defined.

use std::collections::BTreeMap;

use crate::check::layer::DifferenceOpts;
use crate::diag::{Code, Diagnostic};
use crate::stats;

use super::super::cells::{Cell, Values};
use super::super::extent::Extent;
use super::super::summary::{RowKey, SummaryRow};
use super::super::ComputeError;
use super::{At, Estimate, LayerMarks, LayerOutput, Stat};

/// The differences of one panel, and each subject's own difference when drawn.
#[derive(Debug, Clone, PartialEq)]
pub struct DifferenceMarks {
    /// The reference level's slot on x (absent when a filter emptied it).
    pub reference: Option<usize>,
    /// Each level's difference (`centre`) with its interval.
    pub estimates: Vec<Estimate>,
    /// Each subject's difference (`dots`): (x slot, colour group, value), by cell and subject.
    pub dots: Vec<(usize, usize, f64)>,
}

/// The values a difference compares in one cell: the level's and the reference's, paired by
/// subject or as two samples.
struct Compared {
    level: Vec<f64>,
    reference: Vec<f64>,
    /// The level's values not used (missing, or without a partner at the reference).
    n_missing: usize,
}

pub fn compute(
    opts: &DifferenceOpts,
    at: &At,
    values: &Values,
) -> Result<LayerOutput, ComputeError> {
    let cells = at.cells;
    let reference = cells
        .x_levels
        .names
        .iter()
        .position(|n| *n == opts.reference);
    let mut rows = Vec::new();
    let mut marks = DifferenceMarks {
        reference,
        estimates: Vec::new(),
        dots: Vec::new(),
    };
    let mut short = false;
    let mut empty_reference = None;
    for cell in cells.cells_of(at.panel) {
        if Some(cell.x) == reference {
            continue;
        }
        let key = at.cell_key(cell);
        // A reference level the filter emptied is a cell no value is in.
        let reference_cell = Cell {
            x: reference.unwrap_or(usize::MAX),
            ..cell
        };
        let compared = if opts.paired {
            paired(values, cell, reference_cell)
        } else {
            independent(values, cell, reference_cell)
        };
        rows.push(key.count(Stat::N, compared.level.len()));
        rows.push(key.count(Stat::NMissing, compared.n_missing));
        if compared.reference.is_empty() && !values.sorted(cell).is_empty() {
            empty_reference.get_or_insert(cell);
        }
        let Some(estimate) = difference(opts, &compared, cell, &key, &mut rows) else {
            continue;
        };
        short |= estimate.interval.is_none();
        if opts.dots {
            let each = compared.level.iter().zip(&compared.reference);
            marks
                .dots
                .extend(each.map(|(l, r)| (cell.x, cell.group, l - r)));
        }
        marks.estimates.push(estimate);
    }
    let mut axis = Extent::default();
    axis.add(0.0);
    for e in &marks.estimates {
        axis.add(e.centre);
        if let Some((lo, hi)) = e.interval {
            axis.add(lo);
            axis.add(hi);
        }
    }
    marks.dots.iter().for_each(|d| axis.add(d.2));
    let mut out = LayerOutput::new(LayerMarks::Difference(marks), rows);
    out.estimate_axis = Some((axis_title(at, opts), axis));
    out.note = short.then_some(if opts.paired {
        "no interval from fewer than 2 pairs"
    } else {
        "no interval where a level has fewer than 2 values or none vary"
    });
    out.warnings
        .extend(empty_reference.map(|c| no_reference(at, opts, c)));
    Ok(out)
}

/// The difference of one cell from its reference, with its summary rows; `None` without one.
fn difference(
    opts: &DifferenceOpts,
    compared: &Compared,
    cell: Cell,
    key: &RowKey,
    rows: &mut Vec<SummaryRow>,
) -> Option<Estimate> {
    let (level, reference) = (&compared.level, &compared.reference);
    let interval = if opts.paired {
        stats::paired_interval(level, reference, opts.level)
    } else {
        stats::welch_interval(level, reference, opts.level)
    }
    .ok();
    let centre = match &interval {
        Some(i) => i.estimate,
        None if opts.paired => {
            let each: Vec<f64> = level.iter().zip(reference).map(|(l, r)| l - r).collect();
            stats::mean(&each).ok()?
        }
        None => stats::mean(level).ok()? - stats::mean(reference).ok()?,
    };
    rows.push(key.number(Stat::Difference, centre));
    if let Some(i) = &interval {
        rows.push(key.number(Stat::Df, i.df));
        rows.push(key.number(Stat::CiLow, i.low));
        rows.push(key.number(Stat::CiHigh, i.high));
    }
    Some(Estimate {
        x: cell.x,
        group: cell.group,
        centre,
        interval: interval.map(|i| (i.low, i.high)),
    })
}

/// The subjects with a value in both cells, in subject order.
fn paired(values: &Values, cell: Cell, reference: Cell) -> Compared {
    let mut by_subject: BTreeMap<u32, (Option<f64>, Option<f64>)> = BTreeMap::new();
    let mut n_missing = values.placed.n_missing(cell);
    for o in &values.placed.obs {
        let side = match (o.cell == cell, o.cell == reference) {
            (true, _) => 0,
            (_, true) => 1,
            _ => continue,
        };
        let Some(s) = o.subject else {
            n_missing += usize::from(side == 0);
            continue;
        };
        let pair = by_subject.entry(s).or_default();
        if side == 0 {
            pair.0 = Some(o.value);
        } else {
            pair.1 = Some(o.value);
        }
    }
    let mut out = Compared {
        level: Vec::new(),
        reference: Vec::new(),
        n_missing,
    };
    for pair in by_subject.into_values() {
        match pair {
            (Some(l), Some(r)) => {
                out.level.push(l);
                out.reference.push(r);
            }
            (Some(_), None) => out.n_missing += 1,
            _ => {}
        }
    }
    out
}

/// Every value of each cell, as two samples.
fn independent(values: &Values, cell: Cell, reference: Cell) -> Compared {
    Compared {
        level: values.sorted(cell).to_vec(),
        reference: values.sorted(reference).to_vec(),
        n_missing: values.placed.n_missing(cell),
    }
}

/// "Difference from Paper (words/min)": the axis of differences, in y's unit.
fn axis_title(at: &At, opts: &DifferenceOpts) -> String {
    let unit = match &at.cells.plan.axes {
        crate::check::plan::Axes::CatNum { y, .. } => at.cells.book.var(y.var.var).unit.clone(),
        _ => None,
    };
    match unit {
        Some(u) => format!("Difference from {} ({u})", opts.reference_label),
        None => format!("Difference from {}", opts.reference_label),
    }
}

/// W0016: a cell with values whose reference cell has none.
fn no_reference(at: &At, opts: &DifferenceOpts, cell: Cell) -> Diagnostic {
    let cells = at.cells;
    let mut place = Vec::new();
    if cells.plan.colour.is_some() {
        place.push(format!("colour \"{}\"", cells.groups.names[cell.group]));
    }
    if cells.plan.panels.is_some() {
        place.push(format!("panel \"{}\"", cells.panels.names[cell.panel]));
    }
    let place = if place.is_empty() {
        String::new()
    } else {
        format!(" ({})", place.join(", "))
    };
    Diagnostic::new(
        Code::FewValues,
        format!(
            "no values at the reference level \"{}\"{place}: its differences are not drawn",
            opts.reference
        ),
    )
    .with_label(at.head, "compares with the reference level")
    .with_help(
        "choose a reference level every group has values at, or check the data and the filter",
    )
}
