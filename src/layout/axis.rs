//! Axes: mapping data values to millimetres, and choosing readable ticks and their labels.
//!
//! Guarantees:
//! - Every finite double can be laid out: a linear axis whose values are beyond about 1e250 or
//!   below 1e-250 in magnitude is measured in a power of ten of those values (its *unit*), so
//!   its span, steps and positions stay finite; ticks whose value is not a finite double are
//!   left out.
//! - Labels are plain decimals (with the decimals the step needs) while the largest tick's
//!   magnitude is from 0.001 to under 1 000 000 on a linear axis (0.001 to 100 000 on a log
//!   axis), and otherwise `m×10ᵏ` with the exponent written in superscript digits (the font's
//!   own raised, smaller figures): `2.5×10⁴⁰`, `−3×10⁻³⁰`; on a log axis a power of ten is
//!   written `10ᵏ`. Negative numbers start with a minus sign (drawn as an en dash, which the
//!   bundled font has and which matches a minus in length and height), except on an axis of
//!   sizes either side of zero (a diverging stack), whose labels are unsigned.

use crate::compute::NumScale;
use crate::stats;

use super::style::AXIS_PAD;

/// A numeric axis: domain (data units, or log10 of them) → a span of millimetres.
#[derive(Debug, Clone)]
pub struct NumAxisMap {
    /// Domain ends, in axis units: the value divided by `10^unit_exp` on a linear axis, log10
    /// of the value on a log axis.
    lo: f64,
    hi: f64,
    log: bool,
    /// The power of ten a linear axis measures its values in (0 unless they are extreme).
    unit_exp: i32,
    /// Whether the labels are in scientific notation (about twice as wide as plain ones).
    scientific: bool,
    /// Tick values in data units, all inside the domain.
    pub ticks: Vec<f64>,
    /// Tick labels, one per tick.
    pub labels: Vec<String>,
}

/// Which of a linear axis's round ticks it keeps.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Labelled {
    Every,
    /// The even multiples of the step (for wide labels).
    EveryOther,
}

/// Magnitudes beyond which a linear axis measures its values in a power of ten of them.
const UNIT_LIMITS: (f64, f64) = (1e-250, 1e250);

impl NumAxisMap {
    /// Builds the axis for a numeric scale with about `target` labelled ticks (at least 3 when
    /// the data allow: a step that leaves fewer inside the axis is passed over).
    pub fn new(scale: &NumScale, target: usize) -> NumAxisMap {
        let mut map = Self::signed(scale, target);
        if scale.magnitudes {
            for label in &mut map.labels {
                *label = label.trim_start_matches(MINUS).to_string();
            }
        }
        map
    }

    fn signed(scale: &NumScale, target: usize) -> NumAxisMap {
        if scale.log {
            return Self::log(scale, target);
        }
        let mut chosen = target;
        let mut best = Self::linear(scale, target, Labelled::Every);
        for more in 1..=3 {
            if best.ticks.len() >= target.min(4) {
                break;
            }
            chosen = target + more;
            best = Self::linear(scale, chosen, Labelled::Every);
        }
        // Scientific labels are about twice as wide as plain ones: keep every other tick.
        if best.scientific && best.ticks.len() > 4 {
            best = Self::linear(scale, chosen, Labelled::EveryOther);
        }
        best
    }

