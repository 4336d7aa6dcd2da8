//! `smooth`: a LOWESS curve of y on x per panel and colour group ([`stats::lowess`], Cleveland
//! 1979, with three robustness iterations), over a scatter or over every subject's trajectory
//! (the group trend). On a log axis the smooth is of the logs, so it is drawn in the space the
//! reader sees (as `fit` does).
//!
//! Guarantees of the marks:
//! - the curve covers the x range of the group's own pairs (a smooth is not extrapolated);
//! - it is drawn through the smooth at each distinct x of the group when there are at most
//!   [`SMOOTH_GRID`] of them (exactly the LOWESS polyline), else at [`SMOOTH_GRID`] x values
//!   equally spaced on the axis as drawn, the first and last exactly at the data's ends, each
//!   interpolated linearly between the smooth at the neighbouring data x ([`stats::Lowess::at`]).
//!
//! Small samples: a local line through fewer than three points only joins the dots, and a
//! smooth of a handful of points is not a trend (common practice). A group with fewer than
//! [`SMOOTH_MIN_PAIRS`] pairs, fewer than three distinct x values, or a span that leaves each
//! local line fewer than three pairs draws no curve, and the figure warns (W0015) with the
//! reason. More than [`SMOOTH_MAX_PAIRS`] pairs in one group is an error (F0126): LOWESS costs
//! time in proportion to n · span · n.
//!
//! Summary rows per colour group: `n`, `n_missing`, `span`, and `neighbours` (pairs per local
//! line) when the curve is computed; with `summary(full)`, `fitted` at every point drawn (`x` =
//! the point).

use crate::check::layer::{span_text, SmoothOpts};
use crate::check::plan::SummaryDetail;
use crate::diag::{Code, Diagnostic, Span};
use crate::stats::{self, Lowess};

use super::super::cells::{Pair, Placement};
use super::super::extent::Extent;
use super::super::summary::{format_number, RowKey, SummaryRow};
use super::super::ComputeError;
use super::{At, LayerMarks, LayerOutput, Stat};

/// The most points a curve is drawn through.
pub const SMOOTH_GRID: usize = 256;
/// The fewest pairs a group needs for a curve (common practice).
pub const SMOOTH_MIN_PAIRS: usize = 10;
/// The fewest pairs each local line must use, and the fewest distinct x values.
const MIN_LOCAL: usize = 3;
/// The most pairs of one group LOWESS is computed for.
pub const SMOOTH_MAX_PAIRS: usize = 5_000;

/// A smooth curve over its group's x range, in data units.
#[derive(Debug, Clone, PartialEq)]
pub struct SmoothMark {
    pub group: usize,
    /// (x, smooth) in ascending x.
    pub line: Vec<(f64, f64)>,
}

pub fn compute(
    opts: &SmoothOpts,
    at: &At,
    pairs: &Placement<Pair>,
    head: Span,
) -> Result<LayerOutput, ComputeError> {
    let logs = (at.x_is_log(), at.y_is_log());
    let mut rows = Vec::new();
    let mut marks = Vec::new();
    let mut warnings = Vec::new();
    for g in 0..at.cells.groups.len() {
        let (here, k) = at.group_pairs(pairs, g, &mut rows);
        rows.push(k.number(Stat::Span, opts.span));
        if here.len() > SMOOTH_MAX_PAIRS {
            return Err(too_many(at, g, here.len(), head).into());
        }
        let smooth = match smooth_group(&here, opts.span, logs) {
            Ok(smooth) => smooth,
            Err(reason) => {
                if warnings.is_empty() {
                    warnings.push(too_few(at, g, &reason, head));
                }
                continue;
            }
        };
        rows.push(k.count(Stat::Neighbours, smooth.neighbours));
        let line = drawn(&smooth, logs);
        if opts.summary == SummaryDetail::Full {
            fitted_rows(&line, &k, &mut rows);
        }
        marks.push(SmoothMark { group: g, line });
    }
    let (mut x, mut y) = (Extent::default(), Extent::default());
    for (a, b) in marks.iter().flat_map(|m| &m.line) {
        x.add(*a);
        y.add(*b);
    }
    Ok(LayerOutput {
        x,
        y,
        warnings,
        ..LayerOutput::new(LayerMarks::Smooth(marks), rows)
    })
}

