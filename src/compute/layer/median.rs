//! `median`: the median of each cell. Over a numeric y, a value (Hyndman & Fan definition 7)
//! with an optional interval: the distribution-free order-statistic interval `ci(L)`
//! ([`stats::median_interval`], with the coverage it achieves) or a bootstrap interval
//! `boot(L)` / `boot(L, bca)`; over an ordinal y, the median level with the quartile levels
//! (Hyndman & Fan definition 1 on the levels' order).
//!
//! Summary rows per cell: `n`, `n_missing`, then `median` (and `ci_low`, `ci_high`, with
//! `coverage` for `ci(L)`), or for an ordinal y the level names `median`, `q1`, `q3`.

use crate::check::layer::MedianOpts;
use crate::check::plan::ErrorBar;
use crate::stats::{self, BootstrapStatistic};

use super::super::cells::{Placed, Values};
use super::super::extent::Extent;
use super::super::ComputeError;
use super::{boot_interval, n_rows, At, Estimate, LayerMarks, LayerOutput, MedianMarks, Stat};

/// The median level of an ordinal y.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LevelMark {
    pub x: usize,
    pub group: usize,
    /// Slot of the median level on the y axis, with the quartile levels.
    pub median: usize,
    pub q1: usize,
    pub q3: usize,
}

pub fn compute(opts: &MedianOpts, at: &At) -> Result<LayerOutput, ComputeError> {
    match &at.cells.placed {
        Placed::Values(values) => Ok(of_numbers(opts, at, values)),
        Placed::Levels(levels) => of_levels(at, levels),
        Placed::Rows(_) | Placed::Pairs(_) => Err(at.misplaced("numbers or levels")),
    }
}

fn of_numbers(opts: &MedianOpts, at: &At, values: &Values) -> LayerOutput {
    let mut rows = Vec::new();
    let mut marks = Vec::new();
    at.each_cell(values, &mut rows, |cell, sorted, k, rows| {
        let Ok(median) = stats::quantile_sorted(sorted, 0.5) else {
            return;
        };
        rows.push(k.number(Stat::Median, median));
        let interval = match opts.error {
            Some(ErrorBar::Ci { level }) => stats::median_interval(sorted, level).ok().map(|m| {
                rows.push(k.number(Stat::CiLow, m.low));
                rows.push(k.number(Stat::CiHigh, m.high));
                rows.push(k.number(Stat::Coverage, m.coverage));
                (m.low, m.high)
            }),
            Some(ErrorBar::Bootstrap { level, method }) => {
                boot_interval(sorted, BootstrapStatistic::Median, level, method).map(|(lo, hi)| {
                    rows.push(k.number(Stat::CiLow, lo));
                    rows.push(k.number(Stat::CiHigh, hi));
                    (lo, hi)
                })
            }
            Some(ErrorBar::Sd | ErrorBar::Se | ErrorBar::CiWithin { .. }) | None => None,
        };
        marks.push(Estimate {
            x: cell.x,
            group: cell.group,
            centre: median,
            interval,
        });
    });
    let mut y = Extent::default();
    for e in &marks {
        y.add(e.centre);
        if let Some((lo, hi)) = e.interval {
            y.add(lo);
            y.add(hi);
        }
    }
    LayerOutput {
        y,
        ..LayerOutput::new(LayerMarks::Median(MedianMarks::Values(marks)), rows)
    }
}

fn of_levels(at: &At, levels: &Values) -> Result<LayerOutput, ComputeError> {
    let y_levels = at
        .cells
        .y_levels
        .as_ref()
        .ok_or_else(|| at.misplaced("levels"))?;
    let mut rows = Vec::new();
    let mut marks = Vec::new();
    for cell in at.cells.cells_of(at.panel) {
        let mut counts = vec![0u64; y_levels.len()];
        for slot in levels.sorted(cell) {
            if let Some(c) = counts.get_mut(*slot as usize) {
                *c += 1;
            }
        }
        let k = at.cell_key(cell);
        let n: u64 = counts.iter().sum();
        n_rows(&mut rows, &k, n as usize, levels.placed.n_missing(cell));
        let Ok(q) = stats::ordinal_quartiles(&counts) else {
            continue;
        };
        rows.push(k.level(Stat::Median, &y_levels.names[q.median]));
        rows.push(k.level(Stat::Q1, &y_levels.names[q.q1]));
        rows.push(k.level(Stat::Q3, &y_levels.names[q.q3]));
        marks.push(LevelMark {
            x: cell.x,
            group: cell.group,
            median: q.median,
            q1: q.q1,
            q3: q.q3,
        });
    }
    Ok(LayerOutput::new(
        LayerMarks::Median(MedianMarks::Levels(marks)),
        rows,
    ))
}
