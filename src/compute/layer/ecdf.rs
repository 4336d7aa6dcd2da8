//! `ecdf`: the empirical cumulative distribution function of x per panel and colour group
//! ([`stats::ecdf`]): `F̂(t) = #{xᵢ ≤ t} / n`, a step at each distinct value.
//!
//! Summary rows per colour group: `n`, `n_missing`, then per distinct value (`x` = the value,
//! shortest round-trip text) `proportion`, the proportion of values at or below it.

use crate::check::layer::EcdfOpts;
use crate::stats;

use super::super::cells::Values;
use super::super::extent::Extent;
use super::super::summary::format_number;
use super::super::ComputeError;
use super::{At, LayerMarks, LayerOutput, Stat, YUse};

/// The steps of one colour group.
#[derive(Debug, Clone, PartialEq)]
pub struct EcdfMark {
    pub group: usize,
    /// (distinct value, proportion at or below it), ascending; the last proportion is 1.
    pub steps: Vec<(f64, f64)>,
}

pub fn compute(_opts: &EcdfOpts, at: &At, values: &Values) -> Result<LayerOutput, ComputeError> {
    let mut rows = Vec::new();
    let mut marks = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    y.add(0.0);
    y.add(1.0);
    at.each_group(values, &mut rows, |g, sorted, k, rows| {
        let Ok(e) = stats::ecdf(sorted) else {
            return;
        };
        let steps: Vec<(f64, f64)> = e.values.into_iter().zip(e.proportions).collect();
        for (v, p) in &steps {
            rows.push(k.at(format_number(*v)).number(Stat::Proportion, *p));
            x.add(*v);
        }
        marks.push(EcdfMark { group: g, steps });
    });
    Ok(LayerOutput {
        x,
        y,
        y_from_zero: true,
        y_use: YUse::Heights("Cumulative proportion"),
        ..LayerOutput::new(LayerMarks::Ecdf(marks), rows)
    })
}
