//! Figures whose content does not fit their size: what does not fit, and the smallest size
//! that would hold it.
//!
//! The smallest size is searched, not guessed: the page is solved again at larger sizes (the
//! solve is pure and cheap). First both sides grow by one factor until everything fits, then
//! each side is brought back as far as it can go, width first. Sizes are whole millimetres, at
//! most the largest size a figure may have.

use crate::check::plan::FigurePlan;
use crate::check::SIZE_LIMITS_MM;
use crate::compute::FigureData;
use crate::diag::{Code, Diagnostic};

/// What does not fit a figure's size, and the smallest size that would hold it.
#[derive(Debug, Clone, PartialEq)]
pub struct Crowding {
    /// What does not fit, in words, each once.
    pub problems: Vec<String>,
    /// The smallest size (width, height in mm) at which everything fits; `None` when even the
    /// largest size does not.
    pub smallest: Option<(f64, f64)>,
    /// The number of columns the grid takes at that size (the crowded figure is drawn so).
    pub(super) cols: Option<usize>,
}

impl Crowding {
    /// What does not fit `plan`'s size. The problems are those of the grid the figure takes at
    /// the smallest size that fits (its number of columns), so the message describes the
    /// arrangement the user will get by growing the figure.
    pub(super) fn new(plan: &FigurePlan, data: &FigureData) -> Crowding {
        let size = (plan.width_mm, plan.height_mm);
        let smallest = smallest_size(plan, data);
        let cols = smallest.map(|s| super::page_at(plan, data, s, None).grid.cols);
        let problems = super::page_at(plan, data, size, cols).problems;
        let mut words: Vec<String> = Vec::new();
        for p in problems {
            if !words.contains(&p.what) {
                words.push(p.what);
            }
        }
        Crowding {
            problems: words,
            smallest,
            cols,
        }
    }

    /// The diagnostic: F0124, or W0003 when the figure is built anyway (`--allow-crowding`).
    pub fn diagnostic(&self, plan: &FigurePlan, allowed: bool) -> Diagnostic {
        let code = if allowed {
            Code::CrowdingAllowed
        } else {
            Code::FigureCrowded
        };
        let message = format!(
            "figure `{}` does not fit {} × {} mm: {}",
            plan.name,
            whole(plan.width_mm),
            whole(plan.height_mm),
            self.problems.join("; ")
        );
        let fix = match self.smallest {
            Some((w, h)) => format!(
                "the smallest size that holds it is {} × {} mm: write `size {}mm x {}mm`, or show less (fewer panels or levels, shorter labels)",
                whole(w),
                whole(h),
                whole(w),
                whole(h)
            ),
            None => format!(
                "it does not fit even at {} × {} mm: show less (fewer panels or levels, shorter labels)",
                whole(SIZE_LIMITS_MM.1),
                whole(SIZE_LIMITS_MM.1)
            ),
        };
        let help = if allowed {
            format!("built crowded, as `--allow-crowding` asks; {fix}")
        } else {
            format!("{fix}; `--allow-crowding` builds it crowded")
        };
        Diagnostic::new(code, message)
            .with_label(plan.size_span, "the figure's size")
            .with_help(help)
    }
}

fn whole(v: f64) -> String {
    format!("{v:.0}")
}

/// The smallest size, in whole millimetres, at which the figure's content fits.
fn smallest_size(plan: &FigurePlan, data: &FigureData) -> Option<(f64, f64)> {
    let fits = |w: f64, h: f64| super::page_at(plan, data, (w, h), None).problems.is_empty();
    let (w0, h0) = (plan.width_mm.ceil(), plan.height_mm.ceil());
    let most = SIZE_LIMITS_MM.1;
    let top = (most / w0).min(most / h0);
    if !fits((w0 * top).min(most), (h0 * top).min(most)) {
        return None;
    }
    // Grow both sides by one factor (bisection on the factor, to 1%).
    let (mut lo, mut hi) = (1.0, top);
    while hi - lo > 0.01 {
        let mid = (lo + hi) / 2.0;
        if fits((w0 * mid).ceil().min(most), (h0 * mid).ceil().min(most)) {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    let (mut w, mut h) = ((w0 * hi).ceil().min(most), (h0 * hi).ceil().min(most));
    // Then take each side back as far as it goes, holding the other.
    w = least(w0, w, |w| fits(w, h));
    h = least(h0, h, |h| fits(w, h));
    Some((w, h))
}

/// The least whole value in `[lo, hi]` that `ok` accepts, given that `hi` is accepted.
fn least(lo: f64, hi: f64, ok: impl Fn(f64) -> bool) -> f64 {
    let (mut lo, mut hi) = (lo, hi);
    if ok(lo) {
        return lo;
    }
    while hi - lo > 1.0 {
        let mid = ((lo + hi) / 2.0).floor();
        if ok(mid) {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    hi
}
