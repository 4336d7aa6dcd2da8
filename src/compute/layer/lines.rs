//! `lines by(SUBJECT)`: each subject's values joined across x, in x order, meeting the dots of
//! `points` (they share the figure's jitter).
//!
//! Summary rows per colour group (`x` empty): `n`, the subjects drawn.

use std::collections::BTreeMap;

use crate::check::layer::LinesOpts;

use super::super::cells::{Obs, Values};
use super::super::extent::Extent;
use super::super::ComputeError;
use super::points::offset;
use super::{At, LayerMarks, LayerOutput, Stat};

/// One subject's values joined across x.
#[derive(Debug, Clone, PartialEq)]
pub struct SubjectPath {
    pub group: usize,
    /// (x slot, jitter offset, y), in x order.
    pub points: Vec<(usize, f64, f64)>,
}

pub fn compute(_opts: &LinesOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let mut by_subject: BTreeMap<(usize, u32), Vec<&Obs<f64>>> = BTreeMap::new();
    for o in values.placed.in_panel(at.panel) {
        if let Some(s) = o.subject {
            by_subject.entry((o.cell.group, s)).or_default().push(o);
        }
    }
    let mut paths = Vec::new();
    let mut n_by_group = vec![0usize; at.cells.groups.len()];
    for ((group, _), mut obs) in by_subject {
        obs.sort_by_key(|o| o.cell.x);
        n_by_group[group] += 1;
        paths.push(SubjectPath {
            group,
            points: obs
                .iter()
                .map(|o| (o.cell.x, offset(o, at.cells.jitter), o.value))
                .collect(),
        });
    }
    let rows = n_by_group
        .iter()
        .enumerate()
        .map(|(g, n)| at.key(g, "").count(Stat::N, *n))
        .collect();
    let mut y = Extent::default();
    paths
        .iter()
        .flat_map(|p| &p.points)
        .for_each(|(_, _, v)| y.add(*v));
    Ok(LayerOutput {
        y,
        ..LayerOutput::new(LayerMarks::Lines(paths), rows)
    })
}
