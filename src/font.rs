//! The bundled font, text measurement and the font database the renderer uses.
//!
//! Figura draws every piece of text with Noto Sans (Regular and Bold, SIL Open Font License,
//! `src/fonts/OFL.txt`), compiled into the binary. Nothing is read from the system, so text
//! looks the same on every machine.
//!
//! Guarantees:
//! - [`measure`] shapes text with rustybuzz and the same font files the renderer uses, so the
//!   width it reports is the advance width the renderer lays out (kerning included), and its
//!   ascent and descent are the font metrics the renderer uses for the text's box. Layout can
//!   rely on it to keep labels from overlapping or being clipped.
//! - [`fontdb`] holds only the bundled faces, and every generic family (serif, sans-serif,
//!   monospace, cursive, fantasy) resolves to them.
//! - Text is normalised the same way everywhere ([`display_text`]): what is measured is
//!   exactly what is drawn.
//!
//! Parsed faces and the database are built once per process and shared between threads.

use std::sync::{Arc, OnceLock};

use crate::scene::{pt_to_mm, TextBaseline, TextStyle, Weight};

/// Family name of the bundled font, as written in SVG `font-family`.
pub const FAMILY: &str = "Noto Sans";

static REGULAR_TTF: &[u8] = include_bytes!("fonts/NotoSans-Regular.ttf");
static BOLD_TTF: &[u8] = include_bytes!("fonts/NotoSans-Bold.ttf");

/// Size of a piece of text, in millimetres, in its own reading direction.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TextExtent {
    /// Advance width: the distance from the start to the end of the text.
    pub width_mm: f64,
    /// Font ascent above the baseline (positive).
    pub ascent_mm: f64,
    /// Font descent below the baseline (positive).
    pub descent_mm: f64,
    /// Height of capital letters above the baseline (positive).
    pub cap_height_mm: f64,
}

impl TextExtent {
    /// Total height of the text's box, ascent plus descent.
    pub fn height_mm(&self) -> f64 {
        self.ascent_mm + self.descent_mm
    }
}

/// Vertical metrics of one face, in font units.
#[derive(Debug, Clone, Copy)]
struct Metrics {
    units_per_em: f64,
    ascender: f64,
    descender: f64,
    cap_height: f64,
}

struct Face {
    shaper: rustybuzz::Face<'static>,
    metrics: Metrics,
}

struct Faces {
    regular: Face,
    bold: Face,
}

fn parse_face(data: &'static [u8]) -> Face {
    // The data is compiled in; a test checks that both faces parse.
    let shaper = rustybuzz::Face::from_slice(data, 0).expect("bundled font parses");
    let units_per_em = f64::from(shaper.units_per_em());
    let metrics = Metrics {
        units_per_em,
        // The same calls usvg makes for a text's box (ttf-parser picks hhea or OS/2 typo).
        ascender: f64::from(shaper.ascender()),
        descender: f64::from(shaper.descender()),
        // Fallback 0.7 em is common practice for Latin fonts without an OS/2 cap height.
        cap_height: shaper
            .capital_height()
            .map_or(0.7 * units_per_em, f64::from),
    };
    Face { shaper, metrics }
}

fn faces() -> &'static Faces {
    static FACES: OnceLock<Faces> = OnceLock::new();
    FACES.get_or_init(|| Faces {
        regular: parse_face(REGULAR_TTF),
        bold: parse_face(BOLD_TTF),
    })
}

fn face(weight: Weight) -> &'static Face {
    match weight {
        Weight::Regular => &faces().regular,
        Weight::Bold => &faces().bold,
    }
}

/// The font size in millimetres exactly as the SVG writer states it (rounded to 0.001 mm), so
/// that measurement and rendering use the same number.
pub fn font_size_mm(size_pt: f64) -> f64 {
    (pt_to_mm(size_pt) * 1000.0).round() / 1000.0
}

/// The text as it is drawn: tabs and line breaks become spaces, other control characters are
/// dropped, runs of spaces collapse to one, and leading and trailing spaces go. This is the
/// whitespace rule SVG renderers apply to text by default, made explicit.
pub fn display_text(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        let c = match c {
            '\t' | '\n' | '\r' => ' ',
            c if c.is_control() => continue,
            c => c,
        };
        if c == ' ' && (out.is_empty() || out.ends_with(' ')) {
            continue;
        }
        out.push(c);
    }
    if out.ends_with(' ') {
        out.pop();
    }
    out
}

