//! Scene → the bytes of the SVG, PNG and PDF files. No file is written here: the build stage
//! writes the returned bytes.
//!
//! Pipeline: the scene's SVG text ([`crate::svg`]) is parsed by usvg with the bundled font
//! only ([`crate::font::fontdb`]); text is converted to outlines and written back as a
//! path-only SVG, which is the SVG file. PNG and PDF are drawn from that same path-only
//! drawing, so the three files agree to the pixel and none of them depends on the fonts of the
//! machine that opens it.
//!
//! Guarantees:
//! - SVG: the root element states the size in millimetres and a `viewBox` in millimetres, and
//!   carries the scene's `<title>` and `<desc>` (usvg's writer drops all three; they are put
//!   back the same way every time).
//! - PNG: pixel size = round(size in inches × dpi) on each side (1 in = 25.4 mm, common
//!   practice); the dpi is recorded in the `pHYs` chunk as pixels per metre. The background is
//!   opaque white, as journals ask for opaque artwork; pixels are written as 8-bit RGB.
//! - PDF: one page whose MediaBox is the figure size in points (1 in = 72 pt, common
//!   practice); no date or document id is written.
//! - Identical scenes give identical bytes, on any thread and in any process.
//! - Failures are returned as [`ExportError`]; nothing here panics on bad input.

use std::fmt;

use resvg::tiny_skia;
use usvg::{Tree, WriteOptions};

use crate::font;
use crate::scene::{Scene, SceneError, MM_PER_INCH};
use crate::svg::{self, RootSize, Xlink};

/// The largest PNG, in pixels (width × height), that [`Rendered::png`] will draw
/// (about 400 MB of memory while drawing).
pub const MAX_PNG_PIXELS: u64 = 100_000_000;

/// What can go wrong while exporting.
#[derive(Debug, Clone, PartialEq)]
pub enum ExportError {
    /// The scene is not well formed (a bug in whatever built it).
    Scene(SceneError),
    /// The SVG renderer rejected the drawing; the text is its message.
    Svg(String),
    /// The requested dpi is not a positive finite number.
    BadDpi { dpi: f64 },
    /// At the requested dpi the image would have no pixels on one side.
    ImageTooSmall { dpi: f64 },
    /// At the requested dpi the image would exceed [`MAX_PNG_PIXELS`].
    ImageTooLarge { width_px: u64, height_px: u64 },
    /// The PNG encoder failed; the text is its message.
    Png(String),
    /// The PDF writer failed; the text is its message.
    Pdf(String),
}

impl fmt::Display for ExportError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ExportError::Scene(e) => write!(f, "cannot draw the figure: {e}"),
            ExportError::Svg(e) => write!(f, "cannot draw the figure: the SVG was rejected: {e}"),
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

/// A scene drawn once, ready to be written as SVG, PNG or PDF.
pub struct Rendered {
    width_mm: f64,
    height_mm: f64,
    /// The final SVG file: outlines only, with size, viewBox, title and description.
    svg: String,
    /// The path-only drawing in millimetre user units (identity root transform).
    tree: Tree,
}

