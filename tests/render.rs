//! Back end checks: scene → SVG text → outlined SVG, PNG and PDF.
//!
//! Unit facts used below: 1 in = 25.4 mm = 72 pt (common practice); the PNG `pHYs` chunk
//! stores pixels per metre (PNG specification, W3C, section 11.3.5.3; section number from
//! memory).

mod common;

use std::path::Path;

use figura::export::{self, ExportError};
use figura::font::{self, TextExtent};
use figura::scene::{
    Colour, Fill, Mark, PathSegment, Point, Rect, Scene, Stroke, TextAlign, TextBaseline, TextMark,
    TextRotation, TextStyle, Weight,
};
use figura::svg;

fn style(size_pt: f64, weight: Weight) -> TextStyle {
    TextStyle {
        size_pt,
        weight,
        colour: Colour::BLACK,
    }
}

fn text_mark(at: Point, text: &str, style: TextStyle) -> TextMark {
    TextMark {
        at,
        text: text.to_string(),
        style,
        align: TextAlign::Start,
        baseline: TextBaseline::Alphabetic,
        rotation: TextRotation::Horizontal,
    }
}

/// A small figure using every kind of mark.
fn sample_scene() -> Scene {
    let mut scene = Scene::new(85.0, 65.0);
    scene.title = Some("Reading speed by medium".to_string());
    scene.description = Some("Means with 95% confidence intervals.".to_string());
    scene.marks = vec![
        Mark::Rect {
            x: 12.0,
            y: 5.0,
            width: 70.0,
            height: 45.0,
            fill: None,
            stroke: Some(Stroke::solid(Colour::GREY, 0.25)),
        },
        Mark::Clip {
            rect: Rect::new(12.0, 5.0, 70.0, 45.0),
            marks: vec![
                Mark::Rect {
                    x: 20.0,
                    y: 20.0,
                    width: 15.0,
                    height: 30.0,
                    fill: Some(Fill {
                        colour: Colour::from_hex(0x0072B2),
                        opacity: 0.8,
                    }),
                    stroke: None,
                },
                Mark::Line {
                    points: vec![Point::new(45.0, 40.0), Point::new(60.0, 15.5)],
                    stroke: Stroke {
                        dash: Some(vec![1.0, 0.5]),
                        ..Stroke::solid(Colour::from_hex(0xE69F00), 0.5)
                    },
                },
                Mark::Circle {
                    centre: Point::new(70.0, 30.0),
                    radius: 1.2,
                    fill: Some(Fill::solid(Colour::BLACK)),
                    stroke: None,
                },
                Mark::Polygon {
                    points: vec![
                        Point::new(40.0, 45.0),
                        Point::new(44.0, 45.0),
                        Point::new(42.0, 41.0),
                    ],
                    fill: Some(Fill::solid(Colour::from_hex(0x009E73))),
                    stroke: None,
                },
                Mark::Path {
                    segments: vec![
                        PathSegment::MoveTo(Point::new(15.0, 10.0)),
                        PathSegment::CubicTo {
                            c1: Point::new(20.0, 5.0),
                            c2: Point::new(25.0, 15.0),
                            to: Point::new(30.0, 10.0),
                        },
                        PathSegment::LineTo(Point::new(30.0, 12.0)),
                        PathSegment::Close,
                    ],
                    fill: None,
                    stroke: Some(Stroke::solid(Colour::from_hex(0xD55E00), 0.3)),
                },
            ],
        },
        Mark::Text(TextMark {
            align: TextAlign::Middle,
            baseline: TextBaseline::Top,
            ..text_mark(
                Point::new(47.0, 52.0),
                "Medium",
                style(8.0, Weight::Regular),
            )
        }),
        Mark::Text(TextMark {
            align: TextAlign::Middle,
            rotation: TextRotation::Up,
            ..text_mark(
                Point::new(5.0, 27.5),
                "Words per minute",
                style(8.0, Weight::Regular),
            )
        }),
        Mark::Text(TextMark {
            align: TextAlign::End,
            baseline: TextBaseline::Middle,
            ..text_mark(Point::new(11.0, 20.0), "250", style(7.0, Weight::Bold))
        }),
    ];
    scene
}

fn text_only_scene(text: &str) -> Scene {
    let mut scene = Scene::new(40.0, 10.0);
    scene.marks = vec![Mark::Text(text_mark(
        Point::new(2.0, 7.0),
        text,
        style(10.0, Weight::Regular),
    ))];
    scene
}

