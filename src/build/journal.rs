//! A journal's targets for artwork, and the checks of a laid-out figure against them.
//!
//! A project opts in with a `[journal]` table in `figura.toml`; every key has a default. The
//! defaults are common practice in journals' artwork guidelines, not any one standard: columns
//! of 85 mm (one column), 114 mm (one and a half) and 174 mm (two columns); text at least 6 pt
//! and lines at least 0.25 pt at the printed size; raster images at 300 dpi or more.
//!
//! The checks run on the scene — every mark at the size it is printed — in `figura check` and
//! whenever a figure is made, and report warnings (errors under `--deny-warnings`):
//! - `W0008`: the smallest text mark, when below `min-text`. Raised and lowered parts of a
//!   line (label markup) are smaller by design and are measured at their line's size, as
//!   journals state least sizes for the text itself.
//! - `W0009`: the thinnest stroke, when below `min-line` (fills have no line width).
//! - `W0010`: the figure's `dpi`, when it has a PNG or TIFF and the dpi is below `dpi`.
//! - `W0011`: the figure's width, when wider than the widest of `widths`.

use crate::check::FigurePlan;
use crate::diag::{Code, Diagnostic};
use crate::scene::{mm_to_pt, Mark, Scene};

/// The artwork targets of a journal (see the module doc for the defaults).
#[derive(Debug, Clone, PartialEq)]
pub struct Journal {
    /// The widths a figure may have, in millimetres (its columns); never empty.
    pub widths_mm: Vec<f64>,
    /// The least text size at the printed size, in points.
    pub min_text_pt: f64,
    /// The least line width at the printed size, in points.
    pub min_line_pt: f64,
    /// The least resolution of raster images.
    pub dpi: u32,
}

impl Default for Journal {
    fn default() -> Self {
        Journal {
            widths_mm: vec![85.0, 114.0, 174.0],
            min_text_pt: 6.0,
            min_line_pt: 0.25,
            dpi: 300,
        }
    }
}

/// Every way the figure misses the journal's targets.
pub fn check(plan: &FigurePlan, scene: &Scene, journal: &Journal) -> Vec<Diagnostic> {
    let mut out = Vec::new();
    out.extend(small_text(plan, scene, journal));
    out.extend(thin_lines(plan, scene, journal));
    out.extend(low_resolution(plan, journal));
    out.extend(too_wide(plan, journal));
    out
}

fn small_text(plan: &FigurePlan, scene: &Scene, journal: &Journal) -> Option<Diagnostic> {
    let mut smallest: Option<(f64, String)> = None;
    let mut below = 0usize;
    scene.for_each_text(&mut |t| {
        let size = t.style.size_pt;
        if size < journal.min_text_pt && !crate::font::display_text(&t.text).is_empty() {
            below += 1;
            if smallest.as_ref().is_none_or(|(s, _)| size < *s) {
                smallest = Some((size, crate::markup::plain(&t.text)));
            }
        }
    });
    let (size, text) = smallest?;
    Some(
        Diagnostic::new(
            Code::TextTooSmall,
            format!(
                "figure `{}` prints {below} text{} below the journal's {} pt: \"{}\" is {} pt",
                plan.name,
                if below == 1 { "" } else { "s" },
                points(journal.min_text_pt),
                shortened(&text),
                points(size)
            ),
        )
        .with_label(plan.size_span, "printed at this size")
        .with_help(
            "give the figure a larger `size` so its text is laid out at the usual sizes, or set \
             `min-text` under [journal] in figura.toml to the journal's own least size",
        ),
    )
}

fn thin_lines(plan: &FigurePlan, scene: &Scene, journal: &Journal) -> Option<Diagnostic> {
    let thinnest = thinnest_stroke_mm(&scene.marks)?;
    let pt = mm_to_pt(thinnest);
    if pt >= journal.min_line_pt {
        return None;
    }
    Some(
        Diagnostic::new(
            Code::LineTooThin,
            format!(
                "figure `{}` draws lines {} pt wide, thinner than the journal's {} pt",
                plan.name,
                points(pt),
                points(journal.min_line_pt)
            ),
        )
        .with_label(plan.name_span, "thin lines")
        .with_help(
            "thin lines can vanish in print; set `min-line` under [journal] in figura.toml to \
             the journal's own least width if it is smaller",
        ),
    )
}

