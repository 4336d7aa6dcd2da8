//! LOWESS: locally weighted linear regression with robustness iterations (Cleveland 1979,
//! "Robust locally weighted regression and smoothing scatterplots", JASA 74: 829–836).
//!
//! Definition, for pairs sorted by x (ties in x keep their input order):
//! - Span: `q = ⌊f·n⌋` neighbours (`f·n` within 1e-10 of a whole number counts as it), at
//!   least 2 and at most `n`. The neighbourhood of `xᵢ` is the `q` points nearest to it in x,
//!   a tie in distance going to the point on the left; `hᵢ` is the distance to the farthest of
//!   them.
//! - Local weights: tricube `w = (1 − |u|³)³` for `|u| < 1`, 0 otherwise, with
//!   `u = (x_j − xᵢ)/hᵢ`, for the neighbours `j`; when `hᵢ = 0` (every neighbour at `xᵢ`) each
//!   neighbour has weight 1. Each weight is multiplied by the point's robustness weight.
//! - Local fit: the weighted least squares line through the neighbours, evaluated at `xᵢ`:
//!   `ŷᵢ = ȳ_w + b·(xᵢ − x̄_w)` with weighted means and
//!   `b = Σw(x − x̄_w)(y − ȳ_w) / Σw(x − x̄_w)²`.
//!   When `√(Σw(x − x̄_w)² / Σw) ≤ 0.001·(x₍ₙ₎ − x₍₁₎)` the neighbours' x are too close to
//!   define a slope and `ŷᵢ = ȳ_w` (the guard of the published program, as we recall it).
//!   With fewer than two neighbours of positive weight `ŷᵢ = yᵢ`.
//! - Robustness: after each fit, residuals `eᵢ = yᵢ − ŷᵢ`, `s` = their median absolute value
//!   (definition 7), robustness weights `B(eᵢ/(6s))` with the bisquare `B(u) = (1 − u²)²` for
//!   `|u| < 1`, else 0. When `s = 0` (more than half the points fitted exactly) a point gets
//!   weight 1 if its residual is 0 and 0 otherwise (the limit as `s → 0`). The fit is repeated
//!   with these weights; [`ROBUSTNESS_ITERATIONS`] (3) repetitions follow the first fit.
//! - Evaluation between the data: [`Lowess::at`] interpolates linearly between the fitted
//!   values at neighbouring distinct x (tied x share one fitted value, since their
//!   neighbourhoods are the same) and is `None` outside `[x₍₁₎, x₍ₙ₎]`: a smooth is not
//!   extrapolated.
//!
//! Cost: `O(n·q)` per iteration; no values are skipped or interpolated while fitting.
//! Degenerate cases: needs two pairs and `0 < f ≤ 1`; equal x everywhere gives the weighted
//! mean of y. Checked against `statsmodels.nonparametric.smoothers_lowess.lowess` (robustness
//! iterations 3, no interpolation while fitting) to 1e-9 relative.

use super::error::{ensure_count, ensure_finite, StatError};
use super::quantile::quantile_sorted;

/// Robustness iterations after the first fit (Cleveland 1979 found two or three enough).
pub const ROBUSTNESS_ITERATIONS: usize = 3;

/// Relative spread of x below which a local line is replaced by a weighted mean.
const SLOPE_GUARD: f64 = 0.001;

/// A LOWESS smooth: fitted values at the data's x, sorted by x.
#[derive(Debug, Clone, PartialEq)]
pub struct Lowess {
    /// Ascending x of every pair.
    pub x: Vec<f64>,
    /// The smooth at each `x`.
    pub fitted: Vec<f64>,
    /// The number of neighbours `q` each local fit used.
    pub neighbours: usize,
}

impl Lowess {
    /// The smooth at `x` by linear interpolation between fitted values; `None` outside the data
    /// or for a non-finite `x`.
    pub fn at(&self, x: f64) -> Option<f64> {
        let (first, last) = (*self.x.first()?, *self.x.last()?);
        if !(x >= first && x <= last) {
            return None;
        }
        // The first index with self.x[i] ≥ x; tied x share a fitted value.
        let i = self.x.partition_point(|&v| v < x);
        if self.x[i] == x {
            return Some(self.fitted[i]);
        }
        let (x0, x1) = (self.x[i - 1], self.x[i]);
        let (y0, y1) = (self.fitted[i - 1], self.fitted[i]);
        Some(y0 + (y1 - y0) * ((x - x0) / (x1 - x0)))
    }
}

