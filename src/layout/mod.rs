//! Layout: a figure's numbers → a scene of marks in millimetres.
//!
//! The page is built from the outside in: title and legend at the top, caption and x-axis
//! title at the bottom, the y-axis title and tick labels on the left, then a grid of panels
//! that share the y axis. Every piece of text is measured with the bundled font before it is
//! placed, so text never overlaps the plot or runs off the page; long category labels wrap,
//! then shrink, then turn upright.
//!
//! Invariant: no I/O and no statistics here — positions only.

mod axis;
mod layer;
mod legend;
mod style;
mod text;

use crate::check::plan::FigurePlan;
use crate::compute::{FigureData, Levels, XScale, YScale};
use crate::scene::{Fill, Mark, Point, Rect, Scene, Stroke, TextAlign, TextBaseline, TextStyle};

pub use axis::{format_tick, NumAxisMap};
use style::*;

/// How a figure maps data to one panel's rectangle.
pub(crate) struct PanelFrame<'a> {
    pub rect: Rect,
    pub x: XMap<'a>,
    pub y: YMap<'a>,
    pub n_groups: usize,
    /// The figure shows every value as a dot (bars under them are pale; box outliers are not
    /// drawn twice).
    pub shows_points: bool,
    /// The figure's largest width quantity (violin density, flow subjects): one scale for all.
    pub width_peak: f64,
}

/// The x axis of a panel.
pub(crate) enum XMap<'a> {
    Bands { n: usize },
    Numbers(&'a NumAxisMap),
}

/// The y axis of a panel.
pub(crate) enum YMap<'a> {
    Numbers(&'a NumAxisMap),
    Levels { n: usize },
}

impl PanelFrame<'_> {
    /// Centre of group `g` within category slot `slot`, and the width one group may use.
    pub fn group_slot(&self, slot: usize, g: usize) -> (f64, f64) {
        let XMap::Bands { n } = self.x else {
            return (self.rect.x, 0.0);
        };
        band_slot(self.rect, n, self.n_groups, slot, g)
    }

    /// Horizontal position of a numeric x value.
    pub fn x_num(&self, v: f64) -> f64 {
        match self.x {
            XMap::Numbers(a) => self.rect.x + a.frac(v) * self.rect.width,
            XMap::Bands { .. } => self.rect.x,
        }
    }

    /// Vertical position of a y value (numeric) or level slot (ordinal).
    pub fn y(&self, v: f64) -> f64 {
        let frac = match self.y {
            YMap::Numbers(a) => a.frac(v),
            YMap::Levels { n } => (v + 0.5) / n.max(1) as f64,
        };
        self.rect.y + self.rect.height * (1.0 - frac)
    }
}

/// How category labels under the x axis are set.
struct CategoryLabels {
    lines: Vec<Vec<String>>,
    style: TextStyle,
    upright: bool,
    height: f64,
}

