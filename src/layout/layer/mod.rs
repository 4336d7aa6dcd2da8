//! Drawing each layer's marks inside a panel: one file per layer, and the one dispatch over
//! [`LayerMarks`]. Shared here: dots, summary colours, estimates with intervals, and bars.
//!
//! Invariant: layers are drawn in the order written; each draws only inside its panel (the
//! caller clips to the panel's rectangle).

mod boxplot;
mod counts;
mod density;
mod ecdf;
mod fit;
mod flows;
pub(super) mod guide;
mod histogram;
mod lines;
mod mean;
mod median;
mod points;
mod smooth;
mod violin;

use crate::compute::layer::{Bar, Estimate};
use crate::compute::{LayerMarks, PanelData};
use crate::scene::{Colour, Fill, Mark, PathSegment, Point, Stroke};

use super::style::*;
use super::PanelFrame;

/// Every layer of a panel, in the order written; guides behind them all, their labels on top.
pub fn draw(frame: &PanelFrame, panel: &PanelData) -> Vec<Mark> {
    let mut out = Vec::new();
    for layer in &panel.layers {
        if let LayerMarks::Guide(g) = layer {
            guide::draw_behind(&mut out, frame, g);
        }
    }
    let behind = out.len();
    for layer in &panel.layers {
        match layer {
            LayerMarks::Points(points) => points::draw(&mut out, frame, points),
            LayerMarks::Box(boxes) => boxplot::draw(&mut out, frame, boxes),
            LayerMarks::Violin(violins) => violin::draw(&mut out, frame, violins),
            LayerMarks::Mean(means) => mean::draw(&mut out, frame, means),
            LayerMarks::Median(medians) => median::draw(&mut out, frame, medians),
            LayerMarks::Lines(paths) => lines::draw(&mut out, frame, paths),
            LayerMarks::Counts(counts) => counts::draw(&mut out, frame, counts),
            LayerMarks::Histogram(bins) => histogram::draw(&mut out, frame, bins),
            LayerMarks::Density(curves) => density::draw(&mut out, frame, curves),
            LayerMarks::Ecdf(steps) => ecdf::draw(&mut out, frame, steps),
            LayerMarks::Fit(fits) => fit::draw(&mut out, frame, fits),
            LayerMarks::Smooth(curves) => smooth::draw(&mut out, frame, curves),
            LayerMarks::Flows(flows) => flows::draw(&mut out, frame, flows),
            // Drawn behind every layer, above.
            LayerMarks::Guide(_) => {}
        }
    }
    let (labels, _) = guide::labels(frame, &panel.layers, &out[behind..]);
    out.extend(labels);
    out
}

/// Bars from zero on a categorical axis; pale under points, so the points stay visible.
fn draw_bars(out: &mut Vec<Mark>, frame: &PanelFrame, bars: &[Bar]) {
    let opacity = if frame.shows_points {
        BAR_UNDER_POINTS_OPACITY
    } else {
        BAR_OPACITY
    };
    for b in bars {
        let (cx, gw) = frame.group_slot(b.x, b.group);
        let colour = frame.colour(b.group);
        let (y_top, y_zero) = (frame.y(b.height), frame.y(0.0));
        let width = gw * BAR_SHARE;
        out.push(Mark::Rect {
            x: cx - width / 2.0,
            y: y_top.min(y_zero),
            width,
            height: (y_zero - y_top).abs(),
            fill: Some(Fill { colour, opacity }),
            stroke: None,
        });
    }
}

/// The shape of an estimate's centre: a dot for a mean, a diamond for a median.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Centre {
    Dot,
    Diamond,
}

