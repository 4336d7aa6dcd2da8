//! Room the data leave: whether a rectangle inside a panel is clear of every drawn mark, and
//! which corner of a panel is free for the legend.
//!
//! A mark blocks a rectangle when any part of it (a dot, a bar, a line's segment, a shape's
//! edge or inside, a text's box) comes within [`LEGEND_CLEARANCE_MM`] of it. Curves are
//! followed through their control points, which lie on or outside the curve, so a rectangle
//! found clear is clear.

use crate::scene::{Mark, PathSegment, Point, Rect};

use super::style::LEGEND_CLEARANCE_MM;

/// The first corner of `panel` (top right, top left, bottom right, bottom left) where a box of
/// `size` is clear of `marks`; its rectangle.
pub fn free_corner(panel: Rect, size: (f64, f64), marks: &[Mark]) -> Option<Rect> {
    let (w, h) = size;
    let pad = LEGEND_CLEARANCE_MM;
    if w + 2.0 * pad > panel.width || h + 2.0 * pad > panel.height {
        return None;
    }
    let (left, right) = (panel.x + pad, panel.right() - pad - w);
    let (top, bottom) = (panel.y + pad, panel.bottom() - pad - h);
    [(right, top), (left, top), (right, bottom), (left, bottom)]
        .into_iter()
        .map(|(x, y)| Rect::new(x, y, w, h))
        .find(|r| marks.iter().all(|m| !blocks(m, &r.grown(pad))))
}

/// How many of `marks` reach into `r` (0: it is clear).
pub fn blockers(r: &Rect, marks: &[Mark]) -> usize {
    marks.iter().filter(|m| blocks(m, r)).count()
}

/// Whether a mark reaches into `r`.
fn blocks(mark: &Mark, r: &Rect) -> bool {
    match mark {
        Mark::Line { points, .. } => polyline_hits(points, r),
        Mark::Rect {
            x,
            y,
            width,
            height,
            ..
        } => r.overlaps(&Rect::new(*x, *y, *width, *height)),
        Mark::Circle { centre, radius, .. } => r.overlaps(&Rect::new(
            centre.x - radius,
            centre.y - radius,
            2.0 * radius,
            2.0 * radius,
        )),
        Mark::Polygon { points, .. } => shape_hits(points, r),
        Mark::Path { segments, .. } => sub_paths(segments).iter().any(|p| shape_hits(p, r)),
        Mark::Text(t) => r.overlaps(&t.bbox()),
        Mark::Clip { marks, .. } => marks.iter().any(|m| blocks(m, r)),
    }
}

/// The points of each sub-path of a path, with every control point (their hull holds the
/// curve).
fn sub_paths(segments: &[PathSegment]) -> Vec<Vec<Point>> {
    let mut out: Vec<Vec<Point>> = Vec::new();
    for s in segments {
        match s {
            PathSegment::MoveTo(p) => out.push(vec![*p]),
            PathSegment::LineTo(p) => out.last_mut().into_iter().for_each(|v| v.push(*p)),
            PathSegment::CubicTo { c1, c2, to } => out
                .last_mut()
                .into_iter()
                .for_each(|v| v.extend([*c1, *c2, *to])),
            PathSegment::Close => {}
        }
    }
    out
}

fn polyline_hits(points: &[Point], r: &Rect) -> bool {
    match points {
        [only] => inside(only, r),
        _ => points.windows(2).any(|w| segment_hits(w[0], w[1], r)),
    }
}

/// A closed shape (or the set of sub-paths of a path) reaches into `r` when an edge crosses
/// it or the rectangle lies inside the shape.
fn shape_hits(points: &[Point], r: &Rect) -> bool {
    if points.is_empty() {
        return false;
    }
    let closed: Vec<Point> = points.iter().chain(points.first()).copied().collect();
    polyline_hits(&closed, r) || contains(points, Point::new(r.x + r.width / 2.0, r.y))
}

