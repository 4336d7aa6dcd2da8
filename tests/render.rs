//! Back end checks: scene → SVG (editable or outlined text), PNG, TIFF and PDF.
//!
//! Unit facts used below: 1 in = 25.4 mm = 72 pt (common practice); the PNG `pHYs` chunk
//! stores pixels per metre (PNG specification, W3C, section 11.3.5.3; section number from
//! memory).

mod common;

use std::path::Path;

use figura::export::{self, ExportError, Provenance};
use figura::font::{self, TextExtent};
use figura::scene::{
    Colour, Fill, Mark, PathSegment, Point, Rect, Scene, Stroke, TextAlign, TextBaseline, TextForm,
    TextMark, TextRotation, TextStyle, Weight,
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
    let scene = text_only_scene("Reaction time (ms)");
    let rendered = export::render(&scene).unwrap();
    let svg_text = rendered.svg(TextForm::Outlined).unwrap();
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
    let scene = text_only_scene("Reaction time (ms)");
    let rendered = export::render(&scene).unwrap();
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
    let scene = sample_scene();
    let rendered = export::render(&scene).unwrap();
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
        let pdf = export::render(&scene)
            .unwrap()
            .pdf(TextForm::Editable)
            .unwrap();
        assert!(pdf.starts_with(b"%PDF-"));
        let [x0, y0, x1, y1] = media_box(&pdf);
        assert_eq!((x0, y0), (0.0, 0.0));
        assert!((x1 - w_pt).abs() < 0.01, "width {x1} pt");
        assert!((y1 - h_pt).abs() < 0.01, "height {y1} pt");
    }
}

// ------------------------------------------------------------------------------ determinism

/// Every file of a scene, in every form.
fn all_files(scene: &Scene) -> Vec<Vec<u8>> {
    let r = export::render(scene).unwrap().with_provenance(provenance());
    vec![
        r.svg(TextForm::Editable).unwrap().into_bytes(),
        r.svg(TextForm::Outlined).unwrap().into_bytes(),
        r.png(150.0).unwrap(),
        r.tiff(150.0).unwrap(),
        r.pdf(TextForm::Editable).unwrap(),
        r.pdf(TextForm::Outlined).unwrap(),
    ]
}

#[test]
fn output_is_byte_identical_across_renders_and_threads() {
    // The sample scene has regular and bold text, so its PDF embeds two fonts: the PDF writer
    // keeps them in a hash map whose order differs between maps, so twenty renders would all
    // but surely show a difference that was not removed (1 in 2^19 to miss it).
    let scene = sample_scene();
    let first = all_files(&scene);
    for _ in 0..20 {
        assert!(first == all_files(&scene), "a render gave other bytes");
    }
    let from_threads: Vec<_> = std::thread::scope(|s| {
        let handles: Vec<_> = (0..4).map(|_| s.spawn(|| all_files(&scene))).collect();
        handles.into_iter().map(|h| h.join().unwrap()).collect()
    });
    for result in from_threads {
        assert!(
            first == result,
            "a render on another thread gave other bytes"
        );
    }
}

// --------------------------------------------------------------------- the SVG file itself

fn provenance() -> Provenance {
    Provenance {
        tool: "figura 9.9.9".to_string(),
        spec: "ab".repeat(32),
        data: "cd".repeat(32),
    }
}

#[test]
fn svg_file_keeps_size_viewbox_title_desc_and_provenance() {
    let scene = sample_scene();
    let rendered = export::render(&scene)
        .unwrap()
        .with_provenance(provenance());
    for form in [TextForm::Editable, TextForm::Outlined] {
        let svg_text = rendered.svg(form).unwrap();
        assert!(svg_text.starts_with(
            r#"<svg xmlns="http://www.w3.org/2000/svg" width="85mm" height="65mm" viewBox="0 0 85 65">"#
        ));
        assert!(svg_text.contains("<title>Reading speed by medium</title>"));
        assert!(svg_text.contains("<desc>Means with 95% confidence intervals.</desc>"));
        assert!(svg_text.contains(&format!(
            "<metadata>Made by figura 9.9.9 from spec blake3:{} and data blake3:{}</metadata>",
            "ab".repeat(32),
            "cd".repeat(32)
        )));
        // It reads back as the same physical size (96 px per inch is the CSS pixel).
        let tree = parse_with_bundled_font(&svg_text);
        assert!((f64::from(tree.size().width()) - 85.0 / 25.4 * 96.0).abs() < 1e-3);
        assert!((f64::from(tree.size().height()) - 65.0 / 25.4 * 96.0).abs() < 1e-3);
    }
}

