//! `mean`: the mean of each cell, as a dot (and a bar from zero with `bar`), with an optional
//! error bar: `sd`, `se`, a t interval `ci(L)`, a percentile bootstrap `boot(L)`, or a
//! Cousineau–Morey within-subject interval `ci(L, within)`.
//!
//! Summary rows per cell: `n`, `n_missing`, and when the mean exists `mean` and the error bar's
//! rows (`sd`, `se`, or `ci_low` and `ci_high`).

use std::collections::BTreeMap;

use crate::check::layer::MeanOpts;
use crate::check::plan::ErrorBar;
use crate::stats;

use super::super::cells::{Cell, Values};
use super::super::extent::Extent;
use super::super::ComputeError;
use super::{At, Bar, Estimate, LayerMarks, LayerOutput, Stat};

/// What a `mean` layer shows in one cell.
#[derive(Debug, Clone, Default)]
struct MeanCell {
    /// Values the mean is taken over.
    n: usize,
    /// Values of the cell not used: missing, or (within intervals) from incomplete subjects.
    n_missing: usize,
    mean: Option<f64>,
    /// The error bar's summary rows (`sd`, `se`, or `ci_low` and `ci_high`).
    error_rows: Vec<(Stat, f64)>,
    interval: Option<(f64, f64)>,
}

pub fn compute(opts: &MeanOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let within = match opts.error {
        Some(ErrorBar::CiWithin { level }) => Some(within_cells(at, values, level)),
        _ => None,
    };
    let mut rows = Vec::new();
    let mut estimates = Vec::new();
    let mut bars = Vec::new();
    for cell in at.cells.cells_of(at.panel) {
        let k = at.cell_key(cell);
        let m = match &within {
            Some(w) => w.get(&cell).cloned().unwrap_or_default(),
            None => mean_cell(values, cell, opts.error),
        };
        rows.push(k.count(Stat::N, m.n));
        rows.push(k.count(Stat::NMissing, m.n_missing));
        let Some(mean) = m.mean else {
            continue;
        };
        rows.push(k.number(Stat::Mean, mean));
        rows.extend(m.error_rows.iter().map(|(stat, v)| k.number(*stat, *v)));
        bars.push(Bar {
            x: cell.x,
            group: cell.group,
            height: mean,
        });
        estimates.push(Estimate {
            x: cell.x,
            group: cell.group,
            centre: mean,
            interval: m.interval,
        });
    }
    let mut y = Extent::default();
    if opts.bar {
        y.add(0.0);
    }
    for e in &estimates {
        y.add(e.centre);
        if let Some((lo, hi)) = e.interval {
            y.add(lo);
            y.add(hi);
        }
    }
    let marks = LayerMarks::Mean {
        bars: opts.bar.then_some(bars),
        estimates,
    };
    Ok(LayerOutput {
        y,
        y_from_zero: opts.bar,
        ..LayerOutput::new(marks, rows)
    })
}

/// The mean of every value in a cell, with an error bar that needs no other cell.
fn mean_cell(values: &Values, cell: Cell, error: Option<ErrorBar>) -> MeanCell {
    let sorted = values.sorted(cell);
    let mut out = MeanCell {
        n: sorted.len(),
        n_missing: values.placed.n_missing(cell),
        ..MeanCell::default()
    };
    let Ok(m) = stats::moments(sorted) else {
        return out;
    };
    out.mean = Some(m.mean);
    let (rows, interval) = match error {
        Some(ErrorBar::Sd) => {
            m.sd.map(|sd| (vec![(Stat::Sd, sd)], (m.mean - sd, m.mean + sd)))
        }
        Some(ErrorBar::Se) => m
            .se()
            .map(|se| (vec![(Stat::Se, se)], (m.mean - se, m.mean + se))),
        Some(ErrorBar::Ci { level }) => stats::mean_ci(sorted, level)
            .ok()
            .map(|ci| interval_rows(ci.low, ci.high)),
        Some(ErrorBar::Bootstrap { level }) => stats::bootstrap::bootstrap_mean(sorted, level)
            .ok()
            .map(|ci| interval_rows(ci.low, ci.high)),
        None | Some(ErrorBar::CiWithin { .. }) => None,
    }
    .unzip();
    out.error_rows = rows.unwrap_or_default();
    out.interval = interval;
    out
}

