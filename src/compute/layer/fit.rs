//! `fit linear`: the ordinary least squares line of y on x per panel and colour group
//! ([`stats::linear_fit`]), with the confidence band for the mean response.
//!
//! Guarantees of the marks:
//! - the line and band cover the x range of the group's own data (no extrapolation), sampled at
//!   [`FIT_GRID`] equally spaced x values, so they stay correct on a log axis too;
//! - the band is `ŷ(x) ± t(1 − (1 − L)/2, n − 2) · s · √(1/n + (x − x̄)²/Sxx)`
//!   ([`stats::LinearFit::mean_band`]); a line needs two distinct x, a band three pairs.
//!
//! Summary rows per colour group: `n`, `n_missing`, and when the line exists `slope`,
//! `intercept` and `r` (`r` only when y varies).

use crate::check::layer::FitOpts;
use crate::stats;

use super::super::cells::{Pair, Placement};
use super::super::extent::Extent;
use super::super::summary::{RowKey, SummaryRow};
use super::super::ComputeError;
use super::{n_rows, At, LayerMarks, LayerOutput, Stat};

/// Points at which a fitted line and its band are sampled across the data's x range.
pub const FIT_GRID: usize = 64;

/// A fitted line over the x range of its group's data, with its confidence band.
#[derive(Debug, Clone, PartialEq)]
pub struct FitMark {
    pub group: usize,
    /// (x, fitted y) in ascending x.
    pub line: Vec<(f64, f64)>,
    /// (x, low, high) of the band for the mean response, in ascending x; empty without a band.
    pub band: Vec<(f64, f64, f64)>,
}

pub fn compute(
    opts: &FitOpts,
    at: &At,
    pairs: &Placement<Pair>,
) -> Result<LayerOutput, ComputeError> {
    let mut rows = Vec::new();
    let mut fits = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    for g in 0..at.cells.groups.len() {
        let here: Vec<Pair> = pairs
            .in_panel(at.panel)
            .filter(|o| o.cell.group == g)
            .map(|o| o.value)
            .collect();
        let k = at.key(g, "");
        n_rows(&mut rows, &k, here.len(), pairs.n_missing(at.cell(0, g)));
        let Some(fit) = fit_group(&here, opts.band, g, &k, &mut rows) else {
            continue;
        };
        fit.line.iter().for_each(|(a, b)| {
            x.add(*a);
            y.add(*b)
        });
        fit.band.iter().for_each(|(_, lo, hi)| {
            y.add(*lo);
            y.add(*hi)
        });
        fits.push(fit);
    }
    Ok(LayerOutput {
        x,
        y,
        ..LayerOutput::new(LayerMarks::Fit(fits), rows)
    })
}

/// The line and band of one group; `None` (with only `n` reported) when no line exists.
fn fit_group(
    pairs: &[Pair],
    band: Option<f64>,
    group: usize,
    k: &RowKey,
    rows: &mut Vec<SummaryRow>,
) -> Option<FitMark> {
    let (xs, ys): (Vec<f64>, Vec<f64>) = pairs.iter().map(|p| (p.x, p.y)).unzip();
    let fit = stats::linear_fit(&xs, &ys).ok()?;
    rows.push(k.number(Stat::Slope, fit.slope));
    rows.push(k.number(Stat::Intercept, fit.intercept));
    if let Some(r) = fit.r {
        rows.push(k.number(Stat::R, r));
    }
    let lo = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let grid: Vec<f64> = (0..FIT_GRID)
        .map(|i| {
            if i + 1 == FIT_GRID {
                hi
            } else {
                lo + (hi - lo) * i as f64 / (FIT_GRID - 1) as f64
            }
        })
        .collect();
    let line = grid.iter().map(|&v| (v, fit.predict(v))).collect();
    let band = match band {
        Some(level) => grid
            .iter()
            .filter_map(|&v| fit.mean_band(v, level).ok())
            .map(|b| (b.x, b.low, b.high))
            .collect(),
        None => Vec::new(),
    };
    Some(FitMark { group, line, band })
}