/// The width of the thinnest stroke drawn, in millimetres.
fn thinnest_stroke_mm(marks: &[Mark]) -> Option<f64> {
    let mut thinnest: Option<f64> = None;
    let mut see = |w: f64| thinnest = Some(thinnest.map_or(w, |t: f64| t.min(w)));
    for mark in marks {
        match mark {
            Mark::Line { stroke, .. } => see(stroke.width_mm),
            Mark::Rect { stroke, .. }
            | Mark::Circle { stroke, .. }
            | Mark::Polygon { stroke, .. }
            | Mark::Path { stroke, .. } => {
                if let Some(s) = stroke {
                    see(s.width_mm);
                }
            }
            Mark::Clip { marks, .. } => {
                if let Some(w) = thinnest_stroke_mm(marks) {
                    see(w);
                }
            }
            Mark::Text(_) => {}
        }
    }
    thinnest
}

fn low_resolution(plan: &FigurePlan, journal: &Journal) -> Option<Diagnostic> {
    let raster = plan.formats.png || plan.formats.tiff;
    if !raster || plan.dpi >= journal.dpi {
        return None;
    }
    let (span, label) = match plan.dpi_span {
        Some(span) => (span, "below the journal's resolution"),
        None => (plan.name_span, "the project's default dpi"),
    };
    Some(
        Diagnostic::new(
            Code::LowResolution,
            format!(
                "figure `{}` is drawn at {} dpi, below the journal's {} dpi",
                plan.name, plan.dpi, journal.dpi
            ),
        )
        .with_label(span, label)
        .with_help(format!("write `dpi {}` (or more)", journal.dpi)),
    )
}

fn too_wide(plan: &FigurePlan, journal: &Journal) -> Option<Diagnostic> {
    let widest = journal.widths_mm.iter().copied().fold(0.0, f64::max);
    // A thousandth of a millimetre for sizes written in other units (6.85in is 173.99 mm).
    if plan.width_mm <= widest + 1e-3 {
        return None;
    }
    let columns: Vec<String> = journal
        .widths_mm
        .iter()
        .map(|w| format!("{} mm", points(*w)))
        .collect();
    Some(
        Diagnostic::new(
            Code::TooWide,
            format!(
                "figure `{}` is {} mm wide, wider than the journal's widest column ({} mm)",
                plan.name,
                points(plan.width_mm),
                points(widest)
            ),
        )
        .with_label(plan.size_span, "too wide for the page")
        .with_help(format!(
            "give it the width of one of the journal's columns: {}",
            columns.join(", ")
        )),
    )
}

/// A size with at most two decimals, trailing zeros dropped.
fn points(v: f64) -> String {
    let text = format!("{v:.2}");
    text.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// A text cut to 40 characters for a message.
fn shortened(text: &str) -> String {
    if text.chars().count() <= 40 {
        text.to_string()
    } else {
        format!("{}…", text.chars().take(39).collect::<String>())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{Colour, Point, Stroke};

    #[test]
    fn the_thinnest_stroke_is_found_inside_clips() {
        let line = |w| Mark::Line {
            points: vec![Point::new(0.0, 0.0), Point::new(1.0, 1.0)],
            stroke: Stroke::solid(Colour::BLACK, w),
        };
        let marks = vec![
            line(0.3),
            Mark::Clip {
                rect: crate::scene::Rect::new(0.0, 0.0, 5.0, 5.0),
                marks: vec![line(0.05)],
            },
        ];
        assert_eq!(thinnest_stroke_mm(&marks), Some(0.05));
        assert_eq!(thinnest_stroke_mm(&[]), None);
        assert_eq!(points(0.25), "0.25");
        assert_eq!(points(6.0), "6");
    }
}