/// Measures one line of text in the given style (its colour is irrelevant).
pub fn measure(text: &str, style: &TextStyle) -> TextExtent {
    let face = face(style.weight);
    let text = display_text(text);
    let mut buffer = rustybuzz::UnicodeBuffer::new();
    buffer.push_str(&text);
    let glyphs = rustybuzz::shape(&face.shaper, &[], buffer);
    let advance_units: i64 = glyphs
        .glyph_positions()
        .iter()
        .map(|p| i64::from(p.x_advance))
        .sum();
    let m = face.metrics;
    let scale = font_size_mm(style.size_pt) / m.units_per_em;
    TextExtent {
        width_mm: advance_units as f64 * scale,
        ascent_mm: m.ascender * scale,
        descent_mm: -m.descender * scale,
        cap_height_mm: m.cap_height * scale,
    }
}

/// How far the alphabetic baseline lies below the anchor (in the text's own frame) for a
/// vertical alignment: 0 for `Alphabetic`, half the capital height for `Middle`, the ascent
/// for `Top`.
pub fn baseline_offset_mm(baseline: TextBaseline, style: &TextStyle) -> f64 {
    let m = face(style.weight).metrics;
    let scale = font_size_mm(style.size_pt) / m.units_per_em;
    match baseline {
        TextBaseline::Alphabetic => 0.0,
        TextBaseline::Middle => m.cap_height * scale / 2.0,
        TextBaseline::Top => m.ascender * scale,
    }
}

/// Characters of `text` that the bundled font cannot draw (in order, without repeats). They
/// would show as an empty box; callers can warn about them.
pub fn missing_chars(text: &str, weight: Weight) -> Vec<char> {
    let face = face(weight);
    let mut missing: Vec<char> = Vec::new();
    for c in display_text(text).chars() {
        if face.shaper.glyph_index(c).is_none() && !missing.contains(&c) {
            missing.push(c);
        }
    }
    missing
}

/// Why a font subset could not be made (a bug: the bundled faces are known to subset).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SubsetError(pub String);

impl std::fmt::Display for SubsetError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "cannot make a subset of the bundled font: {}", self.0)
    }
}

impl std::error::Error for SubsetError {}

/// A TrueType copy of the bundled face of `weight` that draws exactly the characters `chars`
/// (and the glyphs they shape into): outlines, advances, character map, kerning and the other
/// layout tables, names 0–6 (copyright, family, style, version). Hinting is dropped.
///
/// Viewers that shape text with the subset (browsers do) therefore lay it out exactly as
/// [`measure`] does. The bytes depend only on the face and the set of characters.
pub fn subset(
    weight: Weight,
    chars: &std::collections::BTreeSet<char>,
) -> Result<Vec<u8>, SubsetError> {
    use read_fonts::collections::IntSet;
    use read_fonts::types::{GlyphId, NameId, Tag};
    let data = match weight {
        Weight::Regular => REGULAR_TTF,
        Weight::Bold => BOLD_TTF,
    };
    let font = read_fonts::FontRef::new(data).map_err(|e| SubsetError(e.to_string()))?;
    let unicodes: IntSet<u32> = chars.iter().map(|&c| u32::from(c)).collect();
    let mut scripts = IntSet::<Tag>::empty();
    scripts.invert();
    let features: IntSet<Tag> = skera::DEFAULT_LAYOUT_FEATURES.iter().copied().collect();
    let mut names = IntSet::<NameId>::empty();
    names.insert_range(NameId::new(0)..=NameId::new(6));
    // English (United States), the language of the bundled names.
    let languages: IntSet<u16> = [0x0409].into_iter().collect();
    let plan = skera::Plan::new(
        &IntSet::<GlyphId>::empty(),
        &unicodes,
        &font,
        skera::SubsetFlags::SUBSET_FLAGS_NO_HINTING,
        &IntSet::empty(),
        &scripts,
        &features,
        &names,
        &languages,
    );
    skera::subset_font(&font, &plan).map_err(|e| SubsetError(e.to_string()))
}

