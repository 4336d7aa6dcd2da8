//! `guide`: reference lines (grey, dashed) and bands (a faint tint) drawn behind the data, and
//! their labels drawn on top, inside the panel.
//!
//! A label goes beside its line: a horizontal line's label just above it at the panel's right
//! end, else below it, else at the left end; a vertical line's at the panel's top just right of
//! it, else left of it, else at the bottom; a band's inside it when it has room. The first place
//! inside the panel that keeps clear of the labels already placed is taken. When none is free
//! the figure does not fit ([`labels`] says so; the page's solver asks it when the page is solved, so a drawn
//! figure never has overlapping labels).

use crate::check::layer::GuideAxis;
use crate::compute::layer::GuideMark;
use crate::compute::{FigureData, LayerMarks};
use crate::scene::{Fill, Mark, Point, Rect, Stroke, TextAlign, TextBaseline};

use super::super::room;
use super::super::solve::{XAxis, YAxis};
use super::super::style::*;
use super::super::text;
use super::super::{PanelFrame, XMap, YMap};

/// The line or band, behind the data.
pub fn draw_behind(out: &mut Vec<Mark>, frame: &PanelFrame, g: &GuideMark) {
    let r = frame.rect;
    let (a, b) = ends(frame, g);
    if g.low < g.high {
        let rect = match g.axis {
            GuideAxis::X => Rect::new(a.min(b), r.y, (b - a).abs(), r.height),
            GuideAxis::Y => Rect::new(r.x, a.min(b), r.width, (b - a).abs()),
        };
        out.push(Mark::Rect {
            x: rect.x,
            y: rect.y,
            width: rect.width,
            height: rect.height,
            fill: Some(Fill {
                colour: INK,
                opacity: GUIDE_BAND_OPACITY,
            }),
            stroke: None,
        });
        return;
    }
    let points = match g.axis {
        GuideAxis::X => vec![Point::new(a, r.y), Point::new(a, r.bottom())],
        GuideAxis::Y => vec![Point::new(r.x, a), Point::new(r.right(), a)],
    };
    out.push(Mark::Line {
        points,
        stroke: Stroke {
            dash: Some(GUIDE_DASH_MM.to_vec()),
            ..Stroke::solid(GUIDE_INK, GUIDE_LINE_MM)
        },
    });
}

/// Where the guide's low and high values fall on its axis, in millimetres.
fn ends(frame: &PanelFrame, g: &GuideMark) -> (f64, f64) {
    match g.axis {
        GuideAxis::X => (frame.x_num(g.low), frame.x_num(g.high)),
        GuideAxis::Y => (frame.y(g.low), frame.y(g.high)),
    }
}

/// The labels of a panel's guides, to draw on top, and what does not fit (a label with no
/// free place is set at its first place anyway, for a figure built crowded). Places that the
/// fewest marks of `avoid` (the data) reach into are preferred, when every label finds one.
pub fn labels(
    frame: &PanelFrame,
    layers: &[LayerMarks],
    avoid: &[Mark],
) -> (Vec<Mark>, Option<String>) {
    let preferred = place_labels(frame, layers, avoid);
    if preferred.1.is_none() || avoid.is_empty() {
        return preferred;
    }
    // The solver placed the labels in order without the data: that always works when it did.
    place_labels(frame, layers, &[])
}

/// Each label at the place inside the panel, clear of the labels placed before, that the
/// fewest marks of `avoid` reach into.
fn place_labels(
    frame: &PanelFrame,
    layers: &[LayerMarks],
    avoid: &[Mark],
) -> (Vec<Mark>, Option<String>) {
    let style = guide_label();
    let h = text::line_height(&style);
    let mut placed: Vec<Rect> = Vec::new();
    let mut out = Vec::new();
    let mut problem = None;
    for g in layers.iter().filter_map(|l| match l {
        LayerMarks::Guide(g) => Some(g),
        _ => None,
    }) {
        let Some(label) = &g.label else { continue };
        let w = text::width(label, &style);
        let places = candidates(frame, g, w, h);
        let fits = |c: &&Rect| {
            inside(c, &frame.rect)
                && placed
                    .iter()
                    .all(|p| !p.grown(TEXT_GAP_MM / 2.0).overlaps(c))
        };
        // The free place the fewest marks of the data reach into (the first of equals).
        let free = places
            .iter()
            .filter(fits)
            .min_by_key(|c| room::blockers(&c.grown(GUIDE_LABEL_GAP_MM / 2.0), avoid));
        let spot = *free.unwrap_or_else(|| {
            problem.get_or_insert_with(|| {
                format!(
                    "the label \"{label}\" of a guide has no room beside its line in a panel {} wide",
                    super::super::solve::mm(frame.rect.width)
                )
            });
            &places[0]
        });
        placed.push(spot);
        out.push(text::label(
            label,
            Point::new(spot.x, spot.y),
            style,
            TextAlign::Start,
            TextBaseline::Top,
        ));
    }
    (out, problem)
}

/// Why the guides' labels do not fit panels laid out as `rect` with the axes `x` and `y`, if
/// they do not: every panel's guides are the same, so the first panel's labels tell.
pub fn label_problem(data: &FigureData, rect: Rect, x: &XAxis, y: &YAxis) -> Option<String> {
    let panel = data.panels.first()?;
    let frame = PanelFrame {
        rect,
        x: match x {
            XAxis::Numbers { map, .. } => XMap::Numbers(map),
            XAxis::Categories(c) => XMap::Bands { n: c.lines.len() },
        },
        y: match y {
            YAxis::Numbers { map, .. } => YMap::Numbers(map),
            YAxis::Levels { labels, .. } => YMap::Levels { n: labels.len() },
            YAxis::Hidden => YMap::Levels { n: 1 },
        },
        n_groups: 1,
        colours: &[],
        shows_points: false,
        width_peak: data.width_peak,
        marks: Default::default(),
    };
    labels(&frame, &panel.layers, &[]).1
}

/// The places a label `w` × `h` may take, in order of preference.
fn candidates(frame: &PanelFrame, g: &GuideMark, w: f64, h: f64) -> Vec<Rect> {
    let r = frame.rect;
    let gap = GUIDE_LABEL_GAP_MM;
    let (a, b) = ends(frame, g);
    let (lo, hi) = (a.min(b), a.max(b));
    let band_room = g.low < g.high;
    match g.axis {
        GuideAxis::Y => {
            // `lo` is the band's top on the page (the high value), `hi` its bottom.
            let mut tops = Vec::new();
            if band_room && hi - lo >= h + 2.0 * gap {
                tops.push(lo + gap);
            }
            tops.extend([lo - gap - h, hi + gap]);
            let lefts = [r.right() - gap - w, r.x + gap];
            lefts
                .iter()
                .flat_map(|&left| tops.iter().map(move |&top| Rect::new(left, top, w, h)))
                .collect()
        }
        GuideAxis::X => {
            let mut lefts = Vec::new();
            if band_room && hi - lo >= w + 2.0 * gap {
                lefts.push(lo + gap);
            }
            lefts.extend([hi + gap, lo - gap - w]);
            let tops = [r.y + gap, r.bottom() - gap - h];
            tops.iter()
                .flat_map(|&top| lefts.iter().map(move |&left| Rect::new(left, top, w, h)))
                .collect()
        }
    }
}

fn inside(c: &Rect, r: &Rect) -> bool {
    c.x >= r.x && c.y >= r.y && c.right() <= r.right() && c.bottom() <= r.bottom()
}
