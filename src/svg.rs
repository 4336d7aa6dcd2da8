//! Scene → SVG text. Pure: no I/O, no clock, no randomness.
//!
//! Guarantees:
//! - The same scene always gives the same bytes: elements follow the scene's mark order,
//!   attributes come in a fixed order, clip paths are numbered in document order, and every
//!   number is written by [`format_number`] (at most three decimals — a micrometre — with
//!   trailing zeros trimmed and `-0` written as `0`).
//! - The root element states the physical size in millimetres and a `viewBox` in millimetres,
//!   so one user unit is one millimetre.
//! - The scene's title and description are written as `<title>` and `<desc>` (XML-escaped)
//!   for screen readers.
//! - Colours are written as `#rrggbb`; opacities only when below 1.
//! - Text is real `<text>` in the bundled font ([`crate::font::FAMILY`]), anchored exactly
//!   where layout placed it; its vertical alignment is resolved here into a plain baseline
//!   position, so no renderer's handling of `dominant-baseline` matters. Text is written as
//!   [`crate::font::display_text`] gives it, which is exactly what [`crate::font::measure`]
//!   measured. [`font_faces`] embeds the font itself (see [`crate::export`]).
//! - Marks are trimmed to their reach first ([`crate::trim`]), so no coordinate lies more than
//!   a page's side beyond what clips it.
//! - A scene that breaks [`Scene::validate`] is refused, never written half-broken.

use std::collections::{BTreeMap, BTreeSet};
use std::fmt::Write as _;

use base64::Engine as _;

use crate::font::{self, FaceKey};
use crate::markup::{self, Run, RunStyle};
use crate::scene::{
    Fill, Mark, PathSegment, Point, Rect, Scene, SceneError, Stroke, TextAlign, TextMark,
    TextRotation, TextStyle, Weight,
};
use crate::trim;

/// How the root element states the figure's size.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum RootSize {
    /// `width="85mm"` with a millimetre `viewBox`: the form written to files.
    Millimetres,
    /// `width="85"`: one user unit per output unit, for handing to the renderer so that no
    /// unit conversion (and no rounding from it) happens before drawing.
    UserUnits,
}

/// Writes a scene as a standalone SVG document, its text as `<text>` without an embedded
/// font (the SVG file adds one: [`crate::export::Rendered::svg`]).
pub fn to_svg(scene: &Scene) -> Result<String, SceneError> {
    write_document(scene, RootSize::Millimetres, "")
}

/// The document: root element, title and description, then `head` (already formatted
/// elements, each line ending in a newline), then the marks.
pub(crate) fn write_document(
    scene: &Scene,
    size: RootSize,
    head: &str,
) -> Result<String, SceneError> {
    scene.validate()?;
    let scene = trim::trimmed(scene);
    let mut out = String::new();
    out.push_str(&root_start_tag(
        scene.width_mm,
        scene.height_mm,
        size,
        Xlink::Omit,
    ));
    out.push('\n');
    out.push_str(&metadata(&scene));
    out.push_str(head);
    let mut writer = Writer {
        out,
        next_clip_id: 1,
    };
    for mark in &scene.marks {
        writer.mark(mark, 0);
    }
    let mut out = writer.out;
    out.push_str("</svg>\n");
    Ok(out)
}

/// The characters each face of the font draws in the scene, exactly as they are written.
pub fn drawn_chars(scene: &Scene) -> BTreeMap<FaceKey, BTreeSet<char>> {
    let mut chars: BTreeMap<FaceKey, BTreeSet<char>> = BTreeMap::new();
    scene.for_each_text(&mut |text| {
        for run in font::display_runs(&text.text) {
            chars
                .entry(font::run_layout(run.style, &text.style).face)
                .or_default()
                .extend(run.text.chars());
        }
    });
    chars.retain(|_, set| !set.is_empty());
    chars
}

/// A `<style>` element declaring each face (TrueType bytes) as the bundled font's family, as a
/// `data:` URL, so viewers draw the text with exactly this font. Empty when there is no face.
pub fn font_faces(faces: &[(FaceKey, Vec<u8>)]) -> String {
    if faces.is_empty() {
        return String::new();
    }
    let mut out = String::from("<style>\n");
    for (key, bytes) in faces {
        let weight = match key.weight {
            Weight::Regular => 400,
            Weight::Bold => 700,
        };
        let style = if key.italic { "italic" } else { "normal" };
        let data = base64::engine::general_purpose::STANDARD.encode(bytes);
        let _ = writeln!(
            out,
            r#"@font-face {{ font-family: "{}"; font-weight: {weight}; font-style: {style}; src: url("data:font/ttf;base64,{data}") format("truetype"); }}"#,
            font::FAMILY
        );
    }
    out.push_str("</style>\n");
    out
}

