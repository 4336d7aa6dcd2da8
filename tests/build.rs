//! The checker rules that depend on the data, applied when a figure is built: a subject with
//! two values in one cell under `lines` (F0109), zeros under `scale(log)` (F0114), a filter that
//! keeps no rows (F0120), the declared design against the data (F0121, F0122) and statistics
//! beyond the range of doubles (F0123); and that every error of a figure, of every family of
//! codes, stops that figure's outputs (§11). Each rejected case asserts the code, the words of
//! the message (subject, cell, rows) and where its label points; each has a near-miss that
//! builds. The data are small invented tables; the expected numbers are counted by hand beside
//! each check.

mod common;

use std::path::{Path, PathBuf};

use figura::build::{self, BuildOptions, BuildReport, FigureState, NoProgress};
use figura::diag::Diagnostic;

/// A folder with one spec and one data file, built into `out/`.
struct Case {
    dir: tempfile::TempDir,
}

impl Case {
    fn new(spec: &str, data_name: &str, data: &str) -> Case {
        let dir = tempfile::tempdir().unwrap();
        std::fs::write(dir.path().join("figures.figura"), spec).unwrap();
        std::fs::write(dir.path().join(data_name), data).unwrap();
        Case { dir }
    }

    fn out(&self) -> PathBuf {
        self.dir.path().join("out")
    }

    fn build(&self) -> BuildReport {
        let options = BuildOptions {
            paths: vec![self.dir.path().join("figures.figura")],
            out: Some(self.out()),
            ..BuildOptions::default()
        };
        build::build(&options, &NoProgress).expect("the build runs")
    }

    /// Builds and returns the only diagnostic, with its label's line and column in the spec.
    fn single_error(&self) -> (Diagnostic, (usize, usize)) {
        let report = self.build();
        assert_eq!(
            report.diagnostics.len(),
            1,
            "expected one diagnostic: {:#?}",
            report.diagnostics
        );
        let d = report.diagnostics[0].clone();
        let span = d.span().expect("the diagnostic has a span");
        let at = report.sources.line_col(span.source, span.start);
        assert!(
            report.sources.path(span.source).ends_with("figures.figura"),
            "the label is in the spec"
        );
        assert_eq!(report.count(FigureState::Failed), 1);
        assert!(
            !self.out().join("joined.svg").exists() && !self.out().join("counts.svg").exists(),
            "a failing figure writes nothing"
        );
        (d, at)
    }

    fn summary(&self, figure: &str) -> String {
        std::fs::read_to_string(self.out().join(format!("{figure}.summary.csv")))
            .expect("the summary is written")
    }
}

fn assert_builds(report: &BuildReport) {
    assert!(
        report.diagnostics.is_empty(),
        "unexpected diagnostics: {:#?}",
        report.diagnostics
    );
    assert!(report.figures.iter().all(|f| f.state == FigureState::Built));
}

const READING_CODEBOOK: &str = r#"data reading "reading.csv" {
  reader: id
  medium: nominal levels("paper", "screen")
  trial: ratio
  speed: ratio
  subject reader
  within medium
REPLICATES}

figure joined {
  from reading
  x medium
  y speed
  points
  lines by(reader)
  mean error(ci(0.95))
}
"#;

/// Reader R2 read twice on paper (two trials). Rows as a spreadsheet numbers them: the header is
/// row 1, R2's paper trials are rows 4 and 6, with a blank line (row 5) between them.
const READING: &str = "reader,medium,trial,speed\n\
R1,paper,1,250\n\
R1,screen,1,231\n\
R2,paper,1,240\n\
\n\
R2,paper,2,262\n\
R2,screen,1,228\n\
R3,paper,1,255\n\
R3,screen,1,230\n";

fn reading(replicates: &str) -> Case {
    Case::new(
        &READING_CODEBOOK.replace("REPLICATES", replicates),
        "reading.csv",
        READING,
    )
}

#[test]
fn a_subject_with_two_values_in_one_cell_under_lines_is_f0109_naming_subject_cell_and_rows() {
    let (d, at) = reading("").single_error();
    assert_eq!(d.code, "F0109");
    assert!(d.is_error());
    assert_eq!(
        d.message,
        "subject \"R2\" has more than one value in cell (x = \"paper\") (data rows 4 and 6)"
    );
    // The label is the `lines` layer: line 15, column 3 of the spec.
    assert_eq!(at, (15, 3));
    assert!(d.help.as_deref().unwrap_or("").contains("replicates"));
}

