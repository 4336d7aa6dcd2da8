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
//! - Boundary reflection at 0 for a ratio variable (Silverman 1986, *Density Estimation for
//!   Statistics and Data Analysis*, §2.10): `f̂(x) = f̂₀(x) + f̂₀(−x)` for `x ≥ 0` and 0 below,
//!   with `f̂₀` the plain estimate above and the same bandwidth (the rules are applied to the
//!   data as they are). The mass the plain estimate puts below zero is folded back, so the
//!   estimate still integrates to 1 over `[0, ∞)`. Values must be at least 0 (`Negative`
//!   otherwise); the grid of [`kernel_density_bounded`] starts at `max(0, min − reach·h)`.

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

/// Where a density estimate stops.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Boundary {
    /// No boundary: the plain estimate on the whole line.
    Open,
    /// Values cannot be negative: the estimate is reflected at 0 and is 0 below it.
    ReflectAtZero,
}

/// The density of `values` with kernel bandwidth `bandwidth` at each point of `at`.
pub fn kde(values: &[f64], bandwidth: f64, at: &[f64]) -> Result<Vec<f64>, StatError> {
    kde_bounded(values, bandwidth, at, Boundary::Open)
}

/// The density of `values` with bandwidth `bandwidth` and `boundary` at each point of `at`.
pub fn kde_bounded(
    values: &[f64],
    bandwidth: f64,
    at: &[f64],
    boundary: Boundary,
) -> Result<Vec<f64>, StatError> {
    ensure_finite(values)?;
    ensure_finite(at)?;
    ensure_count(values.len(), 1)?;
    if !(bandwidth.is_finite() && bandwidth > 0.0) {
        return Err(StatError::InvalidWidth(bandwidth));
    }
    if boundary == Boundary::ReflectAtZero && values.iter().any(|&v| v < 0.0) {
        return Err(StatError::Negative);
    }
    let scale = 1.0 / (values.len() as f64 * bandwidth * (2.0 * std::f64::consts::PI).sqrt());
    let kernel = |u: f64| (-0.5 * u * u).exp();
    Ok(at
        .iter()
        .map(|&x| {
            let kernel_sum = match boundary {
                Boundary::Open => accurate_sum(values.iter().map(|&v| kernel((x - v) / bandwidth))),
                Boundary::ReflectAtZero if x < 0.0 => 0.0,
                Boundary::ReflectAtZero => accurate_sum(
                    values
                        .iter()
                        .map(|&v| kernel((x - v) / bandwidth) + kernel((x + v) / bandwidth)),
                ),
            };
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
    kernel_density_bounded(values, rule, grid, Boundary::Open)
}

/// A density curve of `values` with bandwidth `rule` and `boundary` over `grid`; with a
/// boundary at zero the grid starts at `max(0, min − reach·h)`.
pub fn kernel_density_bounded(
    values: &[f64],
    rule: BandwidthRule,
    grid: DensityGrid,
    boundary: Boundary,
) -> Result<DensityCurve, StatError> {
    let h = bandwidth(values, rule)?;
    let sorted = sorted_values(values)?;
    ensure_count(sorted.len(), 1)?;
    let reach = if grid.reach.is_finite() && grid.reach >= 0.0 {
        grid.reach * h
    } else {
        return Err(StatError::InvalidWidth(grid.reach));
    };
    let start = match boundary {
        Boundary::Open => sorted[0] - reach,
        Boundary::ReflectAtZero => (sorted[0] - reach).max(0.0),
    };
    let end = sorted[sorted.len() - 1] + reach;
    let points = grid.points.max(2);
    let step = (end - start) / (points - 1) as f64;
    let x: Vec<f64> = (0..points).map(|k| start + k as f64 * step).collect();
    let density = kde_bounded(&sorted, h, &x, boundary)?;
    Ok(DensityCurve {
        bandwidth: h,
        x,
        density,
    })
}
