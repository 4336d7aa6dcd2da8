//! Alt text: what a figure shows, in plain sentences generated from its numbers.
//!
//! Written to `NAME.alt.txt`, into the SVG's `<desc>`, the PDF's alternative text and the PNG's
//! `Description`. It follows common accessibility guidance for data figures (common practice,
//! from memory of the W3C Web Accessibility Initiative's tutorial on complex images and the
//! DIAGRAM Center's guidelines for describing images in science: no single standard): say
//! what kind of figure it is and what its axes and groups are first, then what each kind of
//! mark means, then the values a reader would take from it — the main estimate of each cell
//! with its interval and n, a fit's direction and size — in the order the figure shows them;
//! plain sentences, units named, nothing a sighted reader could not see.
//!
//! Guarantees:
//! - Every number in the text (outside the key's sentences, which say how the marks were made,
//!   and outside titles and labels, which are the user's text) is a number of the summary
//!   table, rounded by the rules of the manuscript numbers ([`crate::numbers::text`]): the
//!   numbers of one cell in the measured unit share the decimals its uncertainty calls for,
//!   counts are whole, percentages have one decimal, `r` two, any other statistic three
//!   significant digits. `tests/publish.rs` checks this for every example.
//! - Level and variable names appear as the figure shows them (labels, not data names), as
//!   plain text ([`crate::markup::plain`]).
//! - At most [`MAX_CELLS`] cells are quoted; beyond that the text says how many more there are
//!   and that the summary table lists them.
//! - Pure: the same plan and numbers give the same text.

use std::collections::BTreeMap;

use crate::check::plan::{Axes, CatVar, Codebook, FigurePlan, VarId};
use crate::compute::{FigureData, StatValue, SummaryRow};
use crate::markup;
use crate::numbers::{self, text};

/// The most cells whose values the text quotes one by one.
pub const MAX_CELLS: usize = 40;

/// The layers whose numbers the text quotes, most telling first: one is chosen per figure.
const MAIN_LAYERS: [&str; 12] = [
    "fit",
    "mean",
    "median",
    "counts",
    "box",
    "violin",
    "flows",
    "histogram",
    "density",
    "ecdf",
    "points",
    "lines",
];

/// The alt text of a figure: sentences separated by spaces, ending in a full stop.
pub fn describe(plan: &FigurePlan, book: &Codebook, data: &FigureData) -> String {
    let mut out: Vec<String> = Vec::new();
    if let Some(title) = &plan.title {
        out.push(sentence(&markup::plain(title)));
    }
    out.push(what_it_shows(plan, book, data));
    out.push(sentence(&format!("It draws {}", marks_drawn(plan, book))));
    out.extend(data.marks.iter().cloned());
    out.extend(values(plan, book, data));
    out.join(" ")
}

/// A text ending in one full stop (or the mark it already ends with).
fn sentence(text: &str) -> String {
    let text = text.trim();
    if text.ends_with(['.', '!', '?']) {
        text.to_string()
    } else {
        format!("{text}.")
    }
}

/// The display text of a level (its label, else its name), plain.
fn level_text(book: &Codebook, var: VarId, name: &str) -> String {
    let v = book.var(var);
    let label = v
        .levels
        .as_ref()
        .and_then(|levels| levels.iter().position(|l| l == name))
        .and_then(|i| v.labels.as_ref().and_then(|labels| labels.get(i)));
    markup::plain(label.map_or(name, String::as_str))
}

/// "Paper and Screen", "bus, cycle and car".
fn listed(items: &[String]) -> String {
    match items {
        [] => String::new(),
        [one] => one.clone(),
        [init @ .., last] => format!("{} and {last}", init.join(", ")),
    }
}

/// A categorical variable's title and its shown levels: "Medium (Paper and Screen)".
fn grouping(book: &Codebook, var: &CatVar, title: &str, names: &[String]) -> String {
    let levels: Vec<String> = names.iter().map(|n| level_text(book, var.var, n)).collect();
    format!("{} ({})", markup::plain(title), listed(&levels))
}

