//! Scene → the bytes of the SVG, PNG, TIFF and PDF files. No file is written here: the build
//! stage writes the returned bytes.
//!
//! Pipeline: the scene is trimmed to its reach ([`crate::trim`]) and written once as SVG text
//! ([`crate::svg`]); usvg parses that text once, with the bundled font only
//! ([`crate::font::fontdb`]), into the one drawing every format is made from:
//! - SVG, editable text (the default): the scene's own SVG, whose `<text>` elements sit exactly
//!   where layout measured them, with the font subset it draws embedded as `@font-face` rules
//!   ([`font::subset`]); any viewer that honours them (browsers do) draws the text with the same
//!   font, kerning included, as the PNG.
//! - SVG, outlined text: the drawing written back by usvg with every glyph as a path.
//! - PNG and TIFF: the drawing rasterised by resvg ([`raster`]).
//! - PDF: the drawing converted by svg2pdf, text as text in an embedded subset (or as
//!   outlines), inside a page this module writes ([`pdf`]).
//!
//! Guarantees:
//! - SVG: the root element states the size in millimetres and a `viewBox` in millimetres, and
//!   carries the scene's `<title>` and `<desc>`, then the [`Provenance`] in `<metadata>`.
//! - PNG: pixel size = round(size in inches × dpi) on each side (1 in = 25.4 mm, common
//!   practice); the dpi is recorded in the `pHYs` chunk as pixels per metre. The background is
//!   opaque white, as journals ask for opaque artwork; pixels are written as 8-bit RGB. Title,
//!   description and provenance are text chunks.
//! - TIFF: the same pixels, LZW-compressed with the horizontal predictor, with the dpi as
//!   resolution tags (pixels per inch), one strip set, title and provenance in
//!   `ImageDescription` and the tool in `Software`.
//! - PDF: one page whose MediaBox is the figure size in points (1 in = 72 pt, common practice);
//!   title, subject (the description) and provenance in the document information; the drawing
//!   is a tagged figure whose alternative text is the description (else the title). No date or
//!   document id is written.
//! - Identical scenes give identical bytes, on any thread and in any process.
//! - Failures are returned as [`ExportError`]; nothing here panics on bad input.

mod pdf;
mod raster;

use std::borrow::Cow;
use std::fmt;

use usvg::{Tree, WriteOptions};

use crate::font;
use crate::scene::{Scene, SceneError, TextForm};
use crate::svg::{self, RootSize, Xlink};
use crate::trim;

pub use raster::{pixels_per_metre, png_pixel_size, MAX_PNG_PIXELS};

/// What can go wrong while exporting.
#[derive(Debug, Clone, PartialEq)]
pub enum ExportError {
    /// The scene is not well formed (a bug in whatever built it).
    Scene(SceneError),
    /// The SVG renderer rejected the drawing; the text is its message.
    Svg(String),
    /// The font subset for the SVG could not be made; the text is the reason.
    Font(String),
    /// The requested dpi is not a positive finite number.
    BadDpi { dpi: f64 },
    /// At the requested dpi the image would have no pixels on one side.
    ImageTooSmall { dpi: f64 },
    /// At the requested dpi the image would exceed [`MAX_PNG_PIXELS`].
    ImageTooLarge { width_px: u64, height_px: u64 },
    /// The PNG encoder failed; the text is its message.
    Png(String),
    /// The TIFF encoder failed; the text is its message.
    Tiff(String),
    /// The PDF writer failed; the text is its message.
    Pdf(String),
}

impl fmt::Display for ExportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ExportError::Scene(e) => write!(f, "cannot draw the figure: {e}"),
            ExportError::Svg(e) => write!(f, "cannot draw the figure: the SVG was rejected: {e}"),
            ExportError::Font(e) => write!(f, "cannot embed the font in the SVG: {e}"),
            ExportError::BadDpi { dpi } => write!(f, "dpi must be a positive number, not {dpi}"),
            ExportError::ImageTooSmall { dpi } => {
                write!(
                    f,
                    "at {dpi} dpi the image would be less than one pixel wide or high"
                )
            }
            ExportError::ImageTooLarge {
                width_px,
                height_px,
            } => write!(
                f,
                "the image would be {width_px} x {height_px} pixels, more than the limit of \
                 {MAX_PNG_PIXELS} pixels; lower the dpi or the size"
            ),
            ExportError::Png(e) => write!(f, "cannot encode the PNG: {e}"),
            ExportError::Tiff(e) => write!(f, "cannot encode the TIFF: {e}"),
            ExportError::Pdf(e) => write!(f, "cannot write the PDF: {e}"),
        }
    }
}

impl std::error::Error for ExportError {}

impl From<SceneError> for ExportError {
    fn from(e: SceneError) -> Self {
        ExportError::Scene(e)
    }
}

/// Where a figure came from, recorded in every file it is written to (no time is recorded, so
/// identical inputs still give identical bytes).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Provenance {
    /// The program and its version, e.g. `figura 0.1.0`.
    pub tool: String,
    /// BLAKE3 (hex) of the spec text the figure depends on.
    pub spec: String,
    /// BLAKE3 (hex) of the bytes of its data file.
    pub data: String,
}

impl Provenance {
    /// One plain sentence, the same in every format.
    pub fn sentence(&self) -> String {
        format!(
            "Made by {} from spec blake3:{} and data blake3:{}",
            self.tool, self.spec, self.data
        )
    }
}

/// The text a file says about itself: title, description, provenance.
#[derive(Debug, Clone, Copy)]
struct About<'a> {
    title: Option<&'a str>,
    description: Option<&'a str>,
    provenance: Option<&'a Provenance>,
}

