//! Histogram bins: a width from a rule (or given), edges at whole multiples of it, counts.
//!
//! Guarantees:
//! - Rule widths (language.md §5): Sturges `range / (⌈log2 n⌉ + 1)`; Scott
//!   `3.49 · sd · n^(−1/3)`; Freedman–Diaconis `2 · IQR · n^(−1/3)`; a requested count `N` gives
//!   `range / N`. Each is rounded to the *nearest* readable step (1, 2, 2.5 or 5 × 10^k, nearest
//!   on a log scale, see [`super::steps`]), so `bins(N)` gives about `N` bins, not exactly `N`.
//!   A fixed width `W` is used as given; its multiples are the doubles nearest to the exact
//!   decimal multiples of the shortest decimal text of `W` (`3 × 0.1` gives `0.3`, not
//!   `0.30000000000000004`), so a value written on an edge falls in the bin starting there.
//! - Edges are `k · w` for whole `k` from the largest multiple at or below the minimum to the
//!   smallest multiple at or above the maximum, each computed directly from `k` (no running sum,
//!   no drift). Bins are half-open `[a, b)` except the last, which is closed, so every value falls
//!   in exactly one bin, with the same rule as a search over the edges.
//! - Degenerate data still gives at least one bin: when all values are equal (including a single
//!   value) a rule's width is a tenth of the value's magnitude rounded to a readable step (1 for
//!   zero); when the IQR is zero, Freedman–Diaconis falls back to Scott's rule (the sd is then
//!   positive because the range is). A value on a multiple of the width with zero range gets the
//!   bin that starts at it.
//! - At most [`MAX_BINS`] bins: a rule whose width would give more is widened to the smallest
//!   readable step giving at most that many (counting the bins that actually cover the data);
//!   a fixed width that would is an error.
//! - A grid shared by several groups: [`bins_covering`] gives the bins one group needs, from
//!   the bin of its smallest value to the bin of its largest by the same rule as the counts
//!   ([`bin_of`]), so every value of every group falls in one of its bins.

use super::error::{ensure_count, StatError};
use super::quantile::{quartiles_sorted, sorted_values};
use super::steps::{
    ceil_index_by, floor_index_by, readable_step, step_for_single_value, ReadableStep, StepRounding,
};
use super::summary::sample_sd;

/// Largest number of bins a histogram may have.
pub const MAX_BINS: usize = 10_000;

/// Most widenings tried when a rule's width gives too many bins (see `choose_grid`).
const WIDENINGS: usize = 8;

/// How the bin width is chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BinRule {
    /// Sturges (1926): `range / (⌈log2 n⌉ + 1)`, rounded to a readable step.
    Sturges,
    /// Scott (1979): `3.49 · sd · n^(−1/3)`, rounded to a readable step.
    Scott,
    /// Freedman & Diaconis (1981): `2 · IQR · n^(−1/3)`, rounded to a readable step.
    FreedmanDiaconis,
    /// About this many bins: `range / N`, rounded to a readable step.
    Count(usize),
    /// Exactly this width, not rounded.
    Width(f64),
}

/// Bin edges and counts.
#[derive(Debug, Clone, PartialEq)]
pub struct Histogram {
    /// Number of values binned.
    pub n: usize,
    /// The width the rule gave before rounding (the given width for [`BinRule::Width`]; 0 when
    /// all values are equal and a rule was asked for).
    pub raw_width: f64,
    /// The bin width used.
    pub width: f64,
    /// `counts.len() + 1` ascending edges; bin `i` is `[edges[i], edges[i+1])`, the last closed.
    pub edges: Vec<f64>,
    pub counts: Vec<u64>,
}

impl Histogram {
    /// Percentages `100 · count / n`.
    pub fn percents(&self) -> Vec<f64> {
        let n = self.n as f64;
        self.counts.iter().map(|&c| 100.0 * c as f64 / n).collect()
    }

    /// Density heights `count / (n · width)`, so the bars' areas sum to 1.
    pub fn densities(&self) -> Vec<f64> {
        let scale = self.n as f64 * self.width;
        self.counts.iter().map(|&c| c as f64 / scale).collect()
    }
}

