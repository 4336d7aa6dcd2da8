//! Layout: a figure's numbers → a scene of marks in millimetres, or why they do not fit.
//!
//! The page is solved from the outside in ([`solve`]): every piece of text is measured with the
//! bundled font before it is placed; long category labels wrap, stagger, shrink to 6 pt or turn
//! upright, ordered ones thin; the panel grid takes the arrangement that leaves the largest
//! panels. Nothing is shrunk below a legible size (see [`style`]): when the content cannot fit
//! the figure's size, [`layout`] still draws it, and says what does not fit and the smallest
//! size that would ([`Crowding`]); the build turns that into F0124, or W0003 under
//! `--allow-crowding`.
//!
//! The legend goes into a corner of a panel that the data leave empty ([`room`]), else across
//! the top. The key under the plot names every summary mark.
//!
//! Guarantee: in a figure without [`Crowding`], no two pieces of text overlap and every piece
//! of text lies inside the page ([`crate::scene::Scene::text_boxes`]; `tests/layout.rs` checks
//! it on every example and a stress set).
//!
//! Invariant: no I/O and no statistics here — positions only.

mod axis;
mod crowding;
mod frame;
mod labels;
mod layer;
mod legend;
mod marks;
mod room;
mod solve;
mod style;
mod text;

use crate::check::plan::{FigurePlan, GroupMarks};
use crate::compute::{FigureData, XScale};
use crate::scene::{Colour, Fill, Mark, Point, Rect, Scene, Stroke, TextAlign};

pub use axis::{format_tick, NumAxisMap};
pub use crowding::Crowding;
pub use style::MIN_TEXT_PT;

use legend::{LegendBlock, Swatch};
use solve::{LegendSpace, Page, XAxis, YAxis};
use style::*;