/// The `<text>` elements of an SVG, as (attributes, content).
fn text_elements(svg_text: &str) -> Vec<(&str, &str)> {
    svg_text
        .split("<text ")
        .skip(1)
        .filter_map(|rest| {
            let (attributes, rest) = rest.split_once('>')?;
            let (content, _) = rest.split_once("</text>")?;
            Some((attributes, content))
        })
        .collect()
}

#[test]
fn editable_svg_keeps_each_text_where_layout_put_it() {
    let scene = sample_scene();
    let file = export::render(&scene)
        .unwrap()
        .svg(TextForm::Editable)
        .unwrap();
    let texts = text_elements(&file);
    assert_eq!(
        texts.iter().map(|t| t.1).collect::<Vec<_>>(),
        ["Medium", "Words per minute", "250"]
    );
    // "Medium": centred, top at y = 52, so the baseline is the ascent below it.
    let medium = font::measure("Medium", &style(8.0, Weight::Regular));
    let baseline = svg::format_number(52.0 + medium.ascent_mm);
    assert!(texts[0]
        .0
        .starts_with(&format!(r#"x="47" y="{baseline}" font-family="Noto Sans""#)));
    assert!(texts[0].0.contains(r#"text-anchor="middle""#));
    assert!(texts[1].0.contains(r#"transform="rotate(-90 5 27.5)""#));
    assert!(texts[2].0.contains(r#"font-weight="700""#));
    // The same text as the plain scene SVG, with the font added.
    let bare = svg::to_svg(&scene).unwrap();
    assert_eq!(text_elements(&bare), texts);
}

/// The fonts an SVG file embeds: (weight, TrueType bytes).
fn embedded_fonts(svg_text: &str) -> Vec<(u32, Vec<u8>)> {
    use base64::Engine as _;
    svg_text
        .split("@font-face {")
        .skip(1)
        .map(|rule| {
            let weight = rule
                .split("font-weight: ")
                .nth(1)
                .and_then(|w| w.split(';').next())
                .and_then(|w| w.parse().ok())
                .expect("a font weight");
            let data = rule
                .split("data:font/ttf;base64,")
                .nth(1)
                .and_then(|d| d.split('"').next())
                .expect("a data URL");
            let bytes = base64::engine::general_purpose::STANDARD
                .decode(data)
                .expect("base64");
            (weight, bytes)
        })
        .collect()
}

#[test]
fn editable_svg_embeds_a_subset_of_each_face_it_uses() {
    let file = export::render(&sample_scene())
        .unwrap()
        .svg(TextForm::Editable)
        .unwrap();
    let fonts = embedded_fonts(&file);
    assert_eq!(
        fonts.iter().map(|f| f.0).collect::<Vec<_>>(),
        [400, 700],
        "regular and bold"
    );
    for (weight, bytes) in &fonts {
        let face = ttf_parser::Face::parse(bytes, 0).expect("a TrueType font");
        let needed = if *weight == 400 {
            "MediumWords per minute"
        } else {
            "250"
        };
        for c in needed.chars() {
            assert!(face.glyph_index(c).is_some(), "{c:?} missing at {weight}");
        }
        assert!(face.glyph_index('Q').is_none(), "unused letters stay out");
        // A subset, not the whole face (about 600 KB).
        assert!(bytes.len() < 20_000, "{} bytes", bytes.len());
    }
    // A scene without text embeds nothing.
    let scene = Scene::new(10.0, 5.0);
    let empty = export::render(&scene).unwrap();
    assert!(!empty.svg(TextForm::Editable).unwrap().contains("<style>"));
}

#[test]
fn editable_svg_file_draws_exactly_the_png() {
    let dpi = 200.0;
    let scene = sample_scene();
    let rendered = export::render(&scene).unwrap();
    let (info, _, png_pixels) = decode_png(&rendered.png(dpi).unwrap());
    let file = rendered.svg(TextForm::Editable).unwrap();
    let again = common::draw_svg_file(&file, dpi, info.width, info.height);
    assert!(again == png_pixels, "the SVG file draws other pixels");
}

#[test]
fn outlined_svg_file_draws_the_png_but_for_edge_pixels() {
    let dpi = 200.0;
    let scene = sample_scene();
    let rendered = export::render(&scene).unwrap();
    let (info, _, ours) = decode_png(&rendered.png(dpi).unwrap());
    let file = rendered.svg(TextForm::Outlined).unwrap();
    let again = common::draw_svg_file(&file, dpi, info.width, info.height);
    let differing = ours
        .chunks(3)
        .zip(again.chunks(3))
        .filter(|(a, b)| a.iter().zip(b.iter()).any(|(x, y)| x.abs_diff(*y) > 8))
        .count();
    // Glyph outlines are written with three decimals (a micrometre): only anti-aliased edge
    // pixels may differ.
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
    for form in [TextForm::Editable, TextForm::Outlined] {
        let file = rendered.svg(form).unwrap();
        assert!(
            file.contains("<title>Speed &lt;fast&gt; &amp; &quot;slow&quot; &apos;x&apos;</title>")
        );
        // The file is well-formed XML that reads back.
        parse_with_bundled_font(&file);
    }
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
    let scene = Scene::new(10.0, 5.0);
    let rendered = export::render(&scene).unwrap();
    let (info, _, rgb) = decode_png(&rendered.png(254.0).unwrap());
    assert_eq!((info.width, info.height), (100, 50));
    assert!(rgb.iter().all(|&c| c == 255));
    parse_with_bundled_font(&rendered.svg(TextForm::Editable).unwrap());
}

#[test]
fn rendered_figures_can_move_between_threads() {
    fn send_and_share<T: Send + Sync>() {}
    send_and_share::<export::Rendered>();
}

// --------------------------------------------------------------------- far outside the panel

#[test]
fn marks_far_outside_their_panel_are_drawn_without_trouble() {
    // A bar a million kilometres tall in a 45 mm panel (a value far beyond a narrow
    // `range`): renderers once overflowed sizing their work by it. The visible part is the
    // panel filled from top to bottom.
    let blue = Colour::from_hex(0x0072B2);
    let mut scene = Scene::new(85.0, 65.0);
    scene.marks.push(Mark::Clip {
        rect: Rect::new(12.0, 5.0, 70.0, 45.0),
        marks: vec![
            Mark::Rect {
                x: 20.0,
                y: -1e12,
                width: 15.0,
                height: 1e12 + 50.0,
                fill: Some(Fill::solid(blue)),
                stroke: Some(Stroke::solid(Colour::WHITE, 0.3)),
            },
            Mark::Line {
                points: vec![Point::new(40.0, 40.0), Point::new(60.0, -1e15)],
                stroke: Stroke::solid(Colour::BLACK, 0.5),
            },
        ],
    });
    let rendered = export::render(&scene).unwrap();
    let files = [
        rendered.svg(TextForm::Editable).unwrap(),
        rendered.svg(TextForm::Outlined).unwrap(),
    ];
    for file in &files {
        assert!(
            !file.contains("e12") && !file.contains("1000000000"),
            "{file}"
        );
    }
    // 254 dpi: 10 pixels a millimetre. The bar spans the panel's height at x = 20..35 mm.
    let (info, _, rgb) = decode_png(&rendered.png(254.0).unwrap());
    for y_mm in [6, 25, 49] {
        assert_eq!(
            pixel(&info, &rgb, 275, y_mm * 10),
            [0x00, 0x72, 0xB2],
            "y {y_mm}"
        );
    }
    assert_eq!(
        pixel(&info, &rgb, 275, 550),
        [255, 255, 255],
        "below the panel"
    );
    rendered.tiff(254.0).unwrap();
    rendered.pdf(TextForm::Editable).unwrap();
}

// ------------------------------------------------------------------- metadata in each file

#[test]
fn png_records_title_description_and_provenance_as_text() {
    let mut scene = sample_scene();
    scene.title = Some("Reading speed – by medium".to_string());
    let png = export::render(&scene)
        .unwrap()
        .with_provenance(provenance())
        .png(100.0)
        .unwrap();
    let decoder = png::Decoder::new(png.as_slice());
    let reader = decoder.read_info().unwrap();
    let info = reader.info();
    let latin1: Vec<(&str, &str)> = info
        .uncompressed_latin1_text
        .iter()
        .map(|t| (t.keyword.as_str(), t.text.as_str()))
        .collect();
    assert_eq!(
        latin1,
        [
            ("Description", "Means with 95% confidence intervals."),
            ("Software", "figura 9.9.9"),
            (
                "Comment",
                format!(
                    "Made by figura 9.9.9 from spec blake3:{} and data blake3:{}",
                    "ab".repeat(32),
                    "cd".repeat(32)
                )
                .as_str()
            ),
        ]
    );
    // The en dash is not Latin-1: that title goes in a UTF-8 chunk.
    let utf8: Vec<(&str, String)> = info
        .utf8_text
        .iter()
        .map(|t| (t.keyword.as_str(), t.get_text().unwrap()))
        .collect();
    assert_eq!(utf8, [("Title", "Reading speed – by medium".to_string())]);
}

#[test]
fn tiff_holds_the_png_pixels_lzw_compressed_with_its_resolution() {
    use tiff::decoder::{Decoder, DecodingResult};
    use tiff::tags::Tag;
    let scene = sample_scene();
    let rendered = export::render(&scene)
        .unwrap()
        .with_provenance(provenance());
    let (info, _, png_pixels) = decode_png(&rendered.png(300.0).unwrap());
    let tiff_bytes = rendered.tiff(300.0).unwrap();
    // Little-endian TIFF (TIFF 6.0 specification, section 2: "II" and 42).
    assert_eq!(&tiff_bytes[..4], b"II*\0");
    let mut decoder = Decoder::new(std::io::Cursor::new(&tiff_bytes)).unwrap();
    assert_eq!(decoder.dimensions().unwrap(), (info.width, info.height));
    let tag = |decoder: &mut Decoder<_>, tag| decoder.get_tag_u32(tag).unwrap();
    // Compression 5 is LZW, predictor 2 horizontal differencing, resolution unit 2 the inch
    // (TIFF 6.0 specification, sections 8, 13 and 14; numbers from memory).
    assert_eq!(tag(&mut decoder, Tag::Compression), 5);
    assert_eq!(tag(&mut decoder, Tag::Predictor), 2);
    assert_eq!(tag(&mut decoder, Tag::ResolutionUnit), 2);
    let x_resolution = decoder.get_tag_u32_vec(Tag::XResolution).unwrap();
    assert_eq!(
        f64::from(x_resolution[0]) / f64::from(x_resolution[1]),
        300.0
    );
    let y_resolution = decoder.get_tag_u32_vec(Tag::YResolution).unwrap();
    assert_eq!(y_resolution, x_resolution);
    assert_eq!(
        decoder.get_tag_ascii_string(Tag::Software).unwrap(),
        "figura 9.9.9"
    );
    let description = decoder.get_tag_ascii_string(Tag::ImageDescription).unwrap();
    assert!(description.starts_with("Reading speed by medium\nMeans with 95%"));
    assert!(description.ends_with(&format!("data blake3:{}", "cd".repeat(32))));
    let DecodingResult::U8(pixels) = decoder.read_image().unwrap() else {
        panic!("not 8-bit")
    };
    assert!(
        pixels == png_pixels,
        "the TIFF holds other pixels than the PNG"
    );
    // LZW with the predictor: far smaller than the raw pixels.
    assert!(
        tiff_bytes.len() * 4 < pixels.len(),
        "{} bytes",
        tiff_bytes.len()
    );
}

/// The text of a PDF string as pdf-writer writes it: `(ASCII)` or `<FEFF UTF-16BE hex>`.
fn pdf_string_after(pdf: &str, key: &str) -> Option<String> {
    let rest = pdf.split(&format!("/{key} ")).nth(1)?;
    if let Some(rest) = rest.strip_prefix('(') {
        return Some(rest.split(')').next()?.to_string());
    }
    let hex = rest.strip_prefix("<FEFF")?.split('>').next()?;
    let units: Vec<u16> = (0..hex.len())
        .step_by(4)
        .map(|i| u16::from_str_radix(&hex[i..i + 4], 16).unwrap())
        .collect();
    String::from_utf16(&units).ok()
}

#[test]
fn pdf_records_title_subject_provenance_and_alternative_text() {
    let mut scene = sample_scene();
    scene.description = Some("Means – with intervals".to_string());
    let rendered = export::render(&scene)
        .unwrap()
        .with_provenance(provenance());
    for form in [TextForm::Editable, TextForm::Outlined] {
        let pdf = rendered.pdf(form).unwrap();
        let text = String::from_utf8_lossy(&pdf);
        assert_eq!(
            pdf_string_after(&text, "Title").as_deref(),
            Some("Reading speed by medium")
        );
        assert_eq!(
            pdf_string_after(&text, "Subject").as_deref(),
            Some("Means – with intervals")
        );
        assert_eq!(
            pdf_string_after(&text, "Creator").as_deref(),
            Some("figura 9.9.9")
        );
        assert!(pdf_string_after(&text, "Provenance")
            .unwrap()
            .ends_with(&format!("data blake3:{}", "cd".repeat(32))));
        // A tagged figure whose alternative text is the description.
        assert!(text.contains("/Marked true"));
        assert!(text.contains("/S /Figure"));
        assert_eq!(
            pdf_string_after(&text, "Alt").as_deref(),
            Some("Means – with intervals")
        );
        assert!(text.contains("/Figure <<\n  /MCID 0\n>> BDC"));
        assert!(!text.contains("/CreationDate") && !text.contains("/ID ["));
    }
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
