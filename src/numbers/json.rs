//! `numbers.json`: the numbers for any other tool.
//!
//! `{"format": 1, "figures": {FIGURE: {STAT: {CELL: {"text", "number", "unit", "value"}}}}}`,
//! keys sorted; `value` is the exact number (an array for intervals and outliers, a string
//! for a level), `unit` is `null` when the number has none.

use std::collections::BTreeMap;

use serde::Serialize;

use super::text::Exact;
use super::Addressed;

/// The version of this file's layout.
const FORMAT: u32 = 1;

#[derive(Serialize)]
struct File<'a> {
    format: u32,
    figures: BTreeMap<&'a str, BTreeMap<&'a str, BTreeMap<&'a str, Entry<'a>>>>,
}

#[derive(Serialize)]
struct Entry<'a> {
    text: String,
    number: &'a str,
    unit: Option<String>,
    value: &'a Exact,
}

/// The file's text: pretty JSON with a final newline.
pub fn render(numbers: &Addressed) -> String {
    let figures = numbers
        .iter()
        .map(|(figure, stats)| {
            let stats = stats
                .iter()
                .map(|(stat, cells)| {
                    let cells = cells
                        .iter()
                        .map(|(cell, q)| {
                            let entry = Entry {
                                text: crate::markup::plain(&q.text),
                                number: &q.number,
                                unit: q.unit.as_deref().map(crate::markup::plain),
                                value: &q.exact,
                            };
                            (cell.as_str(), entry)
                        })
                        .collect();
                    (stat.as_str(), cells)
                })
                .collect();
            (figure.as_str(), stats)
        })
        .collect();
    let file = File {
        format: FORMAT,
        figures,
    };
    let mut text = serde_json::to_string_pretty(&file).unwrap_or_default();
    text.push('\n');
    text
}
