//! Box plot notches (McGill, Tukey & Larsen 1978, "Variations of box plots", The American
//! Statistician 32(1): 12–16).
//!
//! Definition: the notch runs from `median − 1.58 · IQR / √n` to `median + 1.58 · IQR / √n`,
//! with the median and quartiles of Hyndman & Fan definition 7 (as the box uses, see
//! [`super::boxplot`]). The constant 1.58 is the paper's: two notches that do not overlap
//! suggest medians differing at roughly the 5% level.
//!
//! Degenerate cases: one value or a zero IQR gives a notch of zero width at the median. A notch
//! may reach beyond the box (small `n`, wide IQR); it is reported as computed, not clipped.

use super::error::StatError;
use super::quantile::quartiles;

/// The multiple of `IQR / √n` each side of the median (McGill, Tukey & Larsen 1978).
pub const NOTCH_FACTOR: f64 = 1.58;

/// A median with its notch.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Notch {
    pub n: usize,
    pub median: f64,
    pub low: f64,
    pub high: f64,
}

/// The notch of `values`: `median ± 1.58 · IQR / √n`; needs one value.
pub fn notch(values: &[f64]) -> Result<Notch, StatError> {
    let q = quartiles(values)?;
    let half = NOTCH_FACTOR * q.iqr() / (values.len() as f64).sqrt();
    Ok(Notch {
        n: values.len(),
        median: q.median,
        low: q.median - half,
        high: q.median + half,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: the formula's degenerate cases (module doc).
    #[test]
    fn notch_edges() {
        let one = notch(&[3.0]).unwrap();
        assert_eq!((one.low, one.median, one.high), (3.0, 3.0, 3.0));
        assert_eq!(
            notch(&[]),
            Err(StatError::TooFewValues {
                needed: 1,
                found: 0
            })
        );
        assert_eq!(notch(&[f64::INFINITY]), Err(StatError::NonFiniteValue));
    }
}
