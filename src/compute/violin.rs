//! `violin`: the Gaussian kernel density of each cell's values, drawn mirrored, with the
//! quartiles marked.
//!
//! Guarantees of the marks:
//! - the bandwidth is chosen per cell by the layer's rule (the same rules as `density`);
//! - the outline runs from the cell's smallest to its largest value (a violin never suggests
//!   values beyond those observed) at [`VIOLIN_GRID`] equally spaced points;
//! - the quartiles are Hyndman & Fan definition 7, the same as `box`;
//! - one width scale for the whole figure ([`share_peak`]): every density integrates to 1, so
//!   violins of the same area can be compared across x levels, groups and panels.
//!
//! A cell whose bandwidth is undefined (fewer than two values, or no spread, under a rule) has
//! its `n` reported and draws nothing.

use crate::check::plan::Bandwidth;
use crate::stats;

use super::cat::{cell_values, for_cells, key, n_rows};
use super::dist::bandwidth_rule;
use super::rows::{Levels, Placed};
use super::{Context, LayerMarks, PanelData, SummaryRow, ViolinMark};

/// Points at which each violin's density is evaluated.
pub const VIOLIN_GRID: usize = 128;

/// The violins of one panel, and their summary rows (`n`, `n_missing`, `bandwidth`, `q1`,
/// `median`, `q3` per cell).
pub fn violins(
    ctx: &Context,
    placed: &Placed,
    panel: usize,
    levels: &Levels,
    bandwidth: Bandwidth,
    summary: &mut Vec<SummaryRow>,
) -> Vec<LayerMarks> {
    let mut marks = Vec::new();
    for (cell, name) in for_cells(ctx, panel, levels) {
        let values = cell_values(&placed.obs, cell);
        let k = key(ctx, panel, "violin", cell.group, &name);
        n_rows(placed, cell, &k, values.len(), summary);
        let Ok(h) = stats::bandwidth(&values, bandwidth_rule(bandwidth)) else {
            continue;
        };
        let Ok(q) = stats::quartiles_sorted(&values) else {
            continue;
        };
        summary.push(k.number("bandwidth", h));
        summary.push(k.number("q1", q.q1));
        summary.push(k.number("median", q.median));
        summary.push(k.number("q3", q.q3));
        let Some(outline) = outline(&values, h) else {
            continue;
        };
        marks.push(ViolinMark {
            x: cell.x,
            group: cell.group,
            outline,
            q1: q.q1,
            median: q.median,
            q3: q.q3,
        });
    }
    vec![LayerMarks::Violins { marks, peak: 0.0 }]
}

/// The density at [`VIOLIN_GRID`] points from the smallest to the largest of the sorted
/// `values`; `None` when they are all equal (nothing to draw).
fn outline(values: &[f64], h: f64) -> Option<Vec<(f64, f64)>> {
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
    let density = stats::kde(values, h, &grid).ok()?;
    Some(grid.into_iter().zip(density).collect())
}

/// Sets every violin layer's `peak` to the largest density drawn by any violin of the figure.
pub fn share_peak(panels: &mut [PanelData]) {
    let peak = panels
        .iter()
        .flat_map(|p| &p.layers)
        .filter_map(|l| match l {
            LayerMarks::Violins { marks, .. } => Some(marks),
            _ => None,
        })
        .flatten()
        .flat_map(|v| &v.outline)
        .map(|(_, d)| *d)
        .fold(0.0, f64::max);
    for layer in panels.iter_mut().flat_map(|p| &mut p.layers) {
        if let LayerMarks::Violins { peak: p, .. } = layer {
            *p = peak;
        }
    }
}