/// Lays out a figure.
pub fn layout(plan: &FigurePlan, data: &FigureData) -> Scene {
    let (w, h) = (plan.width_mm, plan.height_mm);
    let mut marks = vec![Mark::Rect {
        x: 0.0,
        y: 0.0,
        width: w,
        height: h,
        fill: Some(Fill::solid(crate::scene::Colour::WHITE)),
        stroke: None,
    }];
    let inner_w = w - 2.0 * MARGIN_MM;
    let mut top = MARGIN_MM;
    if let Some(t) = &plan.title {
        top = stacked_text(&mut marks, t, title(), inner_w, top) + GAP_MM * 1.5;
    }
    if let Some(legend) = &data.legend {
        top = legend::draw(&mut marks, legend, inner_w, top) + GAP_MM;
    }
    let mut bottom = h - MARGIN_MM;
    if let Some(c) = &plan.caption {
        let lines = text::wrap(c, &caption(), inner_w);
        bottom -= lines.len() as f64 * text::line_height(&caption());
        stacked_lines(&mut marks, &lines, caption(), bottom);
        bottom -= GAP_MM * 1.5;
    }
    let x_title = match &data.x {
        XScale::Categories { title, .. } => title,
        XScale::Numbers(s) => &s.title,
    };
    let x_title_baseline = bottom - font_descent(&axis_title());
    bottom -= text::line_height(&axis_title()) + GAP_MM;

    // Plan the grid twice: the number of y ticks depends on the panels' height, and the left
    // margin on the width of the tick labels.
    let area = Area {
        top,
        bottom,
        width: w,
    };
    let first = Grid::plan(plan, data, &area, 5);
    let grid = Grid::plan(plan, data, &area, first.y_tick_target());
    let y_map = match &grid.y_axis {
        Some(a) => YMap::Numbers(a),
        None => YMap::Levels {
            n: grid.y_labels.len(),
        },
    };
    let shows_points = plan
        .layers
        .iter()
        .any(|l| l.decl.shows == crate::check::layer::Shows::Values);
    for (i, panel) in data.panels.iter().enumerate() {
        let rect = grid.panel_rect(i);
        let frame = PanelFrame {
            rect,
            x: match (&grid.x_axis, &data.x) {
                (Some(a), _) => XMap::Numbers(a),
                (None, XScale::Categories { levels, .. }) => XMap::Bands { n: levels.len() },
                (None, XScale::Numbers(_)) => XMap::Bands { n: 1 },
            },
            y: match &y_map {
                YMap::Numbers(a) => YMap::Numbers(a),
                YMap::Levels { n } => YMap::Levels { n: *n },
            },
            n_groups: data.legend.as_ref().map_or(1, |l| l.levels.len()),
            shows_points,
            width_peak: data.width_peak,
        };
        if plan.panels.is_some() {
            let at = Point::new(
                rect.x + rect.width / 2.0,
                rect.y - GAP_MM - font_descent(&panel_label()),
            );
            marks.push(text::label(
                &panel.label,
                at,
                panel_label(),
                TextAlign::Middle,
                TextBaseline::Alphabetic,
            ));
        }
        if !grid.y_hidden {
            draw_y_grid(
                &mut marks,
                &frame,
                &y_map,
                &grid.y_labels,
                i % grid.cols == 0,
            );
        }
        marks.push(Mark::Clip {
            rect: frame.rect,
            marks: layer::draw(&frame, panel),
        });
        let n_by_x = grid.shows_n.then_some(&panel.n_by_x);
        draw_x_axis(
            &mut marks,
            &frame,
            &grid.x_axis,
            grid.cat_labels.as_ref(),
            XAxisExtras {
                n_by_x,
                axis_line: !grid.y_hidden,
            },
        );
    }
    let (plot_top, plot_bottom) = grid.plot_span();
    if !grid.y_hidden {
        marks.push(text::upward(
            &grid.y_title,
            Point::new(MARGIN_MM, (plot_top + plot_bottom) / 2.0),
            axis_title(),
        ));
    }
    let x_centre = (grid.left + grid.right) / 2.0;
    marks.push(text::label(
        x_title,
        Point::new(x_centre, x_title_baseline),
        axis_title(),
        TextAlign::Middle,
        TextBaseline::Alphabetic,
    ));
    Scene {
        width_mm: w,
        height_mm: h,
        title: plan.title.clone(),
        description: plan.caption.clone(),
        marks,
    }
}

/// The page area left for the panels and their axes.
struct Area {
    top: f64,
    bottom: f64,
    width: f64,
}

/// Where the panels go, and the axes they share.
struct Grid {
    y_axis: Option<NumAxisMap>,
    /// No y axis at all (flows): no ticks, grid, axis lines or y title.
    y_hidden: bool,
    x_axis: Option<NumAxisMap>,
    y_title: String,
    y_labels: Vec<String>,
    cat_labels: Option<CategoryLabels>,
    shows_n: bool,
    left: f64,
    right: f64,
    top: f64,
    cols: usize,
    rows: usize,
    panel_w: f64,
    panel_h: f64,
    strip_h: f64,
    x_labels_h: f64,
}

/// Narrowest panel worth drawing before the grid wraps onto another row.
const MIN_PANEL_MM: f64 = 24.0;
/// Vertical room per y tick the axis aims for.
const MM_PER_Y_TICK: f64 = 9.0;

