//! Publication-ready files of every example: each figure is made in every format (SVG, PNG,
//! PDF and TIFF; text editable, and outlined) and checked with outside tools.
//!
//! - `pdffonts` and `pdftotext` (Debian's poppler-utils) read every PDF: the embedded subset
//!   of the bundled font is listed (embedded, subset, with a Unicode map) and every label drawn
//!   in the SVG is found in the extracted text; an outlined PDF has no font and no text.
//! - Every SVG file draws exactly the PNG's pixels when rendered again with resvg.
//! - Headless Chromium (Debian's `chromium`) draws the SVG with the embedded font: with the
//!   font removed it draws the labels in some other face, visibly further from the PNG.
//! - The figura binary builds every format twice, in two processes and with one and two
//!   threads, with identical bytes.
//!
//! The tools must be installed (`.ci/run` installs them): the tests fail without them.

mod common;

use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

use figura::build::{render_figure, table_spec, FigureChecks, Purpose};
use figura::check::Formats;
use figura::export::Provenance;
use figura::scene::TextForm;

/// Every example figure's files in every format, with `text` as given: figure name →
/// (file name → bytes).
fn every_format(text: TextForm) -> BTreeMap<String, BTreeMap<String, Vec<u8>>> {
    let (program, mut sources) = common::example_program();
    let provenance = Provenance {
        tool: "figura test".to_string(),
        spec: "0".repeat(64),
        data: "1".repeat(64),
    };
    let mut tables = BTreeMap::new();
    let mut out = BTreeMap::new();
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let table = tables.entry(plan.data).or_insert_with(|| {
            figura::data::read_table(&table_spec(book), &mut sources).expect("example data")
        });
        let mut plan = plan.clone();
        plan.formats = Formats {
            svg: true,
            png: true,
            pdf: true,
            tiff: true,
            text,
        };
        let Ok(made) = render_figure(
            &plan,
            book,
            table,
            &Purpose::Files(provenance.clone()),
            &FigureChecks::default(),
        ) else {
            panic!("{} was not made", plan.name);
        };
        out.insert(plan.name.clone(), made.files.into_iter().collect());
    }
    out
}

/// The file of `figure` with extension `ext`.
fn file<'a>(files: &'a BTreeMap<String, Vec<u8>>, figure: &str, ext: &str) -> &'a [u8] {
    &files[&format!("{figure}.{ext}")]
}

