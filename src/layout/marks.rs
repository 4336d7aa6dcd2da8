//! Drawing each layer's marks inside a panel, and the colour legend.

use crate::compute::{
    BoxMark, Estimate, EstimateKind, FitMark, LayerMarks, Legend, PanelData, ViolinMark,
};
use crate::scene::{Colour, Fill, Mark, Point, Stroke, TextAlign, TextBaseline};

use super::style::*;
use super::text;
use super::PanelFrame;

/// Every layer of a panel, in the order written.
pub fn layers(frame: &PanelFrame, panel: &PanelData) -> Vec<Mark> {
    let mut out = Vec::new();
    let has_points = panel
        .layers
        .iter()
        .any(|l| matches!(l, LayerMarks::CatPoints(_)));
    // Bars that points are drawn over are pale, so the points stay visible on them.
    let bar_opacity = if has_points {
        BAR_UNDER_POINTS_OPACITY
    } else {
        BAR_OPACITY
    };

    for layer in &panel.layers {
        match layer {
            LayerMarks::Bars(bars) => {
                for b in bars {
                    let (cx, gw) = frame.group_slot(b.x, b.group);
                    let colour = group_colour(b.group, frame.n_groups);
                    let (y_top, y_zero) = (frame.y(b.height), frame.y(0.0));
                    let width = gw * 0.85;
                    out.push(Mark::Rect {
                        x: cx - width / 2.0,
                        y: y_top.min(y_zero),
                        width,
                        height: (y_zero - y_top).abs(),
                        fill: Some(Fill {
                            colour,
                            opacity: bar_opacity,
                        }),
                        stroke: None,
                    });
                }
            }
            LayerMarks::Bins(bins) => {
                let overlay = frame.n_groups > 1;
                for b in bins {
                    let colour = group_colour(b.group, frame.n_groups);
                    let (x0, x1) = (frame.x_num(b.lo), frame.x_num(b.hi));
                    let (y_top, y_zero) = (frame.y(b.height), frame.y(0.0));
                    out.push(Mark::Rect {
                        x: x0,
                        y: y_top,
                        width: x1 - x0,
                        height: y_zero - y_top,
                        fill: Some(Fill {
                            colour,
                            opacity: if overlay { 0.45 } else { 0.8 },
                        }),
                        stroke: Some(Stroke::solid(
                            if overlay { colour } else { Colour::WHITE },
                            0.2,
                        )),
                    });
                }
            }
            LayerMarks::CatPoints(points) => {
                for p in points {
                    let (cx, gw) = frame.group_slot(p.x, p.group);
                    out.push(dot(
                        Point::new(cx + p.offset * gw, frame.y(p.y)),
                        group_colour(p.group, frame.n_groups),
                    ));
                }
            }
            LayerMarks::XyPoints(points) => {
                for (x, y, g) in points {
                    out.push(dot(
                        Point::new(frame.x_num(*x), frame.y(*y)),
                        group_colour(*g, frame.n_groups),
                    ));
                }
            }
            LayerMarks::Boxes(boxes) => {
                for b in boxes {
                    draw_box(&mut out, frame, b);
                    // With points, every outlier is already drawn as a point: a second mark
                    // would look like a second value (the summary still lists the outliers).
                    if !has_points {
                        draw_outliers(&mut out, frame, b);
                    }
                }
            }
            LayerMarks::Estimates { marks, kind } => marks
                .iter()
                .for_each(|e| draw_estimate(&mut out, frame, e, *kind)),
            LayerMarks::Lines(paths) => {
                for path in paths {
                    let points = path
                        .points
                        .iter()
                        .map(|(slot, offset, y)| {
                            let (cx, gw) = frame.group_slot(*slot, path.group);
                            Point::new(cx + offset * gw, frame.y(*y))
                        })
                        .collect();
                    let stroke = Stroke {
                        opacity: LINE_OPACITY,
                        ..Stroke::solid(group_colour(path.group, frame.n_groups), LINE_WIDTH_MM)
                    };
                    out.push(Mark::Line { points, stroke });
                }
            }
            LayerMarks::Levels(levels) => {
                for l in levels {
                    let (cx, _) = frame.group_slot(l.x, l.group);
                    let colour = group_colour(l.group, frame.n_groups);
                    out.push(Mark::Line {
                        points: vec![
                            Point::new(cx, frame.y(l.q1 as f64)),
                            Point::new(cx, frame.y(l.q3 as f64)),
                        ],
                        stroke: Stroke::solid(colour, ERROR_LINE_MM * 2.0),
                    });
                    out.push(Mark::Circle {
                        centre: Point::new(cx, frame.y(l.median as f64)),
                        radius: ESTIMATE_RADIUS_MM * 1.2,
                        fill: Some(Fill::solid(colour)),
                        stroke: Some(Stroke::solid(Colour::WHITE, 0.25)),
                    });
                }
            }
            LayerMarks::Curves(curves) => {
                for c in curves {
                    let colour = group_colour(c.group, frame.n_groups);
                    let line: Vec<Point> = c
                        .points
                        .iter()
                        .map(|(x, y)| Point::new(frame.x_num(*x), frame.y(*y)))
                        .collect();
                    let mut area = line.clone();
                    if let (Some(first), Some(last)) = (line.first(), line.last()) {
                        area.push(Point::new(last.x, frame.y(0.0)));
                        area.push(Point::new(first.x, frame.y(0.0)));
                    }
                    out.push(Mark::Polygon {
                        points: area,
                        fill: Some(Fill {
                            colour,
                            opacity: 0.15,
                        }),
                        stroke: None,
                    });
                    out.push(Mark::Line {
                        points: line,
                        stroke: Stroke::solid(colour, 0.4),
                    });
                }
            }
            LayerMarks::Violins { marks, peak } => marks
                .iter()
                .for_each(|v| draw_violin(&mut out, frame, v, *peak)),
            LayerMarks::Fits(fits) => fits.iter().for_each(|f| draw_fit(&mut out, frame, f)),
            LayerMarks::Flows(flows) => out.extend(super::flows::draw(frame, flows)),
        }
    }
    out
}

