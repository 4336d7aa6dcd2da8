//! A distribution-free confidence interval for the median from order statistics (Conover 1999,
//! *Practical Nonparametric Statistics*, 3rd ed., the confidence interval for a quantile with
//! p = 1/2 beside the quantile test; section cited from memory).
//!
//! Definition: for sorted values `x₍₁₎ ≤ … ≤ x₍ₙ₎` of a continuous variable, the interval
//! `[x₍ₗ₎, x₍ᵤ₎]` with symmetric ranks `u = n + 1 − l` covers the population median with
//! probability `C(l) = P(l ≤ B ≤ n − l) = 1 − 2·P(B ≤ l − 1)`, `B ~ Binomial(n, 1/2)`, whatever
//! the distribution. The rule used here: the **largest** `l` (the shortest interval of this
//! symmetric form) with `C(l) ≥ L`; the achieved coverage `C(l)` is returned beside it, since it
//! is usually above `L` (the binomial is discrete).
//!
//! Guarantees:
//! - `P(B ≤ l − 1)` is summed exactly from integer binomial coefficients up to `n = 120`
//!   (so a level that the coverage equals exactly, such as 0.5, is decided right), and is the
//!   regularised incomplete beta function `I_{1/2}(n − l + 1, l)` (`statrs`) beyond; the
//!   ranks agree with `scipy.stats.binom.cdf` (differential tests).
//! - The median reported is Hyndman & Fan definition 7 (the mean of the two middle values for
//!   even `n`), as elsewhere; it lies in the interval.
//! - Degenerate cases: the widest interval `[x₍₁₎, x₍ₙ₎]` covers with `1 − 2^(1−n)`; when that is
//!   below `L` no interval reaches the level and the error says how many values are needed
//!   (`TooFewValues`; 6 for 95%). With ties the interval still has the stated ranks; its
//!   coverage is then at least `C(l)` (common practice).

use statrs::function::beta::checked_beta_reg;

use super::error::{ensure_level, StatError};
use super::quantile::{quantile_sorted, sorted_values};

/// The median with an order-statistic confidence interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MedianInterval {
    pub n: usize,
    /// The median (definition 7).
    pub median: f64,
    /// `x₍ₗ₎`.
    pub low: f64,
    /// `x₍ᵤ₎`.
    pub high: f64,
    /// The 1-based rank `l` of the lower end.
    pub lower_rank: usize,
    /// The 1-based rank `u = n + 1 − l` of the upper end.
    pub upper_rank: usize,
    /// The achieved coverage `1 − 2·P(B ≤ l − 1)`, at least the level asked for.
    pub coverage: f64,
}

/// The level-`L` order-statistic confidence interval for the median of `values`.
pub fn median_interval(values: &[f64], level: f64) -> Result<MedianInterval, StatError> {
    ensure_level(level)?;
    let sorted = sorted_values(values)?;
    let n = sorted.len();
    let (lower_rank, coverage) = median_ranks(n, level)?;
    let upper_rank = n + 1 - lower_rank;
    Ok(MedianInterval {
        n,
        median: quantile_sorted(&sorted, 0.5)?,
        low: sorted[lower_rank - 1],
        high: sorted[upper_rank - 1],
        lower_rank,
        upper_rank,
        coverage,
    })
}

/// The largest lower rank `l` whose symmetric interval covers the median of `n` values with
/// probability at least `level`, and that probability.
pub fn median_ranks(n: usize, level: f64) -> Result<(usize, f64), StatError> {
    ensure_level(level)?;
    let too_few = || StatError::TooFewValues {
        needed: values_needed(level),
        found: n,
    };
    if n == 0 {
        return Err(too_few());
    }
    let widest = coverage(n, 1)?;
    if widest < level {
        return Err(too_few());
    }
    // C(l) decreases in l; C(1) ≥ level. Find the largest l in [1, ⌈n/2⌉] with C(l) ≥ level.
    let (mut good, mut bad) = (1, n.div_ceil(2) + 1);
    while bad - good > 1 {
        let middle = good + (bad - good) / 2;
        if coverage(n, middle)? >= level {
            good = middle;
        } else {
            bad = middle;
        }
    }
    Ok((good, coverage(n, good)?))
}

