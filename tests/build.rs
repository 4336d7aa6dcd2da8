//! The checker rules that depend on the data, applied when a figure is built: a subject with
//! two values in one cell under `lines` (F0109) and zeros under `scale(log)` (F0114). Each
//! rejected case asserts the code, the words of the message (subject, cell, rows) and where its
//! label points; each has a near-miss that builds. The data are small invented tables; the
//! expected numbers are counted by hand beside each check.

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
