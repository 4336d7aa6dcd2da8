//! The smallest and largest value drawn on a numeric axis.

/// Smallest and largest finite value added, and whether a value that is not finite was added
/// (a statistic that overflowed: a figure never draws one).
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Extent {
    lo: Option<f64>,
    hi: Option<f64>,
    not_finite: bool,
}

impl Extent {
    pub fn add(&mut self, v: f64) {
        if v.is_finite() {
            self.lo = Some(self.lo.map_or(v, |l| l.min(v)));
            self.hi = Some(self.hi.map_or(v, |h| h.max(v)));
        } else {
            self.not_finite = true;
        }
    }

    /// Both extents together.
    pub fn merge(&mut self, other: Extent) {
        for v in [other.lo, other.hi].into_iter().flatten() {
            self.add(v);
        }
        self.not_finite |= other.not_finite;
    }

    /// Whether a value that is not finite was added.
    pub fn saw_not_finite(&self) -> bool {
        self.not_finite
    }

    /// (smallest, largest); (0, 1) when nothing was added.
    pub fn get(&self) -> (f64, f64) {
        match (self.lo, self.hi) {
            (Some(l), Some(h)) => (l, h),
            _ => (0.0, 1.0),
        }
    }
}
