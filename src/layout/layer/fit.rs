//! `fit`: the fitted line over its translucent band.

use crate::compute::layer::FitMark;
use crate::scene::{Fill, Mark, Point};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, fits: &[FitMark]) {
    for f in fits {
        draw_fit(out, frame, f);
    }
}

/// A fitted line over its band.
fn draw_fit(out: &mut Vec<Mark>, frame: &PanelFrame, f: &FitMark) {
    let colour = frame.summary_colour(f.group);
    if !f.band.is_empty() {
        let upper = f
            .band
            .iter()
            .map(|(x, _, hi)| Point::new(frame.x_num(*x), frame.y(*hi)));
        let lower = f
            .band
            .iter()
            .rev()
            .map(|(x, lo, _)| Point::new(frame.x_num(*x), frame.y(*lo)));
        out.push(Mark::Polygon {
            points: upper.chain(lower).collect(),
            fill: Some(Fill {
                colour,
                opacity: FIT_BAND_OPACITY,
            }),
            stroke: None,
        });
    }
    out.push(Mark::Line {
        points: f
            .line
            .iter()
            .map(|(x, y)| Point::new(frame.x_num(*x), frame.y(*y)))
            .collect(),
        stroke: frame.stroke(f.group, colour, MEDIAN_LINE_MM),
    });
}
