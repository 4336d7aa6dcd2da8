//! Frames over a categorical x: counts, values by category (points, box, mean, median, lines),
//! and medians of an ordinal y.

use std::collections::BTreeMap;

use crate::check::plan::{
    CatAxis, CatNumLayer, CatOrdLayer, CountLayer, ErrorBar, Heights, NumAxis, Whiskers,
};
use crate::data::Codes;
use crate::stats;

use super::rows::{self, Cell, Levels, Obs, Placed};
use super::summary::RowKey;
use super::{
    Bar, BoxMark, CatPoint, ComputeError, Context, Estimate, EstimateKind, FigureData, LayerMarks,
    LevelMark, NumScale, PanelData, SubjectPath, XScale, YScale,
};

/// Seed mixed into every jitter key, so figures of the same data jitter alike (documented).
const JITTER_SEED: u64 = 0x5eed_f16a;

/// `counts`: how many kept rows fall in each level of x (per panel and colour group).
pub fn counts(
    ctx: &Context,
    x: &CatAxis,
    layers: &[CountLayer],
) -> Result<FigureData, ComputeError> {
    let levels = rows::axis_levels(ctx.table, ctx.book, x, &ctx.keep)?;
    let (codes, _) = rows::codes(ctx.table, ctx.book, x.var.var)?;
    let ones = std::iter::repeat_n(Some(1.0), ctx.table.n_rows());
    let placement = ctx.placement(Some((codes, &levels)));
    let placed = rows::place(ones, &ctx.keep, &placement);
    let missing_x = missing_x_by_panel_group(ctx, codes);
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    let mut y_max: f64 = 0.0;
    let mut any_percent = false;
    for (p, missing_in_panel) in missing_x.iter().enumerate() {
        let tally = tally(&placed, p, levels.len(), ctx.groups.len());
        let mut layers_out = Vec::new();
        for layer in layers {
            let CountLayer::Counts { heights, .. } = layer;
            any_percent |= *heights == Heights::Percent;
            let mut bars = Vec::new();
            for (g, missing) in missing_in_panel.iter().enumerate() {
                let total: usize = tally.iter().map(|by_group| by_group[g]).sum();
                summary.push(key(ctx, p, "counts", g, "").count("n", total));
                summary.push(key(ctx, p, "counts", g, "").count("n_missing", *missing));
                for (xi, name) in levels.names.iter().enumerate() {
                    let count = tally[xi][g];
                    let k = key(ctx, p, "counts", g, name);
                    summary.push(k.count("count", count));
                    let height = match heights {
                        Heights::Percent => {
                            let pct = if total > 0 {
                                100.0 * count as f64 / total as f64
                            } else {
                                0.0
                            };
                            summary.push(k.number("percent", pct));
                            pct
                        }
                        _ => count as f64,
                    };
                    y_max = y_max.max(height);
                    bars.push(Bar {
                        x: xi,
                        group: g,
                        height,
                    });
                }
            }
            layers_out.push(LayerMarks::Bars(bars));
        }
        let n_by_x = (0..levels.len()).map(|xi| tally[xi].iter().sum()).collect();
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            layers: layers_out,
            n_by_x,
        });
    }
    let title = ctx.title(x.var.var, &x.title);
    let y_title = if any_percent { "Percent" } else { "Count" }.to_string();
    Ok(FigureData {
        x: XScale::Categories { title, levels },
        y: YScale::Numbers(NumScale {
            title: y_title,
            extent: (0.0, y_max),
            range: None,
            log: false,
            include_zero: true,
        }),
        legend: ctx.legend(),
        panels,
        summary,
    })
}

/// Kept rows whose x is missing, per panel and colour group (rows missing those too are not
/// counted anywhere: they belong to no panel or group).
fn missing_x_by_panel_group(ctx: &Context, x_codes: &Codes) -> Vec<Vec<usize>> {
    let mut out = vec![vec![0usize; ctx.groups.len()]; ctx.panels.len()];
    let slot = |codes: Option<&Codes>, levels: &Levels, row: usize| match codes {
        None => Some(0),
        Some(c) => c.get(row).and_then(|code| levels.slot(code)),
    };
    for row in (0..x_codes.len()).filter(|&r| ctx.keep[r] && x_codes.get(r).is_none()) {
        if let (Some(p), Some(g)) = (
            slot(ctx.panel_codes, &ctx.panels, row),
            slot(ctx.group_codes, &ctx.groups, row),
        ) {
            out[p][g] += 1;
        }
    }
    out
}

