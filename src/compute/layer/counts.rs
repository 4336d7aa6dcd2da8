//! `counts`: how many kept rows fall in each level of x, per panel and colour group, as counts
//! or as percentages of the group.
//!
//! Summary rows per colour group: `n` and `n_missing` (rows whose x is missing), then per x
//! level `count` (and `percent` with `heights(percent)`).

use crate::check::layer::CountsOpts;
use crate::check::plan::Heights;

use super::super::cells::Placement;
use super::super::extent::Extent;
use super::super::ComputeError;
use super::{n_rows, At, Bar, LayerMarks, LayerOutput, Stat, YUse};

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
    let mut bars = Vec::new();
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
                Heights::Percent => {
                    let pct = if total > 0 {
                        100.0 * count as f64 / total as f64
                    } else {
                        0.0
                    };
                    rows.push(k.number(Stat::Percent, pct));
                    pct
                }
                Heights::Count | Heights::Density => count as f64,
            };
            y.add(height);
            bars.push(Bar {
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
        ..LayerOutput::new(LayerMarks::Counts(bars), rows)
    })
}
