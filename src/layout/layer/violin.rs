//! `violin`: the density mirrored about the slot's centre, with the quartiles marked.

use crate::compute::layer::ViolinMark;
use crate::scene::{Fill, Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, violins: &[ViolinMark]) {
    for v in violins {
        draw_violin(out, frame, v, frame.width_peak);
    }
}

/// A violin: the density mirrored about the slot's centre; lines across it at the quartiles
/// (dashed) and the median (solid).
fn draw_violin(out: &mut Vec<Mark>, frame: &PanelFrame, v: &ViolinMark, peak: f64) {
    if peak <= 0.0 {
        return;
    }
    let (cx, gw) = frame.group_slot(v.x, v.group);
    let colour = frame.colour(v.group);
    let ink = frame.summary_colour(v.group);
    let half_max = (gw * VIOLIN_HALF_SHARE).min(VIOLIN_HALF_MAX_MM);
    let half = |d: f64| half_max * d / peak;
    let right = v
        .outline
        .iter()
        .map(|(y, d)| Point::new(cx + half(*d), frame.y(*y)));
    let left = v
        .outline
        .iter()
        .rev()
        .map(|(y, d)| Point::new(cx - half(*d), frame.y(*y)));
    out.push(Mark::Polygon {
        points: right.chain(left).collect(),
        fill: Some(Fill {
            colour,
            opacity: VIOLIN_FILL_OPACITY,
        }),
        stroke: Some(Stroke::solid(colour, BOX_LINE_MM)),
    });
    for (q, solid) in [(v.q1, false), (v.median, true), (v.q3, false)] {
        let w = half(density_at(&v.outline, q));
        let y = frame.y(q);
        let stroke = if solid {
            Stroke::solid(ink, MEDIAN_LINE_MM)
        } else {
            Stroke {
                dash: Some(QUARTILE_DASH_MM.to_vec()),
                ..Stroke::solid(ink, BOX_LINE_MM)
            }
        };
        out.push(Mark::Line {
            points: vec![Point::new(cx - w, y), Point::new(cx + w, y)],
            stroke,
        });
    }
}

/// The outline's density at `y`, interpolated linearly between its grid points.
fn density_at(outline: &[(f64, f64)], y: f64) -> f64 {
    let i = outline.partition_point(|(v, _)| *v < y);
    match (
        i.checked_sub(1).and_then(|j| outline.get(j)),
        outline.get(i),
    ) {
        (Some(&(y0, d0)), Some(&(y1, d1))) if y1 > y0 => d0 + (d1 - d0) * (y - y0) / (y1 - y0),
        (_, Some(&(_, d))) | (Some(&(_, d)), None) => d,
        (None, None) => 0.0,
    }
}
