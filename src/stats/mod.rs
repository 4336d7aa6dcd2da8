//! The numeric core: statistics as pure functions over `&[f64]` and small input structs.
//!
//! Invariant: this module does no I/O and knows nothing about specs, codebooks or tables. The
//! `stats` stage above it picks the values of each group (missing values already dropped and
//! counted) and calls these functions; they return small result structs, or a [`StatError`]
//! when a statistic is undefined for the input (no values, an sd of one value, no spread).
//! Nothing here panics on any input, and every result is deterministic: the same input gives
//! the same bits on every platform (randomness comes only from the fixed-seed generator in
//! [`random`]).
//!
//! Code map (definitions follow language.md §5; each file's doc names its sources):
//! - [`summary`]: mean, sd (`n − 1`), se, computed with compensated two-pass sums.
//! - [`quantile`]: Hyndman & Fan definition 7 on numbers, definition 1 on ordinal levels.
//! - [`interval`]: Student's t quantiles; `sd`, `se` and `ci(L)` intervals around a mean.
//! - [`within`]: Cousineau–Morey within-subject intervals.
//! - [`boxplot`]: Tukey's box (quartiles, whiskers, outliers).
//! - [`steps`]: readable steps (1, 2, 2.5, 5 × 10^k) and round axis ticks.
//! - [`histogram`]: bin widths by rule, edges at multiples of the width, counts.
//! - [`density`]: Gaussian kernel density estimates.
//! - [`regression`]: least squares line and its confidence band.
//! - [`bootstrap`]: percentile bootstrap intervals for a mean or median.
//! - [`random`]: SplitMix64 and xoshiro256**, identical on every platform.
//! - [`jitter`]: deterministic jitter offsets.
//! - [`error`]: [`StatError`], why a statistic is undefined.

pub mod bootstrap;
pub mod boxplot;
pub mod density;
pub mod error;
pub mod histogram;
pub mod interval;
pub mod jitter;
pub mod quantile;
pub mod random;
pub mod regression;
pub mod steps;
pub mod summary;
pub mod within;

pub use bootstrap::{
    bootstrap_interval, bootstrap_mean, bootstrap_median, BootstrapInterval, BootstrapSettings,
    BootstrapStatistic,
};
pub use boxplot::{box_summary, BoxSummary, Whiskers};
pub use density::{bandwidth, kde, kernel_density, BandwidthRule, DensityCurve, DensityGrid};
pub use error::StatError;
pub use histogram::{count_in_bins, histogram, BinRule, Histogram};
pub use interval::{mean_ci, mean_interval, t_quantile, MeanInterval, Spread};
pub use jitter::jitter_offset;
pub use quantile::{
    ordinal_quantile, ordinal_quartiles, quantile_sorted, quartiles, quartiles_sorted,
    sorted_values, OrdinalQuartiles, Quartiles,
};
pub use regression::{linear_fit, BandPoint, LinearFit};
pub use steps::{nice_ticks, readable_step, ReadableStep, StepRounding, Ticks};
pub use summary::{mean, moments, sample_sd, standard_error, Moments};
pub use within::{within_subject_intervals, WithinIntervals};

#[cfg(test)]
mod tests;
