//! Solving the page: where every piece of a figure goes at a given size, or why it does not fit.
//!
//! From the outside in: the title (when drawn) and the legend (when it goes on top) at the
//! top, then the y-axis title; the caption, the key and the x-axis title at the bottom; the
//! y labels' column on the left; the rest is the grid of panels. A figure of differences adds
//! under each panel's data area a strip of estimates ([`EstimateStrip`]): a smaller data area
//! with its own y axis and a heading, sharing the panel's x axis, which is drawn under it. Every text is measured before
//! it is placed. The grid tries every number of columns and keeps the one whose panels are
//! largest (about as wide as [`PANEL_ASPECT`] times their height) among those where everything fits: each
//! panel at least [`MIN_PANEL_WIDTH_MM`] × [`MIN_PANEL_HEIGHT_MM`], category labels and n rows
//! set without overlap ([`super::labels`]), tick labels apart, titles and labels wrapped onto
//! at most [`MAX_LABEL_LINES`] lines with no word wider than its room.
//!
//! When nothing fits, the solve still returns the arrangement with the fewest problems (so a
//! figure can be drawn under `--allow-crowding`), and the problems say what did not fit.

use crate::check::plan::{Axes, FigurePlan};
use crate::compute::{FigureData, NumScale, XScale, YScale};
use crate::scene::Rect;

use super::axis::NumAxisMap;
use super::labels::{self, Arrangement, CategoryLabels, NRow};
use super::legend::{LegendBlock, Swatch};
use super::style::*;
use super::text::{self, Paragraph};

/// Something that does not fit, and which side of the figure would make room for it.
#[derive(Debug, Clone, PartialEq)]
pub struct Problem {
    pub what: String,
    pub needs: Needs,
}

/// The side a problem needs more of.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Needs {
    Width,
    Height,
}

fn problem(needs: Needs, what: impl Into<String>) -> Problem {
    Problem {
        what: what.into(),
        needs,
    }
}

/// Whether the legend is set in rows at the top of the figure, or left to a corner inside a
/// panel (no room reserved).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LegendSpace {
    Inside,
    Top,
}

/// A paragraph and the top of its first line.
#[derive(Debug, Clone)]
pub struct Placed {
    pub text: Paragraph,
    pub top: f64,
}

/// The y axis as it will be drawn.
#[derive(Debug, Clone)]
pub enum YAxis {
    Numbers {
        map: NumAxisMap,
        extent: (f64, f64),
        style: crate::scene::TextStyle,
    },
    /// Levels of a categorical y at their slots; `shown` says which are labelled.
    Levels {
        labels: Vec<String>,
        style: crate::scene::TextStyle,
        shown: Vec<bool>,
    },
    Hidden,
}

/// The x axis as it will be drawn.
#[derive(Debug, Clone)]
pub enum XAxis {
    Numbers { map: NumAxisMap, extent: (f64, f64) },
    Categories(CategoryLabels),
}

/// The strip of estimates under each panel's data area (`difference`): its heading (the axis
/// title, at the panel's left edge in the first column), the space above it that holds the
/// heading, its height and its y axis.
#[derive(Debug, Clone)]
pub struct EstimateStrip {
    pub title: Paragraph,
    pub gap: f64,
    pub height: f64,
    pub y: YAxis,
}

impl EstimateStrip {
    /// Where its heading starts under a data area whose bottom is `bottom`.
    pub fn title_top(&self, bottom: f64) -> f64 {
        bottom + CLIP_GRACE_MM + GAP_MM / 2.0
    }
}