    fn linear(scale: &NumScale, target: usize, labelled: Labelled) -> NumAxisMap {
        let (mut lo, mut hi) = scale.range.unwrap_or(scale.extent);
        if scale.range.is_none() && scale.include_zero {
            lo = lo.min(0.0);
            hi = hi.max(0.0);
        }
        let unit_exp = unit_exponent(lo, hi);
        let (lo, hi) = (times_pow10(lo, -unit_exp), times_pow10(hi, -unit_exp));
        let ticks = stats::nice_ticks(lo, hi, target);
        let (step, values) = match &ticks {
            Some(t) => (t.step.value(), t.values.clone()),
            None => (hi - lo, vec![lo, hi]),
        };
        let (dlo, dhi) = match scale.range {
            Some(_) => (lo, hi),
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
        let inside: Vec<f64> = values
            .into_iter()
            .filter(|t| *t >= dlo - 1e-9 * step && *t <= dhi + 1e-9 * step)
            .filter(|t| times_pow10(*t, unit_exp).is_finite())
            .filter(|t| labelled == Labelled::Every || (t / step).round() % 2.0 == 0.0)
            .collect();
        let largest = inside.iter().fold(0.0_f64, |m, t| m.max(t.abs()));
        let plain = unit_exp == 0 && (largest == 0.0 || (1e-3..1e6).contains(&largest));
        let labels = inside
            .iter()
            .map(|t| {
                if plain {
                    format_tick(*t, step)
                } else {
                    scientific(*t, unit_exp, Mantissa::Always)
                }
            })
            .collect();
        NumAxisMap {
            lo: dlo,
            hi: dhi,
            log: false,
            unit_exp,
            scientific: !plain,
            ticks: inside.iter().map(|t| times_pow10(*t, unit_exp)).collect(),
            labels,
        }
    }

    /// A log axis: the data's span padded in log units (or the given range), with ticks at
    /// powers of ten, then 1-2-5, then 1-2-3-5 multiples, whichever is the coarsest to give
    /// three ticks; many decades keep every k-th power of ten; a span too narrow for any of
    /// these gets round linear ticks, which read as well on a short log axis.
    fn log(scale: &NumScale, target: usize) -> NumAxisMap {
        let (lo, hi) = scale.range.unwrap_or(scale.extent);
        // The smallest positive double: values on a log axis are positive (F0114).
        let lo = lo.max(f64::from_bits(1));
        let hi = hi.max(lo);
        let (dlo, dhi) = match scale.range {
            Some(_) => (lo.log10(), hi.log10()),
            None => {
                let (a, b) = (lo.log10(), hi.log10());
                let pad = (b - a).max(0.1) * AXIS_PAD;
                (a - pad, b + pad)
            }
        };
        let (ticks, labels) = LOG_MULTIPLIERS
            .iter()
            .map(|set| log_ticks(dlo, dhi, set))
            .find(|t| t.len() >= 3)
            .map(|t| thin_decades(t, target))
            .map(|t| {
                let labels = t.iter().map(LogTick::label).collect();
                (t.iter().map(|t| t.value).collect(), labels)
            })
            .unwrap_or_else(|| short_log_ticks(dlo, dhi, target));
        NumAxisMap {
            lo: dlo,
            hi: dhi,
            log: true,
            unit_exp: 0,
            scientific: false,
            ticks,
            labels,
        }
    }

    /// Position of a value as a fraction of the axis from its low end (0) to its high end (1).
    pub fn frac(&self, v: f64) -> f64 {
        let v = if self.log {
            v.max(f64::from_bits(1)).log10()
        } else {
            times_pow10(v, -self.unit_exp)
        };
        if self.hi == self.lo {
            0.5
        } else {
            (v - self.lo) / (self.hi - self.lo)
        }
    }
}

/// The power of ten a linear axis over `[lo, hi]` measures its values in: 0 for every
/// magnitude from 1e-250 to 1e250 (so ordinary axes are exactly as computed), else the
/// decade of the larger magnitude, which brings the axis's values near 1.
fn unit_exponent(lo: f64, hi: f64) -> i32 {
    let largest = lo.abs().max(hi.abs());
    if largest == 0.0 || (UNIT_LIMITS.0..=UNIT_LIMITS.1).contains(&largest) {
        0
    } else {
        largest.log10().floor() as i32
    }
}

/// `v · 10^e`, applied in factors of at most 10^300 so that no factor overflows or underflows.
fn times_pow10(v: f64, e: i32) -> f64 {
    let (mut v, mut e) = (v, e);
    while e > 300 {
        v *= 1e300;
        e -= 300;
    }
    while e < -300 {
        v /= 1e300;
        e += 300;
    }
    if e >= 0 {
        v * 10f64.powi(e)
    } else {
        v / 10f64.powi(-e)
    }
}

/// Round linear ticks inside a short log axis `[dlo, dhi]` (log10 units), with their labels.
fn short_log_ticks(dlo: f64, dhi: f64, target: usize) -> (Vec<f64>, Vec<String>) {
    let (lo, hi) = (10f64.powf(dlo), 10f64.powf(dhi));
    let unit_exp = unit_exponent(lo, hi);
    let Some(ticks) = stats::nice_ticks(
        times_pow10(lo, -unit_exp),
        times_pow10(hi, -unit_exp),
        target,
    ) else {
        return (Vec::new(), Vec::new());
    };
    let inside: Vec<f64> = ticks
        .values
        .into_iter()
        .filter(|t| {
            let v = times_pow10(*t, unit_exp);
            *t > 0.0 && v.is_finite() && v.log10() >= dlo - 1e-9 && v.log10() <= dhi + 1e-9
        })
        .collect();
    let labels = inside
        .iter()
        .map(|t| {
            let v = times_pow10(*t, unit_exp);
            if unit_exp == 0 && (1e-3..=1e5).contains(&v) {
                plain_log_label(v)
            } else {
                scientific(*t, unit_exp, Mantissa::Always)
            }
        })
        .collect();
    (
        inside.iter().map(|t| times_pow10(*t, unit_exp)).collect(),
        labels,
    )
}

/// A tick label with as many decimals as the step needs; negative numbers start with a minus.
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
    text.replacen('-', MINUS, 1)
}

