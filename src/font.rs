//! The bundled font, text measurement and the font database the renderer uses.
//!
//! Figura draws every piece of text with Noto Sans (Regular, Bold, Italic and Bold Italic, SIL
//! Open Font License, `src/fonts/OFL.txt`), compiled into the binary. Nothing is read from the
//! system, so text looks the same on every machine.
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
//! - Styled text (label markup, [`crate::markup`]) is measured run by run as the renderer lays
//!   it out: each run's glyphs come from shaping the whole line with the run's face (so kerning
//!   across runs is the renderer's), at the run's size; raised and lowered runs take the
//!   face's own superscript and subscript size and offset ([`run_layout`]), kept inside the
//!   line's ascent and descent, so a line's box is the same with or without them.
//!
//! Parsed faces and the database are built once per process and shared between threads.

use std::sync::{Arc, OnceLock};

use crate::markup::{self, Position, Run, RunStyle};
use crate::scene::{pt_to_mm, TextBaseline, TextStyle, Weight};

/// Family name of the bundled font, as written in SVG `font-family`.
pub const FAMILY: &str = "Noto Sans";

static REGULAR_TTF: &[u8] = include_bytes!("fonts/NotoSans-Regular.ttf");
static BOLD_TTF: &[u8] = include_bytes!("fonts/NotoSans-Bold.ttf");
static ITALIC_TTF: &[u8] = include_bytes!("fonts/NotoSans-Italic.ttf");
static BOLD_ITALIC_TTF: &[u8] = include_bytes!("fonts/NotoSans-BoldItalic.ttf");

/// One face of the bundled font.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct FaceKey {
    pub weight: Weight,
    pub italic: bool,
}

impl FaceKey {
    /// Every face, in a fixed order.
    pub const ALL: [FaceKey; 4] = [
        FaceKey::new(Weight::Regular, false),
        FaceKey::new(Weight::Bold, false),
        FaceKey::new(Weight::Regular, true),
        FaceKey::new(Weight::Bold, true),
    ];

    pub const fn new(weight: Weight, italic: bool) -> FaceKey {
        FaceKey { weight, italic }
    }

    /// The face's font file.
    fn data(self) -> &'static [u8] {
        match (self.weight, self.italic) {
            (Weight::Regular, false) => REGULAR_TTF,
            (Weight::Bold, false) => BOLD_TTF,
            (Weight::Regular, true) => ITALIC_TTF,
            (Weight::Bold, true) => BOLD_ITALIC_TTF,
        }
    }
}

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
    /// Size and offset of superscripts and subscripts, as shares of the em (OS/2).
    superscript: Script,
    subscript: Script,
}

/// A face's size and baseline offset for raised or lowered text, as shares of the em.
#[derive(Debug, Clone, Copy)]
struct Script {
    size: f64,
    offset: f64,
}

struct Faces([Face; 4]);

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
    // The OS/2 table's script metrics; without one, 0.65 em raised by 0.35 em and lowered
    // by 0.14 em (common practice for Latin fonts).
    let script = |m: Option<ttf_parser::ScriptMetrics>, offset: f64| {
        m.map_or(Script { size: 0.65, offset }, |m| Script {
            size: f64::from(m.y_size) / units_per_em,
            offset: f64::from(m.y_offset) / units_per_em,
        })
    };
    Face {
        superscript: script(shaper.superscript_metrics(), 0.35),
        subscript: script(shaper.subscript_metrics(), 0.14),
        shaper,
        metrics,
    }
}

fn faces() -> &'static Faces {
    static FACES: OnceLock<Faces> = OnceLock::new();
    FACES.get_or_init(|| Faces(FaceKey::ALL.map(|key| parse_face(key.data()))))
}

fn face_of(key: FaceKey) -> &'static Face {
    let i = FaceKey::ALL.iter().position(|k| *k == key).unwrap_or(0);
    &faces().0[i]
}

fn face(weight: Weight) -> &'static Face {
    face_of(FaceKey::new(weight, false))
}

/// The font size in millimetres exactly as the SVG writer states it (rounded to 0.001 mm), so
/// that measurement and rendering use the same number.
pub fn font_size_mm(size_pt: f64) -> f64 {
    (pt_to_mm(size_pt) * 1000.0).round() / 1000.0
}

