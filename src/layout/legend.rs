//! The colour legend: a heading and one swatch per level.
//!
//! It is set in one of two ways: as a column inside a panel, in a corner the data leave empty
//! ([`super::room`] finds one), or, when no corner is free, as rows across the top of the
//! figure. The swatch shows what the groups draw: a dot for dots, a short line for curves and
//! lines, a square for filled shapes.

use crate::check::plan::GroupMarks;
use crate::compute::LayerMarks;
use crate::compute::{Legend, PanelData};
use crate::scene::{Fill, Mark, Point, Rect, TextAlign, TextBaseline};

use super::marks;
use super::style::*;
use super::text;

/// What a legend's swatches look like.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Swatch {
    Dot,
    Line,
    Square,
}

impl Swatch {
    /// The swatch for a figure: the kind of mark its first layer draws in group colours; with
    /// `shapes`, a dot when some layer draws dots, and with `dashes`, a line when some layer
    /// draws lines, so the legend shows what tells the groups apart.
    pub fn for_legend(panel: Option<&PanelData>, marks: GroupMarks) -> Swatch {
        let layers = panel.map_or(&[][..], |p| p.layers.as_slice());
        if marks.shapes && layers.iter().any(|l| matches!(l, LayerMarks::Points(_))) {
            return Swatch::Dot;
        }
        let lines = |l: &LayerMarks| {
            matches!(
                l,
                LayerMarks::Lines(_)
                    | LayerMarks::Density(_)
                    | LayerMarks::Ecdf(_)
                    | LayerMarks::Fit(_)
            )
        };
        if marks.dashes && layers.iter().any(lines) {
            return Swatch::Line;
        }
        Self::for_panel(panel)
    }

    /// The swatch of the kind of mark a panel's first layer draws in group colours.
    fn for_panel(panel: Option<&PanelData>) -> Swatch {
        // Guides are not drawn in group colours.
        let first =
            panel.and_then(|p| p.layers.iter().find(|l| !matches!(l, LayerMarks::Guide(_))));
        match first {
            Some(LayerMarks::Points(_)) => Swatch::Dot,
            Some(
                LayerMarks::Lines(_)
                | LayerMarks::Density(_)
                | LayerMarks::Ecdf(_)
                | LayerMarks::Fit(_)
                | LayerMarks::Smooth(_)
                | LayerMarks::Histogram(_),
            ) => Swatch::Line,
            _ => Swatch::Square,
        }
    }
}

/// A legend measured for setting.
#[derive(Debug, Clone)]
pub struct LegendBlock<'a> {
    legend: &'a Legend,
    swatch: Swatch,
    /// Each level's label, wrapped to the room there is.
    labels: Vec<Vec<String>>,
}

/// One item's place: the top-left of its swatch's line.
struct Item {
    x: f64,
    y: f64,
}