/// The minus sign of labels: an en dash, as long and as high as a minus (the bundled font has
/// no U+2212 MINUS SIGN).
const MINUS: &str = "\u{2013}";

fn decimals_for(step: f64) -> usize {
    for d in 0..12 {
        let scaled = step * 10f64.powi(d as i32);
        if (scaled - scaled.round()).abs() < 1e-6 * scaled.abs().max(1.0) {
            return d;
        }
    }
    12
}

/// Whether a scientific label writes a mantissa of 1.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Mantissa {
    /// `1×10⁴¹`, as its neighbours `5×10⁴⁰` on a linear axis.
    Always,
    /// `10⁴¹`, the powers of ten of a log axis.
    OmitOne,
}

/// `m×10ᵏ` for the value `scaled · 10^unit_exp`, with `1 ≤ |m| < 10` (up to 12 significant
/// digits, trailing zeros dropped) and `k` in superscript digits; `0` for zero.
fn scientific(scaled: f64, unit_exp: i32, mantissa: Mantissa) -> String {
    if scaled == 0.0 {
        return "0".to_string();
    }
    let text = format!("{:.11e}", scaled.abs());
    let (digits, exp) = text.split_once('e').unwrap_or((text.as_str(), "0"));
    let digits = if digits.contains('.') {
        digits.trim_end_matches('0').trim_end_matches('.')
    } else {
        digits
    };
    let exp = exp.parse::<i32>().unwrap_or(0) + unit_exp;
    let sign = if scaled < 0.0 { MINUS } else { "" };
    let power = format!("10{}", superscript(exp));
    match (mantissa, digits) {
        (Mantissa::OmitOne, "1") => format!("{sign}{power}"),
        _ => format!("{sign}{digits}×{power}"),
    }
}

/// An integer in superscript digits (`⁻³⁰`).
fn superscript(n: i32) -> String {
    const DIGITS: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
    let mut out = String::new();
    if n < 0 {
        out.push('⁻');
    }
    for c in n.unsigned_abs().to_string().chars() {
        if let Some(d) = c.to_digit(10) {
            out.push(DIGITS[d as usize]);
        }
    }
    out
}

/// Tick multipliers of a log axis, coarsest first.
const LOG_MULTIPLIERS: [&[f64]; 3] = [&[1.0], &[1.0, 2.0, 5.0], &[1.0, 2.0, 3.0, 5.0]];

/// A tick of a log axis, `m × 10^k`.
#[derive(Debug, Clone, Copy)]
struct LogTick {
    m: f64,
    k: i32,
    value: f64,
}

impl LogTick {
    /// Plain numbers from 0.001 to 100 000 with the decimals the value needs, `10ᵏ` and
    /// `m×10ᵏ` beyond (from `m` and `k`, so that subnormal values are labelled exactly).
    fn label(&self) -> String {
        if (1e-3..=1e5).contains(&self.value) {
            plain_log_label(self.value)
        } else {
            scientific(self.m, self.k, Mantissa::OmitOne)
        }
    }
}

/// A log-axis label from 0.001 to 100 000: the value with the decimals it needs.
fn plain_log_label(v: f64) -> String {
    let d = (0..=6)
        .find(|&d| {
            let scaled = v * 10f64.powi(d);
            (scaled - scaled.round()).abs() < 1e-6 * scaled.max(1.0)
        })
        .unwrap_or(6) as usize;
    format!("{:.*}", d, v)
}

