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
//! - [`LinearFit::prediction_band`] is the prediction interval for one new observation at `x`:
//!   `ŷ(x) ± t(1 − (1 − L)/2, n − 2) · s · √(1 + 1/n + (x − x̄)²/Sxx)`.
//! - [`LinearFit::inference`] gives the standard errors `se(slope) = s / √Sxx` and
//!   `se(intercept) = s · √(1/n + x̄²/Sxx)`, their intervals `estimate ± t(1 − (1 − L)/2, n − 2)
//!   · se`, `r`, `R² = r²` and `s` (Draper & Smith 1998, *Applied Regression Analysis*, 3rd ed.,
//!   §1.4 and §3.1; the certified values of NIST StRD Norris and statsmodels OLS are the checks).
//! - Deviations whose squares overflow (beyond about 1e154) give `Overflow`: no line.
//! - Degenerate cases: two distinct x values are needed for a line (`NoSpread` otherwise); `s`,
//!   the standard errors, intervals and bands need `n ≥ 3` (`TooFewValues`); a perfect fit has
//!   `s = 0` and intervals of zero width; `r` and `R²` are `None` when every y is equal.
//! - [`log_log_fit`] is the same fit on `(ln x, ln y)`: a power law `y = e^intercept · x^slope`,
//!   refused (`NotPositive`) when any x or y is zero or negative.

use super::error::{ensure_count, ensure_finite, ensure_level, StatError};
use super::geometric::natural_logs;
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

/// An estimated coefficient with its standard error and confidence interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Coefficient {
    pub estimate: f64,
    pub se: f64,
    pub low: f64,
    pub high: f64,
}

/// What a reader of a fitted line asks for: coefficients with intervals and the goodness of fit.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FitInference {
    pub n: usize,
    /// The confidence level of the coefficients' intervals.
    pub level: f64,
    pub slope: Coefficient,
    pub intercept: Coefficient,
    /// Pearson correlation; `None` when all y values are equal.
    pub r: Option<f64>,
    /// `r²`; `None` when `r` is.
    pub r_squared: Option<f64>,
    /// `√(RSS / (n − 2))`.
    pub residual_sd: f64,
}

