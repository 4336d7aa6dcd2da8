//! The drawing model: a figure as a flat, typed list of marks, in millimetres.
//!
//! A [`Scene`] is pure data produced by the layout stage and consumed by [`crate::svg`]. It
//! knows nothing about statistics or about output formats.
//!
//! Conventions (guaranteed for every consumer):
//! - Coordinates and lengths are in millimetres; the origin is the top-left corner of the
//!   figure and y grows downwards. Text sizes are in points (1 in = 25.4 mm = 72 pt, common
//!   practice).
//! - Marks are drawn in order: a later mark covers an earlier one.
//! - Colours are opaque sRGB; transparency is a separate opacity in `[0, 1]`.
//!
//! [`Scene::validate`] states what a well-formed scene is (finite numbers, positive size,
//! non-negative widths, opacities in range); the SVG writer refuses scenes that break it
//! rather than writing a broken file. [`Scene::text_boxes`] gives the box every piece of text
//! occupies on the page, measured with the bundled font, so layout and tests can check that no
//! text overlaps other text or leaves the page.

use std::fmt;

/// Millimetres per inch (common practice: the inch is defined as exactly 25.4 mm).
pub const MM_PER_INCH: f64 = 25.4;
/// Points per inch (common practice: the PostScript/desktop-publishing point is 1/72 in).
pub const PT_PER_INCH: f64 = 72.0;

/// Converts a length in typographic points to millimetres.
pub fn pt_to_mm(pt: f64) -> f64 {
    pt * MM_PER_INCH / PT_PER_INCH
}

/// Converts a length in millimetres to typographic points.
pub fn mm_to_pt(mm: f64) -> f64 {
    mm * PT_PER_INCH / MM_PER_INCH
}

/// A position in millimetres (origin top-left, y down).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    pub x: f64,
    pub y: f64,
}

impl Point {
    pub const fn new(x: f64, y: f64) -> Self {
        Point { x, y }
    }
}

/// An axis-aligned rectangle in millimetres; `(x, y)` is its top-left corner.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rect {
    pub x: f64,
    pub y: f64,
    pub width: f64,
    pub height: f64,
}

impl Rect {
    pub const fn new(x: f64, y: f64, width: f64, height: f64) -> Self {
        Rect {
            x,
            y,
            width,
            height,
        }
    }

    pub fn right(&self) -> f64 {
        self.x + self.width
    }

    pub fn bottom(&self) -> f64 {
        self.y + self.height
    }

    /// Whether the two rectangles share more than an edge (touching is not overlapping).
    pub fn overlaps(&self, other: &Rect) -> bool {
        self.x < other.right()
            && other.x < self.right()
            && self.y < other.bottom()
            && other.y < self.bottom()
    }

    /// Whether `other` lies inside this rectangle (edges included).
    pub fn contains(&self, other: &Rect) -> bool {
        other.x >= self.x
            && other.y >= self.y
            && other.right() <= self.right()
            && other.bottom() <= self.bottom()
    }

    /// The rectangle grown by `by` on every side (shrunk when negative).
    pub fn grown(&self, by: f64) -> Rect {
        Rect::new(
            self.x - by,
            self.y - by,
            (self.width + 2.0 * by).max(0.0),
            (self.height + 2.0 * by).max(0.0),
        )
    }

    /// The smallest rectangle holding both.
    pub fn union(&self, other: &Rect) -> Rect {
        let (x, y) = (self.x.min(other.x), self.y.min(other.y));
        Rect::new(
            x,
            y,
            self.right().max(other.right()) - x,
            self.bottom().max(other.bottom()) - y,
        )
    }
}

/// An opaque sRGB colour.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Colour {
    pub r: u8,
    pub g: u8,
    pub b: u8,
}

impl Colour {
    pub const BLACK: Colour = Colour::rgb(0, 0, 0);
    pub const WHITE: Colour = Colour::rgb(255, 255, 255);
    /// Dark grey for secondary text such as tick labels and captions.
    pub const GREY_DARK: Colour = Colour::rgb(0x40, 0x40, 0x40);
    /// Mid grey for axis lines, ticks and reference lines.
    pub const GREY: Colour = Colour::rgb(0x80, 0x80, 0x80);
    /// Light grey for grid lines and panel strips.
    pub const GREY_LIGHT: Colour = Colour::rgb(0xd9, 0xd9, 0xd9);