/// The grid of panels and everything around each panel.
#[derive(Debug, Clone)]
pub struct Grid {
    pub cols: usize,
    /// Left edge of the first column's data area.
    pub left: f64,
    /// Top of the first row (its panel labels).
    pub top: f64,
    pub panel_w: f64,
    pub panel_h: f64,
    /// The data area's width and height before they were held at 1 mm: negative when the
    /// rest of the page takes more than there is (how far a crowded grid is from fitting).
    pub room: (f64, f64),
    /// Height of the panel labels above each data area, and the clear space above the data
    /// area for the top y tick label when there are no panel labels.
    pub strip_h: f64,
    pub head_room: f64,
    /// Height of everything under a data area (under its strip of estimates, when there is
    /// one): axis, ticks, labels, n row.
    pub below_h: f64,
    /// The strip of estimates under each data area, when a layer draws one.
    pub estimates: Option<EstimateStrip>,
    pub col_gap: f64,
    pub y: YAxis,
    pub x: XAxis,
    /// The n row of each panel (empty when no n is shown).
    pub n_rows: Vec<NRow>,
    /// Each panel's label, wrapped.
    pub panel_labels: Vec<Vec<String>>,
    /// The width the y labels' column was given.
    pub y_labels_w: f64,
}

impl Grid {
    fn row_height(&self) -> f64 {
        let estimates = self.estimates.as_ref().map_or(0.0, |e| e.gap + e.height);
        self.strip_h + self.head_room + self.panel_h + estimates + self.below_h + PANEL_GAP_MM
    }

    /// The data area of panel `i`.
    pub fn panel_rect(&self, i: usize) -> Rect {
        let (row, col) = (i / self.cols, i % self.cols);
        Rect::new(
            self.left + col as f64 * (self.panel_w + self.col_gap),
            self.top + row as f64 * self.row_height() + self.strip_h + self.head_room,
            self.panel_w,
            self.panel_h,
        )
    }

    /// The strip of estimates under panel `i`'s data area, when the figure has one.
    pub fn estimate_rect(&self, i: usize) -> Option<Rect> {
        let e = self.estimates.as_ref()?;
        let panel = self.panel_rect(i);
        Some(Rect::new(
            panel.x,
            panel.bottom() + e.gap,
            panel.width,
            e.height,
        ))
    }

    /// Left and right edges of the columns' data areas.
    pub fn span_x(&self) -> (f64, f64) {
        let right = self.left
            + self.cols as f64 * self.panel_w
            + (self.cols.saturating_sub(1)) as f64 * self.col_gap;
        (self.left, right)
    }
}

/// The whole page at one size.
#[derive(Debug, Clone)]
pub struct Page {
    pub width: f64,
    pub height: f64,
    pub title: Option<Placed>,
    /// The legend's top, when it is set in rows at the top.
    pub legend_top: Option<f64>,
    pub y_title: Option<Placed>,
    pub x_title: Placed,
    pub key: Option<Placed>,
    pub caption: Option<Placed>,
    pub grid: Grid,
    pub problems: Vec<Problem>,
}

/// What the page's panels need, independent of the grid.
struct Content<'a> {
    plan: &'a FigurePlan,
    data: &'a FigureData,
    width: f64,
    height: f64,
    legend: LegendSpace,
    /// A number of columns to keep, instead of the best one.
    cols: Option<usize>,
}

/// Lays out the page at `width` × `height` mm; `cols` holds the grid at that many columns
/// (how a crowded figure is described: with the grid it would have at the size that fits).
pub fn solve(
    plan: &FigurePlan,
    data: &FigureData,
    (width, height): (f64, f64),
    legend: LegendSpace,
    cols: Option<usize>,
) -> Page {
    let content = Content {
        plan,
        data,
        width,
        height,
        legend,
        cols,
    };
    content.page()
}

/// The paragraphs around the grid, with their heights, and the problems they bring.
struct Chrome {
    title: Option<Paragraph>,
    legend_h: Option<f64>,
    y_title: Option<Paragraph>,
    x_title: Paragraph,
    key: Option<Paragraph>,
    caption: Option<Paragraph>,
    problems: Vec<Problem>,
}

impl Chrome {
    fn top_height(&self) -> f64 {
        MARGIN_MM
            + self
                .title
                .as_ref()
                .map_or(0.0, |t| t.height() + TITLE_GAP_MM)
            + self.legend_h.map_or(0.0, |h| h + GAP_MM)
            + self
                .y_title
                .as_ref()
                .map_or(0.0, |t| t.height() + GAP_MM / 2.0)
    }

