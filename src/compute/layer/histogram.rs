//! `histogram`: counts of a numeric x in bins of one readable width, per panel and colour group,
//! as counts, percentages or densities.
//!
//! Every panel and colour group uses one grid of bin edges, so their bars can be compared: the
//! rule is applied to all values together (edges are whole multiples of one width, each the
//! double nearest to the exact multiple, so a value written on an edge falls in the bin that
//! starts there); each group draws the bins from the one holding its smallest value to the one
//! holding its largest (bins are `[a, b)`, the grid's last one closed), so every value of every
//! group is in a bar.
//!
//! Summary rows per colour group: `n`, `n_missing`, then per bin (`x` = `[lo,hi)`, the last
//! `[lo,hi]`) `count`, and `percent` or `density` when those are the heights drawn.

use crate::check::layer::HistogramOpts;
use crate::check::plan::{BinRule, Heights};
use crate::stats;

use super::super::cells::Values;
use super::super::extent::Extent;
use super::super::summary::bin_label;
use super::super::ComputeError;
use super::{At, LayerMarks, LayerOutput, Stat, YUse};

/// A histogram bar.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bin {
    pub lo: f64,
    pub hi: f64,
    pub group: usize,
    pub height: f64,
}

pub fn compute(
    opts: &HistogramOpts,
    at: &At,
    values: &Values,
) -> Result<LayerOutput, ComputeError> {
    let all: Vec<f64> = values.all().collect();
    let shared =
        stats::histogram(&all, bin_rule(opts.rule)).map_or_else(|_| Vec::new(), |h| h.edges);
    let mut rows = Vec::new();
    let mut bins = Vec::new();
    let (mut x, mut y) = (Extent::default(), Extent::default());
    y.add(0.0);
    at.each_group(values, &mut rows, |g, v, k, rows| {
        let Some(edges) = group_edges(&shared, v) else {
            return;
        };
        let counts = stats::count_in_bins(v, edges);
        for (i, &count) in counts.iter().enumerate() {
            let (lo, hi) = (edges[i], edges[i + 1]);
            // Only the shared grid's last bin is closed.
            let k = k.at(bin_label(lo, hi, shared.last() == Some(&hi)));
            rows.push(k.count(Stat::Count, count as usize));
            let height = match opts.heights {
                Heights::Count => count as f64,
                Heights::Percent => {
                    let pct = 100.0 * count as f64 / v.len() as f64;
                    rows.push(k.number(Stat::Percent, pct));
                    pct
                }
                Heights::Density => {
                    let d = count as f64 / (v.len() as f64 * (hi - lo));
                    rows.push(k.number(Stat::Density, d));
                    d
                }
            };
            x.add(lo);
            x.add(hi);
            y.add(height);
            bins.push(Bin {
                lo,
                hi,
                group: g,
                height,
            });
        }
    });
    let title = match opts.heights {
        Heights::Count => "Count",
        Heights::Percent => "Percent",
        Heights::Density => "Density",
    };
    Ok(LayerOutput {
        x,
        y,
        y_from_zero: true,
        y_use: YUse::Heights(title),
        ..LayerOutput::new(LayerMarks::Histogram(bins), rows)
    })
}

/// The edges of the shared grid one group needs ([`stats::bins_covering`]): from the bin that
/// holds its smallest value to the bin that holds its largest, by the rule the counts use, so
/// every value falls in a bin drawn (a group all on the grid's last edge gets the last bin).
/// `None` for no values or no grid.
fn group_edges<'e>(shared: &'e [f64], sorted: &[f64]) -> Option<&'e [f64]> {
    stats::bins_covering(shared, *sorted.first()?, *sorted.last()?)
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