fn run(tool: &str, args: &[&str]) -> String {
    let out = Command::new(tool)
        .args(args)
        .output()
        .unwrap_or_else(|e| panic!("{tool} is needed (apt-get install poppler-utils): {e}"));
    assert!(
        out.status.success(),
        "{tool} failed: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).expect("UTF-8 output")
}

/// The text of every `<text>` element of an SVG, XML entities resolved.
fn svg_labels(svg_text: &str) -> Vec<String> {
    svg_text
        .split("<text ")
        .skip(1)
        .filter_map(|rest| {
            let (_, rest) = rest.split_once('>')?;
            let (content, _) = rest.split_once("</text>")?;
            // Styled runs are `<tspan>`s: their text is the label's.
            let mut text = String::new();
            let mut in_tag = false;
            for c in content.chars() {
                match c {
                    '<' => in_tag = true,
                    '>' => in_tag = false,
                    c if !in_tag => text.push(c),
                    _ => {}
                }
            }
            Some(
                text.replace("&lt;", "<")
                    .replace("&gt;", ">")
                    .replace("&quot;", "\"")
                    .replace("&apos;", "'")
                    .replace("&amp;", "&"),
            )
        })
        .collect()
}

fn without_whitespace(text: &str) -> String {
    text.chars().filter(|c| !c.is_whitespace()).collect()
}

#[test]
fn every_example_pdf_embeds_the_font_and_its_labels_are_extractable() {
    let dir = tempfile::tempdir().unwrap();
    let figures = every_format(TextForm::Editable);
    assert!(figures.len() >= 20, "{} examples", figures.len());
    for (figure, files) in &figures {
        let pdf = dir.path().join(format!("{figure}.pdf"));
        std::fs::write(&pdf, file(files, figure, "pdf")).unwrap();
        let pdf = pdf.to_str().unwrap();
        let svg_text = String::from_utf8(file(files, figure, "svg").to_vec()).unwrap();

        // pdffonts: one line per font after two header lines; a subset's name starts with six
        // capitals and `+` (PDF 1.7, section 9.6.4); then type, encoding, and emb, sub, uni.
        let fonts = run("pdffonts", &[pdf]);
        let rows: Vec<Vec<&str>> = fonts
            .lines()
            .skip(2)
            .map(|l| l.split_whitespace().collect())
            .collect();
        // The faces the SVG embeds are the faces the PDF embeds.
        let mut expected: Vec<&str> = svg_text
            .lines()
            .filter(|l| l.starts_with("@font-face"))
            .map(|l| {
                match (
                    l.contains("font-weight: 700"),
                    l.contains("font-style: italic"),
                ) {
                    (false, false) => "NotoSans-Regular",
                    (true, false) => "NotoSans-Bold",
                    (false, true) => "NotoSans-Italic",
                    (true, true) => "NotoSans-BoldItalic",
                }
            })
            .collect();
        expected.sort_unstable();
        let mut names: Vec<&str> = rows
            .iter()
            .map(|r| r[0].split_once('+').map_or("", |(_, n)| n))
            .collect();
        names.sort_unstable();
        assert!(!names.is_empty(), "{figure}: no font");
        assert_eq!(names, expected, "{figure}:\n{fonts}");
        for row in &rows {
            assert_eq!(row[0].find('+'), Some(6), "{figure}: a subset tag\n{fonts}");
            assert_eq!(
                &row[row.len() - 5..row.len() - 2],
                ["yes", "yes", "yes"],
                "{fonts}"
            );
        }

        // pdftotext: every label drawn in the SVG is in the extracted text, characters in
        // order (pdftotext spaces and breaks lines by position, so whitespace is ignored).
        let extracted = without_whitespace(&run("pdftotext", &[pdf, "-"]));
        let labels = svg_labels(&svg_text);
        assert!(labels.len() >= 5, "{figure}: {labels:?}");
        for label in labels {
            assert!(
                extracted.contains(&without_whitespace(&label)),
                "{figure}: `{label}` is not in the PDF's text"
            );
        }
    }
}

#[test]
fn outlined_pdfs_and_svgs_hold_no_text() {
    let dir = tempfile::tempdir().unwrap();
    for (figure, files) in every_format(TextForm::Outlined) {
        let pdf = dir.path().join(format!("{figure}.pdf"));
        std::fs::write(&pdf, file(&files, &figure, "pdf")).unwrap();
        let pdf = pdf.to_str().unwrap();
        assert_eq!(
            run("pdffonts", &[pdf]).lines().count(),
            2,
            "{figure}: no font"
        );
        assert_eq!(
            run("pdftotext", &[pdf, "-"]).trim(),
            "",
            "{figure}: no text"
        );
        let svg_text = String::from_utf8(file(&files, &figure, "svg").to_vec()).unwrap();
        assert!(!svg_text.contains("<text") && !svg_text.contains("@font-face"));
    }
}

/// 8-bit RGB pixels and size of a PNG.
fn png_pixels(bytes: &[u8]) -> (u32, u32, Vec<u8>) {
    let mut reader = png::Decoder::new(bytes).read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    assert_eq!(info.color_type, png::ColorType::Rgb);
    buf.truncate(info.buffer_size());
    (info.width, info.height, buf)
}

#[test]
fn every_example_svg_draws_exactly_its_png() {
    let plans: BTreeMap<String, u32> = common::example_plans()
        .into_iter()
        .map(|p| (p.name, p.dpi))
        .collect();
    for (figure, files) in every_format(TextForm::Editable) {
        let (w, h, png) = png_pixels(file(&files, &figure, "png"));
        let svg_text = std::str::from_utf8(file(&files, &figure, "svg")).unwrap();
        let again = common::draw_svg_file(svg_text, f64::from(plans[&figure]), w, h);
        assert!(
            again == png,
            "{figure}: the SVG draws other pixels than the PNG"
        );
    }
}

/// Pixels whose channels differ by more than 64 between `rgba` (8-bit RGBA) and `rgb`.
fn far_pixels(rgba: &[u8], rgb: &[u8]) -> usize {
    rgba.chunks(4)
        .zip(rgb.chunks(3))
        .filter(|(a, b)| (0..3).any(|i| a[i].abs_diff(b[i]) > 64))
        .count()
}

/// Chromium's picture of an SVG shown `width` × `height` CSS pixels large, as RGBA.
fn chromium_pixels(svg_text: &str, width: u32, height: u32, dir: &Path) -> Vec<u8> {
    let chromium = Path::new("/usr/bin/chromium");
    assert!(
        chromium.exists(),
        "this test needs Chromium: apt-get install chromium"
    );
    std::fs::write(dir.join("figure.svg"), svg_text).unwrap();
    let page = dir.join("page.html");
    std::fs::write(
        &page,
        format!(
            r#"<!doctype html><html><body style="margin:0;background:#fff"><img src="figure.svg" width="{width}" height="{height}" style="display:block"></body></html>"#
        ),
    )
    .unwrap();
    let shot = dir.join("shot.png");
    let out = Command::new(chromium)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--hide-scrollbars",
            "--force-device-scale-factor=1",
        ])
        .arg(format!("--user-data-dir={}", dir.join("profile").display()))
        .arg(format!("--window-size={width},{height}"))
        .arg(format!("--screenshot={}", shot.display()))
        .arg(format!("file://{}", page.display()))
        .output()
        .expect("run chromium");
    assert!(shot.exists(), "{}", String::from_utf8_lossy(&out.stderr));
    let bytes = std::fs::read(&shot).unwrap();
    let mut decoder = png::Decoder::new(bytes.as_slice());
    decoder.set_transformations(png::Transformations::EXPAND | png::Transformations::STRIP_16);
    let mut reader = decoder.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size()];
    let info = reader.next_frame(&mut buf).unwrap();
    assert_eq!((info.width, info.height), (width, height));
    buf.truncate(info.buffer_size());
    match info.color_type {
        png::ColorType::Rgba => buf,
        png::ColorType::Rgb => buf
            .chunks(3)
            .flat_map(|p| [p[0], p[1], p[2], 255])
            .collect(),
        other => panic!("screenshot colour type {other:?}"),
    }
}

