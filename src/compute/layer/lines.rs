//! `lines by(SUBJECT)`: each subject's values joined across x, in x order — over a categorical
//! x meeting the dots of `points` (they share the figure's jitter), over a numeric x (a time)
//! as each subject's trajectory in time order.
//!
//! Summary rows per colour group (`x` empty): `n`, the subjects drawn.

use std::collections::BTreeMap;

use crate::check::layer::LinesOpts;

use super::super::cells::{Obs, Placed};
use super::super::extent::Extent;
use super::super::ComputeError;
use super::points::offset;
use super::{At, LayerMarks, LayerOutput, Stat};

/// One subject's values joined across x.
#[derive(Debug, Clone, PartialEq)]
pub struct SubjectPath {
    pub group: usize,
    /// In x order.
    pub points: Vec<PathPoint>,
}

/// A point of a subject's path.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PathPoint {
    /// At an x slot, `offset` the jitter as a share of the group's band.
    Slot { x: usize, offset: f64, y: f64 },
    /// At a value of a numeric x.
    Value { x: f64, y: f64 },
}

pub fn compute(_opts: &LinesOpts, at: &At) -> Result<LayerOutput, ComputeError> {
    let jitter = at.cells.jitter;
    let (paths, n_by_group) = match &at.cells.placed {
        Placed::Values(values) => {
            paths(at, values.placed.in_panel(at.panel), |o| PathPoint::Slot {
                x: o.cell.x,
                offset: offset(o, jitter),
                y: o.value,
            })
        }
        Placed::Pairs(pairs) => paths(at, pairs.in_panel(at.panel), |o| PathPoint::Value {
            x: o.value.x,
            y: o.value.y,
        }),
        Placed::Rows(_) | Placed::Levels(_) => return Err(at.misplaced("numbers")),
    };
    let rows = n_by_group
        .iter()
        .enumerate()
        .map(|(g, n)| at.key(g, "").count(Stat::N, *n))
        .collect();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    for p in paths.iter().flat_map(|p| &p.points) {
        match *p {
            PathPoint::Slot { y: v, .. } => y.add(v),
            PathPoint::Value { x: u, y: v } => {
                x.add(u);
                y.add(v);
            }
        }
    }
    Ok(LayerOutput {
        x,
        y,
        ..LayerOutput::new(LayerMarks::Lines(paths), rows)
    })
}

/// Each subject's observations of a panel as a path in x order (ties in row order), and the
/// subjects drawn per colour group.
fn paths<'o, T: 'o>(
    at: &At,
    obs: impl Iterator<Item = &'o Obs<T>>,
    point: impl Fn(&Obs<T>) -> PathPoint,
) -> (Vec<SubjectPath>, Vec<usize>) {
    let mut by_subject: BTreeMap<(usize, u32), Vec<PathPoint>> = BTreeMap::new();
    for o in obs {
        if let Some(s) = o.subject {
            by_subject
                .entry((o.cell.group, s))
                .or_default()
                .push(point(o));
        }
    }
    let mut n_by_group = vec![0usize; at.cells.groups.len()];
    let paths = by_subject
        .into_iter()
        .map(|((group, _), mut points)| {
            // A stable sort keeps row order among equal x.
            points.sort_by(|a, b| x_of(a).total_cmp(&x_of(b)));
            n_by_group[group] += 1;
            SubjectPath { group, points }
        })
        .collect();
    (paths, n_by_group)
}

/// Where a point lies along x, for ordering.
fn x_of(p: &PathPoint) -> f64 {
    match *p {
        PathPoint::Slot { x, .. } => x as f64,
        PathPoint::Value { x, .. } => x,
    }
}
