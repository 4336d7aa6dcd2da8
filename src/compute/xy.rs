//! Frames over a numeric x and a numeric y: points, and fitted lines with their bands.
//!
//! A pair is missing when either value is. With `replicates` declared, each subject's trials in
//! a cell (panel and colour group) are collapsed first, x and y alike, so every subject is one
//! point and `n` counts subjects.
//!
//! Guarantees of `fit` marks:
//! - an ordinary least squares line of y on x per colour group ([`stats::linear_fit`]);
//! - the line and band cover the x range of the group's own data (no extrapolation), sampled at
//!   [`FIT_GRID`] equally spaced x values, so they stay correct on a log axis too;
//! - the band is `ŷ(x) ± t(1 − (1 − L)/2, n − 2) · s · √(1/n + (x − x̄)²/Sxx)`
//!   ([`stats::LinearFit::mean_band`]); a line needs two distinct x, a band three pairs;
//! - summary per group: `n`, `n_missing`, and when the line exists `slope`, `intercept` and `r`
//!   (`r` only when y varies).

use crate::check::plan::{AxisScale, NumAxis, XyLayer};
use crate::stats;

use super::cat::{check_log_values, Extent};
use super::dist::{key, missing};
use super::rows::{self, Cell, Placed};
use super::{
    ComputeError, Context, FigureData, FitMark, LayerMarks, NumScale, PanelData, SummaryRow,
    XScale, YScale,
};

/// Points at which a fitted line and its band are sampled across the data's x range.
pub const FIT_GRID: usize = 64;

/// One placed (x, y) pair.
#[derive(Debug, Clone, Copy)]
struct Pair {
    cell: Cell,
    /// The first table row of the pair (of its first trial, when collapsed).
    row: usize,
    x: f64,
    y: f64,
}

/// Points (and fitted lines) of y against a numeric x.
pub fn xy(
    ctx: &Context,
    x: &NumAxis,
    y: &NumAxis,
    layers: &[XyLayer],
) -> Result<FigureData, ComputeError> {
    let (pairs, placed) = place_pairs(ctx, x, y)?;
    check_log_values(ctx, x, pairs.iter().map(|p| (p.row, p.x)))?;
    check_log_values(ctx, y, pairs.iter().map(|p| (p.row, p.y)))?;
    let mut x_extent = Extent::default();
    let mut y_extent = Extent::default();
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    for p in 0..ctx.panels.len() {
        let mut out = Vec::new();
        for layer in layers {
            let mut pts = Vec::new();
            let mut fits = Vec::new();
            let layer_name = match layer {
                XyLayer::Points { .. } => "points",
                XyLayer::Fit { .. } => "fit",
            };
            for g in 0..ctx.groups.len() {
                let here: Vec<(f64, f64)> = pairs
                    .iter()
                    .filter(|q| q.cell.panel == p && q.cell.group == g)
                    .map(|q| (q.x, q.y))
                    .collect();
                let k = key(ctx, p, layer_name, g, String::new());
                summary.push(k.count("n", here.len()));
                summary.push(k.count("n_missing", missing(&placed, p, g)));
                match layer {
                    XyLayer::Points { .. } => {
                        for &(xv, yv) in &here {
                            x_extent.add(xv);
                            y_extent.add(yv);
                            pts.push((xv, yv, g));
                        }
                    }
                    XyLayer::Fit { band, .. } => {
                        let Some(fit) = fit_group(&here, *band, &k, &mut summary) else {
                            continue;
                        };
                        fit.line.iter().for_each(|(a, b)| {
                            x_extent.add(*a);
                            y_extent.add(*b)
                        });
                        fit.band.iter().for_each(|(_, lo, hi)| {
                            y_extent.add(*lo);
                            y_extent.add(*hi)
                        });
                        fits.push(FitMark { group: g, ..fit });
                    }
                }
            }
            out.push(match layer {
                XyLayer::Points { .. } => LayerMarks::XyPoints(pts),
                XyLayer::Fit { .. } => LayerMarks::Fits(fits),
            });
        }
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            layers: out,
            n_by_x: Vec::new(),
        });
    }
    Ok(FigureData {
        x: XScale::Numbers(num_scale(ctx, x, x_extent.get())),
        y: YScale::Numbers(num_scale(ctx, y, y_extent.get())),
        legend: ctx.legend(),
        panels,
        summary,
    })
}

fn num_scale(ctx: &Context, axis: &NumAxis, extent: (f64, f64)) -> NumScale {
    NumScale {
        title: ctx.title(axis.var.var, &axis.title),
        extent,
        range: axis.range,
        log: axis.scale == AxisScale::Log,
        include_zero: false,
    }
}

/// Places the complete pairs in cells, collapsing repeated trials when the data declare them.
fn place_pairs(
    ctx: &Context,
    x: &NumAxis,
    y: &NumAxis,
) -> Result<(Vec<Pair>, Placed), ComputeError> {
    let xs = rows::numbers(ctx.table, ctx.book, x.var.var)?;
    let ys = rows::numbers(ctx.table, ctx.book, y.var.var)?;
    // A pair is complete when both values are there: x is `y.and(x)`, y is `x.and(y)`.
    let both = || xs.iter().zip(ys.iter());
    let placement = ctx.placement(None);
    let mut placed_x = rows::place(both().map(|(x, y)| y.and(x)), &ctx.keep, &placement);
    let mut placed_y = rows::place(both().map(|(x, y)| x.and(y)), &ctx.keep, &placement);
    if let Some(rep) = &ctx.book.replicates {
        rows::collapse(&mut placed_x, rep.collapse);
        rows::collapse(&mut placed_y, rep.collapse);
    }
    // Both placements saw the same rows, so their observations pair up one to one.
    let pairs = placed_x
        .obs
        .iter()
        .zip(&placed_y.obs)
        .map(|(a, b)| Pair {
            cell: a.cell,
            row: a.row,
            x: a.value,
            y: b.value,
        })
        .collect();
    Ok((pairs, placed_x))
}

/// The line and band of one group; `None` (with only `n` reported) when no line exists.
fn fit_group(
    pairs: &[(f64, f64)],
    band: Option<f64>,
    k: &super::summary::RowKey,
    summary: &mut Vec<SummaryRow>,
) -> Option<FitMark> {
    let (xs, ys): (Vec<f64>, Vec<f64>) = pairs.iter().copied().unzip();
    let fit = stats::linear_fit(&xs, &ys).ok()?;
    summary.push(k.number("slope", fit.slope));
    summary.push(k.number("intercept", fit.intercept));
    if let Some(r) = fit.r {
        summary.push(k.number("r", r));
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
    Some(FitMark {
        group: 0,
        line,
        band,
    })
}
