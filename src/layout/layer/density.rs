//! `density`: a curve over a pale area down to zero, per colour group.

use crate::compute::layer::Curve;
use crate::scene::{Fill, Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, curves: &[Curve]) {
    for c in curves {
        let colour = group_colour(c.group, frame.n_groups);
        let line: Vec<Point> = c
            .points
            .iter()
            .map(|(x, y)| Point::new(frame.x_num(*x), frame.y(*y)))
            .collect();
        let mut area = line.clone();
        if let (Some(first), Some(last)) = (line.first(), line.last()) {
            area.push(Point::new(last.x, frame.y(0.0)));
            area.push(Point::new(first.x, frame.y(0.0)));
        }
        out.push(Mark::Polygon {
            points: area,
            fill: Some(Fill {
                colour,
                opacity: DENSITY_AREA_OPACITY,
            }),
            stroke: None,
        });
        out.push(Mark::Line {
            points: line,
            stroke: Stroke::solid(colour, CURVE_LINE_MM),
        });
    }
}
