//! `fit linear`: the ordinary least squares line of y on x per panel and colour group
//! ([`stats::linear_fit`]), with a band for the mean response or for a new observation.
//!
//! On log axes the line is fitted to the natural logs of the log axes' values, so it is straight
//! as drawn: both axes log is a power law `y = e^a · x^b` ([`stats::log_log_fit`]), a log y
//! alone an exponential `y = e^(a + b·x)`, a log x alone `y = a + b · ln x`. Its coefficients,
//! intervals, `r` and residual sd are those of the fit on the logs; [`FitMark::model`] says
//! which fit a line is, so the figure can name it.
//!
//! Guarantees of the marks:
//! - the line and band cover the x range of the group's own data (no extrapolation), sampled at
//!   [`FIT_GRID`] x values equally spaced on the x axis as drawn (in ln x on a log x axis), the
//!   last exactly at the largest x;
//! - `band(L)` is the mean response's band `ŷ(x) ± t(1 − (1 − L)/2, n − 2) · s · √(1/n + (x −
//!   x̄)²/Sxx)`; `band(L, prediction)` adds 1 under the root (one new observation); on a log y
//!   axis both ends are exponentiated. A line needs two distinct x, a band three pairs.
//!
//! Summary rows per colour group: `n`, `n_missing`, and when the line exists `slope`,
//! `slope_se`, `slope_ci_low`, `slope_ci_high`, `intercept`, `intercept_se`,
//! `intercept_ci_low`, `intercept_ci_high`, `r`, `r_squared` and `residual_sd` (standard errors
//! and `residual_sd` need three pairs; the intervals, at the band's level, need `band(L)`; `r`
//! and `r_squared` need y values that vary). With `summary(full)`, per point drawn (`x` = the
//! point), `fitted` and, with a band, `band_low` and `band_high`.

use crate::check::layer::FitOpts;
use crate::check::plan::{Band, BandKind, SummaryDetail};
use crate::stats::{self, LinearFit};

use super::super::cells::{Pair, Placement};
use super::super::extent::Extent;
use super::super::summary::{format_number, RowKey, SummaryRow};
use super::super::ComputeError;
use super::{At, LayerMarks, LayerOutput, Stat};

/// Points at which a fitted line and its band are sampled across the data's x range.
pub const FIT_GRID: usize = 64;

/// Which straight line was fitted: to the values, or to the logs of the log axes' values.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FitModel {
    /// y on x.
    Linear,
    /// ln y on ln x (both axes log): `y = e^a · x^b`.
    PowerLaw,
    /// ln y on x (a log y axis): `y = e^(a + b·x)`.
    Exponential,
    /// y on ln x (a log x axis): `y = a + b · ln x`.
    Logarithmic,
}

impl FitModel {
    fn of_axes(x_log: bool, y_log: bool) -> FitModel {
        match (x_log, y_log) {
            (false, false) => FitModel::Linear,
            (true, true) => FitModel::PowerLaw,
            (false, true) => FitModel::Exponential,
            (true, false) => FitModel::Logarithmic,
        }
    }

    fn x_log(self) -> bool {
        matches!(self, FitModel::PowerLaw | FitModel::Logarithmic)
    }

    fn y_log(self) -> bool {
        matches!(self, FitModel::PowerLaw | FitModel::Exponential)
    }

    /// The least squares line of the model (the values on a log axis are positive: F0114).
    fn fit(self, xs: &[f64], ys: &[f64]) -> Result<LinearFit, stats::StatError> {
        let logs = |v: &[f64], log: bool| -> Result<Vec<f64>, stats::StatError> {
            if log {
                stats::geometric::natural_logs(v)
            } else {
                Ok(v.to_vec())
            }
        };
        match self {
            FitModel::PowerLaw => stats::log_log_fit(xs, ys),
            _ => stats::linear_fit(&logs(xs, self.x_log())?, &logs(ys, self.y_log())?),
        }
    }

    /// A fitted value (on the fit's scale) back in the y axis's units.
    fn y_back(self, v: f64) -> f64 {
        if self.y_log() {
            v.exp()
        } else {
            v
        }
    }
}

/// A fitted line over the x range of its group's data, with its band.
#[derive(Debug, Clone, PartialEq)]
pub struct FitMark {
    pub group: usize,
    /// Which line this is (fitted to the logs on log axes).
    pub model: FitModel,
    /// What the band shows; `None` without a band.
    pub band_kind: Option<BandKind>,
    /// (x, fitted y) in ascending x, in data units.
    pub line: Vec<(f64, f64)>,
    /// (x, low, high) of the band, in ascending x, in data units; empty without a band.
    pub band: Vec<(f64, f64, f64)>,
}