/// The LOWESS smooth of `y` on `x` with span fraction `span` and `iterations` robustness
/// iterations (use [`ROBUSTNESS_ITERATIONS`] unless there is a reason not to).
pub fn lowess(x: &[f64], y: &[f64], span: f64, iterations: usize) -> Result<Lowess, StatError> {
    if x.len() != y.len() {
        return Err(StatError::LengthMismatch {
            left: x.len(),
            right: y.len(),
        });
    }
    ensure_finite(x)?;
    ensure_finite(y)?;
    ensure_count(x.len(), 2)?;
    if !(span > 0.0 && span <= 1.0) {
        return Err(StatError::InvalidProbability(span));
    }
    let n = x.len();
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by(|&a, &b| x[a].total_cmp(&x[b]));
    let xs: Vec<f64> = order.iter().map(|&i| x[i]).collect();
    let ys: Vec<f64> = order.iter().map(|&i| y[i]).collect();
    let q = neighbour_count(n, span);
    let windows: Vec<Window> = xs.iter().map(|&at| Window::around(&xs, at, q)).collect();
    let min_spread = SLOPE_GUARD * (xs[n - 1] - xs[0]);
    let mut robustness = vec![1.0; n];
    let mut fitted = Vec::new();
    for iteration in 0..=iterations {
        fitted = (0..n)
            .map(|i| local_fit(&xs, &ys, i, &windows[i], &robustness, min_spread))
            .collect();
        if iteration < iterations {
            robustness = robustness_weights(&ys, &fitted)?;
        }
    }
    Ok(Lowess {
        x: xs,
        fitted,
        neighbours: q,
    })
}

/// `⌊f·n⌋` clamped to `[2, n]`, with `f·n` within 1e-10 of a whole number taken as it.
fn neighbour_count(n: usize, span: f64) -> usize {
    let exact = span * n as f64;
    let q = (exact + 1e-10).floor() as usize;
    q.clamp(2, n)
}

/// The `q` nearest neighbours of one point: indices `start..end` of the sorted x, and the
/// distance to the farthest of them.
struct Window {
    start: usize,
    end: usize,
    radius: f64,
}

impl Window {
    /// The `q` points of sorted `xs` nearest to `at`, a tie in distance going to the left.
    fn around(xs: &[f64], at: f64, q: usize) -> Window {
        // Slide a window of q points right while the point just past it is strictly nearer
        // than its first point.
        let n = xs.len();
        let mut start = xs.partition_point(|&v| v < at).saturating_sub(q).min(n - q);
        while start + q < n && xs[start + q] - at < at - xs[start] {
            start += 1;
        }
        let end = start + q;
        let radius = (at - xs[start]).max(xs[end - 1] - at);
        Window { start, end, radius }
    }
}

/// Tricube weight of a distance relative to the radius.
fn tricube(distance: f64, radius: f64) -> f64 {
    if radius <= 0.0 {
        return 1.0;
    }
    let u = distance / radius;
    if u >= 1.0 {
        return 0.0;
    }
    let c = 1.0 - u * u * u;
    c * c * c
}

/// The local weighted line at point `i`, evaluated there.
fn local_fit(
    xs: &[f64],
    ys: &[f64],
    i: usize,
    window: &Window,
    robustness: &[f64],
    min_spread: f64,
) -> f64 {
    let at = xs[i];
    let range = window.start..window.end;
    let weights: Vec<f64> = range
        .clone()
        .map(|j| tricube((xs[j] - at).abs(), window.radius) * robustness[j])
        .collect();
    let total: f64 = weights.iter().sum();
    if total <= 0.0 || weights.iter().filter(|&&w| w > 0.0).count() < 2 {
        return ys[i];
    }
    let points = || {
        range
            .clone()
            .zip(&weights)
            .map(|(j, &w)| (xs[j], ys[j], w / total))
    };
    let mean_x: f64 = points().map(|(x, _, w)| w * x).sum();
    let mean_y: f64 = points().map(|(_, y, w)| w * y).sum();
    let sxx: f64 = points()
        .map(|(x, _, w)| w * (x - mean_x) * (x - mean_x))
        .sum();
    if sxx.sqrt() <= min_spread {
        return mean_y;
    }
    let sxy: f64 = points()
        .map(|(x, y, w)| w * (x - mean_x) * (y - mean_y))
        .sum();
    mean_y + sxy / sxx * (at - mean_x)
}