fn tally(placed: &Placed, panel: usize, n_x: usize, n_groups: usize) -> Vec<Vec<usize>> {
    let mut t = vec![vec![0usize; n_groups]; n_x];
    for o in placed.obs.iter().filter(|o| o.cell.panel == panel) {
        t[o.cell.x][o.cell.group] += 1;
    }
    t
}

pub(super) fn key(
    ctx: &Context,
    panel: usize,
    layer: &'static str,
    group: usize,
    x: &str,
) -> RowKey {
    RowKey {
        panel: ctx.panel_name(panel),
        layer,
        group: ctx.group_name(group),
        x: x.to_string(),
    }
}

/// Values of one cell, sorted.
pub(super) fn cell_values(obs: &[Obs], cell: Cell) -> Vec<f64> {
    let mut v: Vec<f64> = obs
        .iter()
        .filter(|o| o.cell == cell)
        .map(|o| o.value)
        .collect();
    v.sort_by(f64::total_cmp);
    v
}

/// Categorical x, numeric y.
pub fn cat_num(
    ctx: &Context,
    x: &CatAxis,
    y: &NumAxis,
    layers: &[CatNumLayer],
) -> Result<FigureData, ComputeError> {
    let levels = rows::axis_levels(ctx.table, ctx.book, x, &ctx.keep)?;
    let (codes, _) = rows::codes(ctx.table, ctx.book, x.var.var)?;
    let values = rows::numbers(ctx.table, ctx.book, y.var.var)?;
    let placement = ctx.placement(Some((codes, &levels)));
    let mut placed = rows::place(values.iter(), &ctx.keep, &placement);
    if let Some(rep) = &ctx.book.replicates {
        rows::collapse(&mut placed, rep.collapse);
    } else {
        check_one_value_per_subject(ctx, &placed, &levels, layers)?;
    }
    check_log_axis(ctx, y, &placed)?;
    let mut extent = Extent::default();
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    let mut include_zero = false;
    for p in 0..ctx.panels.len() {
        let mut out = Vec::new();
        for layer in layers {
            let marks = match layer {
                CatNumLayer::Points { jitter, .. } => {
                    points(ctx, &placed, p, &levels, *jitter, &mut summary)
                }
                CatNumLayer::Box { whiskers, .. } => {
                    boxes(ctx, &placed, p, &levels, *whiskers, &mut summary)?
                }
                CatNumLayer::Mean { error, bar, .. } => {
                    include_zero |= *bar;
                    means(ctx, &placed, p, &levels, *error, *bar, &mut summary)?
                }
                CatNumLayer::Median { error, .. } => {
                    medians(ctx, &placed, p, &levels, *error, &mut summary)?
                }
                CatNumLayer::Lines { .. } => {
                    lines(ctx, &placed, p, points_jitter(layers), &mut summary)
                }
                CatNumLayer::Violin { bandwidth, .. } => {
                    super::violin::violins(ctx, &placed, p, &levels, *bandwidth, &mut summary)
                }
            };
            for m in &marks {
                extent.add_marks(m);
            }
            out.extend(marks);
        }
        let n_by_x = n_by_x(&placed, p, levels.len());
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            layers: out,
            n_by_x,
        });
    }
    super::violin::share_peak(&mut panels);
    Ok(FigureData {
        x: XScale::Categories {
            title: ctx.title(x.var.var, &x.title),
            levels,
        },
        y: YScale::Numbers(NumScale {
            title: ctx.title(y.var.var, &y.title),
            extent: extent.get(),
            range: y.range,
            log: y.scale == crate::check::plan::AxisScale::Log,
            include_zero,
        }),
        legend: ctx.legend(),
        panels,
        summary,
    })
}