/// The width grid edges are drawn from.
#[derive(Debug, Clone, Copy)]
enum Grid {
    Readable(ReadableStep),
    Fixed(f64),
}

impl Grid {
    fn width(&self) -> f64 {
        match self {
            Grid::Readable(step) => step.value(),
            Grid::Fixed(w) => *w,
        }
    }

    fn multiple(&self, k: i64) -> f64 {
        match self {
            Grid::Readable(step) => step.multiple(k),
            Grid::Fixed(w) => decimal_multiple(*w, k).unwrap_or(k as f64 * w),
        }
    }

    /// First and last edge index covering `[min, max]`, at least one bin apart.
    fn edge_indices(&self, min: f64, max: f64) -> Option<(i64, i64)> {
        let first = floor_index_by(min, self.width(), |k| self.multiple(k))?;
        let last = ceil_index_by(max, self.width(), |k| self.multiple(k))?;
        Some((first, last.max(first + 1)))
    }
}

/// Largest integer below which every integer is exact as a double (2^53).
const EXACT_INTEGERS: i64 = 1 << 53;

/// `k · w` as the double nearest to the exact product of `k` and `w`'s shortest decimal text
/// (`w = m / 10^d`): one correctly rounded division of exact integers. `None` when `w` has
/// more than 22 decimals or `k · m` is not exact as a double.
fn decimal_multiple(w: f64, k: i64) -> Option<f64> {
    let text = format!("{w}");
    let decimals = text.split_once('.').map_or(0, |(_, frac)| frac.len());
    let mantissa: i64 = text.replace('.', "").parse().ok()?;
    let scaled = k.checked_mul(mantissa)?;
    if decimals > 22 || scaled.abs() >= EXACT_INTEGERS {
        return None;
    }
    Some(scaled as f64 / 10_f64.powi(decimals as i32))
}

/// Bins `values` by `rule`. An error for no values, a non-finite value, a zero bin count, a
/// non-positive fixed width, or a width too fine for the data.
pub fn histogram(values: &[f64], rule: BinRule) -> Result<Histogram, StatError> {
    let sorted = sorted_values(values)?;
    ensure_count(sorted.len(), 1)?;
    let min = sorted[0];
    let max = sorted[sorted.len() - 1];
    let (raw_width, grid) = choose_grid(&sorted, rule)?;
    let too_fine = StatError::WidthTooFine {
        width: grid.width(),
    };
    let (first, last) = grid.edge_indices(min, max).ok_or(too_fine.clone())?;
    let n_bins = usize::try_from(last - first).map_err(|_| too_fine.clone())?;
    if n_bins > MAX_BINS {
        return Err(too_fine);
    }
    let edges: Vec<f64> = (first..=last).map(|k| grid.multiple(k)).collect();
    if edges.windows(2).any(|pair| pair[0] >= pair[1]) {
        return Err(too_fine);
    }
    let counts = count_in_bins(&sorted, &edges);
    Ok(Histogram {
        n: sorted.len(),
        raw_width,
        width: grid.width(),
        edges,
        counts,
    })
}

/// The raw width a rule asks for and the grid actually used.
fn choose_grid(sorted: &[f64], rule: BinRule) -> Result<(f64, Grid), StatError> {
    if let BinRule::Width(w) = rule {
        return if w.is_finite() && w > 0.0 {
            Ok((w, Grid::Fixed(w)))
        } else {
            Err(StatError::InvalidWidth(w))
        };
    }
    let min = sorted[0];
    let max = sorted[sorted.len() - 1];
    let range = max - min;
    if let BinRule::Count(0) = rule {
        return Err(StatError::InvalidBinCount);
    }
    if range == 0.0 {
        let step = step_for_single_value(min).ok_or(StatError::WidthTooFine { width: 0.0 })?;
        return Ok((0.0, Grid::Readable(step)));
    }
    let raw = raw_rule_width(sorted, rule, range)?;
    let too_fine = StatError::WidthTooFine { width: raw };
    let step = readable_step(raw, StepRounding::Nearest).ok_or(too_fine.clone())?;
    if bin_count(step, min, max).is_some_and(|bins| bins <= MAX_BINS) {
        return Ok((raw, Grid::Readable(step)));
    }
    // Every step below range / MAX_BINS gives more than MAX_BINS bins (the bins cover the
    // range), so start at the smallest readable step not below it and widen until the bins
    // covering [min, max] number at most MAX_BINS.
    let mut wider =
        readable_step(range / MAX_BINS as f64, StepRounding::Up).ok_or(too_fine.clone())?;
    // That step gives at most MAX_BINS + 2 bins and each larger step is at least 1.25 times
    // wider, so one or two widenings suffice; the bound only guards against the unexpected.
    for _ in 0..WIDENINGS {
        if bin_count(wider, min, max).is_some_and(|bins| bins <= MAX_BINS) {
            return Ok((raw, Grid::Readable(wider)));
        }
        wider = wider.larger();
    }
    Err(too_fine)
}

