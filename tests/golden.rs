//! Golden tests of the examples: every figure of `specs-examples/` is built with the library
//! into a temporary folder and its SVG and summary are compared with the expected files in
//! `tests/golden/NAME.svg` and `tests/golden/NAME.summary.csv`.
//!
//! `UPDATE_EXPECT=1 cargo test --test golden` writes the expected files (look at the figures
//! before committing them). A missing expected file fails, and so does an expected file that no
//! example builds any more. Every PNG is also checked for the promised pixel size,
//! round(size in inches × dpi), and for the dpi it records (the PNG `pHYs` chunk, in pixels per
//! metre, common practice of the PNG specification).

mod common;

use std::path::PathBuf;

use figura::check::FigurePlan;

fn golden_dir() -> PathBuf {
    common::root().join("tests/golden")
}

/// The golden files: `.svg` and `.summary.csv` outputs.
fn is_golden(name: &str) -> bool {
    name.ends_with(".svg") || name.ends_with(".summary.csv")
}

#[test]
fn every_example_matches_its_expected_svg_and_summary() {
    let out = tempfile::tempdir().unwrap();
    let report = common::build_examples(out.path());
    let built: Vec<(String, Vec<u8>)> = common::output_files(out.path())
        .into_iter()
        .filter(|(name, _)| is_golden(name))
        .collect();
    assert_eq!(
        built.len(),
        2 * report.figures.len(),
        "every figure writes one SVG and one summary"
    );
    for (name, bytes) in &built {
        let text = String::from_utf8(bytes.clone()).expect("SVG and CSV are UTF-8");
        common::expect_file(&golden_dir().join(name), &text);
    }
    let mut problems = Vec::new();
    let expected_files = if golden_dir().is_dir() {
        common::output_files(&golden_dir())
    } else {
        Vec::new()
    };
    for (name, _) in expected_files {
        if is_golden(&name) && !built.iter().any(|(b, _)| *b == name) {
            problems.push(format!(
                "tests/golden/{name} belongs to no example figure; delete it"
            ));
        }
    }
    assert!(
        problems.is_empty(),
        "{} golden problems:\n{}\n(look at the figures, then run with UPDATE_EXPECT=1 to accept)",
        problems.len(),
        problems.join("\n")
    );
}

/// Width, height and pixels per metre (x, y) from a PNG's header and `pHYs` chunk.
fn png_header(bytes: &[u8]) -> (u32, u32, Option<(u32, u32)>) {
    let decoder = png::Decoder::new(std::io::Cursor::new(bytes));
    let reader = decoder.read_info().expect("a readable PNG");
    let info = reader.info();
    let dims = info.pixel_dims.map(|d| {
        assert_eq!(d.unit, png::Unit::Meter, "pHYs is in pixels per metre");
        (d.xppu, d.yppu)
    });
    (info.width, info.height, dims)
}

fn expected_pixels(plan: &FigurePlan) -> (u32, u32) {
    let px = |mm: f64| (mm / 25.4 * f64::from(plan.dpi)).round() as u32;
    (px(plan.width_mm), px(plan.height_mm))
}

#[test]
fn every_png_has_the_promised_pixel_size_and_records_its_dpi() {
    let out = tempfile::tempdir().unwrap();
    common::build_examples(out.path());
    let plans = common::example_plans();
    let with_png: Vec<&FigurePlan> = plans.iter().filter(|p| p.formats.png).collect();
    assert!(with_png.len() >= 10, "most examples write a PNG");
    // The examples use more than one dpi, so the size really depends on it.
    assert!(with_png.iter().any(|p| p.dpi != 300));
    for plan in with_png {
        let bytes = std::fs::read(out.path().join(format!("{}.png", plan.name))).unwrap();
        let (width, height, dims) = png_header(&bytes);
        assert_eq!(
            (width, height),
            expected_pixels(plan),
            "{}: {} × {} mm at {} dpi",
            plan.name,
            plan.width_mm,
            plan.height_mm,
            plan.dpi
        );
        // dpi / 0.0254 m per inch, rounded to whole pixels per metre (300 dpi = 11811).
        let ppm = (f64::from(plan.dpi) / 0.0254).round() as u32;
        assert_eq!(dims, Some((ppm, ppm)), "{}: recorded resolution", plan.name);
    }
}

#[test]
fn each_figure_writes_exactly_the_formats_it_asks_for() {
    let out = tempfile::tempdir().unwrap();
    common::build_examples(out.path());
    for plan in common::example_plans() {
        let png = out.path().join(format!("{}.png", plan.name));
        let pdf = out.path().join(format!("{}.pdf", plan.name));
        assert_eq!(png.exists(), plan.formats.png, "{}", plan.name);
        assert_eq!(pdf.exists(), plan.formats.pdf, "{}", plan.name);
    }
}

/// The numbers of a PDF's `/MediaBox [x0 y0 x1 y1]`.
fn media_box(pdf: &[u8]) -> Vec<f64> {
    let text = String::from_utf8_lossy(pdf);
    let start = text.find("/MediaBox [").expect("a MediaBox") + "/MediaBox [".len();
    let end = start + text[start..].find(']').expect("the MediaBox ends");
    text[start..end]
        .split_whitespace()
        .map(|n| n.parse().expect("a number"))
        .collect()
}

#[test]
fn every_pdf_page_is_the_figure_size_in_points() {
    let out = tempfile::tempdir().unwrap();
    common::build_examples(out.path());
    let plans = common::example_plans();
    let with_pdf: Vec<&FigurePlan> = plans.iter().filter(|p| p.formats.pdf).collect();
    assert!(!with_pdf.is_empty(), "some example writes a PDF");
    for plan in with_pdf {
        let pdf = std::fs::read(out.path().join(format!("{}.pdf", plan.name))).unwrap();
        // 1 in = 25.4 mm = 72 pt (common practice); the PDF writes 5 decimals.
        let pt = |mm: f64| mm / 25.4 * 72.0;
        let b = media_box(&pdf);
        assert_eq!(b.len(), 4, "{}", plan.name);
        assert_eq!((b[0], b[1]), (0.0, 0.0), "{}", plan.name);
        assert!(
            (b[2] - pt(plan.width_mm)).abs() < 1e-4 && (b[3] - pt(plan.height_mm)).abs() < 1e-4,
            "{}: MediaBox {b:?} for {} × {} mm",
            plan.name,
            plan.width_mm,
            plan.height_mm
        );
    }
}