/// Many circles of one radius as one shape: each a closed sub-path of four cubic arcs
/// (the usual quarter-circle constant 0.5523, common practice). Centres closer than
/// [`MERGED_DOT_GRID_MM`] (on a grid of that step) are drawn once; the shape's inside is
/// their union, so overlaps do not darken.
fn circles(centres: impl Iterator<Item = Point>, radius: f64) -> Vec<PathSegment> {
    let mut cells: std::collections::BTreeSet<(i64, i64)> = std::collections::BTreeSet::new();
    for c in centres {
        cells.insert((
            (c.x / MERGED_DOT_GRID_MM).round() as i64,
            (c.y / MERGED_DOT_GRID_MM).round() as i64,
        ));
    }
    let k = 0.5523 * radius;
    let mut out = Vec::with_capacity(cells.len() * 6);
    for (i, j) in cells {
        let (x, y) = (i as f64 * MERGED_DOT_GRID_MM, j as f64 * MERGED_DOT_GRID_MM);
        let r = radius;
        out.push(PathSegment::MoveTo(Point::new(x + r, y)));
        for (c1, c2, to) in [
            ((x + r, y + k), (x + k, y + r), (x, y + r)),
            ((x - k, y + r), (x - r, y + k), (x - r, y)),
            ((x - r, y - k), (x - k, y - r), (x, y - r)),
            ((x + k, y - r), (x + r, y - k), (x + r, y)),
        ] {
            out.push(PathSegment::CubicTo {
                c1: Point::new(c1.0, c1.1),
                c2: Point::new(c2.0, c2.1),
                to: Point::new(to.0, to.1),
            });
        }
        out.push(PathSegment::Close);
    }
    out
}

/// An estimate's interval as an error bar with caps, over a white halo (nothing without one).
fn draw_interval(out: &mut Vec<Mark>, frame: &PanelFrame, e: &Estimate) {
    interval_at(out, frame, frame.group_slot(e.x, e.group), e);
}

/// [`draw_interval`] at a place across x: its centre and the width its group may use.
fn interval_at<X>(out: &mut Vec<Mark>, frame: &PanelFrame, (cx, gw): (f64, f64), e: &Estimate<X>) {
    let colour = frame.summary_colour(e.group);
    // A summary mark sits on top of the values it summarises: a white halo under the interval
    // keeps it readable over points of its own colour.
    if let Some((lo, hi)) = e.interval {
        let cap = CAP_MM.min(gw * CAP_SHARE) / 2.0;
        let (ylo, yhi) = (frame.y(lo), frame.y(hi));
        let segments = [
            [Point::new(cx, ylo), Point::new(cx, yhi)],
            [Point::new(cx - cap, ylo), Point::new(cx + cap, ylo)],
            [Point::new(cx - cap, yhi), Point::new(cx + cap, yhi)],
        ];
        for stroke in [
            Stroke::solid(Colour::WHITE, ERROR_LINE_MM + HALO_MM),
            Stroke::solid(colour, ERROR_LINE_MM),
        ] {
            for segment in &segments {
                out.push(Mark::Line {
                    points: segment.to_vec(),
                    stroke: stroke.clone(),
                });
            }
        }
    }
}

fn draw_estimate(out: &mut Vec<Mark>, frame: &PanelFrame, e: &Estimate, centre_shape: Centre) {
    estimate_at(out, frame, frame.group_slot(e.x, e.group), e, centre_shape);
}

/// [`draw_estimate`] at a place across x: its centre and the width its group may use.
fn estimate_at<X>(
    out: &mut Vec<Mark>,
    frame: &PanelFrame,
    (cx, gw): (f64, f64),
    e: &Estimate<X>,
    centre_shape: Centre,
) {
    let colour = frame.summary_colour(e.group);
    // With colour groups, an ink outline keeps the centre readable over points of its colour.
    let outline = if frame.n_groups > 1 {
        INK
    } else {
        Colour::WHITE
    };
    interval_at(out, frame, (cx, gw), e);
    let centre = Point::new(cx, frame.y(e.centre));
    let stroke = Some(Stroke::solid(outline, ESTIMATE_OUTLINE_MM));
    match centre_shape {
        Centre::Dot => out.push(Mark::Circle {
            centre,
            radius: ESTIMATE_RADIUS_MM,
            fill: Some(Fill::solid(colour)),
            stroke,
        }),
        Centre::Diamond => {
            let half = ESTIMATE_RADIUS_MM * DIAMOND_SCALE;
            out.push(Mark::Polygon {
                points: vec![
                    Point::new(cx, centre.y - half),
                    Point::new(cx + half, centre.y),
                    Point::new(cx, centre.y + half),
                    Point::new(cx - half, centre.y),
                ],
                fill: Some(Fill::solid(colour)),
                stroke,
            });
        }
    }
}
