//! `box`: Tukey's box plot of each cell — quartiles (Hyndman & Fan definition 7), whiskers and
//! outliers ([`stats::box_summary`]) — with McGill–Tukey–Larsen notches `median ± 1.58 · IQR /
//! √n` ([`stats::notch`]) under `box notch`.
//!
//! Summary rows per cell: `n`, `n_missing`, and when the cell has values `q1`, `median`, `q3`,
//! (`notch_low`, `notch_high`), `whisker_low`, `whisker_high`, one `outliers` row per outlier
//! (or one `n_outliers` row beyond [`OUTLIER_ROWS_CAP`]), `min` and `max`.

use crate::check::layer::BoxOpts;
use crate::check::plan::Whiskers;
use crate::stats;

use super::super::cells::Values;
use super::super::extent::Extent;
use super::super::summary::{RowKey, SummaryRow};
use super::super::ComputeError;
use super::{few_values, At, LayerMarks, LayerOutput, Smallest, Stat};

/// Most outliers a box lists one per row in the summary; beyond this, one `n_outliers` row
/// counts them (the extremes are the box's `min` and `max`), unless the figure asks for the
/// full summary.
pub const OUTLIER_ROWS_CAP: usize = 30;

/// The summary rows of a box's outliers: one per outlier up to [`OUTLIER_ROWS_CAP`] (or all,
/// with `full`), else their count.
pub fn outlier_rows(key: &RowKey, outliers: &[f64], full: bool) -> Vec<SummaryRow> {
    if full || outliers.len() <= OUTLIER_ROWS_CAP {
        outliers
            .iter()
            .map(|o| key.number(Stat::Outliers, *o))
            .collect()
    } else {
        vec![key.count(Stat::NOutliers, outliers.len())]
    }
}

/// A box of a box plot.
#[derive(Debug, Clone, PartialEq)]
pub struct BoxMark {
    pub x: usize,
    pub group: usize,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
    pub whisker_low: f64,
    pub whisker_high: f64,
    pub outliers: Vec<f64>,
    /// The notch's ends around the median (`box notch`); they may reach beyond the box.
    pub notch: Option<(f64, f64)>,
}

pub fn compute(opts: &BoxOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let rule = match opts.whiskers {
        Whiskers::Tukey => stats::Whiskers::Tukey,
        Whiskers::Range => stats::Whiskers::Range,
    };
    let mut rows = Vec::new();
    let mut boxes = Vec::new();
    let mut y = Extent::default();
    let mut smallest = Smallest::default();
    at.each_cell(values, &mut rows, |cell, sorted, k, rows| {
        smallest.see(sorted.len(), k);
        let Ok(b) = stats::box_summary(sorted, rule) else {
            return;
        };
        rows.push(k.number(Stat::Q1, b.q1));
        rows.push(k.number(Stat::Median, b.median));
        rows.push(k.number(Stat::Q3, b.q3));
        let notch = opts
            .notch
            .then(|| stats::notch(sorted).ok())
            .flatten()
            .map(|n| {
                rows.push(k.number(Stat::NotchLow, n.low));
                rows.push(k.number(Stat::NotchHigh, n.high));
                (n.low, n.high)
            });
        rows.push(k.number(Stat::WhiskerLow, b.whisker_low));
        rows.push(k.number(Stat::WhiskerHigh, b.whisker_high));
        rows.extend(outlier_rows(k, &b.outliers, false));
        rows.push(k.number(Stat::Min, b.min));
        rows.push(k.number(Stat::Max, b.max));
        y.add(b.whisker_low);
        y.add(b.whisker_high);
        b.outliers.iter().for_each(|o| y.add(*o));
        if let Some((lo, hi)) = notch {
            y.add(lo);
            y.add(hi);
        }
        boxes.push(BoxMark {
            x: cell.x,
            group: cell.group,
            q1: b.q1,
            median: b.median,
            q3: b.q3,
            whisker_low: b.whisker_low,
            whisker_high: b.whisker_high,
            outliers: b.outliers,
            notch,
        });
    });
    let mut out = LayerOutput {
        y,
        ..LayerOutput::new(LayerMarks::Box(boxes), rows)
    };
    out.warnings.extend(few_values(at, smallest, "a box"));
    Ok(out)
}
