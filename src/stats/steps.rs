//! Readable steps (1, 2, 2.5 or 5 × 10^k) and round axis ticks.
//!
//! Guarantees:
//! - A [`ReadableStep`] is exactly `s × 10^p` with `s ∈ {10, 20, 25, 50}` held as integers, so
//!   its multiples are computed as `(k·s) / 10^−p` (or `(k·s)·10^p`): one correctly rounded
//!   operation on exact integers while `|k·s| < 2^53` and `|p| ≤ 22`. Edges and ticks are
//!   therefore the doubles nearest to the decimal values (`0.6`, not `0.6000000000000001`) and
//!   never drift as `k` grows.
//! - [`readable_step`] with [`StepRounding::Nearest`] picks the candidate nearest to the raw step
//!   on a log scale (the geometric midpoints are √2, √5, √12.5 and √50 per decade); a tie goes to
//!   the larger step. [`StepRounding::Up`] picks the smallest candidate at least as large as the
//!   raw step, ignoring a relative excess of the raw step up to 1e-9 (floating noise).
//!   Both are common practice; the choice of candidates is the contract of language.md §5.
//! - [`nice_ticks`] returns ticks at whole multiples of one readable step, the first at or below
//!   `lo` and the last at or above `hi`, with a count as close as possible to the target.
//! - Raw steps outside `[1e-290, 1e290]` or not finite give `None`; nothing panics.

/// Candidate significands within one decade, times `10^(p)`: 1.0, 2.0, 2.5, 5.0 (as 10, 20,
/// 25, 50 with one more power of ten in the denominator).
const SIGNIFICANDS: [u8; 4] = [10, 20, 25, 50];

/// Smallest and largest raw step accepted; beyond these the powers of ten stop being finite.
const MIN_RAW_STEP: f64 = 1e-290;
const MAX_RAW_STEP: f64 = 1e290;

/// Relative tolerance under which a raw step counts as equal to a candidate when rounding up.
const UP_TOLERANCE: f64 = 1e-9;

/// Ticks are asked for in this range of counts.
const MIN_TICKS: usize = 2;
const MAX_TICKS: usize = 1000;

/// How a raw step is turned into a readable one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StepRounding {
    /// The nearest readable step on a log scale (ties go up).
    Nearest,
    /// The smallest readable step not below the raw step.
    Up,
}

/// A step of 1, 2, 2.5 or 5 × 10^k, held exactly.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ReadableStep {
    /// One of 10, 20, 25, 50.
    significand: u8,
    /// The step is `significand × 10^power`.
    power: i32,
}

impl ReadableStep {
    /// The step as a double.
    pub fn value(&self) -> f64 {
        self.multiple(1)
    }

    /// `k` times the step, computed from exact integers with a single rounding.
    pub fn multiple(&self, k: i64) -> f64 {
        let scaled = (k as i128 * i128::from(self.significand)) as f64;
        if self.power >= 0 {
            scaled * 10_f64.powi(self.power)
        } else {
            scaled / 10_f64.powi(-self.power)
        }
    }

    /// The largest `k` with `multiple(k) ≤ x`; `None` when `|x / step|` is too large for `k`
    /// to be exact (2^47, leaving room for the significand).
    pub fn floor_index(&self, x: f64) -> Option<i64> {
        floor_index_by(x, self.value(), |k| self.multiple(k))
    }

    /// The smallest `k` with `multiple(k) ≥ x`; `None` as for [`Self::floor_index`].
    pub fn ceil_index(&self, x: f64) -> Option<i64> {
        ceil_index_by(x, self.value(), |k| self.multiple(k))
    }

    /// The next larger readable step (1 → 2 → 2.5 → 5 → 10).
    pub fn larger(&self) -> ReadableStep {
        match self.significand {
            10 => self.with(20, self.power),
            20 => self.with(25, self.power),
            25 => self.with(50, self.power),
            _ => self.with(10, self.power + 1),
        }
    }

    /// The next smaller readable step (10 → 5 → 2.5 → 2 → 1).
    pub fn smaller(&self) -> ReadableStep {
        match self.significand {
            50 => self.with(25, self.power),
            25 => self.with(20, self.power),
            20 => self.with(10, self.power),
            _ => self.with(50, self.power - 1),
        }
    }

    fn with(&self, significand: u8, power: i32) -> ReadableStep {
        ReadableStep { significand, power }
    }
}

/// Largest index magnitude for which `k · step` is computed exactly enough (2^47).
const INDEX_LIMIT: f64 = 140_737_488_355_328.0;

/// `x / step` if its magnitude leaves integer indices exact.
fn whole_ratio(x: f64, step: f64) -> Option<f64> {
    let ratio = x / step;
    (ratio.is_finite() && ratio.abs() < INDEX_LIMIT).then_some(ratio)
}

