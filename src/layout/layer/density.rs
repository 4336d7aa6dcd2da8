//! `density`: a curve per colour group; a lone curve over a pale area down to zero. Curves of
//! several groups overlap, so they are drawn as lines only: no mixed colour appears that the
//! legend does not name.

use crate::compute::layer::Curve;
use crate::scene::{Fill, Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, curves: &[Curve]) {
    for c in curves {
        let colour = frame.colour(c.group);
        let line: Vec<Point> = c
            .points
            .iter()
            .map(|(x, y)| Point::new(frame.x_num(*x), frame.y(*y)))
            .collect();
        if frame.n_groups <= 1 {
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
        }
        out.push(Mark::Line {
            points: line,
            stroke: frame.stroke(c.group, colour, CURVE_LINE_MM),
        });
    }
}
