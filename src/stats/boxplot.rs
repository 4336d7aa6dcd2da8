//! Tukey's box plot (Tukey 1977) with quartiles by Hyndman & Fan definition 7.
//!
//! Guarantees:
//! - `q1`, `median`, `q3` are definition-7 quantiles; `min` and `max` are the extreme values.
//! - [`Whiskers::Tukey`]: the fences are `q1 − 1.5·IQR` and `q3 + 1.5·IQR`; each whisker ends at
//!   the most extreme data value inside its fence (inclusive); values beyond a fence are
//!   outliers, listed in ascending order. Interpolated quartiles can put the nearest value inside
//!   the fence on the far side of the box edge; the whisker then ends at the box edge (length
//!   zero) rather than pointing back into the box (common practice).
//! - [`Whiskers::Range`]: the whiskers end at `min` and `max`; there are no outliers.
//! - Works for any `n ≥ 1` (with one value, everything equals it); an error for no values.

use super::error::StatError;
use super::quantile::{quartiles_sorted, sorted_values};

/// Where the whiskers of a box end.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Whiskers {
    /// The most extreme values within 1.5 × IQR of the box; values beyond are outliers.
    Tukey,
    /// The minimum and maximum; no outliers.
    Range,
}

/// The numbers a box shows.
#[derive(Debug, Clone, PartialEq)]
pub struct BoxSummary {
    pub n: usize,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
    pub whisker_low: f64,
    pub whisker_high: f64,
    /// Values beyond the whiskers, ascending (always empty for [`Whiskers::Range`]).
    pub outliers: Vec<f64>,
    pub min: f64,
    pub max: f64,
}

/// Multiple of the IQR that the Tukey fences lie beyond the box (Tukey 1977).
pub const TUKEY_FENCE: f64 = 1.5;

/// Box plot numbers of `values` with the given whisker rule.
pub fn box_summary(values: &[f64], whiskers: Whiskers) -> Result<BoxSummary, StatError> {
    let sorted = sorted_values(values)?;
    let quartiles = quartiles_sorted(&sorted)?;
    // quartiles_sorted succeeded, so there is at least one value.
    let min = sorted[0];
    let max = sorted[sorted.len() - 1];
    let (whisker_low, whisker_high, outliers) = match whiskers {
        Whiskers::Range => (min, max, Vec::new()),
        Whiskers::Tukey => {
            let reach = TUKEY_FENCE * quartiles.iqr();
            let fence_low = quartiles.q1 - reach;
            let fence_high = quartiles.q3 + reach;
            let mut inside = sorted
                .iter()
                .copied()
                .filter(|&v| v >= fence_low && v <= fence_high);
            let lowest_inside = inside.clone().next().unwrap_or(quartiles.q1);
            let highest_inside = inside.next_back().unwrap_or(quartiles.q3);
            let outliers = sorted
                .iter()
                .copied()
                .filter(|&v| v < fence_low || v > fence_high)
                .collect();
            (
                lowest_inside.min(quartiles.q1),
                highest_inside.max(quartiles.q3),
                outliers,
            )
        }
    };
    Ok(BoxSummary {
        n: sorted.len(),
        q1: quartiles.q1,
        median: quartiles.median,
        q3: quartiles.q3,
        whisker_low,
        whisker_high,
        outliers,
        min,
        max,
    })
}
