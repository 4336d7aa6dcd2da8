//! `points`: dots, jittered across their band over a categorical x, or arranged side by side
//! (`arrange(stack)`, `arrange(swarm)`: [`super::arrange`]).
//!
//! A cell with more dots than [`POINTS_PER_CELL_CAP`] (where the figure warns, W0004) is drawn
//! as one shape of circles ([`super::circles`]), so a figure of many values stays small and
//! fast to draw.

use std::collections::BTreeMap;

use crate::compute::layer::{CatPoint, PointMarks};
use crate::compute::POINTS_PER_CELL_CAP;
use crate::scene::{Fill, Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;
use super::{arrange, circles};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, points: &PointMarks) {
    // Every dot with its cell (x slot and colour group), in data order.
    let placed = positions(frame, points);
    // Dots by cell, cells in drawing order.
    let mut cells: BTreeMap<(usize, usize), Vec<Point>> = BTreeMap::new();
    let mut order: Vec<(usize, usize)> = Vec::new();
    for (key, at) in &placed {
        let cell = cells.entry(*key).or_default();
        if cell.is_empty() {
            order.push(*key);
        }
        cell.push(*at);
    }
    if cells.values().all(|c| c.len() <= POINTS_PER_CELL_CAP) {
        // Every dot on its own, in data order, so overlaps darken.
        for (key, at) in placed {
            out.push(frame.dot(at, key.1));
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

/// Each dot's cell and place, in data order.
fn positions(frame: &PanelFrame, points: &PointMarks) -> Vec<((usize, usize), Point)> {
    match points {
        PointMarks::Categories(points) => points
            .iter()
            .map(|p| {
                let (cx, gw) = frame.group_slot(p.x, p.group);
                ((p.x, p.group), Point::new(cx + p.offset * gw, frame.y(p.y)))
            })
            .collect(),
        PointMarks::Numbers(points) => points
            .iter()
            .map(|(x, y, g)| ((0, *g), Point::new(frame.x_num(*x), frame.y(*y))))
            .collect(),
        PointMarks::Arranged(points, how) => {
            let cells: Vec<(usize, usize, f64)> = points
                .iter()
                .map(|p: &CatPoint| (p.x, p.group, p.y))
                .collect();
            let places = arrange(frame, *how, &cells);
            points
                .iter()
                .zip(places)
                .map(|(p, at)| ((p.x, p.group), at))
                .collect()
        }
    }
}