/// The text as it is drawn: tabs and line breaks become spaces, other control characters are
/// dropped, runs of spaces collapse to one, and leading and trailing spaces go. This is the
/// whitespace rule SVG renderers apply to text by default, made explicit. The style codes of a
/// styled string ([`crate::markup`]) stay, each before the text it styles.
pub fn display_text(text: &str) -> String {
    markup::styled(&display_runs(text))
}

/// The runs of a text as it is drawn (see [`display_text`]): whitespace normalised across the
/// whole line, empty runs dropped.
pub fn display_runs(text: &str) -> Vec<Run> {
    let mut out: Vec<Run> = Vec::new();
    // Whether the last character kept is a space (or nothing is kept yet).
    let mut after_space = true;
    for run in markup::runs(text) {
        let mut kept = String::with_capacity(run.text.len());
        for c in run.text.chars() {
            let c = match c {
                '\t' | '\n' | '\r' => ' ',
                c if c.is_control() => continue,
                c => c,
            };
            if c == ' ' && after_space {
                continue;
            }
            after_space = c == ' ';
            kept.push(c);
        }
        if kept.is_empty() {
            continue;
        }
        match out.last_mut() {
            Some(last) if last.style == run.style => last.text.push_str(&kept),
            _ => out.push(Run {
                text: kept,
                style: run.style,
            }),
        }
    }
    // A trailing space goes, with any run it empties.
    if let Some(last) = out.last_mut() {
        if last.text.ends_with(' ') {
            last.text.pop();
        }
        if last.text.is_empty() {
            out.pop();
        }
    }
    out
}

/// A run's face, size (mm, as the SVG writer states it) and baseline shift (mm, upwards) in a
/// text mark of `style`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunLayout {
    pub face: FaceKey,
    pub size_mm: f64,
    pub raise_mm: f64,
}

/// How a run of a text mark of `style` is set: its face (bold when the mark or the run is), and
/// for raised and lowered runs the face's script size, offset within the line's box.
pub fn run_layout(run: RunStyle, style: &TextStyle) -> RunLayout {
    let weight = if run.bold { Weight::Bold } else { style.weight };
    let key = FaceKey::new(weight, run.italic);
    let f = face_of(key);
    let base = font_size_mm(style.size_pt);
    let em = |v: f64| v / f.metrics.units_per_em;
    let (ascender, descender) = (em(f.metrics.ascender), -em(f.metrics.descender));
    let (size_mm, raise_mm) = match run.position {
        Position::Base => (base, 0.0),
        Position::Raised => {
            let share = f.superscript.size;
            // Raised by the face's offset, but never past the line's ascent.
            let offset = f.superscript.offset.min(ascender * (1.0 - share));
            (font_size_mm(style.size_pt * share), offset * base)
        }
        Position::Lowered => {
            let share = f.subscript.size;
            let offset = f.subscript.offset.min(descender * (1.0 - share));
            (font_size_mm(style.size_pt * share), -offset * base)
        }
    };
    RunLayout {
        face: key,
        size_mm,
        raise_mm: (raise_mm * 1000.0).round() / 1000.0,
    }
}

