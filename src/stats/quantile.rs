//! Quantiles of numeric data (Hyndman & Fan 1996, definition 7) and of ordinal data given as
//! level counts (definition 1).
//!
//! Guarantees:
//! - [`quantile_sorted`] is definition 7: with `h = (n − 1)·p`, the value
//!   `x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋ + 1] − x[⌊h⌋])` on ascending data (0-based). It returns an
//!   order statistic exactly when `h` is whole or both neighbours are equal.
//! - [`ordinal_quantile`] is definition 1 on levels: the index of the first level whose
//!   cumulative proportion reaches `p`, skipping levels nobody chose (so `p = 0` gives the
//!   lowest observed level).
//! - [`level_quantile`] and [`level_median`] apply definition 1 to a list of level positions
//!   (one per observation) instead of counts, with the same result; the median of an even
//!   number of observations is the lower middle level, so a collapsed ordinal response is
//!   always a level some trial had.
//! - No function panics: empty input or a probability outside `[0, 1]` is an error.

use super::error::{ensure_count, ensure_finite, StatError};

/// First quartile, median and third quartile of numeric data (definition 7).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Quartiles {
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
}

impl Quartiles {
    /// Interquartile range `q3 − q1`.
    pub fn iqr(&self) -> f64 {
        self.q3 - self.q1
    }
}

/// First quartile, median and third quartile of ordinal data, as level indices.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct OrdinalQuartiles {
    pub q1: usize,
    pub median: usize,
    pub q3: usize,
}

/// A sorted copy of `values` (ascending, by IEEE total order); an error if a value is not finite.
pub fn sorted_values(values: &[f64]) -> Result<Vec<f64>, StatError> {
    ensure_finite(values)?;
    let mut sorted = values.to_vec();
    sorted.sort_by(f64::total_cmp);
    Ok(sorted)
}

/// The `p` quantile of ascending data by Hyndman & Fan definition 7.
///
/// The caller guarantees `sorted` is ascending (e.g. from [`sorted_values`]).
pub fn quantile_sorted(sorted: &[f64], p: f64) -> Result<f64, StatError> {
    ensure_count(sorted.len(), 1)?;
    ensure_probability(p)?;
    let h = (sorted.len() - 1) as f64 * p;
    let lower = h.floor();
    let index = lower as usize;
    let fraction = h - lower;
    let below = sorted[index];
    match sorted.get(index + 1) {
        Some(&above) if fraction > 0.0 && above != below => {
            let gap = above - below;
            if gap.is_finite() {
                Ok(below + fraction * gap)
            } else {
                // Neighbours of opposite sign near the largest double: their difference
                // overflows, the weighted sum does not.
                Ok(below * (1.0 - fraction) + above * fraction)
            }
        }
        _ => Ok(below),
    }
}

/// Quartiles of ascending data (definition 7).
pub fn quartiles_sorted(sorted: &[f64]) -> Result<Quartiles, StatError> {
    Ok(Quartiles {
        q1: quantile_sorted(sorted, 0.25)?,
        median: quantile_sorted(sorted, 0.5)?,
        q3: quantile_sorted(sorted, 0.75)?,
    })
}

/// Quartiles of unsorted data (definition 7); sorts a copy.
pub fn quartiles(values: &[f64]) -> Result<Quartiles, StatError> {
    quartiles_sorted(&sorted_values(values)?)
}

/// The level index of the `p` quantile of ordinal data (Hyndman & Fan definition 1).
///
/// `counts[k]` is how many observations fall on level `k`, levels in their declared order. The
/// result is the first level with a non-zero count whose cumulative proportion
/// `(counts[0] + … + counts[k]) / total` is at least `p`. An error when the total is zero.
pub fn ordinal_quantile(counts: &[u64], p: f64) -> Result<usize, StatError> {
    ensure_probability(p)?;
    let total: u64 = counts.iter().sum();
    let observed = counts
        .iter()
        .enumerate()
        .filter(|&(_, &count)| count > 0)
        .map(|(level, &count)| (level, count));
    first_level_reaching(observed, total, p)
}

/// The level of the `p` quantile of a set of level positions (Hyndman & Fan definition 1):
/// one of the given levels, never an average. `levels` holds one level index per observation,
/// in any order (e.g. one subject's trials on an ordinal scale); the result is the same as
/// [`ordinal_quantile`] on their counts. An error when `levels` is empty.
pub fn level_quantile(levels: &[usize], p: f64) -> Result<usize, StatError> {
    ensure_probability(p)?;
    let mut sorted = levels.to_vec();
    sorted.sort_unstable();
    let runs = sorted
        .chunk_by(|a, b| a == b)
        .map(|run| (run[0], run.len() as u64));
    first_level_reaching(runs, sorted.len() as u64, p)
}

/// The median level of a set of level positions (definition 1): with an even number of
/// observations, the lower of the two middle levels. Collapses one subject's ordinal trials to
/// one level: trials rated 1 and 5 give 1, never 3.
pub fn level_median(levels: &[usize]) -> Result<usize, StatError> {
    level_quantile(levels, 0.5)
}

/// The first level of `(level, count)` runs in ascending level order whose cumulative
/// proportion of `total` reaches `p`; an error when `total` is zero.
fn first_level_reaching(
    runs: impl Iterator<Item = (usize, u64)>,
    total: u64,
    p: f64,
) -> Result<usize, StatError> {
    if total == 0 {
        return Err(StatError::TooFewValues {
            needed: 1,
            found: 0,
        });
    }
    let mut cumulative = 0_u64;
    let mut last_observed = 0;
    for (level, count) in runs {
        cumulative += count;
        last_observed = level;
        if cumulative as f64 / total as f64 >= p {
            return Ok(level);
        }
    }
    // Only reachable if rounding kept the last proportion below p = 1; it is the maximum.
    Ok(last_observed)
}

/// Ordinal quartiles as level indices (definition 1).
pub fn ordinal_quartiles(counts: &[u64]) -> Result<OrdinalQuartiles, StatError> {
    Ok(OrdinalQuartiles {
        q1: ordinal_quantile(counts, 0.25)?,
        median: ordinal_quantile(counts, 0.5)?,
        q3: ordinal_quantile(counts, 0.75)?,
    })
}

fn ensure_probability(p: f64) -> Result<(), StatError> {
    if (0.0..=1.0).contains(&p) {
        Ok(())
    } else {
        Err(StatError::InvalidProbability(p))
    }
}