    pub const fn rgb(r: u8, g: u8, b: u8) -> Self {
        Colour { r, g, b }
    }

    /// Builds a colour from `0xRRGGBB`.
    pub const fn from_hex(rgb: u32) -> Self {
        Colour::rgb((rgb >> 16) as u8, (rgb >> 8) as u8, rgb as u8)
    }
}

impl fmt::Display for Colour {
    /// Writes `#rrggbb` (lower-case hex).
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "#{:02x}{:02x}{:02x}", self.r, self.g, self.b)
    }
}

/// How an outline is drawn.
#[derive(Debug, Clone, PartialEq)]
pub struct Stroke {
    pub colour: Colour,
    /// Line width in millimetres (> 0).
    pub width_mm: f64,
    /// In `[0, 1]`; 1 is opaque.
    pub opacity: f64,
    /// Dash pattern, alternating dash and gap lengths in millimetres; `None` is a solid line.
    pub dash: Option<Vec<f64>>,
}

impl Stroke {
    /// An opaque solid line.
    pub fn solid(colour: Colour, width_mm: f64) -> Self {
        Stroke {
            colour,
            width_mm,
            opacity: 1.0,
            dash: None,
        }
    }
}

/// How an area is filled.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Fill {
    pub colour: Colour,
    /// In `[0, 1]`; 1 is opaque.
    pub opacity: f64,
}

impl Fill {
    /// An opaque fill.
    pub const fn solid(colour: Colour) -> Self {
        Fill {
            colour,
            opacity: 1.0,
        }
    }
}

/// One step of a [`Mark::Path`].
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PathSegment {
    MoveTo(Point),
    LineTo(Point),
    /// A cubic Bézier curve from the current point through two control points.
    CubicTo {
        c1: Point,
        c2: Point,
        to: Point,
    },
    /// Closes the current sub-path back to its last `MoveTo`.
    Close,
}

/// Font weight of a text mark (the bundled font has these two faces).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Weight {
    Regular,
    Bold,
}

/// Font size, weight and colour of a text mark.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TextStyle {
    /// Font size in points (> 0).
    pub size_pt: f64,
    pub weight: Weight,
    pub colour: Colour,
}

/// Which point of the text's advance box sits at the anchor, along the reading direction.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum TextAlign {
    /// The anchor is where the text starts.
    Start,
    /// The anchor is at the middle of the text's advance width.
    Middle,
    /// The anchor is where the text ends.
    End,
}

/// Which horizontal line of the text sits at the anchor, across the reading direction.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum TextBaseline {
    /// The alphabetic baseline is at the anchor.
    Alphabetic,
    /// The middle of the capital height is at the anchor (digits and capitals look centred).
    Middle,
    /// The font's ascent line is at the anchor: every glyph lies below it, and the text
    /// occupies exactly `ascent + descent` from [`crate::font::measure`] below it.
    Top,
}

/// Reading direction of a text mark.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum TextRotation {
    /// Left to right, as usual.
    Horizontal,
    /// Turned 90° counter-clockwise: reads bottom to top (y-axis titles). Alignment and
    /// baseline apply in the turned frame: `Start` is at the bottom, and the baseline is a
    /// vertical line with the glyphs on its left.
    Up,
}

/// How the text of a figure is written into its SVG and PDF files.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, Hash)]
pub enum TextForm {
    /// Real text in the bundled font, embedded as a subset: selectable, searchable, editable.
    #[default]
    Editable,
    /// Every glyph converted to a filled outline: no font involved, nothing to select.
    Outlined,
}

/// One line of text.
#[derive(Debug, Clone, PartialEq)]
pub struct TextMark {
    pub at: Point,
    /// One line; whitespace runs are shown as a single space (see [`crate::font::display_text`]).
    pub text: String,
    pub style: TextStyle,
    pub align: TextAlign,
    pub baseline: TextBaseline,
    pub rotation: TextRotation,
}

