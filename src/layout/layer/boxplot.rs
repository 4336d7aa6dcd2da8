//! `box`: a box from the first to the third quartile, the median line, whiskers, and (when no
//! points show them) the outliers as open circles.

use crate::compute::layer::BoxMark;
use crate::scene::{Colour, Fill, Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, boxes: &[BoxMark]) {
    for b in boxes {
        draw_box(out, frame, b);
        // With points, every outlier is already drawn as a point: a second mark would look
        // like a second value (the summary still lists the outliers).
        if !frame.shows_points {
            draw_outliers(out, frame, b);
        }
    }
}

/// A box with its median line and whiskers.
fn draw_box(out: &mut Vec<Mark>, frame: &PanelFrame, b: &BoxMark) {
    let (cx, gw) = frame.group_slot(b.x, b.group);
    let colour = frame.summary_colour(b.group);
    let half = (gw * BOX_WIDTH_SHARE).min(BOX_MAX_WIDTH_MM) / 2.0;
    let (y1, y3, ym) = (frame.y(b.q1), frame.y(b.q3), frame.y(b.median));
    let line = Stroke::solid(colour, BOX_LINE_MM);
    out.push(Mark::Line {
        points: vec![Point::new(cx, y1), Point::new(cx, frame.y(b.whisker_low))],
        stroke: line.clone(),
    });
    out.push(Mark::Line {
        points: vec![Point::new(cx, y3), Point::new(cx, frame.y(b.whisker_high))],
        stroke: line.clone(),
    });
    out.push(Mark::Rect {
        x: cx - half,
        y: y3,
        width: 2.0 * half,
        height: y1 - y3,
        fill: None,
        stroke: Some(line.clone()),
    });
    out.push(Mark::Line {
        points: vec![Point::new(cx - half, ym), Point::new(cx + half, ym)],
        stroke: Stroke::solid(colour, MEDIAN_LINE_MM),
    });
}

/// A box's outliers, as open circles on its centre line.
fn draw_outliers(out: &mut Vec<Mark>, frame: &PanelFrame, b: &BoxMark) {
    let (cx, _) = frame.group_slot(b.x, b.group);
    let colour = frame.summary_colour(b.group);
    for o in &b.outliers {
        out.push(Mark::Circle {
            centre: Point::new(cx, frame.y(*o)),
            radius: POINT_RADIUS_MM * OUTLIER_RADIUS_SCALE,
            fill: Some(Fill::solid(Colour::WHITE)),
            stroke: Some(Stroke::solid(colour, BOX_LINE_MM)),
        });
    }
}
