//! Gaussian kernel density estimates evaluated on a grid.
//!
//! Guarantees:
//! - `f(x) = (1 / (n·h)) · Σ φ((x − xᵢ) / h)` with the standard normal density `φ`.
//! - Bandwidth rules: Silverman `0.9 · min(sd, IQR / 1.34) · n^(−1/5)` (Silverman 1986,
//!   eq. 3.31), using the sd alone when the IQR is zero; Scott `1.06 · sd · n^(−1/5)` (Scott
//!   1992); or a fixed bandwidth used as given. The rules need two values and a positive sd
//!   (an error otherwise); a fixed bandwidth works from one value.
//! - [`kernel_density`]'s grid runs from `min − reach·h` to `max + reach·h` in equal steps,
//!   each point computed as `start + k·step` (no running sum), at least two points.

use super::error::{ensure_count, ensure_finite, StatError};
use super::quantile::{quartiles_sorted, sorted_values};
use super::summary::{accurate_sum, sample_sd};

/// How the kernel bandwidth is chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BandwidthRule {
    /// Silverman's rule of thumb, `0.9 · min(sd, IQR/1.34) · n^(−1/5)`.
    Silverman,
    /// Scott's rule, `1.06 · sd · n^(−1/5)`.
    Scott,
    /// This bandwidth, used as given.
    Fixed(f64),
}

/// Where a density curve is evaluated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct DensityGrid {
    /// Number of grid points (at least 2 are used).
    pub points: usize,
    /// How many bandwidths the grid reaches beyond the smallest and largest value.
    pub reach: f64,
}

impl Default for DensityGrid {
    fn default() -> Self {
        DensityGrid {
            points: 256,
            reach: 3.0,
        }
    }
}

/// A density curve.
#[derive(Debug, Clone, PartialEq)]
pub struct DensityCurve {
    pub bandwidth: f64,
    /// Ascending grid points.
    pub x: Vec<f64>,
    /// Density at each grid point.
    pub density: Vec<f64>,
}

/// The bandwidth a rule gives for `values`.
pub fn bandwidth(values: &[f64], rule: BandwidthRule) -> Result<f64, StatError> {
    ensure_finite(values)?;
    if let BandwidthRule::Fixed(h) = rule {
        return if h.is_finite() && h > 0.0 {
            Ok(h)
        } else {
            Err(StatError::InvalidWidth(h))
        };
    }
    let sd = sample_sd(values)?;
    if sd <= 0.0 {
        return Err(StatError::NoSpread);
    }
    let shrink = (values.len() as f64).powf(-0.2);
    match rule {
        BandwidthRule::Silverman => {
            let iqr = quartiles_sorted(&sorted_values(values)?)?.iqr();
            let spread = if iqr > 0.0 { sd.min(iqr / 1.34) } else { sd };
            Ok(0.9 * spread * shrink)
        }
        BandwidthRule::Scott => Ok(1.06 * sd * shrink),
        BandwidthRule::Fixed(h) => Ok(h),
    }
}

/// The density of `values` with kernel bandwidth `bandwidth` at each point of `at`.
pub fn kde(values: &[f64], bandwidth: f64, at: &[f64]) -> Result<Vec<f64>, StatError> {
    ensure_finite(values)?;
    ensure_finite(at)?;
    ensure_count(values.len(), 1)?;
    if !(bandwidth.is_finite() && bandwidth > 0.0) {
        return Err(StatError::InvalidWidth(bandwidth));
    }
    let scale = 1.0 / (values.len() as f64 * bandwidth * (2.0 * std::f64::consts::PI).sqrt());
    Ok(at
        .iter()
        .map(|&x| {
            let kernel_sum = accurate_sum(values.iter().map(|&v| {
                let u = (x - v) / bandwidth;
                (-0.5 * u * u).exp()
            }));
            kernel_sum * scale
        })
        .collect())
}

/// A density curve of `values` with bandwidth `rule` over `grid`.
pub fn kernel_density(
    values: &[f64],
    rule: BandwidthRule,
    grid: DensityGrid,
) -> Result<DensityCurve, StatError> {
    let h = bandwidth(values, rule)?;
    let sorted = sorted_values(values)?;
    ensure_count(sorted.len(), 1)?;
    let reach = if grid.reach.is_finite() && grid.reach >= 0.0 {
        grid.reach * h
    } else {
        return Err(StatError::InvalidWidth(grid.reach));
    };
    let start = sorted[0] - reach;
    let end = sorted[sorted.len() - 1] + reach;
    let points = grid.points.max(2);
    let step = (end - start) / (points - 1) as f64;
    let x: Vec<f64> = (0..points).map(|k| start + k as f64 * step).collect();
    let density = kde(&sorted, h, &x)?;
    Ok(DensityCurve {
        bandwidth: h,
        x,
        density,
    })
}
