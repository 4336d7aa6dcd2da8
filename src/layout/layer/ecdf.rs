//! `ecdf`: a step line per colour group, at 0 from the panel's left edge to the first value,
//! rising at each distinct value, and at 1 from the last value to the right edge.

use crate::compute::layer::EcdfMark;
use crate::scene::{Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, marks: &[EcdfMark]) {
    let r = frame.rect;
    for m in marks {
        let mut points = vec![Point::new(r.x, frame.y(0.0))];
        let mut level = 0.0;
        for (v, p) in &m.steps {
            let x = frame.x_num(*v);
            points.push(Point::new(x, frame.y(level)));
            points.push(Point::new(x, frame.y(*p)));
            level = *p;
        }
        points.push(Point::new(r.x + r.width, frame.y(level)));
        let colour = frame.colour(m.group);
        out.push(Mark::Line {
            points,
            stroke: frame.stroke(m.group, colour, CURVE_LINE_MM),
        });
    }
}
