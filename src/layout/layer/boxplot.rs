//! `box`: a box from the first to the third quartile, the median line, whiskers, and (when no
//! points show them) the outliers as open circles. A notched box narrows to the median between
//! the notch's ends; a notch that reaches beyond the box is drawn to the box's edge (the
//! summary keeps its computed ends).

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
    let median_half = match b.notch {
        None => {
            out.push(Mark::Rect {
                x: cx - half,
                y: y3,
                width: 2.0 * half,
                height: y1 - y3,
                fill: None,
                stroke: Some(line.clone()),
            });
            half
        }
        Some((lo, hi)) => {
            out.push(notched_outline(
                cx,
                half,
                (y1, y3),
                (frame.y(lo), frame.y(hi)),
                ym,
                line,
            ));
            half * NOTCH_WIDTH_SHARE
        }
    };
    out.push(Mark::Line {
        points: vec![
            Point::new(cx - median_half, ym),
            Point::new(cx + median_half, ym),
        ],
        stroke: Stroke::solid(colour, MEDIAN_LINE_MM),
    });
}

/// Width of a notched box at its median, as a share of its full width (common practice).
const NOTCH_WIDTH_SHARE: f64 = 0.5;

/// A box's outline narrowing to the median between the notch's ends (page y, clamped to the
/// box's edges `y1` at Q1 and `y3` at Q3).
fn notched_outline(
    cx: f64,
    half: f64,
    (y1, y3): (f64, f64),
    (notch_low, notch_high): (f64, f64),
    ym: f64,
    stroke: Stroke,
) -> Mark {
    let (top, bottom) = (y3.min(y1), y3.max(y1));
    let (n_low, n_high) = (notch_low.clamp(top, bottom), notch_high.clamp(top, bottom));
    let inner = half * NOTCH_WIDTH_SHARE;
    let side = |sign: f64| {
        [
            Point::new(cx + sign * half, y1),
            Point::new(cx + sign * half, n_low),
            Point::new(cx + sign * inner, ym),
            Point::new(cx + sign * half, n_high),
            Point::new(cx + sign * half, y3),
        ]
    };
    let mut points: Vec<Point> = side(-1.0).to_vec();
    points.extend(side(1.0).into_iter().rev());
    Mark::Polygon {
        points,
        fill: None,
        stroke: Some(stroke),
    }
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