pub fn compute(
    opts: &FitOpts,
    at: &At,
    pairs: &Placement<Pair>,
) -> Result<LayerOutput, ComputeError> {
    let model = FitModel::of_axes(at.x_is_log(), at.y_is_log());
    let mut rows = Vec::new();
    let mut fits = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    for g in 0..at.cells.groups.len() {
        let (here, k) = at.group_pairs(pairs, g, &mut rows);
        let Some(fit) = fit_group(&here, opts, model, g, &k, &mut rows) else {
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
    opts: &FitOpts,
    model: FitModel,
    group: usize,
    k: &RowKey,
    rows: &mut Vec<SummaryRow>,
) -> Option<FitMark> {
    let (xs, ys): (Vec<f64>, Vec<f64>) = pairs.iter().map(|p| (p.x, p.y)).unzip();
    let fit = model.fit(&xs, &ys).ok()?;
    coefficient_rows(&fit, opts.band, k, rows);
    let lo = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    let grid = grid(lo, hi, model.x_log());
    let on_scale = |v: f64| if model.x_log() { v.ln() } else { v };
    let line: Vec<(f64, f64)> = grid
        .iter()
        .map(|&v| (v, model.y_back(fit.predict(on_scale(v)))))
        .collect();
    let band: Vec<(f64, f64, f64)> = match opts.band {
        Some(b) => grid
            .iter()
            .filter_map(|&v| {
                let p = fit.band(on_scale(v), b.level, stats_band(b.kind)).ok()?;
                Some((v, model.y_back(p.low), model.y_back(p.high)))
            })
            .collect(),
        None => Vec::new(),
    };
    if opts.summary == SummaryDetail::Full {
        point_rows(&line, &band, k, rows);
    }
    Some(FitMark {
        group,
        model,
        band_kind: opts.band.map(|b| b.kind),
        line,
        band,
    })
}

/// The coefficients with their standard errors and (with a band) intervals at its level, `r`,
/// `r²` and the residual sd.
fn coefficient_rows(fit: &LinearFit, band: Option<Band>, k: &RowKey, rows: &mut Vec<SummaryRow>) {
    let intervals = band.and_then(|b| fit.inference(b.level).ok());
    let coefficients = [
        (fit.slope, fit.slope_se().ok(), intervals.map(|i| i.slope)),
        (
            fit.intercept,
            fit.intercept_se().ok(),
            intervals.map(|i| i.intercept),
        ),
    ];
    let stats = [
        [
            Stat::Slope,
            Stat::SlopeSe,
            Stat::SlopeCiLow,
            Stat::SlopeCiHigh,
        ],
        [
            Stat::Intercept,
            Stat::InterceptSe,
            Stat::InterceptCiLow,
            Stat::InterceptCiHigh,
        ],
    ];
    for ((estimate, se, interval), [e, s, low, high]) in coefficients.into_iter().zip(stats) {
        rows.push(k.number(e, estimate));
        if let Some(se) = se {
            rows.push(k.number(s, se));
        }
        if let Some(c) = interval {
            rows.push(k.number(low, c.low));
            rows.push(k.number(high, c.high));
        }
    }
    if let Some(r) = fit.r {
        rows.push(k.number(Stat::R, r));
    }
    if let Some(r2) = fit.r_squared() {
        rows.push(k.number(Stat::RSquared, r2));
    }
    if let Some(s) = fit.residual_sd {
        rows.push(k.number(Stat::ResidualSd, s));
    }
}

/// `fitted` (and `band_low`, `band_high`) at every point drawn.
fn point_rows(
    line: &[(f64, f64)],
    band: &[(f64, f64, f64)],
    k: &RowKey,
    rows: &mut Vec<SummaryRow>,
) {
    for (i, (x, fitted)) in line.iter().enumerate() {
        let at = k.at(format_number(*x));
        rows.push(at.number(Stat::Fitted, *fitted));
        // The band is sampled at the same points as the line (or not at all).
        if let Some((_, low, high)) = band.get(i) {
            rows.push(at.number(Stat::BandLow, *low));
            rows.push(at.number(Stat::BandHigh, *high));
        }
    }
}

/// [`FIT_GRID`] x values from `lo` to `hi`, equally spaced on the axis as drawn (in ln x on a log
/// axis); the last is exactly `hi`.
fn grid(lo: f64, hi: f64, log: bool) -> Vec<f64> {
    let (a, b) = if log { (lo.ln(), hi.ln()) } else { (lo, hi) };
    (0..FIT_GRID)
        .map(|i| {
            if i + 1 == FIT_GRID {
                hi
            } else if i == 0 {
                lo
            } else {
                let t = a + (b - a) * i as f64 / (FIT_GRID - 1) as f64;
                if log {
                    t.exp()
                } else {
                    t
                }
            }
        })
        .collect()
}

fn stats_band(kind: BandKind) -> stats::BandKind {
    match kind {
        BandKind::Mean => stats::BandKind::Mean,
        BandKind::Prediction => stats::BandKind::Prediction,
    }
}