/// `C(l) = 1 − 2·P(B ≤ l − 1)` for `B ~ Binomial(n, 1/2)`, `1 ≤ l ≤ ⌈n/2⌉`.
fn coverage(n: usize, l: usize) -> Result<f64, StatError> {
    if n <= EXACT_BINOMIAL_MAX_N {
        // 2^n·C(l) = 2^n − 2·Σ_{i<l} C(n, i), an exact integer; one rounding to a double.
        let tail: u128 = binomial_coefficients(n).take(l).sum();
        let inside = (1_u128 << n) - 2 * tail;
        return Ok(inside as f64 * 2f64.powi(-(n as i32)));
    }
    let tail = checked_beta_reg((n - l + 1) as f64, l as f64, 0.5).map_err(|_| {
        StatError::TooFewValues {
            needed: 1,
            found: n,
        }
    })?;
    Ok(1.0 - 2.0 * tail)
}

/// Up to this `n` the binomial coefficients and their sums are exact in `u128`, so the
/// coverage is exact before its one rounding (ties with a level such as 0.5 decide right).
const EXACT_BINOMIAL_MAX_N: usize = 120;

/// `C(n, 0), C(n, 1), …, C(n, n)` as exact integers (`n ≤ 120`).
fn binomial_coefficients(n: usize) -> impl Iterator<Item = u128> {
    let n = n as u128;
    (0..=n).scan(1_u128, move |c, i| {
        let current = *c;
        // C(n, i + 1) = C(n, i)·(n − i)/(i + 1), exact; below 2^127 for n ≤ 120.
        *c = if i < n { *c * (n - i) / (i + 1) } else { 0 };
        Some(current)
    })
}

/// The smallest `n` with `1 − 2^(1−n) ≥ level`.
fn values_needed(level: f64) -> usize {
    let mut n = 1;
    // 2^(1−n) reaches 1 − level < 1 before n passes 1100 for any level below 1.
    while 1.0 - 2f64.powi(1 - n as i32) < level && n < 1100 {
        n += 1;
    }
    n
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: hand derivation from the binomial: the widest interval covers with
    // 1 − 2^(1−n); for n = 6 that is 0.96875 ≥ 0.95 with l = 1; ties keep their ranks.
    #[test]
    fn median_interval_edges() {
        let got = median_interval(&[3.0, 1.0, 2.0, 2.0, 5.0, 4.0], 0.95).unwrap();
        assert_eq!((got.lower_rank, got.upper_rank), (1, 6));
        assert_eq!((got.low, got.high, got.coverage), (1.0, 5.0, 0.96875));
        assert_eq!(median_ranks(2, 0.5), Ok((1, 0.5)));
        assert_eq!(
            median_ranks(1, 0.5),
            Err(StatError::TooFewValues {
                needed: 2,
                found: 1
            })
        );
        assert_eq!(
            median_ranks(0, 0.9),
            Err(StatError::TooFewValues {
                needed: 5,
                found: 0
            })
        );
        assert_eq!(median_ranks(10, 1.0), Err(StatError::InvalidLevel(1.0)));
        assert_eq!(
            median_interval(&[1.0, f64::NAN], 0.5),
            Err(StatError::NonFiniteValue)
        );
        // Above the exact range the incomplete beta gives the ranks; coverage still ≥ level.
        for n in [121, 500, 10_000] {
            let (l, coverage) = median_ranks(n, 0.95).unwrap();
            assert!(coverage >= 0.95 && l < n / 2, "n={n}");
            let narrower =
                1.0 - 2.0 * checked_beta_reg((n - l) as f64, (l + 1) as f64, 0.5).unwrap();
            assert!(narrower < 0.95, "n={n}: l + 1 still covers");
        }
    }
}
