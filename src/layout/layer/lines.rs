//! `lines`: each subject's values joined, meeting the dots they join (over a categorical x
//! they take the dots' jitter; over a numeric x they run through the values themselves).

use crate::compute::layer::{PathPoint, SubjectPath};
use crate::scene::{Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, paths: &[SubjectPath]) {
    for path in paths {
        let points = path
            .points
            .iter()
            .map(|p| match *p {
                PathPoint::Slot { x, offset, y } => {
                    let (cx, gw) = frame.group_slot(x, path.group);
                    Point::new(cx + offset * gw, frame.y(y))
                }
                PathPoint::Value { x, y } => Point::new(frame.x_num(x), frame.y(y)),
            })
            .collect();
        let stroke = Stroke {
            opacity: LINE_OPACITY,
            ..frame.stroke(path.group, frame.colour(path.group), LINE_WIDTH_MM)
        };
        out.push(Mark::Line { points, stroke });
    }
}