/// The summary rows and ends of an interval.
fn interval_rows(low: f64, high: f64) -> (Vec<(Stat, f64)>, (f64, f64)) {
    (vec![(Stat::CiLow, low), (Stat::CiHigh, high)], (low, high))
}

/// Cousineau–Morey means and intervals for every cell of the figure, keyed by cell.
///
/// The within cells are every combination of the within factors the figure uses: x, and
/// colour and panels when they are within factors. Colour or panels on any other variable (a
/// between factor) split the subjects into separate normalisations. Only subjects with a value
/// in every within cell of their normalisation are used, for the mean as for the interval, so
/// the interval is centred on the mean shown; a cell's other values count as missing.
fn within_cells(at: &At, values: &Values, level: f64) -> BTreeMap<Cell, MeanCell> {
    let cells = at.cells;
    let is_within =
        |v: Option<&crate::check::plan::CatVar>| v.is_some_and(|c| cells.book.is_within(c.var));
    let panel_within = is_within(cells.plan.panels.as_ref());
    let colour_within = is_within(cells.plan.colour.as_ref());
    let mut sets: BTreeMap<(Option<usize>, Option<usize>), Vec<Cell>> = BTreeMap::new();
    for panel in 0..cells.panels.len() {
        for x in 0..cells.x_levels.len() {
            for group in 0..cells.groups.len() {
                let set = (
                    (!panel_within).then_some(panel),
                    (!colour_within).then_some(group),
                );
                sets.entry(set).or_default().push(Cell { panel, x, group });
            }
        }
    }
    sets.values()
        .flat_map(|set| within_set(values, set, level))
        .collect()
}

/// One normalisation: subjects × `cells`, complete subjects only.
///
/// A cell that holds no value at all (a level nobody was measured at, here) is left out of the
/// within cells, so it does not drop every subject; it shows nothing.
fn within_set(values: &Values, cells: &[Cell], level: f64) -> Vec<(Cell, MeanCell)> {
    let (used, empty): (Vec<Cell>, Vec<Cell>) =
        cells.iter().partition(|c| !values.sorted(**c).is_empty());
    let mut out = complete_subjects(values, &used, level);
    out.extend(empty.into_iter().map(|cell| {
        let m = MeanCell {
            n_missing: values.placed.n_missing(cell),
            ..MeanCell::default()
        };
        (cell, m)
    }));
    out
}

/// Means and intervals of `cells` over the subjects with a value in every one of them.
fn complete_subjects(values: &Values, cells: &[Cell], level: f64) -> Vec<(Cell, MeanCell)> {
    let mut by_subject: BTreeMap<u32, Vec<Option<f64>>> = BTreeMap::new();
    let mut present = vec![0usize; cells.len()];
    for o in &values.placed.obs {
        let Some(i) = cells.iter().position(|c| *c == o.cell) else {
            continue;
        };
        present[i] += 1;
        if let Some(s) = o.subject {
            by_subject
                .entry(s)
                .or_insert_with(|| vec![None; cells.len()])[i] = Some(o.value);
        }
    }
    let complete: Vec<Vec<Option<f64>>> = by_subject
        .into_values()
        .filter(|row| row.iter().all(Option::is_some))
        .collect();
    let intervals = stats::within_subject_intervals(&complete, stats::Spread::Ci { level }).ok();
    cells
        .iter()
        .enumerate()
        .map(|(i, cell)| {
            let column: Vec<f64> = complete.iter().filter_map(|row| row[i]).collect();
            let (error_rows, interval) = intervals
                .as_ref()
                .map(|w| interval_rows(w.cells[i].low, w.cells[i].high))
                .unzip();
            let m = MeanCell {
                n: complete.len(),
                n_missing: values.placed.n_missing(*cell)
                    + present[i].saturating_sub(complete.len()),
                mean: stats::mean(&column).ok(),
                error_rows: error_rows.unwrap_or_default(),
                interval,
            };
            (*cell, m)
        })
        .collect()
}
