//! A panel's frame: range-frame axes with outward ticks, tick and category labels, the n row,
//! and (on request) faint reference lines.
//!
//! An axis line stands [`AXIS_OFFSET_MM`] away from the data area and spans only the range of
//! the data on that axis (Tufte's range frame): its two ends are the data's minimum and
//! maximum. Ticks point away from the data.

use crate::scene::{Colour, Fill, Mark, Point, Rect, Stroke, TextAlign, TextBaseline};

use super::labels::{Arrangement, NRow};
use super::solve::{n_swatch_side, XAxis, YAxis};
use super::style::*;
use super::text;
use super::PanelFrame;

fn axis_stroke() -> Stroke {
    Stroke::solid(AXIS_INK, AXIS_WIDTH_MM)
}

fn segment(a: Point, b: Point) -> Mark {
    Mark::Line {
        points: vec![a, b],
        stroke: axis_stroke(),
    }
}

/// The span of `extent` along an axis, as positions clamped to `[lo, hi]` (in mm).
fn range_span(a: f64, b: f64, lo: f64, hi: f64) -> (f64, f64) {
    let (a, b) = (a.clamp(lo, hi), b.clamp(lo, hi));
    (a.min(b), a.max(b))
}

/// Faint lines across the panel at the y ticks (`grid`), under the data.
pub fn grid_lines(out: &mut Vec<Mark>, frame: &PanelFrame, y: &YAxis) {
    let r = frame.rect;
    let positions: Vec<f64> = match y {
        YAxis::Numbers { map, .. } => map.ticks.iter().map(|t| frame.y(*t)).collect(),
        YAxis::Levels { labels, .. } => (0..labels.len()).map(|i| frame.y(i as f64)).collect(),
        YAxis::Hidden => Vec::new(),
    };
    for pos in positions {
        out.push(Mark::Line {
            points: vec![Point::new(r.x, pos), Point::new(r.right(), pos)],
            stroke: Stroke::solid(GRID, GRID_WIDTH_MM),
        });
    }
}

/// The y axis left of the panel: its range-frame line, ticks and (in the first column) labels.
pub fn y_axis(out: &mut Vec<Mark>, frame: &PanelFrame, y: &YAxis, labelled: bool) {
    let r = frame.rect;
    let line_x = r.x - AXIS_OFFSET_MM;
    let (ticks, span, style, labels): (Vec<f64>, (f64, f64), _, Vec<Option<&String>>) = match y {
        YAxis::Numbers { map, extent, style } => (
            map.ticks.iter().map(|t| frame.y(*t)).collect(),
            range_span(frame.y(extent.0), frame.y(extent.1), r.y, r.bottom()),
            *style,
            map.labels.iter().map(Some).collect(),
        ),
        YAxis::Levels {
            labels,
            style,
            shown,
        } => {
            let pos: Vec<f64> = (0..labels.len()).map(|i| frame.y(i as f64)).collect();
            let span = match (pos.first(), pos.last()) {
                (Some(a), Some(b)) => range_span(*a, *b, r.y, r.bottom()),
                _ => (r.y, r.y),
            };
            let shown = labels
                .iter()
                .zip(shown)
                .map(|(l, s)| s.then_some(l))
                .collect();
            (pos, span, *style, shown)
        }
        YAxis::Hidden => return,
    };
    if span.1 > span.0 {
        out.push(segment(
            Point::new(line_x, span.0),
            Point::new(line_x, span.1),
        ));
    }
    for (pos, label) in ticks.iter().zip(labels) {
        out.push(segment(
            Point::new(line_x - TICK_MM, *pos),
            Point::new(line_x, *pos),
        ));
        if let (true, Some(label)) = (labelled, label) {
            out.push(text::label(
                label,
                Point::new(line_x - TICK_MM - GAP_MM, *pos),
                style,
                TextAlign::End,
                TextBaseline::Middle,
            ));
        }
    }
}

/// Where the labels under the x axis start.
pub fn labels_top(rect: Rect) -> f64 {
    rect.bottom() + AXIS_OFFSET_MM + TICK_MM + GAP_MM
}

