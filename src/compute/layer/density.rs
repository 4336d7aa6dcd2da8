//! `density`: a Gaussian kernel density curve of a numeric x per panel and colour group
//! ([`stats::kernel_density_bounded`]), evaluated at [`DENSITY_GRID`] points over the data's
//! range padded by three bandwidths on each side.
//!
//! A ratio variable has no values below zero, so its density is reflected at zero (Silverman
//! 1986 §2.10): the mass the plain estimate would put below zero is folded back, the curve
//! starts at `max(0, min − 3h)` and still has area 1.
//!
//! Summary rows per colour group: `n`, `n_missing`, and `bandwidth` when it is defined; with
//! `summary(full)`, `density` at every point drawn (`x` = the point).

use crate::check::layer::DensityOpts;
use crate::check::plan::{Bandwidth, SummaryDetail};
use crate::stats::{self, Boundary, DensityGrid};

use super::super::cells::Values;
use super::super::extent::Extent;
use super::super::summary::{format_number, RowKey, SummaryRow};
use super::super::ComputeError;
use super::{At, LayerMarks, LayerOutput, Stat, YUse};

/// Points at which a density curve is evaluated, across the padded data range.
const DENSITY_GRID: usize = 256;

/// A curve in data units (a density).
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    pub group: usize,
    pub points: Vec<(f64, f64)>,
}

pub fn compute(opts: &DensityOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let boundary = boundary_of(at);
    let grid = DensityGrid {
        points: DENSITY_GRID,
        reach: 3.0,
    };
    let mut rows = Vec::new();
    let mut curves = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    y.add(0.0);
    at.each_group(values, &mut rows, |g, v, k, rows| {
        let rule = bandwidth_rule(opts.bandwidth);
        let Ok(curve) = stats::kernel_density_bounded(v, rule, grid, boundary) else {
            return;
        };
        rows.push(k.number(Stat::Bandwidth, curve.bandwidth));
        let points: Vec<(f64, f64)> = curve.x.into_iter().zip(curve.density).collect();
        if opts.summary == SummaryDetail::Full {
            density_rows(&points, k, format_number, rows);
        }
        for (px, d) in &points {
            x.add(*px);
            y.add(*d);
        }
        curves.push(Curve { group: g, points });
    });
    Ok(LayerOutput {
        x,
        y,
        y_from_zero: true,
        y_use: YUse::Heights("Density"),
        ..LayerOutput::new(LayerMarks::Density(curves), rows)
    })
}

/// The statistics' bandwidth rule of a layer's option (shared with `violin`).
pub(super) fn bandwidth_rule(b: Bandwidth) -> stats::BandwidthRule {
    match b {
        Bandwidth::Silverman => stats::BandwidthRule::Silverman,
        Bandwidth::Scott => stats::BandwidthRule::Scott,
        Bandwidth::Fixed(h) => stats::BandwidthRule::Fixed(h),
    }
}

/// Reflected at zero for a ratio variable, open otherwise (shared with `violin`).
pub(super) fn boundary_of(at: &At) -> Boundary {
    if at.measure_is_ratio() {
        Boundary::ReflectAtZero
    } else {
        Boundary::Open
    }
}

/// One `density` row per point drawn, its `x` the text `place` gives the point (shared with
/// `violin`).
pub(super) fn density_rows(
    points: &[(f64, f64)],
    k: &RowKey,
    place: impl Fn(f64) -> String,
    rows: &mut Vec<SummaryRow>,
) {
    for (px, d) in points {
        rows.push(k.at(place(*px)).number(Stat::Density, *d));
    }
}
