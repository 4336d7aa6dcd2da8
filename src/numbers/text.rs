//! Numbers written for reading: how many digits, the unit, intervals.
//!
//! The rules (common practice in reporting results; no single source):
//!
//! - The numbers of one cell of a layer that are in the measured variable's unit (mean, sd,
//!   se, interval ends, median, quartiles, whisker ends, min, max, outliers) share one number
//!   of decimals, chosen so that the cell's uncertainty shows two significant digits: the
//!   width of its interval; else its standard error; else its standard deviation; else its
//!   interquartile range. Whole digits are never rounded away (at least 0 decimals). A cell
//!   with none of these (or a zero spread) gives each number three significant digits.
//! - Counts (`n`, `n_missing`, `count`) are whole numbers; `percent` has one decimal and a
//!   `%` sign; Pearson's `r` has two decimals; any other statistic has three significant
//!   digits.
//! - The unit of the measured variable follows a number in its unit after a no-break space
//!   (U+00A0): `243 words/min`. An interval is written `[low, high]` without a unit (it
//!   follows its estimate, which has one).
//! - Negative numbers take the minus sign U+2212; `-0` after rounding is `0`.
//! - Rounding is to the nearest decimal of the number's exact binary value.
//!
//! Every quote keeps the exact value beside its text.

use serde::Serialize;

/// The exact value behind a quote.
#[derive(Debug, Clone, PartialEq, Serialize)]
#[serde(untagged)]
pub enum Exact {
    One(f64),
    /// One value per row of a list statistic (outliers), ascending.
    Many(Vec<f64>),
    /// An interval's low and high end.
    Interval(f64, f64),
    /// A level name (the median of an ordinal variable).
    Level(String),
}

/// A number as the manuscript quotes it.
#[derive(Debug, Clone, PartialEq)]
pub struct Quote {
    /// With its unit: `243 words/min`.
    pub text: String,
    /// Without its unit: `243`.
    pub number: String,
    pub unit: Option<String>,
    pub exact: Exact,
}

/// The most decimals any rule gives.
const MAX_DECIMALS: i32 = 15;

/// The minus sign.
const MINUS: char = '\u{2212}';

/// The space between a number and its unit.
pub const UNIT_SPACE: char = '\u{a0}';

/// How a statistic is written.
enum Kind {
    Count,
    Percent,
    /// In the measured variable's unit, at the cell's precision.
    Measured,
    Correlation,
    /// Three significant digits, with the unit or not.
    Plain {
        unit: bool,
    },
}

fn kind(stat: &str) -> Kind {
    match stat {
        "n" | "n_missing" | "count" => Kind::Count,
        "percent" => Kind::Percent,
        "mean" | "difference" | "sd" | "se" | "ci_low" | "ci_high" | "median" | "q1" | "q3"
        | "whisker_low" | "whisker_high" | "min" | "max" | "outliers" => Kind::Measured,
        "r" => Kind::Correlation,
        "bandwidth" | "intercept" => Kind::Plain { unit: true },
        _ => Kind::Plain { unit: false },
    }
}

/// Decimals that give `spread` two significant digits (at least 0); `None` for a spread that
/// is zero or not finite.
fn decimals_for_spread(spread: f64) -> Option<usize> {
    if !(spread.is_finite() && spread > 0.0) {
        return None;
    }
    let d = 1 - spread.log10().floor() as i32;
    Some(d.clamp(0, MAX_DECIMALS) as usize)
}

/// Decimals that give `v` three significant digits (at least 0).
fn three_digits(v: f64) -> usize {
    if v == 0.0 || !v.is_finite() {
        return 0;
    }
    let d = 2 - v.abs().log10().floor() as i32;
    d.clamp(0, MAX_DECIMALS) as usize
}

/// The decimals of a cell's numbers in the measured unit, from its uncertainty: the interval
/// `(low, high)`, else the standard error, else the standard deviation, else the quartiles
/// `(q1, q3)`; `None` when it has none (each number then gets three significant digits).
pub fn cell_decimals(
    interval: Option<(f64, f64)>,
    se: Option<f64>,
    sd: Option<f64>,
    quartiles: Option<(f64, f64)>,
) -> Option<usize> {
    let spread = interval
        .map(|(lo, hi)| hi - lo)
        .or(se)
        .or(sd)
        .or(quartiles.map(|(q1, q3)| q3 - q1))?;
    decimals_for_spread(spread)
}

/// `v` with `decimals` decimals, a minus sign for negative numbers and never `-0`.
pub fn fixed(v: f64, decimals: usize) -> String {
    let text = format!("{v:.decimals$}");
    match text.strip_prefix('-') {
        Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_string(),
        Some(rest) => format!("{MINUS}{rest}"),
        None => text,
    }
}

fn with_unit(number: &str, unit: Option<&str>) -> String {
    match unit {
        Some(u) => format!("{number}{UNIT_SPACE}{u}"),
        None => number.to_string(),
    }
}

/// The quote of statistic `stat` with value `exact`; `decimals` is the cell's precision and
/// `unit` the measured variable's unit.
pub fn quote(stat: &str, exact: &Exact, decimals: Option<usize>, unit: Option<&str>) -> Quote {
    if let Exact::Level(level) = exact {
        return Quote {
            text: level.clone(),
            number: level.clone(),
            unit: None,
            exact: exact.clone(),
        };
    }
    let values: Vec<f64> = match exact {
        Exact::One(v) => vec![*v],
        Exact::Many(vs) => vs.clone(),
        Exact::Interval(lo, hi) => vec![*lo, *hi],
        Exact::Level(_) => Vec::new(),
    };
    let (format_one, unit): (Box<dyn Fn(f64) -> String>, Option<&str>) = match kind(stat) {
        Kind::Count => (
            Box::new(|v: f64| {
                if v.fract() == 0.0 {
                    fixed(v, 0)
                } else {
                    fixed(v, three_digits(v))
                }
            }),
            None,
        ),
        Kind::Percent => (Box::new(|v| fixed(v, 1)), Some("%")),
        Kind::Measured => (
            Box::new(move |v| fixed(v, decimals.unwrap_or_else(|| three_digits(v)))),
            unit,
        ),
        Kind::Correlation => (Box::new(|v| fixed(v, 2)), None),
        Kind::Plain { unit: with } => (
            Box::new(|v| fixed(v, three_digits(v))),
            unit.filter(|_| with),
        ),
    };
    let number = values
        .iter()
        .map(|v| format_one(*v))
        .collect::<Vec<_>>()
        .join(", ");
    let text = if unit == Some("%") {
        format!("{number}%")
    } else {
        with_unit(&number, unit)
    };
    Quote {
        text,
        number,
        unit: unit.map(str::to_string),
        exact: exact.clone(),
    }
}

/// The quote of an interval: `[low, high]`, both ends at `decimals` (or three significant
/// digits each), without a unit.
pub fn interval(low: f64, high: f64, decimals: Option<usize>) -> Quote {
    let end = |v: f64| fixed(v, decimals.unwrap_or_else(|| three_digits(v)));
    let text = format!("[{}, {}]", end(low), end(high));
    Quote {
        number: text.clone(),
        text,
        unit: None,
        exact: Exact::Interval(low, high),
    }
}