#[test]
fn chromium_draws_the_svg_with_the_embedded_font() {
    // A figure with bold and regular text, at 150 dpi: 170 mm × 75 mm is 1004 × 443 pixels.
    let figure = "speed_by_medium";
    let dpi = 150.0;
    let (program, mut sources) = common::example_program();
    let plan = program
        .figures
        .iter()
        .find(|p| p.name == figure)
        .expect("the example");
    let book = &program.codebooks[plan.data];
    let table = figura::data::read_table(&table_spec(book), &mut sources).unwrap();
    let mut plan = plan.clone();
    plan.dpi = dpi as u32;
    let Ok(made) = render_figure(
        &plan,
        book,
        &table,
        &Purpose::Files(Provenance {
            tool: "figura test".to_string(),
            spec: String::new(),
            data: String::new(),
        }),
        &FigureChecks::default(),
    ) else {
        panic!("not made")
    };
    let files: BTreeMap<String, Vec<u8>> = made.files.into_iter().collect();
    let (w, h, png) = png_pixels(file(&files, figure, "png"));
    assert_eq!((w, h), (1004, 443));
    let svg_text = std::str::from_utf8(file(&files, figure, "svg")).unwrap();
    // A family name no system has, so that only the embedded font can supply it.
    let own = svg_text.replace("Noto Sans", "Figura Embedded Face");
    let style_start = own.find("<style>").expect("a style element");
    let style_end = own.find("</style>\n").unwrap() + "</style>\n".len();
    let without_font = format!("{}{}", &own[..style_start], &own[style_end..]);

    let dir = tempfile::tempdir().unwrap();
    let with = far_pixels(&chromium_pixels(&own, w, h, dir.path()), &png);
    let without = far_pixels(&chromium_pixels(&without_font, w, h, dir.path()), &png);
    let total = (w * h) as usize;
    // Two renderers anti-alias edges differently; the same glyphs in the same places leave
    // only scattered edge pixels apart, while another face moves whole letters.
    assert!(
        with * 100 < total,
        "{with} of {total} pixels far from the PNG"
    );
    assert!(
        with * 2 < without,
        "the embedded font ({with} pixels apart) should beat a fallback face ({without})"
    );
}

/// Runs the figura binary.
fn figura(args: &[&std::ffi::OsStr]) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .output()
        .expect("run figura")
}

