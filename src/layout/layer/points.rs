//! `points`: dots, jittered across their band over a categorical x.

use crate::compute::layer::PointMarks;
use crate::scene::{Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;
use super::dot;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, points: &PointMarks) {
    match points {
        PointMarks::Categories(points) => {
            for p in points {
                let (cx, gw) = frame.group_slot(p.x, p.group);
                out.push(dot(
                    Point::new(cx + p.offset * gw, frame.y(p.y)),
                    group_colour(p.group, frame.n_groups),
                ));
            }
        }
        PointMarks::Numbers(points) => {
            for (x, y, g) in points {
                out.push(dot(
                    Point::new(frame.x_num(*x), frame.y(*y)),
                    group_colour(*g, frame.n_groups),
                ));
            }
        }
    }
}
