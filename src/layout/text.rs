//! Text helpers for layout: measuring, wrapping to a width, paragraphs, and placing text marks.
//!
//! Every width and height here comes from [`crate::font::measure`], which shapes the text with
//! the bundled font exactly as it is drawn.

use crate::font;
use crate::markup::{self, RunStyle};
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
/// the limit stays whole on its own line (it is never cut): [`fits`] tells whether it did.
/// Styled text ([`crate::markup`]) keeps its style across a break: a line starts in the style
/// the line before it ended in.
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
            let carried = markup::style_at_end(&current);
            lines.push(std::mem::take(&mut current));
            current = if carried == RunStyle::default() {
                word.to_string()
            } else {
                format!("{}{word}", carried.code())
            };
        }
    }
    if !current.is_empty() || lines.is_empty() {
        lines.push(current);
    }
    lines
}

/// Whether every line is at most `max_mm` wide.
pub fn fits(lines: &[String], style: &TextStyle, max_mm: f64) -> bool {
    lines.iter().all(|l| width(l, style) <= max_mm)
}

/// The widest of some lines.
pub fn widest(lines: &[String], style: &TextStyle) -> f64 {
    lines.iter().map(|l| width(l, style)).fold(0.0, f64::max)
}

/// Text wrapped to a width, set line under line.
#[derive(Debug, Clone)]
pub struct Paragraph {
    pub lines: Vec<String>,
    pub style: TextStyle,
}

impl Paragraph {
    /// `text` wrapped to `width`.
    pub fn new(text: &str, style: TextStyle, width: f64) -> Paragraph {
        Paragraph {
            lines: wrap(text, &style, width),
            style,
        }
    }

    pub fn height(&self) -> f64 {
        self.lines.len() as f64 * line_height(&self.style)
    }

    /// Whether no word is wider than `width` (a wider word would run past it).
    pub fn fits(&self, width: f64) -> bool {
        fits(&self.lines, &self.style, width)
    }

    /// The text marks, left-aligned at `x` from `top` down.
    pub fn marks(&self, x: f64, top: f64) -> Vec<Mark> {
        self.aligned(x, top, TextAlign::Start)
    }

    /// The text marks, each line aligned at `x` as `align` says, from `top` down.
    pub fn aligned(&self, x: f64, top: f64, align: TextAlign) -> Vec<Mark> {
        let lh = line_height(&self.style);
        self.lines
            .iter()
            .enumerate()
            .map(|(i, line)| {
                label(
                    line,
                    Point::new(x, top + i as f64 * lh),
                    self.style,
                    align,
                    TextBaseline::Top,
                )
            })
            .collect()
    }
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

/// A text mark reading upwards, ending at `at` (its top), centred across on `at.x`: upright
/// category labels hang from their tick.
pub fn upright(text: &str, at: Point, style: TextStyle) -> Mark {
    Mark::Text(TextMark {
        at,
        text: text.to_string(),
        style,
        align: TextAlign::End,
        baseline: TextBaseline::Middle,
        rotation: TextRotation::Up,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{Colour, Weight};

    fn style() -> TextStyle {
        TextStyle {
            size_pt: 7.0,
            weight: Weight::Regular,
            colour: Colour::BLACK,
        }
    }

    #[test]
    fn wrapping_breaks_at_spaces_and_never_cuts_a_word() {
        let s = style();
        let lines = wrap("Neither satisfied nor dissatisfied", &s, 20.0);
        assert!(lines.len() >= 2);
        assert!(fits(&lines, &s, 20.0));
        assert_eq!(lines.join(" "), "Neither satisfied nor dissatisfied");
        let styled = markup::parse("the *Homo sapiens* sample").text;
        let lines = wrap(&styled, &s, 12.0);
        assert!(lines.len() >= 3, "{lines:?}");
        let sapiens = lines.iter().find(|l| l.contains("sapiens")).unwrap();
        assert!(
            markup::runs(sapiens)[0].style.italic,
            "italic across the break"
        );
        let long = wrap("Supercalifragilistic", &s, 5.0);
        assert_eq!(long, ["Supercalifragilistic"]);
        assert!(!fits(&long, &s, 5.0));
    }
}