    fn bottom_height(&self) -> f64 {
        MARGIN_MM
            + self.caption.as_ref().map_or(0.0, |c| c.height() + GAP_MM)
            + self.key.as_ref().map_or(0.0, |k| k.height() + GAP_MM)
            + self.x_title.height()
            + GAP_MM
    }
}

impl Content<'_> {
    fn inner_width(&self) -> f64 {
        self.width - 2.0 * MARGIN_MM
    }

    fn page(&self) -> Page {
        let chrome = self.chrome();
        let grid_top = chrome.top_height();
        let grid_bottom = self.height - chrome.bottom_height();
        let (grid, mut problems) = self.best_grid(grid_top, grid_bottom);
        problems.splice(0..0, chrome.problems.iter().cloned());
        let mut top = MARGIN_MM;
        let title = chrome.title.map(|t| {
            let placed = Placed { top, text: t };
            top += placed.text.height() + TITLE_GAP_MM;
            placed
        });
        let legend_top = chrome.legend_h.map(|h| {
            let at = top;
            top += h + GAP_MM;
            at
        });
        let y_title = chrome.y_title.map(|t| Placed { top, text: t });
        let mut bottom = self.height - MARGIN_MM;
        let caption = chrome.caption.map(|c| {
            bottom -= c.height();
            let placed = Placed {
                top: bottom,
                text: c,
            };
            bottom -= GAP_MM;
            placed
        });
        let key = chrome.key.map(|k| {
            bottom -= k.height();
            let placed = Placed {
                top: bottom,
                text: k,
            };
            bottom -= GAP_MM;
            placed
        });
        let x_title = Placed {
            top: bottom - chrome.x_title.height(),
            text: chrome.x_title,
        };
        Page {
            width: self.width,
            height: self.height,
            title,
            legend_top,
            y_title,
            x_title,
            key,
            caption,
            grid,
            problems,
        }
    }

    fn chrome(&self) -> Chrome {
        let (plan, data) = (self.plan, self.data);
        let inner = self.inner_width();
        let mut problems = Vec::new();
        let title = plan
            .title
            .as_ref()
            .filter(|_| plan.show_title)
            .map(|t| Paragraph::new(t, title(), inner));
        let legend_h = match (&data.legend, self.legend) {
            (Some(legend), LegendSpace::Top) => {
                let label_w = inner * LEGEND_LABEL_SHARE;
                let block = LegendBlock::new(
                    legend,
                    Swatch::for_legend(data.panels.first(), legend.marks),
                    label_w,
                );
                if !block.fits(label_w) {
                    problems.push(problem(
                        Needs::Width,
                        "a legend label is too long for the figure's width",
                    ));
                }
                Some(block.rows_height(inner))
            }
            _ => None,
        };
        let y_title = match &data.y {
            YScale::Numbers(s) => Some(s.title.clone()),
            YScale::Categories { title, .. } => Some(title.clone()),
            YScale::Hidden => None,
        }
        .filter(|t| !t.is_empty())
        .map(|t| Paragraph::new(&t, axis_title(), inner));
        let x_title = Paragraph::new(&x_title_text(data), axis_title(), inner);
        for (what, p) in [
            ("the y-axis title", y_title.as_ref()),
            ("the x-axis title", Some(&x_title)),
        ] {
            if p.is_some_and(|p| p.lines.len() > MAX_LABEL_LINES || !p.fits(inner)) {
                problems.push(problem(
                    Needs::Width,
                    format!("{what} needs more than {MAX_LABEL_LINES} lines"),
                ));
            }
        }
        let key =
            (!data.key.is_empty()).then(|| Paragraph::new(&data.key.join(" "), key_text(), inner));
        let caption = plan
            .caption
            .as_ref()
            .map(|c| Paragraph::new(c, caption(), inner));
        for (what, p) in [
            ("the title", &title),
            ("the key", &key),
            ("the caption", &caption),
        ] {
            if p.as_ref().is_some_and(|p| !p.fits(inner)) {
                problems.push(problem(
                    Needs::Width,
                    format!("a word of {what} is wider than the figure"),
                ));
            }
        }
        Chrome {
            title,
            legend_h,
            y_title,
            x_title,
            key,
            caption,
            problems,
        }
    }

    /// Tries every number of columns; keeps the grid that fits with the largest panels, or the
    /// one with the fewest problems.
    fn best_grid(&self, top: f64, bottom: f64) -> (Grid, Vec<Problem>) {
        let n = self.data.panels.len().max(1);
        let mut best: Option<(Grid, Vec<Problem>, f64)> = None;
        for cols in 1..=n {
            let rows = n.div_ceil(cols);
            if self.cols.is_some_and(|c| c != cols) {
                continue;
            }
            if cols > 1 && (cols - 1) * rows >= n {
                // The same number of rows with fewer columns: one column would stay empty.
                continue;
            }
            let (grid, problems) = self.grid(cols, rows, top, bottom);
            let score = grid.room.0.min(PANEL_ASPECT * grid.room.1);
            // A grid that fits beats one that does not; among either, larger panels win.
            let better = match &best {
                None => true,
                Some((_, p, s)) => (!problems.is_empty(), -score) < (!p.is_empty(), -*s),
            };
            if better {
                best = Some((grid, problems, score));
            }
        }
        match best {
            Some((grid, problems, _)) => (grid, problems),
            // Every count of columns was passed over (a held count that does not fit the
            // panels): one column always does.
            None => self.grid(1, n, top, bottom),
        }
    }

    /// The grid with `cols` columns and `rows` rows between `top` and `bottom`.
    fn grid(&self, cols: usize, rows: usize, top: f64, bottom: f64) -> (Grid, Vec<Problem>) {
        // The y labels' width depends on the ticks, which depend on the panels' height, which
        // depends on the labels under the x axis, which depend on the panels' width: settle
        // it in a few rounds.
        let (mut grid, mut problems) = self.grid_with(cols, rows, top, bottom, 0.0);
        for _ in 0..2 {
            let strip = grid
                .estimates
                .as_ref()
                .map_or(0.0, |e| y_labels_width(&e.y));
            let w = y_labels_width(&grid.y).max(strip);
            if (w - grid.y_labels_w).abs() < 1e-9 {
                break;
            }
            (grid, problems) = self.grid_with(cols, rows, top, bottom, w);
        }
        (grid, problems)
    }

    fn grid_with(
        &self,
        cols: usize,
        rows: usize,
        top: f64,
        bottom: f64,
        y_labels_w: f64,
    ) -> (Grid, Vec<Problem>) {
        let data = self.data;
        let mut problems = Vec::new();
        let shows_n = data.panels.iter().any(|p| !p.n_by_x.is_empty());
        let per_group = data.panels.iter().any(|p| !labels::groups_agree(&p.n_by_x));
        let n_heading_w = if shows_n {
            text::width("n", &n_heading())
                + if per_group {
                    GAP_MM + n_swatch_side()
                } else {
                    0.0
                }
        } else {
            0.0
        };
        let label_col = y_labels_w.max(n_heading_w);
        let axis_room = if label_col > 0.0 { GAP_MM } else { 0.0 } + TICK_MM + AXIS_OFFSET_MM;
        let y_shown = data.y != YScale::Hidden;
        let mut left = MARGIN_MM + label_col + if y_shown || shows_n { axis_room } else { 0.0 };
        // A numeric x axis's end labels reach half their width beyond the data area.
        let x_scale = match &data.x {
            XScale::Numbers(s) => Some(s),
            XScale::Categories { .. } => None,
        };
        let (mut over_left, mut over_right) = x_scale
            .map(|s| overhangs(&NumAxisMap::new(s, 5)))
            .unwrap_or((0.0, 0.0));
        let mut panel_w = 0.0;
        let mut col_gap = 0.0;
        let mut x_map = None;
        for _ in 0..2 {
            left = left.max(MARGIN_MM + over_left);
            let right = self.width - MARGIN_MM - over_right;
            col_gap = (PANEL_GAP_MM
                + if y_shown {
                    AXIS_OFFSET_MM + TICK_MM
                } else {
                    0.0
                })
            .max(over_left + over_right + TEXT_GAP_MM);
            panel_w = (right - left - (cols - 1) as f64 * col_gap) / cols as f64;
            if let Some(s) = x_scale {
                let map = x_ticks(s, panel_w);
                (over_left, over_right) = overhangs(&map);
                x_map = Some(map);
            }
        }
        if panel_w < MIN_PANEL_WIDTH_MM {
            let what = if cols == 1 && rows == 1 {
                "the panel is".to_string()
            } else if cols == 1 {
                "the panels are".to_string()
            } else {
                format!("{} side by side leave each", plural(cols, "panel"))
            };
            problems.push(problem(
                Needs::Width,
                format!(
                    "{what} {} wide, less than the {} a panel needs",
                    mm(panel_w),
                    mm(MIN_PANEL_WIDTH_MM)
                ),
            ));
        }
        let raw_w = panel_w;
        let panel_w = panel_w.max(1.0);
        let (x, labels_h) = match &data.x {
            XScale::Numbers(s) => {
                let map = x_map.unwrap_or_else(|| x_ticks(s, panel_w));
                if !x_labels_apart(&map, panel_w) {
                    problems.push(problem(
                        Needs::Width,
                        format!(
                            "the x tick labels need more than the {} of a panel",
                            mm(panel_w)
                        ),
                    ));
                }
                let h = text::line_height(&tick_label());
                (
                    XAxis::Numbers {
                        map,
                        extent: s.extent,
                    },
                    h,
                )
            }
            XScale::Categories { levels, title } => {
                let ordered = matches!(&self.plan.axes,
                    Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } if x.var.ordered);
                let fitted = labels::fit_categories(&levels.labels, panel_w, ordered);
                let cats = fitted.unwrap_or_else(|| {
                    problems.push(problem(
                        Needs::Width,
                        format!(
                            "the {} labels of `{title}` do not fit side by side in a panel {} wide",
                            levels.len(),
                            mm(panel_w)
                        ),
                    ));
                    crowded_categories(&levels.labels)
                });
                let h = cats.height;
                (XAxis::Categories(cats), h)
            }
        };
        let (panel_labels, strip_h) = self.panel_labels(panel_w, &mut problems);
        let head_room = if strip_h == 0.0 && y_shown {
            text::line_height(&tick_label()) / 2.0
        } else {
            0.0
        };
        let avail = bottom - top - (rows - 1) as f64 * PANEL_GAP_MM;
        let heading = self.estimate_heading(cols, panel_w, col_gap, &mut problems);
        let estimates_gap = heading.as_ref().map_or(0.0, estimate_gap);
        let panel_height = |n_rows: &[NRow]| {
            let n_h = n_rows.iter().map(|r| r.height).fold(0.0, f64::max);
            let below_h = AXIS_OFFSET_MM
                + TICK_MM
                + GAP_MM
                + labels_h
                + if n_h > 0.0 { GAP_MM / 2.0 + n_h } else { 0.0 };
            let total = avail / rows as f64 - strip_h - head_room - below_h;
            match &heading {
                None => (total, below_h, 0.0),
                Some(_) => {
                    // The data area and the strip share what the gap between them leaves.
                    let areas = total - estimates_gap;
                    let strip = estimate_height(areas);
                    (areas - strip, below_h, strip)
                }
            }
        };
        // Colour groups' n on lines of their own, unless the panels then come out too short:
        // then joined under each category.
        let mut n_rows = self.n_rows(panel_w, false, &mut problems);
        let (mut panel_h, mut below_h, mut strip_height) = panel_height(&n_rows);
        if panel_h < MIN_PANEL_HEIGHT_MM && n_rows.iter().any(|r| r.per_group) {
            let mut compact_problems = Vec::new();
            let compact = self.n_rows(panel_w, true, &mut compact_problems);
            if compact_problems.is_empty() {
                n_rows = compact;
                (panel_h, below_h, strip_height) = panel_height(&n_rows);
            }
        }
        let too_short = panel_h < MIN_PANEL_HEIGHT_MM;
        if too_short {
            let what = if rows == 1 && cols == 1 {
                "the panel is".to_string()
            } else if rows == 1 {
                "the panels are".to_string()
            } else {
                format!("{} of panels leave each", plural(rows, "row"))
            };
            problems.push(problem(
                Needs::Height,
                format!(
                    "{what} {} high, less than the {} a panel needs",
                    mm(panel_h.max(0.0)),
                    mm(MIN_PANEL_HEIGHT_MM)
                ),
            ));
        }
        let room = (raw_w, panel_h);
        let panel_h = panel_h.max(1.0);
        // Tick labels that cannot fit a panel too short anyway need no second word.
        let mut y_problems = Vec::new();
        let y = self.y_axis(panel_h, &mut y_problems);
        let estimates = heading.and_then(|title| {
            let scale = self.data.estimates.as_ref()?;
            Some(EstimateStrip {
                title,
                gap: estimates_gap,
                height: strip_height,
                y: numeric_y_axis(scale, strip_height, &mut y_problems),
            })
        });
        if !too_short {
            problems.extend(y_problems);
            let rect = Rect::new(0.0, 0.0, panel_w, panel_h);
            if let Some(p) = super::layer::guide::label_problem(data, rect, &x, &y) {
                problems.push(problem(Needs::Width, p));
            }
        }
        let grid = Grid {
            cols,
            left,
            top,
            panel_w,
            panel_h,
            room,
            strip_h,
            head_room,
            below_h,
            estimates,
            col_gap,
            y,
            x,
            n_rows,
            panel_labels,
            y_labels_w,
        };
        (grid, problems)
    }

    /// The n row of each panel (none when no n is shown); `compact` joins the colour groups'
    /// numbers under each category rather than giving each group a line.
    fn n_rows(&self, panel_w: f64, compact: bool, problems: &mut Vec<Problem>) -> Vec<NRow> {
        if self.data.panels.iter().all(|p| p.n_by_x.is_empty()) {
            return Vec::new();
        }
        self.data
            .panels
            .iter()
            .map(|p| {
                labels::fit_n_row(&p.n_by_x, panel_w, compact).unwrap_or_else(|| {
                    problems.push(problem(
                        Needs::Width,
                        format!("the n row does not fit under a panel {} wide", mm(panel_w)),
                    ));
                    crowded_n_row(&p.n_by_x, panel_w)
                })
            })
            .collect()
    }

    /// The heading of the strip of estimates, wrapped to the width of the grid's columns, when
    /// the figure has one.
    fn estimate_heading(
        &self,
        cols: usize,
        panel_w: f64,
        col_gap: f64,
        problems: &mut Vec<Problem>,
    ) -> Option<Paragraph> {
        let scale = self.data.estimates.as_ref()?;
        let width = (cols as f64 * panel_w + (cols - 1) as f64 * col_gap).max(1.0);
        let heading = Paragraph::new(&scale.title, axis_title(), width);
        if heading.lines.len() > MAX_LABEL_LINES || !heading.fits(width) {
            problems.push(problem(
                Needs::Width,
                format!(
                    "the title of the differences' axis needs more than {MAX_LABEL_LINES} lines"
                ),
            ));
        }
        Some(heading)
    }

    /// Each panel's label wrapped to the panel's width, and the height of the strip they take.
    fn panel_labels(&self, panel_w: f64, problems: &mut Vec<Problem>) -> (Vec<Vec<String>>, f64) {
        if self.plan.panels.is_none() {
            return (vec![Vec::new(); self.data.panels.len()], 0.0);
        }
        let style = panel_label();
        let wrapped: Vec<Vec<String>> = self
            .data
            .panels
            .iter()
            .map(|p| text::wrap(&p.label, &style, panel_w))
            .collect();
        if wrapped
            .iter()
            .any(|l| l.len() > MAX_LABEL_LINES || !text::fits(l, &style, panel_w))
        {
            problems.push(problem(
                Needs::Width,
                format!(
                    "a panel label needs more than {MAX_LABEL_LINES} lines of {}",
                    mm(panel_w)
                ),
            ));
        }
        let most = wrapped.iter().map(Vec::len).max().unwrap_or(1);
        (
            wrapped,
            most as f64 * text::line_height(&style) + GAP_MM / 2.0,
        )
    }

    /// The y axis for panels `panel_h` high: ticks far enough apart for their labels.
    fn y_axis(&self, panel_h: f64, problems: &mut Vec<Problem>) -> YAxis {
        match &self.data.y {
            YScale::Numbers(s) => numeric_y_axis(s, panel_h, problems),
            YScale::Categories { levels, title } => {
                let n = levels.len().max(1);
                let slot = panel_h / n as f64;
                let fits = |style: &crate::scene::TextStyle| {
                    text::line_height(style) + Y_LABEL_GAP_MM <= slot
                };
                let all = vec![true; levels.len()];
                if let Some(style) = [tick_label(), small_tick_label()].into_iter().find(fits) {
                    return YAxis::Levels {
                        labels: levels.labels.clone(),
                        style,
                        shown: all,
                    };
                }
                let style = small_tick_label();
                let every = ((text::line_height(&style) + Y_LABEL_GAP_MM) / slot).ceil() as usize;
                let ordered = matches!(&self.plan.axes, Axes::CatCat { y, .. } if y.var.ordered);
                if !ordered {
                    problems.push(problem(
                        Needs::Height,
                        format!(
                            "the {} levels of `{title}` do not fit a panel {} high",
                            levels.len(),
                            mm(panel_h)
                        ),
                    ));
                }
                YAxis::Levels {
                    labels: levels.labels.clone(),
                    style,
                    shown: (0..levels.len())
                        .map(|i| !ordered || i % every.max(1) == 0)
                        .collect(),
                }
            }
            YScale::Hidden => YAxis::Hidden,
        }
    }
}

