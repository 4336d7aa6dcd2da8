//! Drawing flows: a stacked bar of states at each occasion, and ribbons between consecutive
//! occasions whose widths are the numbers of subjects moving from one state to another.
//!
//! The drawing:
//! - occasions sit at the centres of the x axis's category bands, so their labels and `n = `
//!   lines are the axis's own;
//! - one vertical scale (mm per subject) for every occasion and panel, from the most subjects at
//!   any occasion (the figure's width peak); states stack with the first level at the bottom (as on
//!   an ordinal y axis), separated by a fixed gap, and each occasion's column is centred;
//! - each ribbon leaves its source block and enters its target block in state order (lower
//!   states lower), which keeps crossings few; its edges are cubic curves with horizontal
//!   tangents at both ends; it takes its source state's colour, translucent;
//! - blocks are drawn over the ribbons in their state's colour, with the count written inside
//!   when it fits.

use crate::compute::layer::FlowMarks;
use crate::scene::{Colour, Fill, Mark, PathSegment, Point, TextAlign, TextBaseline, TextStyle};

use super::super::style::*;
use super::super::text;
use super::super::PanelFrame;

/// Vertical extent of one block: top and bottom in mm (top < bottom on the page).
#[derive(Debug, Clone, Copy)]
struct Block {
    top: f64,
    bottom: f64,
}

/// The marks of one panel's flows.
pub fn draw(marks: &mut Vec<Mark>, frame: &PanelFrame, flows: &FlowMarks) {
    marks.extend(flow_marks(frame, flows));
}

fn flow_marks(frame: &PanelFrame, flows: &FlowMarks) -> Vec<Mark> {
    let r = frame.rect;
    let n_occasions = flows.stacks.len();
    let n_states = flows.stacks.first().map_or(0, Vec::len);
    if n_occasions == 0 || n_states == 0 || frame.width_peak <= 0.0 {
        return Vec::new();
    }
    let band = r.width / n_occasions as f64;
    let bar = (band * FLOW_BAR_SHARE).clamp(FLOW_BAR_MIN_MM, FLOW_BAR_MAX_MM);
    let centre = |o: usize| r.x + band * (o as f64 + 0.5);
    let gap = FLOW_STATE_GAP_MM.min(r.height * FLOW_GAPS_MAX_SHARE / (n_states.max(2) - 1) as f64);
    let per_subject = (r.height - gap * (n_states - 1) as f64) / frame.width_peak;
    let blocks: Vec<Vec<Block>> = flows
        .stacks
        .iter()
        .map(|column| stack(column, r.y, r.height, gap, per_subject))
        .collect();
    let colour = |s: usize| frame.colour(s);
    let mut out = Vec::new();
    for (o, moves) in flows.moves.iter().enumerate() {
        let (x0, x1) = (centre(o) + bar / 2.0, centre(o + 1) - bar / 2.0);
        let mut leaving: Vec<f64> = blocks[o].iter().map(|b| b.bottom).collect();
        let mut arriving: Vec<f64> = blocks[o + 1].iter().map(|b| b.bottom).collect();
        for (s, row) in moves.iter().enumerate() {
            for (t, &count) in row.iter().enumerate() {
                if count == 0 {
                    continue;
                }
                let h = count as f64 * per_subject;
                let from = (leaving[s] - h, leaving[s]);
                let to = (arriving[t] - h, arriving[t]);
                leaving[s] -= h;
                arriving[t] -= h;
                out.push(ribbon((x0, from), (x1, to), colour(s)));
            }
        }
    }
    for (o, column) in blocks.iter().enumerate() {
        for (s, b) in column.iter().enumerate() {
            if b.bottom - b.top <= 0.0 {
                continue;
            }
            out.push(Mark::Rect {
                x: centre(o) - bar / 2.0,
                y: b.top,
                width: bar,
                height: b.bottom - b.top,
                fill: Some(Fill::solid(colour(s))),
                stroke: None,
            });
            out.extend(count_label(
                flows.stacks[o][s],
                centre(o),
                *b,
                bar,
                colour(s),
            ));
        }
    }
    out
}

