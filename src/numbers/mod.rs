//! Numbers for the manuscript: every summary number of every figure, addressable from the
//! text of a paper and formatted for reading.
//!
//! A project that sets `[project] numbers = ["tex", "typ", "json"]` gets, in each output
//! folder, one file per format (`numbers.tex`, `numbers.typ`, `numbers.json`). Each number has
//! an *address* of three parts:
//!
//! - the figure's name;
//! - the statistic: `LAYER.STAT` (`box.median`, `mean.ci_low`), or `STAT` alone when every
//!   layer that reports it for that cell gives the same text (`n`, `mean`); plus `LAYER.ci` /
//!   `ci`, the interval `[low, high]` of a cell with `ci_low` and `ci_high`;
//! - the cell: the panel, colour group and x level of the row, in that order, joined by `/`,
//!   keeping only the parts the figure has (a part some rows of the figure have); a row
//!   without a part the figure has (a whole-panel row such as `lines`' `n`) writes `*` there.
//!   Levels are the level names of the data, as in the summary table, not display labels.
//!
//! So `\figura{speed_by_medium}{mean}{morning/paper}` is the mean of the `paper` cell in the
//! `morning` panel. How numbers are rounded is in [`text`]; the three file formats in [`tex`],
//! [`typ`] and [`json`].
//!
//! Guarantees: pure (no I/O); the files are byte-identical for identical summaries; an
//! address never silently changes meaning: two different numbers that would share an address
//! (a level name holding `/`, a layer written twice) both leave the files, so a quote of
//! that address fails to compile rather than show the wrong one.

pub mod json;
pub mod tex;
pub mod text;
pub mod typ;

use std::collections::BTreeMap;

use crate::check::{Axes, Codebook, FigurePlan};
use crate::compute::{StatValue, SummaryRow};

use text::{Exact, Quote};

/// A file format of the numbers.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum NumbersFormat {
    /// LaTeX: `\input` it and write `\figura{FIGURE}{STAT}{CELL}`.
    Tex,
    /// Typst: `#import` it and write `#figura("FIGURE", "STAT", "CELL")`.
    Typ,
    /// JSON, for any other tool.
    Json,
}

impl NumbersFormat {
    pub const ALL: [NumbersFormat; 3] =
        [NumbersFormat::Tex, NumbersFormat::Typ, NumbersFormat::Json];

    /// The word in `figura.toml`.
    pub fn word(self) -> &'static str {
        match self {
            NumbersFormat::Tex => "tex",
            NumbersFormat::Typ => "typ",
            NumbersFormat::Json => "json",
        }
    }

    /// The format a word of `figura.toml` names.
    pub fn from_word(word: &str) -> Option<NumbersFormat> {
        Self::ALL.into_iter().find(|f| f.word() == word)
    }

    /// The file written in each output folder.
    pub fn file_name(self) -> &'static str {
        match self {
            NumbersFormat::Tex => "numbers.tex",
            NumbersFormat::Typ => "numbers.typ",
            NumbersFormat::Json => "numbers.json",
        }
    }

    /// The file's text.
    pub fn render(self, numbers: &Addressed) -> String {
        match self {
            NumbersFormat::Tex => tex::render(numbers),
            NumbersFormat::Typ => typ::render(numbers),
            NumbersFormat::Json => json::render(numbers),
        }
    }
}

/// One figure's summary and what its numbers are measured in.
#[derive(Debug, Clone)]
pub struct FigureNumbers {
    pub figure: String,
    /// The unit of the measured variable (see [`measured_unit`]).
    pub unit: Option<String>,
    pub rows: Vec<SummaryRow>,
}

/// Every quote: figure → statistic → cell → quote, sorted.
pub type Addressed = BTreeMap<String, BTreeMap<String, BTreeMap<String, Quote>>>;

/// The unit of the variable whose values a figure's statistics are in: the numeric y, or
/// the numeric x of a figure without y; `None` for counts, ordinal and flow figures.
pub fn measured_unit(plan: &FigurePlan, book: &Codebook) -> Option<String> {
    let var = match &plan.axes {
        Axes::CatNum { y, .. } | Axes::NumNum { y, .. } => Some(y.var.var),
        Axes::Num { x } => Some(x.var.var),
        Axes::Cat { .. } | Axes::CatCat { .. } => None,
    };
    var.and_then(|v| book.var(v).unit.clone())
}

/// A summary row as the numbers read it: the one place that knows [`SummaryRow`]'s fields.
struct Row<'a> {
    panel: &'a str,
    layer: &'a str,
    group: &'a str,
    x: &'a str,
    stat: &'a str,
    value: &'a StatValue,
}

fn row_of(r: &SummaryRow) -> Row<'_> {
    Row {
        panel: &r.panel,
        layer: r.layer,
        group: &r.group,
        x: &r.x,
        stat: r.stat.as_str(),
        value: &r.value,
    }
}

/// Addresses and formats every number of `figures`.
pub fn address(figures: &[FigureNumbers]) -> Addressed {
    let mut out = Addressed::new();
    for figure in figures {
        let by_stat = out.entry(figure.figure.clone()).or_default();
        for (stat, cells) in figure_quotes(figure) {
            by_stat.insert(stat, cells);
        }
    }
    out
}

/// The parts of a cell address a figure has: panel, group, x.
struct Parts {
    panel: bool,
    group: bool,
    x: bool,
}

impl Parts {
    fn of(rows: &[Row]) -> Parts {
        Parts {
            panel: rows.iter().any(|r| !r.panel.is_empty()),
            group: rows.iter().any(|r| !r.group.is_empty()),
            x: rows.iter().any(|r| !r.x.is_empty()),
        }
    }

