//! Telling colour groups apart besides colour: a dot shape per group (`colour VAR shapes`)
//! and a dash pattern per group for lines and curves (`colour VAR dashes`), for readers who
//! cannot see the colours apart and for greyscale print. The shapes and patterns are in
//! [`super::style`]; every shape has the area of the plain dot, so no group looks heavier.

use crate::check::plan::GroupMarks;
use crate::scene::{Colour, Fill, Mark, Point, Stroke};

use super::style::{DotShape, GROUP_DASHES_MM, GROUP_SHAPES};

/// The shape of group `g`'s dots (a circle without `shapes`).
pub fn shape(marks: GroupMarks, g: usize) -> DotShape {
    if marks.shapes {
        GROUP_SHAPES[g % GROUP_SHAPES.len()]
    } else {
        DotShape::Circle
    }
}

/// The dash pattern of group `g`'s lines (solid without `dashes`).
pub fn dash(marks: GroupMarks, g: usize) -> Option<Vec<f64>> {
    if !marks.dashes {
        return None;
    }
    let pattern = GROUP_DASHES_MM[g % GROUP_DASHES_MM.len()];
    (!pattern.is_empty()).then(|| pattern.to_vec())
}

/// A solid stroke of group `g`, dashed when the groups take dashes.
pub fn stroke(marks: GroupMarks, g: usize, colour: Colour, width_mm: f64) -> Stroke {
    Stroke {
        dash: dash(marks, g),
        ..Stroke::solid(colour, width_mm)
    }
}

/// A dot of `shape` with the area of a circle of `radius`, centred at `centre`.
pub fn dot(shape: DotShape, centre: Point, radius: f64, fill: Fill) -> Mark {
    let polygon = |corners: &[(f64, f64)], scale: f64| Mark::Polygon {
        points: corners
            .iter()
            .map(|(x, y)| Point::new(centre.x + x * scale, centre.y + y * scale))
            .collect(),
        fill: Some(fill),
        stroke: None,
    };
    let pi = std::f64::consts::PI;
    match shape {
        DotShape::Circle => Mark::Circle {
            centre,
            radius,
            fill: Some(fill),
            stroke: None,
        },
        // Side √π r: the circle's area.
        DotShape::Square => {
            let h = radius * pi.sqrt() / 2.0;
            polygon(&[(-1.0, -1.0), (1.0, -1.0), (1.0, 1.0), (-1.0, 1.0)], h)
        }
        // Half-diagonal √(π/2) r.
        DotShape::Diamond => {
            let h = radius * (pi / 2.0).sqrt();
            polygon(&[(0.0, -1.0), (1.0, 0.0), (0.0, 1.0), (-1.0, 0.0)], h)
        }
        // Circumradius √(4π / (3√3)) r; centred on its centroid.
        DotShape::TriangleUp | DotShape::TriangleDown => {
            let s = radius * (4.0 * pi / (3.0 * 3f64.sqrt())).sqrt();
            let flip = if shape == DotShape::TriangleUp {
                1.0
            } else {
                -1.0
            };
            let c = 3f64.sqrt() / 2.0;
            polygon(&[(0.0, -flip), (c, 0.5 * flip), (-c, 0.5 * flip)], s)
        }
        // Arms a third as wide as the cross: area 20/9 R², so R = r √(9π/20).
        DotShape::Plus | DotShape::Cross => {
            let big = radius * (9.0 * pi / 20.0).sqrt();
            let a = 1.0 / 3.0;
            let plus = [
                (-a, -1.0),
                (a, -1.0),
                (a, -a),
                (1.0, -a),
                (1.0, a),
                (a, a),
                (a, 1.0),
                (-a, 1.0),
                (-a, a),
                (-1.0, a),
                (-1.0, -a),
                (-a, -a),
            ];
            if shape == DotShape::Plus {
                polygon(&plus, big)
            } else {
                let r = std::f64::consts::FRAC_1_SQRT_2;
                let turned: Vec<(f64, f64)> = plus
                    .iter()
                    .map(|(x, y)| ((x - y) * r, (x + y) * r))
                    .collect();
                polygon(&turned, big)
            }
        }
        // Circumradius √(2π / (5 sin 72°)) r, a corner up.
        DotShape::Pentagon => {
            let s = radius * (2.0 * pi / (5.0 * (0.4 * pi).sin())).sqrt();
            let corners: Vec<(f64, f64)> = (0..5)
                .map(|k| {
                    let angle = -pi / 2.0 + f64::from(k) * 0.4 * pi;
                    (angle.cos(), angle.sin())
                })
                .collect();
            polygon(&corners, s)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The area of a polygon (shoelace formula).
    fn area(points: &[Point]) -> f64 {
        let n = points.len();
        (0..n)
            .map(|i| {
                let (a, b) = (points[i], points[(i + 1) % n]);
                a.x * b.y - b.x * a.y
            })
            .sum::<f64>()
            .abs()
            / 2.0
    }

    #[test]
    fn every_shape_has_the_area_of_the_dot() {
        let fill = Fill::solid(Colour::BLACK);
        let circle = std::f64::consts::PI;
        for shape in GROUP_SHAPES.into_iter().skip(1) {
            let Mark::Polygon { points, .. } = dot(shape, Point::new(3.0, 4.0), 1.0, fill) else {
                panic!("{shape:?} is a polygon");
            };
            assert!((area(&points) - circle).abs() < 1e-9, "{shape:?}");
        }
    }

    #[test]
    fn groups_take_distinct_shapes_and_dashes_only_when_asked() {
        let both = GroupMarks {
            shapes: true,
            dashes: true,
        };
        let shapes: Vec<DotShape> = (0..8).map(|g| shape(both, g)).collect();
        for (i, s) in shapes.iter().enumerate() {
            assert!(!shapes[..i].contains(s));
        }
        let dashes: Vec<Option<Vec<f64>>> = (0..8).map(|g| dash(both, g)).collect();
        for (i, d) in dashes.iter().enumerate() {
            assert!(!dashes[..i].contains(d));
        }
        assert_eq!(shape(GroupMarks::default(), 3), DotShape::Circle);
        assert_eq!(dash(GroupMarks::default(), 3), None);
    }
}