/// Every `m × 10^k` with `m` in `multipliers` whose log10 lies in `[dlo, dhi]` and whose value
/// is a positive finite double, ascending.
fn log_ticks(dlo: f64, dhi: f64, multipliers: &[f64]) -> Vec<LogTick> {
    let mut out = Vec::new();
    for k in (dlo.floor() as i32)..=(dhi.ceil() as i32) {
        for &m in multipliers {
            let value = times_pow10(m, k);
            let l = m.log10() + f64::from(k);
            if value > 0.0 && value.is_finite() && l >= dlo - 1e-9 && l <= dhi + 1e-9 {
                out.push(LogTick { m, k, value });
            }
        }
    }
    out
}

/// Keeps every k-th power of ten when there are far more than `target`.
fn thin_decades(ticks: Vec<LogTick>, target: usize) -> Vec<LogTick> {
    let every = ticks.len().div_ceil(target.max(2) + 2).max(1);
    if every == 1 {
        return ticks;
    }
    ticks
        .into_iter()
        .filter(|t| ((t.m.log10() + f64::from(t.k)).round() as i64).rem_euclid(every as i64) == 0)
        .collect()
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
            magnitudes: false,
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
        assert_eq!(format_tick(-1.5, 0.5), "\u{2013}1.5");
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

    // Reference: the labelling rule of the module doc (common practice: scientific notation
    // with a superscript exponent); the values are the extreme magnitudes.
    #[test]
    fn extreme_magnitudes_get_short_scientific_labels() {
        let axis = NumAxisMap::new(&scale(2e40, 1.2e41), 5);
        assert!(axis
            .labels
            .iter()
            .all(|l| l.ends_with("10⁴⁰") || l.ends_with("10⁴¹")));
        assert!(
            axis.labels.contains(&"5×10⁴⁰".to_string()),
            "{:?}",
            axis.labels
        );
        let axis = NumAxisMap::new(&scale(-3e-30, 5e-30), 5);
        assert!(axis.labels.contains(&"0".to_string()), "{:?}", axis.labels);
        assert!(
            axis.labels
                .iter()
                .any(|l| l.starts_with('\u{2013}') && l.ends_with("10⁻³⁰")),
            "{:?}",
            axis.labels
        );
        // The whole range of doubles: measured in units of 10^308, every tick finite.
        let axis = NumAxisMap::new(&scale(-1.7e308, 1.7e308), 5);
        assert_eq!(axis.labels, ["\u{2013}1×10³⁰⁸", "0", "1×10³⁰⁸"]);
        assert!(axis.ticks.iter().all(|t| t.is_finite()));
        assert!((axis.frac(0.0) - 0.5).abs() < 1e-12);
        assert!(axis.frac(-1.7e308) >= 0.0 && axis.frac(1.7e308) <= 1.0);
        // Subnormal values keep exact labels.
        let axis = NumAxisMap::new(&scale(0.0, 1e-319), 5);
        assert_eq!(axis.labels.last().map(String::as_str), Some("1×10⁻³¹⁹"));
        // Plain from 0.001 to under 1 000 000.
        assert_eq!(
            NumAxisMap::new(&scale(0.0, 400_000.0), 5).labels,
            ["0", "100000", "200000", "300000", "400000"]
        );
        assert_eq!(scientific(-2.5, 40, Mantissa::Always), "\u{2013}2.5×10⁴⁰");
        assert_eq!(scientific(1.0, -7, Mantissa::OmitOne), "10⁻⁷");
        assert_eq!(scientific(9.99999999999999, 2, Mantissa::Always), "1×10³");
    }

    #[test]
    fn log_axes_beyond_the_plain_range_write_powers_with_superscripts() {
        let mut s = scale(3e6, 4e12);
        s.log = true;
        let axis = NumAxisMap::new(&s, 5);
        assert!(
            axis.labels.iter().all(|l| l.starts_with("10")),
            "{:?}",
            axis.labels
        );
        assert!(
            axis.labels.contains(&"10⁹".to_string()),
            "{:?}",
            axis.labels
        );
        let mut s = scale(1e-320, 1e-300);
        s.log = true;
        let axis = NumAxisMap::new(&s, 5);
        assert!(
            axis.labels.iter().all(|l| l.starts_with("10⁻³")),
            "{:?}",
            axis.labels
        );
        assert!(axis.frac(1e-320) >= 0.0 && axis.frac(1e-300) <= 1.0);
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
