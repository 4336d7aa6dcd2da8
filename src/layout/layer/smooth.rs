//! `smooth`: each colour group's LOWESS curve, a line in the summary marks' colour (ink, or the
//! group's colour) as thick as a fitted line, over the values it summarises.

use crate::compute::layer::SmoothMark;
use crate::scene::{Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, curves: &[SmoothMark]) {
    for c in curves {
        out.push(Mark::Line {
            points: c
                .line
                .iter()
                .map(|(x, y)| Point::new(frame.x_num(*x), frame.y(*y)))
                .collect(),
            stroke: Stroke::solid(frame.summary_colour(c.group), MEDIAN_LINE_MM),
        });
    }
}