#[test]
fn declaring_the_trials_as_replicates_builds_and_n_counts_subjects() {
    let case = reading("  replicates trial collapse(mean)\n");
    assert_builds(&case.build());
    let summary = case.summary("joined");
    // Three readers on paper (R2's two trials are one value, their mean 251), three on screen.
    for row in [
        ",points,,paper,n,3",
        ",points,,screen,n,3",
        ",lines,,,n,3",
        ",mean,,paper,n,3",
        // (250 + (240 + 262) / 2 + 255) / 3 = 756 / 3 = 252.
        ",mean,,paper,mean,252",
        // (231 + 228 + 230) / 3 = 689 / 3.
        ",mean,,screen,mean,229.66666666666666",
    ] {
        assert!(
            summary.lines().any(|l| l == row),
            "missing `{row}` in\n{summary}"
        );
    }
}

const PLOTS_SPEC: &str = r#"data plots "plots.csv" {
  plot: id
  mulch: nominal levels("bark", "straw")
  beetles: ratio unit("per trap")
}

figure counts {
  from plots
  x mulch
  y beetles scale(log)
  points
  box
}
"#;

#[test]
fn a_zero_under_a_log_scale_is_f0114_naming_the_row() {
    // The zero is P3's count, row 4 of the file.
    let case = Case::new(
        PLOTS_SPEC,
        "plots.csv",
        "plot,mulch,beetles\nP1,bark,3\nP2,bark,5\nP3,bark,0\nP4,straw,7\nP5,straw,12\n",
    );
    let (d, at) = case.single_error();
    assert_eq!(d.code, "F0114");
    assert_eq!(
        d.message,
        "`beetles` has a zero (data row 4), and a log scale cannot show zero"
    );
    // The label is `scale(log)` on line 10, after `  y beetles `.
    assert_eq!(at, (10, 13));
}

#[test]
fn all_positive_values_under_a_log_scale_build() {
    let case = Case::new(
        PLOTS_SPEC,
        "plots.csv",
        "plot,mulch,beetles\nP1,bark,3\nP2,bark,5\nP3,bark,1\nP4,straw,7\nP5,straw,12\n",
    );
    assert_builds(&case.build());
    let summary = case.summary("counts");
    // Bark: 1, 3, 5 → median 3; straw: 7, 12 → median 9.5.
    assert!(summary.contains(",box,,bark,median,3\n"), "{summary}");
    assert!(summary.contains(",box,,straw,median,9.5\n"), "{summary}");
}

#[test]
fn a_missing_value_under_a_log_scale_is_not_a_zero() {
    // A missing count is dropped and counted, not taken for a zero.
    let case = Case::new(
        PLOTS_SPEC,
        "plots.csv",
        "plot,mulch,beetles\nP1,bark,3\nP2,bark,NA\nP3,bark,1\nP4,straw,7\nP5,straw,12\n",
    );
    assert_builds(&case.build());
    assert!(case.summary("counts").contains(",box,,bark,n_missing,1\n"));
}

/// The examples all build (the data-dependent rules find nothing in them).
#[test]
fn the_examples_pass_the_data_dependent_rules() {
    let out = tempfile::tempdir().unwrap();
    let report = common::build_examples(out.path());
    assert!(!report.figures.is_empty());
    assert!(Path::new(&out.path().join("speed_by_medium.svg")).exists());
}

// ---------------------------------------------------------------------------------------------
// A `where` filter that keeps no rows (F0120).

const FILTERED: &str = r#"data plots "plots.csv" {
  plot: id
  mulch: nominal levels("bark", "straw")
  beetles: ratio
}

figure counts {
  from plots
  x mulch
  y beetles
  where beetles > LIMIT
  points
}
"#;

const PLOTS: &str = "plot,mulch,beetles\nP1,bark,3\nP2,bark,5\nP3,straw,7\nP4,straw,12\n";

#[test]
fn a_filter_that_keeps_no_rows_is_f0120_naming_the_filter() {
    // No count is above 100 (largest 12): nothing would be drawn.
    let case = Case::new(&FILTERED.replace("LIMIT", "100"), "plots.csv", PLOTS);
    let (d, at) = case.single_error();
    assert_eq!(d.code, "F0120");
    assert_eq!(
        d.message,
        "the filter keeps none of the 4 rows of plots.csv"
    );
    // The label is the `where` statement, line 11, column 3.
    assert_eq!(at, (11, 3));
    assert!(!case.out().join("counts.summary.csv").exists());
}

