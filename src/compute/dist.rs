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
    let mut placed = rows::place(values, &ctx.keep, &ctx.placement(None));
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
                    let shared = shared_bins(&placed.obs, *rule);
                    for g in 0..ctx.groups.len() {
                        let v = values_of(&placed.obs, p, g);
                        let k = key(ctx, p, "histogram", g, String::new());
                        summary.push(k.count("n", v.len()));
                        summary.push(k.count("n_missing", missing(&placed, p, g)));
                        let Ok(h) = stats::histogram(&v, shared) else {
                            continue;
                        };
                        let n_bins = h.counts.len();
                        for (i, &count) in h.counts.iter().enumerate() {
                            let (lo, hi) = (h.edges[i], h.edges[i + 1]);
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

/// One bin width for every panel and colour group, so their bars can be compared: the rule
/// is applied to all values together, and each group is binned with that width (edges are
/// whole multiples of it, so they line up).
fn shared_bins(obs: &[Obs], rule: BinRule) -> stats::BinRule {
    let mut all: Vec<f64> = obs.iter().map(|o| o.value).collect();
    all.sort_by(f64::total_cmp);
    match stats::histogram(&all, bin_rule(rule)) {
        Ok(h) => stats::BinRule::Width(h.width),
        Err(_) => bin_rule(rule),
    }
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