/// A `<metadata>` element holding `text` (XML-escaped), on one line.
pub fn metadata_element(text: &str) -> String {
    format!("<metadata>{}</metadata>\n", escape_xml(&plain_text(text)))
}

/// Whether the root element declares the XLink namespace (needed when the body uses
/// `xlink:href`; the scene writer itself never does).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) enum Xlink {
    Omit,
    Declare,
}

/// The `<svg ...>` start tag.
pub(crate) fn root_start_tag(
    width_mm: f64,
    height_mm: f64,
    size: RootSize,
    xlink: Xlink,
) -> String {
    let (w, h) = (format_number(width_mm), format_number(height_mm));
    let unit = match size {
        RootSize::Millimetres => "mm",
        RootSize::UserUnits => "",
    };
    let xlink = match xlink {
        Xlink::Declare => r#" xmlns:xlink="http://www.w3.org/1999/xlink""#,
        Xlink::Omit => "",
    };
    format!(
        r#"<svg xmlns="http://www.w3.org/2000/svg"{xlink} width="{w}{unit}" height="{h}{unit}" viewBox="0 0 {w} {h}">"#
    )
}

/// The `<title>` and `<desc>` lines (each ending in a newline), or nothing.
pub(crate) fn metadata(scene: &Scene) -> String {
    let mut out = String::new();
    for (tag, text) in [("title", &scene.title), ("desc", &scene.description)] {
        if let Some(text) = text {
            let text = escape_xml(&plain_text(text));
            let _ = writeln!(out, "<{tag}>{text}</{tag}>");
        }
    }
    out
}

/// A styled string as plain text for metadata: whitespace normalised, styles dropped (raised
/// digits as superscript characters, see [`crate::markup::plain`]).
fn plain_text(text: &str) -> String {
    markup::plain(&font::display_text(text))
}

/// Formats a coordinate or length: rounded to three decimals, trailing zeros and a trailing
/// point removed, and negative zero written as `0`.
pub fn format_number(value: f64) -> String {
    let mut s = format!("{value:.3}");
    if s.contains('.') {
        let trimmed = s.trim_end_matches('0').trim_end_matches('.').len();
        s.truncate(trimmed);
    }
    if s == "-0" {
        s = "0".to_string();
    }
    s
}

/// Escapes the five XML special characters, so the text is safe in content and in
/// double- or single-quoted attributes.
pub fn escape_xml(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            c => out.push(c),
        }
    }
    out
}

struct Writer {
    out: String,
    next_clip_id: u32,
}

impl Writer {
    fn indent(&mut self, depth: usize) {
        for _ in 0..depth {
            self.out.push_str("  ");
        }
    }

