//! The Wilson score interval for a proportion (Wilson 1927, "Probable inference, the law of
//! succession, and statistical inference", JASA 22: 209–212).
//!
//! Definition: with `k` successes in `n` trials, `p̂ = k/n` and `z = z(1 − (1 − L)/2)` the
//! normal quantile, the interval is the set of `p` with `|p̂ − p| ≤ z·√(p(1 − p)/n)`: the roots
//! of `(n + z²)p² − (2k + z²)p + k²/n = 0`,
//! `(2k + z² ± z·√(z² + 4k(n − k)/n)) / (2(n + z²))`
//! (equivalently centre `(p̂ + z²/2n)/(1 + z²/n)`, half-width
//! `z/(1 + z²/n) · √(p̂(1 − p̂)/n + z²/4n²)`).
//!
//! Guarantees:
//! - Computed without cancellation: the upper root by the formula with `+` (every term is
//!   non-negative), the lower root as `(k²/n) / ((n + z²) · upper)` (the product of the roots).
//!   So `k = 0` gives exactly 0 as the lower limit; `k = n` gives exactly 1 as the upper.
//! - Degenerate cases: `n = 0` is an error (`TooFewValues`), `k > n` is an error.
//! - Checked against `statsmodels.stats.proportion.proportion_confint(method="wilson")`.

use super::error::StatError;
use super::interval::two_sided_z;

/// A proportion with its Wilson score interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProportionInterval {
    pub successes: u64,
    pub trials: u64,
    /// `successes / trials`.
    pub proportion: f64,
    pub low: f64,
    pub high: f64,
}

/// The level-`L` Wilson score interval for `successes` out of `trials`.
pub fn wilson_interval(
    successes: u64,
    trials: u64,
    level: f64,
) -> Result<ProportionInterval, StatError> {
    if trials == 0 {
        return Err(StatError::TooFewValues {
            needed: 1,
            found: 0,
        });
    }
    if successes > trials {
        return Err(StatError::SuccessesExceedTrials { successes, trials });
    }
    let z = two_sided_z(level)?;
    let (n, k, z2) = (trials as f64, successes as f64, z * z);
    // The larger root has no cancellation: every term is non-negative.
    let upper = (2.0 * k + z2 + z * (z2 + 4.0 * k * (n - k) / n).sqrt()) / (2.0 * (n + z2));
    // The smaller root from the product of the roots, k²/(n(n + z²)).
    let lower = (k / n) * k / ((n + z2) * upper);
    Ok(ProportionInterval {
        successes,
        trials,
        proportion: successes as f64 / n,
        low: lower,
        // Exactly 1 when every trial succeeded (the formula gives 1 up to rounding).
        high: if successes == trials {
            1.0
        } else {
            upper.min(1.0)
        },
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: the definition's degenerate cases and its symmetry in successes and failures
    // (Wilson 1927: the interval for failures is one minus the interval for successes).
    #[test]
    fn wilson_edges_and_symmetry() {
        assert_eq!(
            wilson_interval(0, 0, 0.95),
            Err(StatError::TooFewValues {
                needed: 1,
                found: 0
            })
        );
        assert_eq!(
            wilson_interval(3, 2, 0.95),
            Err(StatError::SuccessesExceedTrials {
                successes: 3,
                trials: 2
            })
        );
        assert_eq!(
            wilson_interval(1, 2, 0.0),
            Err(StatError::InvalidLevel(0.0))
        );
        let none = wilson_interval(0, 40, 0.95).unwrap();
        let all = wilson_interval(40, 40, 0.95).unwrap();
        assert_eq!((none.low, all.high), (0.0, 1.0));
        assert!((none.high - (1.0 - all.low)).abs() < 1e-15);
        for k in 0..=17 {
            let a = wilson_interval(k, 17, 0.9).unwrap();
            let b = wilson_interval(17 - k, 17, 0.9).unwrap();
            assert!((a.low - (1.0 - b.high)).abs() < 1e-15, "{k}");
            assert!(a.low <= a.proportion && a.proportion <= a.high, "{k}");
        }
    }
}
