//! The checker, case by case: `tests/check/{err,warn,ok}/NNN_name.figura`, each with the
//! expected diagnostics beside it in `NNN_name.expected` (regenerate with `UPDATE_EXPECT=1`).
//!
//! Every rule of the language reference §4 has a rejected case in `err/` (asserting its code
//! and span) and an accepted near-miss in `ok/`. The rules are the language contract itself
//! (common practice of measurement theory: Stevens 1946), so the expectations are ours.

mod common;

use std::path::Path;

use figura::check::{check, SpecUnit};
use figura::diag::{Code, Diagnostic, SourceMap};
use figura::syntax;

/// The diagnostics of one case, its sources, and how many of its figures passed the checker.
fn run(path: &Path) -> (Vec<Diagnostic>, SourceMap, usize) {
    let mut sources = SourceMap::new();
    let text = std::fs::read_to_string(path).unwrap();
    let id = sources.add(path, text);
    let ast = match syntax::parse(id, sources.text(id)) {
        Ok(ast) => ast,
        Err(diags) => panic!("{} does not parse: {diags:?}", path.display()),
    };
    let unit = SpecUnit {
        path: path.to_path_buf(),
        ast,
        sees: Vec::new(),
        build_figures: true,
    };
    let (program, diags) = check(&[unit]);
    (diags, sources, program.figures.len())
}

/// One line per diagnostic: code, span as line:col-line:col, message; then its help.
fn render(diags: &[Diagnostic], sources: &SourceMap) -> String {
    let mut out = String::new();
    for d in diags {
        let span = d.span().expect("every checker diagnostic has a span");
        let (l1, c1) = sources.line_col(span.source, span.start);
        let (l2, c2) = sources.line_col(span.source, span.end);
        out.push_str(&format!(
            "{} {l1}:{c1}-{l2}:{c2} {} `{}`\n",
            d.code,
            d.message,
            sources.slice(span)
        ));
        if let Some(h) = &d.help {
            out.push_str(&format!("  help: {h}\n"));
        }
    }
    out
}

fn cases(folder: &str) -> Vec<std::path::PathBuf> {
    let files = common::files_with_ext(&common::root().join("tests/check").join(folder), "figura");
    assert!(!files.is_empty(), "no cases in tests/check/{folder}");
    files
}

#[test]
fn rejected_cases_report_their_errors_at_the_right_place() {
    for path in cases("err") {
        let (diags, sources, _) = run(&path);
        assert!(
            diags.iter().any(Diagnostic::is_error),
            "{} was accepted",
            path.display()
        );
        common::expect_file(&path.with_extension("expected"), &render(&diags, &sources));
    }
}

#[test]
fn warned_cases_build_with_a_warning() {
    for path in cases("warn") {
        let (diags, sources, planned) = run(&path);
        // A warning never stops a figure: it is checked and will be built.
        assert!(planned > 0, "{} was not planned", path.display());
        assert!(
            !diags.iter().any(Diagnostic::is_error),
            "{} has errors: {}",
            path.display(),
            render(&diags, &sources)
        );
        assert!(!diags.is_empty(), "{} gave no warning", path.display());
        common::expect_file(&path.with_extension("expected"), &render(&diags, &sources));
    }
}

#[test]
fn near_misses_are_accepted_without_warnings() {
    for path in cases("ok") {
        let (diags, sources, _) = run(&path);
        assert!(
            diags.is_empty(),
            "{} was not accepted cleanly:\n{}",
            path.display(),
            render(&diags, &sources)
        );
    }
}

#[test]
fn every_rule_of_the_contract_has_a_rejected_case() {
    // Every rule of §8 (the F01xx codes of the one table of codes), except the rules that depend
    // on the data's values: those are found while computing and have their cases in
    // tests/build.rs and tests/features.rs; a figure too full for its size is found while it
    // is laid out (tests/layout.rs).
    let data_dependent = [
        Code::SubjectRepeatedInCell,
        Code::LogOfZero,
        Code::TooManyColours,
        Code::EmptyFilter,
        Code::BetweenVariesWithinSubject,
        Code::WithinNeverRepeated,
        Code::BeyondDoubleRange,
        Code::FigureCrowded,
        Code::SmoothTooLarge,
    ];
    let all: String = cases("err")
        .iter()
        .map(|p| std::fs::read_to_string(p.with_extension("expected")).unwrap_or_default())
        .collect();
    for code in Code::ALL.iter().filter(|c| c.as_str().starts_with("F01")) {
        if !data_dependent.contains(code) {
            assert!(
                all.contains(code.as_str()),
                "no rejected case produces {code}"
            );
        }
    }
}
