//! `figura fmt`: the canonical layout is idempotent, keeps every comment and never changes
//! what a spec means (the same checked plan, the same built figures); `--check` exit codes.
//!
//! Cases: every spec of `specs-examples`, `tests/check/ok` and `tests/syntax/ok`.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;

use figura::build::{self, load, BuildOptions};
use figura::check;
use figura::diag::{SourceId, SourceMap};
use figura::format::{self, format_source, Mode};
use figura::syntax;

/// Every `.figura` file under a folder of the repository, recursively.
fn specs_under(folder: &str) -> Vec<PathBuf> {
    let files = load::find_specs(&[common::root().join(folder)]).unwrap();
    assert!(!files.is_empty(), "no specs under {folder}");
    files
}

fn all_cases() -> Vec<PathBuf> {
    let mut all = specs_under("specs-examples");
    all.extend(specs_under("tests/check/ok"));
    all.extend(specs_under("tests/syntax/ok"));
    all
}

fn fmt(text: &str) -> String {
    match format_source(SourceId(0), text) {
        Ok(t) => t,
        Err(e) => panic!("cannot format:\n{text}\n{e:?}"),
    }
}

/// The comments of a text, as written (trailing blanks aside), in order.
fn comments(text: &str) -> Vec<String> {
    let tree = syntax::parse(SourceId(0), text).unwrap();
    tree.comments
        .iter()
        .map(|c| c.text.trim_end().to_owned())
        .collect()
}

#[test]
fn formatting_is_idempotent() {
    for path in all_cases() {
        let text = std::fs::read_to_string(&path).unwrap();
        let once = fmt(&text);
        let twice = fmt(&once);
        assert_eq!(once, twice, "{} is not stable", path.display());
    }
}

#[test]
fn every_comment_is_kept_in_order() {
    for path in all_cases() {
        let text = std::fs::read_to_string(&path).unwrap();
        assert_eq!(comments(&fmt(&text)), comments(&text), "{}", path.display());
    }
}

#[test]
fn canonical_layout_of_a_messy_spec() {
    let messy = "# header\n\n\n\
        include \"codebook.figura\"   # data\n\
        figure  f {   # about f\n\
        \tfrom reading ; x medium order(count)  label(\"Medium\")\n\
        \n\n\
        \tmean error(se)   bar\n\
        \tlevels(\"a\",  # first\n\
        \t   \"b\",)\n\
        \twhere ( a == 1\n\
        \t  or b ==  2 )   # filter\n\
        \t# last words\n\
        }  # end\n\
        data d \"d.csv\" {\n\
        \tx:  nominal labels(\"X\")  levels(\"x\")\n\
        \twithin a b\n\
        }\n\
        figure empty { }\n";
    let expected = "# header\n\n\
        include \"codebook.figura\"  # data\n\n\
        figure f {  # about f\n  \
        from reading\n  \
        x medium label(\"Medium\") order(count)\n\n  \
        mean bar error(se)\n  \
        # first\n  \
        levels(\"a\", \"b\")\n  \
        where (a == 1 or b == 2)  # filter\n  \
        # last words\n\
        }  # end\n\n\
        data d \"d.csv\" {\n  \
        x: nominal levels(\"x\") labels(\"X\")\n  \
        within a, b\n\
        }\n\n\
        figure empty {}\n";
    assert_eq!(fmt(messy), expected);
}

/// The checked program of the spec files given, as text without spans or the path of `dir`.
fn checked_plan(dir: &Path, specs: &[PathBuf]) -> String {
    let mut sources = SourceMap::new();
    let loaded = load::load(specs, None, &mut sources).unwrap();
    assert!(
        loaded.diags.is_empty(),
        "{}: {:?}",
        dir.display(),
        loaded.diags
    );
    let (program, diags) = check::check(&loaded.units);
    assert!(
        !diags.iter().any(|d| d.is_error()),
        "{}: {diags:?}",
        dir.display()
    );
    common::without_spans(&format!("{program:?}")).replace(&dir.display().to_string(), "ROOT")
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for entry in std::fs::read_dir(from).unwrap() {
        let entry = entry.unwrap();
        let target = to.join(entry.file_name());
        if entry.file_type().unwrap().is_dir() {
            copy_dir(&entry.path(), &target);
        } else {
            std::fs::copy(entry.path(), &target).unwrap();
        }
    }
}

/// A copy of `folder` as written, and a copy formatted with `figura::format`.
fn original_and_formatted(folder: &str) -> (tempfile::TempDir, PathBuf, PathBuf) {
    let tmp = tempfile::tempdir().unwrap();
    let (a, b) = (tmp.path().join("a"), tmp.path().join("b"));
    copy_dir(&common::root().join(folder), &a);
    copy_dir(&common::root().join(folder), &b);
    let report = format::format_paths(std::slice::from_ref(&b), Mode::Write).unwrap();
    assert!(report.diagnostics.is_empty(), "{:?}", report.diagnostics);
    (tmp, a, b)
}

