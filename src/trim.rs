//! Marks that reach far beyond what can be seen are cut down before they are written.
//!
//! A bar of a value far outside a narrow `range(...)` can lie millions of millimetres off the
//! page; it is invisible (its panel clips it) but renderers still size their work by it, and
//! some overflow. [`trimmed`] cuts every mark to its *reach*: the rectangle that clips it (its
//! [`Mark::Clip`], or the page) grown on every side by the page's larger side.
//!
//! Guarantees:
//! - A mark that lies within its reach is left exactly as it is, so ordinary figures are
//!   written byte for byte as before (and no copy of the scene is made).
//! - What is visible does not change: the reach lies at least a page's side beyond the
//!   clipping rectangle, so the new edges (and any stroke along them) are clipped away.
//!   Rectangles are intersected with the reach; polygons and filled or closed paths are
//!   clipped as areas (curves flattened into [`CURVE_STEPS`] segments first); lines and open
//!   stroked paths are cut into the pieces inside the reach; circles and text whose box misses
//!   the reach are dropped.
//! - Afterwards every coordinate of every mark lies within its reach, so the drawing handed to
//!   a renderer is never more than three pages wide.

use std::borrow::Cow;

use crate::scene::{Mark, PathSegment, Point, Rect, Scene};

/// Straight segments a cubic curve is cut into when a path must be clipped.
pub const CURVE_STEPS: usize = 32;

/// The scene with every mark within its reach (see the module doc).
pub fn trimmed(scene: &Scene) -> Cow<'_, Scene> {
    let margin = scene.width_mm.max(scene.height_mm);
    let page = Rect::new(0.0, 0.0, scene.width_mm, scene.height_mm);
    if all_within(&scene.marks, page, margin) {
        return Cow::Borrowed(scene);
    }
    let mut out = scene.clone();
    out.marks = trim_marks(&scene.marks, page, margin);
    Cow::Owned(out)
}

/// An axis-aligned box given by its sides.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Bounds {
    left: f64,
    top: f64,
    right: f64,
    bottom: f64,
}

impl Bounds {
    fn around(rect: Rect, margin: f64) -> Self {
        Bounds {
            left: rect.x - margin,
            top: rect.y - margin,
            right: rect.x + rect.width + margin,
            bottom: rect.y + rect.height + margin,
        }
    }

    fn contains(&self, p: &Point) -> bool {
        (self.left..=self.right).contains(&p.x) && (self.top..=self.bottom).contains(&p.y)
    }

    /// Whether the box `[x0, x1] × [y0, y1]` overlaps this one.
    fn overlaps(&self, x0: f64, y0: f64, x1: f64, y1: f64) -> bool {
        x0 <= self.right && x1 >= self.left && y0 <= self.bottom && y1 >= self.top
    }
}

fn all_within(marks: &[Mark], clip: Rect, margin: f64) -> bool {
    let reach = Bounds::around(clip, margin);
    marks.iter().all(|mark| match mark {
        Mark::Clip { rect, marks } => {
            rect_within(&reach, rect.x, rect.y, rect.width, rect.height)
                && all_within(marks, *rect, margin)
        }
        other => mark_within(other, &reach),
    })
}

fn rect_within(reach: &Bounds, x: f64, y: f64, width: f64, height: f64) -> bool {
    reach.contains(&Point::new(x, y)) && reach.contains(&Point::new(x + width, y + height))
}

fn mark_within(mark: &Mark, reach: &Bounds) -> bool {
    match mark {
        Mark::Line { points, .. } | Mark::Polygon { points, .. } => {
            points.iter().all(|p| reach.contains(p))
        }
        Mark::Rect {
            x,
            y,
            width,
            height,
            ..
        } => rect_within(reach, *x, *y, *width, *height),
        Mark::Circle { centre, radius, .. } => rect_within(
            reach,
            centre.x - radius,
            centre.y - radius,
            2.0 * radius,
            2.0 * radius,
        ),
        Mark::Path { segments, .. } => segments.iter().all(|s| match s {
            PathSegment::MoveTo(p) | PathSegment::LineTo(p) => reach.contains(p),
            PathSegment::CubicTo { c1, c2, to } => [c1, c2, to].iter().all(|p| reach.contains(p)),
            PathSegment::Close => true,
        }),
        Mark::Text(text) => reach.contains(&text.at),
        Mark::Clip { .. } => true,
    }
}

