//! The checker: syntax trees + codebooks → a checked [`Program`] of figure plans.
//!
//! It resolves every name, applies the scale rules of the language reference (§4) and reads
//! every option into typed values. It reports all problems of all files in one run (errors
//! and warnings) and never stops at the first.
//!
//! Invariant: the checker reads no data file. Rules that depend on the data's values are
//! applied when the numbers are computed, using the spans kept in the plan.

mod axes;
mod codebook;
mod colours;
mod display;
mod figure;
mod filter;
pub mod layer;
pub mod plan;
mod terms;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use crate::diag::{Code, Diagnostic, SourceId, Span};
use crate::syntax::ast::{Item, SpecFile};

pub use axes::AXIS_OPTIONS;
pub use codebook::{REPLICATES_OPTIONS, VARIABLE_OPTIONS};
pub use figure::{FigureDefaults, DEFAULT_DPI, DEFAULT_SIZE_MM, DPI_LIMITS, SIZE_LIMITS_MM};
pub use plan::*;

/// One parsed spec file, with the files it includes (indices into the same list).
#[derive(Debug, Clone)]
pub struct SpecUnit {
    pub path: PathBuf,
    pub ast: SpecFile,
    /// Files whose data blocks this file sees (its includes, transitively).
    pub sees: Vec<usize>,
    /// Whether this file's figures are to be built (included-only files contribute data).
    pub build_figures: bool,
}

/// The most checker diagnostics shown per spec file; the rest are counted in one more
/// diagnostic ([`Code::MoreErrors`]), so a file of thousands of broken statements gives a
/// short report.
pub const MAX_DIAGNOSTICS_PER_FILE: usize = 100;

/// Checks every unit with the language's default formats and dpi; see [`check_with`].
pub fn check(units: &[SpecUnit]) -> (Program, Vec<Diagnostic>) {
    check_with(units, &FigureDefaults::default())
}

/// Checks every unit; returns the program (figures that passed) and the diagnostics, at most
/// [`MAX_DIAGNOSTICS_PER_FILE`] per file in full. Figures that give no `formats` or `dpi` take
/// them from `defaults`.
pub fn check_with(units: &[SpecUnit], defaults: &FigureDefaults) -> (Program, Vec<Diagnostic>) {
    let mut diags = Vec::new();
    let mut program = Program::default();
    // Codebooks of every file, indexed by file.
    let mut books_of_file: Vec<Vec<usize>> = Vec::with_capacity(units.len());
    // Whether each codebook had an error: its figures are not built (§11).
    let mut book_failed: Vec<bool> = Vec::new();
    for unit in units {
        let dir = unit.path.parent().unwrap_or(Path::new("."));
        let mut mine = Vec::new();
        for item in &unit.ast.items {
            let Item::Block(block) = item else { continue };
            if block.kind.name != "data" {
                continue;
            }
            let errors_before = figure::count_errors(&diags);
            if let Some(book) = codebook::check_data_block(block, dir, &mut diags) {
                mine.push(program.codebooks.len());
                program.codebooks.push(book);
                book_failed.push(figure::count_errors(&diags) > errors_before);
            }
        }
        books_of_file.push(mine);
    }
    let mut figure_names: BTreeMap<String, Span> = BTreeMap::new();
    for (idx, unit) in units.iter().enumerate() {
        let visible = visible_books(idx, units, &books_of_file, &program.codebooks, &mut diags);
        for item in &unit.ast.items {
            let Item::Block(block) = item else { continue };
            match block.kind.name.as_str() {
                "data" => {}
                "figure" if unit.build_figures => {
                    if let Some(first) = figure_names.get(&block.name.name) {
                        diags.push(
                            Diagnostic::new(Code::DuplicateName, format!("two figures are named `{}`", block.name.name))
                                .with_label(block.name.span, "named again here")
                                .with_label(*first, "first named here")
                                .with_help("figure names become file names; give each figure its own name"),
                        );
                        continue;
                    }
                    figure_names.insert(block.name.name.clone(), block.name.span);
                    let books: Vec<(usize, &Codebook)> = visible.iter().map(|&i| (i, &program.codebooks[i])).collect();
                    let plan = figure::check_figure(block, &unit.path, &books, defaults, &mut diags);
                    // A figure whose data block has an error is not built either: the error is
                    // reported at the data block.
                    if let Some(plan) = plan.filter(|p| !book_failed[p.data]) {
                        program.figures.push(plan);
                    }
                }
                "figure" => {}
                other => diags.push(
                    Diagnostic::new(Code::UnknownBlock, format!("`{other}` is not a kind of block"))
                        .with_label(block.kind.span, "unknown block")
                        .with_help("a spec holds `data NAME \"file.csv\" { ... }` and `figure NAME { ... }` blocks"),
                ),
            }
        }
    }
    (
        program,
        cap_per_file(diags, units, MAX_DIAGNOSTICS_PER_FILE),
    )
}