/// A numeric y axis for a data area `panel_h` high: ticks far enough apart for their labels.
fn numeric_y_axis(s: &NumScale, panel_h: f64, problems: &mut Vec<Problem>) -> YAxis {
    let style = tick_label();
    let room = text::line_height(&style) + Y_LABEL_GAP_MM;
    let target = ((panel_h / MM_PER_Y_TICK).floor() as usize + 1).clamp(Y_TICKS.0, Y_TICKS.1);
    // Labels a little apart, else touching (never overlapping).
    let fitting = [room, text::line_height(&style)]
        .into_iter()
        .find_map(|room| {
            (2..=target)
                .rev()
                .map(|t| NumAxisMap::new(s, t))
                .find(|map| tick_spacing(map, panel_h) >= room)
        });
    let map = fitting.unwrap_or_else(|| {
        problems.push(problem(
            Needs::Height,
            format!(
                "the y tick labels need more than the {} of a panel",
                mm(panel_h)
            ),
        ));
        NumAxisMap::new(s, 2)
    });
    YAxis::Numbers {
        map,
        extent: s.extent,
        style,
    }
}

/// The height of the strip of estimates when it and the data area above it share `areas`
/// millimetres: [`ESTIMATE_SHARE`] of them, at least [`MIN_ESTIMATE_HEIGHT_MM`].
fn estimate_height(areas: f64) -> f64 {
    (areas * ESTIMATE_SHARE).max(MIN_ESTIMATE_HEIGHT_MM)
}

