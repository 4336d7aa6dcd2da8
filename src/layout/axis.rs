//! Axes: mapping data values to millimetres, and choosing readable ticks and their labels.

use crate::compute::NumScale;
use crate::stats;

use super::style::AXIS_PAD;

/// A numeric axis: domain (data units, or log10 of them) → a span of millimetres.
#[derive(Debug, Clone)]
pub struct NumAxisMap {
    /// Domain ends, in axis units (log10 of the value on a log axis).
    lo: f64,
    hi: f64,
    log: bool,
    /// Tick values in data units, all inside the domain.
    pub ticks: Vec<f64>,
    /// Tick labels, one per tick.
    pub labels: Vec<String>,
}

impl NumAxisMap {
    /// Builds the axis for a numeric scale with about `target` labelled ticks (at least 3 when
    /// the data allow: a step that leaves fewer inside the axis is passed over).
    pub fn new(scale: &NumScale, target: usize) -> NumAxisMap {
        if scale.log {
            return Self::log(scale, target);
        }
        let mut best = Self::linear(scale, target);
        for more in 1..=3 {
            if best.ticks.len() >= target.min(4) {
                break;
            }
            best = Self::linear(scale, target + more);
        }
        best
    }

    fn linear(scale: &NumScale, target: usize) -> NumAxisMap {
        let (mut lo, mut hi) = scale.range.unwrap_or(scale.extent);
        if scale.range.is_none() && scale.include_zero {
            lo = lo.min(0.0);
            hi = hi.max(0.0);
        }
        let ticks = stats::nice_ticks(lo, hi, target);
        let (step, values) = match &ticks {
            Some(t) => (t.step.value(), t.values.clone()),
            None => (hi - lo, vec![lo, hi]),
        };
        let (dlo, dhi) = match scale.range {
            Some(r) => r,
            None => {
                // Data-driven axes end at the outer ticks when that wastes little room,
                // otherwise just beyond the data.
                let pad = (hi - lo).max(step) * AXIS_PAD;
                let first = values.first().copied().unwrap_or(lo);
                let last = values.last().copied().unwrap_or(hi);
                let dlo = if scale.include_zero && lo >= 0.0 {
                    0.0
                } else if lo - first <= pad * 2.0 {
                    first
                } else {
                    lo - pad
                };
                let dhi = if hi - last >= -pad * 2.0 {
                    last
                } else {
                    hi + pad
                };
                (dlo.min(lo), dhi.max(hi))
            }
        };
        let ticks: Vec<f64> = values
            .into_iter()
            .filter(|t| *t >= dlo - 1e-9 * step && *t <= dhi + 1e-9 * step)
            .collect();
        let labels = ticks.iter().map(|t| format_tick(*t, step)).collect();
        NumAxisMap {
            lo: dlo,
            hi: dhi,
            log: false,
            ticks,
            labels,
        }
    }

    /// A log axis: the data's span padded in log units (or the given range), with ticks at
    /// powers of ten, then 1-2-5, then 1-2-3-5 multiples, whichever is the coarsest to give
    /// three ticks; many decades keep every k-th power of ten; a span too narrow for any of
    /// these gets round linear ticks, which read as well on a short log axis.
    fn log(scale: &NumScale, target: usize) -> NumAxisMap {
        let (lo, hi) = scale.range.unwrap_or(scale.extent);
        let lo = lo.max(f64::MIN_POSITIVE);
        let hi = hi.max(lo);
        let (dlo, dhi) = match scale.range {
            Some(_) => (lo.log10(), hi.log10()),
            None => {
                let (a, b) = (lo.log10(), hi.log10());
                let pad = (b - a).max(0.1) * AXIS_PAD;
                (a - pad, b + pad)
            }
        };
        let inside = |v: f64| v.log10() >= dlo - 1e-9 && v.log10() <= dhi + 1e-9;
        let ticks = LOG_MULTIPLIERS
            .iter()
            .map(|set| log_ticks(dlo, dhi, set))
            .find(|t| t.len() >= 3)
            .map(|t| thin_decades(t, target))
            .unwrap_or_else(|| {
                stats::nice_ticks(10f64.powf(dlo), 10f64.powf(dhi), target)
                    .map(|t| {
                        t.values
                            .into_iter()
                            .filter(|v| *v > 0.0 && inside(*v))
                            .collect()
                    })
                    .unwrap_or_default()
            });
        let labels = ticks.iter().map(|t| format_log_tick(*t)).collect();
        NumAxisMap {
            lo: dlo,
            hi: dhi,
            log: true,
            ticks,
            labels,
        }
    }

    /// Position of a value as a fraction of the axis from its low end (0) to its high end (1).
    pub fn frac(&self, v: f64) -> f64 {
        let v = if self.log {
            v.max(f64::MIN_POSITIVE).log10()
        } else {
            v
        };
        if self.hi == self.lo {
            0.5
        } else {
            (v - self.lo) / (self.hi - self.lo)
        }
    }
}

