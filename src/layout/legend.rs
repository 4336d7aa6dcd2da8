//! The legend: a heading and one colour swatch per level, flowing left to right.

use crate::compute::Legend;
use crate::scene::{Fill, Mark, Point, TextAlign, TextBaseline};

use super::style::*;
use super::text;

/// The colour legend, flowing left to right below the title; returns the new top.
pub fn draw(marks: &mut Vec<Mark>, legend: &Legend, width: f64, top: f64) -> f64 {
    let style = legend_label();
    let lh = text::line_height(&style);
    let swatch = lh * SWATCH_SHARE;
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
            y += lh + GAP_MM / 2.0;
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
