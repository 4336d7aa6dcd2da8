//! `median`: a diamond with its interval over a numeric y; over an ordinal y, a thick line
//! from the first to the third quartile level with a dot at the median level.

use crate::compute::layer::MedianMarks;
use crate::scene::{Colour, Fill, Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;
use super::{draw_estimate, Centre};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, medians: &MedianMarks) {
    match medians {
        MedianMarks::Values(estimates) => {
            for e in estimates {
                draw_estimate(out, frame, e, Centre::Diamond);
            }
        }
        MedianMarks::Levels(levels) => {
            for l in levels {
                let (cx, _) = frame.group_slot(l.x, l.group);
                let colour = frame.colour(l.group);
                out.push(Mark::Line {
                    points: vec![
                        Point::new(cx, frame.y(l.q1 as f64)),
                        Point::new(cx, frame.y(l.q3 as f64)),
                    ],
                    stroke: Stroke::solid(colour, ERROR_LINE_MM * 2.0),
                });
                out.push(Mark::Circle {
                    centre: Point::new(cx, frame.y(l.median as f64)),
                    radius: ESTIMATE_RADIUS_MM * LEVEL_DOT_SCALE,
                    fill: Some(Fill::solid(colour)),
                    stroke: Some(Stroke::solid(Colour::WHITE, LEVEL_DOT_OUTLINE_MM)),
                });
            }
        }
    }
}