/// The LOWESS smooth of a group's pairs (of their logs on log axes), or why there is none.
fn smooth_group(pairs: &[Pair], span: f64, (x_log, y_log): (bool, bool)) -> Result<Lowess, String> {
    let n = pairs.len();
    if n < SMOOTH_MIN_PAIRS {
        return Err(format!(
            "{n} pairs, fewer than the {SMOOTH_MIN_PAIRS} a smooth needs"
        ));
    }
    let scaled = |v: f64, log: bool| if log { v.ln() } else { v };
    let xs: Vec<f64> = pairs.iter().map(|p| scaled(p.x, x_log)).collect();
    let ys: Vec<f64> = pairs.iter().map(|p| scaled(p.y, y_log)).collect();
    let mut distinct = xs.clone();
    distinct.sort_by(f64::total_cmp);
    distinct.dedup();
    if distinct.len() < MIN_LOCAL {
        return Err(format!(
            "its {n} pairs have {} distinct x values, fewer than {MIN_LOCAL}",
            distinct.len()
        ));
    }
    let smooth = stats::lowess(&xs, &ys, span, stats::ROBUSTNESS_ITERATIONS)
        .map_err(|e| format!("LOWESS is not defined for its pairs ({e})"))?;
    if smooth.neighbours < MIN_LOCAL {
        return Err(format!(
            "span {} of {n} pairs leaves each local line {} pairs, fewer than {MIN_LOCAL}",
            span_text(span),
            smooth.neighbours
        ));
    }
    Ok(smooth)
}

/// The points the curve is drawn through, back in the axes' units.
fn drawn(smooth: &Lowess, (x_log, y_log): (bool, bool)) -> Vec<(f64, f64)> {
    let back = |v: f64, log: bool| if log { v.exp() } else { v };
    let mut grid = smooth.x.clone();
    grid.dedup();
    if grid.len() > SMOOTH_GRID {
        let (lo, hi) = (grid[0], grid[grid.len() - 1]);
        grid = (0..SMOOTH_GRID)
            .map(|i| match i {
                0 => lo,
                _ if i + 1 == SMOOTH_GRID => hi,
                _ => lo + (hi - lo) * i as f64 / (SMOOTH_GRID - 1) as f64,
            })
            .collect();
    }
    grid.iter()
        .filter_map(|&x| Some((back(x, x_log), back(smooth.at(x)?, y_log))))
        .collect()
}

/// `fitted` at every point drawn.
fn fitted_rows(line: &[(f64, f64)], k: &RowKey, rows: &mut Vec<SummaryRow>) {
    for (x, v) in line {
        rows.push(k.at(format_number(*x)).number(Stat::Fitted, *v));
    }
}

/// "colour group \"ridge\" in panel \"2024\"": where a group is, for messages (empty without
/// colour and panels).
fn place(at: &At, group: usize) -> String {
    let mut parts = Vec::new();
    if at.cells.plan.colour.is_some() {
        parts.push(format!("colour group \"{}\"", at.cells.group_name(group)));
    }
    if at.cells.plan.panels.is_some() {
        parts.push(format!("panel \"{}\"", at.cells.panel_name(at.panel)));
    }
    if parts.is_empty() {
        String::new()
    } else {
        format!(" for {}", parts.join(" in "))
    }
}

/// W0015: no curve for a group, and why.
fn too_few(at: &At, group: usize, reason: &str, head: Span) -> Diagnostic {
    Diagnostic::new(
        Code::SmoothTooFewPairs,
        format!("`smooth` draws no curve{}: {reason}", place(at, group)),
    )
    .with_label(head, "a local trend needs enough points")
    .with_help("a smooth of a few points only joins the dots: show the points alone, `fit` a line, or give a larger `span(...)`")
}

/// F0126: more pairs than LOWESS is computed for.
fn too_many(at: &At, group: usize, n: usize, head: Span) -> Diagnostic {
    Diagnostic::new(
        Code::SmoothTooLarge,
        format!(
            "`smooth` of {n} pairs{}, more than the {SMOOTH_MAX_PAIRS} LOWESS is computed for",
            place(at, group)
        ),
    )
    .with_label(head, "time grows with the square of the pairs")
    .with_help("split the data with `colour` or `panels`, keep fewer rows with `where`, or show the trend with `fit`")
}