impl fmt::Debug for Rendered {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.debug_struct("Rendered")
            .field("width_mm", &self.width_mm)
            .field("height_mm", &self.height_mm)
            .field("svg_bytes", &self.svg.len())
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

/// Draws a scene: checks it, converts its text to outlines with the bundled font, and keeps
/// the result for [`Rendered::svg`], [`Rendered::png`] and [`Rendered::pdf`].
pub fn render(scene: &Scene) -> Result<Rendered, ExportError> {
    let text_svg = svg::write_document(scene, RootSize::UserUnits)?;
    let text_tree = parse(&text_svg)?;
    let write_options = WriteOptions {
        indent: usvg::Indent::None,
        // One user unit is a millimetre: three decimals are a micrometre, far below a pixel
        // at any print resolution. Fewer digits also keep float printing from differing
        // between builds. Transforms keep more, as they hold rotation terms.
        coordinates_precision: 3,
        transforms_precision: 6,
        ..WriteOptions::default()
    };
    let outlined = text_tree.to_string(&write_options);
    let body = strip_root_start_tag(&outlined)?;
    let xlink = if body.contains("xlink:") {
        Xlink::Declare
    } else {
        Xlink::Omit
    };
    let user_unit_svg = format!(
        "{}{body}",
        svg::root_start_tag(scene.width_mm, scene.height_mm, RootSize::UserUnits, xlink)
    );
    let tree = parse(&user_unit_svg)?;
    let final_svg = format!(
        "{}\n{}{body}\n",
        svg::root_start_tag(
            scene.width_mm,
            scene.height_mm,
            RootSize::Millimetres,
            xlink
        ),
        svg::metadata(scene),
    );
    Ok(Rendered {
        width_mm: scene.width_mm,
        height_mm: scene.height_mm,
        svg: final_svg,
        tree,
    })
}

/// The document after usvg's `<svg ...>` start tag.
fn strip_root_start_tag(svg_text: &str) -> Result<&str, ExportError> {
    let malformed = || ExportError::Svg("the outlined SVG has no root element".to_string());
    let start = svg_text.find("<svg").ok_or_else(malformed)?;
    let end = svg_text[start..].find('>').ok_or_else(malformed)?;
    Ok(svg_text[start + end + 1..].trim_start())
}

/// Pixel width and height of a `width_mm` × `height_mm` figure at `dpi`:
/// round(size in inches × dpi) on each side.
pub fn png_pixel_size(width_mm: f64, height_mm: f64, dpi: f64) -> Result<(u32, u32), ExportError> {
    if !(dpi.is_finite() && dpi > 0.0) {
        return Err(ExportError::BadDpi { dpi });
    }
    let side = |mm: f64| (mm / MM_PER_INCH * dpi).round();
    let (w, h) = (side(width_mm), side(height_mm));
    if !(w >= 1.0 && h >= 1.0) {
        return Err(ExportError::ImageTooSmall { dpi });
    }
    if w * h > MAX_PNG_PIXELS as f64 {
        return Err(ExportError::ImageTooLarge {
            width_px: w as u64,
            height_px: h as u64,
        });
    }
    Ok((w as u32, h as u32))
}

/// Pixels per metre for a dpi, as the PNG `pHYs` chunk records it (300 dpi → 11811).
pub fn pixels_per_metre(dpi: f64) -> u32 {
    (dpi / MM_PER_INCH * 1000.0).round() as u32
}

impl Rendered {
    /// Figure width in millimetres.
    pub fn width_mm(&self) -> f64 {
        self.width_mm
    }

    /// Figure height in millimetres.
    pub fn height_mm(&self) -> f64 {
        self.height_mm
    }

    /// The SVG file's text: text as outlines, size in millimetres, viewBox, title and desc.
    pub fn svg(&self) -> &str {
        &self.svg
    }

    /// The PNG file's bytes at `dpi` (opaque white background, dpi recorded in `pHYs`).
    pub fn png(&self, dpi: f64) -> Result<Vec<u8>, ExportError> {
        let (width_px, height_px) = png_pixel_size(self.width_mm, self.height_mm, dpi)?;
        let mut pixmap =
            tiny_skia::Pixmap::new(width_px, height_px).ok_or(ExportError::ImageTooLarge {
                width_px: u64::from(width_px),
                height_px: u64::from(height_px),
            })?;
        pixmap.fill(tiny_skia::Color::WHITE);
        let scale = (dpi / MM_PER_INCH) as f32;
        resvg::render(
            &self.tree,
            tiny_skia::Transform::from_scale(scale, scale),
            &mut pixmap.as_mut(),
        );
        let rgb: Vec<u8> = pixmap
            .pixels()
            .iter()
            .flat_map(|p| {
                let c = p.demultiply();
                [c.red(), c.green(), c.blue()]
            })
            .collect();
        encode_png(&rgb, width_px, height_px, dpi)
    }