fn inside(p: &Point, r: &Rect) -> bool {
    p.x >= r.x && p.x <= r.right() && p.y >= r.y && p.y <= r.bottom()
}

/// Whether the segment from `a` to `b` meets the rectangle (Liang–Barsky clipping).
fn segment_hits(a: Point, b: Point, r: &Rect) -> bool {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let (mut t0, mut t1) = (0.0f64, 1.0f64);
    for (p, q) in [
        (-dx, a.x - r.x),
        (dx, r.right() - a.x),
        (-dy, a.y - r.y),
        (dy, r.bottom() - a.y),
    ] {
        if p == 0.0 {
            if q < 0.0 {
                return false;
            }
        } else {
            let t = q / p;
            if p < 0.0 {
                t0 = t0.max(t);
            } else {
                t1 = t1.min(t);
            }
            if t0 > t1 {
                return false;
            }
        }
    }
    true
}

/// Whether `p` lies inside the polygon (even–odd rule).
fn contains(polygon: &[Point], p: Point) -> bool {
    let mut inside = false;
    let mut j = polygon.len() - 1;
    for i in 0..polygon.len() {
        let (a, b) = (polygon[i], polygon[j]);
        if (a.y > p.y) != (b.y > p.y) && p.x < (b.x - a.x) * (p.y - a.y) / (b.y - a.y) + a.x {
            inside = !inside;
        }
        j = i;
    }
    inside
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::{Colour, Fill, Stroke};

    fn dot(x: f64, y: f64) -> Mark {
        Mark::Circle {
            centre: Point::new(x, y),
            radius: 0.5,
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        }
    }

    #[test]
    fn the_first_free_corner_is_chosen() {
        let panel = Rect::new(0.0, 0.0, 50.0, 40.0);
        // A dot in the top right: the top left is free.
        let r = free_corner(panel, (10.0, 5.0), &[dot(45.0, 3.0)]).unwrap();
        assert!(r.x < 5.0 && r.y < 5.0);
        assert!(free_corner(panel, (60.0, 5.0), &[]).is_none());
    }

    #[test]
    fn the_sub_paths_of_a_path_block_apart() {
        let panel = Rect::new(0.0, 0.0, 50.0, 40.0);
        // Two squares far apart, bottom left and top right: the top left stays free.
        let square = |x: f64, y: f64| {
            [
                PathSegment::MoveTo(Point::new(x, y)),
                PathSegment::LineTo(Point::new(x + 2.0, y)),
                PathSegment::LineTo(Point::new(x + 2.0, y + 2.0)),
                PathSegment::LineTo(Point::new(x, y + 2.0)),
                PathSegment::Close,
            ]
        };
        let path = Mark::Path {
            segments: square(1.0, 37.0)
                .into_iter()
                .chain(square(47.0, 1.0))
                .collect(),
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        };
        let r = free_corner(panel, (10.0, 5.0), &[path]).unwrap();
        assert!(r.x < 5.0 && r.y < 5.0);
    }

    #[test]
    fn a_line_through_a_corner_blocks_it_and_a_filled_shape_covers_its_inside() {
        let panel = Rect::new(0.0, 0.0, 50.0, 40.0);
        let diagonal = Mark::Line {
            points: vec![Point::new(0.0, 40.0), Point::new(50.0, 0.0)],
            stroke: Stroke::solid(Colour::BLACK, 0.2),
        };
        let r = free_corner(panel, (10.0, 5.0), &[diagonal]).unwrap();
        assert!(r.x < 5.0 && r.y < 5.0, "top left, away from the diagonal");
        let cover = Mark::Polygon {
            points: vec![
                Point::new(-1.0, -1.0),
                Point::new(51.0, -1.0),
                Point::new(51.0, 41.0),
                Point::new(-1.0, 41.0),
            ],
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        };
        assert!(free_corner(panel, (10.0, 5.0), &[cover]).is_none());
    }
}