/// Blocks of one occasion, first state at the bottom, the column centred in the panel.
fn stack(column: &[usize], top: f64, height: f64, gap: f64, per_subject: f64) -> Vec<Block> {
    let total: usize = column.iter().sum();
    let column_h = total as f64 * per_subject + gap * (column.len() - 1) as f64;
    let mut bottom = top + (height + column_h) / 2.0;
    column
        .iter()
        .map(|&n| {
            let block = Block {
                top: bottom - n as f64 * per_subject,
                bottom,
            };
            bottom = block.top - gap;
            block
        })
        .collect()
}

/// A ribbon from `(x0, (top, bottom))` to `(x1, (top, bottom))`, edges with flat ends.
fn ribbon(from: (f64, (f64, f64)), to: (f64, (f64, f64)), colour: Colour) -> Mark {
    let (x0, (top0, bottom0)) = from;
    let (x1, (top1, bottom1)) = to;
    let xm = (x0 + x1) / 2.0;
    Mark::Path {
        segments: vec![
            PathSegment::MoveTo(Point::new(x0, top0)),
            PathSegment::CubicTo {
                c1: Point::new(xm, top0),
                c2: Point::new(xm, top1),
                to: Point::new(x1, top1),
            },
            PathSegment::LineTo(Point::new(x1, bottom1)),
            PathSegment::CubicTo {
                c1: Point::new(xm, bottom1),
                c2: Point::new(xm, bottom0),
                to: Point::new(x0, bottom0),
            },
            PathSegment::Close,
        ],
        fill: Some(Fill {
            colour,
            opacity: FLOW_RIBBON_OPACITY,
        }),
        stroke: None,
    }
}

/// The count inside its block when it fits, in ink or white, whichever reads better.
fn count_label(count: usize, cx: f64, b: Block, bar: f64, fill: Colour) -> Option<Mark> {
    let style = TextStyle {
        colour: if luminance(fill) > 0.4 {
            INK
        } else {
            Colour::WHITE
        },
        ..n_label()
    };
    let text = count.to_string();
    let fits = text::width(&text, &style) + 0.5 <= bar
        && text::line_height(&style) * 0.8 <= b.bottom - b.top;
    fits.then(|| {
        text::label(
            &text,
            Point::new(cx, (b.top + b.bottom) / 2.0),
            style,
            TextAlign::Middle,
            TextBaseline::Middle,
        )
    })
}

/// Relative luminance of an sRGB colour (WCAG 2.1 definition).
fn luminance(c: Colour) -> f64 {
    let lin = |v: u8| {
        let v = f64::from(v) / 255.0;
        if v <= 0.04045 {
            v / 12.92
        } else {
            ((v + 0.055) / 1.055).powf(2.4)
        }
    };
    0.2126 * lin(c.r) + 0.7152 * lin(c.g) + 0.0722 * lin(c.b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn blocks_stack_upward_with_gaps_and_centre() {
        let b = stack(&[2, 0, 3], 0.0, 20.0, 1.0, 2.0);
        // Column: 5 subjects × 2 mm + 2 gaps = 12 mm, centred in 20 mm: from 4 to 16.
        assert_eq!((b[0].top, b[0].bottom), (12.0, 16.0));
        assert_eq!((b[1].top, b[1].bottom), (11.0, 11.0));
        assert_eq!((b[2].top, b[2].bottom), (4.0, 10.0));
    }

    #[test]
    fn white_counts_on_dark_fills() {
        // WCAG 2.1 relative luminance: white 1, black 0 (definition of the measure).
        assert!((luminance(Colour::WHITE) - 1.0).abs() < 1e-12);
        assert_eq!(luminance(Colour::BLACK), 0.0);
    }
}