/// The space between a data area and its strip of estimates: room for the strip's heading
/// clear of both areas' marks, and for the tick labels at the data area's bottom and the
/// strip's top to keep apart.
fn estimate_gap(heading: &Paragraph) -> f64 {
    let heading = 2.0 * CLIP_GRACE_MM + GAP_MM + heading.height();
    let ticks = text::line_height(&tick_label()) + Y_LABEL_GAP_MM;
    heading.max(ticks)
}

/// The side of the colour swatch that heads each group's line of the n row.
pub fn n_swatch_side() -> f64 {
    text::line_height(&n_label()) * SWATCH_SHARE
}

fn x_title_text(data: &FigureData) -> String {
    match &data.x {
        XScale::Categories { title, .. } => title.clone(),
        XScale::Numbers(s) => s.title.clone(),
    }
}

/// The widest y label.
fn y_labels_width(y: &YAxis) -> f64 {
    match y {
        YAxis::Numbers { map, style, .. } => text::widest(&map.labels, style),
        YAxis::Levels {
            labels,
            style,
            shown,
        } => {
            let drawn: Vec<String> = labels
                .iter()
                .zip(shown)
                .filter(|(_, s)| **s)
                .map(|(l, _)| l.clone())
                .collect();
            text::widest(&drawn, style)
        }
        YAxis::Hidden => 0.0,
    }
}

