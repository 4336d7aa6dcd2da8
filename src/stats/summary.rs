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

/// Two-pass mean with a correction term. Caller guarantees at least one finite value. When the
/// sums overflow (values near the largest double), the mean of the values scaled by 2^-64
/// (exact) is scaled back, so every mean of finite values is finite.
pub(crate) fn accurate_mean(values: &[f64]) -> f64 {
    let mean = two_pass_mean(values.iter().copied(), values.len());
    if mean.is_finite() {
        return mean;
    }
    let scaled = two_pass_mean(values.iter().map(|&v| v * OVERFLOW_SCALE), values.len());
    scaled / OVERFLOW_SCALE
}

/// A power of two small enough that sums of a few billion scaled doubles stay finite.
const OVERFLOW_SCALE: f64 = 5.421010862427522e-20; // 2^-64

fn two_pass_mean(values: impl Iterator<Item = f64> + Clone, n: usize) -> f64 {
    let n = n as f64;
    let first = accurate_sum(values.clone()) / n;
    let correction = accurate_sum(values.map(|v| v - first)) / n;
    first + correction
}

/// Sum of squared deviations from `mean` by the corrected two-pass formula, never negative;
/// infinite when the squares overflow.
pub(crate) fn squared_deviations(values: &[f64], mean: f64) -> f64 {
    let n = values.len() as f64;
    let sum_d = accurate_sum(values.iter().map(|&v| v - mean));
    let sum_d2 = accurate_sum(values.iter().map(|&v| (v - mean) * (v - mean)));
    let ssd = sum_d2 - sum_d * sum_d / n;
    if ssd.is_nan() {
        f64::INFINITY
    } else {
        ssd.max(0.0)
    }
}

/// Sample sd about a given (accurate) mean. Caller guarantees at least two values. When the
/// squares overflow (deviations beyond about 1e154), the sd of the values scaled by 2^-600
/// (exact for such magnitudes) is scaled back; it is infinite only when the sd itself is
/// beyond the largest double.
pub(crate) fn sd_about(values: &[f64], mean: f64) -> f64 {
    let df = values.len() as f64 - 1.0;
    let sd = (squared_deviations(values, mean) / df).sqrt();
    if sd.is_finite() {
        return sd;
    }
    let scaled: Vec<f64> = values.iter().map(|&v| v * SPREAD_SCALE).collect();
    (squared_deviations(&scaled, mean * SPREAD_SCALE) / df).sqrt() / SPREAD_SCALE
}

/// 2^-600: brings deviations up to 2^1025 down to 2^425, whose squares are finite.
const SPREAD_SCALE: f64 = 2.409919865102884e-181;
