//! Confidence intervals for a difference of means: Welch's interval for two independent groups
//! and the paired t interval for two measurements of the same subjects.
//!
//! Definitions:
//! - Welch (1947, "The generalization of 'Student's' problem when several different population
//!   variances are involved", Biometrika 34: 28–35) with the Welch–Satterthwaite degrees of
//!   freedom (Satterthwaite 1946): for groups `a` and `b` with means `ā`, `b̄`, sample variances
//!   `s²_a`, `s²_b` and sizes `n_a`, `n_b`, the difference is `ā − b̄`, its standard error
//!   `se = √(s²_a/n_a + s²_b/n_b)`, `ν = se⁴ / ((s²_a/n_a)²/(n_a − 1) + (s²_b/n_b)²/(n_b − 1))`
//!   and the interval `ā − b̄ ± t(1 − (1 − L)/2, ν) · se` (`ν` need not be whole).
//! - Paired (Student 1908, "The probable error of a mean", Biometrika 6: 1–25): with
//!   `dᵢ = aᵢ − bᵢ` for each subject, the mean difference `d̄ ± t(1 − (1 − L)/2, n − 1) · s_d/√n`,
//!   the t interval of [`super::interval`] on the differences.
//! - Both report `t = estimate / se`, the statistic of the matching test.
//!
//! Degenerate cases: each group (or the pairs) needs two values (`TooFewValues`); paired inputs
//! must have the same length (`LengthMismatch`); when the standard error is 0 (no spread in
//! either group, or equal differences) the interval has zero width, `t` is `None`, and Welch's
//! `ν` is undefined, reported as `NoSpread`.
//!
//! Checked against `scipy.stats.ttest_ind(equal_var=False)` and `ttest_rel`
//! (`.confidence_interval(L)`) and Student's published sleep data.

use super::error::{ensure_level, StatError};
use super::interval::{mean_interval, two_sided_t, Spread};
use super::summary::moments;

/// A difference of means with its interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DifferenceInterval {
    /// `ā − b̄` (Welch) or the mean of `aᵢ − bᵢ` (paired).
    pub estimate: f64,
    pub se: f64,
    /// Degrees of freedom of the t quantile.
    pub df: f64,
    pub low: f64,
    pub high: f64,
    /// `estimate / se`; `None` when `se` is 0.
    pub t: Option<f64>,
}

impl DifferenceInterval {
    fn new(estimate: f64, se: f64, df: f64, half_width: f64) -> Self {
        DifferenceInterval {
            estimate,
            se,
            df,
            low: estimate - half_width,
            high: estimate + half_width,
            t: (se > 0.0).then(|| estimate / se),
        }
    }
}

/// Welch's level-`L` interval for `mean(a) − mean(b)`.
pub fn welch_interval(a: &[f64], b: &[f64], level: f64) -> Result<DifferenceInterval, StatError> {
    ensure_level(level)?;
    let (ma, mb) = (moments(a)?, moments(b)?);
    let variance_of_mean = |m: &super::summary::Moments| -> Result<f64, StatError> {
        let sd = m.sd.ok_or(StatError::TooFewValues {
            needed: 2,
            found: m.n,
        })?;
        Ok(sd * sd / m.n as f64)
    };
    let (va, vb) = (variance_of_mean(&ma)?, variance_of_mean(&mb)?);
    let variance = va + vb;
    if variance <= 0.0 {
        return Err(StatError::NoSpread);
    }
    let df = variance * variance / (va * va / (ma.n as f64 - 1.0) + vb * vb / (mb.n as f64 - 1.0));
    let se = variance.sqrt();
    let half_width = two_sided_t(level, df)? * se;
    Ok(DifferenceInterval::new(
        ma.mean - mb.mean,
        se,
        df,
        half_width,
    ))
}

/// The paired level-`L` t interval for the mean of `aᵢ − bᵢ`.
pub fn paired_interval(a: &[f64], b: &[f64], level: f64) -> Result<DifferenceInterval, StatError> {
    if a.len() != b.len() {
        return Err(StatError::LengthMismatch {
            left: a.len(),
            right: b.len(),
        });
    }
    let differences: Vec<f64> = a.iter().zip(b).map(|(x, y)| x - y).collect();
    let interval = mean_interval(&differences, Spread::Ci { level })?;
    let se = mean_interval(&differences, Spread::Se)?.half_width;
    Ok(DifferenceInterval::new(
        interval.mean,
        se,
        (interval.n - 1) as f64,
        interval.half_width,
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: hand derivation. Groups 1, 2, 3 and 4, 6, 8: variances of the means 1/3 and
    // 4/3, se = √(5/3), ν = (5/3)² / ((1/3)²/2 + (4/3)²/2) = (25/9) / (17/18) = 50/17.
    #[test]
    fn welch_by_hand() {
        let got = welch_interval(&[1.0, 2.0, 3.0], &[4.0, 6.0, 8.0], 0.95).unwrap();
        assert_eq!(got.estimate, -4.0);
        assert!((got.se - (5.0f64 / 3.0).sqrt()).abs() < 1e-15);
        assert!((got.df - 50.0 / 17.0).abs() < 1e-14);
        let t = crate::stats::t_quantile(0.975, 50.0 / 17.0).unwrap();
        assert!((got.high - (-4.0 + t * got.se)).abs() < 1e-13);
    }

    #[test]
    fn difference_degenerate_inputs() {
        assert_eq!(
            welch_interval(&[1.0, 1.0], &[2.0, 2.0, 2.0], 0.95),
            Err(StatError::NoSpread)
        );
        // One group without spread: ν is the other group's n − 1.
        let one_flat = welch_interval(&[1.0, 1.0], &[2.0, 3.0, 4.0], 0.95).unwrap();
        assert!((one_flat.df - 2.0).abs() < 1e-15);
        assert_eq!(
            welch_interval(&[1.0], &[2.0, 3.0], 0.95),
            Err(StatError::TooFewValues {
                needed: 2,
                found: 1
            })
        );
        assert_eq!(
            paired_interval(&[1.0, 2.0], &[1.0], 0.95),
            Err(StatError::LengthMismatch { left: 2, right: 1 })
        );
        // Equal differences: a zero-width interval and no t.
        let same = paired_interval(&[3.0, 4.0, 5.0], &[1.0, 2.0, 3.0], 0.9).unwrap();
        assert_eq!(
            (same.estimate, same.low, same.high, same.t),
            (2.0, 2.0, 2.0, None)
        );
        assert_eq!(
            paired_interval(&[1.0, 2.0], &[0.0, 0.0], 0.0),
            Err(StatError::InvalidLevel(0.0))
        );
    }
}