/// Measures one line of text in the given style (its colour is irrelevant). A styled line is
/// measured run by run as the renderer sets it: each run's glyphs are those of the whole line
/// shaped with the run's face, at the run's size. The box is the line's face's ascent and
/// descent (raised and lowered runs stay inside it).
pub fn measure(text: &str, style: &TextStyle) -> TextExtent {
    let runs = display_runs(text);
    let plain: String = runs.iter().map(|r| r.text.as_str()).collect();
    let mut width_mm = 0.0;
    let mut shaped: Vec<(FaceKey, rustybuzz::GlyphBuffer)> = Vec::new();
    let mut start = 0usize;
    for run in &runs {
        let end = start + run.text.len();
        let layout = run_layout(run.style, style);
        let glyphs = match shaped.iter().position(|(k, _)| *k == layout.face) {
            Some(i) => &shaped[i].1,
            None => {
                let mut buffer = rustybuzz::UnicodeBuffer::new();
                buffer.push_str(&plain);
                let glyphs = rustybuzz::shape(&face_of(layout.face).shaper, &[], buffer);
                shaped.push((layout.face, glyphs));
                &shaped[shaped.len() - 1].1
            }
        };
        let units: i64 = glyphs
            .glyph_infos()
            .iter()
            .zip(glyphs.glyph_positions())
            .filter(|(info, _)| (start..end).contains(&(info.cluster as usize)))
            .map(|(_, p)| i64::from(p.x_advance))
            .sum();
        width_mm += units as f64 * layout.size_mm / face_of(layout.face).metrics.units_per_em;
        start = end;
    }
    let m = face(style.weight).metrics;
    let scale = font_size_mm(style.size_pt) / m.units_per_em;
    TextExtent {
        width_mm,
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

/// Characters of `text` that the bundled font cannot draw in text of `weight` (in order,
/// without repeats), each run in its own face. They would show as an empty box; callers can
/// warn about them.
pub fn missing_chars(text: &str, weight: Weight) -> Vec<char> {
    let style = TextStyle {
        size_pt: 10.0,
        weight,
        colour: crate::scene::Colour::BLACK,
    };
    let mut missing: Vec<char> = Vec::new();
    for run in display_runs(text) {
        let face = face_of(run_layout(run.style, &style).face);
        for c in run.text.chars() {
            if face.shaper.glyph_index(c).is_none() && !missing.contains(&c) {
                missing.push(c);
            }
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

/// A TrueType copy of the bundled face `key` that draws exactly the characters `chars`
/// (and the glyphs they shape into): outlines, advances, character map, kerning and the other
/// layout tables, names 0–6 (copyright, family, style, version). Hinting is dropped.
///
/// Viewers that shape text with the subset (browsers do) therefore lay it out exactly as
/// [`measure`] does. The bytes depend only on the face and the set of characters.
pub fn subset(
    key: FaceKey,
    chars: &std::collections::BTreeSet<char>,
) -> Result<Vec<u8>, SubsetError> {
    use read_fonts::collections::IntSet;
    use read_fonts::types::{GlyphId, NameId, Tag};
    let data = key.data();
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
        for data in FaceKey::ALL.map(FaceKey::data) {
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
        assert_eq!(db.len(), 4);
        for info in db.faces() {
            assert_eq!(info.families[0].0, FAMILY);
        }
        let italic = db
            .faces()
            .filter(|f| f.style == usvg::fontdb::Style::Italic)
            .count();
        assert_eq!(italic, 2);
        assert!(face(Weight::Regular).metrics.ascender > 0.0);
        assert!(face(Weight::Bold).metrics.descender < 0.0);
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

    #[test]
    fn styled_runs_are_measured_at_their_size_and_face() {
        let s = style(10.0, Weight::Regular);
        let plain = measure("cm2", &s).width_mm;
        let raised = measure(&markup::parse("cm^2^").text, &s);
        assert!(raised.width_mm < plain, "a smaller 2");
        assert_eq!(raised.ascent_mm, measure("cm", &s).ascent_mm, "same box");
        let italic = measure(&markup::parse("*Wo*").text, &s).width_mm;
        assert!(italic != measure("Wo", &s).width_mm, "the italic face");
        // Raised text stays inside the line's ascent, lowered text inside its descent.
        let up = run_layout(
            markup::parse("^2^")
                .text
                .chars()
                .next()
                .and_then(RunStyle::of_code)
                .unwrap(),
            &s,
        );
        assert!(up.raise_mm > 0.0 && up.size_mm < font_size_mm(10.0));
        let m = face(Weight::Regular).metrics;
        let em = font_size_mm(10.0) / m.units_per_em;
        assert!(up.raise_mm + m.ascender * up.size_mm / m.units_per_em <= m.ascender * em + 1e-3);
        // Whitespace collapses across runs, and empty runs go.
        assert_eq!(
            display_runs(&markup::parse(" a  ^2^  ").text),
            display_runs(&markup::parse("a ^2^").text)
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
        for key in FaceKey::ALL {
            let chars: std::collections::BTreeSet<char> =
                texts.iter().flat_map(|t| t.chars()).collect();
            let bytes = subset(key, &chars).unwrap();
            let full = key.data();
            assert!(bytes.len() * 10 < full.len(), "{} bytes", bytes.len());
            let small = rustybuzz::Face::from_slice(&bytes, 0).expect("the subset parses");
            let whole = &face_of(key).shaper;
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
            assert_eq!(subset(key, &chars).unwrap(), bytes, "same bytes every time");
        }
    }
}
