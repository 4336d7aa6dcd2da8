//! Picture diffs: the changed pixels of a figure, marked over its new picture.
//!
//! The pictures are the figures' PNG files (decoded with the `png` crate); a figure built
//! without a PNG is drawn from its SVG at [`PREVIEW_DPI`]. Pictures of different sizes are
//! aligned at their top-left corner, and a pixel that only one side has counts as changed.
//! The changed-pixels picture shows the new picture faded to light grey, and every changed
//! pixel, widened by [`MARK_RADIUS`] pixels so that a one-pixel change stays visible,
//! painted vermillion (Okabe–Ito). [`preview`] makes a small copy (an average of each block
//! of pixels) for places with little room, such as a review comment.

use resvg::tiny_skia;

use crate::font;

/// The resolution at which a figure without a PNG is drawn from its SVG.
pub const PREVIEW_DPI: f32 = 300.0;

/// How far, in pixels, the mark of a changed pixel spreads.
pub const MARK_RADIUS: u32 = 2;

/// Vermillion of the Okabe–Ito palette.
const MARK: [u8; 3] = [213, 94, 0];

/// An 8-bit RGBA picture (not premultiplied).
#[derive(Debug, Clone, PartialEq)]
pub struct Image {
    pub width: u32,
    pub height: u32,
    rgba: Vec<u8>,
}

impl Image {
    fn pixel(&self, x: u32, y: u32) -> Option<[u8; 4]> {
        if x >= self.width || y >= self.height {
            return None;
        }
        let i = ((y * self.width + x) * 4) as usize;
        self.rgba.get(i..i + 4).map(|p| [p[0], p[1], p[2], p[3]])
    }
}

/// Decodes a PNG of any colour type into RGBA.
pub fn decode_png(bytes: &[u8]) -> Result<Image, String> {
    let mut decoder = png::Decoder::new(bytes);
    decoder.set_transformations(png::Transformations::EXPAND | png::Transformations::STRIP_16);
    let mut reader = decoder.read_info().map_err(|e| e.to_string())?;
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).map_err(|e| e.to_string())?;
    let pixels = &buf[..info.buffer_size()];
    let rgba: Vec<u8> = match info.color_type {
        png::ColorType::Rgba => pixels.to_vec(),
        png::ColorType::Rgb => pixels
            .chunks_exact(3)
            .flat_map(|p| [p[0], p[1], p[2], 255])
            .collect(),
        png::ColorType::GrayscaleAlpha => pixels
            .chunks_exact(2)
            .flat_map(|p| [p[0], p[0], p[0], p[1]])
            .collect(),
        png::ColorType::Grayscale => pixels.iter().flat_map(|&g| [g, g, g, 255]).collect(),
        png::ColorType::Indexed => return Err("an indexed PNG was not expanded".to_owned()),
    };
    Ok(Image {
        width: info.width,
        height: info.height,
        rgba,
    })
}

fn svg_options() -> usvg::Options<'static> {
    usvg::Options {
        font_family: font::FAMILY.to_string(),
        fontdb: font::fontdb(),
        ..usvg::Options::default()
    }
}