impl TextMark {
    /// The box the text occupies on the page: its advance width along the reading direction,
    /// and the font's ascent and descent across it, measured with the bundled font exactly as
    /// the SVG writer places the text. Empty text has an empty box at its anchor.
    pub fn bbox(&self) -> Rect {
        let extent = crate::font::measure(&self.text, &self.style);
        let (w, ascent, descent) = (extent.width_mm, extent.ascent_mm, extent.descent_mm);
        // Along the reading direction: where the text starts, measured from the anchor.
        let start = match self.align {
            TextAlign::Start => 0.0,
            TextAlign::Middle => -w / 2.0,
            TextAlign::End => -w,
        };
        // Across it: the baseline lies this far below the anchor, in the text's own frame.
        let baseline = crate::font::baseline_offset_mm(self.baseline, &self.style);
        match self.rotation {
            TextRotation::Horizontal => Rect::new(
                self.at.x + start,
                self.at.y + baseline - ascent,
                w,
                ascent + descent,
            ),
            // Turned counter-clockwise: the text runs upwards, and its "down" points right.
            TextRotation::Up => Rect::new(
                self.at.x + baseline - ascent,
                self.at.y - start - w,
                ascent + descent,
                w,
            ),
        }
    }
}

/// A piece of text and the box it occupies (see [`TextMark::bbox`]).
#[derive(Debug, Clone, PartialEq)]
pub struct TextBox {
    pub text: String,
    pub rect: Rect,
}

/// One drawn element.
#[derive(Debug, Clone, PartialEq)]
pub enum Mark {
    /// An open polyline (at least two points to show anything).
    Line {
        points: Vec<Point>,
        stroke: Stroke,
    },
    Rect {
        x: f64,
        y: f64,
        width: f64,
        height: f64,
        fill: Option<Fill>,
        stroke: Option<Stroke>,
    },
    Circle {
        centre: Point,
        radius: f64,
        fill: Option<Fill>,
        stroke: Option<Stroke>,
    },
    /// A closed polygon.
    Polygon {
        points: Vec<Point>,
        fill: Option<Fill>,
        stroke: Option<Stroke>,
    },
    Path {
        segments: Vec<PathSegment>,
        fill: Option<Fill>,
        stroke: Option<Stroke>,
    },
    Text(TextMark),
    /// Marks drawn only inside `rect` (e.g. data inside a panel's plotting area).
    Clip {
        rect: Rect,
        marks: Vec<Mark>,
    },
}

/// A whole figure.
#[derive(Debug, Clone, PartialEq)]
pub struct Scene {
    pub width_mm: f64,
    pub height_mm: f64,
    /// Shown by screen readers (`<title>` in the SVG).
    pub title: Option<String>,
    /// A longer description for screen readers (`<desc>` in the SVG).
    pub description: Option<String>,
    pub marks: Vec<Mark>,
}

/// Why a scene is not well formed. Each of these is a bug in whatever built the scene.
#[derive(Debug, Clone, PartialEq)]
pub enum SceneError {
    /// The figure's width or height is not a positive finite number.
    BadSize { width_mm: f64, height_mm: f64 },
    /// A coordinate or length is NaN or infinite; `what` names the field.
    NotFinite { what: &'static str },
    /// A length that must not be negative (or, for stroke widths and font sizes, must be
    /// positive) is out of range.
    BadLength { what: &'static str, value: f64 },
    /// An opacity outside `[0, 1]`.
    BadOpacity { value: f64 },
}

impl fmt::Display for SceneError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            SceneError::BadSize {
                width_mm,
                height_mm,
            } => write!(
                f,
                "figure size {width_mm} mm x {height_mm} mm is not a positive size"
            ),
            SceneError::NotFinite { what } => {
                write!(f, "a {what} in the drawing is not a finite number")
            }
            SceneError::BadLength { what, value } => {
                write!(f, "a {what} in the drawing is out of range ({value})")
            }
            SceneError::BadOpacity { value } => {
                write!(f, "an opacity in the drawing is outside 0 to 1 ({value})")
            }
        }
    }
}

impl std::error::Error for SceneError {}

impl Scene {
    /// An empty scene of the given size.
    pub fn new(width_mm: f64, height_mm: f64) -> Self {
        Scene {
            width_mm,
            height_mm,
            title: None,
            description: None,
            marks: Vec::new(),
        }
    }

    /// Calls `visit` with every text mark, in drawing order (inside clips too).
    pub fn for_each_text(&self, visit: &mut impl FnMut(&TextMark)) {
        fn walk(marks: &[Mark], visit: &mut impl FnMut(&TextMark)) {
            for mark in marks {
                match mark {
                    Mark::Text(text) => visit(text),
                    Mark::Clip { marks, .. } => walk(marks, visit),
                    _ => {}
                }
            }
        }
        walk(&self.marks, visit);
    }