/// The number of bins of width `step` whose edges cover `[min, max]`; `None` when the indices
/// are not exact.
fn bin_count(step: ReadableStep, min: f64, max: f64) -> Option<usize> {
    let (first, last) = Grid::Readable(step).edge_indices(min, max)?;
    usize::try_from(last - first).ok()
}

/// A rule's unrounded width for data with a positive range (so `n ≥ 2`).
fn raw_rule_width(sorted: &[f64], rule: BinRule, range: f64) -> Result<f64, StatError> {
    let n = sorted.len();
    let cube_root_n = (n as f64).cbrt();
    let scott = || -> Result<f64, StatError> { Ok(3.49 * sample_sd(sorted)? / cube_root_n) };
    match rule {
        BinRule::Sturges => {
            // ⌈log2 n⌉ exactly, from the integer.
            let ceil_log2 = n.next_power_of_two().trailing_zeros();
            Ok(range / f64::from(ceil_log2 + 1))
        }
        BinRule::Scott => scott(),
        BinRule::FreedmanDiaconis => {
            let iqr = quartiles_sorted(sorted)?.iqr();
            if iqr > 0.0 {
                Ok(2.0 * iqr / cube_root_n)
            } else {
                scott()
            }
        }
        BinRule::Count(bins) => Ok(range / bins as f64),
        BinRule::Width(w) => Ok(w),
    }
}

/// Counts values into bins `[e_i, e_{i+1})`, the last closed; `edges` ascending (as a
/// [`Histogram`]'s). Values outside the edges go to the nearest end bin; with fewer than two
/// edges there are no bins and nothing is counted.
pub fn count_in_bins(values: &[f64], edges: &[f64]) -> Vec<u64> {
    let n_bins = edges.len().saturating_sub(1);
    let mut counts = vec![0_u64; n_bins];
    for &v in values {
        if let Some(bin) = bin_of(v, edges) {
            counts[bin] += 1;
        }
    }
    counts
}

/// The bin of `edges` (ascending) that holds `v`: bins are `[e_i, e_{i+1})`, the last closed,
/// so a value on the last edge is in the last bin; values outside go to the nearest end bin.
/// `None` when there are fewer than two edges.
pub fn bin_of(v: f64, edges: &[f64]) -> Option<usize> {
    let n_bins = edges.len().checked_sub(1).filter(|&n| n > 0)?;
    // Number of edges at or below v, minus one, is the bin; v on the last edge goes last.
    let at_or_below = edges.partition_point(|&e| e <= v);
    Some(at_or_below.saturating_sub(1).min(n_bins - 1))
}

/// The part of a shared grid of `edges` (ascending) that one group with values from `min` to
/// `max` needs: the bins from the one holding `min` to the one holding `max`, by the rule of
/// [`bin_of`], so every value of the group falls in a bin of the slice — a group whose values
/// all equal the grid's last edge gets the grid's last bin. `None` when there are fewer than
/// two edges or `min > max`.
pub fn bins_covering(edges: &[f64], min: f64, max: f64) -> Option<&[f64]> {
    if min > max {
        return None;
    }
    let first = bin_of(min, edges)?;
    let last = bin_of(max, edges)?;
    Some(&edges[first..=last + 1])
}
