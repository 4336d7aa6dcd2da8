//! `stack`: a 100% stacked bar at each x level, one segment per level of y in its colour,
//! separated by thin white lines; centred on zero (a diverging stack), with a line at zero.

use crate::compute::layer::StackMarks;
use crate::scene::{Colour, Fill, Mark, Point, Rect, Stroke};

use super::super::style::*;
use super::super::{band_slot, PanelFrame, XMap};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, stack: &StackMarks) {
    let XMap::Bands { n } = frame.x else {
        return;
    };
    for bar in &stack.bars {
        let (cx, band) = band_slot(frame.rect, n, 1, bar.x, 0);
        let width = (band * STACK_BAR_SHARE).min(STACK_BAR_MAX_MM);
        for (level, (lo, hi)) in bar.segments.iter().enumerate() {
            if hi <= lo {
                continue;
            }
            let (top, bottom) = (frame.y(*hi), frame.y(*lo));
            out.push(Mark::Rect {
                x: cx - width / 2.0,
                y: top,
                width,
                height: bottom - top,
                fill: Some(Fill::solid(frame.colour(level))),
                stroke: Some(Stroke::solid(Colour::WHITE, STACK_SEPARATOR_MM)),
            });
        }
    }
    if stack.diverging {
        let r: Rect = frame.rect;
        let zero = frame.y(0.0);
        out.push(Mark::Line {
            points: vec![Point::new(r.x, zero), Point::new(r.right(), zero)],
            stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
        });
    }
}
