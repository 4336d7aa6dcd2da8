//! Frames over a numeric x and no y: distributions (histogram, density).

use crate::check::plan::{Bandwidth, BinRule, DistLayer, Heights, NumAxis};
use crate::stats;

use super::cat::Extent;
use super::rows::{self, Obs};
use super::summary::{bin_label, RowKey};
use super::{
    Bin, ComputeError, Context, Curve, FigureData, LayerMarks, NumScale, PanelData, XScale, YScale,
};

/// Points at which a density curve is evaluated, across the padded data range.
const DENSITY_GRID: usize = 256;

pub(super) fn key(
    ctx: &Context,
    panel: usize,
    layer: &'static str,
    group: usize,
    x: String,
) -> RowKey {
    RowKey {
        panel: ctx.panel_name(panel),
        layer,
        group: ctx.group_name(group),
        x,
    }
}

fn values_of(obs: &[Obs], panel: usize, group: usize) -> Vec<f64> {
    let mut v: Vec<f64> = obs
        .iter()
        .filter(|o| o.cell.panel == panel && o.cell.group == group)
        .map(|o| o.value)
        .collect();
    v.sort_by(f64::total_cmp);
    v
}

/// Histogram and density of a numeric x.
pub fn distribution(
    ctx: &Context,
    x: &NumAxis,
    layers: &[DistLayer],
) -> Result<FigureData, ComputeError> {
    let values = rows::numbers(ctx.table, ctx.book, x.var.var)?;
    let mut placed = rows::place(values.iter(), &ctx.keep, &ctx.placement(None));
    if let Some(rep) = &ctx.book.replicates {
        rows::collapse(&mut placed, rep.collapse);
    }
    let mut x_extent = Extent::default();
    let mut y_extent = Extent::default();
    y_extent.add(0.0);
    placed.obs.iter().for_each(|o| x_extent.add(o.value));
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    let mut y_title = "Count";
    for p in 0..ctx.panels.len() {
        let mut out = Vec::new();
        for layer in layers {
            match layer {
                DistLayer::Histogram { rule, heights, .. } => {
                    y_title = match heights {
                        Heights::Count => "Count",
                        Heights::Percent => "Percent",
                        Heights::Density => "Density",
                    };
                    let mut bins = Vec::new();
                    let shared = shared_edges(&placed.obs, *rule);
                    for g in 0..ctx.groups.len() {
                        let v = values_of(&placed.obs, p, g);
                        let k = key(ctx, p, "histogram", g, String::new());
                        summary.push(k.count("n", v.len()));
                        summary.push(k.count("n_missing", missing(&placed, p, g)));
                        let Some(edges) = group_edges(&shared, &v) else {
                            continue;
                        };
                        let counts = stats::count_in_bins(&v, edges);
                        let n_bins = counts.len();
                        for (i, &count) in counts.iter().enumerate() {
                            let (lo, hi) = (edges[i], edges[i + 1]);
                            let k = key(ctx, p, "histogram", g, bin_label(lo, hi, i + 1 == n_bins));
                            summary.push(k.count("count", count as usize));
                            let height = match heights {
                                Heights::Count => count as f64,
                                Heights::Percent => {
                                    let pct = 100.0 * count as f64 / v.len() as f64;
                                    summary.push(k.number("percent", pct));
                                    pct
                                }
                                Heights::Density => {
                                    let d = count as f64 / (v.len() as f64 * (hi - lo));
                                    summary.push(k.number("density", d));
                                    d
                                }
                            };
                            x_extent.add(lo);
                            x_extent.add(hi);
                            y_extent.add(height);
                            bins.push(Bin {
                                lo,
                                hi,
                                group: g,
                                height,
                            });
                        }
                    }
                    out.push(LayerMarks::Bins(bins));
                }
                DistLayer::Density { bandwidth, .. } => {
                    y_title = "Density";
                    let mut curves = Vec::new();
                    for g in 0..ctx.groups.len() {
                        let v = values_of(&placed.obs, p, g);
                        let k = key(ctx, p, "density", g, String::new());
                        summary.push(k.count("n", v.len()));
                        summary.push(k.count("n_missing", missing(&placed, p, g)));
                        let Ok(h) = stats::bandwidth(&v, bandwidth_rule(*bandwidth)) else {
                            continue;
                        };
                        summary.push(k.number("bandwidth", h));
                        let (lo, hi) = (v[0] - 3.0 * h, v[v.len() - 1] + 3.0 * h);
                        let grid: Vec<f64> = (0..DENSITY_GRID)
                            .map(|i| lo + (hi - lo) * i as f64 / (DENSITY_GRID - 1) as f64)
                            .collect();
                        let Ok(ys) = stats::kde(&v, h, &grid) else {
                            continue;
                        };
                        x_extent.add(lo);
                        x_extent.add(hi);
                        ys.iter().for_each(|y| y_extent.add(*y));
                        curves.push(Curve {
                            group: g,
                            points: grid.into_iter().zip(ys).collect(),
                        });
                    }
                    out.push(LayerMarks::Curves(curves));
                }
            }
        }
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            layers: out,
            n_by_x: Vec::new(),
        });
    }
    Ok(FigureData {
        x: XScale::Numbers(NumScale {
            title: ctx.title(x.var.var, &x.title),
            extent: x_extent.get(),
            range: x.range,
            log: false,
            include_zero: false,
        }),
        y: YScale::Numbers(NumScale {
            title: y_title.to_string(),
            extent: y_extent.get(),
            range: None,
            log: false,
            include_zero: true,
        }),
        legend: ctx.legend(),
        panels,
        summary,
    })
}