/// How many observational units each x slot of a panel shows: distinct subjects when the
/// data declare one (a subject seen in two colour groups counts once), else values.
fn n_by_x(placed: &Placed, panel: usize, n_levels: usize) -> Vec<usize> {
    (0..n_levels)
        .map(|xi| {
            let here = placed
                .obs
                .iter()
                .filter(|o| o.cell.panel == panel && o.cell.x == xi);
            let mut subjects: Vec<u32> = here.clone().filter_map(|o| o.subject).collect();
            if subjects.is_empty() {
                return here.count();
            }
            subjects.sort_unstable();
            subjects.dedup();
            subjects.len() + here.filter(|o| o.subject.is_none()).count()
        })
        .collect()
}

/// Smallest and largest drawn value.
#[derive(Default)]
pub(crate) struct Extent {
    lo: Option<f64>,
    hi: Option<f64>,
}

impl Extent {
    pub fn add(&mut self, v: f64) {
        if v.is_finite() {
            self.lo = Some(self.lo.map_or(v, |l| l.min(v)));
            self.hi = Some(self.hi.map_or(v, |h| h.max(v)));
        }
    }

    pub fn get(&self) -> (f64, f64) {
        match (self.lo, self.hi) {
            (Some(l), Some(h)) => (l, h),
            _ => (0.0, 1.0),
        }
    }

    fn add_marks(&mut self, m: &LayerMarks) {
        match m {
            LayerMarks::Bars(b) => b.iter().for_each(|b| {
                self.add(b.height);
                self.add(0.0)
            }),
            LayerMarks::CatPoints(p) => p.iter().for_each(|p| self.add(p.y)),
            LayerMarks::Boxes(b) => b.iter().for_each(|b| {
                self.add(b.whisker_low);
                self.add(b.whisker_high);
                b.outliers.iter().for_each(|o| self.add(*o));
            }),
            LayerMarks::Estimates { marks, .. } => marks.iter().for_each(|e| {
                self.add(e.centre);
                if let Some((lo, hi)) = e.interval {
                    self.add(lo);
                    self.add(hi);
                }
            }),
            LayerMarks::Lines(paths) => paths
                .iter()
                .flat_map(|p| &p.points)
                .for_each(|(_, _, y)| self.add(*y)),
            LayerMarks::Violins { marks, .. } => marks
                .iter()
                .flat_map(|v| &v.outline)
                .for_each(|(y, _)| self.add(*y)),
            LayerMarks::Bins(_)
            | LayerMarks::XyPoints(_)
            | LayerMarks::Levels(_)
            | LayerMarks::Curves(_)
            | LayerMarks::Fits(_)
            | LayerMarks::Flows(_) => {}
        }
    }
}

fn check_one_value_per_subject(
    ctx: &Context,
    placed: &Placed,
    levels: &Levels,
    layers: &[CatNumLayer],
) -> Result<(), ComputeError> {
    let per_subject = layers.iter().find_map(|l| match l {
        CatNumLayer::Lines { span, .. } => Some(*span),
        CatNumLayer::Mean {
            error: Some(ErrorBar::CiWithin { .. }),
            span,
            ..
        } => Some(*span),
        _ => None,
    });
    let Some(span) = per_subject else {
        return Ok(());
    };
    match rows::repeated_subject(placed) {
        None => Ok(()),
        Some((subject, cell, first, second)) => {
            let mut parts = vec![format!("x = \"{}\"", levels.names[cell.x])];
            if ctx.plan.colour.is_some() {
                parts.push(format!("colour = \"{}\"", ctx.groups.names[cell.group]));
            }
            if ctx.plan.panels.is_some() {
                parts.push(format!("panel = \"{}\"", ctx.panels.names[cell.panel]));
            }
            Err(rows::repeated_subject_error(
                &ctx.subject_name(subject),
                &format!("({})", parts.join(", ")),
                (ctx.file_row(first), ctx.file_row(second)),
                span,
            )
            .into())
        }
    }
}

fn check_log_axis(ctx: &Context, y: &NumAxis, placed: &Placed) -> Result<(), ComputeError> {
    check_log_values(ctx, y, placed.obs.iter().map(|o| (o.row, o.value)))
}

