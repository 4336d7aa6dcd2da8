//! `numbers.typ`: the numbers as a Typst dictionary and two functions.
//!
//! `#import "out/numbers.typ": figura, figura-number`; then `#figura("FIGURE", "STAT",
//! "CELL")` writes a number with its unit and `#figura-number(...)` the number alone. The
//! dictionary `figura-numbers` holds, per figure, statistic and cell, the `text`, the
//! `number` and the exact `value` (an array for intervals and outliers, a string for a
//! level). An address that is not in the file stops compilation with an error naming it.

use std::fmt::Write as _;

use super::text::Exact;
use super::Addressed;
use crate::compute::summary::format_number;

const FUNCTIONS: &str = r#"
#let figura-entry(figure, stat, cell) = {
  let address = figure + " / " + stat + " / " + cell
  let stats = figura-numbers.at(figure, default: none)
  assert(stats != none, message: "no figure " + figure + " in numbers.typ: " + address)
  let cells = stats.at(stat, default: none)
  assert(cells != none, message: "no statistic " + stat + " in numbers.typ: " + address)
  let entry = cells.at(cell, default: none)
  assert(entry != none, message: "no cell " + cell + " in numbers.typ: " + address)
  entry
}
#let figura(figure, stat, cell) = figura-entry(figure, stat, cell).text
#let figura-number(figure, stat, cell) = figura-entry(figure, stat, cell).number
"#;

/// A Typst string literal (of a styled unit's plain text, [`crate::markup::plain`]).
fn string(text: &str) -> String {
    let mut out = String::from("\"");
    for c in crate::markup::plain(text).chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\t' => out.push_str("\\t"),
            c if c.is_control() => {
                let _ = write!(out, "\\u{{{:x}}}", c as u32);
            }
            other => out.push(other),
        }
    }
    out.push('"');
    out
}

/// A Typst float literal (with a decimal point, so whole numbers stay floats).
fn float(v: f64) -> String {
    let text = format_number(v);
    if text.contains(['.', 'e', 'E']) {
        text
    } else {
        format!("{text}.0")
    }
}

fn value(exact: &Exact) -> String {
    match exact {
        Exact::One(v) => float(*v),
        Exact::Many(vs) => format!(
            "({},)",
            vs.iter().map(|v| float(*v)).collect::<Vec<_>>().join(", ")
        ),
        Exact::Interval(lo, hi) => format!("({}, {})", float(*lo), float(*hi)),
        Exact::Level(l) => string(l),
    }
}

/// The file's text.
pub fn render(numbers: &Addressed) -> String {
    let mut out = String::from(
        "// Numbers of the figures in this folder, written by Figura: do not edit.\n\
         // #import this file, then write #figura(\"FIGURE\", \"STAT\", \"CELL\") for a number\n\
         // with its unit, and #figura-number(...) for the number alone.\n\
         #let figura-numbers = (\n",
    );
    for (figure, stats) in numbers {
        if stats.is_empty() {
            let _ = writeln!(out, "  {}: (:),", string(figure));
            continue;
        }
        let _ = writeln!(out, "  {}: (", string(figure));
        for (stat, cells) in stats {
            let _ = writeln!(out, "    {}: (", string(stat));
            for (cell, q) in cells {
                let _ = writeln!(
                    out,
                    "      {}: (text: {}, number: {}, value: {}),",
                    string(cell),
                    string(&q.text),
                    string(&q.number),
                    value(&q.exact)
                );
            }
            out.push_str("    ),\n");
        }
        out.push_str("  ),\n");
    }
    if numbers.is_empty() {
        out.push_str("  :\n");
    }
    out.push_str(")\n");
    out.push_str(FUNCTIONS);
    out
}
