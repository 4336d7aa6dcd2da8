//! `mean`: the mean of each cell, as a dot (and a bar from zero with `bar`), with an optional
//! error bar: `sd`, `se`, a t interval `ci(L)`, a bootstrap interval `boot(L)` (percentile) or
//! `boot(L, bca)`, or a Cousineau–Morey within-subject interval `ci(L, within)`.
//!
//! On a log y axis the mean is the geometric mean ([`stats::geometric`]): every interval is
//! computed on the natural logs and both ends exponentiated, so it is asymmetric (`gm ÷ f` to
//! `gm × f`), and `sd` and `se` are reported as multiplicative factors `exp(sd of ln y)` and
//! `exp(se of ln y)`.
//!
//! Over a numeric x the means are taken at each distinct x value of a panel and colour group:
//! the occasions the data share (weeks 0, 4, 12 of a follow-up). When most x values of a group
//! hold a single value, the x values are not shared occasions and most "means" are single
//! values: the figure warns (W0014) and points to `smooth`.
//!
//! `join` changes no number: the line joins the means drawn.
//!
//! Summary rows per cell: `n`, `n_missing`, and when the mean exists `mean` (or
//! `geometric_mean`) and the error bar's rows (`sd`, `se`, `geometric_sd`, `geometric_se`, or
//! `ci_low` and `ci_high`). Over a numeric x: `n` and `n_missing` per colour group (`x`
//! empty), then per x value `n`, the mean and its error bar's rows.

use std::collections::BTreeMap;

use crate::check::layer::MeanOpts;
use crate::check::plan::ErrorBar;
use crate::diag::{Code, Diagnostic, Span};
use crate::stats::{self, BootstrapStatistic, Spread};

use super::super::cells::{Cell, Pair, Placed, Placement, Values};
use super::super::extent::Extent;
use super::super::summary::{format_number, RowKey, SummaryRow};
use super::super::ComputeError;
use super::{boot_interval, At, Bar, Estimate, LayerMarks, LayerOutput, Stat};

/// What a `mean` layer draws in one panel.
#[derive(Debug, Clone, PartialEq)]
pub struct MeanMarks {
    /// Bars from zero under the means (`bar`).
    pub bars: Option<Vec<Bar>>,
    pub estimates: MeanEstimates,
    /// Arithmetic or geometric (on a log axis), so the figure can say which.
    pub kind: MeanKind,
    /// Each colour group's means joined in x order (`join`).
    pub join: bool,
}

/// The means: per x slot and colour group, or per value of a numeric x and colour group.
#[derive(Debug, Clone, PartialEq)]
pub enum MeanEstimates {
    Slots(Vec<Estimate>),
    Values(Vec<Estimate<f64>>),
}

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

/// Which mean a `mean` layer shows: arithmetic on a linear axis, geometric on a log axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MeanKind {
    Arithmetic,
    /// `exp(mean of ln y)`, with intervals computed on the logs.
    Geometric,
}

impl MeanKind {
    /// The values the interval is computed on: y, or ln y.
    fn scaled(self, v: f64) -> f64 {
        match self {
            MeanKind::Arithmetic => v,
            MeanKind::Geometric => v.ln(),
        }
    }

    /// Back from the scale the interval is computed on.
    fn back(self, v: f64) -> f64 {
        match self {
            MeanKind::Arithmetic => v,
            MeanKind::Geometric => v.exp(),
        }
    }

    fn stat(self) -> Stat {
        match self {
            MeanKind::Arithmetic => Stat::Mean,
            MeanKind::Geometric => Stat::GeometricMean,
        }
    }
}

pub fn compute(opts: &MeanOpts, at: &At, head: Span) -> Result<LayerOutput, ComputeError> {
    let kind = if at.y_is_log() {
        MeanKind::Geometric
    } else {
        MeanKind::Arithmetic
    };
    match &at.cells.placed {
        Placed::Values(values) => Ok(over_slots(opts, at, values, kind)),
        Placed::Pairs(pairs) => Ok(over_values(opts, at, pairs, kind, head)),
        Placed::Rows(_) | Placed::Levels(_) => Err(at.misplaced("numbers")),
    }
}