/// The first sentence: the figure's kind, its axes and its groups.
fn what_it_shows(plan: &FigurePlan, book: &Codebook, data: &FigureData) -> String {
    use crate::compute::{XScale, YScale};
    let x_text = match &data.x {
        XScale::Categories { title, levels } => match &plan.axes {
            Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } => {
                grouping(book, &x.var, title, &levels.names)
            }
            _ => markup::plain(title),
        },
        XScale::Numbers(s) => markup::plain(&s.title),
    };
    let y_text = match &data.y {
        YScale::Numbers(s) => markup::plain(&s.title),
        YScale::Categories { title, .. } => markup::plain(title),
        YScale::Hidden => String::new(),
    };
    let mut text = match &plan.axes {
        Axes::Cat { .. } => format!(
            "A bar chart of {} for each level of {x_text}",
            heights(&y_text)
        ),
        Axes::Num { .. } => format!("A chart of the distribution of {x_text}"),
        Axes::CatNum { .. } => format!("A chart of {y_text} for each level of {x_text}"),
        Axes::CatCat { .. } if y_text.is_empty() => {
            format!("A chart of states at each level of {x_text}")
        }
        Axes::CatCat { .. } => format!("A chart of {y_text} for each level of {x_text}"),
        Axes::NumNum { .. } => format!("A scatter plot of {y_text} against {x_text}"),
    };
    if let (Some(c), Some(legend)) = (&plan.colour, &data.legend) {
        text.push_str(&format!(
            ", coloured by {}",
            grouping(book, c, &legend.title, &legend.levels.names)
        ));
    }
    if let Some(p) = &plan.panels {
        let names = panel_names(&data.summary);
        let title = book.var(p.var).title();
        text.push_str(&format!(
            ", in one panel per {}",
            grouping(book, p, &title, &names)
        ));
    }
    sentence(&text)
}

/// What bars of counts show, from their axis title: "counts", "percentages".
fn heights(title: &str) -> String {
    match title {
        "Count" => "counts".to_string(),
        "Percent" => "percentages".to_string(),
        other => other.to_lowercase(),
    }
}

/// The panels' level names in the summary's order.
fn panel_names(rows: &[SummaryRow]) -> Vec<String> {
    let mut names: Vec<String> = Vec::new();
    for r in rows {
        if !names.contains(&r.panel) {
            names.push(r.panel.clone());
        }
    }
    names
}

/// "every value as a dot, box plots and means".
fn marks_drawn(plan: &FigurePlan, book: &Codebook) -> String {
    let subject = book
        .subject
        .map(|s| book.var(s).name.replace('_', " "))
        .unwrap_or_else(|| "subject".to_string());
    let mut phrases: Vec<String> = Vec::new();
    for layer in &plan.layers {
        let phrase = match layer.decl.word {
            "points" => "every value as a dot".to_string(),
            "box" => "box plots".to_string(),
            "violin" => "violins (mirrored density curves)".to_string(),
            "mean" if layer.traits.needs_points.is_some() => "bars of means".to_string(),
            "mean" => "means".to_string(),
            "median" => "medians".to_string(),
            "lines" => format!("a line joining each {subject}'s values"),
            "counts" => "a bar per level counting its rows".to_string(),
            "histogram" => "a histogram".to_string(),
            "density" => "density curves".to_string(),
            "ecdf" => "cumulative distribution steps".to_string(),
            "fit" => "a fitted straight line".to_string(),
            "flows" => "stacked bars of states joined by ribbons of subjects who move".to_string(),
            word => word.to_string(),
        };
        if !phrases.contains(&phrase) {
            phrases.push(phrase);
        }
    }
    listed(&phrases)
}

/// The layer whose numbers are quoted: the first of [`MAIN_LAYERS`] the figure has.
fn main_layer(plan: &FigurePlan) -> Option<&'static str> {
    MAIN_LAYERS
        .iter()
        .copied()
        .find(|w| plan.layers.iter().any(|l| l.decl.word == *w))
        .or_else(|| plan.layers.first().map(|l| l.decl.word))
}

