//! `density`: a Gaussian kernel density curve of a numeric x per panel and colour group,
//! evaluated on a grid over the data's range padded by three bandwidths on each side.
//!
//! Summary rows per colour group: `n`, `n_missing`, and `bandwidth` when it is defined.

use crate::check::layer::DensityOpts;
use crate::check::plan::Bandwidth;
use crate::stats;

use super::super::cells::Values;
use super::super::extent::Extent;
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
    let mut rows = Vec::new();
    let mut curves = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    y.add(0.0);
    at.each_group(values, &mut rows, |g, v, k, rows| {
        let (Some(first), Some(last)) = (v.first(), v.last()) else {
            return;
        };
        let Ok(h) = stats::bandwidth(v, bandwidth_rule(opts.bandwidth)) else {
            return;
        };
        rows.push(k.number(Stat::Bandwidth, h));
        let (lo, hi) = (first - 3.0 * h, last + 3.0 * h);
        let grid: Vec<f64> = (0..DENSITY_GRID)
            .map(|i| lo + (hi - lo) * i as f64 / (DENSITY_GRID - 1) as f64)
            .collect();
        let Ok(ys) = stats::kde(v, h, &grid) else {
            return;
        };
        x.add(lo);
        x.add(hi);
        ys.iter().for_each(|d| y.add(*d));
        curves.push(Curve {
            group: g,
            points: grid.into_iter().zip(ys).collect(),
        });
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
