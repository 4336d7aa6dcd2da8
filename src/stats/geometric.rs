//! The geometric mean and its intervals, computed on the logs and back-transformed.
//!
//! Definition (Kirkwood 1979, "Geometric means and measures of dispersion", Biometrics 35:
//! 908–909, cited from memory; the usual treatment of log-normal data):
//! - With `lᵢ = ln xᵢ`, the geometric mean is `exp(l̄)`, `l̄` the mean of the logs
//!   ([`super::summary`], compensated). It is computed as `c · exp(mean of (ln xᵢ − ln c))`
//!   with `c` the first value, the same number, so that equal values give back exactly their
//!   value.
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
    let (reference, logs) = relative_logs(values)?;
    Ok(reference * mean(&logs)?.exp())
}

/// The geometric mean of positive values with an interval of kind `spread` computed on the logs
/// and exponentiated; needs two values.
pub fn geometric_mean_interval(values: &[f64], spread: Spread) -> Result<GeometricMean, StatError> {
    let (reference, logs) = relative_logs(values)?;
    let on_logs = mean_interval(&logs, spread)?;
    Ok(GeometricMean {
        n: on_logs.n,
        mean: reference * on_logs.mean.exp(),
        low: reference * on_logs.low.exp(),
        high: reference * on_logs.high.exp(),
        log_half_width: on_logs.half_width,
    })
}

/// A reference value `c` (the first value) and `ln xᵢ − ln c`: the geometric mean is
/// `c · exp(mean)`, the same number as `exp(mean of ln xᵢ)`, but equal values give back exactly
/// their value (the differences are all 0).
fn relative_logs(values: &[f64]) -> Result<(f64, Vec<f64>), StatError> {
    let logs = natural_logs(values)?;
    let (reference, log_reference) = match (values.first(), logs.first()) {
        (Some(&c), Some(&l)) => (c, l),
        _ => (1.0, 0.0),
    };
    Ok((reference, logs.iter().map(|l| l - log_reference).collect()))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: hand derivation: the logs of 1, 10, 100 are 0, ln 10, 2 ln 10, mean ln 10 and
    // sd ln 10, so the geometric mean is 10 and the sd interval 1 to 100.
    #[test]
    fn geometric_mean_by_hand() {
        let values = [1.0, 10.0, 100.0];
        assert!((geometric_mean(&values).unwrap() - 10.0).abs() < 1e-13);
        let sd = geometric_mean_interval(&values, Spread::Sd).unwrap();
        assert!((sd.low - 1.0).abs() < 1e-13 && (sd.high - 100.0).abs() < 1e-12);
        assert!((sd.log_half_width - 10f64.ln()).abs() < 1e-15);
        let equal = geometric_mean_interval(&[2.0, 2.0], Spread::Ci { level: 0.95 }).unwrap();
        assert_eq!((equal.low, equal.mean, equal.high), (2.0, 2.0, 2.0));
    }

    #[test]
    fn geometric_mean_degenerate_inputs() {
        assert_eq!(geometric_mean(&[1.0, 0.0]), Err(StatError::NotPositive));
        assert_eq!(geometric_mean(&[-1.0]), Err(StatError::NotPositive));
        assert_eq!(
            geometric_mean(&[]),
            Err(StatError::TooFewValues {
                needed: 1,
                found: 0
            })
        );
        assert_eq!(geometric_mean(&[f64::NAN]), Err(StatError::NonFiniteValue));
        assert_eq!(geometric_mean(&[5.0]), Ok(5.0));
        assert_eq!(
            geometric_mean_interval(&[5.0], Spread::Se),
            Err(StatError::TooFewValues {
                needed: 2,
                found: 1
            })
        );
    }
}
