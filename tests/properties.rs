//! Properties over generated specs (proptest; the cases come from `tests/generate`):
//!
//! - the canonical layout is a fixed point and keeps the meaning: for every generated spec,
//!   `figura fmt`'s text formats to itself, and it checks to the same program with the same
//!   diagnostics as the spec it came from;
//! - any generated spec with its data either builds or gives diagnostics — through the whole
//!   library build, files and all — and never panics or fails with an internal error (those
//!   listed in `generate::KNOWN` apart).
//!
//! proptest draws the bytes a case is generated from and shrinks them, so a failure is
//! reported with a small case. The seed is fixed, so every run checks the same cases
//! (`PROPTEST_RNG_SEED=N` searches others); a failing case proptest found is kept in
//! `tests/properties.proptest-regressions` and replayed first.

mod common;
mod generate;

use arbitrary::Unstructured;
use proptest::prelude::*;
use proptest::test_runner::RngSeed;

use figura::build::{self, BuildError, BuildOptions, Mode};
use figura::check;
use figura::diag::SourceMap;
use figura::format;
use figura::syntax;

fn case_of(bytes: &[u8]) -> generate::Case {
    generate::case(&mut Unstructured::new(bytes))
}

/// The checked program and the diagnostic codes of a spec text, spans left out.
fn meaning(text: &str) -> String {
    let mut sources = SourceMap::new();
    let id = sources.add("p.figura", text);
    let ast = syntax::parse(id, text).expect("the text parses");
    let (program, diags) = check::check(&[generate::unit(ast)]);
    let codes: Vec<&str> = diags.iter().map(|d| d.code.as_str()).collect();
    common::without_spans(&format!("{program:?} {codes:?}"))
}

/// `cases` cases from a fixed seed (unless `PROPTEST_RNG_SEED` names another).
fn config(cases: u32) -> ProptestConfig {
    let seed = std::env::var("PROPTEST_RNG_SEED")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(0x00f1_6a2a);
    ProptestConfig {
        cases,
        rng_seed: RngSeed::Fixed(seed),
        ..ProptestConfig::default()
    }
}

proptest! {
    #![proptest_config(config(256))]

    #[test]
    fn formatting_is_a_fixed_point_that_keeps_the_meaning(
        bytes in proptest::collection::vec(any::<u8>(), 0..2048)
    ) {
        let case = case_of(&bytes);
        let mut sources = SourceMap::new();
        let id = sources.add("p.figura", case.spec.as_str());
        let formatted = format::format_source(id, &case.spec)
            .unwrap_or_else(|e| panic!("{e:?}\n{}", case.spec));
        let id2 = sources.add("p.figura", formatted.as_str());
        let again = format::format_source(id2, &formatted).expect("the canonical text formats");
        prop_assert_eq!(&again, &formatted);
        prop_assert_eq!(meaning(&case.spec), meaning(&formatted));
    }
}

proptest! {
    #![proptest_config(config(96))]

    #[test]
    fn any_generated_spec_builds_or_gives_diagnostics(
        bytes in proptest::collection::vec(any::<u8>(), 0..2048)
    ) {
        generate::quiet_figure_panics();
        let case = case_of(&bytes);
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("spec.figura"), &case.spec).unwrap();
        std::fs::write(dir.path().join(&case.data_name), &case.data).unwrap();
        let options = BuildOptions {
            paths: vec![dir.path().to_path_buf()],
            mode: Mode::Build,
            ..BuildOptions::default()
        };
        let report = build::build(&options, &build::NoProgress)
            .unwrap_or_else(|e| panic!("the build stopped: {e}\n{}", case.spec));
        for failure in &report.failures {
            if let BuildError::Internal(m) = failure {
                prop_assert!(generate::is_known(m), "internal error: {}\n{}", m, case.spec);
            }
        }
        let blocks = case.spec.matches("figure fig").count();
        prop_assert_eq!(report.figures.len(), blocks, "every figure has a state");
        let built = report.figures.iter().filter(|f| f.state == build::FigureState::Built).count();
        let failed = report.figures.len() - built;
        prop_assert!(
            failed == 0 || report.has_errors() || !report.failures.is_empty(),
            "{} figures failed without a diagnostic or a failure", failed
        );
    }
}