fn trim_marks(marks: &[Mark], clip: Rect, margin: f64) -> Vec<Mark> {
    let reach = Bounds::around(clip, margin);
    let mut out = Vec::with_capacity(marks.len());
    for mark in marks {
        match mark {
            Mark::Clip { rect, marks } => {
                let Some(rect) = intersect_rect(&reach, *rect) else {
                    continue;
                };
                out.push(Mark::Clip {
                    rect,
                    marks: trim_marks(marks, rect, margin),
                });
            }
            other if mark_within(other, &reach) => out.push(other.clone()),
            other => out.extend(trim_mark(other, &reach)),
        }
    }
    out
}

/// The marks left of `mark` once cut to `reach`.
fn trim_mark(mark: &Mark, reach: &Bounds) -> Vec<Mark> {
    match mark {
        Mark::Line { points, stroke } => clip_polyline(points, reach)
            .into_iter()
            .map(|points| Mark::Line {
                points,
                stroke: stroke.clone(),
            })
            .collect(),
        Mark::Rect {
            x,
            y,
            width,
            height,
            fill,
            stroke,
        } => intersect_rect(reach, Rect::new(*x, *y, *width, *height))
            .map(|r| Mark::Rect {
                x: r.x,
                y: r.y,
                width: r.width,
                height: r.height,
                fill: *fill,
                stroke: stroke.clone(),
            })
            .into_iter()
            .collect(),
        Mark::Polygon {
            points,
            fill,
            stroke,
        } => {
            let points = clip_polygon(points, reach);
            if points.len() < 3 {
                return Vec::new();
            }
            vec![Mark::Polygon {
                points,
                fill: *fill,
                stroke: stroke.clone(),
            }]
        }
        Mark::Path {
            segments,
            fill,
            stroke,
        } => {
            let segments = clip_path(segments, fill.is_some(), reach);
            if segments.is_empty() {
                return Vec::new();
            }
            vec![Mark::Path {
                segments,
                fill: *fill,
                stroke: stroke.clone(),
            }]
        }
        Mark::Circle { centre, radius, .. } => {
            let (r, c) = (*radius, centre);
            if reach.overlaps(c.x - r, c.y - r, c.x + r, c.y + r) {
                vec![mark.clone()]
            } else {
                Vec::new()
            }
        }
        // Text is placed by layout on the page; an anchor outside the reach cannot be seen.
        Mark::Text(_) => Vec::new(),
        Mark::Clip { .. } => vec![mark.clone()],
    }
}

/// The part of `rect` inside `reach`, if any.
fn intersect_rect(reach: &Bounds, rect: Rect) -> Option<Rect> {
    let left = rect.x.max(reach.left);
    let top = rect.y.max(reach.top);
    let right = (rect.x + rect.width).min(reach.right);
    let bottom = (rect.y + rect.height).min(reach.bottom);
    (left <= right && top <= bottom).then(|| Rect::new(left, top, right - left, bottom - top))
}

/// The pieces of an open polyline inside `reach` (Liang–Barsky clipping of each segment).
fn clip_polyline(points: &[Point], reach: &Bounds) -> Vec<Vec<Point>> {
    let mut pieces: Vec<Vec<Point>> = Vec::new();
    let mut current: Vec<Point> = Vec::new();
    for pair in points.windows(2) {
        match clip_segment(pair[0], pair[1], reach) {
            Some((a, b)) => {
                if current.last() != Some(&a) {
                    if current.len() >= 2 {
                        pieces.push(std::mem::take(&mut current));
                    }
                    current = vec![a];
                }
                current.push(b);
            }
            None => {
                if current.len() >= 2 {
                    pieces.push(std::mem::take(&mut current));
                }
                current.clear();
            }
        }
    }
    if current.len() >= 2 {
        pieces.push(current);
    }
    pieces
}

/// The part of the segment `a`–`b` inside `reach` (Liang & Barsky 1984).
fn clip_segment(a: Point, b: Point, reach: &Bounds) -> Option<(Point, Point)> {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let (mut t0, mut t1) = (0.0_f64, 1.0_f64);
    let sides = [
        (-dx, a.x - reach.left),
        (dx, reach.right - a.x),
        (-dy, a.y - reach.top),
        (dy, reach.bottom - a.y),
    ];
    for (p, q) in sides {
        if p == 0.0 {
            if q < 0.0 {
                return None;
            }
            continue;
        }
        let t = q / p;
        if p < 0.0 {
            t0 = t0.max(t);
        } else {
            t1 = t1.min(t);
        }
        if t0 > t1 {
            return None;
        }
    }
    let at = |t: f64| Point::new(a.x + t * dx, a.y + t * dy);
    let start = if t0 == 0.0 { a } else { at(t0) };
    let end = if t1 == 1.0 { b } else { at(t1) };
    Some((start, end))
}

