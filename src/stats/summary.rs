//! Mean, sample standard deviation and standard error, computed accurately.
//!
//! Guarantees:
//! - Sums use Neumaier's compensated summation, so the order and magnitude of values cost
//!   almost no precision.
//! - The mean is computed in two passes: a first estimate, then the mean of the deviations from
//!   it is added back (a correction term), which removes the rounding error of the first pass.
//! - The sum of squared deviations uses the corrected two-pass formula
//!   `Σd² − (Σd)²/n` with `d = x − mean` (Chan, Golub & LeVeque 1983), which stays accurate when
//!   all values share a large constant offset (NIST StRD SmLs07–09 are the check).
//! - `sd` uses the `n − 1` denominator and is undefined (an error) for fewer than two values;
//!   `se = sd / √n`.

use super::error::{ensure_count, ensure_finite, StatError};

/// Count, mean and sample standard deviation of one group of values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Moments {
    pub n: usize,
    pub mean: f64,
    /// Sample standard deviation (`n − 1` denominator); `None` when `n < 2`.
    pub sd: Option<f64>,
}

impl Moments {
    /// Standard error of the mean, `sd / √n`; `None` when `n < 2`.
    pub fn se(&self) -> Option<f64> {
        self.sd.map(|sd| sd / (self.n as f64).sqrt())
    }
}

/// Count, mean and sd of `values`; an error for no values or a non-finite value.
pub fn moments(values: &[f64]) -> Result<Moments, StatError> {
    ensure_finite(values)?;
    ensure_count(values.len(), 1)?;
    let mean = accurate_mean(values);
    let sd = if values.len() >= 2 {
        Some(sd_about(values, mean))
    } else {
        None
    };
    Ok(Moments {
        n: values.len(),
        mean,
        sd,
    })
}

/// Arithmetic mean; an error for no values or a non-finite value.
pub fn mean(values: &[f64]) -> Result<f64, StatError> {
    ensure_finite(values)?;
    ensure_count(values.len(), 1)?;
    Ok(accurate_mean(values))
}

/// Sample standard deviation (`n − 1` denominator); an error for fewer than two values.
pub fn sample_sd(values: &[f64]) -> Result<f64, StatError> {
    ensure_finite(values)?;
    ensure_count(values.len(), 2)?;
    Ok(sd_about(values, accurate_mean(values)))
}

/// Standard error of the mean, `sd / √n`; an error for fewer than two values.
pub fn standard_error(values: &[f64]) -> Result<f64, StatError> {
    let sd = sample_sd(values)?;
    Ok(sd / (values.len() as f64).sqrt())
}

/// Compensated (Neumaier) sum of an iterator of finite values.
pub(crate) fn accurate_sum(values: impl IntoIterator<Item = f64>) -> f64 {
    let mut sum = 0.0_f64;
    let mut compensation = 0.0_f64;
    for v in values {
        let t = sum + v;
        if sum.abs() >= v.abs() {
            compensation += (sum - t) + v;
        } else {
            compensation += (v - t) + sum;
        }
        sum = t;
    }
    sum + compensation
}

/// Two-pass mean with a correction term. Caller guarantees at least one finite value.
pub(crate) fn accurate_mean(values: &[f64]) -> f64 {
    let n = values.len() as f64;
    let first = accurate_sum(values.iter().copied()) / n;
    let correction = accurate_sum(values.iter().map(|&v| v - first)) / n;
    first + correction
}

/// Sum of squared deviations from `mean` by the corrected two-pass formula, never negative.
pub(crate) fn squared_deviations(values: &[f64], mean: f64) -> f64 {
    let n = values.len() as f64;
    let sum_d = accurate_sum(values.iter().map(|&v| v - mean));
    let sum_d2 = accurate_sum(values.iter().map(|&v| (v - mean) * (v - mean)));
    (sum_d2 - sum_d * sum_d / n).max(0.0)
}

/// Sample sd about a given (accurate) mean. Caller guarantees at least two values.
pub(crate) fn sd_about(values: &[f64], mean: f64) -> f64 {
    (squared_deviations(values, mean) / (values.len() as f64 - 1.0)).sqrt()
}