    /// Every non-empty piece of text in drawing order (inside clips too), with its box.
    pub fn text_boxes(&self) -> Vec<TextBox> {
        let mut out = Vec::new();
        self.for_each_text(&mut |t| {
            if !crate::font::display_text(&t.text).is_empty() {
                out.push(TextBox {
                    text: t.text.clone(),
                    rect: t.bbox(),
                });
            }
        });
        out
    }

    /// The page as a rectangle.
    pub fn page(&self) -> Rect {
        Rect::new(0.0, 0.0, self.width_mm, self.height_mm)
    }

    /// Checks the invariants listed in the module doc; returns the first violation found.
    pub fn validate(&self) -> Result<(), SceneError> {
        let size_ok = |v: f64| v.is_finite() && v > 0.0;
        if !size_ok(self.width_mm) || !size_ok(self.height_mm) {
            return Err(SceneError::BadSize {
                width_mm: self.width_mm,
                height_mm: self.height_mm,
            });
        }
        self.marks.iter().try_for_each(validate_mark)
    }
}

fn finite(what: &'static str, v: f64) -> Result<(), SceneError> {
    if v.is_finite() {
        Ok(())
    } else {
        Err(SceneError::NotFinite { what })
    }
}

fn non_negative(what: &'static str, v: f64) -> Result<(), SceneError> {
    finite(what, v)?;
    if v >= 0.0 {
        Ok(())
    } else {
        Err(SceneError::BadLength { what, value: v })
    }
}

fn positive(what: &'static str, v: f64) -> Result<(), SceneError> {
    finite(what, v)?;
    if v > 0.0 {
        Ok(())
    } else {
        Err(SceneError::BadLength { what, value: v })
    }
}

fn validate_point(p: &Point) -> Result<(), SceneError> {
    finite("coordinate", p.x)?;
    finite("coordinate", p.y)
}

fn validate_opacity(v: f64) -> Result<(), SceneError> {
    if (0.0..=1.0).contains(&v) {
        Ok(())
    } else {
        Err(SceneError::BadOpacity { value: v })
    }
}

fn validate_stroke(stroke: &Stroke) -> Result<(), SceneError> {
    positive("stroke width", stroke.width_mm)?;
    validate_opacity(stroke.opacity)?;
    stroke
        .dash
        .iter()
        .flatten()
        .try_for_each(|&d| non_negative("dash length", d))
}

fn validate_paint(fill: &Option<Fill>, stroke: &Option<Stroke>) -> Result<(), SceneError> {
    if let Some(fill) = fill {
        validate_opacity(fill.opacity)?;
    }
    stroke.as_ref().map_or(Ok(()), validate_stroke)
}

fn validate_rect(x: f64, y: f64, width: f64, height: f64) -> Result<(), SceneError> {
    finite("coordinate", x)?;
    finite("coordinate", y)?;
    non_negative("rectangle width", width)?;
    non_negative("rectangle height", height)
}