/// One cell of the main layer: its place and its rows' values by statistic, in row order.
#[derive(Default)]
struct Cell<'a> {
    panel: &'a str,
    group: &'a str,
    x: &'a str,
    stats: Vec<(&'a str, Vec<&'a StatValue>)>,
}

impl<'a> Cell<'a> {
    fn number(&self, stat: &str) -> Option<f64> {
        match self.stats.iter().find(|(s, _)| *s == stat)?.1.as_slice() {
            [StatValue::Number(v), ..] => Some(*v),
            _ => None,
        }
    }

    fn level(&self, stat: &str) -> Option<&'a str> {
        match self.stats.iter().find(|(s, _)| *s == stat)?.1.as_slice() {
            [StatValue::Level(l), ..] => Some(l.as_str()),
            _ => None,
        }
    }

    /// The cell's numbers in the measured unit share these decimals.
    fn decimals(&self) -> Option<usize> {
        text::cell_decimals(
            self.number("ci_low").zip(self.number("ci_high")),
            self.number("se"),
            self.number("sd"),
            self.number("q1").zip(self.number("q3")),
        )
    }
}

/// The cells of `layer`'s rows, in the summary's order.
fn cells<'a>(rows: &'a [SummaryRow], layer: &str) -> Vec<Cell<'a>> {
    let mut order: Vec<(&str, &str, &str)> = Vec::new();
    let mut by_place: BTreeMap<(&str, &str, &str), Cell<'a>> = BTreeMap::new();
    for r in rows.iter().filter(|r| r.layer == layer) {
        let place = (r.panel.as_str(), r.group.as_str(), r.x.as_str());
        let cell = by_place.entry(place).or_insert_with(|| {
            order.push(place);
            Cell {
                panel: place.0,
                group: place.1,
                x: place.2,
                stats: Vec::new(),
            }
        });
        let stat = r.stat.as_str();
        match cell.stats.iter_mut().find(|(s, _)| *s == stat) {
            Some((_, values)) => values.push(&r.value),
            None => cell.stats.push((stat, vec![&r.value])),
        }
    }
    order
        .into_iter()
        .filter_map(|place| by_place.remove(&place))
        .collect()
}

/// How the numbers of a cell are written.
struct Writer<'a> {
    unit: Option<String>,
    book: &'a Codebook,
    plan: &'a FigurePlan,
}