/// One grid of bin edges for every panel and colour group, so their bars can be compared: the
/// rule is applied to all values together (edges are whole multiples of one width, each the
/// double nearest to the exact multiple, so a value written on an edge falls in the bin that
/// starts there). Empty when there are no values or the rule cannot bin them.
fn shared_edges(obs: &[Obs], rule: BinRule) -> Vec<f64> {
    let all: Vec<f64> = obs.iter().map(|o| o.value).collect();
    stats::histogram(&all, bin_rule(rule)).map_or_else(|_| Vec::new(), |h| h.edges)
}

/// The edges of the shared grid one group needs: from the last edge at or below its smallest
/// value to the first at or above its largest (at least one bin). `None` for no values or no
/// grid.
fn group_edges<'e>(shared: &'e [f64], sorted: &[f64]) -> Option<&'e [f64]> {
    let (min, max) = (*sorted.first()?, *sorted.last()?);
    if shared.len() < 2 {
        return None;
    }
    let first = shared.partition_point(|&e| e <= min).saturating_sub(1);
    let last = shared
        .partition_point(|&e| e < max)
        .max(first + 1)
        .min(shared.len() - 1);
    Some(&shared[first..=last])
}

pub(super) fn missing(placed: &rows::Placed, panel: usize, group: usize) -> usize {
    placed
        .missing_by_cell
        .iter()
        .filter(|(c, _)| c.panel == panel && c.group == group)
        .map(|(_, n)| n)
        .sum()
}

fn bin_rule(rule: BinRule) -> stats::BinRule {
    match rule {
        BinRule::Sturges => stats::BinRule::Sturges,
        BinRule::Scott => stats::BinRule::Scott,
        BinRule::FreedmanDiaconis => stats::BinRule::FreedmanDiaconis,
        BinRule::Count(n) => stats::BinRule::Count(n as usize),
        BinRule::Width(w) => stats::BinRule::Width(w),
    }
}

pub(super) fn bandwidth_rule(b: Bandwidth) -> stats::BandwidthRule {
    match b {
        Bandwidth::Silverman => stats::BandwidthRule::Silverman,
        Bandwidth::Scott => stats::BandwidthRule::Scott,
        Bandwidth::Fixed(h) => stats::BandwidthRule::Fixed(h),
    }
}