    /// The cell address of a row.
    fn cell(&self, row: &Row) -> String {
        let part = |has: bool, level: &str| {
            has.then(|| {
                if level.is_empty() {
                    "*".to_string()
                } else {
                    level.to_string()
                }
            })
        };
        [
            part(self.panel, row.panel),
            part(self.group, row.group),
            part(self.x, row.x),
        ]
        .into_iter()
        .flatten()
        .collect::<Vec<_>>()
        .join("/")
    }
}

/// The values one layer reports for one cell, by statistic, in row order.
#[derive(Default)]
struct CellValues<'a> {
    stats: Vec<(&'a str, Vec<&'a StatValue>)>,
}

impl<'a> CellValues<'a> {
    fn push(&mut self, stat: &'a str, value: &'a StatValue) {
        match self.stats.iter_mut().find(|(s, _)| *s == stat) {
            Some((_, values)) => values.push(value),
            None => self.stats.push((stat, vec![value])),
        }
    }

    fn number(&self, stat: &str) -> Option<f64> {
        match self.stats.iter().find(|(s, _)| *s == stat)?.1.as_slice() {
            [StatValue::Number(v)] => Some(*v),
            _ => None,
        }
    }
}

/// One figure's quotes: statistic → cell → quote.
fn figure_quotes(figure: &FigureNumbers) -> BTreeMap<String, BTreeMap<String, Quote>> {
    let rows: Vec<Row> = figure.rows.iter().map(row_of).collect();
    let parts = Parts::of(&rows);
    // (layer, cell) → values.
    let mut cells: BTreeMap<(&str, String), CellValues> = BTreeMap::new();
    for row in &rows {
        cells
            .entry((row.layer, parts.cell(row)))
            .or_default()
            .push(row.stat, row.value);
    }
    let unit = figure.unit.as_deref();
    let mut full: BTreeMap<String, BTreeMap<String, Option<Quote>>> = BTreeMap::new();
    for ((layer, cell), values) in &cells {
        for (stat, quote) in cell_quotes(values, unit) {
            let slot = full
                .entry(format!("{layer}.{stat}"))
                .or_default()
                .entry(cell.clone());
            match slot {
                std::collections::btree_map::Entry::Vacant(v) => {
                    v.insert(Some(quote));
                }
                // Two numbers at one address: neither is kept.
                std::collections::btree_map::Entry::Occupied(mut o) => {
                    if o.get().as_ref() != Some(&quote) {
                        o.insert(None);
                    }
                }
            }
        }
    }
    let full: BTreeMap<String, BTreeMap<String, Quote>> = full
        .into_iter()
        .map(|(stat, cells)| {
            let kept = cells
                .into_iter()
                .filter_map(|(c, q)| Some((c, q?)))
                .collect();
            (stat, kept)
        })
        .collect();
    with_short_names(full)
}

/// Adds `STAT` for `LAYER.STAT` wherever every layer reporting `STAT` for a cell agrees.
fn with_short_names(
    full: BTreeMap<String, BTreeMap<String, Quote>>,
) -> BTreeMap<String, BTreeMap<String, Quote>> {
    let mut short: BTreeMap<String, BTreeMap<String, Option<Quote>>> = BTreeMap::new();
    for (name, cells) in &full {
        let stat = name.split_once('.').map_or(name.as_str(), |(_, s)| s);
        let by_cell = short.entry(stat.to_string()).or_default();
        for (cell, quote) in cells {
            let slot = by_cell
                .entry(cell.clone())
                .or_insert_with(|| Some(quote.clone()));
            if slot.as_ref() != Some(quote) {
                *slot = None;
            }
        }
    }
    let mut out = full;
    for (stat, cells) in short {
        let agreed: BTreeMap<String, Quote> = cells
            .into_iter()
            .filter_map(|(c, q)| Some((c, q?)))
            .collect();
        if !agreed.is_empty() {
            out.insert(stat, agreed);
        }
    }
    out
}

/// The quotes of one layer's cell: each statistic, and the interval `ci`.
fn cell_quotes(values: &CellValues, unit: Option<&str>) -> Vec<(String, Quote)> {
    let decimals = text::cell_decimals(
        values.number("ci_low").zip(values.number("ci_high")),
        values.number("se"),
        values.number("sd"),
        values.number("q1").zip(values.number("q3")),
    );
    let mut out: Vec<(String, Quote)> = values
        .stats
        .iter()
        .filter_map(|(stat, vals)| {
            let exact = exact_of(stat, vals)?;
            Some((stat.to_string(), text::quote(stat, &exact, decimals, unit)))
        })
        .collect();
    if let (Some(low), Some(high)) = (values.number("ci_low"), values.number("ci_high")) {
        out.push(("ci".to_string(), text::interval(low, high, decimals)));
    }
    out
}

/// The statistics with one row per value (the rest have one row per cell).
pub const LIST_STATS: [&str; 1] = ["outliers"];

/// The exact value of a statistic's rows in one cell: one number, a level name, or for a
/// list statistic every value; `None` when a statistic of one value has several (a layer
/// written twice), which leaves it out.
fn exact_of(stat: &str, values: &[&StatValue]) -> Option<Exact> {
    match values {
        [StatValue::Level(l)] => Some(Exact::Level(l.clone())),
        [StatValue::Number(v)] if !LIST_STATS.contains(&stat) => Some(Exact::One(*v)),
        many if LIST_STATS.contains(&stat) => many
            .iter()
            .map(|v| match v {
                StatValue::Number(n) => Some(*n),
                StatValue::Level(_) => None,
            })
            .collect::<Option<Vec<f64>>>()
            .map(Exact::Many),
        _ => None,
    }
}

#[cfg(test)]
mod tests;