/// The x ticks of a panel `panel_w` wide: about one per [`MM_PER_X_TICK`], fewer while their
/// labels crowd.
fn x_ticks(scale: &NumScale, panel_w: f64) -> NumAxisMap {
    let target = ((panel_w / MM_PER_X_TICK).floor() as usize + 1).clamp(X_TICKS.0, X_TICKS.1);
    (X_TICKS.0..=target)
        .rev()
        .map(|t| NumAxisMap::new(scale, t))
        .find(|map| x_labels_apart(map, panel_w))
        .unwrap_or_else(|| NumAxisMap::new(scale, 2))
}

/// Whether a numeric x axis's labels keep apart across a panel `panel_w` wide.
fn x_labels_apart(map: &NumAxisMap, panel_w: f64) -> bool {
    let style = tick_label();
    let centres: Vec<f64> = map.ticks.iter().map(|t| map.frac(*t) * panel_w).collect();
    let widths: Vec<f64> = map.labels.iter().map(|l| text::width(l, &style)).collect();
    labels::rows_fit(&centres, &widths, 1, f64::NEG_INFINITY, f64::INFINITY)
}

/// How far the first and last tick labels of a numeric x axis reach beyond the data area.
fn overhangs(map: &NumAxisMap) -> (f64, f64) {
    let style = tick_label();
    let half = |l: Option<&String>| l.map_or(0.0, |l| text::width(l, &style) / 2.0);
    (half(map.labels.first()), half(map.labels.last()))
}