fn decode_png(bytes: &[u8]) -> (png::OutputInfo, Option<png::PixelDimensions>, Vec<u8>) {
    let decoder = png::Decoder::new(bytes);
    let mut reader = decoder.read_info().expect("PNG header");
    let dims = reader.info().pixel_dims;
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).expect("PNG data");
    buf.truncate(info.buffer_size());
    (info, dims, buf)
}

/// RGB of pixel (x, y) in an 8-bit RGB buffer.
fn pixel(info: &png::OutputInfo, rgb: &[u8], x: u32, y: u32) -> [u8; 3] {
    assert_eq!(info.color_type, png::ColorType::Rgb);
    let i = (y as usize * info.width as usize + x as usize) * 3;
    [rgb[i], rgb[i + 1], rgb[i + 2]]
}

/// Parses with the bundled font; `dpi` sets how many user units an inch is (96 is the CSS
/// default; 25.4 makes one user unit a millimetre).
fn parse_at_dpi(svg_text: &str, dpi: f32) -> usvg::Tree {
    let options = usvg::Options {
        font_family: font::FAMILY.to_string(),
        fontdb: font::fontdb(),
        dpi,
        ..usvg::Options::default()
    };
    usvg::Tree::from_str(svg_text, &options).expect("valid SVG")
}

fn parse_with_bundled_font(svg_text: &str) -> usvg::Tree {
    parse_at_dpi(svg_text, 96.0)
}

fn first_text_node(group: &usvg::Group) -> Option<&usvg::Text> {
    group.children().iter().find_map(|node| match node {
        usvg::Node::Text(text) => Some(text.as_ref()),
        usvg::Node::Group(g) => first_text_node(g),
        _ => None,
    })
}

// ---------------------------------------------------------------- text survives the font trip

#[test]
fn outlined_svg_has_paths_where_text_was() {
    let rendered = export::render(&text_only_scene("Reaction time (ms)")).unwrap();
    let svg_text = rendered.svg();
    assert!(!svg_text.contains("<text"), "text must be outlined");
    let path_data: Vec<&str> = svg_text
        .split(" d=\"")
        .skip(1)
        .filter_map(|rest| rest.split('"').next())
        .collect();
    assert!(!path_data.is_empty(), "no path where the text was");
    assert!(path_data.iter().all(|d| d.len() > 10), "empty glyph paths");
}

#[test]
fn text_only_scene_draws_dark_pixels() {
    let rendered = export::render(&text_only_scene("Reaction time (ms)")).unwrap();
    let (info, _, rgb) = decode_png(&rendered.png(300.0).unwrap());
    let dark = rgb.chunks(3).filter(|p| p.iter().all(|&c| c < 128)).count();
    let total = (info.width * info.height) as usize;
    // Black 10 pt glyphs cover a few per cent of this 40 mm × 10 mm box.
    assert!(dark > total / 100, "only {dark} dark pixels of {total}");
    assert!(
        dark < total / 2,
        "{dark} dark pixels of {total}: not text-like"
    );
}

// ------------------------------------------------------------------- measure() against usvg

/// usvg's own box, in millimetres, for a text mark written by the SVG writer.
fn usvg_text_box(mark: TextMark) -> usvg::Rect {
    let mut scene = Scene::new(200.0, 200.0);
    scene.marks = vec![Mark::Text(mark)];
    let tree = parse_at_dpi(&svg::to_svg(&scene).unwrap(), 25.4);
    first_text_node(tree.root())
        .expect("the text survived parsing")
        .abs_bounding_box()
}

fn assert_close(actual: f64, expected: f64, what: &str) {
    // 1 µm: far below a pixel at 1200 dpi (21 µm).
    assert!(
        (actual - expected).abs() < 1e-3,
        "{what}: {actual} vs expected {expected}"
    );
}

#[test]
fn measure_matches_the_renderers_text_box() {
    let cases = [
        ("Words per minute", style(8.0, Weight::Regular)),
        ("AVATAR Wo To", style(9.0, Weight::Regular)),
        ("Reaction time (ms)", style(10.5, Weight::Bold)),
        ("µ ± 1.96 × SE – 95 %", style(7.0, Weight::Regular)),
        ("0.25", style(6.0, Weight::Bold)),
    ];
    for (text, style) in cases {
        let extent: TextExtent = font::measure(text, &style);
        let at = Point::new(30.0, 50.0);
        let bbox = usvg_text_box(text_mark(at, text, style));
        assert_close(f64::from(bbox.width()), extent.width_mm, text);
        assert_close(f64::from(bbox.height()), extent.height_mm(), text);
        assert_close(f64::from(bbox.left()), at.x, text);
        assert_close(f64::from(bbox.top()), at.y - extent.ascent_mm, text);
    }
}