/// How a figure maps data to one panel's rectangle.
pub(crate) struct PanelFrame<'a> {
    pub rect: Rect,
    pub x: XMap<'a>,
    pub y: YMap<'a>,
    pub n_groups: usize,
    /// One colour per colour group (empty without groups).
    pub colours: &'a [Colour],
    /// The figure shows every value as a dot (bars under them are pale; box outliers are not
    /// drawn twice).
    pub shows_points: bool,
    /// The figure's largest width quantity (violin density, flow subjects): one scale for all.
    pub width_peak: f64,
    /// How the groups are told apart besides colour.
    pub marks: GroupMarks,
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

    /// The colour of the data marks of group `g`: the group's colour, or the one data colour
    /// of a figure without groups.
    pub fn colour(&self, g: usize) -> Colour {
        if self.n_groups > 1 || !self.colours.is_empty() {
            self.colours.get(g).copied().unwrap_or(INK)
        } else {
            DATA_COLOUR
        }
    }

    /// A data dot of group `g`: its colour, and its shape with `colour VAR shapes`.
    pub fn dot(&self, centre: Point, g: usize) -> Mark {
        let fill = Fill {
            colour: self.colour(g),
            opacity: POINT_OPACITY,
        };
        marks::dot(marks::shape(self.marks, g), centre, POINT_RADIUS_MM, fill)
    }

    /// A line of group `g`, dashed with `colour VAR dashes`.
    pub fn stroke(&self, g: usize, colour: Colour, width_mm: f64) -> Stroke {
        marks::stroke(self.marks, g, colour, width_mm)
    }

    /// Summary marks are ink when there is one group, and the group's colour otherwise.
    pub fn summary_colour(&self, g: usize) -> Colour {
        if self.n_groups > 1 {
            self.colour(g)
        } else {
            INK
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

/// A laid-out figure: its scene, and what did not fit when its content is too much for its
/// size (the scene is then drawn anyway, crowded).
#[derive(Debug, Clone)]
pub struct Laid {
    pub scene: Scene,
    pub crowding: Option<Crowding>,
}

/// Lays out a figure at its size.
pub fn layout(plan: &FigurePlan, data: &FigureData) -> Laid {
    let size = (plan.width_mm, plan.height_mm);
    if let Some(legend) = &data.legend {
        let inside = solve::solve(plan, data, size, LegendSpace::Inside, None);
        if inside.problems.is_empty() {
            let drawn = draw(plan, data, &inside);
            if let Some(legend_marks) = corner_legend(legend, data, &drawn.corner) {
                let mut marks = drawn.marks;
                marks.extend(legend_marks);
                return Laid {
                    scene: scene(plan, &inside, marks),
                    crowding: None,
                };
            }
        }
    }
    let mut page = solve::solve(plan, data, size, LegendSpace::Top, None);
    let crowding = (!page.problems.is_empty()).then(|| Crowding::new(plan, data));
    if let Some(cols) = crowding.as_ref().and_then(|c| c.cols) {
        // Crowded: drawn with the grid it would have at the size that fits.
        page = solve::solve(plan, data, size, LegendSpace::Top, Some(cols));
    }
    let mut marks = draw(plan, data, &page).marks;
    if let Some(legend) = &data.legend {
        let inner = page.width - 2.0 * MARGIN_MM;
        let swatch = Swatch::for_legend(data.panels.first(), legend.marks);
        let block = LegendBlock::new(legend, swatch, inner * LEGEND_LABEL_SHARE);
        let top = page.legend_top.unwrap_or(MARGIN_MM);
        marks.extend(block.rows_marks(MARGIN_MM, top, inner));
    }
    Laid {
        scene: scene(plan, &page, marks),
        crowding,
    }
}

/// The legend as a column in a free corner of the top-right panel, if one is free.
fn corner_legend(
    legend: &crate::compute::Legend,
    data: &FigureData,
    corner: &Option<(Rect, Vec<Mark>)>,
) -> Option<Vec<Mark>> {
    let (rect, drawn) = corner.as_ref()?;
    let label_w = rect.width * LEGEND_LABEL_SHARE;
    let block = LegendBlock::new(
        legend,
        Swatch::for_legend(data.panels.first(), legend.marks),
        label_w,
    );
    if !block.fits(label_w) {
        return None;
    }
    let place = room::free_corner(*rect, block.column_size(), drawn)?;
    Some(block.column_marks(place))
}

fn scene(plan: &FigurePlan, page: &Page, marks: Vec<Mark>) -> Scene {
    Scene {
        width_mm: page.width,
        height_mm: page.height,
        title: plan.title.clone(),
        description: plan.caption.clone(),
        marks,
    }
}

/// The page at `size` with the legend on top, its grid held at `cols` columns if given.
pub(crate) fn page_at(
    plan: &FigurePlan,
    data: &FigureData,
    size: (f64, f64),
    cols: Option<usize>,
) -> Page {
    solve::solve(plan, data, size, LegendSpace::Top, cols)
}

/// A page drawn without its legend, and the data area and marks of the top-right panel (where
/// a legend may go into a free corner).
struct Drawn {
    marks: Vec<Mark>,
    corner: Option<(Rect, Vec<Mark>)>,
}

/// Draws a solved page, all but the legend.
fn draw<'a>(plan: &FigurePlan, data: &'a FigureData, page: &'a Page) -> Drawn {
    let grid = &page.grid;
    let mut marks = vec![Mark::Rect {
        x: 0.0,
        y: 0.0,
        width: page.width,
        height: page.height,
        fill: Some(Fill::solid(Colour::WHITE)),
        stroke: None,
    }];
    for placed in [&page.title, &page.y_title, &page.key, &page.caption]
        .into_iter()
        .flatten()
    {
        marks.extend(placed.text.marks(MARGIN_MM, placed.top));
    }
    // The x-axis title is centred under the panels, but never runs off the page.
    let (plot_left, plot_right) = grid.span_x();
    let x_title = &page.x_title;
    let half = text::widest(&x_title.text.lines, &x_title.text.style) / 2.0;
    let centre = ((plot_left + plot_right) / 2.0)
        .min(page.width - MARGIN_MM - half)
        .max(MARGIN_MM + half);
    marks.extend(x_title.text.aligned(centre, x_title.top, TextAlign::Middle));
    let y_map = match &grid.y {
        YAxis::Numbers { map, .. } => YMap::Numbers(map),
        YAxis::Levels { labels, .. } => YMap::Levels { n: labels.len() },
        YAxis::Hidden => YMap::Levels { n: 1 },
    };
    let colours: &[Colour] = data.legend.as_ref().map_or(&[], |l| &l.colours);
    let shows_points = plan
        .layers
        .iter()
        .any(|l| l.decl.shows == crate::check::layer::Shows::Values);
    let mut corner_panel: Option<(Rect, Vec<Mark>)> = None;
    let corner_index = grid.cols.min(data.panels.len()).saturating_sub(1);
    for (i, panel) in data.panels.iter().enumerate() {
        let rect = grid.panel_rect(i);
        let x_map = || match (&grid.x, &data.x) {
            (XAxis::Numbers { map, .. }, _) => XMap::Numbers(map),
            (XAxis::Categories(_), XScale::Categories { levels, .. }) => {
                XMap::Bands { n: levels.len() }
            }
            (XAxis::Categories(_), XScale::Numbers(_)) => XMap::Bands { n: 1 },
        };
        let frame_at = |rect: Rect, y: YMap<'a>| PanelFrame {
            rect,
            x: x_map(),
            y,
            n_groups: data.legend.as_ref().map_or(1, |l| l.levels.len()),
            colours,
            shows_points,
            width_peak: data.width_peak,
            marks: data.legend.as_ref().map(|l| l.marks).unwrap_or_default(),
        };
        let frame = frame_at(
            rect,
            match &y_map {
                YMap::Numbers(a) => YMap::Numbers(a),
                YMap::Levels { n } => YMap::Levels { n: *n },
            },
        );
        // The strip of estimates under the data area, with its own y axis.
        let strip = match (&grid.estimates, grid.estimate_rect(i)) {
            (Some(e), Some(strip_rect)) => match &e.y {
                YAxis::Numbers { map, .. } => Some((e, frame_at(strip_rect, YMap::Numbers(map)))),
                _ => None,
            },
            _ => None,
        };
        let labelled = i % grid.cols == 0;
        if let Some(lines) = grid.panel_labels.get(i).filter(|l| !l.is_empty()) {
            let label = text::Paragraph {
                lines: lines.clone(),
                style: panel_label(),
            };
            marks.extend(label.marks(rect.x, rect.y - grid.head_room - grid.strip_h));
        }
        if plan.grid {
            frame::grid_lines(&mut marks, &frame, &grid.y);
        }
        frame::y_axis(&mut marks, &frame, &grid.y, labelled);
        let (drawn, under) = layer::draw(&frame, strip.as_ref().map(|(_, f)| f), panel);
        if i == corner_index {
            corner_panel = Some((rect, drawn.clone()));
        }
        // Marks are cut off just outside the data area, so a dot on its edge stays whole.
        marks.push(Mark::Clip {
            rect: rect.grown(CLIP_GRACE_MM),
            marks: drawn,
        });
        if let Some((e, strip_frame)) = &strip {
            if labelled {
                marks.extend(e.title.marks(rect.x, e.title_top(rect.bottom())));
            }
            if plan.grid {
                frame::grid_lines(&mut marks, strip_frame, &e.y);
            }
            frame::y_axis(&mut marks, strip_frame, &e.y, labelled);
            marks.push(Mark::Clip {
                rect: strip_frame.rect.grown(CLIP_GRACE_MM),
                marks: under,
            });
        }
        // The x axis goes under the lowest area: the strip of estimates, when there is one.
        let bottom = strip.as_ref().map_or(&frame, |(_, f)| f);
        frame::x_axis(
            &mut marks,
            bottom,
            &grid.x,
            !matches!(grid.y, YAxis::Hidden),
        );
        if let Some(row) = grid.n_rows.get(i) {
            let labels_h = match &grid.x {
                XAxis::Categories(c) => c.height,
                XAxis::Numbers { .. } => 0.0,
            };
            let top = frame::labels_top(bottom.rect) + labels_h + GAP_MM / 2.0;
            frame::n_row(
                &mut marks,
                bottom.rect,
                row,
                top,
                labelled.then_some(colours),
            );
        }
    }
    Drawn {
        marks,
        corner: corner_panel,
    }
}