/// Half the width of the widest violin, as a share of its group's slot, and at most this.
const VIOLIN_HALF_SHARE: f64 = 0.45;
const VIOLIN_HALF_MAX_MM: f64 = 9.0;

/// A violin: the density mirrored about the slot's centre; lines across it at the quartiles
/// (dashed) and the median (solid).
fn draw_violin(out: &mut Vec<Mark>, frame: &PanelFrame, v: &ViolinMark, peak: f64) {
    if peak <= 0.0 {
        return;
    }
    let (cx, gw) = frame.group_slot(v.x, v.group);
    let colour = group_colour(v.group, frame.n_groups);
    let ink = summary_colour(v.group, frame.n_groups);
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
            opacity: 0.25,
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
                dash: Some(vec![0.8, 0.5]),
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

/// A fitted line over its band.
fn draw_fit(out: &mut Vec<Mark>, frame: &PanelFrame, f: &FitMark) {
    let colour = summary_colour(f.group, frame.n_groups);
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
                opacity: 0.18,
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
        stroke: Stroke::solid(colour, MEDIAN_LINE_MM),
    });
}

fn dot(centre: Point, colour: Colour) -> Mark {
    Mark::Circle {
        centre,
        radius: POINT_RADIUS_MM,
        fill: Some(Fill {
            colour,
            opacity: POINT_OPACITY,
        }),
        stroke: None,
    }
}

/// Summary marks use ink when there is one group, and the group's colour otherwise.
fn summary_colour(group: usize, n_groups: usize) -> Colour {
    if n_groups > 1 {
        group_colour(group, n_groups)
    } else {
        INK
    }
}

/// A box with its median line and whiskers.
fn draw_box(out: &mut Vec<Mark>, frame: &PanelFrame, b: &BoxMark) {
    let (cx, gw) = frame.group_slot(b.x, b.group);
    let colour = summary_colour(b.group, frame.n_groups);
    let half = (gw * 0.5).min(8.0) / 2.0;
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
    let colour = summary_colour(b.group, frame.n_groups);
    for o in &b.outliers {
        out.push(Mark::Circle {
            centre: Point::new(cx, frame.y(*o)),
            radius: POINT_RADIUS_MM * 1.2,
            fill: Some(Fill::solid(Colour::WHITE)),
            stroke: Some(Stroke::solid(colour, BOX_LINE_MM)),
        });
    }
}

fn draw_estimate(out: &mut Vec<Mark>, frame: &PanelFrame, e: &Estimate, kind: EstimateKind) {
    let (cx, gw) = frame.group_slot(e.x, e.group);
    let colour = summary_colour(e.group, frame.n_groups);
    // A summary mark sits on top of the values it summarises: a white halo under the interval
    // and, with colour groups, an ink outline keep it readable over points of its own colour.
    let outline = if frame.n_groups > 1 {
        INK
    } else {
        Colour::WHITE
    };
    if let Some((lo, hi)) = e.interval {
        let cap = CAP_MM.min(gw * 0.4) / 2.0;
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
    let centre = Point::new(cx, frame.y(e.centre));
    let stroke = Some(Stroke::solid(outline, 0.3));
    match kind {
        EstimateKind::Mean => out.push(Mark::Circle {
            centre,
            radius: ESTIMATE_RADIUS_MM,
            fill: Some(Fill::solid(colour)),
            stroke,
        }),
        EstimateKind::Median => {
            let half = ESTIMATE_RADIUS_MM * 1.1;
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

/// The colour legend, flowing left to right below the title; returns the new top.
pub fn legend(marks: &mut Vec<Mark>, legend: &Legend, width: f64, top: f64) -> f64 {
    let style = legend_label();
    let lh = text::line_height(&style);
    let swatch = lh * 0.7;
    let mut x = MARGIN_MM;
    let mut y = top;
    let heading = format!("{}:", legend.title);
    marks.push(text::label(
        &heading,
        Point::new(x, y + lh / 2.0),
        axis_title(),
        TextAlign::Start,
        TextBaseline::Middle,
    ));
    x += text::width(&heading, &axis_title()) + 2.0 * GAP_MM;
    let n = legend.levels.len();
    for (g, label) in legend.levels.labels.iter().enumerate() {
        let item_w = swatch + GAP_MM + text::width(label, &style) + 3.0 * GAP_MM;
        if x + item_w > MARGIN_MM + width && x > MARGIN_MM + 1.0 {
            x = MARGIN_MM;
            y += lh + GAP_MM * 0.5;
        }
        marks.push(Mark::Rect {
            x,
            y: y + (lh - swatch) / 2.0,
            width: swatch,
            height: swatch,
            fill: Some(Fill::solid(group_colour(g, n))),
            stroke: None,
        });
        marks.push(text::label(
            label,
            Point::new(x + swatch + GAP_MM, y + lh / 2.0),
            style,
            TextAlign::Start,
            TextBaseline::Middle,
        ));
        x += item_w;
    }
    y + lh
}