/// Which interval a band shows at each x.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BandKind {
    /// The confidence interval for the mean response.
    Mean,
    /// The prediction interval for one new observation.
    Prediction,
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

    /// `s`, which needs `n ≥ 3`.
    fn sd(&self) -> Result<f64, StatError> {
        self.residual_sd.ok_or(StatError::TooFewValues {
            needed: 3,
            found: self.n,
        })
    }

    /// The standard error of the slope, `s / √Sxx`; needs `n ≥ 3`.
    pub fn slope_se(&self) -> Result<f64, StatError> {
        Ok(self.sd()? / self.sxx.sqrt())
    }

    /// The standard error of the intercept, `s · √(1/n + x̄²/Sxx)`; needs `n ≥ 3`.
    pub fn intercept_se(&self) -> Result<f64, StatError> {
        let leverage = 1.0 / self.n as f64 + self.mean_x * self.mean_x / self.sxx;
        Ok(self.sd()? * leverage.sqrt())
    }

    /// Standard errors and level-`L` intervals of both coefficients, `r`, `R²` and `s`.
    pub fn inference(&self, level: f64) -> Result<FitInference, StatError> {
        let residual_sd = self.sd()?;
        let t = two_sided_t(level, self.n as f64 - 2.0)?;
        let coefficient = |estimate: f64, se: f64| Coefficient {
            estimate,
            se,
            low: estimate - t * se,
            high: estimate + t * se,
        };
        Ok(FitInference {
            n: self.n,
            level,
            slope: coefficient(self.slope, self.slope_se()?),
            intercept: coefficient(self.intercept, self.intercept_se()?),
            r: self.r,
            r_squared: self.r_squared(),
            residual_sd,
        })
    }

    /// The level-`L` confidence interval for the mean response at `x`; needs `n ≥ 3`.
    pub fn mean_band(&self, x: f64, level: f64) -> Result<BandPoint, StatError> {
        self.band(x, level, BandKind::Mean)
    }

    /// The level-`L` prediction interval for a new observation at `x`; needs `n ≥ 3`.
    pub fn prediction_band(&self, x: f64, level: f64) -> Result<BandPoint, StatError> {
        self.band(x, level, BandKind::Prediction)
    }

    /// The level-`L` band of `kind` at `x`; needs `n ≥ 3`.
    pub fn band(&self, x: f64, level: f64, kind: BandKind) -> Result<BandPoint, StatError> {
        ensure_level(level)?;
        if !x.is_finite() {
            return Err(StatError::NonFiniteValue);
        }
        let sd = self.sd()?;
        let t = two_sided_t(level, self.n as f64 - 2.0)?;
        let dx = x - self.mean_x;
        let new_observation = match kind {
            BandKind::Mean => 0.0,
            BandKind::Prediction => 1.0,
        };
        let half = t * sd * (new_observation + 1.0 / self.n as f64 + dx * dx / self.sxx).sqrt();
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
    if !(sxx.is_finite() && sxy.is_finite() && syy.is_finite()) {
        return Err(StatError::Overflow);
    }
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

/// Least squares fit of `ln y` on `ln x` (a power law `y = e^intercept · x^slope`); every x and y
/// must be positive. The fit, its intervals and bands are in logs: exponentiate a band's
/// limits to draw it on log axes.
pub fn log_log_fit(x: &[f64], y: &[f64]) -> Result<LinearFit, StatError> {
    if x.len() != y.len() {
        return Err(StatError::LengthMismatch {
            left: x.len(),
            right: y.len(),
        });
    }
    linear_fit(&natural_logs(x)?, &natural_logs(y)?)
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: hand derivation. y = 1 + 2x + e with residuals ±1 at x = 0, 1, 2, 3 (signs
    // +, −, −, +): Sxx = 5, RSS = 4 on 2 df, s = √2, se(slope) = √(2/5), se(intercept) =
    // √2·√(1/4 + 2.25/5) = √1.4; the prediction band adds s² under the root.
    #[test]
    fn inference_by_hand() {
        let x = [0.0, 1.0, 2.0, 3.0];
        let y = [2.0, 2.0, 4.0, 8.0];
        let fit = linear_fit(&x, &y).unwrap();
        assert_eq!((fit.slope, fit.intercept), (2.0, 1.0));
        let inf = fit.inference(0.95).unwrap();
        assert!((inf.residual_sd - 2f64.sqrt()).abs() < 1e-15);
        assert!((inf.slope.se - 0.4f64.sqrt()).abs() < 1e-15);
        assert!((inf.intercept.se - 1.4f64.sqrt()).abs() < 1e-15);
        let t = crate::stats::t_quantile(0.975, 2.0).unwrap();
        assert!((inf.slope.high - (2.0 + t * 0.4f64.sqrt())).abs() < 1e-14);
        let mean = fit.mean_band(1.5, 0.95).unwrap();
        let new = fit.prediction_band(1.5, 0.95).unwrap();
        assert!((mean.high - mean.fit - t * 2f64.sqrt() * 0.5).abs() < 1e-14);
        assert!((new.high - new.fit - t * 2f64.sqrt() * 1.25f64.sqrt()).abs() < 1e-14);
        assert_eq!(fit.band(1.5, 0.95, BandKind::Prediction), Ok(new));
    }

    // Reference: the definitions' degenerate cases (module doc).
    #[test]
    fn inference_degenerate_inputs() {
        let two = linear_fit(&[0.0, 1.0], &[0.0, 1.0]).unwrap();
        let too_few = StatError::TooFewValues {
            needed: 3,
            found: 2,
        };
        assert_eq!(two.inference(0.95), Err(too_few.clone()));
        assert_eq!(two.slope_se(), Err(too_few.clone()));
        assert_eq!(two.prediction_band(0.5, 0.95), Err(too_few));
        // A perfect fit: zero standard errors and zero-width intervals.
        let exact = linear_fit(&[0.0, 1.0, 2.0], &[1.0, 3.0, 5.0]).unwrap();
        let inf = exact.inference(0.9).unwrap();
        assert_eq!(
            (inf.slope.se, inf.slope.low, inf.slope.high),
            (0.0, 2.0, 2.0)
        );
        assert_eq!(inf.r_squared, Some(1.0));
        // Flat y: no r, but standard errors exist.
        let flat = linear_fit(&[0.0, 1.0, 2.0], &[4.0, 4.0, 4.0]).unwrap();
        assert_eq!(flat.inference(0.9).unwrap().r_squared, None);
        assert_eq!(exact.inference(1.0), Err(StatError::InvalidLevel(1.0)));
        assert_eq!(
            exact.prediction_band(f64::INFINITY, 0.9),
            Err(StatError::NonFiniteValue)
        );
    }

    // Reference: hand derivation: y = 3·x² is the line ln y = ln 3 + 2 ln x.
    #[test]
    fn power_law_on_logs() {
        let x = [1.0, 2.0, 4.0, 8.0];
        let y: Vec<f64> = x.iter().map(|v| 3.0 * v * v).collect();
        let fit = log_log_fit(&x, &y).unwrap();
        assert!((fit.slope - 2.0).abs() < 1e-14);
        assert!((fit.intercept - 3f64.ln()).abs() < 1e-14);
        assert_eq!(
            log_log_fit(&[1.0, 0.0], &[1.0, 2.0]),
            Err(StatError::NotPositive)
        );
        assert_eq!(
            log_log_fit(&[1.0, 2.0], &[1.0, -2.0]),
            Err(StatError::NotPositive)
        );
        assert!(matches!(
            log_log_fit(&[1.0], &[1.0, 2.0]),
            Err(StatError::LengthMismatch { .. })
        ));
    }
}
