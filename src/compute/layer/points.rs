//! `points`: every value as a dot — over a categorical x, spread across its group's band by a
//! deterministic jitter, or left for the layout to arrange side by side (`arrange(...)`: where
//! a dot goes depends on the dots' size in millimetres); over a numeric x, at (x, y).
//!
//! Summary rows: `n` and `n_missing` per cell (per colour group over a numeric x).

use crate::check::layer::{Arrange, PointsOpts};
use crate::stats;

use super::super::cells::{Obs, Pair, Placed, Placement, Values};
use super::super::extent::Extent;
use super::super::ComputeError;
use super::{n_rows, At, LayerMarks, LayerOutput};

/// Seed mixed into every jitter key, so figures of the same data jitter alike (documented).
const JITTER_SEED: u64 = 0x5eed_f16a;

/// The dots of one panel.
#[derive(Debug, Clone, PartialEq)]
pub enum PointMarks {
    /// Over a categorical x, in data-row order.
    Categories(Vec<CatPoint>),
    /// Over a categorical x, in data-row order, each at offset 0: the layout places them side
    /// by side as `Arrange` says.
    Arranged(Vec<CatPoint>, Arrange),
    /// (x, y, colour group), by group, then in data-row order.
    Numbers(Vec<(f64, f64, usize)>),
}

/// A point over a categorical x; `offset` is its jitter as a fraction of the band in [−0.5, 0.5).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CatPoint {
    pub x: usize,
    pub group: usize,
    pub offset: f64,
    pub y: f64,
}

pub fn compute(opts: &PointsOpts, at: &At) -> Result<LayerOutput, ComputeError> {
    match &at.cells.placed {
        Placed::Values(values) => Ok(over_categories(opts, at, values)),
        Placed::Pairs(pairs) => Ok(scatter(at, pairs)),
        Placed::Rows(_) | Placed::Levels(_) => Err(at.misplaced("numbers")),
    }
}

fn over_categories(opts: &PointsOpts, at: &At, values: &Values) -> LayerOutput {
    let mut rows = Vec::new();
    at.each_cell(values, &mut rows, |_, _, _, _| {});
    let points: Vec<CatPoint> = values
        .placed
        .in_panel(at.panel)
        .map(|o| CatPoint {
            x: o.cell.x,
            group: o.cell.group,
            offset: offset(o, opts.jitter),
            y: o.value,
        })
        .collect();
    let mut y = Extent::default();
    points.iter().for_each(|p| y.add(p.y));
    let marks = match opts.arrange {
        Some(how) => PointMarks::Arranged(points, how),
        None => PointMarks::Categories(points),
    };
    LayerOutput {
        y,
        ..LayerOutput::new(LayerMarks::Points(marks), rows)
    }
}

fn scatter(at: &At, pairs: &Placement<Pair>) -> LayerOutput {
    let mut rows = Vec::new();
    let mut points = Vec::new();
    for g in 0..at.cells.groups.len() {
        let cell = at.cell(0, g);
        let here: Vec<Pair> = pairs
            .in_panel(at.panel)
            .filter(|o| o.cell.group == g)
            .map(|o| o.value)
            .collect();
        n_rows(&mut rows, &at.key(g, ""), here.len(), pairs.n_missing(cell));
        points.extend(here.iter().map(|p| (p.x, p.y, g)));
    }
    let (mut x, mut y) = (Extent::default(), Extent::default());
    for (px, py, _) in &points {
        x.add(*px);
        y.add(*py);
    }
    LayerOutput {
        x,
        y,
        ..LayerOutput::new(LayerMarks::Points(PointMarks::Numbers(points)), rows)
    }
}

/// A dot's jitter as a fraction of its band: a pure function of its subject (or row) and x
/// slot, so a subject's dots and the lines joining them agree in every figure.
pub(super) fn offset(o: &Obs<f64>, jitter: f64) -> f64 {
    let key = match o.subject {
        Some(s) => JITTER_SEED ^ (u64::from(s) << 1),
        None => JITTER_SEED ^ ((o.row as u64) << 1 | 1),
    };
    jitter * stats::jitter_offset(key, o.cell.x as u64)
}