/// The x axis under the panel: its range-frame line, ticks and labels. `axis_line`: draw the
/// line and ticks (not under flows, which have no axes).
pub fn x_axis(out: &mut Vec<Mark>, frame: &PanelFrame, x: &XAxis, axis_line: bool) {
    let r = frame.rect;
    let line_y = r.bottom() + AXIS_OFFSET_MM;
    let top = labels_top(r);
    match x {
        XAxis::Numbers { map, extent } => {
            let span = range_span(frame.x_num(extent.0), frame.x_num(extent.1), r.x, r.right());
            if span.1 > span.0 {
                out.push(segment(
                    Point::new(span.0, line_y),
                    Point::new(span.1, line_y),
                ));
            }
            for (t, label) in map.ticks.iter().zip(&map.labels) {
                let at = frame.x_num(*t);
                out.push(segment(
                    Point::new(at, line_y),
                    Point::new(at, line_y + TICK_MM),
                ));
                out.push(text::label(
                    label,
                    Point::new(at, top),
                    tick_label(),
                    TextAlign::Middle,
                    TextBaseline::Top,
                ));
            }
        }
        XAxis::Categories(cats) => {
            let n = cats.lines.len();
            let centre = |i: usize| super::band_slot(r, n, 1, i, 0).0;
            if axis_line {
                if n > 1 {
                    out.push(segment(
                        Point::new(centre(0), line_y),
                        Point::new(centre(n - 1), line_y),
                    ));
                }
                for i in 0..n {
                    out.push(segment(
                        Point::new(centre(i), line_y),
                        Point::new(centre(i), line_y + TICK_MM),
                    ));
                }
            }
            let lh = text::line_height(&cats.style);
            for (i, lines) in cats.lines.iter().enumerate() {
                if !cats.shown[i] {
                    continue;
                }
                match cats.arrangement {
                    Arrangement::Upright => {
                        // The label's lines side by side, the first on the left.
                        let first = centre(i) - (lines.len() - 1) as f64 * lh / 2.0;
                        for (k, line) in lines.iter().enumerate() {
                            let at = Point::new(first + k as f64 * lh, top);
                            out.push(text::upright(line, at, cats.style));
                        }
                    }
                    Arrangement::Rows | Arrangement::Staggered => {
                        let row = if cats.arrangement == Arrangement::Staggered {
                            (i % 2) as f64
                        } else {
                            0.0
                        };
                        let block = text::Paragraph {
                            lines: lines.clone(),
                            style: cats.style,
                        };
                        out.extend(block.aligned(centre(i), top + row * lh, TextAlign::Middle));
                    }
                }
            }
        }
    }
}

/// The n row under a panel, from `top`; in the first column, with its heading `n` and, when
/// each colour group has a line, a swatch of the group's colour before each line.
pub fn n_row(out: &mut Vec<Mark>, rect: Rect, row: &NRow, top: f64, heading: Option<&[Colour]>) {
    let style = n_label();
    let lh = text::line_height(&style);
    for item in &row.items {
        out.push(text::label(
            &item.text,
            Point::new(rect.x + item.centre, top + item.line as f64 * lh),
            style,
            TextAlign::Middle,
            TextBaseline::Top,
        ));
    }
    let Some(colours) = heading else { return };
    let mut right = rect.x - AXIS_OFFSET_MM - TICK_MM - GAP_MM;
    if row.per_group {
        let side = n_swatch_side();
        for line in 0..row.lines {
            out.push(Mark::Rect {
                x: right - side,
                y: top + line as f64 * lh + (lh - side) / 2.0,
                width: side,
                height: side,
                fill: Some(Fill::solid(colours.get(line).copied().unwrap_or(INK))),
                stroke: None,
            });
        }
        right -= side + GAP_MM;
    }
    out.push(text::label(
        "n",
        Point::new(right, top),
        n_heading(),
        TextAlign::End,
        TextBaseline::Top,
    ));
}