/// A closed polygon cut to `reach` (Sutherland & Hodgman 1974, one side at a time).
fn clip_polygon(points: &[Point], reach: &Bounds) -> Vec<Point> {
    type Inside = fn(&Point, &Bounds) -> bool;
    type Cross = fn(Point, Point, &Bounds) -> Point;
    let sides: [(Inside, Cross); 4] = [
        (|p, r| p.x >= r.left, |a, b, r| at_x(a, b, r.left)),
        (|p, r| p.x <= r.right, |a, b, r| at_x(a, b, r.right)),
        (|p, r| p.y >= r.top, |a, b, r| at_y(a, b, r.top)),
        (|p, r| p.y <= r.bottom, |a, b, r| at_y(a, b, r.bottom)),
    ];
    let mut poly = points.to_vec();
    for (inside, cross) in sides {
        let Some(&last) = poly.last() else {
            break;
        };
        let mut next = Vec::with_capacity(poly.len() + 2);
        let mut prev = last;
        for &p in &poly {
            match (inside(&prev, reach), inside(&p, reach)) {
                (true, true) => next.push(p),
                (true, false) => next.push(cross(prev, p, reach)),
                (false, true) => {
                    next.push(cross(prev, p, reach));
                    next.push(p);
                }
                (false, false) => {}
            }
            prev = p;
        }
        poly = next;
    }
    poly
}

/// Where the segment `a`–`b` crosses the vertical line at `x`.
fn at_x(a: Point, b: Point, x: f64) -> Point {
    let t = (x - a.x) / (b.x - a.x);
    Point::new(x, a.y + t * (b.y - a.y))
}

/// Where the segment `a`–`b` crosses the horizontal line at `y`.
fn at_y(a: Point, b: Point, y: f64) -> Point {
    let t = (y - a.y) / (b.y - a.y);
    Point::new(a.x + t * (b.x - a.x), y)
}

/// One sub-path as points (curves flattened) and whether it is closed.
struct SubPath {
    points: Vec<Point>,
    closed: bool,
}

fn flatten(segments: &[PathSegment]) -> Vec<SubPath> {
    let mut subpaths: Vec<SubPath> = Vec::new();
    let mut current = SubPath {
        points: Vec::new(),
        closed: false,
    };
    for segment in segments {
        match *segment {
            PathSegment::MoveTo(p) => {
                if !current.points.is_empty() {
                    subpaths.push(current);
                }
                current = SubPath {
                    points: vec![p],
                    closed: false,
                };
            }
            PathSegment::LineTo(p) => current.points.push(p),
            PathSegment::CubicTo { c1, c2, to } => {
                let from = current.points.last().copied().unwrap_or(to);
                current.points.extend(
                    (1..=CURVE_STEPS)
                        .map(|i| cubic_point(from, c1, c2, to, i as f64 / CURVE_STEPS as f64)),
                );
            }
            PathSegment::Close => {
                current.closed = true;
                let start = current.points.first().copied();
                subpaths.push(current);
                current = SubPath {
                    points: start.into_iter().collect(),
                    closed: false,
                };
            }
        }
    }
    if current.points.len() >= 2 {
        subpaths.push(current);
    }
    subpaths
}

fn cubic_point(p0: Point, p1: Point, p2: Point, p3: Point, t: f64) -> Point {
    let u = 1.0 - t;
    let (a, b, c, d) = (u * u * u, 3.0 * u * u * t, 3.0 * u * t * t, t * t * t);
    Point::new(
        a * p0.x + b * p1.x + c * p2.x + d * p3.x,
        a * p0.y + b * p1.y + c * p2.y + d * p3.y,
    )
}