/// Rule 10 in the data: a value at or below zero on a log axis; `values` are (row, value).
pub(super) fn check_log_values(
    ctx: &Context,
    axis: &NumAxis,
    mut values: impl Iterator<Item = (usize, f64)>,
) -> Result<(), ComputeError> {
    let Some(span) = axis.scale_span else {
        return Ok(());
    };
    let Some((row, _)) = values.find(|(_, v)| *v <= 0.0) else {
        return Ok(());
    };
    let var = ctx.book.var(axis.var.var);
    Err(crate::diag::Diagnostic::error(
        crate::check::codes::LOG_OF_ZERO,
        format!("`{}` has a zero (data row {}), and a log scale cannot show zero", var.name, ctx.file_row(row)),
    )
    .with_label(span, "log scale")
    .with_help("use a linear scale, or filter out the zeros with `where` if they are not part of the question")
    .into())
}

fn jitter_key(o: &Obs) -> u64 {
    match o.subject {
        Some(s) => JITTER_SEED ^ (u64::from(s) << 1),
        None => JITTER_SEED ^ ((o.row as u64) << 1 | 1),
    }
}

pub(super) fn for_cells(ctx: &Context, panel: usize, levels: &Levels) -> Vec<(Cell, String)> {
    let mut out = Vec::new();
    for (xi, name) in levels.names.iter().enumerate() {
        for g in 0..ctx.groups.len() {
            out.push((
                Cell {
                    panel,
                    x: xi,
                    group: g,
                },
                name.clone(),
            ));
        }
    }
    out
}

pub(super) fn n_rows(
    placed: &Placed,
    cell: Cell,
    k: &RowKey,
    n: usize,
    summary: &mut Vec<super::SummaryRow>,
) {
    summary.push(k.count("n", n));
    summary.push(k.count(
        "n_missing",
        placed.missing_by_cell.get(&cell).copied().unwrap_or(0),
    ));
}

fn points(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    levels: &Levels,
    jitter: f64,
    summary: &mut Vec<super::SummaryRow>,
) -> Vec<LayerMarks> {
    for (cell, name) in for_cells(ctx, p, levels) {
        let n = placed.obs.iter().filter(|o| o.cell == cell).count();
        n_rows(
            placed,
            cell,
            &key(ctx, p, "points", cell.group, &name),
            n,
            summary,
        );
    }
    let pts = placed
        .obs
        .iter()
        .filter(|o| o.cell.panel == p)
        .map(|o| CatPoint {
            x: o.cell.x,
            group: o.cell.group,
            offset: jittered(o, jitter),
            y: o.value,
        })
        .collect();
    vec![LayerMarks::CatPoints(pts)]
}

fn boxes(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    levels: &Levels,
    whiskers: Whiskers,
    summary: &mut Vec<super::SummaryRow>,
) -> Result<Vec<LayerMarks>, ComputeError> {
    let mut out = Vec::new();
    for (cell, name) in for_cells(ctx, p, levels) {
        let values = cell_values(&placed.obs, cell);
        let k = key(ctx, p, "box", cell.group, &name);
        n_rows(placed, cell, &k, values.len(), summary);
        let Ok(b) = stats::box_summary(&values, whiskers_rule(whiskers)) else {
            continue;
        };
        summary.push(k.number("q1", b.q1));
        summary.push(k.number("median", b.median));
        summary.push(k.number("q3", b.q3));
        summary.push(k.number("whisker_low", b.whisker_low));
        summary.push(k.number("whisker_high", b.whisker_high));
        for o in &b.outliers {
            summary.push(k.number("outliers", *o));
        }
        summary.push(k.number("min", b.min));
        summary.push(k.number("max", b.max));
        out.push(BoxMark {
            x: cell.x,
            group: cell.group,
            q1: b.q1,
            median: b.median,
            q3: b.q3,
            whisker_low: b.whisker_low,
            whisker_high: b.whisker_high,
            outliers: b.outliers.clone(),
        });
    }
    Ok(vec![LayerMarks::Boxes(out)])
}

fn whiskers_rule(w: Whiskers) -> stats::Whiskers {
    match w {
        Whiskers::Tukey => stats::Whiskers::Tukey,
        Whiskers::Range => stats::Whiskers::Range,
    }
}

