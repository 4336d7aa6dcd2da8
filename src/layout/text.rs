//! Text helpers for layout: measuring, wrapping to a width, and placing text marks.

use crate::font;
use crate::scene::{Mark, Point, TextAlign, TextBaseline, TextMark, TextRotation, TextStyle};

/// Width of one line, in millimetres.
pub fn width(text: &str, style: &TextStyle) -> f64 {
    font::measure(text, style).width_mm
}

/// Height of one line (ascent + descent), in millimetres.
pub fn line_height(style: &TextStyle) -> f64 {
    font::measure("Ag", style).height_mm()
}

/// Splits text into lines no wider than `max_mm`, breaking at spaces. A single word wider than
/// the limit stays whole on its own line (it is never cut).
pub fn wrap(text: &str, style: &TextStyle, max_mm: f64) -> Vec<String> {
    let mut lines: Vec<String> = Vec::new();
    let mut current = String::new();
    for word in text.split_whitespace() {
        let candidate = if current.is_empty() {
            word.to_string()
        } else {
            format!("{current} {word}")
        };
        if current.is_empty() || width(&candidate, style) <= max_mm {
            current = candidate;
        } else {
            lines.push(std::mem::take(&mut current));
            current = word.to_string();
        }
    }
    if !current.is_empty() || lines.is_empty() {
        lines.push(current);
    }
    lines
}

/// A horizontal text mark.
pub fn label(
    text: &str,
    at: Point,
    style: TextStyle,
    align: TextAlign,
    baseline: TextBaseline,
) -> Mark {
    Mark::Text(TextMark {
        at,
        text: text.to_string(),
        style,
        align,
        baseline,
        rotation: TextRotation::Horizontal,
    })
}

/// A text mark reading upwards (y-axis titles), centred on `at`.
pub fn upward(text: &str, at: Point, style: TextStyle) -> Mark {
    Mark::Text(TextMark {
        at,
        text: text.to_string(),
        style,
        align: TextAlign::Middle,
        baseline: TextBaseline::Top,
        rotation: TextRotation::Up,
    })
}