impl Grid {
    fn plan(plan: &FigurePlan, data: &FigureData, area: &Area, y_ticks: usize) -> Grid {
        let y_axis = match &data.y {
            YScale::Numbers(s) => Some(NumAxisMap::new(s, y_ticks)),
            YScale::Categories { .. } | YScale::Hidden => None,
        };
        let x_axis = match &data.x {
            XScale::Numbers(s) => Some(NumAxisMap::new(s, 5)),
            XScale::Categories { .. } => None,
        };
        let (y_title, y_labels) = match (&data.y, &y_axis) {
            (YScale::Numbers(s), Some(a)) => (s.title.clone(), a.labels.clone()),
            (YScale::Categories { title, levels }, _) => (title.clone(), levels.labels.clone()),
            _ => (String::new(), Vec::new()),
        };
        let tick_w = y_labels
            .iter()
            .map(|l| text::width(l, &tick_label()))
            .fold(0.0, f64::max);
        let y_hidden = data.y == YScale::Hidden;
        let left = if y_hidden {
            MARGIN_MM
        } else {
            MARGIN_MM + text::line_height(&axis_title()) + GAP_MM * 1.5 + tick_w + GAP_MM + TICK_MM
        };
        let right = area.width - MARGIN_MM - right_overhang(&x_axis);
        let n_panels = data.panels.len().max(1);
        let width_for =
            |cols: usize| (right - left - PANEL_GAP_MM * (cols - 1) as f64) / cols as f64;
        let cols = (1..=n_panels)
            .rev()
            .find(|&c| width_for(c) >= MIN_PANEL_MM)
            .unwrap_or(1);
        let rows = n_panels.div_ceil(cols);
        let panel_w = width_for(cols);
        let strip_h = if plan.panels.is_some() {
            text::line_height(&panel_label()) + GAP_MM
        } else {
            0.0
        };
        let cat_labels = match &data.x {
            XScale::Categories { levels, .. } => Some(category_labels(levels, panel_w)),
            XScale::Numbers(_) => None,
        };
        let shows_n = cat_labels.is_some() && data.panels.iter().any(|p| !p.n_by_x.is_empty());
        let x_labels_h = TICK_MM
            + GAP_MM
            + match &cat_labels {
                Some(c) => {
                    c.height
                        + if shows_n {
                            text::line_height(&n_label()) + 0.3
                        } else {
                            0.0
                        }
                }
                None => text::line_height(&tick_label()),
            };
        let top = area.top + text::line_height(&tick_label()) / 2.0;
        let avail = area.bottom - top - (rows - 1) as f64 * PANEL_GAP_MM;
        let panel_h = (avail / rows as f64 - strip_h - x_labels_h).max(5.0);
        Grid {
            y_axis,
            y_hidden,
            x_axis,
            y_title,
            y_labels,
            cat_labels,
            shows_n,
            left,
            right,
            top,
            cols,
            rows,
            panel_w,
            panel_h,
            strip_h,
            x_labels_h,
        }
    }

    /// Ticks the y axis should aim for, given the panels' height.
    fn y_tick_target(&self) -> usize {
        ((self.panel_h / MM_PER_Y_TICK).floor() as usize + 1).clamp(3, 7)
    }

    fn row_height(&self) -> f64 {
        self.strip_h + self.panel_h + self.x_labels_h + PANEL_GAP_MM
    }

    fn panel_rect(&self, i: usize) -> Rect {
        let (row, col) = (i / self.cols, i % self.cols);
        let x0 = self.left + col as f64 * (self.panel_w + PANEL_GAP_MM);
        let y0 = self.top + row as f64 * self.row_height() + self.strip_h;
        Rect::new(x0, y0, self.panel_w, self.panel_h)
    }

    /// Top of the first row of plots and bottom of the last.
    fn plot_span(&self) -> (f64, f64) {
        let first = self.top + self.strip_h;
        let last =
            self.top + (self.rows - 1) as f64 * self.row_height() + self.strip_h + self.panel_h;
        (first, last)
    }
}

fn font_descent(style: &TextStyle) -> f64 {
    crate::font::measure("g", style).descent_mm
}

/// Room a numeric x axis's last tick label needs beyond the plot's right edge.
fn right_overhang(x_axis: &Option<NumAxisMap>) -> f64 {
    x_axis
        .as_ref()
        .and_then(|a| a.labels.last())
        .map_or(0.0, |l| text::width(l, &tick_label()) / 2.0)
}

/// Wrapped lines starting at `top`; returns the new top.
fn stacked_text(marks: &mut Vec<Mark>, t: &str, style: TextStyle, width: f64, top: f64) -> f64 {
    let lines = text::wrap(t, &style, width);
    stacked_lines(marks, &lines, style, top);
    top + lines.len() as f64 * text::line_height(&style)
}

fn stacked_lines(marks: &mut Vec<Mark>, lines: &[String], style: TextStyle, top: f64) {
    let lh = text::line_height(&style);
    for (i, line) in lines.iter().enumerate() {
        marks.push(text::label(
            line,
            Point::new(MARGIN_MM, top + i as f64 * lh),
            style,
            TextAlign::Start,
            TextBaseline::Top,
        ));
    }
}

/// Chooses how category labels fit their bands: one line, wrapped, smaller, or upright.
fn category_labels(levels: &Levels, panel_w: f64) -> CategoryLabels {
    let band = panel_w / levels.len().max(1) as f64 - 0.8;
    for style in [tick_label(), small_tick_label()] {
        let lines: Vec<Vec<String>> = levels
            .labels
            .iter()
            .map(|l| text::wrap(l, &style, band))
            .collect();
        let fits = lines
            .iter()
            .flatten()
            .all(|l| text::width(l, &style) <= band);
        let max_lines = lines.iter().map(Vec::len).max().unwrap_or(1);
        if fits && max_lines <= 2 {
            return CategoryLabels {
                height: max_lines as f64 * text::line_height(&style),
                lines,
                style,
                upright: false,
            };
        }
    }
    let style = small_tick_label();
    let longest = levels
        .labels
        .iter()
        .map(|l| text::width(l, &style))
        .fold(0.0, f64::max);
    CategoryLabels {
        lines: levels.labels.iter().map(|l| vec![l.clone()]).collect(),
        style,
        upright: true,
        height: longest,
    }
}