/// Runs the figura binary, which must succeed.
fn figura_ok(args: &[&std::ffi::OsStr]) {
    let out = figura(args);
    assert!(
        out.status.success(),
        "figura {args:?} failed:\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
}

#[test]
fn every_format_is_byte_identical_across_processes_and_threads() {
    let dir = tempfile::tempdir().unwrap();
    let data = dir.path().join("plots.csv");
    let mut csv = String::from("plot,mulch,beetles\n");
    for i in 0..24 {
        let mulch = ["bark", "straw", "none"][i % 3];
        csv.push_str(&format!("P{i:02},{mulch},{}\n", 3 + (i * 7) % 11));
    }
    std::fs::write(&data, csv).unwrap();
    let mut spec = String::from(
        "data plots \"plots.csv\" {\n  plot: id\n  mulch: nominal label(\"Mulch\")\n  \
         beetles: ratio label(\"Beetles\") unit(\"per trap\")\n  subject plot\n  between mulch\n}\n",
    );
    for (name, text) in [("editable", ""), ("outlined", " text(outlined)")] {
        spec.push_str(&format!(
            "figure beetles_{name} {{\n  from plots\n  title \"Beetles under each mulch\"\n  \
             caption \"Means with 95% intervals.\"\n  x mulch\n  y beetles\n  colour mulch\n  \
             points\n  mean error(ci(0.95))\n  formats svg png pdf tiff{text}\n}}\n"
        ));
    }
    let spec_path = dir.path().join("beetles.figura");
    std::fs::write(&spec_path, spec).unwrap();
    let builds: Vec<_> = [("1", "a"), ("1", "b"), ("2", "c")]
        .into_iter()
        .map(|(jobs, name)| {
            let out = dir.path().join(name);
            figura_ok(&[
                "build".as_ref(),
                spec_path.as_ref(),
                "--out".as_ref(),
                out.as_ref(),
                "--jobs".as_ref(),
                jobs.as_ref(),
            ]);
            common::output_files(&out)
        })
        .collect();
    assert_eq!(
        builds[0].len(),
        2 * 6,
        "four formats, a summary and alt text, twice"
    );
    for other in &builds[1..] {
        for ((name, x), (other_name, y)) in builds[0].iter().zip(other) {
            assert_eq!(name, other_name);
            assert!(x == y, "{name} differs between builds");
        }
    }
}

#[test]
fn check_finds_an_image_too_large_to_draw_as_build_does() {
    // 600 mm at 2400 dpi is round(600 / 25.4 × 2400) = 56693 pixels a side, far more than the
    // limit of 10^8 pixels; `check` does not draw, but still knows.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("t.csv"), "g,v\na,1\nb,2\n").unwrap();
    let spec = dir.path().join("t.figura");
    std::fs::write(
        &spec,
        "data t \"t.csv\" {\n  g: nominal\n  v: ratio\n}\nfigure huge {\n  from t\n  x g\n  \
         y v\n  points\n  size 600mm x 600mm\n  formats tiff\n  dpi 2400\n}\n",
    )
    .unwrap();
    let mut codes = Vec::new();
    for command in ["check", "build"] {
        let out = figura(&[command.as_ref(), spec.as_ref()]);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert!(!out.status.success(), "{command}: {stderr}");
        codes.push(out.status.code());
        assert!(
            stderr.contains("56693 x 56693 pixels, more than the limit"),
            "{command}: {stderr}"
        );
    }
    assert_eq!(codes[0], codes[1], "check and build end alike");
    assert!(!dir.path().join("out/huge.tiff").exists());
}

#[test]
fn bars_far_beyond_a_narrow_range_are_drawn_in_every_format() {
    // Means of about 10^11 on an axis that ends at 0.001: the bars reach some 10^16 mm past
    // the panel. This once overflowed the rasteriser (a panic that stopped the build).
    let dir = tempfile::tempdir().unwrap();
    let mut csv = String::from("id,g,v\n");
    for i in 0..40 {
        csv.push_str(&format!(
            "{i},{},{}\n",
            ["a", "b"][i % 2],
            1e9 * (1 + i * 7) as f64
        ));
    }
    std::fs::write(dir.path().join("big.csv"), csv).unwrap();
    let spec = dir.path().join("big.figura");
    std::fs::write(
        &spec,
        "data big \"big.csv\" {\n  id: id\n  g: nominal\n  v: ratio\n  subject id\n  \
         between g\n}\nfigure tiny_range {\n  from big\n  x g\n  y v range(0, 0.001)\n  \
         points\n  mean bar error(sd)\n  formats svg png pdf tiff\n}\n",
    )
    .unwrap();
    figura_ok(&["build".as_ref(), spec.as_ref()]);
    let folder = dir.path().join("out");
    let svg_text = std::fs::read_to_string(folder.join("tiny_range.svg")).unwrap();
    // No coordinate (after the embedded font) is more than a few hundred millimetres from
    // the page.
    let (_, drawing) = svg_text.split_once("</style>").expect("an embedded font");
    for number in drawing
        .split(|c: char| !(c.is_ascii_digit() || c == '.'))
        .filter_map(|n| n.parse::<f64>().ok())
    {
        assert!(number < 1e6, "{number} in the SVG");
    }
    // The bars fill the panel up to its top: the PNG is drawn.
    let (w, h, _) = png_pixels(&std::fs::read(folder.join("tiny_range.png")).unwrap());
    assert_eq!((w, h), (1004, 768));
    for ext in ["pdf", "tiff"] {
        assert!(folder.join(format!("tiny_range.{ext}")).exists());
    }
}

/// The numbers written in `text`: each as written (a minus sign U+2212 read as `-`), with its
/// number of decimals.
fn numbers_in(text: &str) -> Vec<(String, usize)> {
    let chars: Vec<char> = text.chars().collect();
    let mut out = Vec::new();
    let mut i = 0;
    while i < chars.len() {
        let signed = matches!(chars[i], '−' | '-')
            && chars.get(i + 1).is_some_and(char::is_ascii_digit)
            && (i == 0 || !chars[i - 1].is_alphanumeric());
        if !(chars[i].is_ascii_digit() || signed) {
            i += 1;
            continue;
        }
        let start = i;
        i += 1;
        while i < chars.len()
            && (chars[i].is_ascii_digit()
                || (chars[i] == '.' && chars.get(i + 1).is_some_and(char::is_ascii_digit)))
        {
            i += 1;
        }
        let written: String = chars[start..i].iter().collect::<String>().replace('−', "-");
        let decimals = written.split_once('.').map_or(0, |(_, d)| d.len());
        out.push((written, decimals));
    }
    out
}

#[test]
fn every_example_has_alt_text_that_quotes_its_summary() {
    // Every number of the alt text, outside the key's sentences and the user's own titles and
    // labels, is a number of the summary table (a value, or a bin edge of its x column)
    // rounded to the decimals it is written with.
    let (program, mut sources) = common::example_program();
    let figures = every_format(TextForm::Editable);
    let mut tables = BTreeMap::new();
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let table = tables.entry(plan.data).or_insert_with(|| {
            figura::data::read_table(&table_spec(book), &mut sources).expect("example data")
        });
        let data = figura::compute::compute(plan, book, table).expect("computes");
        let files = &figures[&plan.name];
        let alt = String::from_utf8(file(files, &plan.name, "alt.txt").to_vec()).unwrap();
        assert!(
            alt.ends_with(".\n") && alt.len() > 80,
            "{}: {alt}",
            plan.name
        );
        if let Some(title) = &plan.title {
            assert!(alt.starts_with(&figura::markup::plain(title)), "{alt}");
        }
        // The SVG's description and the PDF's alternative text say it too.
        let svg_text = std::str::from_utf8(file(files, &plan.name, "svg")).unwrap();
        let first_sentence = alt.split(". ").nth(1).unwrap_or(&alt);
        assert!(
            svg_text.contains(&figura::svg::escape_xml(first_sentence)),
            "{}: the SVG's desc",
            plan.name
        );

        let mut rest = alt.clone();
        let mut own: Vec<String> = data.marks.clone();
        own.extend(plan.title.iter().chain(&plan.caption).cloned());
        for var in &book.vars {
            own.extend(var.label.iter().chain(&var.unit).cloned());
            own.extend(var.labels.iter().flatten().cloned());
            own.extend(var.levels.iter().flatten().cloned());
            own.push(var.title());
        }
        let mut own: Vec<String> = own.iter().map(|t| figura::markup::plain(t)).collect();
        own.sort_by_key(|t| std::cmp::Reverse(t.len()));
        // Numbers among them (a level named `4`) are checked as numbers.
        for text in own.iter().filter(|t| t.chars().any(char::is_alphabetic)) {
            rest = rest.replace(text.as_str(), " ");
        }
        let mut summary_numbers: Vec<f64> = Vec::new();
        for row in &data.summary {
            match &row.value {
                figura::compute::StatValue::Number(v) => summary_numbers.push(*v),
                figura::compute::StatValue::Level(l) => summary_numbers.extend(l.parse::<f64>()),
            }
            summary_numbers.extend(
                numbers_in(&row.x)
                    .iter()
                    .filter_map(|(n, _)| n.parse::<f64>().ok()),
            );
        }
        let quoted = numbers_in(&rest);
        assert!(!quoted.is_empty(), "{}: no numbers in {rest}", plan.name);
        for (written, decimals) in quoted {
            let matches = summary_numbers.iter().any(|v| {
                let text = format!("{v:.decimals$}");
                text == written || (text.trim_start_matches('-') == written && v.abs() < 1.0)
            });
            assert!(
                matches,
                "{}: `{written}` in the alt text is no summary number:\n{alt}",
                plan.name
            );
        }
    }
}

