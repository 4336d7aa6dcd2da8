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
//! - [`density`]: Gaussian kernel density estimates, optionally reflected at zero.
//! - [`regression`]: least squares line, its coefficients' standard errors and intervals, the
//!   mean-response and prediction bands; the same fit on logs (a power law).
//! - [`bootstrap`]: percentile bootstrap intervals for a mean or median.
//! - [`bca`]: bias-corrected and accelerated bootstrap intervals (same resamples).
//! - [`proportion`]: Wilson score interval for a proportion.
//! - [`geometric`]: geometric mean with intervals computed on the logs.
//! - [`median_interval`]: order-statistic (binomial) confidence interval for the median.
//! - [`notch`]: McGill–Tukey–Larsen box plot notches.
//! - [`difference`]: Welch's interval for a difference of means; the paired t interval.
//! - [`lowess`]: LOWESS smoother with robustness iterations.
//! - [`ecdf`]: empirical distribution function steps.
//! - [`dotplot`]: Wilkinson dot plot stacks and a deterministic swarm.
//! - [`random`]: SplitMix64 and xoshiro256**, identical on every platform.
//! - [`jitter`]: deterministic jitter offsets.
//! - [`error`]: [`StatError`], why a statistic is undefined.

pub mod bca;
pub mod bootstrap;
pub mod boxplot;
pub mod density;
pub mod difference;
pub mod dotplot;
pub mod ecdf;
pub mod error;
pub mod geometric;
pub mod histogram;
pub mod interval;
pub mod jitter;
pub mod lowess;
pub mod median_interval;
pub mod notch;
pub mod proportion;
pub mod quantile;
pub mod random;
pub mod regression;
pub mod steps;
pub mod summary;
pub mod within;

pub use bca::{bca_interval, BcaInterval};
pub use bootstrap::{
    bootstrap_interval, bootstrap_mean, bootstrap_median, BootstrapInterval, BootstrapSettings,
    BootstrapStatistic,
};
pub use boxplot::{box_summary, BoxSummary, Whiskers};
pub use density::{
    bandwidth, kde, kde_bounded, kernel_density, kernel_density_bounded, BandwidthRule, Boundary,
    DensityCurve, DensityGrid,
};
pub use difference::{paired_interval, welch_interval, DifferenceInterval};
pub use dotplot::{dot_stacks, swarm_offsets, StackedDot};
pub use ecdf::{ecdf, Ecdf};
pub use error::StatError;
pub use geometric::{geometric_mean, geometric_mean_interval, GeometricMean};
pub use histogram::{bin_of, bins_covering, count_in_bins, histogram, BinRule, Histogram};
pub use interval::{
    mean_ci, mean_interval, normal_cdf, normal_quantile, t_quantile, MeanInterval, Spread,
};
pub use jitter::jitter_offset;
pub use lowess::{lowess, Lowess, ROBUSTNESS_ITERATIONS};
pub use median_interval::{median_interval, median_ranks, MedianInterval};
pub use notch::{notch, Notch, NOTCH_FACTOR};
pub use proportion::{wilson_interval, ProportionInterval};
pub use quantile::{
    level_median, level_quantile, ordinal_quantile, ordinal_quartiles, quantile_sorted, quartiles,
    quartiles_sorted, sorted_values, OrdinalQuartiles, Quartiles,
};
pub use regression::{
    linear_fit, log_log_fit, BandKind, BandPoint, Coefficient, FitInference, LinearFit,
};
pub use steps::{nice_ticks, readable_step, ReadableStep, StepRounding, Ticks};
pub use summary::{mean, moments, sample_sd, standard_error, Moments};
pub use within::{within_subject_intervals, WithinIntervals};

#[cfg(test)]
mod tests;
