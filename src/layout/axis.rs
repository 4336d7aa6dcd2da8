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
            return Self::log(scale);
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

    fn log(scale: &NumScale) -> NumAxisMap {
        let (lo, hi) = scale.range.unwrap_or(scale.extent);
        let (lo, hi) = (lo.max(f64::MIN_POSITIVE), hi.max(f64::MIN_POSITIVE));
        let (llo, lhi) = (
            lo.log10().floor(),
            hi.log10().ceil().max(lo.log10().floor() + 1.0),
        );
        let decades = (lhi - llo) as i32;
        let multipliers: &[f64] = if decades <= 1 {
            &[1.0, 2.0, 5.0]
        } else if decades <= 3 {
            &[1.0, 3.0]
        } else {
            &[1.0]
        };
        let mut ticks = Vec::new();
        for d in (llo as i32)..=(lhi as i32) {
            for m in multipliers {
                let v = m * 10f64.powi(d);
                if v >= lo * (1.0 - 1e-9) && v <= hi * (1.0 + 1e-9)
                    || (scale.range.is_none() && (*m == 1.0))
                {
                    ticks.push(v);
                }
            }
        }
        let (dlo, dhi) = match scale.range {
            Some((a, b)) => (a.log10(), b.log10()),
            None => {
                let first = ticks
                    .iter()
                    .copied()
                    .filter(|t| *t <= lo)
                    .fold(lo, f64::min);
                let last = ticks
                    .iter()
                    .copied()
                    .filter(|t| *t >= hi)
                    .fold(hi, f64::max);
                (first.log10(), last.log10())
            }
        };
        ticks.retain(|t| t.log10() >= dlo - 1e-9 && t.log10() <= dhi + 1e-9);
        ticks.dedup();
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

/// A log-axis tick: plain numbers from 0.001 to 100 000, powers of ten beyond.
fn format_log_tick(v: f64) -> String {
    if (1e-3..=1e5).contains(&v) {
        let d = if v >= 1.0 {
            0
        } else {
            (-v.log10().floor()) as usize
        };
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
        assert!(axis.ticks.contains(&10.0) && axis.ticks.contains(&1000.0));
    }
}
