//! Why a statistic could not be computed.
//!
//! Every fallible function in [`crate::stats`] returns [`StatError`] instead of panicking or
//! producing a NaN. The variants carry enough to write a plain-English diagnostic; turning them
//! into a [`crate::diag::Diagnostic`] (with a span) is the caller's job, because only the caller
//! knows which spec text asked for the statistic.

use std::fmt;

/// The reason a statistic is undefined for the given input.
#[derive(Debug, Clone, PartialEq)]
pub enum StatError {
    /// Fewer values than the statistic needs (e.g. an sd needs two).
    TooFewValues { needed: usize, found: usize },
    /// A value is NaN or infinite; callers are expected to drop missing values first.
    NonFiniteValue,
    /// A probability outside `[0, 1]`.
    InvalidProbability(f64),
    /// A confidence level outside the open interval `(0, 1)`.
    InvalidLevel(f64),
    /// A requested bin width or bandwidth that is not a positive finite number.
    InvalidWidth(f64),
    /// A requested bin count of zero.
    InvalidBinCount,
    /// Degrees of freedom that are not positive.
    InvalidDegreesOfFreedom(f64),
    /// Two inputs that must pair up have different lengths.
    LengthMismatch { left: usize, right: usize },
    /// All values are equal where a statistic needs spread (a slope needs distinct x values,
    /// a kernel bandwidth rule needs a positive sd).
    NoSpread,
    /// Within-subject intervals need at least two within cells.
    TooFewCells { found: usize },
    /// A width so small relative to the data's magnitude that bin edges would not be distinct
    /// doubles, or would need more than [`crate::stats::histogram::MAX_BINS`] bins.
    WidthTooFine { width: f64 },
    /// A value is zero or negative where its logarithm is needed (a geometric mean, a fit on
    /// logs).
    NotPositive,
    /// A value is below zero where the statistic has a boundary at zero (a reflected density of
    /// a ratio variable).
    Negative,
    /// A count of successes larger than the number of trials.
    SuccessesExceedTrials { successes: u64, trials: u64 },
    /// A BCa interval is undefined: every bootstrap replicate lies on one side of the estimate
    /// (the bias correction is infinite), or the acceleration is too large for the level.
    BcaUndefined,
    /// A result is beyond the range of double-precision numbers (values near ±1.8e308, or
    /// squares of differences beyond it).
    Overflow,
}

impl fmt::Display for StatError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            StatError::TooFewValues { needed, found } => {
                write!(f, "needs at least {needed} values, found {found}")
            }
            StatError::NonFiniteValue => write!(f, "a value is not a finite number"),
            StatError::InvalidProbability(p) => {
                write!(f, "probability {p} is outside 0 to 1")
            }
            StatError::InvalidLevel(l) => {
                write!(f, "confidence level {l} is not strictly between 0 and 1")
            }
            StatError::InvalidWidth(w) => write!(f, "width {w} is not a positive number"),
            StatError::InvalidBinCount => write!(f, "the number of bins must be at least 1"),
            StatError::InvalidDegreesOfFreedom(df) => {
                write!(f, "degrees of freedom {df} must be positive")
            }
            StatError::LengthMismatch { left, right } => {
                write!(
                    f,
                    "paired inputs have different lengths ({left} and {right})"
                )
            }
            StatError::NoSpread => write!(f, "all values are equal, so there is no spread"),
            StatError::TooFewCells { found } => write!(
                f,
                "within-subject intervals need at least 2 within cells, found {found}"
            ),
            StatError::WidthTooFine { width } => write!(
                f,
                "width {width} is too fine for the magnitude or range of the values"
            ),
            StatError::NotPositive => {
                write!(f, "a value is zero or negative, so it has no logarithm")
            }
            StatError::Negative => write!(f, "a value is below zero"),
            StatError::SuccessesExceedTrials { successes, trials } => {
                write!(f, "{successes} successes is more than the {trials} trials")
            }
            StatError::Overflow => write!(
                f,
                "a result is beyond the range of double-precision numbers"
            ),
            StatError::BcaUndefined => write!(
                f,
                "the bias-corrected interval is undefined: the bootstrap replicates all lie on \
                 one side of the estimate, or the skew is too large for the level"
            ),
        }
    }
}

impl std::error::Error for StatError {}

/// Checks that every value is finite.
pub(crate) fn ensure_finite(values: &[f64]) -> Result<(), StatError> {
    if values.iter().all(|v| v.is_finite()) {
        Ok(())
    } else {
        Err(StatError::NonFiniteValue)
    }
}

/// Checks that there are at least `needed` values.
pub(crate) fn ensure_count(found: usize, needed: usize) -> Result<(), StatError> {
    if found >= needed {
        Ok(())
    } else {
        Err(StatError::TooFewValues { needed, found })
    }
}

/// Checks that a confidence level lies strictly between 0 and 1.
pub(crate) fn ensure_level(level: f64) -> Result<(), StatError> {
    if level > 0.0 && level < 1.0 {
        Ok(())
    } else {
        Err(StatError::InvalidLevel(level))
    }
}
