//! `histogram`: adjacent bars over the bins.
//!
//! One group's bars are one filled shape — the outline of the histogram — so many narrow bins
//! never look white; hairline separators between bins are drawn only where bins are at least
//! [`BIN_SEPARATOR_MIN_MM`] wide. Colour groups share the bins, so their bars overlap: each
//! group is drawn as its outline only, in its colour, so no mixed colour appears that the
//! legend does not name.

use crate::compute::layer::Bin;
use crate::scene::{Colour, Fill, Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, bins: &[Bin]) {
    let overlay = frame.n_groups > 1;
    let mut groups: Vec<usize> = bins.iter().map(|b| b.group).collect();
    groups.dedup();
    for g in groups {
        let group: Vec<&Bin> = bins.iter().filter(|b| b.group == g).collect();
        let outline = outline(frame, &group);
        if outline.len() < 2 {
            continue;
        }
        let colour = frame.colour(g);
        if overlay {
            out.push(Mark::Line {
                points: outline,
                stroke: Stroke::solid(colour, CURVE_LINE_MM),
            });
            continue;
        }
        out.push(Mark::Polygon {
            points: outline,
            fill: Some(Fill {
                colour,
                opacity: BIN_OPACITY,
            }),
            stroke: None,
        });
        separators(out, frame, &group);
    }
}

/// The outline of one group's bars: up and down their tops from the first bin's left edge at
/// zero to the last bin's right edge at zero (bins the group skips drop to zero).
fn outline(frame: &PanelFrame, bins: &[&Bin]) -> Vec<Point> {
    let zero = frame.y(0.0);
    let mut points = Vec::new();
    let mut last_hi: Option<f64> = None;
    for b in bins {
        let (x0, x1, top) = (frame.x_num(b.lo), frame.x_num(b.hi), frame.y(b.height));
        if last_hi.is_some_and(|hi| (hi - x0).abs() > 1e-9) {
            // A gap: down to zero and along it.
            if let Some(hi) = last_hi {
                points.push(Point::new(hi, zero));
            }
            points.push(Point::new(x0, zero));
        } else if last_hi.is_none() {
            points.push(Point::new(x0, zero));
        }
        points.push(Point::new(x0, top));
        points.push(Point::new(x1, top));
        last_hi = Some(x1);
    }
    if let Some(hi) = last_hi {
        points.push(Point::new(hi, zero));
    }
    points
}

/// White hairlines between neighbouring bins, where the bins are wide enough to need them.
fn separators(out: &mut Vec<Mark>, frame: &PanelFrame, bins: &[&Bin]) {
    let zero = frame.y(0.0);
    for w in bins.windows(2) {
        let (a, b) = (w[0], w[1]);
        let x = frame.x_num(b.lo);
        let narrowest = (frame.x_num(a.hi) - frame.x_num(a.lo)).min(frame.x_num(b.hi) - x);
        if narrowest < BIN_SEPARATOR_MIN_MM {
            continue;
        }
        let top = frame.y(a.height.min(b.height));
        out.push(Mark::Line {
            points: vec![Point::new(x, zero), Point::new(x, top)],
            stroke: Stroke::solid(Colour::WHITE, BIN_SEPARATOR_MM),
        });
    }
}
