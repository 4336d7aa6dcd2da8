//! Ordinary least squares line `y = intercept + slope · x` and its confidence band.
//!
//! Guarantees:
//! - Sums are taken about accurate means ([`super::summary`]): `Sxx = Σ(x − x̄)²`,
//!   `Sxy = Σ(x − x̄)(y − ȳ)`, `Syy = Σ(y − ȳ)²`; `slope = Sxy / Sxx`, `intercept = ȳ − slope·x̄`.
//! - The residual sum of squares is summed from the residuals themselves, not as
//!   `Syy − Sxy²/Sxx`, so a near-perfect fit keeps its digits (NIST StRD Norris is the check).
//! - `residual_sd = √(RSS / (n − 2))` exists for `n ≥ 3`; `r = Sxy / √(Sxx·Syy)` exists when the
//!   y values vary. A fit needs two distinct x values.
//! - [`LinearFit::mean_band`] is the confidence interval for the mean response at `x`:
//!   `ŷ(x) ± t(1 − (1 − L)/2, n − 2) · s · √(1/n + (x − x̄)²/Sxx)`.

use super::error::{ensure_count, ensure_finite, ensure_level, StatError};
use super::interval::two_sided_t;
use super::summary::{accurate_mean, accurate_sum};

/// A fitted least squares line.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LinearFit {
    pub n: usize,
    pub slope: f64,
    pub intercept: f64,
    /// Pearson correlation; `None` when all y values are equal.
    pub r: Option<f64>,
    /// Residual standard deviation `√(RSS / (n − 2))`; `None` when `n < 3`.
    pub residual_sd: Option<f64>,
    pub mean_x: f64,
    pub mean_y: f64,
    /// `Σ(x − x̄)²`, positive.
    pub sxx: f64,
}

/// The confidence interval for the mean response at one x.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BandPoint {
    pub x: f64,
    pub fit: f64,
    pub low: f64,
    pub high: f64,
}

impl LinearFit {
    /// `r²`; `None` when `r` is.
    pub fn r_squared(&self) -> Option<f64> {
        self.r.map(|r| r * r)
    }

    /// The fitted mean response at `x`.
    pub fn predict(&self, x: f64) -> f64 {
        self.intercept + self.slope * x
    }

    /// The level-`L` confidence interval for the mean response at `x`; needs `n ≥ 3`.
    pub fn mean_band(&self, x: f64, level: f64) -> Result<BandPoint, StatError> {
        ensure_level(level)?;
        if !x.is_finite() {
            return Err(StatError::NonFiniteValue);
        }
        let sd = self.residual_sd.ok_or(StatError::TooFewValues {
            needed: 3,
            found: self.n,
        })?;
        let t = two_sided_t(level, self.n as f64 - 2.0)?;
        let dx = x - self.mean_x;
        let half = t * sd * (1.0 / self.n as f64 + dx * dx / self.sxx).sqrt();
        let fit = self.mean_y + self.slope * dx;
        Ok(BandPoint {
            x,
            fit,
            low: fit - half,
            high: fit + half,
        })
    }
}

/// Least squares fit of `y` on `x` (paired by position).
pub fn linear_fit(x: &[f64], y: &[f64]) -> Result<LinearFit, StatError> {
    if x.len() != y.len() {
        return Err(StatError::LengthMismatch {
            left: x.len(),
            right: y.len(),
        });
    }
    ensure_finite(x)?;
    ensure_finite(y)?;
    ensure_count(x.len(), 2)?;
    let n = x.len();
    let mean_x = accurate_mean(x);
    let mean_y = accurate_mean(y);
    let pairs = || x.iter().zip(y).map(|(&a, &b)| (a - mean_x, b - mean_y));
    let sxx = accurate_sum(pairs().map(|(dx, _)| dx * dx));
    let sxy = accurate_sum(pairs().map(|(dx, dy)| dx * dy));
    let syy = accurate_sum(pairs().map(|(_, dy)| dy * dy));
    if sxx <= 0.0 {
        return Err(StatError::NoSpread);
    }
    let slope = sxy / sxx;
    let intercept = mean_y - slope * mean_x;
    let r = (syy > 0.0).then(|| {
        // √(Sxx·Syy) in one rounding unless the product overflows or underflows.
        let product = sxx * syy;
        let scale = if product.is_normal() {
            product.sqrt()
        } else {
            sxx.sqrt() * syy.sqrt()
        };
        (sxy / scale).clamp(-1.0, 1.0)
    });
    let residual_sd = (n >= 3).then(|| {
        let rss = accurate_sum(pairs().map(|(dx, dy)| (dy - slope * dx).powi(2)));
        (rss / (n as f64 - 2.0)).sqrt()
    });
    Ok(LinearFit {
        n,
        slope,
        intercept,
        r,
        residual_sd,
        mean_x,
        mean_y,
        sxx,
    })
}