/// The means of the cells of a categorical x.
fn over_slots(opts: &MeanOpts, at: &At, values: &Values, kind: MeanKind) -> LayerOutput {
    let within = match opts.error {
        Some(ErrorBar::CiWithin { level }) => Some(within_cells(at, values, level, kind)),
        _ => None,
    };
    let mut rows = Vec::new();
    let mut estimates = Vec::new();
    let mut bars = Vec::new();
    for cell in at.cells.cells_of(at.panel) {
        let k = at.cell_key(cell);
        let m = match &within {
            Some(w) => w.get(&cell).cloned().unwrap_or_default(),
            None => mean_of(
                values.sorted(cell),
                values.placed.n_missing(cell),
                opts.error,
                kind,
            ),
        };
        rows.push(k.count(Stat::N, m.n));
        rows.push(k.count(Stat::NMissing, m.n_missing));
        let Some(mean) = mean_rows(&m, kind, &k, &mut rows) else {
            continue;
        };
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
    let mut y = extent_of(&estimates);
    if opts.bar {
        y.add(0.0);
    }
    let marks = LayerMarks::Mean(MeanMarks {
        bars: opts.bar.then_some(bars),
        estimates: MeanEstimates::Slots(estimates),
        kind,
        join: opts.join,
    });
    LayerOutput {
        y,
        y_from_zero: opts.bar,
        ..LayerOutput::new(marks, rows)
    }
}

/// The means at each distinct value of a numeric x, per colour group.
fn over_values(
    opts: &MeanOpts,
    at: &At,
    pairs: &Placement<Pair>,
    kind: MeanKind,
    head: Span,
) -> LayerOutput {
    let mut rows = Vec::new();
    let mut estimates = Vec::new();
    let mut warnings = Vec::new();
    for group in 0..at.cells.groups.len() {
        let (mut here, k) = at.group_pairs(pairs, group, &mut rows);
        here.sort_by(|a, b| a.x.total_cmp(&b.x).then(a.y.total_cmp(&b.y)));
        let occasions: Vec<&[Pair]> = here.chunk_by(|a, b| a.x == b.x).collect();
        let single = occasions.iter().filter(|o| o.len() == 1).count();
        if warnings.is_empty() && 2 * single > occasions.len() {
            warnings.push(scattered_x(head, single, occasions.len()));
        }
        for occasion in occasions {
            let x = occasion[0].x;
            let ys: Vec<f64> = occasion.iter().map(|p| p.y).collect();
            let m = mean_of(&ys, 0, opts.error, kind);
            let k = k.at(format_number(x));
            rows.push(k.count(Stat::N, m.n));
            let Some(e) = mean_rows(&m, kind, &k, &mut rows) else {
                continue;
            };
            estimates.push(Estimate {
                x,
                group,
                centre: e,
                interval: m.interval,
            });
        }
    }
    let y = extent_of(&estimates);
    let mut x = Extent::default();
    estimates.iter().for_each(|e| x.add(e.x));
    let marks = LayerMarks::Mean(MeanMarks {
        bars: None,
        estimates: MeanEstimates::Values(estimates),
        kind,
        join: opts.join,
    });
    LayerOutput {
        x,
        y,
        warnings,
        ..LayerOutput::new(marks, rows)
    }
}

/// The extent on y of means with their intervals.
fn extent_of<X>(estimates: &[Estimate<X>]) -> Extent {
    let mut y = Extent::default();
    for e in estimates {
        y.add(e.centre);
        if let Some((lo, hi)) = e.interval {
            y.add(lo);
            y.add(hi);
        }
    }
    y
}

/// The rows of a mean and its error bar, when there is a mean; the mean.
fn mean_rows(m: &MeanCell, kind: MeanKind, k: &RowKey, rows: &mut Vec<SummaryRow>) -> Option<f64> {
    let mean = m.mean?;
    rows.push(k.number(kind.stat(), mean));
    rows.extend(m.error_rows.iter().map(|(stat, v)| k.number(*stat, *v)));
    Some(mean)
}

/// W0014: most x values of a group hold one value, so the means are mostly single values.
fn scattered_x(head: Span, single: usize, distinct: usize) -> Diagnostic {
    Diagnostic::new(
        Code::MeansAtScatteredX,
        format!("`mean` over a numeric x: {single} of the {distinct} x values of a colour group hold a single value, so most means are single values"),
    )
    .with_label(head, "a mean at each x value")
    .with_help("a mean per x value suits occasions the data share (week 0, 4, 12); for times that differ between subjects, show the trend with `smooth`")
}

/// The mean of a cell's sorted values (with `n_missing` missing), with an error bar that needs
/// no other cell.
fn mean_of(sorted: &[f64], n_missing: usize, error: Option<ErrorBar>, kind: MeanKind) -> MeanCell {
    let mut out = MeanCell {
        n: sorted.len(),
        n_missing,
        ..MeanCell::default()
    };
    out.mean = match kind {
        MeanKind::Arithmetic => stats::mean(sorted).ok(),
        MeanKind::Geometric => stats::geometric_mean(sorted).ok(),
    };
    if out.mean.is_none() {
        return out;
    }
    let (rows, interval) = match error {
        Some(ErrorBar::Sd) => spread_rows(sorted, Spread::Sd, kind),
        Some(ErrorBar::Se) => spread_rows(sorted, Spread::Se, kind),
        Some(ErrorBar::Ci { level }) => spread_rows(sorted, Spread::Ci { level }, kind),
        Some(ErrorBar::Bootstrap { level, method }) => {
            let scaled: Vec<f64> = sorted.iter().map(|&v| kind.scaled(v)).collect();
            boot_interval(&scaled, BootstrapStatistic::Mean, level, method)
                .map(|(lo, hi)| interval_rows(kind.back(lo), kind.back(hi)))
        }
        None | Some(ErrorBar::CiWithin { .. }) => None,
    }
    .unzip();
    out.error_rows = rows.unwrap_or_default();
    out.interval = interval;
    out
}

/// The rows and ends of an `sd`, `se` or `ci(L)` bar: around the mean, or around the geometric
/// mean computed on the logs (`sd` and `se` then reported as the factors `exp(half-width)`).
fn spread_rows(sorted: &[f64], spread: Spread, kind: MeanKind) -> Option<ErrorRows> {
    let (low, high, half_width) = match kind {
        MeanKind::Arithmetic => {
            let m = stats::mean_interval(sorted, spread).ok()?;
            (m.low, m.high, m.half_width)
        }
        MeanKind::Geometric => {
            let g = stats::geometric_mean_interval(sorted, spread).ok()?;
            (g.low, g.high, g.log_half_width.exp())
        }
    };
    let stat = match (spread, kind) {
        (Spread::Ci { .. }, _) => return Some(interval_rows(low, high)),
        (Spread::Sd, MeanKind::Arithmetic) => Stat::Sd,
        (Spread::Se, MeanKind::Arithmetic) => Stat::Se,
        (Spread::Sd, MeanKind::Geometric) => Stat::GeometricSd,
        (Spread::Se, MeanKind::Geometric) => Stat::GeometricSe,
    };
    Some((vec![(stat, half_width)], (low, high)))
}

/// An error bar's summary rows and its ends.
type ErrorRows = (Vec<(Stat, f64)>, (f64, f64));

/// The summary rows and ends of an interval.
fn interval_rows(low: f64, high: f64) -> ErrorRows {
    (vec![(Stat::CiLow, low), (Stat::CiHigh, high)], (low, high))
}

/// Cousineau–Morey means and intervals for every cell of the figure, keyed by cell.
///
/// The within cells are every combination of the within factors the figure uses: x, and
/// colour and panels when they are within factors. Colour or panels on any other variable (a
/// between factor) split the subjects into separate normalisations. Only subjects with a value
/// in every within cell of their normalisation are used, for the mean as for the interval, so
/// the interval is centred on the mean shown; a cell's other values count as missing.
///
/// With a geometric mean the normalisation and intervals are computed on the logs and
/// exponentiated.
fn within_cells(at: &At, values: &Values, level: f64, kind: MeanKind) -> BTreeMap<Cell, MeanCell> {
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
        .flat_map(|set| within_set(values, set, level, kind))
        .collect()
}

/// One normalisation: subjects × `cells`, complete subjects only.
///
/// A cell that holds no value at all (a level nobody was measured at, here) is left out of the
/// within cells, so it does not drop every subject; it shows nothing.
fn within_set(
    values: &Values,
    cells: &[Cell],
    level: f64,
    kind: MeanKind,
) -> Vec<(Cell, MeanCell)> {
    let (used, empty): (Vec<Cell>, Vec<Cell>) =
        cells.iter().partition(|c| !values.sorted(**c).is_empty());
    let mut out = complete_subjects(values, &used, level, kind);
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
fn complete_subjects(
    values: &Values,
    cells: &[Cell],
    level: f64,
    kind: MeanKind,
) -> Vec<(Cell, MeanCell)> {
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
                .or_insert_with(|| vec![None; cells.len()])[i] = Some(kind.scaled(o.value));
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
                .map(|w| interval_rows(kind.back(w.cells[i].low), kind.back(w.cells[i].high)))
                .unzip();
            let m = MeanCell {
                n: complete.len(),
                n_missing: values.placed.n_missing(*cell)
                    + present[i].saturating_sub(complete.len()),
                mean: stats::mean(&column).ok().map(|m| kind.back(m)),
                error_rows: error_rows.unwrap_or_default(),
                interval,
            };
            (*cell, m)
        })
        .collect()
}
