//! `difference`: in the strip of estimates under a panel, a dashed line at zero (no difference
//! from the reference level), each subject's difference as a dot (arranged as a swarm), and
//! each level's difference with its interval.

use crate::check::layer::Arrange;
use crate::compute::layer::DifferenceMarks;
use crate::scene::{Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;
use super::{arrange, draw_estimate, Centre};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, marks: &DifferenceMarks) {
    let r = frame.rect;
    let zero = frame.y(0.0);
    out.push(Mark::Line {
        points: vec![Point::new(r.x, zero), Point::new(r.right(), zero)],
        stroke: Stroke {
            dash: Some(QUARTILE_DASH_MM.to_vec()),
            ..Stroke::solid(AXIS_INK, AXIS_WIDTH_MM)
        },
    });
    let places = arrange(frame, Arrange::Swarm, &marks.dots);
    for ((_, g, _), at) in marks.dots.iter().zip(places) {
        out.push(frame.dot(at, *g));
    }
    for e in &marks.estimates {
        draw_estimate(out, frame, e, Centre::Dot);
    }
}
