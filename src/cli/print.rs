//! What the commands print: diagnostics, closing lines, the out-of-date list, the figure table.
//!
//! Diagnostics, progress and closing lines go to standard error; `figura list`'s table and
//! `figura new`'s file list go to standard output.

use std::io::{IsTerminal, Write as _};
use std::time::Duration;

use crate::build::paths::display_path;
use crate::build::{BuildReport, FigureState};
use crate::diag::{Diagnostic, SourceMap};
use crate::report::{self, MessageFormat};

use super::Format;

/// Prints diagnostics in the chosen format on standard error.
pub fn diagnostics(diags: &[Diagnostic], sources: &SourceMap, format: Format) {
    let format = match format {
        Format::Json => MessageFormat::Json,
        Format::Human => MessageFormat::Human {
            colour: std::io::stderr().is_terminal(),
        },
    };
    let text = report::render_all(diags, sources, format);
    let mut err = std::io::stderr().lock();
    let _ = err.write_all(text.as_bytes());
}

/// Prints a run's diagnostics, then the failures that are not diagnostics.
pub fn report(report: &BuildReport, format: Format) {
    diagnostics(&report.diagnostics, &report.sources, format);
    for failure in &report.failures {
        eprintln!("error: {failure}");
    }
}

fn plural(n: usize, one: &str, many: &str) -> String {
    format!("{n} {}", if n == 1 { one } else { many })
}

/// "2 errors, 1 warning"; failures that are not diagnostics (I/O, limits) count as errors.
fn diagnostic_counts(report: &BuildReport) -> String {
    let diagnostic_errors = report.diagnostics.iter().filter(|d| d.is_error()).count();
    let warnings = report.diagnostics.len() - diagnostic_errors;
    let errors = diagnostic_errors + report.failures.len();
    format!(
        "{}, {}",
        plural(errors, "error", "errors"),
        plural(warnings, "warning", "warnings")
    )
}

fn seconds(elapsed: Duration) -> String {
    format!("{:.2} s", elapsed.as_secs_f64())
}

/// `figura build`'s closing line: built, up to date and failed counts, and the time.
pub fn build_line(report: &BuildReport, elapsed: Duration) {
    eprintln!(
        "{} built, {} up to date, {} failed in {}; {}",
        report.count(FigureState::Built),
        report.count(FigureState::UpToDate),
        report.count(FigureState::Failed),
        seconds(elapsed),
        diagnostic_counts(report)
    );
}

/// `figura check`'s closing line.
pub fn check_line(report: &BuildReport, elapsed: Duration) {
    eprintln!(
        "{} checked, {} failed in {}; {}",
        plural(report.count(FigureState::Built), "figure", "figures"),
        report.count(FigureState::Failed),
        seconds(elapsed),
        diagnostic_counts(report)
    );
}

/// `figura build --check`: one line per figure or numbers file that is not up to date, and
/// per orphaned figure.
pub fn out_of_date(report: &BuildReport) {
    for f in report
        .figures
        .iter()
        .filter(|f| f.state != FigureState::UpToDate)
    {
        eprintln!(
            "{:<8} {} ({})",
            f.state.as_str(),
            f.name,
            display_path(&f.spec).display()
        );
    }
    for n in report
        .numbers
        .iter()
        .filter(|n| n.state != FigureState::UpToDate)
    {
        eprintln!(
            "{:<8} numbers ({})",
            n.state.as_str(),
            in_folder(&n.dir, &n.files)
        );
    }
    for o in &report.orphans {
        eprintln!("orphaned {} ({})", o.name, in_folder(&o.dir, &o.files));
    }
}

/// `out/a.svg, a.png`: the first file with its folder, the others by name.
fn in_folder(dir: &std::path::Path, files: &[String]) -> String {
    match files.split_first() {
        Some((first, rest)) => {
            std::iter::once(display_path(&dir.join(first)).display().to_string())
                .chain(rest.iter().cloned())
                .collect::<Vec<_>>()
                .join(", ")
        }
        None => display_path(dir).display().to_string(),
    }
}

/// `figura build`: the orphaned figures whose files were removed.
pub fn removed(report: &BuildReport) {
    for o in &report.orphans {
        eprintln!("removed  {} ({})", o.name, in_folder(&o.dir, &o.files));
    }
}

/// `figura build --check`'s closing line (numbers files count as one item per folder).
pub fn status_line(report: &BuildReport, elapsed: Duration) {
    let count = |state: FigureState| {
        report.count(state) + report.numbers.iter().filter(|n| n.state == state).count()
    };
    eprintln!(
        "{} up to date, {} stale, {} missing, {} failing, {} orphaned in {}",
        count(FigureState::UpToDate),
        count(FigureState::Stale),
        count(FigureState::Missing),
        count(FigureState::Failed),
        report.orphans.len(),
        seconds(elapsed)
    );
}

/// `figura list`: one row per figure, columns aligned, on standard output.
pub fn figure_table(report: &BuildReport) {
    let header = ["figure", "spec", "data", "state"].map(str::to_string);
    let rows: Vec<[String; 4]> = report
        .figures
        .iter()
        .map(|f| {
            [
                f.name.clone(),
                display_path(&f.spec).display().to_string(),
                f.data
                    .as_deref()
                    .map_or("-".to_string(), |d| display_path(d).display().to_string()),
                f.state.as_str().to_string(),
            ]
        })
        .collect();
    let mut widths = header.clone().map(|h| h.chars().count());
    for row in &rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(cell.chars().count());
        }
    }
    let mut out = std::io::stdout().lock();
    for row in std::iter::once(&header).chain(&rows) {
        let line = row
            .iter()
            .zip(widths)
            .map(|(cell, w)| format!("{cell:<w$}"))
            .collect::<Vec<_>>()
            .join("  ");
        let _ = writeln!(out, "{}", line.trim_end());
    }
}
