//! Shared helpers of the integration tests: expected-output files and temporary projects.
#![allow(dead_code)]

use std::path::{Path, PathBuf};

/// The repository root.
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Compares `actual` with the file at `path`; with `UPDATE_EXPECT=1` writes it instead.
/// A missing expected file is a failure unless updating.
pub fn expect_file(path: &Path, actual: &str) {
    if std::env::var_os("UPDATE_EXPECT").is_some() {
        std::fs::write(path, actual).unwrap();
        return;
    }
    let expected = std::fs::read_to_string(path).unwrap_or_else(|_| {
        panic!(
            "missing expected file {} (run with UPDATE_EXPECT=1 to create it)",
            path.display()
        )
    });
    if expected != actual {
        panic!(
            "\n{} differs from the actual output.\n--- expected\n{expected}\n--- actual\n{actual}\n(run with UPDATE_EXPECT=1 to accept)",
            path.display()
        );
    }
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