fn validate_mark(mark: &Mark) -> Result<(), SceneError> {
    match mark {
        Mark::Line { points, stroke } => {
            points.iter().try_for_each(validate_point)?;
            validate_stroke(stroke)
        }
        Mark::Rect {
            x,
            y,
            width,
            height,
            fill,
            stroke,
        } => {
            validate_rect(*x, *y, *width, *height)?;
            validate_paint(fill, stroke)
        }
        Mark::Circle {
            centre,
            radius,
            fill,
            stroke,
        } => {
            validate_point(centre)?;
            non_negative("circle radius", *radius)?;
            validate_paint(fill, stroke)
        }
        Mark::Polygon {
            points,
            fill,
            stroke,
        } => {
            points.iter().try_for_each(validate_point)?;
            validate_paint(fill, stroke)
        }
        Mark::Path {
            segments,
            fill,
            stroke,
        } => {
            for segment in segments {
                match segment {
                    PathSegment::MoveTo(p) | PathSegment::LineTo(p) => validate_point(p)?,
                    PathSegment::CubicTo { c1, c2, to } => {
                        [c1, c2, to].into_iter().try_for_each(validate_point)?
                    }
                    PathSegment::Close => {}
                }
            }
            validate_paint(fill, stroke)
        }
        Mark::Text(text) => {
            validate_point(&text.at)?;
            positive("font size", text.style.size_pt)
        }
        Mark::Clip { rect, marks } => {
            validate_rect(rect.x, rect.y, rect.width, rect.height)?;
            marks.iter().try_for_each(validate_mark)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unit_conversions_round_trip() {
        // 1 in = 25.4 mm = 72 pt (common practice).
        assert!((pt_to_mm(72.0) - 25.4).abs() < 1e-12);
        assert!((mm_to_pt(25.4) - 72.0).abs() < 1e-12);
    }

    #[test]
    fn colour_prints_as_lower_case_hex() {
        assert_eq!(Colour::from_hex(0xE69F00).to_string(), "#e69f00");
        assert_eq!(Colour::BLACK.to_string(), "#000000");
    }

    #[test]
    fn text_boxes_follow_alignment_and_rotation() {
        let style = TextStyle {
            size_pt: 10.0,
            weight: Weight::Regular,
            colour: Colour::BLACK,
        };
        let text = |align, baseline, rotation| TextMark {
            at: Point::new(50.0, 40.0),
            text: "Reading".to_string(),
            style,
            align,
            baseline,
            rotation,
        };
        let m = crate::font::measure("Reading", &style);
        let top = text(
            TextAlign::Start,
            TextBaseline::Top,
            TextRotation::Horizontal,
        )
        .bbox();
        assert!((top.x - 50.0).abs() < 1e-12 && (top.y - 40.0).abs() < 1e-9);
        assert!((top.width - m.width_mm).abs() < 1e-12);
        assert!((top.height - m.height_mm()).abs() < 1e-12);
        let end = text(TextAlign::End, TextBaseline::Top, TextRotation::Horizontal).bbox();
        assert!((end.right() - 50.0).abs() < 1e-12);
        let middle = text(
            TextAlign::Middle,
            TextBaseline::Alphabetic,
            TextRotation::Horizontal,
        );
        let b = middle.bbox();
        assert!((b.x + b.width / 2.0 - 50.0).abs() < 1e-12);
        assert!((b.bottom() - (40.0 + m.descent_mm)).abs() < 1e-12);
        // Upright, ending at the anchor: the text lies below it, its ascent to the left.
        let up = text(TextAlign::End, TextBaseline::Top, TextRotation::Up).bbox();
        assert!((up.y - 40.0).abs() < 1e-12 && (up.height - m.width_mm).abs() < 1e-12);
        assert!((up.x - 50.0).abs() < 1e-9 && (up.width - m.height_mm()).abs() < 1e-12);
    }

    #[test]
    fn rectangles_overlap_only_when_they_share_area() {
        let a = Rect::new(0.0, 0.0, 10.0, 5.0);
        assert!(a.overlaps(&Rect::new(9.0, 4.0, 3.0, 3.0)));
        assert!(!a.overlaps(&Rect::new(10.0, 0.0, 3.0, 3.0)));
        assert!(a.contains(&Rect::new(0.0, 0.0, 10.0, 5.0)));
        assert!(!a.contains(&Rect::new(-0.1, 0.0, 1.0, 1.0)));
    }

    #[test]
    fn validate_reports_bad_values() {
        assert!(Scene::new(85.0, 65.0).validate().is_ok());
        assert!(matches!(
            Scene::new(0.0, 65.0).validate(),
            Err(SceneError::BadSize { .. })
        ));
        let mut scene = Scene::new(85.0, 65.0);
        scene.marks.push(Mark::Clip {
            rect: Rect::new(0.0, 0.0, 10.0, 10.0),
            marks: vec![Mark::Circle {
                centre: Point::new(f64::NAN, 1.0),
                radius: 1.0,
                fill: Some(Fill::solid(Colour::BLACK)),
                stroke: None,
            }],
        });
        assert_eq!(
            scene.validate(),
            Err(SceneError::NotFinite { what: "coordinate" })
        );
        let mut scene = Scene::new(85.0, 65.0);
        scene.marks.push(Mark::Line {
            points: vec![Point::new(0.0, 0.0), Point::new(1.0, 1.0)],
            stroke: Stroke {
                opacity: 1.5,
                ..Stroke::solid(Colour::BLACK, 0.3)
            },
        });
        assert_eq!(scene.validate(), Err(SceneError::BadOpacity { value: 1.5 }));
    }
}