#[test]
fn a_filter_that_keeps_one_row_builds() {
    // Only P4 (12) is above 10.
    let case = Case::new(&FILTERED.replace("LIMIT", "10"), "plots.csv", PLOTS);
    assert_builds(&case.build());
    assert!(case.summary("counts").contains(",points,,straw,n,1\n"));
}

// ---------------------------------------------------------------------------------------------
// The declared design against the data (F0121, F0122), checked once per data block.

const DESIGN: &str = r#"data study "study.csv" {
  person: id
  group: nominal levels("control", "training")
  medium: nominal levels("paper", "screen")
  score: interval
  subject person
  between group
  within medium
}

figure scores {
  from study
  x medium
  y score
  colour group
  points
}
"#;

#[test]
fn a_subject_in_two_groups_of_a_between_factor_is_f0121_naming_subject_file_and_rows() {
    // S2 is listed as control in row 4 and as training in row 5.
    let csv = "person,group,medium,score\n\
               S1,control,paper,10\n\
               S1,control,screen,12\n\
               S2,control,paper,11\n\
               S2,training,screen,15\n\
               S3,training,paper,14\n\
               S3,training,screen,16\n";
    let case = Case::new(DESIGN, "study.csv", csv);
    let report = case.build();
    assert_eq!(report.diagnostics.len(), 1, "{:#?}", report.diagnostics);
    let d = &report.diagnostics[0];
    assert_eq!(d.code, "F0121");
    assert_eq!(
        d.message,
        "subject \"S2\" is listed at two levels of the between factor `group`: \"control\" (study.csv row 4) and \"training\" (study.csv row 5)"
    );
    // The primary label is `group` in `between group` (line 7, column 11); the message names
    // the two rows, and the diagnostic names the data file they are in.
    let span = d.span().unwrap();
    assert_eq!(report.sources.line_col(span.source, span.start), (7, 11));
    assert!(
        d.file.as_deref().is_some_and(|f| f.ends_with("study.csv")),
        "{d:#?}"
    );
    assert_eq!(report.count(FigureState::Failed), 1);
    assert!(!case.out().join("scores.svg").exists());
}

#[test]
fn a_within_factor_at_which_no_subject_was_measured_twice_is_f0122() {
    // Each person read on one medium only: medium splits people into groups.
    let csv = "person,group,medium,score\n\
               S1,control,paper,10\n\
               S2,control,screen,11\n\
               S3,training,paper,14\n\
               S4,training,screen,16\n";
    let case = Case::new(DESIGN, "study.csv", csv);
    let report = case.build();
    assert_eq!(report.diagnostics.len(), 1, "{:#?}", report.diagnostics);
    let d = &report.diagnostics[0];
    assert_eq!(d.code, "F0122");
    assert_eq!(
        d.message,
        "no subject was measured at two levels of the within factor `medium`: subject \"S1\" only at \"paper\" (study.csv row 2), subject \"S2\" only at \"screen\" (study.csv row 3)"
    );
    let span = d.span().unwrap();
    assert_eq!(report.sources.line_col(span.source, span.start), (8, 10));
    assert!(d.help.as_deref().unwrap().contains("between"));
}

#[test]
fn subjects_measured_at_only_some_within_levels_are_missing_cells_not_errors() {
    // S3 read on paper only (a missing cell); S1 and S2 read on both; groups are constant.
    let csv = "person,group,medium,score\n\
               S1,control,paper,10\n\
               S1,control,screen,12\n\
               S2,training,paper,11\n\
               S2,training,screen,15\n\
               S3,training,paper,14\n";
    let case = Case::new(DESIGN, "study.csv", csv);
    assert_builds(&case.build());
    let summary = case.summary("scores");
    // Training on paper: S2 and S3; on screen: S2 only.
    assert!(
        summary.contains(",points,training,paper,n,2\n"),
        "{summary}"
    );
    assert!(
        summary.contains(",points,training,screen,n,1\n"),
        "{summary}"
    );
}

// ---------------------------------------------------------------------------------------------
// Every error of a figure stops that figure's outputs (§11), one case per family of codes; the
// other figures of the file are still built.