/// A tick label with as many decimals as the step needs; negative numbers use a true minus.
pub fn format_tick(v: f64, step: f64) -> String {
    let decimals = decimals_for(step);
    let text = format!("{:.*}", decimals, v);
    let text = if text
        .trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        text.trim_start_matches('-').to_string()
    } else {
        text
    };
    text.replacen('-', "\u{2212}", 1)
}

fn decimals_for(step: f64) -> usize {
    for d in 0..12 {
        let scaled = step * 10f64.powi(d as i32);
        if (scaled - scaled.round()).abs() < 1e-6 * scaled.abs().max(1.0) {
            return d;
        }
    }
    12
}

/// Tick multipliers of a log axis, coarsest first.
const LOG_MULTIPLIERS: [&[f64]; 3] = [&[1.0], &[1.0, 2.0, 5.0], &[1.0, 2.0, 3.0, 5.0]];

/// Every `m × 10^k` with `m` in `multipliers` whose log10 lies in `[dlo, dhi]`, ascending.
fn log_ticks(dlo: f64, dhi: f64, multipliers: &[f64]) -> Vec<f64> {
    let mut out = Vec::new();
    for k in (dlo.floor() as i32)..=(dhi.ceil() as i32) {
        for m in multipliers {
            let v = m * 10f64.powi(k);
            let l = v.log10();
            if l >= dlo - 1e-9 && l <= dhi + 1e-9 {
                out.push(v);
            }
        }
    }
    out
}

/// Keeps every k-th power of ten when there are far more than `target`.
fn thin_decades(ticks: Vec<f64>, target: usize) -> Vec<f64> {
    let every = ticks.len().div_ceil(target.max(2) + 2).max(1);
    if every == 1 {
        return ticks;
    }
    ticks
        .into_iter()
        .filter(|t| (t.log10().round() as i64).rem_euclid(every as i64) == 0)
        .collect()
}

/// A log-axis tick: plain numbers from 0.001 to 100 000 with the decimals the value needs,
/// powers of ten beyond.
fn format_log_tick(v: f64) -> String {
    if (1e-3..=1e5).contains(&v) {
        let d = (0..=6)
            .find(|&d| {
                let scaled = v * 10f64.powi(d);
                (scaled - scaled.round()).abs() < 1e-6 * scaled.max(1.0)
            })
            .unwrap_or(6) as usize;
        format!("{:.*}", d, v)
    } else {
        format!("10^{}", v.log10().round() as i32)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scale(lo: f64, hi: f64) -> NumScale {
        NumScale {
            title: String::new(),
            extent: (lo, hi),
            range: None,
            log: false,
            include_zero: false,
        }
    }

    #[test]
    fn ticks_are_round_and_inside_the_domain() {
        let axis = NumAxisMap::new(&scale(3.2, 47.9), 5);
        assert_eq!(axis.labels, ["0", "10", "20", "30", "40", "50"]);
        assert!(axis.frac(3.2) >= 0.0 && axis.frac(47.9) <= 1.0);
    }

    #[test]
    fn labels_use_the_decimals_the_step_needs() {
        assert_eq!(format_tick(0.25, 0.25), "0.25");
        assert_eq!(format_tick(-1.5, 0.5), "\u{2212}1.5");
        assert_eq!(format_tick(-0.0, 1.0), "0");
    }

    #[test]
    fn log_ticks_are_powers_of_ten() {
        let mut s = scale(3.0, 4200.0);
        s.log = true;
        let axis = NumAxisMap::new(&s, 5);
        assert_eq!(axis.labels, ["10", "100", "1000"]);
        assert!(axis.frac(3.0) >= 0.0 && axis.frac(4200.0) <= 1.0);
    }

    #[test]
    fn short_log_axes_use_one_two_five_or_finer() {
        let mut s = scale(0.15, 0.9);
        s.log = true;
        assert_eq!(NumAxisMap::new(&s, 5).labels, ["0.2", "0.3", "0.5"]);
        let mut s = scale(330.0, 620.0);
        s.log = true;
        let axis = NumAxisMap::new(&s, 5);
        // Less than a factor of two: round linear steps inside the span.
        assert_eq!(axis.labels, ["400", "500", "600"]);
        assert!(axis.frac(330.0) >= 0.0 && axis.frac(620.0) <= 1.0);
    }

    #[test]
    fn many_decades_keep_every_other_power() {
        let mut s = scale(1e-2, 1e9);
        s.log = true;
        let axis = NumAxisMap::new(&s, 5);
        assert!(axis.ticks.len() <= 7, "{:?}", axis.labels);
        assert!(axis.ticks.windows(2).all(|w| w[1] > w[0]));
    }
}