/// Bisquare robustness weights from the residuals.
fn robustness_weights(ys: &[f64], fitted: &[f64]) -> Result<Vec<f64>, StatError> {
    let residuals: Vec<f64> = ys.iter().zip(fitted).map(|(y, f)| (y - f).abs()).collect();
    let mut sorted = residuals.clone();
    sorted.sort_by(f64::total_cmp);
    let scale = 6.0 * quantile_sorted(&sorted, 0.5)?;
    Ok(residuals
        .iter()
        .map(|&r| {
            if scale <= 0.0 {
                return if r == 0.0 { 1.0 } else { 0.0 };
            }
            let u = r / scale;
            if u >= 1.0 {
                0.0
            } else {
                (1.0 - u * u) * (1.0 - u * u)
            }
        })
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: Cleveland (1979): a local line reproduces a straight line exactly, whatever
    // the weights; robustness iterations keep it (every residual 0: the s = 0 rule gives
    // weight 1 to all).
    #[test]
    fn a_line_is_reproduced() {
        let x: Vec<f64> = (0..20).map(|i| f64::from(i) * 0.5).collect();
        let y: Vec<f64> = x.iter().map(|v| 2.0 * v + 1.0).collect();
        for span in [0.2, 0.5, 1.0] {
            let fit = lowess(&x, &y, span, ROBUSTNESS_ITERATIONS).unwrap();
            for (got, want) in fit.fitted.iter().zip(&y) {
                assert!((got - want).abs() < 1e-12, "span {span}: {got} vs {want}");
            }
        }
    }

    // Reference: the module doc's rules, by hand.
    #[test]
    fn lowess_rules_by_hand() {
        assert_eq!(neighbour_count(10, 0.3), 3, "0.3·10 counts as 3");
        assert_eq!(neighbour_count(10, 0.01), 2);
        assert_eq!(neighbour_count(7, 1.0), 7);
        // Nearest 3 of 0, 1, 2, 3 around 1.5: a tie between 0 and 3 goes left.
        let w = Window::around(&[0.0, 1.0, 2.0, 3.0], 1.5, 3);
        assert_eq!((w.start, w.end, w.radius), (0, 3, 1.5));
        assert_eq!(tricube(0.5, 1.0), (1.0 - 0.125f64).powi(3));
        assert_eq!(tricube(1.0, 1.0), 0.0);
        assert_eq!(tricube(0.0, 0.0), 1.0);
        // An outlier gets robustness weight 0 and leaves the smooth of the others.
        let x: Vec<f64> = (0..12).map(f64::from).collect();
        let mut y: Vec<f64> = x.iter().map(|v| 0.5 * v).collect();
        y[6] = 100.0;
        let robust = lowess(&x, &y, 0.6, 3).unwrap();
        assert!(
            (robust.fitted[6] - 3.0).abs() < 1e-9,
            "{}",
            robust.fitted[6]
        );
        let plain = lowess(&x, &y, 0.6, 0).unwrap();
        assert!(plain.fitted[6] > 10.0);
        // Equal x everywhere: the weighted mean.
        let flat = lowess(&[2.0; 4], &[1.0, 2.0, 3.0, 6.0], 1.0, 0).unwrap();
        assert_eq!(flat.fitted, vec![3.0; 4]);
    }

    #[test]
    fn evaluation_between_the_data() {
        let fit = lowess(&[0.0, 1.0, 1.0, 3.0], &[0.0, 1.0, 1.0, 3.0], 1.0, 0).unwrap();
        assert_eq!(fit.at(2.0), Some(2.0));
        assert_eq!(fit.at(1.0), Some(1.0));
        assert_eq!(fit.at(0.0), Some(0.0));
        assert_eq!(fit.at(-0.1), None);
        assert_eq!(fit.at(3.5), None);
        assert_eq!(fit.at(f64::NAN), None);
        assert_eq!(fit.fitted[1], fit.fitted[2], "tied x share a fitted value");
    }

    #[test]
    fn lowess_degenerate_inputs() {
        assert_eq!(
            lowess(&[1.0], &[1.0], 0.5, 3),
            Err(StatError::TooFewValues {
                needed: 2,
                found: 1
            })
        );
        assert_eq!(
            lowess(&[1.0, 2.0], &[1.0, 2.0], 0.0, 3),
            Err(StatError::InvalidProbability(0.0))
        );
        assert_eq!(
            lowess(&[1.0, 2.0], &[1.0], 0.5, 3),
            Err(StatError::LengthMismatch { left: 2, right: 1 })
        );
        assert_eq!(
            lowess(&[1.0, f64::NAN], &[1.0, 2.0], 0.5, 3),
            Err(StatError::NonFiniteValue)
        );
    }
}
