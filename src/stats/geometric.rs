//! The geometric mean and its intervals, computed on the logs and back-transformed.
//!
//! Definition (Kirkwood 1979, "Geometric means and measures of dispersion", Biometrics 35:
//! 908–909, cited from memory; the usual treatment of log-normal data):
//! - With `lᵢ = ln xᵢ`, the geometric mean is `exp(l̄)`, `l̄` the mean of the logs
//!   ([`super::summary`], compensated).
//! - An interval of kind `sd`, `se` or `ci(L)` is the interval of that kind around `l̄` on the
//!   logs ([`super::interval`]: `l̄ ± s_l`, `l̄ ± s_l/√n`, `l̄ ± t(1 − (1 − L)/2, n − 1) · s_l/√n`)
//!   with both ends exponentiated, so it is asymmetric around the geometric mean: `gm ÷ f` to
//!   `gm × f`, with `f = exp(half-width on the logs)`.
//! - Degenerate cases: every value must be positive (`NotPositive` otherwise, a logarithm
//!   is needed); the geometric mean needs one value, an interval two; equal values give an
//!   interval of zero width.
//! - Checked against `scipy.stats.gmean` and a t interval on `numpy.log` (differential tests).

use super::error::{ensure_finite, StatError};
use super::interval::{mean_interval, Spread};
use super::summary::mean;

/// A geometric mean with an interval back-transformed from the logs.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GeometricMean {
    pub n: usize,
    /// `exp(mean of ln x)`.
    pub mean: f64,
    pub low: f64,
    pub high: f64,
    /// The interval's half-width on the logs; the interval is `mean ÷ e^h` to `mean × e^h`.
    pub log_half_width: f64,
}

/// The natural logarithms of positive finite values; `NotPositive` if any is zero or below.
pub fn natural_logs(values: &[f64]) -> Result<Vec<f64>, StatError> {
    ensure_finite(values)?;
    if values.iter().any(|&v| v <= 0.0) {
        return Err(StatError::NotPositive);
    }
    Ok(values.iter().map(|v| v.ln()).collect())
}

/// The geometric mean of positive values; needs one value.
pub fn geometric_mean(values: &[f64]) -> Result<f64, StatError> {
    Ok(mean(&natural_logs(values)?)?.exp())
}

/// The geometric mean of positive values with an interval of kind `spread` computed on the logs
/// and exponentiated; needs two values.
pub fn geometric_mean_interval(values: &[f64], spread: Spread) -> Result<GeometricMean, StatError> {
    let on_logs = mean_interval(&natural_logs(values)?, spread)?;
    Ok(GeometricMean {
        n: on_logs.n,
        mean: on_logs.mean.exp(),
        low: on_logs.low.exp(),
        high: on_logs.high.exp(),
        log_half_width: on_logs.half_width,
    })
}