/// The smallest distance between neighbouring y ticks, on a panel `panel_h` high.
fn tick_spacing(map: &NumAxisMap, panel_h: f64) -> f64 {
    let pos: Vec<f64> = map.ticks.iter().map(|t| map.frac(*t) * panel_h).collect();
    pos.windows(2)
        .map(|w| (w[1] - w[0]).abs())
        .fold(f64::INFINITY, f64::min)
}

/// Category labels set upright at the smallest size, for a figure that is crowded anyway.
fn crowded_categories(labels: &[String]) -> CategoryLabels {
    let style = small_tick_label();
    CategoryLabels {
        style,
        arrangement: Arrangement::Upright,
        lines: labels.iter().map(|l| vec![l.clone()]).collect(),
        shown: vec![true; labels.len()],
        height: labels
            .iter()
            .map(|l| text::width(l, &style))
            .fold(0.0, f64::max),
    }
}

/// The n row with every group's numbers joined, staggered, for a figure that is crowded
/// anyway.
fn crowded_n_row(n_by_x: &[Vec<usize>], panel_w: f64) -> NRow {
    let items = n_by_x
        .iter()
        .enumerate()
        .map(|(x, n)| labels::NItem {
            centre: labels::band_centre(panel_w, n_by_x.len(), x),
            text: n.iter().map(usize::to_string).collect::<Vec<_>>().join("/"),
            line: x % 2,
        })
        .collect();
    NRow {
        items,
        lines: 2,
        per_group: false,
        height: 2.0 * text::line_height(&n_label()),
    }
}

/// A length for messages: "24.5 mm" (rounded down, so a length just short of a limit never
/// reads as the limit).
pub fn mm(v: f64) -> String {
    format!("{:.1} mm", (v * 10.0).floor() / 10.0)
}

fn plural(n: usize, noun: &str) -> String {
    if n == 1 {
        format!("1 {noun}")
    } else {
        format!("{n} {noun}s")
    }
}
