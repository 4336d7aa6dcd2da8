//! The empirical distribution function (common practice; e.g. Conover 1999, *Practical
//! Nonparametric Statistics*, 3rd ed., the empirical distribution function).
//!
//! Definition: `F̂(t) = #{xᵢ ≤ t} / n`, a step function that jumps at each distinct value.
//! [`ecdf`] returns the distinct values in ascending order with `F̂` at each, so the last
//! proportion is exactly 1; `F̂` is 0 below the first value and constant between steps.
//!
//! Guarantees: proportions are `count / n` from exact integer counts (one rounding each); ties
//! make one step whose height is their number over `n`. Degenerate cases: no values is an error
//! (`TooFewValues`); one value (or all equal) gives a single step to 1. Checked against
//! `scipy.stats.ecdf` (differential tests).

use super::error::StatError;
use super::quantile::sorted_values;

/// The steps of an empirical distribution function.
#[derive(Debug, Clone, PartialEq)]
pub struct Ecdf {
    pub n: usize,
    /// Distinct values, ascending.
    pub values: Vec<f64>,
    /// `F̂` at each value: the proportion of values at or below it.
    pub proportions: Vec<f64>,
}

impl Ecdf {
    /// `F̂(t)`: 0 below the first value, else the proportion at the last value at or below `t`.
    pub fn at(&self, t: f64) -> f64 {
        let steps = self.values.partition_point(|&v| v <= t);
        steps.checked_sub(1).map_or(0.0, |i| self.proportions[i])
    }
}

/// The empirical distribution function of `values`; needs one value.
pub fn ecdf(values: &[f64]) -> Result<Ecdf, StatError> {
    let sorted = sorted_values(values)?;
    let n = sorted.len();
    if n == 0 {
        return Err(StatError::TooFewValues {
            needed: 1,
            found: 0,
        });
    }
    let mut distinct = Vec::new();
    let mut proportions = Vec::new();
    for (i, &v) in sorted.iter().enumerate() {
        // The last of a run of equal values closes that step.
        if sorted.get(i + 1) != Some(&v) {
            distinct.push(v);
            proportions.push((i + 1) as f64 / n as f64);
        }
    }
    Ok(Ecdf {
        n,
        values: distinct,
        proportions,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: the definition by hand: 1, 2, 2, 3 steps to 1/4, 3/4 and 1.
    #[test]
    fn ecdf_by_hand() {
        let f = ecdf(&[3.0, 2.0, 1.0, 2.0]).unwrap();
        assert_eq!(f.values, vec![1.0, 2.0, 3.0]);
        assert_eq!(f.proportions, vec![0.25, 0.75, 1.0]);
        assert_eq!(
            (f.at(0.5), f.at(2.0), f.at(2.5), f.at(9.0)),
            (0.0, 0.75, 0.75, 1.0)
        );
        let one = ecdf(&[-0.0, 0.0]).unwrap();
        assert_eq!((one.values.len(), one.proportions[0]), (1, 1.0));
        assert_eq!(
            ecdf(&[]),
            Err(StatError::TooFewValues {
                needed: 1,
                found: 0
            })
        );
        assert_eq!(ecdf(&[f64::NAN]), Err(StatError::NonFiniteValue));
    }
}
