//! Percentile bootstrap intervals for the mean or the median (Efron & Tibshirani 1993, §13.3).
//! The resampling here is shared by the BCa interval ([`super::bca`]).
//!
//! Guarantees:
//! - Resampling uses [`Xoshiro256StarStar`] seeded from [`BootstrapSettings::seed`]
//!   ([`DEFAULT_SEED`] unless changed) and draws [`BootstrapSettings::resamples`]
//!   ([`DEFAULT_RESAMPLES`]) resamples of size `n` with replacement; resample `r` takes its `n`
//!   indices, in order, as the next `n` draws of `below(n)`. The same input therefore gives the
//!   same interval on every platform and run.
//! - The interval is the `(1 − L)/2` and `1 − (1 − L)/2` quantiles (Hyndman & Fan definition 7)
//!   of the resampled statistics; the estimate is the statistic of the data itself.
//! - Needs at least two values (with one, every resample is the same value).

use super::error::{ensure_count, ensure_finite, ensure_level, StatError};
use super::quantile::quantile_sorted;
use super::random::Xoshiro256StarStar;
use super::summary::accurate_mean;

/// The seed used unless a caller sets another.
pub const DEFAULT_SEED: u64 = 0x5EED_0F16_0000_0001;
/// The number of resamples used unless a caller sets another.
pub const DEFAULT_RESAMPLES: usize = 2000;

/// Which statistic is bootstrapped.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BootstrapStatistic {
    Mean,
    Median,
}

/// Seed and number of resamples.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct BootstrapSettings {
    pub resamples: usize,
    pub seed: u64,
}

impl Default for BootstrapSettings {
    fn default() -> Self {
        BootstrapSettings {
            resamples: DEFAULT_RESAMPLES,
            seed: DEFAULT_SEED,
        }
    }
}

/// A percentile bootstrap interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BootstrapInterval {
    /// The statistic of the data.
    pub estimate: f64,
    pub low: f64,
    pub high: f64,
}

/// Percentile bootstrap interval at confidence `level` for `statistic` of `values`.
pub fn bootstrap_interval(
    values: &[f64],
    statistic: BootstrapStatistic,
    level: f64,
    settings: BootstrapSettings,
) -> Result<BootstrapInterval, StatError> {
    ensure_finite(values)?;
    ensure_count(values.len(), 2)?;
    ensure_level(level)?;
    ensure_count(settings.resamples, 1)?;
    let mut replicates = replicates(values, statistic, settings)?;
    replicates.sort_by(f64::total_cmp);
    let tail = (1.0 - level) / 2.0;
    let estimate = statistic_of(&mut values.to_vec(), statistic)?;
    Ok(BootstrapInterval {
        estimate,
        low: quantile_sorted(&replicates, tail)?,
        high: quantile_sorted(&replicates, 1.0 - tail)?,
    })
}

/// The statistic of each of `settings.resamples` resamples of `values` (non-empty), in draw
/// order: resample `r` takes its `n` indices as the next `n` draws of `below(n)` from the
/// generator seeded with `settings.seed`.
pub(crate) fn replicates(
    values: &[f64],
    statistic: BootstrapStatistic,
    settings: BootstrapSettings,
) -> Result<Vec<f64>, StatError> {
    let n = values.len();
    let mut rng = Xoshiro256StarStar::seed_from(settings.seed);
    let mut resample = vec![0.0; n];
    let mut replicates = Vec::with_capacity(settings.resamples);
    for _ in 0..settings.resamples {
        for slot in resample.iter_mut() {
            // below(n) < n, so the index is in range.
            *slot = values[rng.below(n as u64) as usize];
        }
        replicates.push(statistic_of(&mut resample, statistic)?);
    }
    Ok(replicates)
}

/// Percentile bootstrap interval for the mean with the default seed and resample count.
pub fn bootstrap_mean(values: &[f64], level: f64) -> Result<BootstrapInterval, StatError> {
    bootstrap_interval(
        values,
        BootstrapStatistic::Mean,
        level,
        BootstrapSettings::default(),
    )
}

/// Percentile bootstrap interval for the median with the default seed and resample count.
pub fn bootstrap_median(values: &[f64], level: f64) -> Result<BootstrapInterval, StatError> {
    bootstrap_interval(
        values,
        BootstrapStatistic::Median,
        level,
        BootstrapSettings::default(),
    )
}

/// The statistic of a non-empty sample (which may be reordered).
pub(crate) fn statistic_of(
    sample: &mut [f64],
    statistic: BootstrapStatistic,
) -> Result<f64, StatError> {
    match statistic {
        BootstrapStatistic::Mean => Ok(accurate_mean(sample)),
        BootstrapStatistic::Median => {
            sample.sort_by(f64::total_cmp);
            quantile_sorted(sample, 0.5)
        }
    }
}