#[test]
fn measure_includes_kerning() {
    // "AV" is a kerned pair in the bundled font: the pair is narrower than its letters apart.
    let s = style(10.0, Weight::Regular);
    let pair = font::measure("AV", &s).width_mm;
    let apart = font::measure("A", &s).width_mm + font::measure("V", &s).width_mm;
    assert!(pair < apart - 0.01, "pair {pair} vs apart {apart}");
}

#[test]
fn alignment_and_baseline_place_the_box_where_measure_says() {
    let s = style(8.0, Weight::Regular);
    let text = "Medium";
    let e = font::measure(text, &s);
    let at = Point::new(100.0, 60.0);

    let mid_top = usvg_text_box(TextMark {
        align: TextAlign::Middle,
        baseline: TextBaseline::Top,
        ..text_mark(at, text, s)
    });
    assert_close(
        f64::from(mid_top.left()),
        at.x - e.width_mm / 2.0,
        "middle left",
    );
    assert_close(f64::from(mid_top.top()), at.y, "top");

    let end_middle = usvg_text_box(TextMark {
        align: TextAlign::End,
        baseline: TextBaseline::Middle,
        ..text_mark(at, text, s)
    });
    assert_close(f64::from(end_middle.right()), at.x, "end right");
    let baseline = at.y + e.cap_height_mm / 2.0;
    assert_close(
        f64::from(end_middle.top()),
        baseline - e.ascent_mm,
        "middle top",
    );

    // Turned up: the box is as wide as the text is high, and centred on the anchor along y.
    let up = usvg_text_box(TextMark {
        align: TextAlign::Middle,
        baseline: TextBaseline::Top,
        rotation: TextRotation::Up,
        ..text_mark(at, text, s)
    });
    assert_close(f64::from(up.width()), e.height_mm(), "turned width");
    assert_close(f64::from(up.height()), e.width_mm, "turned height");
    assert_close(
        f64::from(up.left()),
        at.x,
        "turned: ascent line on the anchor",
    );
    assert_close(f64::from(up.top()), at.y - e.width_mm / 2.0, "turned top");
}

// ---------------------------------------------------------------------------- PNG size, dpi

#[test]
fn png_pixel_size_and_recorded_dpi() {
    // Expected sizes worked by hand: px = round(mm / 25.4 × dpi).
    //   85 mm at 300 dpi = 1003.94 → 1004; 65 mm → 767.72 → 768.
    //   50.8 mm (2 in) at 100 dpi = 200; 25.4 mm (1 in) → 100.
    //   170 mm at 600 dpi = 4015.75 → 4016; 75 mm → 1771.65 → 1772.
    //   85 mm at 72 dpi = 240.94 → 241; 65 mm → 184.25 → 184.
    // Pixels per metre = round(dpi / 0.0254): 300 → 11811, 100 → 3937, 600 → 23622, 72 → 2835.
    let cases = [
        (85.0, 65.0, 300.0, 1004, 768, 11811),
        (50.8, 25.4, 100.0, 200, 100, 3937),
        (170.0, 75.0, 600.0, 4016, 1772, 23622),
        (85.0, 65.0, 72.0, 241, 184, 2835),
    ];
    for (w_mm, h_mm, dpi, w_px, h_px, ppm) in cases {
        let mut scene = Scene::new(w_mm, h_mm);
        scene.marks.push(Mark::Rect {
            x: 0.0,
            y: 0.0,
            width: w_mm / 2.0,
            height: h_mm,
            fill: Some(Fill::solid(Colour::BLACK)),
            stroke: None,
        });
        let (info, dims, rgb) = decode_png(&export::render(&scene).unwrap().png(dpi).unwrap());
        assert_eq!(
            (info.width, info.height),
            (w_px, h_px),
            "{w_mm}x{h_mm} at {dpi}"
        );
        let dims = dims.expect("pHYs chunk");
        assert_eq!((dims.xppu, dims.yppu), (ppm, ppm));
        assert_eq!(dims.unit, png::Unit::Meter);
        // Left half black, right half the opaque white background.
        assert_eq!(pixel(&info, &rgb, 0, 0), [0, 0, 0]);
        assert_eq!(pixel(&info, &rgb, w_px - 1, h_px - 1), [255, 255, 255]);
    }
}

