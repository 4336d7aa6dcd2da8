//! `counts`: how many kept rows fall in each level of x, per panel and colour group, as counts
//! or as percentages of the group, with the Wilson (1927) score interval of each percentage
//! under `heights(percent) error(ci(L))` ([`stats::wilson_interval`]: the level's count out of
//! the group's rows).
//!
//! Summary rows per colour group: `n` and `n_missing` (rows whose x is missing), then per x
//! level `count` (and `percent` with `heights(percent)`, then `ci_low` and `ci_high` in percent
//! with `error(ci(L))`). A group with no rows has no percentages: its levels report `count` 0
//! only and draw no bar.

use crate::check::layer::CountsOpts;
use crate::check::plan::Heights;
use crate::stats;

use super::super::cells::Placement;
use super::super::extent::Extent;
use super::super::ComputeError;
use super::{n_rows, At, Bar, CountMarks, Estimate, LayerMarks, LayerOutput, Stat, YUse};

pub fn compute(
    opts: &CountsOpts,
    at: &At,
    rows_in: &Placement<()>,
) -> Result<LayerOutput, ComputeError> {
    let n_x = at.cells.x_levels.len();
    let n_groups = at.cells.groups.len();
    let mut tally = vec![vec![0usize; n_groups]; n_x];
    for o in rows_in.in_panel(at.panel) {
        tally[o.cell.x][o.cell.group] += 1;
    }
    let mut rows = Vec::new();
    let mut marks = CountMarks {
        bars: Vec::new(),
        intervals: Vec::new(),
    };
    let mut y = Extent::default();
    y.add(0.0);
    for g in 0..n_groups {
        let total: usize = tally.iter().map(|by_group| by_group[g]).sum();
        n_rows(
            &mut rows,
            &at.key(g, ""),
            total,
            rows_in.n_missing(at.cell(0, g)),
        );
        for (xi, name) in at.cells.x_levels.names.iter().enumerate() {
            let count = tally[xi][g];
            let k = at.key(g, name.clone());
            rows.push(k.count(Stat::Count, count));
            let height = match opts.heights {
                // 0 of 0 rows is no percentage at all.
                Heights::Percent if total == 0 => continue,
                Heights::Percent => {
                    let pct = 100.0 * count as f64 / total as f64;
                    rows.push(k.number(Stat::Percent, pct));
                    let wilson = opts.ci.and_then(|level| {
                        stats::wilson_interval(count as u64, total as u64, level).ok()
                    });
                    if let Some(w) = wilson {
                        let (lo, hi) = (100.0 * w.low, 100.0 * w.high);
                        rows.push(k.number(Stat::CiLow, lo));
                        rows.push(k.number(Stat::CiHigh, hi));
                        y.add(hi);
                        marks.intervals.push(Estimate {
                            x: xi,
                            group: g,
                            centre: pct,
                            interval: Some((lo, hi)),
                        });
                    }
                    pct
                }
                Heights::Count | Heights::Density => count as f64,
            };
            y.add(height);
            marks.bars.push(Bar {
                x: xi,
                group: g,
                height,
            });
        }
    }
    let title = match opts.heights {
        Heights::Percent => "Percent",
        Heights::Count | Heights::Density => "Count",
    };
    Ok(LayerOutput {
        y,
        y_from_zero: true,
        y_use: YUse::Heights(title),
        ..LayerOutput::new(LayerMarks::Counts(marks), rows)
    })
}