/// A path cut to `reach`: filled or closed sub-paths as areas, open ones as pieces of line.
fn clip_path(segments: &[PathSegment], filled: bool, reach: &Bounds) -> Vec<PathSegment> {
    let mut out = Vec::new();
    for sub in flatten(segments) {
        if filled || sub.closed {
            let poly = clip_polygon(&sub.points, reach);
            if poly.len() >= 3 {
                out.push(PathSegment::MoveTo(poly[0]));
                out.extend(poly[1..].iter().map(|&p| PathSegment::LineTo(p)));
                out.push(PathSegment::Close);
            }
        } else {
            for piece in clip_polyline(&sub.points, reach) {
                out.push(PathSegment::MoveTo(piece[0]));
                out.extend(piece[1..].iter().map(|&p| PathSegment::LineTo(p)));
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{Colour, Fill, Stroke};

    fn panel_scene(marks: Vec<Mark>) -> Scene {
        let mut scene = Scene::new(80.0, 60.0);
        scene.marks = vec![Mark::Clip {
            rect: Rect::new(10.0, 10.0, 60.0, 40.0),
            marks,
        }];
        scene
    }

    fn inner(scene: &Scene) -> &[Mark] {
        match &scene.marks[0] {
            Mark::Clip { marks, .. } => marks,
            other => panic!("not a clip: {other:?}"),
        }
    }

    fn bar(y: f64, height: f64) -> Mark {
        Mark::Rect {
            x: 20.0,
            y,
            width: 10.0,
            height,
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: Some(Stroke::solid(Colour::WHITE, 0.2)),
        }
    }

    #[test]
    fn marks_within_reach_are_not_copied() {
        // 80 mm reach around the panel: a bar poking 70 mm out of it is left alone.
        let scene = panel_scene(vec![bar(-60.0, 100.0)]);
        assert!(matches!(trimmed(&scene), Cow::Borrowed(_)));
    }

    #[test]
    fn a_bar_far_off_the_page_is_cut_to_the_reach() {
        // Panel 10..70 × 10..50, page 80 × 60: the reach is x −70..150, y −70..130.
        let scene = panel_scene(vec![bar(-1e12, 1e12 + 50.0)]);
        let out = trimmed(&scene);
        assert_eq!(inner(&out), &[bar(-70.0, 120.0)]);
    }

    #[test]
    fn bars_entirely_outside_the_reach_are_dropped() {
        let scene = panel_scene(vec![bar(-1e12, 10.0), bar(20.0, 5.0)]);
        assert_eq!(inner(&trimmed(&scene)), &[bar(20.0, 5.0)]);
    }

    #[test]
    fn a_line_keeps_its_direction_inside_the_reach() {
        // From (40, 30) towards (40 + 1e9, 30 + 1e9): the cut end lies on the diagonal.
        let line = Mark::Line {
            points: vec![Point::new(40.0, 30.0), Point::new(40.0 + 1e9, 30.0 + 1e9)],
            stroke: Stroke::solid(Colour::BLACK, 0.3),
        };
        let scene = panel_scene(vec![line]);
        let out = trimmed(&scene);
        let Mark::Line { points, .. } = &inner(&out)[0] else {
            panic!("not a line")
        };
        assert_eq!(points[0], Point::new(40.0, 30.0));
        // The reach ends at x = 150 and y = 130; y is met first, at x = 140.
        assert!((points[1].x - 140.0).abs() < 1e-6 && (points[1].y - 130.0).abs() < 1e-6);
    }

    #[test]
    fn a_line_leaving_and_coming_back_is_cut_in_two() {
        let line = Mark::Line {
            points: vec![
                Point::new(20.0, 20.0),
                Point::new(20.0, -1e9),
                Point::new(30.0, 20.0),
            ],
            stroke: Stroke::solid(Colour::BLACK, 0.3),
        };
        assert_eq!(inner(&trimmed(&panel_scene(vec![line]))).len(), 2);
    }

    #[test]
    fn polygons_and_filled_paths_are_clipped_as_areas() {
        let triangle = vec![
            Point::new(20.0, 40.0),
            Point::new(60.0, 40.0),
            Point::new(40.0, -1e9),
        ];
        let polygon = Mark::Polygon {
            points: triangle.clone(),
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        };
        let path = Mark::Path {
            segments: vec![
                PathSegment::MoveTo(triangle[0]),
                PathSegment::CubicTo {
                    c1: triangle[1],
                    c2: triangle[2],
                    to: triangle[0],
                },
                PathSegment::Close,
            ],
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        };
        let scene = panel_scene(vec![polygon, path]);
        let out = trimmed(&scene);
        let reach = Bounds::around(Rect::new(10.0, 10.0, 60.0, 40.0), 80.0);
        for mark in inner(&out) {
            assert!(mark_within(mark, &reach), "{mark:?}");
        }
        let Mark::Polygon { points, .. } = &inner(&out)[0] else {
            panic!("not a polygon")
        };
        // The base stays; the apex is cut off at the top of the reach (y = −70).
        assert!(points.contains(&Point::new(20.0, 40.0)));
        assert!(points.contains(&Point::new(60.0, 40.0)));
        assert!(points.iter().all(|p| p.y >= -70.0));
        assert_eq!(points.len(), 4);
    }
}