impl<'a> LegendBlock<'a> {
    /// A legend whose labels wrap to at most `label_width`.
    pub fn new(legend: &'a Legend, swatch: Swatch, label_width: f64) -> LegendBlock<'a> {
        let style = legend_label();
        let labels = legend
            .levels
            .labels
            .iter()
            .map(|l| text::wrap(l, &style, label_width.max(1.0)))
            .collect();
        LegendBlock {
            legend,
            swatch,
            labels,
        }
    }

    fn line_height() -> f64 {
        text::line_height(&legend_label())
    }

    fn swatch_side() -> f64 {
        Self::line_height() * SWATCH_SHARE
    }

    /// A swatch's width: longer for dashed lines, so their pattern shows.
    fn swatch_width(&self) -> f64 {
        if self.swatch == Swatch::Line && self.legend.marks.dashes {
            Self::swatch_side() * DASHED_SWATCH_SIDES
        } else {
            Self::swatch_side()
        }
    }

    fn item_width(&self, i: usize) -> f64 {
        self.swatch_width() + GAP_MM + text::widest(&self.labels[i], &legend_label())
    }

    fn item_height(&self, i: usize) -> f64 {
        self.labels[i].len() as f64 * Self::line_height()
    }

    /// Whether every label fits the width it was wrapped to and the lines allowed.
    pub fn fits(&self, label_width: f64) -> bool {
        self.labels.iter().all(|l| {
            l.len() <= MAX_LABEL_LINES && text::fits(l, &legend_label(), label_width.max(1.0))
        })
    }

    /// The size of the legend set as a column (heading, then one item per line).
    pub fn column_size(&self) -> (f64, f64) {
        let heading = text::width(&self.legend.title, &legend_title());
        let width = (0..self.labels.len())
            .map(|i| self.item_width(i))
            .fold(heading, f64::max);
        let height = text::line_height(&legend_title())
            + (0..self.labels.len())
                .map(|i| self.item_height(i))
                .sum::<f64>();
        (width, height)
    }

    /// Places the items in rows across `width`, after the heading; returns each item's place
    /// (relative to the legend's top-left) and the total height.
    fn flow(&self, width: f64) -> (Vec<Item>, f64) {
        let lh = Self::line_height();
        let mut x = text::width(&self.legend.title, &legend_title()) + LEGEND_ITEM_GAP_MM;
        let (mut y, mut row_h) = (0.0, text::line_height(&legend_title()).max(lh));
        let mut items = Vec::new();
        for i in 0..self.labels.len() {
            let w = self.item_width(i);
            if x > 0.0 && x + w > width {
                x = 0.0;
                y += row_h + GAP_MM / 2.0;
                row_h = lh;
            }
            items.push(Item { x, y });
            row_h = row_h.max(self.item_height(i));
            x += w + LEGEND_ITEM_GAP_MM;
        }
        (items, y + row_h)
    }

    /// Height of the legend set in rows across `width`.
    pub fn rows_height(&self, width: f64) -> f64 {
        self.flow(width).1
    }

    /// The marks of the legend set in rows across `width`, from `(x, top)`.
    pub fn rows_marks(&self, x: f64, top: f64, width: f64) -> Vec<Mark> {
        let (items, _) = self.flow(width);
        let mut out = vec![heading(&self.legend.title, x, top)];
        for (i, item) in items.iter().enumerate() {
            self.item_marks(&mut out, i, x + item.x, top + item.y);
        }
        out
    }

    /// The marks of the legend set as a column in `rect`.
    pub fn column_marks(&self, rect: Rect) -> Vec<Mark> {
        let mut out = vec![heading(&self.legend.title, rect.x, rect.y)];
        let mut y = rect.y + text::line_height(&legend_title());
        for i in 0..self.labels.len() {
            self.item_marks(&mut out, i, rect.x, y);
            y += self.item_height(i);
        }
        out
    }

    fn item_marks(&self, out: &mut Vec<Mark>, i: usize, x: f64, top: f64) {
        let lh = Self::line_height();
        let side = Self::swatch_side();
        let colour = self.legend.colours.get(i).copied().unwrap_or(INK);
        let y = top + (lh - side) / 2.0;
        let width = self.swatch_width();
        out.push(match self.swatch {
            Swatch::Dot => marks::dot(
                marks::shape(self.legend.marks, i),
                Point::new(x + side / 2.0, y + side / 2.0),
                side * 0.35,
                Fill::solid(colour),
            ),
            Swatch::Line => Mark::Line {
                points: vec![
                    Point::new(x, y + side / 2.0),
                    Point::new(x + width, y + side / 2.0),
                ],
                stroke: marks::stroke(self.legend.marks, i, colour, CURVE_LINE_MM * 1.5),
            },
            Swatch::Square => Mark::Rect {
                x,
                y,
                width: side,
                height: side,
                fill: Some(Fill::solid(colour)),
                stroke: None,
            },
        });
        let label = text::Paragraph {
            lines: self.labels[i].clone(),
            style: legend_label(),
        };
        out.extend(label.marks(x + width + GAP_MM, top));
    }
}

fn heading(title: &str, x: f64, top: f64) -> Mark {
    text::label(
        title,
        Point::new(x, top),
        legend_title(),
        TextAlign::Start,
        TextBaseline::Top,
    )
}