    /// The PDF file's bytes: one page of exactly the figure's size.
    pub fn pdf(&self) -> Result<Vec<u8>, ExportError> {
        // One user unit is one millimetre; svg2pdf maps `dpi` user units to 72 pt.
        let page = svg2pdf::PageOptions {
            dpi: MM_PER_INCH as f32,
        };
        svg2pdf::to_pdf(&self.tree, svg2pdf::ConversionOptions::default(), page)
            .map(canonical_resource_order)
            .map_err(|e| ExportError::Pdf(e.to_string()))
    }
}

/// Resource dictionaries whose entries the PDF writer emits in hash order.
const RESOURCE_DICTS: [&[u8]; 6] = [
    b"/ExtGState <<\n",
    b"/XObject <<\n",
    b"/Pattern <<\n",
    b"/Shading <<\n",
    b"/Font <<\n",
    b"/ColorSpace <<\n",
];

/// Sorts the entries of every resource dictionary, so identical figures give identical bytes.
///
/// The PDF writer emits these entries (one `/name reference` per line) in an order that
/// changes from run to run. Sorting the lines of each dictionary moves no byte outside it and
/// keeps its length, so every offset in the cross-reference table stays right. Stream contents
/// are skipped; a dictionary whose lines are not all single entries is left as it is.
fn canonical_resource_order(mut pdf: Vec<u8>) -> Vec<u8> {
    let mut at = 0;
    while at < pdf.len() {
        if pdf[at..].starts_with(b"\nstream\n") {
            at = find(&pdf, b"\nendstream", at + 8).unwrap_or(pdf.len());
            continue;
        }
        let Some(head) = RESOURCE_DICTS.iter().find(|h| pdf[at..].starts_with(h)) else {
            at += 1;
            continue;
        };
        let start = at + head.len();
        let Some(end) = find(&pdf, b">>", start) else {
            break;
        };
        // The block holds whole lines: from `start` to the line that closes the dictionary.
        let block_end = pdf[start..end]
            .iter()
            .rposition(|&b| b == b'\n')
            .map_or(start, |i| start + i + 1);
        let block = &pdf[start..block_end];
        let mut lines: Vec<&[u8]> = block.split_inclusive(|&b| b == b'\n').collect();
        let single_entries = lines.iter().all(|l| {
            let t = l.trim_ascii_start();
            t.starts_with(b"/") && !t.contains(&b'<')
        });
        if single_entries {
            lines.sort_unstable();
            let sorted: Vec<u8> = lines.concat();
            pdf[start..block_end].copy_from_slice(&sorted);
        }
        at = end;
    }
    pdf
}

/// The first position of `needle` in `hay` at or after `from`.
fn find(hay: &[u8], needle: &[u8], from: usize) -> Option<usize> {
    hay.get(from..)?
        .windows(needle.len())
        .position(|w| w == needle)
        .map(|i| from + i)
}

fn encode_png(rgb: &[u8], width_px: u32, height_px: u32, dpi: f64) -> Result<Vec<u8>, ExportError> {
    let png_error = |e: png::EncodingError| ExportError::Png(e.to_string());
    let mut bytes = Vec::new();
    let mut encoder = png::Encoder::new(&mut bytes, width_px, height_px);
    encoder.set_color(png::ColorType::Rgb);
    encoder.set_depth(png::BitDepth::Eight);
    let ppm = pixels_per_metre(dpi);
    encoder.set_pixel_dims(Some(png::PixelDimensions {
        xppu: ppm,
        yppu: ppm,
        unit: png::Unit::Meter,
    }));
    let mut writer = encoder.write_header().map_err(png_error)?;
    writer.write_image_data(rgb).map_err(png_error)?;
    writer.finish().map_err(png_error)?;
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn resource_entries_are_sorted_in_place() {
        let pdf = b"3 0 obj\n<<\n  /ExtGState <<\n    /gs2 8 0 R\n    /gs10 16 0 R\n  >>\n>>\nstream\n/ExtGState <<\n /b\n /a\n>>\nendstream\n".to_vec();
        let out = canonical_resource_order(pdf.clone());
        assert_eq!(out.len(), pdf.len());
        let text = String::from_utf8(out).unwrap();
        assert!(
            text.contains("    /gs10 16 0 R\n    /gs2 8 0 R\n  >>"),
            "{text}"
        );
        // Stream contents are never touched.
        assert!(
            text.contains("stream\n/ExtGState <<\n /b\n /a\n>>"),
            "{text}"
        );
    }
}