impl Writer<'_> {
    fn quote(&self, stat: &str, v: f64, decimals: Option<usize>) -> String {
        text::quote(stat, &text::Exact::One(v), decimals, self.unit.as_deref()).text
    }

    fn interval(&self, cell: &Cell, decimals: Option<usize>) -> Option<String> {
        let (lo, hi) = cell.number("ci_low").zip(cell.number("ci_high"))?;
        Some(text::interval(lo, hi, decimals).text)
    }

    /// "mean 243 words/min [228, 257]" and the like: the cell's main numbers.
    fn estimate(&self, cell: &Cell) -> Vec<String> {
        let d = cell.decimals();
        let mut parts = Vec::new();
        for (stat, word) in [("mean", "mean"), ("geometric_mean", "geometric mean")] {
            if let Some(v) = cell.number(stat) {
                let mut part = format!("{word} {}", self.quote(stat, v, d));
                if let Some(i) = self.interval(cell, d) {
                    part.push_str(&format!(" {i}"));
                }
                parts.push(part);
                for (spread, name) in [
                    ("sd", "SD"),
                    ("se", "SE"),
                    ("geometric_sd", "geometric SD factor"),
                    ("geometric_se", "geometric SE factor"),
                ] {
                    if let Some(s) = cell.number(spread) {
                        parts.push(format!("{name} {}", self.quote(spread, s, d)));
                    }
                }
                return parts;
            }
        }
        if let Some(level) = cell.level("median") {
            let mut part = format!("median level {}", self.level_of_y(level));
            if let (Some(q1), Some(q3)) = (cell.level("q1"), cell.level("q3")) {
                part.push_str(&format!(
                    ", quartiles {} to {}",
                    self.level_of_y(q1),
                    self.level_of_y(q3)
                ));
            }
            parts.push(part);
            return parts;
        }
        if let Some(m) = cell.number("median") {
            let mut part = format!("median {}", self.quote("median", m, d));
            if let Some(i) = self.interval(cell, d) {
                part.push_str(&format!(" {i}"));
            } else if let (Some(q1), Some(q3)) = (cell.number("q1"), cell.number("q3")) {
                part.push_str(&format!(
                    ", quartiles {} to {}",
                    self.quote("q1", q1, d),
                    self.quote("q3", q3, d)
                ));
            }
            parts.push(part);
            return parts;
        }
        if let Some(c) = cell.number("count") {
            let mut part = self.quote("count", c, None);
            if let Some(p) = cell.number("percent") {
                part.push_str(&format!(" ({}", self.quote("percent", p, None)));
                if let Some((lo, hi)) = cell.number("ci_low").zip(cell.number("ci_high")) {
                    part.push_str(&format!(
                        " {}",
                        text::interval(lo, hi, cell.decimals()).text
                    ));
                }
                part.push(')');
            }
            parts.push(part);
        }
        if let Some(b) = cell.number("bandwidth") {
            parts.push(format!("bandwidth {}", self.quote("bandwidth", b, None)));
        }
        parts
    }

    /// The text of an ordinal y's level.
    fn level_of_y(&self, name: &str) -> String {
        match &self.plan.axes {
            Axes::CatCat { y, .. } => level_text(self.book, y.var.var, name),
            _ => name.to_string(),
        }
    }

    /// "the line rises: slope 187 [174, 199], r = 0.98".
    fn fit(&self, cell: &Cell) -> Vec<String> {
        let Some(slope) = cell.number("slope") else {
            return Vec::new();
        };
        let direction = if slope > 0.0 {
            "the line rises"
        } else if slope < 0.0 {
            "the line falls"
        } else {
            "the line is flat"
        };
        let mut part = format!("{direction}, slope {}", self.quote("slope", slope, None));
        if let Some((lo, hi)) = cell
            .number("slope_ci_low")
            .zip(cell.number("slope_ci_high"))
        {
            part.push_str(&format!(" {}", text::interval(lo, hi, None).text));
            if lo <= 0.0 && hi >= 0.0 {
                part.push_str(", an interval that includes no slope at all");
            }
        }
        let mut parts = vec![part];
        if let Some(r) = cell.number("r") {
            parts.push(format!("r = {}", self.quote("r", r, None)));
        }
        parts
    }

    /// What a histogram cell says: n and its fullest bin.
    fn fullest_bin(&self, rows: &[SummaryRow], cell: &Cell) -> Option<String> {
        let best = rows
            .iter()
            .filter(|r| {
                r.layer == "histogram"
                    && r.panel == cell.panel
                    && r.group == cell.group
                    && r.stat.as_str() == "count"
            })
            .filter_map(|r| match r.value {
                StatValue::Number(v) => Some((v, r.x.as_str())),
                StatValue::Level(_) => None,
            })
            .reduce(|best, next| if next.0 > best.0 { next } else { best })?;
        Some(format!(
            "the fullest bin, {}, holds {} values",
            best.1,
            self.quote("count", best.0, None)
        ))
    }
}

