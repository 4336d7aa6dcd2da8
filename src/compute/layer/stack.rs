//! `stack`: at each x level, the share of each level of a categorical y, as a 100% stacked bar
//! in level order (the first level at the bottom); `stack diverging` centres each bar on the
//! neutral level of an ordinal y: the levels below it stack downwards from half the neutral
//! level's share below zero, the levels above it upwards.
//!
//! Percentages are `100 · count / n` of the x level's values in the panel. An x level without
//! values has no percentages (0 of 0 is not a proportion) and draws no bar.
//!
//! Summary rows per x level: `n` and `n_missing` (group empty), then per level of y (group =
//! the level's name) its `count` and, when the x level has values, its `percent`.

use crate::check::layer::StackOpts;
use crate::check::plan::Axes;
use crate::colour::ordered;
use crate::diag::{Code, Diagnostic, Span};

use super::super::cells::{check_colours, Cell, Values};
use super::super::extent::Extent;
use super::super::levels::Levels;
use super::super::summary::RowKey;
use super::super::{ComputeError, Legend};
use super::{At, LayerMarks, LayerOutput, Stat, YUse};

/// The stacked bars of one panel.
#[derive(Debug, Clone, PartialEq)]
pub struct StackMarks {
    pub bars: Vec<StackBar>,
    /// Centred on the neutral level: zero is drawn across the panel.
    pub diverging: bool,
}

/// One bar: its x slot and, per level of y (in slot order), the span it covers in percent.
#[derive(Debug, Clone, PartialEq)]
pub struct StackBar {
    pub x: usize,
    pub segments: Vec<(f64, f64)>,
}

pub fn compute(opts: &StackOpts, at: &At) -> Result<LayerOutput, ComputeError> {
    let placed = at.levels()?;
    let cells = at.cells;
    let (Axes::CatCat { y, .. }, Some(levels)) = (&cells.plan.axes, &cells.y_levels) else {
        return Err(at.misplaced("levels of y"));
    };
    let var = cells.book.var(y.var.var);
    check_palette(levels, &var.name, y.var.ordered, y.var.span)?;
    let midpoint = opts
        .diverging
        .and_then(|m| var.levels.as_ref()?.get(m))
        .and_then(|name| levels.names.iter().position(|n| n == name));
    let mut rows = Vec::new();
    let mut bars = Vec::new();
    let mut extent = Extent::default();
    for cell in cells.cells_of(at.panel) {
        let counts = count_levels(placed, cell, levels.len());
        let n: usize = counts.iter().sum();
        let key = at.cell_key(cell);
        rows.push(key.count(Stat::N, n));
        rows.push(key.count(Stat::NMissing, placed.placed.n_missing(cell)));
        for (level, count) in levels.names.iter().zip(&counts) {
            let k = RowKey {
                group: level.clone(),
                ..key.clone()
            };
            rows.push(k.count(Stat::Count, *count));
            if n > 0 {
                rows.push(k.number(Stat::Percent, 100.0 * *count as f64 / n as f64));
            }
        }
        if n == 0 {
            continue;
        }
        let bar = stacked(cell.x, &counts, n, midpoint);
        for (lo, hi) in &bar.segments {
            extent.add(*lo);
            extent.add(*hi);
        }
        bars.push(bar);
    }
    let legend = Legend::new(cells.title(y.var.var, &y.title), levels.clone());
    let diverging = midpoint.is_some();
    Ok(LayerOutput {
        y: extent,
        y_from_zero: true,
        y_use: if diverging {
            YUse::Split("Percent")
        } else {
            YUse::Heights("Percent")
        },
        legend: Some(legend),
        ..LayerOutput::new(LayerMarks::Stack(StackMarks { bars, diverging }), rows)
    })
}

/// The values of `cell` at each level slot of y.
fn count_levels(placed: &Values, cell: Cell, n_levels: usize) -> Vec<usize> {
    let mut counts = vec![0usize; n_levels];
    for slot in placed.sorted(cell) {
        if let Some(c) = counts.get_mut(*slot as usize) {
            *c += 1;
        }
    }
    counts
}

/// A bar of `n` values: each level's span in percent, stacked from zero, or centred on the
/// neutral level `midpoint` (half of its share below zero).
fn stacked(x: usize, counts: &[usize], n: usize, midpoint: Option<usize>) -> StackBar {
    let share = |c: usize| 100.0 * c as f64 / n as f64;
    let mut low = match midpoint {
        None => 0.0,
        Some(m) => {
            let below: usize = counts[..m].iter().sum();
            -(share(below) + share(counts[m]) / 2.0)
        }
    };
    let segments = counts
        .iter()
        .map(|&c| {
            let high = low + share(c);
            let span = (low, high);
            low = high;
            span
        })
        .collect();
    StackBar { x, segments }
}

/// The levels of y must each have a colour: the qualitative palette's for a nominal y, the
/// ordered palette's for an ordinal one (F0119).
fn check_palette(
    levels: &Levels,
    var: &str,
    ordered: bool,
    span: Span,
) -> Result<(), ComputeError> {
    if !ordered {
        return check_colours(levels, var, span);
    }
    let most = ordered::MAX_LEVELS;
    if levels.len() <= most {
        return Ok(());
    }
    Err(Diagnostic::new(
        Code::TooManyColours,
        format!(
            "`{var}` has {} levels to tell apart by colour, more than the ordered palette's {most}",
            levels.len()
        ),
    )
    .with_label(span, "one colour per level")
    .with_help("show the distribution with `median`, or group neighbouring levels into fewer")
    .into())
}