/// Draws an SVG on white at [`PREVIEW_DPI`].
pub fn rasterize_svg(svg: &[u8]) -> Result<Image, String> {
    let tree = usvg::Tree::from_data(svg, &svg_options()).map_err(|e| e.to_string())?;
    // usvg sizes are CSS pixels, 96 to the inch.
    let scale = PREVIEW_DPI / 96.0;
    let size = tree.size();
    let width = (size.width() * scale).ceil() as u32;
    let height = (size.height() * scale).ceil() as u32;
    let mut pixmap = new_pixmap(width, height)?;
    resvg::render(
        &tree,
        tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    Ok(from_pixmap(&pixmap))
}

/// The largest composed picture, in pixels (width × height).
const MAX_PIXELS: u64 = 200_000_000;

fn new_pixmap(width: u32, height: u32) -> Result<tiny_skia::Pixmap, String> {
    if u64::from(width) * u64::from(height) > MAX_PIXELS {
        return Err(format!(
            "a {width} x {height} picture is too large to compare"
        ));
    }
    let mut pixmap = tiny_skia::Pixmap::new(width.max(1), height.max(1))
        .ok_or_else(|| format!("cannot make a {width} x {height} picture"))?;
    pixmap.fill(tiny_skia::Color::WHITE);
    Ok(pixmap)
}

fn from_pixmap(pixmap: &tiny_skia::Pixmap) -> Image {
    let rgba = pixmap
        .pixels()
        .iter()
        .flat_map(|p| {
            let c = p.demultiply();
            [c.red(), c.green(), c.blue(), c.alpha()]
        })
        .collect();
    Image {
        width: pixmap.width(),
        height: pixmap.height(),
        rgba,
    }
}

/// Which pixels differ (over the larger of the two sizes), widened by [`MARK_RADIUS`].
/// Returns the mask and how many pixels differ before widening.
fn changed_mask(before: &Image, after: &Image, width: u32, height: u32) -> (Vec<bool>, usize) {
    let mut raw = vec![false; (width * height) as usize];
    let mut count = 0;
    for y in 0..height {
        for x in 0..width {
            if before.pixel(x, y) != after.pixel(x, y) {
                raw[(y * width + x) as usize] = true;
                count += 1;
            }
        }
    }
    (widen(&raw, width, height, MARK_RADIUS), count)
}

/// A square dilation of a mask, done as a horizontal then a vertical pass.
fn widen(mask: &[bool], width: u32, height: u32, radius: u32) -> Vec<bool> {
    let (w, h, r) = (width as usize, height as usize, radius as usize);
    let mut rows = vec![false; mask.len()];
    for y in 0..h {
        for x in 0..w {
            let (lo, hi) = (x.saturating_sub(r), (x + r).min(w - 1));
            rows[y * w + x] = mask[y * w + lo..=y * w + hi].iter().any(|&m| m);
        }
    }
    let mut out = vec![false; mask.len()];
    for y in 0..h {
        for x in 0..w {
            let (lo, hi) = (y.saturating_sub(r), (y + r).min(h - 1));
            out[y * w + x] = (lo..=hi).any(|yy| rows[yy * w + x]);
        }
    }
    out
}

/// A pixel faded to light grey (a quarter of its darkness), for context under the marks.
fn faded(p: [u8; 4]) -> [u8; 4] {
    let lum = (u32::from(p[0]) * 299 + u32::from(p[1]) * 587 + u32::from(p[2]) * 114) / 1000;
    let darkness = (255 - lum) * u32::from(p[3]) / 255;
    let v = (255 - darkness / 4) as u8;
    [v, v, v, 255]
}

/// The third panel: changed pixels marked over the faded new picture.
fn highlight(before: &Image, after: &Image) -> (Image, usize) {
    let width = before.width.max(after.width);
    let height = before.height.max(after.height);
    let (mask, count) = changed_mask(before, after, width, height);
    let mut rgba = Vec::with_capacity((width * height * 4) as usize);
    for y in 0..height {
        for x in 0..width {
            let p = if mask[(y * width + x) as usize] {
                [MARK[0], MARK[1], MARK[2], 255]
            } else {
                let base = after.pixel(x, y).or_else(|| before.pixel(x, y));
                base.map_or([255; 4], faded)
            };
            rgba.extend_from_slice(&p);
        }
    }
    (
        Image {
            width,
            height,
            rgba,
        },
        count,
    )
}

/// The changed-pixels picture and how many pixels changed.
pub struct Changes {
    pub picture: Image,
    pub changed_pixels: usize,
    /// Pixels in the compared area (the larger of the two sizes).
    pub compared_pixels: usize,
}

/// Compares two pictures.
pub fn changes(before: &Image, after: &Image) -> Changes {
    let (picture, changed_pixels) = highlight(before, after);
    let compared_pixels = (picture.width * picture.height) as usize;
    Changes {
        picture,
        changed_pixels,
        compared_pixels,
    }
}

/// A copy of `img` at most `max_width` pixels wide: each block of k × k pixels (k the
/// smallest whole factor that fits) becomes their average; unchanged when it already fits.
pub fn preview(img: &Image, max_width: u32) -> Image {
    let k = img.width.div_ceil(max_width.max(1)).max(1);
    if k == 1 {
        return img.clone();
    }
    let (width, height) = (img.width.div_ceil(k), img.height.div_ceil(k));
    let mut rgba = Vec::with_capacity((width * height * 4) as usize);
    for by in 0..height {
        for bx in 0..width {
            let mut sum = [0u32; 4];
            let mut n = 0;
            for y in by * k..((by + 1) * k).min(img.height) {
                for x in bx * k..((bx + 1) * k).min(img.width) {
                    if let Some(p) = img.pixel(x, y) {
                        for (s, v) in sum.iter_mut().zip(p) {
                            *s += u32::from(v);
                        }
                        n += 1;
                    }
                }
            }
            rgba.extend(sum.map(|s| (s / n.max(1)) as u8));
        }
    }
    Image {
        width,
        height,
        rgba,
    }
}

/// Encodes an opaque picture as an 8-bit RGB PNG.
pub fn encode(img: &Image) -> Result<Vec<u8>, String> {
    let rgb: Vec<u8> = img
        .rgba
        .chunks_exact(4)
        .flat_map(|p| [p[0], p[1], p[2]])
        .collect();
    let mut bytes = Vec::new();
    let mut encoder = png::Encoder::new(&mut bytes, img.width, img.height);
    encoder.set_color(png::ColorType::Rgb);
    encoder.set_depth(png::BitDepth::Eight);
    let mut writer = encoder.write_header().map_err(|e| e.to_string())?;
    writer.write_image_data(&rgb).map_err(|e| e.to_string())?;
    writer.finish().map_err(|e| e.to_string())?;
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn solid(width: u32, height: u32, rgb: [u8; 3]) -> Image {
        Image {
            width,
            height,
            rgba: (0..width * height)
                .flat_map(|_| [rgb[0], rgb[1], rgb[2], 255])
                .collect(),
        }
    }

    #[test]
    fn one_changed_pixel_is_marked_and_widened() {
        let before = solid(20, 10, [255, 255, 255]);
        let mut after = before.clone();
        let i = ((5 * 20 + 10) * 4) as usize;
        after.rgba[i..i + 3].copy_from_slice(&[0, 0, 0]);
        let (marks, count) = highlight(&before, &after);
        assert_eq!(count, 1);
        assert_eq!(marks.pixel(10, 5), Some([213, 94, 0, 255]));
        assert_eq!(marks.pixel(12, 7), Some([213, 94, 0, 255]));
        assert_eq!(marks.pixel(13, 5), Some([255, 255, 255, 255]));
    }

    #[test]
    fn a_wider_picture_changes_its_extra_columns_and_reads_back() {
        let before = solid(30, 20, [0, 114, 178]);
        let after = solid(40, 20, [0, 114, 178]);
        let c = changes(&before, &after);
        // The extra 10 columns of the wider picture are the only change.
        assert_eq!(c.changed_pixels, 10 * 20);
        assert_eq!(c.compared_pixels, 40 * 20);
        let back = decode_png(&encode(&c.picture).unwrap()).unwrap();
        assert_eq!((back.width, back.height), (40, 20));
        assert_eq!(back.pixel(35, 5), Some([213, 94, 0, 255]));
    }

    #[test]
    fn a_preview_averages_blocks_of_pixels() {
        let mut img = solid(4, 2, [255, 255, 255]);
        // One black pixel in the first 2 x 2 block: its average is three quarters white.
        img.rgba[0..3].copy_from_slice(&[0, 0, 0]);
        let small = preview(&img, 2);
        assert_eq!((small.width, small.height), (2, 1));
        assert_eq!(small.pixel(0, 0), Some([191, 191, 191, 255]));
        assert_eq!(small.pixel(1, 0), Some([255, 255, 255, 255]));
        assert_eq!(preview(&img, 10), img);
    }
}