fn means(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    levels: &Levels,
    error: Option<ErrorBar>,
    bar: bool,
    summary: &mut Vec<super::SummaryRow>,
) -> Result<Vec<LayerMarks>, ComputeError> {
    let within = match error {
        Some(ErrorBar::CiWithin { level }) => Some(within_cells(ctx, placed, levels, level)),
        _ => None,
    };
    let mut marks = Vec::new();
    let mut bars = Vec::new();
    for (cell, name) in for_cells(ctx, p, levels) {
        let k = key(ctx, p, "mean", cell.group, &name);
        let m = match &within {
            Some(w) => w.get(&cell).cloned().unwrap_or_default(),
            None => mean_cell(placed, cell, error),
        };
        summary.push(k.count("n", m.n));
        summary.push(k.count("n_missing", m.n_missing));
        let Some(mean) = m.mean else {
            continue;
        };
        summary.push(k.number("mean", mean));
        for (stat, value) in &m.error_rows {
            summary.push(k.number(stat, *value));
        }
        if bar {
            bars.push(Bar {
                x: cell.x,
                group: cell.group,
                height: mean,
            });
        }
        marks.push(Estimate {
            x: cell.x,
            group: cell.group,
            centre: mean,
            interval: m.interval,
        });
    }
    let mut out = Vec::new();
    if bar {
        out.push(LayerMarks::Bars(bars));
    }
    out.push(LayerMarks::Estimates {
        marks,
        kind: EstimateKind::Mean,
    });
    Ok(out)
}