/// A font database holding only the bundled faces, with every generic family pointed at them.
pub fn fontdb() -> Arc<usvg::fontdb::Database> {
    static DB: OnceLock<Arc<usvg::fontdb::Database>> = OnceLock::new();
    DB.get_or_init(|| {
        let mut db = usvg::fontdb::Database::new();
        for data in [REGULAR_TTF, BOLD_TTF] {
            db.load_font_source(usvg::fontdb::Source::Binary(Arc::new(data)));
        }
        db.set_serif_family(FAMILY);
        db.set_sans_serif_family(FAMILY);
        db.set_monospace_family(FAMILY);
        db.set_cursive_family(FAMILY);
        db.set_fantasy_family(FAMILY);
        Arc::new(db)
    })
    .clone()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::Colour;

    fn style(size_pt: f64, weight: Weight) -> TextStyle {
        TextStyle {
            size_pt,
            weight,
            colour: Colour::BLACK,
        }
    }

    #[test]
    fn bundled_faces_parse_and_are_named_as_written_in_svg() {
        let db = fontdb();
        assert_eq!(db.len(), 2);
        for info in db.faces() {
            assert_eq!(info.families[0].0, FAMILY);
        }
        assert!(faces().regular.metrics.ascender > 0.0);
        assert!(faces().bold.metrics.descender < 0.0);
    }

    #[test]
    fn whitespace_is_normalised_like_svg_default() {
        assert_eq!(display_text("  a\t\tb\n c  "), "a b c");
        assert_eq!(display_text("x\u{7}y"), "xy");
        assert_eq!(display_text("   "), "");
        // A no-break space is content, not layout whitespace.
        assert_eq!(display_text("5\u{a0}mm"), "5\u{a0}mm");
    }

    #[test]
    fn width_scales_with_size_and_bold_is_wider() {
        let small = measure("Reaction time", &style(8.0, Weight::Regular));
        let large = measure("Reaction time", &style(16.0, Weight::Regular));
        assert!((large.width_mm / small.width_mm - 2.0).abs() < 1e-3);
        let bold = measure("Reaction time", &style(8.0, Weight::Bold));
        assert!(bold.width_mm > small.width_mm);
        assert_eq!(measure("", &style(8.0, Weight::Regular)).width_mm, 0.0);
    }

    #[test]
    fn missing_characters_are_reported_once() {
        assert!(missing_chars("µ ± – ²", Weight::Regular).is_empty());
        assert_eq!(
            missing_chars("a\u{4e2d}\u{4e2d}", Weight::Regular),
            vec!['\u{4e2d}']
        );
    }

    fn shaped_width_units(face: &rustybuzz::Face<'_>, text: &str) -> i64 {
        let mut buffer = rustybuzz::UnicodeBuffer::new();
        buffer.push_str(text);
        rustybuzz::shape(face, &[], buffer)
            .glyph_positions()
            .iter()
            .map(|p| i64::from(p.x_advance))
            .sum()
    }

    #[test]
    fn a_subset_shapes_its_text_exactly_like_the_full_face() {
        // "AV", "To" and "Wo" are kerned pairs; "fi" may form a ligature.
        let texts = [
            "AVATAR Wo To",
            "Reaction time (ms)",
            "µ ± 1.96 × SE – 95 %",
            "fifty",
        ];
        for weight in [Weight::Regular, Weight::Bold] {
            let chars: std::collections::BTreeSet<char> =
                texts.iter().flat_map(|t| t.chars()).collect();
            let bytes = subset(weight, &chars).unwrap();
            let full = match weight {
                Weight::Regular => REGULAR_TTF,
                Weight::Bold => BOLD_TTF,
            };
            assert!(bytes.len() * 10 < full.len(), "{} bytes", bytes.len());
            let small = rustybuzz::Face::from_slice(&bytes, 0).expect("the subset parses");
            let whole = &face(weight).shaper;
            assert_eq!(small.units_per_em(), whole.units_per_em());
            assert_eq!(small.ascender(), whole.ascender());
            assert_eq!(small.descender(), whole.descender());
            for text in texts {
                for c in text.chars() {
                    assert!(small.glyph_index(c).is_some(), "{c:?} missing");
                }
                assert_eq!(
                    shaped_width_units(&small, text),
                    shaped_width_units(whole, text),
                    "{text}"
                );
            }
            assert!(
                small.glyph_index('Z').is_none(),
                "unused letters are dropped"
            );
            assert_eq!(
                subset(weight, &chars).unwrap(),
                bytes,
                "same bytes every time"
            );
        }
    }
}