/// Keeps the first `max` diagnostics of each file (by the file of their first label), in
/// order, and sums up the rest of a file in one diagnostic after them.
fn cap_per_file(diags: Vec<Diagnostic>, units: &[SpecUnit], max: usize) -> Vec<Diagnostic> {
    let mut shown: BTreeMap<SourceId, usize> = BTreeMap::new();
    let mut hidden: BTreeMap<SourceId, Vec<Diagnostic>> = BTreeMap::new();
    let mut out = Vec::new();
    for d in diags {
        let Some(source) = d.span().map(|s| s.source) else {
            out.push(d);
            continue;
        };
        let n = shown.entry(source).or_default();
        if *n < max {
            *n += 1;
            out.push(d);
        } else {
            hidden.entry(source).or_default().push(d);
        }
    }
    let paths: BTreeMap<SourceId, &Path> = units
        .iter()
        .filter_map(|u| Some((first_span(&u.ast)?.source, u.path.as_path())))
        .collect();
    for (source, rest) in hidden {
        let path = paths.get(&source).copied().unwrap_or(Path::new("spec"));
        out.push(more_errors(path, &rest, max));
    }
    out
}

fn first_span(ast: &SpecFile) -> Option<Span> {
    ast.items.first().map(|item| match item {
        Item::Include(inc) => inc.span,
        Item::Block(b) => b.span,
    })
}

/// "a.figura: 812 more problems not shown (F0201: 800, F0202: 12)".
fn more_errors(path: &Path, rest: &[Diagnostic], max: usize) -> Diagnostic {
    let mut by_code: BTreeMap<Code, usize> = BTreeMap::new();
    for d in rest {
        *by_code.entry(d.code).or_default() += 1;
    }
    let counts = by_code
        .iter()
        .map(|(code, n)| format!("{code}: {n}"))
        .collect::<Vec<_>>()
        .join(", ");
    let message = format!(
        "{}: {} more problems not shown ({counts})",
        path.display(),
        rest.len()
    );
    let mut summary = Diagnostic::new(Code::MoreErrors, message);
    if !rest.iter().any(Diagnostic::is_error) {
        // Only warnings are hidden: the summary of them does not fail the run.
        summary.severity = crate::diag::Severity::Warning;
    }
    summary.with_file(path).with_help(format!(
        "only the first {max} problems of a spec file are shown; fix them and run again"
    ))
}

/// Codebooks visible from a file: its own and those of the files it sees; names must be unique.
fn visible_books(
    idx: usize,
    units: &[SpecUnit],
    books_of_file: &[Vec<usize>],
    books: &[Codebook],
    diags: &mut Vec<Diagnostic>,
) -> Vec<usize> {
    let mut out: Vec<usize> = books_of_file[idx].clone();
    for &other in &units[idx].sees {
        if other != idx {
            out.extend(books_of_file[other].iter().copied());
        }
    }
    let mut seen: BTreeMap<&str, usize> = BTreeMap::new();
    out.retain(|&b| match seen.get(books[b].name.as_str()) {
        Some(&first) => {
            if books_of_file[idx].contains(&b) {
                diags.push(
                    Diagnostic::new(
                        Code::DuplicateName,
                        format!("two data blocks are named `{}`", books[b].name),
                    )
                    .with_label(books[b].span, "named again here")
                    .with_label(books[first].span, "first declared here")
                    .with_help("give each data block its own name"),
                );
            }
            false
        }
        None => {
            seen.insert(books[b].name.as_str(), b);
            true
        }
    });
    out
}