#[test]
fn png_draws_colours_and_honours_clips() {
    let orange = Colour::from_hex(0xE69F00);
    let mut scene = Scene::new(20.0, 20.0);
    scene.marks.push(Mark::Clip {
        rect: Rect::new(0.0, 0.0, 10.0, 20.0),
        marks: vec![Mark::Circle {
            centre: Point::new(10.0, 10.0),
            radius: 8.0,
            fill: Some(Fill::solid(orange)),
            stroke: None,
        }],
    });
    // 20 mm at 254 dpi = 200 px, 10 px per mm.
    let (info, _, rgb) = decode_png(&export::render(&scene).unwrap().png(254.0).unwrap());
    assert_eq!(
        pixel(&info, &rgb, 60, 100),
        [0xE6, 0x9F, 0x00],
        "inside the clip"
    );
    assert_eq!(
        pixel(&info, &rgb, 140, 100),
        [255, 255, 255],
        "clipped away"
    );
}

#[test]
fn png_rejects_bad_dpi() {
    let rendered = export::render(&sample_scene()).unwrap();
    for dpi in [0.0, -300.0, f64::NAN, f64::INFINITY] {
        assert!(matches!(rendered.png(dpi), Err(ExportError::BadDpi { .. })));
    }
    assert!(matches!(
        rendered.png(0.1),
        Err(ExportError::ImageTooSmall { .. })
    ));
    assert!(matches!(
        rendered.png(100_000.0),
        Err(ExportError::ImageTooLarge { .. })
    ));
}

// ------------------------------------------------------------------------------------- PDF

fn media_box(pdf: &[u8]) -> [f64; 4] {
    let text = String::from_utf8_lossy(pdf);
    let start = text.find("/MediaBox [").expect("a MediaBox") + "/MediaBox [".len();
    let end = start + text[start..].find(']').expect("MediaBox end");
    let numbers: Vec<f64> = text[start..end]
        .split_whitespace()
        .map(|n| n.parse().expect("a number"))
        .collect();
    numbers.try_into().expect("four numbers")
}

#[test]
fn pdf_page_is_the_figure_size_in_points() {
    // 85 mm = 85 / 25.4 × 72 = 240.945 pt; 65 mm = 184.252 pt; 170 mm = 481.890 pt.
    for (w_mm, h_mm, w_pt, h_pt) in [
        (85.0, 65.0, 240.945, 184.252),
        (170.0, 75.0, 481.890, 212.598),
    ] {
        let mut scene = sample_scene();
        scene.width_mm = w_mm;
        scene.height_mm = h_mm;
        let pdf = export::render(&scene).unwrap().pdf().unwrap();
        assert!(pdf.starts_with(b"%PDF-"));
        let [x0, y0, x1, y1] = media_box(&pdf);
        assert_eq!((x0, y0), (0.0, 0.0));
        assert!((x1 - w_pt).abs() < 0.01, "width {x1} pt");
        assert!((y1 - h_pt).abs() < 0.01, "height {y1} pt");
    }
}

// ------------------------------------------------------------------------------ determinism

#[test]
fn output_is_byte_identical_across_renders_and_threads() {
    let scene = sample_scene();
    let once = |scene: &Scene| {
        let r = export::render(scene).unwrap();
        (r.svg().to_string(), r.png(150.0).unwrap(), r.pdf().unwrap())
    };
    let first = once(&scene);
    assert_eq!(first, once(&scene));
    let from_threads: Vec<_> = std::thread::scope(|s| {
        let handles: Vec<_> = (0..4).map(|_| s.spawn(|| once(&scene))).collect();
        handles.into_iter().map(|h| h.join().unwrap()).collect()
    });
    for result in from_threads {
        assert_eq!(first, result);
    }
}

// --------------------------------------------------------------------- the SVG file itself

#[test]
fn svg_file_keeps_size_viewbox_title_and_desc() {
    let rendered = export::render(&sample_scene()).unwrap();
    let svg_text = rendered.svg();
    assert!(svg_text.starts_with(
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="85mm" height="65mm" viewBox="0 0 85 65">"#
    ));
    assert!(svg_text.contains("<title>Reading speed by medium</title>"));
    assert!(svg_text.contains("<desc>Means with 95% confidence intervals.</desc>"));
    // It reads back as the same physical size (96 px per inch is the CSS pixel).
    let tree = parse_with_bundled_font(svg_text);
    assert!((f64::from(tree.size().width()) - 85.0 / 25.4 * 96.0).abs() < 1e-3);
    assert!((f64::from(tree.size().height()) - 65.0 / 25.4 * 96.0).abs() < 1e-3);
}