#[test]
fn the_checked_plan_is_the_same_after_formatting() {
    // The examples are checked together (they include each other); each checker case alone.
    let (_tmp, a, b) = original_and_formatted("specs-examples");
    let all = |dir: &Path| load::find_specs(&[dir.to_path_buf()]).unwrap();
    let before = checked_plan(&a, &all(&a));
    assert_eq!(
        before,
        checked_plan(&b, &all(&b)),
        "the examples' plan changed"
    );
    let written: usize = all(&a)
        .iter()
        .map(|p| {
            std::fs::read_to_string(p)
                .unwrap()
                .lines()
                .filter(|l| l.starts_with("figure "))
                .count()
        })
        .sum();
    assert_eq!(before.matches("FigurePlan").count(), written);

    let (_tmp, a, b) = original_and_formatted("tests/check/ok");
    for spec in all(&a) {
        let name = spec.file_name().unwrap();
        let before = checked_plan(&a, std::slice::from_ref(&spec));
        assert_eq!(
            before,
            checked_plan(&b, &[b.join(name)]),
            "{name:?}: the plan changed"
        );
        assert!(
            before.contains("FigurePlan"),
            "{name:?}: no figure was checked"
        );
    }
}

#[test]
fn the_examples_build_to_the_same_files_after_formatting() {
    let (_tmp, a, b) = original_and_formatted("specs-examples");
    let built = |dir: &Path| {
        let out = dir.join("built");
        let report = build::build(
            &BuildOptions {
                paths: vec![dir.to_path_buf()],
                out: Some(out.clone()),
                ..BuildOptions::default()
            },
            &build::NoProgress,
        )
        .unwrap();
        assert!(!report.has_errors(), "{:?}", report.diagnostics);
        out
    };
    let (out_a, out_b) = (built(&a), built(&b));
    let mut compared = 0;
    for file in std::fs::read_dir(&out_a).unwrap() {
        let name = file.unwrap().file_name();
        // The PDF writer orders its resource dictionaries differently in every run, so its
        // bytes are not comparable; the PDF is drawn from the same drawing as the SVG.
        if name.to_string_lossy().ends_with(".pdf") {
            continue;
        }
        let left = std::fs::read(out_a.join(&name)).unwrap();
        let right = std::fs::read(out_b.join(&name)).unwrap();
        assert!(left == right, "{name:?} differs after formatting");
        compared += 1;
    }
    // 15 figures, each with at least an SVG or PNG and a summary.
    assert!(compared >= 30, "only {compared} files compared");
}

fn figura(dir: &Path, args: &[&str]) -> (i32, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_figura"))
        .args(args)
        .current_dir(dir)
        .output()
        .unwrap();
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
    )
}

#[test]
fn check_mode_lists_files_that_would_change_and_writes_nothing() {
    let tmp = tempfile::tempdir().unwrap();
    let messy = "figure f {\n    from d ;  box\n}\n";
    std::fs::write(tmp.path().join("messy.figura"), messy).unwrap();
    std::fs::write(tmp.path().join("tidy.figura"), "figure g {\n  from d\n}\n").unwrap();

    let (code, stdout) = figura(tmp.path(), &["fmt", "--check"]);
    assert_eq!(code, 1);
    assert!(stdout.contains("messy.figura"), "{stdout}");
    assert!(!stdout.contains("tidy.figura"), "{stdout}");
    let after_check = std::fs::read_to_string(tmp.path().join("messy.figura")).unwrap();
    assert_eq!(after_check, messy, "--check wrote the file");

    let (code, _) = figura(tmp.path(), &["fmt"]);
    assert_eq!(code, 0);
    let formatted = std::fs::read_to_string(tmp.path().join("messy.figura")).unwrap();
    assert_eq!(formatted, "figure f {\n  from d\n  box\n}\n");
    // No temporary file is left behind by the atomic write.
    let names: Vec<String> = std::fs::read_dir(tmp.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names.len(), 2, "{names:?}");

    let (code, stdout) = figura(tmp.path(), &["fmt", "--check"]);
    assert_eq!(code, 0, "{stdout}");
    assert!(stdout.is_empty(), "{stdout}");
}

#[test]
fn check_mode_fails_on_syntax_errors_and_bad_paths() {
    let tmp = tempfile::tempdir().unwrap();
    let broken = "figure f {\n  from (\n";
    std::fs::write(tmp.path().join("broken.figura"), broken).unwrap();
    let (code, _) = figura(tmp.path(), &["fmt", "--check"]);
    assert_eq!(code, 1);
    let (code, _) = figura(tmp.path(), &["fmt"]);
    assert_eq!(code, 1);
    let unchanged = std::fs::read_to_string(tmp.path().join("broken.figura")).unwrap();
    assert_eq!(unchanged, broken);
    let (code, _) = figura(tmp.path(), &["fmt", "--check", "no_such_folder"]);
    assert_eq!(code, 2);
}

#[test]
fn the_examples_are_in_the_canonical_layout() {
    let report =
        format::format_paths(&[common::root().join("specs-examples")], Mode::Check).unwrap();
    assert!(report.diagnostics.is_empty(), "{:?}", report.diagnostics);
    assert!(
        report.changed.is_empty(),
        "run `figura fmt specs-examples`: {:?}",
        report.changed
    );
}