/// What a `mean` layer shows in one cell.
#[derive(Debug, Clone, Default)]
struct MeanCell {
    /// Values the mean is taken over.
    n: usize,
    /// Values of the cell not used: missing, or (within intervals) from incomplete subjects.
    n_missing: usize,
    mean: Option<f64>,
    /// The error bar's summary rows (`sd`, `se`, or `ci_low` and `ci_high`).
    error_rows: Vec<(&'static str, f64)>,
    interval: Option<(f64, f64)>,
}

/// The mean of every value in a cell, with an error bar that needs no other cell.
fn mean_cell(placed: &Placed, cell: Cell, error: Option<ErrorBar>) -> MeanCell {
    let values = cell_values(&placed.obs, cell);
    let mut out = MeanCell {
        n: values.len(),
        n_missing: placed.missing_by_cell.get(&cell).copied().unwrap_or(0),
        ..MeanCell::default()
    };
    let Ok(m) = stats::moments(&values) else {
        return out;
    };
    out.mean = Some(m.mean);
    let (rows, interval) = match error {
        Some(ErrorBar::Sd) => {
            m.sd.map(|sd| (vec![("sd", sd)], (m.mean - sd, m.mean + sd)))
        }
        Some(ErrorBar::Se) => m
            .se()
            .map(|se| (vec![("se", se)], (m.mean - se, m.mean + se))),
        Some(ErrorBar::Ci { level }) => stats::mean_ci(&values, level)
            .ok()
            .map(|ci| interval_rows(ci.low, ci.high)),
        Some(ErrorBar::Bootstrap { level }) => stats::bootstrap::bootstrap_mean(&values, level)
            .ok()
            .map(|ci| interval_rows(ci.low, ci.high)),
        None | Some(ErrorBar::CiWithin { .. }) => None,
    }
    .unzip();
    out.error_rows = rows.unwrap_or_default();
    out.interval = interval;
    out
}

/// The summary rows and ends of an interval.
fn interval_rows(low: f64, high: f64) -> (Vec<(&'static str, f64)>, (f64, f64)) {
    (vec![("ci_low", low), ("ci_high", high)], (low, high))
}

/// Cousineau–Morey means and intervals for every cell of the figure, keyed by cell.
///
/// The within cells are every combination of the within factors the figure uses: x, and
/// colour and panels when they are within factors. Colour or panels on any other variable (a
/// between factor) split the subjects into separate normalisations. Only subjects with a value
/// in every within cell of their normalisation are used, for the mean as for the interval, so
/// the interval is centred on the mean shown; a cell's other values count as missing.
fn within_cells(
    ctx: &Context,
    placed: &Placed,
    levels: &Levels,
    level: f64,
) -> BTreeMap<Cell, MeanCell> {
    let is_within =
        |v: Option<&crate::check::plan::CatVar>| v.is_some_and(|c| ctx.book.is_within(c.var));
    let panel_within = is_within(ctx.plan.panels.as_ref());
    let colour_within = is_within(ctx.plan.colour.as_ref());
    let mut sets: BTreeMap<(Option<usize>, Option<usize>), Vec<Cell>> = BTreeMap::new();
    for panel in 0..ctx.panels.len() {
        for x in 0..levels.len() {
            for group in 0..ctx.groups.len() {
                let set = (
                    (!panel_within).then_some(panel),
                    (!colour_within).then_some(group),
                );
                sets.entry(set).or_default().push(Cell { panel, x, group });
            }
        }
    }
    sets.values()
        .flat_map(|cells| within_set(placed, cells, level))
        .collect()
}

/// One normalisation: subjects × `cells`, complete subjects only.
///
/// A cell that holds no value at all (a level nobody was measured at, here) is left out of the
/// within cells, so it does not drop every subject; it shows nothing.
fn within_set(placed: &Placed, cells: &[Cell], level: f64) -> Vec<(Cell, MeanCell)> {
    let (used, empty): (Vec<Cell>, Vec<Cell>) = cells
        .iter()
        .partition(|c| placed.obs.iter().any(|o| o.cell == **c));
    let mut out = complete_subjects(placed, &used, level);
    out.extend(empty.into_iter().map(|cell| {
        let m = MeanCell {
            n_missing: placed.missing_by_cell.get(&cell).copied().unwrap_or(0),
            ..MeanCell::default()
        };
        (cell, m)
    }));
    out
}

/// Means and intervals of `cells` over the subjects with a value in every one of them.
fn complete_subjects(placed: &Placed, cells: &[Cell], level: f64) -> Vec<(Cell, MeanCell)> {
    let mut by_subject: BTreeMap<u32, Vec<Option<f64>>> = BTreeMap::new();
    let mut present = vec![0usize; cells.len()];
    for o in &placed.obs {
        let Some(i) = cells.iter().position(|c| *c == o.cell) else {
            continue;
        };
        present[i] += 1;
        if let Some(s) = o.subject {
            by_subject
                .entry(s)
                .or_insert_with(|| vec![None; cells.len()])[i] = Some(o.value);
        }
    }
    let complete: Vec<Vec<Option<f64>>> = by_subject
        .into_values()
        .filter(|row| row.iter().all(Option::is_some))
        .collect();
    let intervals = stats::within_subject_intervals(&complete, stats::Spread::Ci { level }).ok();
    cells
        .iter()
        .enumerate()
        .map(|(i, cell)| {
            let column: Vec<f64> = complete.iter().filter_map(|row| row[i]).collect();
            let (error_rows, interval) = intervals
                .as_ref()
                .map(|w| interval_rows(w.cells[i].low, w.cells[i].high))
                .unzip();
            let cell_missing = placed.missing_by_cell.get(cell).copied().unwrap_or(0);
            let m = MeanCell {
                n: complete.len(),
                n_missing: cell_missing + present[i].saturating_sub(complete.len()),
                mean: stats::mean(&column).ok(),
                error_rows: error_rows.unwrap_or_default(),
                interval,
            };
            (*cell, m)
        })
        .collect()
}

fn medians(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    levels: &Levels,
    error: Option<ErrorBar>,
    summary: &mut Vec<super::SummaryRow>,
) -> Result<Vec<LayerMarks>, ComputeError> {
    let mut marks = Vec::new();
    for (cell, name) in for_cells(ctx, p, levels) {
        let values = cell_values(&placed.obs, cell);
        let k = key(ctx, p, "median", cell.group, &name);
        n_rows(placed, cell, &k, values.len(), summary);
        let Ok(median) = stats::quantile_sorted(&values, 0.5) else {
            continue;
        };
        summary.push(k.number("median", median));
        let interval = match error {
            Some(ErrorBar::Bootstrap { level }) => {
                stats::bootstrap::bootstrap_median(&values, level)
                    .ok()
                    .map(|ci| {
                        summary.push(k.number("ci_low", ci.low));
                        summary.push(k.number("ci_high", ci.high));
                        (ci.low, ci.high)
                    })
            }
            _ => None,
        };
        marks.push(Estimate {
            x: cell.x,
            group: cell.group,
            centre: median,
            interval,
        });
    }
    Ok(vec![LayerMarks::Estimates {
        marks,
        kind: EstimateKind::Median,
    }])
}

/// The jitter of the figure's points layer, so lines meet the points they join.
fn points_jitter(layers: &[CatNumLayer]) -> f64 {
    layers
        .iter()
        .find_map(|l| match l {
            CatNumLayer::Points { jitter, .. } => Some(*jitter),
            _ => None,
        })
        .unwrap_or(0.0)
}

fn jittered(o: &Obs, jitter: f64) -> f64 {
    jitter * stats::jitter_offset(jitter_key(o), o.cell.x as u64)
}

fn lines(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    jitter: f64,
    summary: &mut Vec<super::SummaryRow>,
) -> Vec<LayerMarks> {
    let mut by_subject: BTreeMap<(usize, u32), Vec<&Obs>> = BTreeMap::new();
    for o in placed.obs.iter().filter(|o| o.cell.panel == p) {
        if let Some(s) = o.subject {
            by_subject.entry((o.cell.group, s)).or_default().push(o);
        }
    }
    let mut paths = Vec::new();
    let mut n_by_group = vec![0usize; ctx.groups.len()];
    for ((group, _), mut obs) in by_subject {
        obs.sort_by_key(|o| o.cell.x);
        n_by_group[group] += 1;
        paths.push(SubjectPath {
            group,
            points: obs
                .iter()
                .map(|o| (o.cell.x, jittered(o, jitter), o.value))
                .collect(),
        });
    }
    for (g, n) in n_by_group.iter().enumerate() {
        summary.push(key(ctx, p, "lines", g, "").count("n", *n));
    }
    vec![LayerMarks::Lines(paths)]
}

/// Categorical x, ordinal y: the median level per cell, with quartile levels.
pub fn cat_ord(
    ctx: &Context,
    x: &CatAxis,
    y: &CatAxis,
    layers: &[CatOrdLayer],
) -> Result<FigureData, ComputeError> {
    let (levels, y_levels, mut placed) = ctx.place_levels(x, y)?;
    if let Some(rep) = &ctx.book.replicates {
        if rep.collapse == crate::check::plan::Collapse::Median {
            rows::collapse(&mut placed, rep.collapse);
        }
    }
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    for p in 0..ctx.panels.len() {
        let mut out = Vec::new();
        for layer in layers {
            let CatOrdLayer::Median { .. } = layer;
            let mut marks = Vec::new();
            for (cell, name) in for_cells(ctx, p, &levels) {
                let mut counts = vec![0u64; y_levels.len()];
                for o in placed.obs.iter().filter(|o| o.cell == cell) {
                    counts[o.value as usize] += 1;
                }
                let k = key(ctx, p, "median", cell.group, &name);
                let n: u64 = counts.iter().sum();
                n_rows(&placed, cell, &k, n as usize, &mut summary);
                let Ok(q) = stats::ordinal_quartiles(&counts) else {
                    continue;
                };
                summary.push(k.level("median", &y_levels.names[q.median]));
                summary.push(k.level("q1", &y_levels.names[q.q1]));
                summary.push(k.level("q3", &y_levels.names[q.q3]));
                marks.push(LevelMark {
                    x: cell.x,
                    group: cell.group,
                    median: q.median,
                    q1: q.q1,
                    q3: q.q3,
                });
            }
            out.push(LayerMarks::Levels(marks));
        }
        let n_by_x = n_by_x(&placed, p, levels.len());
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            layers: out,
            n_by_x,
        });
    }
    Ok(FigureData {
        x: XScale::Categories {
            title: ctx.title(x.var.var, &x.title),
            levels,
        },
        y: YScale::Categories {
            title: ctx.title(y.var.var, &y.title),
            levels: y_levels,
        },
        legend: ctx.legend(),
        panels,
        summary,
    })
}
