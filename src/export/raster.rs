//! The drawing as pixels: rasterised once per file by resvg, encoded as PNG or TIFF.
//!
//! Both formats get the same pixels (8-bit RGB on opaque white), the resolution in their own
//! way (PNG `pHYs` in pixels per metre, TIFF resolution tags in pixels per inch) and the
//! file's title, description and provenance as text.

use std::io::Cursor;

use resvg::tiny_skia;
use tiff::encoder::{colortype, Compression, Predictor, Rational, TiffEncoder};
use tiff::tags::{ResolutionUnit, Tag};
use usvg::Tree;

use super::{About, ExportError};
use crate::scene::MM_PER_INCH;

/// The largest raster image, in pixels (width × height), that [`draw`] will make
/// (about 400 MB of memory while drawing).
pub const MAX_PNG_PIXELS: u64 = 100_000_000;

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

/// An 8-bit RGB picture and the resolution it was drawn at.
pub(super) struct Image {
    width: u32,
    height: u32,
    dpi: f64,
    rgb: Vec<u8>,
}

/// Draws `tree` (in millimetre user units) on white at `dpi`.
pub(super) fn draw(
    tree: &Tree,
    width_mm: f64,
    height_mm: f64,
    dpi: f64,
) -> Result<Image, ExportError> {
    let (width, height) = png_pixel_size(width_mm, height_mm, dpi)?;
    let mut pixmap = tiny_skia::Pixmap::new(width, height).ok_or(ExportError::ImageTooLarge {
        width_px: u64::from(width),
        height_px: u64::from(height),
    })?;
    pixmap.fill(tiny_skia::Color::WHITE);
    let scale = (dpi / MM_PER_INCH) as f32;
    resvg::render(
        tree,
        tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    // The background is opaque, so every pixel is too: demultiplying changes nothing, but
    // keeps the colours right should that ever change.
    let rgb = pixmap
        .pixels()
        .iter()
        .flat_map(|p| {
            let c = p.demultiply();
            [c.red(), c.green(), c.blue()]
        })
        .collect();
    Ok(Image {
        width,
        height,
        dpi,
        rgb,
    })
}

/// Keyword and text of each PNG text chunk, in a fixed order (keywords from the PNG
/// specification's list of predefined keywords).
fn png_texts(about: &About) -> Vec<(&'static str, String)> {
    let mut texts = Vec::new();
    if let Some(title) = about.title {
        texts.push(("Title", title.to_string()));
    }
    if let Some(description) = about.description {
        texts.push(("Description", description.to_string()));
    }
    if let Some(p) = about.provenance {
        texts.push(("Software", p.tool.clone()));
        texts.push(("Comment", p.sentence()));
    }
    texts
}

/// Whether every character fits the Latin-1 text of a `tEXt` chunk (printable, no controls).
fn is_latin1(text: &str) -> bool {
    text.chars()
        .all(|c| matches!(u32::from(c), 0x20..=0x7e | 0xa1..=0xff))
}

pub(super) fn encode_png(image: &Image, about: &About) -> Result<Vec<u8>, ExportError> {
    let png_error = |e: png::EncodingError| ExportError::Png(e.to_string());
    let mut bytes = Vec::new();
    let mut encoder = png::Encoder::new(&mut bytes, image.width, image.height);
    encoder.set_color(png::ColorType::Rgb);
    encoder.set_depth(png::BitDepth::Eight);
    let ppm = pixels_per_metre(image.dpi);
    encoder.set_pixel_dims(Some(png::PixelDimensions {
        xppu: ppm,
        yppu: ppm,
        unit: png::Unit::Meter,
    }));
    for (keyword, text) in png_texts(about) {
        // tEXt holds Latin-1 only; other text goes in an (uncompressed) UTF-8 iTXt chunk.
        if is_latin1(&text) {
            encoder.add_text_chunk(keyword.to_string(), text)
        } else {
            encoder.add_itxt_chunk(keyword.to_string(), text)
        }
        .map_err(png_error)?;
    }
    let mut writer = encoder.write_header().map_err(png_error)?;
    writer.write_image_data(&image.rgb).map_err(png_error)?;
    writer.finish().map_err(png_error)?;
    Ok(bytes)
}

/// Replaces every character outside printable ASCII (TIFF text is 7-bit) with `?`.
fn ascii(text: &str) -> String {
    text.chars()
        .map(|c| if matches!(c, ' '..='~') { c } else { '?' })
        .collect()
}

/// The resolution as a TIFF rational in pixels per inch, exact to 1/100 dpi.
fn dpi_rational(dpi: f64) -> Rational {
    Rational {
        n: (dpi * 100.0).round() as u32,
        d: 100,
    }
}

pub(super) fn encode_tiff(image: &Image, about: &About) -> Result<Vec<u8>, ExportError> {
    let tiff_error = |e: tiff::TiffError| ExportError::Tiff(e.to_string());
    let mut out = Cursor::new(Vec::new());
    {
        let mut encoder = TiffEncoder::new(&mut out)
            .map_err(tiff_error)?
            .with_compression(Compression::Lzw)
            .with_predictor(Predictor::Horizontal);
        let mut tiff = encoder
            .new_image::<colortype::RGB8>(image.width, image.height)
            .map_err(tiff_error)?;
        tiff.resolution(ResolutionUnit::Inch, dpi_rational(image.dpi));
        let mut description: Vec<String> = [about.title, about.description]
            .into_iter()
            .flatten()
            .map(ascii)
            .collect();
        if let Some(p) = about.provenance {
            description.push(p.sentence());
            tiff.encoder()
                .write_tag(Tag::Software, ascii(&p.tool).as_str())
                .map_err(tiff_error)?;
        }
        if !description.is_empty() {
            tiff.encoder()
                .write_tag(Tag::ImageDescription, description.join("\n").as_str())
                .map_err(tiff_error)?;
        }
        tiff.write_data(&image.rgb).map_err(tiff_error)?;
    }
    Ok(out.into_inner())
}
