//! Drawing each layer's marks inside a panel: one file per layer, and the one dispatch over
//! [`LayerMarks`]. Shared here: dots, summary colours, estimates with intervals, bars, and
//! dots arranged side by side.
//!
//! Invariant: layers are drawn in the order written; each draws only inside its panel (the
//! caller clips to the panel's rectangle).

mod boxplot;
mod counts;
mod density;
mod difference;
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
mod stack;
mod violin;

use std::collections::BTreeMap;

use crate::check::layer::Arrange;
use crate::compute::layer::{Bar, Estimate};
use crate::compute::{LayerMarks, PanelData};
use crate::scene::{Colour, Fill, Mark, PathSegment, Point, Stroke};
use crate::stats;

use super::style::*;
use super::PanelFrame;

/// Every layer of a panel, in the order written (guides behind them all, their labels on
/// top): the marks inside the panel, and those in the strip of estimates under it (`strip`,
/// when the figure has one).
pub fn draw(
    frame: &PanelFrame,
    strip: Option<&PanelFrame>,
    panel: &PanelData,
) -> (Vec<Mark>, Vec<Mark>) {
    let mut out = Vec::new();
    let mut under = Vec::new();
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
            LayerMarks::Difference(marks) => {
                if let Some(strip) = strip {
                    difference::draw(&mut under, strip, marks);
                }
            }
            LayerMarks::Counts(counts) => counts::draw(&mut out, frame, counts),
            LayerMarks::Stack(stack) => stack::draw(&mut out, frame, stack),
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
    (out, under)
}

/// The places of dots arranged side by side in their cells, in the order given: `dots` are
/// (x slot, colour group, value). Per cell, the dots' heights in millimetres are placed by
/// Wilkinson's stacks (one row of dots per bin of one dot's width, centred on the group's
/// band, at the bin's middle) or by the swarm ([`stats::swarm_offsets`]); a cell whose widest
/// row would leave its group's band is narrowed to fit it, so its dots may overlap sideways.
fn arrange(frame: &PanelFrame, how: Arrange, dots: &[(usize, usize, f64)]) -> Vec<Point> {
    let mut cells: BTreeMap<(usize, usize), Vec<usize>> = BTreeMap::new();
    for (i, (x, g, _)) in dots.iter().enumerate() {
        cells.entry((*x, *g)).or_default().push(i);
    }
    let mut places = vec![Point::new(0.0, 0.0); dots.len()];
    for ((x, g), members) in cells {
        let (cx, gw) = frame.group_slot(x, g);
        // Heights upwards from the panel's bottom, so ascending values ascend.
        let heights: Vec<f64> = members
            .iter()
            .map(|&i| frame.rect.bottom() - frame.y(dots[i].2))
            .collect();
        let (mut offsets, heights) = match how {
            Arrange::Swarm => (swarm(&heights), heights),
            Arrange::Stack => stacked(&heights),
        };
        let widest = offsets.iter().fold(0.0_f64, |m, o| m.max(o.abs()));
        let room = (gw / 2.0 - POINT_RADIUS_MM).max(0.0);
        if widest > room {
            offsets.iter_mut().for_each(|o| *o *= room / widest);
        }
        for ((&i, o), h) in members.iter().zip(offsets).zip(heights) {
            places[i] = Point::new(cx + o, frame.rect.bottom() - h);
        }
    }
    places
}

/// Offsets of a swarm of dots at `heights` (mm); all on the centre line if they cannot be
/// placed (a height that is not finite).
fn swarm(heights: &[f64]) -> Vec<f64> {
    stats::swarm_offsets(heights, 1.0, POINT_RADIUS_MM).unwrap_or_else(|_| vec![0.0; heights.len()])
}

/// Wilkinson's stacks of dots at `heights` (mm), one dot wide: each dot's offset across the
/// band (its stack's row centred) and its height (its stack's middle).
fn stacked(heights: &[f64]) -> (Vec<f64>, Vec<f64>) {
    let diameter = 2.0 * POINT_RADIUS_MM;
    let Ok(stacks) = stats::dot_stacks(heights, diameter) else {
        return (vec![0.0; heights.len()], heights.to_vec());
    };
    let mut sizes: BTreeMap<u64, usize> = BTreeMap::new();
    for s in &stacks {
        let size = sizes.entry(s.centre.to_bits()).or_default();
        *size = (*size).max(s.height + 1);
    }
    stacks
        .iter()
        .map(|s| {
            let size = sizes[&s.centre.to_bits()];
            let offset = (s.height as f64 - (size - 1) as f64 / 2.0) * diameter;
            (offset, s.centre)
        })
        .unzip()
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
