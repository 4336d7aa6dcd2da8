//! Within-subject intervals: Cousineau (2005) normalisation with the Morey (2008) correction.
//!
//! Input is a subjects × cells matrix: one row per subject, one column per within cell (every
//! combination of the within factors the figure uses), `None` where a subject has no value.
//!
//! Guarantees:
//! - Only complete subjects are used. A subject missing any cell is dropped and counted in
//!   [`WithinIntervals::n_dropped`] (the normalisation needs every cell of a subject).
//! - Normalisation: `y'ᵢⱼ = yᵢⱼ − ȳᵢ. + ȳ..`, where `ȳᵢ.` is subject `i`'s mean over the `J`
//!   cells and `ȳ..` the grand mean of the complete subjects.
//! - Per cell: the mean is the cell's mean over complete subjects (equal to the mean of the
//!   normalised values); the sd is the sample sd of the normalised values times the Morey
//!   correction `√(J / (J − 1))`; `se = sd / √n` and `ci(L)` uses `t(1 − (1 − L)/2, n − 1)`,
//!   with `n` the number of complete subjects (language.md §5).
//! - Needs at least two cells and two complete subjects; rows must all have the same length.

use super::error::{ensure_count, StatError};
use super::interval::{spread_half_width, MeanInterval, Spread};
use super::summary::{accurate_mean, sd_about};

/// Per-cell means and within-subject intervals.
#[derive(Debug, Clone, PartialEq)]
pub struct WithinIntervals {
    /// Subjects with a value in every cell (those used).
    pub n_subjects: usize,
    /// Subjects dropped because at least one cell was missing.
    pub n_dropped: usize,
    /// One entry per cell, in column order; each `n` is `n_subjects`.
    pub cells: Vec<MeanInterval>,
}

/// Cousineau–Morey intervals of kind `spread` for each column of `rows`.
pub fn within_subject_intervals<R: AsRef<[Option<f64>]>>(
    rows: &[R],
    spread: Spread,
) -> Result<WithinIntervals, StatError> {
    let n_cells = rows.first().map_or(0, |row| row.as_ref().len());
    if let Some(row) = rows.iter().find(|row| row.as_ref().len() != n_cells) {
        return Err(StatError::LengthMismatch {
            left: n_cells,
            right: row.as_ref().len(),
        });
    }
    if n_cells < 2 {
        return Err(StatError::TooFewCells { found: n_cells });
    }
    let complete: Vec<Vec<f64>> = rows
        .iter()
        .filter_map(|row| row.as_ref().iter().copied().collect::<Option<Vec<f64>>>())
        .collect();
    if complete.iter().flatten().any(|v| !v.is_finite()) {
        return Err(StatError::NonFiniteValue);
    }
    let n_subjects = complete.len();
    ensure_count(n_subjects, 2)?;
    let all_values: Vec<f64> = complete.iter().flatten().copied().collect();
    let grand_mean = accurate_mean(&all_values);
    let normalised: Vec<Vec<f64>> = complete
        .iter()
        .map(|row| {
            let subject_mean = accurate_mean(row);
            row.iter().map(|&y| y - subject_mean + grand_mean).collect()
        })
        .collect();
    let morey = (n_cells as f64 / (n_cells as f64 - 1.0)).sqrt();
    let mut cells = Vec::with_capacity(n_cells);
    for cell in 0..n_cells {
        let raw: Vec<f64> = complete.iter().map(|row| row[cell]).collect();
        let adjusted: Vec<f64> = normalised.iter().map(|row| row[cell]).collect();
        let mean = accurate_mean(&raw);
        let sd = sd_about(&adjusted, accurate_mean(&adjusted)) * morey;
        let half_width = spread_half_width(sd, n_subjects, spread)?;
        cells.push(MeanInterval {
            n: n_subjects,
            mean,
            half_width,
            low: mean - half_width,
            high: mean + half_width,
        });
    }
    Ok(WithinIntervals {
        n_subjects,
        n_dropped: rows.len() - n_subjects,
        cells,
    })
}
