//! `lines`: each subject's values joined, meeting the dots they join.

use crate::compute::layer::SubjectPath;
use crate::scene::{Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, paths: &[SubjectPath]) {
    for path in paths {
        let points = path
            .points
            .iter()
            .map(|(slot, offset, y)| {
                let (cx, gw) = frame.group_slot(*slot, path.group);
                Point::new(cx + offset * gw, frame.y(*y))
            })
            .collect();
        let stroke = Stroke {
            opacity: LINE_OPACITY,
            ..frame.stroke(path.group, frame.colour(path.group), LINE_WIDTH_MM)
        };
        out.push(Mark::Line { points, stroke });
    }
}