/// Builds `spec` (data: PLOTS) and returns the report, asserting that figure `bad` wrote
/// nothing and failed, and that figure `good` was built.
fn bad_writes_nothing(spec: &str, csv: &str) -> BuildReport {
    let case = Case::new(spec, "plots.csv", csv);
    let report = case.build();
    assert!(report.has_errors(), "no error: {:#?}", report.diagnostics);
    for ext in ["svg", "png", "summary.csv"] {
        assert!(
            !case.out().join(format!("bad.{ext}")).exists(),
            "bad.{ext} was written despite {:?}",
            report
                .diagnostics
                .iter()
                .map(|d| d.code.as_str())
                .collect::<Vec<_>>()
        );
    }
    let state = |name: &str| {
        report
            .figures
            .iter()
            .find(|f| f.name == name)
            .map(|f| f.state)
    };
    assert_ne!(state("bad"), Some(FigureState::Built));
    if spec.contains("figure good") {
        assert_eq!(state("good"), Some(FigureState::Built));
        assert!(case.out().join("good.svg").exists());
    }
    report
}

fn plots_spec(block_extra: &str, bad_extra: &str) -> String {
    format!(
        r#"data plots "plots.csv" {{
  plot: id
  mulch: nominal levels("bark", "straw")
  beetles: ratio
{block_extra}}}

figure bad {{
  from plots
  x mulch
  y beetles
  points
{bad_extra}}}

figure good {{
  from plots
  x mulch
  y beetles
  points
  box
}}
"#
    )
}

fn codes(report: &BuildReport) -> Vec<&'static str> {
    report.diagnostics.iter().map(|d| d.code.as_str()).collect()
}

#[test]
fn an_unknown_statement_in_a_figure_stops_its_outputs_f02() {
    let report = bad_writes_nothing(&plots_spec("", "  pionts\n"), PLOTS);
    assert_eq!(codes(&report), ["F0201"]);
}

#[test]
fn a_rule_broken_by_a_figure_stops_its_outputs_f01() {
    let report = bad_writes_nothing(&plots_spec("", "  counts\n"), PLOTS);
    assert!(codes(&report).contains(&"F0116"), "{:?}", codes(&report));
}

#[test]
fn a_syntax_error_in_a_figure_stops_its_outputs_f00() {
    let spec = plots_spec("", "  points jitter (0.2)\n").replace("figure good", "figure other");
    let report = bad_writes_nothing(&spec, PLOTS);
    assert_eq!(codes(&report), ["F0018"]);
}

#[test]
fn an_error_in_the_figure_s_data_block_stops_its_figures() {
    // `levels` on a ratio variable (F0202) in the data block both figures read: neither is
    // built, since the block that declares their variables is wrong.
    let spec =
        plots_spec("  extra: ratio levels(1, 2)\n", "").replace("figure good", "figure bad2");
    let report = bad_writes_nothing(&spec, PLOTS);
    assert_eq!(codes(&report), ["F0202"]);
    assert_eq!(report.count(FigureState::Failed), 2);
}

#[test]
fn a_data_error_stops_the_figures_of_its_file_d00() {
    let spec = plots_spec("", "").replace("figure good", "figure bad2");
    let report = bad_writes_nothing(&spec, "plot,mulch,beetles\nP1,bark,three\n");
    assert_eq!(codes(&report), ["D0012"]);
}

#[test]
fn a_data_dependent_rule_stops_its_figure_f01_in_the_data() {
    let spec = plots_spec("", "  where beetles > 1000\n");
    let report = bad_writes_nothing(&spec, PLOTS);
    assert_eq!(codes(&report), ["F0120"]);
}

#[test]
fn a_warning_does_not_stop_a_figure_w00() {
    let case = Case::new(
        &plots_spec("", "  mean\n").replace("  points\n  mean", "  mean"),
        "plots.csv",
        PLOTS,
    );
    let report = case.build();
    assert_eq!(codes(&report), ["W0001"]);
    assert!(case.out().join("bad.svg").exists());
}

#[test]
fn statistics_beyond_the_range_of_doubles_are_f0123_not_an_internal_error() {
    // Means of values near the largest double are finite (1.5e308), but the t interval around
    // them reaches beyond it: a clear error at the layer, never an internal one.
    let spec = plots_spec("", "  mean error(ci(0.95))\n");
    let csv =
        "plot,mulch,beetles\nP1,bark,1e308\nP2,bark,1.7e308\nP3,straw,1.5e308\nP4,straw,1.6e308\n";
    let case = Case::new(&spec, "plots.csv", csv);
    let report = case.build();
    assert!(report.failures.is_empty(), "{:?}", report.failures);
    assert_eq!(codes(&report), ["F0123"]);
    assert!(
        case.out().join("good.svg").exists(),
        "the box plot of the same values is drawn"
    );
}