/// The sentences quoting the main layer's numbers.
fn values(plan: &FigurePlan, book: &Codebook, data: &FigureData) -> Vec<String> {
    let Some(layer) = main_layer(plan) else {
        return Vec::new();
    };
    let writer = Writer {
        unit: numbers::measured_unit(plan, book).map(|u| markup::plain(&u)),
        book,
        plan,
    };
    let all = cells(&data.summary, layer);
    let histogram = layer == "histogram";
    // Whole-group rows (x empty) carry the n of distributions and fits; cells of a
    // categorical x carry their own.
    let quoted: Vec<&Cell> = all
        .iter()
        .filter(|c| {
            let per_x = all.iter().any(|o| !o.x.is_empty());
            match layer {
                "fit" | "density" | "ecdf" | "histogram" => c.x.is_empty(),
                "flows" => c.group.is_empty() && !c.x.is_empty() && !c.x.contains("->"),
                _ => !per_x || !c.x.is_empty(),
            }
        })
        .collect();
    let mut out = Vec::new();
    if quoted.iter().any(|c| c.number("ci_low").is_some()) {
        out.push("Intervals are given in brackets.".to_string());
    }
    let mut by_panel: Vec<(&str, Vec<String>)> = Vec::new();
    for cell in quoted.iter().take(MAX_CELLS) {
        let mut parts: Vec<String> = Vec::new();
        if layer == "fit" {
            parts.extend(writer.fit(cell));
        } else if layer == "flows" {
            parts.extend(flow_states(&writer, &data.summary, cell));
        } else {
            parts.extend(writer.estimate(cell));
            if histogram {
                parts.extend(writer.fullest_bin(&data.summary, cell));
            }
        }
        if let Some(n) = cell.number("n") {
            parts.push(format!("n = {}", writer.quote("n", n, None)));
        }
        if parts.is_empty() {
            continue;
        }
        let mut place: Vec<String> = Vec::new();
        if let (Some(x), false) = (cat_x(plan), cell.x.is_empty()) {
            place.push(level_text(book, x, cell.x));
        }
        if let (Some(c), false) = (&plan.colour, cell.group.is_empty()) {
            place.push(level_text(book, c.var, cell.group));
        }
        let text = if place.is_empty() {
            parts.join(", ")
        } else {
            format!("{}: {}", place.join(", "), parts.join(", "))
        };
        match by_panel.last_mut() {
            Some((p, texts)) if *p == cell.panel => texts.push(text),
            _ => by_panel.push((cell.panel, vec![text])),
        }
    }
    for (panel, texts) in by_panel {
        let body = texts.join("; ");
        out.push(match &plan.panels {
            Some(p) => sentence(&format!("{}: {body}", level_text(book, p.var, panel))),
            None => sentence(&format!("Values: {body}")),
        });
    }
    if quoted.len() > MAX_CELLS {
        out.push(format!(
            "{} more cells are listed in the summary table.",
            quoted.len() - MAX_CELLS
        ));
    }
    out
}

/// The states at one occasion of a flow diagram: "none 0, mild 13, moderate 11".
fn flow_states(writer: &Writer, rows: &[SummaryRow], cell: &Cell) -> Vec<String> {
    let Axes::CatCat { y, .. } = &writer.plan.axes else {
        return Vec::new();
    };
    rows.iter()
        .filter(|r| {
            r.layer == "flows"
                && r.panel == cell.panel
                && r.x == cell.x
                && !r.group.is_empty()
                && r.stat.as_str() == "count"
        })
        .filter_map(|r| match r.value {
            StatValue::Number(v) => Some(format!(
                "{} {}",
                level_text(writer.book, y.var.var, &r.group),
                writer.quote("count", v, None)
            )),
            StatValue::Level(_) => None,
        })
        .collect()
}

/// The categorical x variable, if the figure has one.
fn cat_x(plan: &FigurePlan) -> Option<VarId> {
    match &plan.axes {
        Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } => Some(x.var.var),
        Axes::Num { .. } | Axes::NumNum { .. } => None,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_and_sentences_read_as_english() {
        assert_eq!(listed(&["a".to_string()]), "a");
        assert_eq!(
            listed(&["a".to_string(), "b".to_string(), "c".to_string()]),
            "a, b and c"
        );
        assert_eq!(sentence("Reading speed"), "Reading speed.");
        assert_eq!(sentence("Why?"), "Why?");
    }
}
