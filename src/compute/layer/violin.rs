//! `violin`: the Gaussian kernel density of each cell's values, drawn mirrored, with the
//! quartiles marked.
//!
//! Guarantees of the marks:
//! - the bandwidth is chosen per cell by the layer's rule (the same rules as `density`);
//! - the outline runs from the cell's smallest to its largest value (a violin never suggests
//!   values beyond those observed) at [`VIOLIN_GRID`] equally spaced points;
//! - the quartiles are Hyndman & Fan definition 7, the same as `box`;
//! - one width scale for the whole figure (the layer's `width_peak` is its largest density):
//!   every density integrates to 1, so violins of the same area can be compared across x
//!   levels, groups and panels.
//!
//! - a ratio variable's density is reflected at zero (Silverman 1986 §2.10), as for `density`.
//!
//! A cell with values always reports its quartiles; its bandwidth when it is defined (a rule
//! needs two values with some spread); it draws an outline only when the bandwidth is defined
//! and its values are not all equal. Summary rows per cell: `n`, `n_missing`, `bandwidth`,
//! `q1`, `median`, `q3`; with `summary(full)`, `density` at every point of the outline (`x` =
//! `LEVEL@y`: the x level and the point, in y units).

use crate::check::layer::ViolinOpts;
use crate::check::plan::SummaryDetail;
use crate::stats::{self, Boundary};

use super::super::cells::Values;
use super::super::extent::Extent;
use super::super::summary::format_number;
use super::super::ComputeError;
use super::density::{bandwidth_rule, boundary_of, density_rows};
use super::{few_values, At, LayerMarks, LayerOutput, Smallest, Stat};

/// Points at which each violin's density is evaluated.
pub const VIOLIN_GRID: usize = 128;

/// A violin: the density of one cell's values, mirrored about the slot's centre.
#[derive(Debug, Clone, PartialEq)]
pub struct ViolinMark {
    pub x: usize,
    pub group: usize,
    /// (y, density) in ascending y, from the smallest to the largest value of the cell.
    pub outline: Vec<(f64, f64)>,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
}

pub fn compute(opts: &ViolinOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let boundary = boundary_of(at);
    let mut rows = Vec::new();
    let mut marks = Vec::new();
    let mut smallest = Smallest::default();
    at.each_cell(values, &mut rows, |cell, sorted, k, rows| {
        smallest.see(sorted.len(), k);
        let Ok(q) = stats::quartiles_sorted(sorted) else {
            return;
        };
        let bandwidth = stats::bandwidth(sorted, bandwidth_rule(opts.bandwidth)).ok();
        if let Some(h) = bandwidth {
            rows.push(k.number(Stat::Bandwidth, h));
        }
        rows.push(k.number(Stat::Q1, q.q1));
        rows.push(k.number(Stat::Median, q.median));
        rows.push(k.number(Stat::Q3, q.q3));
        let Some(outline) = bandwidth.and_then(|h| outline(sorted, h, boundary)) else {
            return;
        };
        if opts.summary == SummaryDetail::Full {
            // `LEVEL@y`: the cell's x level and the point of the outline.
            density_rows(
                &outline,
                k,
                |y| format!("{}@{}", k.x, format_number(y)),
                rows,
            );
        }
        marks.push(ViolinMark {
            x: cell.x,
            group: cell.group,
            outline,
            q1: q.q1,
            median: q.median,
            q3: q.q3,
        });
    });
    let mut y = Extent::default();
    let mut width_peak: f64 = 0.0;
    for (v, d) in marks.iter().flat_map(|m| &m.outline) {
        y.add(*v);
        width_peak = width_peak.max(*d);
    }
    let mut out = LayerOutput {
        y,
        width_peak,
        ..LayerOutput::new(LayerMarks::Violin(marks), rows)
    };
    out.warnings.extend(few_values(at, smallest, "a violin"));
    Ok(out)
}

/// The density at [`VIOLIN_GRID`] points from the smallest to the largest of the sorted
/// `values`; `None` when they are all equal (nothing to draw).
fn outline(values: &[f64], h: f64, boundary: Boundary) -> Option<Vec<(f64, f64)>> {
    let (lo, hi) = (*values.first()?, *values.last()?);
    if hi <= lo {
        return None;
    }
    let step = (hi - lo) / (VIOLIN_GRID - 1) as f64;
    let grid: Vec<f64> = (0..VIOLIN_GRID)
        .map(|i| {
            if i + 1 == VIOLIN_GRID {
                hi
            } else {
                lo + step * i as f64
            }
        })
        .collect();
    let density = stats::kde_bounded(values, h, &grid, boundary).ok()?;
    Some(grid.into_iter().zip(density).collect())
}