    fn mark(&mut self, mark: &Mark, depth: usize) {
        match mark {
            Mark::Line { points, stroke } => {
                if points.len() >= 2 {
                    self.indent(depth);
                    let _ = write!(self.out, r#"<polyline points="{}""#, points_attr(points));
                    self.paint(None, Some(stroke));
                    self.out.push_str("/>\n");
                }
            }
            Mark::Rect {
                x,
                y,
                width,
                height,
                fill,
                stroke,
            } => {
                self.indent(depth);
                self.rect_element(&Rect::new(*x, *y, *width, *height));
                self.paint(fill.as_ref(), stroke.as_ref());
                self.out.push_str("/>\n");
            }
            Mark::Circle {
                centre,
                radius,
                fill,
                stroke,
            } => {
                self.indent(depth);
                let _ = write!(
                    self.out,
                    r#"<circle cx="{}" cy="{}" r="{}""#,
                    format_number(centre.x),
                    format_number(centre.y),
                    format_number(*radius)
                );
                self.paint(fill.as_ref(), stroke.as_ref());
                self.out.push_str("/>\n");
            }
            Mark::Polygon {
                points,
                fill,
                stroke,
            } => {
                if !points.is_empty() {
                    self.indent(depth);
                    let _ = write!(self.out, r#"<polygon points="{}""#, points_attr(points));
                    self.paint(fill.as_ref(), stroke.as_ref());
                    self.out.push_str("/>\n");
                }
            }
            Mark::Path {
                segments,
                fill,
                stroke,
            } => {
                if !segments.is_empty() {
                    self.indent(depth);
                    let _ = write!(self.out, r#"<path d="{}""#, path_data(segments));
                    self.paint(fill.as_ref(), stroke.as_ref());
                    self.out.push_str("/>\n");
                }
            }
            Mark::Text(text) => self.text(text, depth),
            Mark::Clip { rect, marks } => self.clip(rect, marks, depth),
        }
    }

    fn rect_element(&mut self, rect: &Rect) {
        let _ = write!(
            self.out,
            r#"<rect x="{}" y="{}" width="{}" height="{}""#,
            format_number(rect.x),
            format_number(rect.y),
            format_number(rect.width),
            format_number(rect.height)
        );
    }

    fn paint(&mut self, fill: Option<&Fill>, stroke: Option<&Stroke>) {
        match fill {
            Some(fill) => {
                let _ = write!(self.out, r#" fill="{}""#, fill.colour);
                if fill.opacity < 1.0 {
                    let _ = write!(
                        self.out,
                        r#" fill-opacity="{}""#,
                        format_number(fill.opacity)
                    );
                }
            }
            None => self.out.push_str(r#" fill="none""#),
        }
        if let Some(stroke) = stroke {
            let _ = write!(
                self.out,
                r#" stroke="{}" stroke-width="{}""#,
                stroke.colour,
                format_number(stroke.width_mm)
            );
            if stroke.opacity < 1.0 {
                let _ = write!(
                    self.out,
                    r#" stroke-opacity="{}""#,
                    format_number(stroke.opacity)
                );
            }
            if let Some(dash) = stroke.dash.as_ref().filter(|d| !d.is_empty()) {
                let dash: Vec<String> = dash.iter().map(|&d| format_number(d)).collect();
                let _ = write!(self.out, r#" stroke-dasharray="{}""#, dash.join(" "));
            }
        }
    }

    fn text(&mut self, text: &TextMark, depth: usize) {
        let content = font::display_text(&text.text);
        if content.is_empty() {
            return;
        }
        let style = &text.style;
        let shift = font::baseline_offset_mm(text.baseline, style);
        let (x, y) = (format_number(text.at.x), format_number(text.at.y));
        self.indent(depth);
        let _ = write!(
            self.out,
            r#"<text x="{x}" y="{}" font-family="{}" font-size="{}""#,
            format_number(text.at.y + shift),
            font::FAMILY,
            format_number(font::font_size_mm(style.size_pt))
        );
        if style.weight == Weight::Bold {
            self.out.push_str(r#" font-weight="700""#);
        }
        let _ = write!(self.out, r#" fill="{}""#, style.colour);
        match text.align {
            TextAlign::Start => {}
            TextAlign::Middle => self.out.push_str(r#" text-anchor="middle""#),
            TextAlign::End => self.out.push_str(r#" text-anchor="end""#),
        }
        if text.rotation == TextRotation::Up {
            // Turning about the anchor keeps the anchor fixed; the baseline shift, applied
            // along the text's own "down", then points to the right on the page.
            let _ = write!(self.out, r#" transform="rotate(-90 {x} {y})""#);
        }
        self.out.push('>');
        self.runs(&font::display_runs(&content), style);
        self.out.push_str("</text>\n");
    }

    /// The runs of a line: plain text as it is, styled runs as `<tspan>`s with their face and
    /// size; a run's baseline shift is a `dy` from the run before, so text after a raised or
    /// lowered run returns to the baseline.
    fn runs(&mut self, runs: &[Run], style: &TextStyle) {
        let mut raised = 0.0;
        for run in runs {
            let text = escape_xml(&run.text);
            if run.style == RunStyle::default() && raised == 0.0 {
                self.out.push_str(&text);
                continue;
            }
            let layout = font::run_layout(run.style, style);
            self.out.push_str("<tspan");
            if run.style.italic {
                self.out.push_str(r#" font-style="italic""#);
            }
            if run.style.bold && style.weight != Weight::Bold {
                self.out.push_str(r#" font-weight="700""#);
            }
            if layout.size_mm != font::font_size_mm(style.size_pt) {
                let _ = write!(
                    self.out,
                    r#" font-size="{}""#,
                    format_number(layout.size_mm)
                );
            }
            let dy = raised - layout.raise_mm;
            if dy != 0.0 {
                let _ = write!(self.out, r#" dy="{}""#, format_number(dy));
            }
            raised = layout.raise_mm;
            let _ = write!(self.out, ">{text}</tspan>");
        }
    }

    fn clip(&mut self, rect: &Rect, marks: &[Mark], depth: usize) {
        let id = self.next_clip_id;
        self.next_clip_id += 1;
        self.indent(depth);
        let _ = write!(self.out, r#"<clipPath id="clip{id}">"#);
        self.rect_element(rect);
        self.out.push_str("/></clipPath>\n");
        self.indent(depth);
        let _ = writeln!(self.out, r#"<g clip-path="url(#clip{id})">"#);
        for mark in marks {
            self.mark(mark, depth + 1);
        }
        self.indent(depth);
        self.out.push_str("</g>\n");
    }
}

fn points_attr(points: &[Point]) -> String {
    let parts: Vec<String> = points
        .iter()
        .map(|p| format!("{},{}", format_number(p.x), format_number(p.y)))
        .collect();
    parts.join(" ")
}

fn path_data(segments: &[PathSegment]) -> String {
    let xy = |p: &Point| format!("{} {}", format_number(p.x), format_number(p.y));
    let parts: Vec<String> = segments
        .iter()
        .map(|segment| match segment {
            PathSegment::MoveTo(p) => format!("M{}", xy(p)),
            PathSegment::LineTo(p) => format!("L{}", xy(p)),
            PathSegment::CubicTo { c1, c2, to } => {
                format!("C{} {} {}", xy(c1), xy(c2), xy(to))
            }
            PathSegment::Close => "Z".to_string(),
        })
        .collect();
    parts.join(" ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_rounded_trimmed_and_never_negative_zero() {
        assert_eq!(format_number(0.0), "0");
        assert_eq!(format_number(-0.0), "0");
        assert_eq!(format_number(-0.0004), "0");
        assert_eq!(format_number(1.5), "1.5");
        assert_eq!(format_number(2.0), "2");
        assert_eq!(format_number(10.0), "10");
        assert_eq!(format_number(1.23456), "1.235");
        assert_eq!(format_number(-3.1000001), "-3.1");
        assert_eq!(format_number(0.0005), "0.001");
    }

    #[test]
    fn styled_text_is_written_as_escaped_tspans_that_return_to_the_baseline() {
        use crate::scene::{Colour, TextBaseline, TextStyle};
        let mut scene = Scene::new(50.0, 20.0);
        scene.marks.push(Mark::Text(TextMark {
            at: Point::new(2.0, 10.0),
            text: markup::parse("a<b *&c* m^2^ </text>").text,
            style: TextStyle {
                size_pt: 10.0,
                weight: Weight::Regular,
                colour: Colour::BLACK,
            },
            align: TextAlign::Start,
            baseline: TextBaseline::Alphabetic,
            rotation: TextRotation::Horizontal,
        }));
        let svg = to_svg(&scene).unwrap();
        let line = svg.lines().find(|l| l.starts_with("<text")).unwrap();
        assert!(line
            .contains(r#">a&lt;b <tspan font-style="italic">&amp;c</tspan> m<tspan font-size="#));
        assert!(
            line.ends_with(r#"> &lt;/text&gt;</tspan></text>"#),
            "{line}"
        );
        // The raised run goes up by as much as the run after it comes down.
        let dys: Vec<f64> = line
            .split(r#"dy=""#)
            .skip(1)
            .map(|rest| rest.split('"').next().unwrap().parse().unwrap())
            .collect();
        assert_eq!(dys.len(), 2);
        assert!(dys[0] < 0.0 && (dys[0] + dys[1]).abs() < 1e-9, "{dys:?}");
        assert!(tags_balance(&svg));
    }

    /// Every `<` opens a tag the document closes (a rough check that nothing leaked).
    fn tags_balance(svg: &str) -> bool {
        svg.matches("<tspan").count() == svg.matches("</tspan>").count()
            && svg.matches("<text").count() == svg.matches("</text>").count()
    }

    #[test]
    fn escapes_all_special_characters() {
        assert_eq!(
            escape_xml(r#"a<b & "c" 'd'>"#),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;"
        );
    }
}