/// The largest `k` with `multiple(k) ≤ x`, where `multiple` is increasing and close to
/// `k · step`; the estimate `⌊x / step⌋` is corrected by comparing the computed multiples.
pub(crate) fn floor_index_by(x: f64, step: f64, multiple: impl Fn(i64) -> f64) -> Option<i64> {
    let mut k = whole_ratio(x, step)?.floor() as i64;
    while multiple(k) > x {
        k -= 1;
    }
    while multiple(k + 1) <= x {
        k += 1;
    }
    Some(k)
}

/// The smallest `k` with `multiple(k) ≥ x` (see [`floor_index_by`]).
pub(crate) fn ceil_index_by(x: f64, step: f64, multiple: impl Fn(i64) -> f64) -> Option<i64> {
    let mut k = whole_ratio(x, step)?.ceil() as i64;
    while multiple(k) < x {
        k += 1;
    }
    while multiple(k - 1) >= x {
        k -= 1;
    }
    Some(k)
}

/// Rounds a raw positive step to a readable one (see the module doc for the two rules).
pub fn readable_step(raw: f64, rounding: StepRounding) -> Option<ReadableStep> {
    if !(MIN_RAW_STEP..=MAX_RAW_STEP).contains(&raw) {
        return None;
    }
    let decade = raw.log10().floor() as i32;
    // Candidates from the decade below to the decade above, ascending, cover any error in
    // log10 near a power of ten.
    let candidates = (decade - 2..=decade).flat_map(|power| {
        SIGNIFICANDS
            .iter()
            .map(move |&significand| ReadableStep { significand, power })
    });
    match rounding {
        StepRounding::Nearest => {
            let mut best: Option<(f64, ReadableStep)> = None;
            for candidate in candidates {
                let distance = (raw / candidate.value()).ln().abs();
                // `<=` lets a later (larger) candidate win a tie.
                if best.is_none_or(|(d, _)| distance <= d) {
                    best = Some((distance, candidate));
                }
            }
            best.map(|(_, step)| step)
        }
        StepRounding::Up => candidates
            .into_iter()
            .find(|c| c.value() >= raw * (1.0 - UP_TOLERANCE)),
    }
}

/// A readable step suited to a single value `v` when there is no range to divide: a tenth of
/// its magnitude, rounded to the nearest readable step, or 1 when `v` is zero (common practice).
pub fn step_for_single_value(v: f64) -> Option<ReadableStep> {
    if v == 0.0 {
        readable_step(1.0, StepRounding::Nearest)
    } else {
        readable_step(v.abs() / 10.0, StepRounding::Nearest)
    }
}

/// Round axis ticks covering `[lo, hi]`.
#[derive(Debug, Clone, PartialEq)]
pub struct Ticks {
    pub step: ReadableStep,
    /// Ascending; the first is at or below `lo`, the last at or above `hi`.
    pub values: Vec<f64>,
}

/// Round ticks covering `[lo, hi]` (either order) with about `target_count` ticks (clamped to
/// 2–1000). A zero-width range is widened by one step each side of the value. `None` for
/// non-finite bounds or magnitudes where ticks would not be exact.
pub fn nice_ticks(lo: f64, hi: f64, target_count: usize) -> Option<Ticks> {
    if !lo.is_finite() || !hi.is_finite() {
        return None;
    }
    let (lo, hi) = if lo <= hi { (lo, hi) } else { (hi, lo) };
    let target = target_count.clamp(MIN_TICKS, MAX_TICKS);
    let span = hi - lo;
    if span == 0.0 {
        let step = step_for_single_value(lo)?;
        let (low, high) = (lo - step.value(), hi + step.value());
        return ticks_with_step(step, low, high);
    }
    let base = readable_step(span / (target - 1) as f64, StepRounding::Nearest)?;
    let candidates = [
        base.smaller().smaller(),
        base.smaller(),
        base,
        base.larger(),
        base.larger().larger(),
    ];
    let mut best: Option<(usize, Ticks)> = None;
    for step in candidates {
        let Some(ticks) = ticks_with_step(step, lo, hi) else {
            continue;
        };
        let miss = ticks.values.len().abs_diff(target);
        // Candidates ascend, so `<=` lets the larger step win a tie.
        if best.as_ref().is_none_or(|(m, _)| miss <= *m) {
            best = Some((miss, ticks));
        }
    }
    best.map(|(_, ticks)| ticks)
}

fn ticks_with_step(step: ReadableStep, lo: f64, hi: f64) -> Option<Ticks> {
    let first = step.floor_index(lo)?;
    let last = step.ceil_index(hi)?;
    if last - first > 4 * MAX_TICKS as i64 {
        return None;
    }
    let values = (first..=last).map(|k| step.multiple(k)).collect();
    Some(Ticks { step, values })
}
