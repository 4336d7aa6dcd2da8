//! Shared helpers of the integration tests: expected-output files and temporary projects.
#![allow(dead_code)]

use std::path::{Path, PathBuf};

/// The repository root.
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Compares `actual` with the expected file at `path` (expect-test: a missing file is empty;
/// `UPDATE_EXPECT=1` writes the actual output instead). The one mechanism every runner uses.
pub fn expect_file(path: &Path, actual: &str) {
    expect_test::expect_file![path.to_path_buf()].assert_eq(actual);
}

/// Every file with `ext` in `dir`, sorted.
pub fn files_with_ext(dir: &Path, ext: &str) -> Vec<PathBuf> {
    let mut out: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .collect();
    out.sort();
    out
}

/// The folder of example specs.
pub fn examples() -> PathBuf {
    root().join("specs-examples")
}

/// Builds every example into `out` with the library (every figure made, whatever a manifest
/// says), asserting a clean build (no errors, no warnings), and returns the report.
pub fn build_examples(out: &Path) -> figura::build::BuildReport {
    let options = figura::build::BuildOptions {
        paths: vec![examples()],
        out: Some(out.to_path_buf()),
        force: true,
        ..figura::build::BuildOptions::default()
    };
    let report =
        figura::build::build(&options, &figura::build::NoProgress).expect("the examples build");
    assert!(
        report.diagnostics.is_empty() && report.failures.is_empty(),
        "the examples gave diagnostics:\n{}{:?}",
        figura::report::render_all(
            &report.diagnostics,
            &report.sources,
            figura::report::MessageFormat::Human { colour: false }
        ),
        report.failures
    );
    assert!(
        report
            .figures
            .iter()
            .all(|f| f.state == figura::build::FigureState::Built),
        "every example is made"
    );
    report
}

/// The checked program of every example, with the sources it was read from.
pub fn example_program() -> (figura::check::Program, figura::diag::SourceMap) {
    let specs = figura::build::load::find_specs(&[examples()]).expect("the examples are found");
    let mut sources = figura::diag::SourceMap::new();
    let loaded = figura::build::load::load(&specs, None, &mut sources).expect("the examples load");
    assert!(loaded.diags.is_empty(), "the examples do not parse");
    let (program, diags) = figura::check::check(&loaded.units);
    assert!(diags.is_empty(), "the examples do not check cleanly");
    (program, sources)
}

/// The checked figure plans of every example (for sizes, dpi and formats).
pub fn example_plans() -> Vec<figura::check::FigurePlan> {
    example_program().0.figures
}

/// The figure outputs in `dir` (every file whose name does not start with `.`, so not the
/// build manifest), sorted, with their bytes.
pub fn output_files(dir: &Path) -> Vec<(String, Vec<u8>)> {
    let mut out: Vec<(String, Vec<u8>)> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.is_file())
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .filter(|name| !name.starts_with('.'))
        .map(|name| {
            let bytes = std::fs::read(dir.join(&name)).unwrap();
            (name, bytes)
        })
        .collect();
    out.sort();
    out
}

/// Runs `python3 SCRIPT MODE` with `request` (JSON) on its standard input and returns the JSON
/// it prints: the tests' outside references (numpy, scipy, statsmodels).
pub fn python(script: &Path, mode: &str, request: &serde_json::Value) -> serde_json::Value {
    use std::io::Write as _;
    use std::process::{Command, Stdio};
    let mut child = Command::new("python3")
        .arg(script)
        .arg(mode)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap_or_else(|e| {
            panic!("cannot run python3 ({e}); install Python 3 with numpy and scipy")
        });
    child
        .stdin
        .take()
        .expect("stdin is piped")
        .write_all(request.to_string().as_bytes())
        .expect("write the request");
    let out = child.wait_with_output().expect("wait for python3");
    assert!(
        out.status.success(),
        "{} {mode} failed ({}); it needs python3 with numpy, scipy and statsmodels:\n{}",
        script.display(),
        out.status,
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).expect("the reference script prints JSON")
}

/// Draws an SVG file with resvg and the bundled font as Figura draws its PNG: one user unit per
/// millimetre (usvg's dpi set to 25.4 makes `85mm` 85 units), scaled to `dpi`, on white, as
/// 8-bit RGB `width` × `height` pixels.
pub fn draw_svg_file(svg_text: &str, dpi: f64, width: u32, height: u32) -> Vec<u8> {
    let options = usvg::Options {
        font_family: figura::font::FAMILY.to_string(),
        fontdb: figura::font::fontdb(),
        dpi: 25.4,
        ..usvg::Options::default()
    };
    let tree = usvg::Tree::from_str(svg_text, &options).expect("a valid SVG");
    let mut pixmap = resvg::tiny_skia::Pixmap::new(width, height).unwrap();
    pixmap.fill(resvg::tiny_skia::Color::WHITE);
    let scale = (dpi / 25.4) as f32;
    resvg::render(
        &tree,
        resvg::tiny_skia::Transform::from_scale(scale, scale),
        &mut pixmap.as_mut(),
    );
    pixmap
        .pixels()
        .iter()
        .flat_map(|p| {
            let c = p.demultiply();
            [c.red(), c.green(), c.blue()]
        })
        .collect()
}

/// Runs `git` in `dir` with a fixed identity and settings; panics when it fails. Returns its
/// standard output.
pub fn git(dir: &Path, args: &[&str]) -> String {
    let out = std::process::Command::new("git")
        .args([
            "-c",
            "user.name=Figura Test",
            "-c",
            "user.email=test@example.org",
        ])
        .args([
            "-c",
            "commit.gpgsign=false",
            "-c",
            "init.defaultBranch=main",
        ])
        .args(args)
        .current_dir(dir)
        .output()
        .expect("git runs");
    assert!(
        out.status.success(),
        "git {args:?}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8_lossy(&out.stdout).into_owned()
}

/// A `Debug` text with every `Span { ... }` replaced by `Span`.
pub fn without_spans(debug: &str) -> String {
    let mut out = String::with_capacity(debug.len());
    let mut rest = debug;
    while let Some(at) = rest.find("Span { source: ") {
        out.push_str(&rest[..at]);
        out.push_str("Span");
        let end = rest[at..].find('}').map_or(rest.len(), |e| at + e + 1);
        rest = &rest[end..];
    }
    out.push_str(rest);
    out
}

/// Asserts `|actual − expected| ≤ tol · scale`, where `scale` is the quantity's natural size
/// (at least the smallest positive double).
pub fn close(actual: f64, expected: f64, tol: f64, scale: f64, what: &str) {
    assert!(
        (actual - expected).abs() <= tol * scale.abs().max(f64::MIN_POSITIVE),
        "{what}: {actual} against the reference {expected}"
    );
}

/// Asserts `actual` is within `tol` of `expected`, relative to `expected`.
pub fn rel(actual: f64, expected: f64, tol: f64, what: &str) {
    close(actual, expected, tol, expected, what);
}