/// `figura ARGS` run in `dir`: its exit code and standard error.
fn figura_in(dir: &Path, args: &[&str]) -> (Option<i32>, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(dir)
        .output()
        .expect("run figura");
    (
        out.status.code(),
        String::from_utf8_lossy(&out.stderr).into_owned(),
    )
}

#[test]
fn journal_targets_are_checked_and_the_examples_meet_them() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("figura.toml"),
        "[journal]\nwidths = [85, 114]\nmin-text = 6.5\nmin-line = 0.6\ndpi = 600\n",
    )
    .unwrap();
    let mut csv = String::from("plot,mulch,beetles\n");
    for i in 0..24 {
        let mulch = ["bark", "straw", "none"][i % 3];
        csv.push_str(&format!("P{i:02},{mulch},{}\n", 3 + (i * 7) % 11));
    }
    std::fs::write(dir.path().join("plots.csv"), csv).unwrap();
    std::fs::write(
        dir.path().join("beetles.figura"),
        "data plots \"plots.csv\" {\n  plot: id\n  mulch: nominal\n  beetles: ratio\n  \
         subject plot\n  between mulch\n}\nfigure wide {\n  from plots\n  x mulch\n  \
         y beetles\n  box\n  size 150mm x 60mm\n  dpi 300\n}\n",
    )
    .unwrap();
    let (code, stderr) = figura_in(dir.path(), &["check"]);
    assert_eq!(code, Some(0), "{stderr}");
    // The n row is 6 pt, axis lines 0.2 mm (0.57 pt); 300 dpi; 150 mm is wider than 114 mm.
    for (code, says) in [
        ("W0008", "below the journal's 6.5 pt"),
        ("W0009", "thinner than the journal's 0.6 pt"),
        ("W0010", "drawn at 300 dpi, below the journal's 600 dpi"),
        (
            "W0011",
            "150 mm wide, wider than the journal's widest column (114 mm)",
        ),
    ] {
        assert!(stderr.contains(code), "{code} missing:\n{stderr}");
        assert!(stderr.contains(says), "{says} missing:\n{stderr}");
    }
    assert!(stderr.contains("write `dpi 600`"), "{stderr}");
    let (code, _) = figura_in(dir.path(), &["check", "--deny-warnings"]);
    assert_eq!(code, Some(1), "warnings fail the run under --deny-warnings");

    // A bad value is located in the project file.
    std::fs::write(
        dir.path().join("figura.toml"),
        "[journal]\nwidths = []\nmin-text = \"six\"\nmin-lines = 1\n",
    )
    .unwrap();
    let (code, stderr) = figura_in(dir.path(), &["check"]);
    assert_eq!(code, Some(1), "{stderr}");
    for says in [
        "`widths` needs at least one column width",
        "`min-text` is a size in points (a number), not a string",
        "did you mean `journal.min-line`?",
    ] {
        assert!(stderr.contains(says), "{says} missing:\n{stderr}");
    }

    // The examples' project checks the default targets: not one warning.
    let (code, stderr) = figura_in(&common::examples(), &["check", "--deny-warnings"]);
    assert_eq!(code, Some(0), "{stderr}");
    assert!(stderr.contains(" 0 warnings"), "{stderr}");
}