fn draw_y_grid(
    marks: &mut Vec<Mark>,
    frame: &PanelFrame,
    y_map: &YMap,
    labels: &[String],
    with_labels: bool,
) {
    let r = frame.rect;
    let positions: Vec<f64> = match y_map {
        YMap::Numbers(a) => a.ticks.iter().map(|t| frame.y(*t)).collect(),
        YMap::Levels { n } => (0..*n).map(|i| frame.y(i as f64)).collect(),
    };
    for (pos, label) in positions.iter().zip(labels) {
        marks.push(Mark::Line {
            points: vec![Point::new(r.x, *pos), Point::new(r.x + r.width, *pos)],
            stroke: Stroke::solid(GRID, GRID_WIDTH_MM),
        });
        marks.push(Mark::Line {
            points: vec![Point::new(r.x - TICK_MM, *pos), Point::new(r.x, *pos)],
            stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
        });
        if with_labels {
            marks.push(text::label(
                label,
                Point::new(r.x - TICK_MM - GAP_MM, *pos),
                tick_label(),
                TextAlign::End,
                TextBaseline::Middle,
            ));
        }
    }
    marks.push(Mark::Line {
        points: vec![Point::new(r.x, r.y), Point::new(r.x, r.y + r.height)],
        stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
    });
}

/// What the x axis shows besides its labels.
struct XAxisExtras<'a> {
    /// `n = ` under each category.
    n_by_x: Option<&'a Vec<usize>>,
    /// The axis line and ticks (left out when there is no y axis either).
    axis_line: bool,
}

fn draw_x_axis(
    marks: &mut Vec<Mark>,
    frame: &PanelFrame,
    x_axis: &Option<NumAxisMap>,
    cats: Option<&CategoryLabels>,
    extras: XAxisExtras,
) {
    let r = frame.rect;
    let base = r.y + r.height;
    if extras.axis_line {
        marks.push(Mark::Line {
            points: vec![Point::new(r.x, base), Point::new(r.x + r.width, base)],
            stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
        });
    }
    let label_top = base + TICK_MM + GAP_MM;
    if let Some(a) = x_axis {
        for (t, l) in a.ticks.iter().zip(&a.labels) {
            let x = frame.x_num(*t);
            marks.push(Mark::Line {
                points: vec![Point::new(x, base), Point::new(x, base + TICK_MM)],
                stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
            });
            marks.push(text::label(
                l,
                Point::new(x, label_top),
                tick_label(),
                TextAlign::Middle,
                TextBaseline::Top,
            ));
        }
        return;
    }
    let Some(cats) = cats else { return };
    let lh = text::line_height(&cats.style);
    for (slot, lines) in cats.lines.iter().enumerate() {
        let (centre, _) = band_slot(r, cats.lines.len(), 1, slot, 0);
        if extras.axis_line {
            marks.push(Mark::Line {
                points: vec![Point::new(centre, base), Point::new(centre, base + TICK_MM)],
                stroke: Stroke::solid(INK, AXIS_WIDTH_MM),
            });
        }
        if cats.upright {
            marks.push(Mark::Text(crate::scene::TextMark {
                at: Point::new(centre, label_top),
                text: lines.join(" "),
                style: cats.style,
                align: TextAlign::End,
                baseline: TextBaseline::Middle,
                rotation: crate::scene::TextRotation::Up,
            }));
        } else {
            for (i, line) in lines.iter().enumerate() {
                marks.push(text::label(
                    line,
                    Point::new(centre, label_top + i as f64 * lh),
                    cats.style,
                    TextAlign::Middle,
                    TextBaseline::Top,
                ));
            }
        }
        if let Some(n) = extras.n_by_x.and_then(|n| n.get(slot)) {
            marks.push(text::label(
                &format!("n = {n}"),
                Point::new(centre, label_top + cats.height + 0.3),
                n_label(),
                TextAlign::Middle,
                TextBaseline::Top,
            ));
        }
    }
}

/// Centre and width of group `g` of `n_groups` in category slot `slot` of `n` across `rect`.
fn band_slot(rect: Rect, n: usize, n_groups: usize, slot: usize, g: usize) -> (f64, f64) {
    let band = rect.width / n.max(1) as f64;
    let used = band * BAND_FILL;
    let gw = used / n_groups.max(1) as f64;
    (
        rect.x + band * slot as f64 + (band - used) / 2.0 + gw * (g as f64 + 0.5),
        gw,
    )
}