#[test]
fn svg_file_draws_the_same_picture_as_the_png() {
    // Rendering the written SVG file again must give the PNG we wrote (the three agree).
    let dpi = 200.0;
    let rendered = export::render(&sample_scene()).unwrap();
    let (info, _, ours) = decode_png(&rendered.png(dpi).unwrap());
    let tree = parse_with_bundled_font(rendered.svg());
    let mut pixmap = resvg::tiny_skia::Pixmap::new(info.width, info.height).unwrap();
    pixmap.fill(resvg::tiny_skia::Color::WHITE);
    let scale = (dpi / 96.0) as f32;
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    let again: Vec<u8> = pixmap
        .pixels()
        .iter()
        .flat_map(|p| {
            let c = p.demultiply();
            [c.red(), c.green(), c.blue()]
        })
        .collect();
    let differing = ours
        .chunks(3)
        .zip(again.chunks(3))
        .filter(|(a, b)| a.iter().zip(b.iter()).any(|(x, y)| x.abs_diff(*y) > 8))
        .count();
    // Only anti-aliased edge pixels may differ by rounding of the scale factor.
    assert!(
        differing * 1000 < ours.len() / 3,
        "{differing} pixels differ"
    );
}

#[test]
fn titles_and_text_are_xml_escaped() {
    let mut scene = text_only_scene("a < b & c > \"d\"");
    scene.title = Some("Speed <fast> & \"slow\" 'x'".to_string());
    scene.description = Some("R&D\nline two".to_string());
    let text_svg = svg::to_svg(&scene).unwrap();
    assert!(
        text_svg.contains("<title>Speed &lt;fast&gt; &amp; &quot;slow&quot; &apos;x&apos;</title>")
    );
    assert!(text_svg.contains("<desc>R&amp;D line two</desc>"));
    assert!(text_svg.contains(">a &lt; b &amp; c &gt; &quot;d&quot;</text>"));
    let rendered = export::render(&scene).unwrap();
    assert!(rendered
        .svg()
        .contains("<title>Speed &lt;fast&gt; &amp; &quot;slow&quot; &apos;x&apos;</title>"));
    // The file is well-formed XML that reads back.
    parse_with_bundled_font(rendered.svg());
}

#[test]
fn numbers_are_rounded_and_negative_zero_is_normalised() {
    let mut scene = Scene::new(10.0, 10.0);
    scene.marks.push(Mark::Rect {
        x: -0.0001,
        y: 1.23456,
        width: 2.5,
        height: 3.0,
        fill: Some(Fill::solid(Colour::BLACK)),
        stroke: None,
    });
    let text_svg = svg::to_svg(&scene).unwrap();
    assert!(
        text_svg.contains(r##"<rect x="0" y="1.235" width="2.5" height="3" fill="#000000"/>"##),
        "{text_svg}"
    );
}

#[test]
fn malformed_scenes_are_refused() {
    let mut scene = sample_scene();
    scene.marks.push(Mark::Circle {
        centre: Point::new(f64::INFINITY, 0.0),
        radius: 1.0,
        fill: None,
        stroke: None,
    });
    assert!(matches!(export::render(&scene), Err(ExportError::Scene(_))));
    assert!(matches!(
        export::render(&Scene::new(f64::NAN, 10.0)),
        Err(ExportError::Scene(_))
    ));
}

#[test]
fn empty_scene_renders_a_white_page() {
    let rendered = export::render(&Scene::new(10.0, 5.0)).unwrap();
    let (info, _, rgb) = decode_png(&rendered.png(254.0).unwrap());
    assert_eq!((info.width, info.height), (100, 50));
    assert!(rgb.iter().all(|&c| c == 255));
    parse_with_bundled_font(rendered.svg());
}

#[test]
fn rendered_figures_can_move_between_threads() {
    fn send_and_share<T: Send + Sync>() {}
    send_and_share::<export::Rendered>();
}

// ----------------------------------------------------------------------------------- golden

#[test]
fn small_scene_svg_matches_golden_file() {
    let path = Path::new(concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/tests/render/small_scene.svg"
    ));
    let actual = svg::to_svg(&sample_scene()).unwrap();
    common::expect_file(path, &actual);
}
