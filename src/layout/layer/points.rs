//! `points`: dots, jittered across their band over a categorical x.
//!
//! A cell with more dots than [`POINTS_PER_CELL_CAP`] (where the figure warns, W0004) is drawn
//! as one shape of circles ([`super::circles`]), so a figure of many values stays small and
//! fast to draw.

use std::collections::BTreeMap;

use crate::compute::layer::PointMarks;
use crate::compute::POINTS_PER_CELL_CAP;
use crate::scene::{Fill, Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;
use super::circles;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, points: &PointMarks) {
    // Dots by cell (x slot and colour group), in drawing order.
    let mut cells: BTreeMap<(usize, usize), Vec<Point>> = BTreeMap::new();
    let mut order: Vec<(usize, usize)> = Vec::new();
    let mut add = |key: (usize, usize), at: Point| {
        let cell = cells.entry(key).or_default();
        if cell.is_empty() {
            order.push(key);
        }
        cell.push(at);
    };
    match points {
        PointMarks::Categories(points) => {
            for p in points {
                let (cx, gw) = frame.group_slot(p.x, p.group);
                add((p.x, p.group), Point::new(cx + p.offset * gw, frame.y(p.y)));
            }
        }
        PointMarks::Numbers(points) => {
            for (x, y, g) in points {
                add((0, *g), Point::new(frame.x_num(*x), frame.y(*y)));
            }
        }
    }
    if cells.values().all(|c| c.len() <= POINTS_PER_CELL_CAP) {
        // Every dot on its own, in data order, so overlaps darken.
        match points {
            PointMarks::Categories(points) => {
                for p in points {
                    let (cx, gw) = frame.group_slot(p.x, p.group);
                    let at = Point::new(cx + p.offset * gw, frame.y(p.y));
                    out.push(frame.dot(at, p.group));
                }
            }
            PointMarks::Numbers(points) => {
                for (x, y, g) in points {
                    let at = Point::new(frame.x_num(*x), frame.y(*y));
                    out.push(frame.dot(at, *g));
                }
            }
        }
        return;
    }
    for key in order {
        let dots = &cells[&key];
        let colour = frame.colour(key.1);
        if dots.len() <= POINTS_PER_CELL_CAP {
            out.extend(dots.iter().map(|at| frame.dot(*at, key.1)));
        } else {
            out.push(Mark::Path {
                segments: circles(dots.iter().copied(), POINT_RADIUS_MM),
                fill: Some(Fill {
                    colour,
                    opacity: POINT_OPACITY,
                }),
                stroke: None,
            });
        }
    }
}