/// A scene drawn once, ready to be written as SVG, PNG, TIFF or PDF.
pub struct Rendered<'s> {
    /// The scene trimmed to its reach.
    scene: Cow<'s, Scene>,
    /// The drawing in millimetre user units (identity root transform), text as text.
    tree: Tree,
    provenance: Option<Provenance>,
}

impl fmt::Debug for Rendered<'_> {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("Rendered")
            .field("width_mm", &self.scene.width_mm)
            .field("height_mm", &self.scene.height_mm)
            .field("provenance", &self.provenance)
            .finish()
    }
}

fn parse_options() -> usvg::Options<'static> {
    usvg::Options {
        font_family: font::FAMILY.to_string(),
        fontdb: font::fontdb(),
        ..usvg::Options::default()
    }
}

fn parse(svg_text: &str) -> Result<Tree, ExportError> {
    Tree::from_str(svg_text, &parse_options()).map_err(|e| ExportError::Svg(e.to_string()))
}

/// Draws a scene: checks it, trims it and parses its SVG once with the bundled font, for
/// [`Rendered::svg`], [`Rendered::png`], [`Rendered::tiff`] and [`Rendered::pdf`].
pub fn render(scene: &Scene) -> Result<Rendered<'_>, ExportError> {
    scene.validate()?;
    let scene = trim::trimmed(scene);
    let tree = parse(&svg::write_document(&scene, RootSize::UserUnits, "")?)?;
    Ok(Rendered {
        scene,
        tree,
        provenance: None,
    })
}

impl Rendered<'_> {
    /// Records `provenance` in every file made from now on.
    pub fn with_provenance(mut self, provenance: Provenance) -> Self {
        self.provenance = Some(provenance);
        self
    }

    /// Figure width in millimetres.
    pub fn width_mm(&self) -> f64 {
        self.scene.width_mm
    }

    /// Figure height in millimetres.
    pub fn height_mm(&self) -> f64 {
        self.scene.height_mm
    }

    fn about(&self) -> About<'_> {
        About {
            title: self.scene.title.as_deref(),
            description: self.scene.description.as_deref(),
            provenance: self.provenance.as_ref(),
        }
    }

    /// The SVG file's text: size in millimetres, viewBox, title, desc and provenance; text as
    /// `<text>` with the font subset embedded, or as outlines.
    pub fn svg(&self, text: TextForm) -> Result<String, ExportError> {
        let provenance = self
            .provenance
            .as_ref()
            .map(|p| svg::metadata_element(&p.sentence()))
            .unwrap_or_default();
        match text {
            TextForm::Editable => {
                let faces = svg::drawn_chars(&self.scene)
                    .into_iter()
                    .map(|(face, chars)| Ok((face, font::subset(face, &chars)?)))
                    .collect::<Result<Vec<_>, font::SubsetError>>()
                    .map_err(|e| ExportError::Font(e.to_string()))?;
                let head = provenance + &svg::font_faces(&faces);
                Ok(svg::write_document(
                    &self.scene,
                    RootSize::Millimetres,
                    &head,
                )?)
            }
            TextForm::Outlined => self.outlined_svg(&provenance),
        }
    }

    /// The drawing written back by usvg, every glyph a path, under our own root element.
    fn outlined_svg(&self, provenance: &str) -> Result<String, ExportError> {
        let write_options = WriteOptions {
            indent: usvg::Indent::None,
            // One user unit is a millimetre: three decimals are a micrometre, far below a
            // pixel at any print resolution. Fewer digits also keep float printing from
            // differing between builds. Transforms keep more, as they hold rotation terms.
            coordinates_precision: 3,
            transforms_precision: 6,
            ..WriteOptions::default()
        };
        let outlined = self.tree.to_string(&write_options);
        let body = strip_root_start_tag(&outlined)?;
        let xlink = if body.contains("xlink:") {
            Xlink::Declare
        } else {
            Xlink::Omit
        };
        let scene = &self.scene;
        Ok(format!(
            "{}\n{}{provenance}{body}\n",
            svg::root_start_tag(
                scene.width_mm,
                scene.height_mm,
                RootSize::Millimetres,
                xlink
            ),
            svg::metadata(scene),
        ))
    }

    /// The PNG file's bytes at `dpi` (opaque white background, dpi recorded in `pHYs`).
    pub fn png(&self, dpi: f64) -> Result<Vec<u8>, ExportError> {
        let image = raster::draw(&self.tree, self.width_mm(), self.height_mm(), dpi)?;
        raster::encode_png(&image, &self.about())
    }

    /// The TIFF file's bytes at `dpi`: the PNG's pixels, LZW-compressed, dpi in its tags.
    pub fn tiff(&self, dpi: f64) -> Result<Vec<u8>, ExportError> {
        let image = raster::draw(&self.tree, self.width_mm(), self.height_mm(), dpi)?;
        raster::encode_tiff(&image, &self.about())
    }

    /// The PDF file's bytes: one page of exactly the figure's size.
    pub fn pdf(&self, text: TextForm) -> Result<Vec<u8>, ExportError> {
        pdf::write(&self.tree, text, &self.about()).map_err(ExportError::Pdf)
    }
}

/// The document after usvg's `<svg ...>` start tag.
fn strip_root_start_tag(svg_text: &str) -> Result<&str, ExportError> {
    let malformed = || ExportError::Svg("the outlined SVG has no root element".to_string());
    let start = svg_text.find("<svg").ok_or_else(malformed)?;
    let end = svg_text[start..].find('>').ok_or_else(malformed)?;
    Ok(svg_text[start + end + 1..].trim_start())
}
