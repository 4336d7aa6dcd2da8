//! One figure, from its checked plan and its table to the bytes of every output file.
//!
//! Pure apart from the CPU: nothing here touches the file system, so figures can be made on
//! any thread in any order and give the same bytes. A validating run stops after layout: it
//! finds every data and computation error without drawing or encoding anything. A panic while
//! making one figure is that figure's failure, never the run's.

use std::any::Any;
use std::cell::{Cell, RefCell};
use std::panic::{self, AssertUnwindSafe};

use std::collections::BTreeSet;

use crate::alt;
use crate::check::plan::VarId;
use crate::check::{Codebook, FigurePlan, Scale};
use crate::compute::{self, ComputeError};
use crate::data::{ColumnKind, ColumnSpec, Table, TableSpec};
use crate::diag::Diagnostic;
use crate::export::{self, ExportError, Provenance};
use crate::layout;
use crate::markup;

use super::journal::Journal;
use super::BuildError;

/// One figure's finished outputs, in memory.
pub struct FigureOutputs {
    /// (file name, bytes), in the order of [`output_kinds`].
    pub files: Vec<(String, Vec<u8>)>,
    /// The summary rows, for the manuscript numbers.
    pub summary: Vec<compute::SummaryRow>,
    /// Warnings found while making it (too many dots, a crowded figure built anyway).
    pub warnings: Vec<Diagnostic>,
}

/// Why one figure could not be made.
pub enum FigureError {
    /// A problem in the data, found while computing (e.g. a subject twice in one cell).
    Data(Vec<Diagnostic>),
    /// A limit or a broken promise between stages.
    Build(BuildError),
}

/// The kinds of output file a figure can have.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OutputKind {
    Svg,
    Png,
    Pdf,
    Tiff,
    Summary,
    /// The alt text: what the figure shows, in plain sentences ([`crate::alt`]).
    AltText,
}

impl OutputKind {
    pub const ALL: [OutputKind; 6] = [
        OutputKind::Svg,
        OutputKind::Png,
        OutputKind::Pdf,
        OutputKind::Tiff,
        OutputKind::Summary,
        OutputKind::AltText,
    ];

    /// The file name of this output of figure `figure`.
    pub fn file_name(self, figure: &str) -> String {
        let ext = match self {
            OutputKind::Svg => "svg",
            OutputKind::Png => "png",
            OutputKind::Pdf => "pdf",
            OutputKind::Tiff => "tiff",
            OutputKind::Summary => "summary.csv",
            OutputKind::AltText => "alt.txt",
        };
        format!("{figure}.{ext}")
    }
}

/// The outputs a plan asks for, in a fixed order: svg, png, pdf, tiff, then always the summary
/// and the alt text.
pub fn output_kinds(plan: &FigurePlan) -> Vec<OutputKind> {
    let f = plan.formats;
    [
        (f.svg, OutputKind::Svg),
        (f.png, OutputKind::Png),
        (f.pdf, OutputKind::Pdf),
        (f.tiff, OutputKind::Tiff),
        (true, OutputKind::Summary),
        (true, OutputKind::AltText),
    ]
    .into_iter()
    .filter_map(|(wanted, kind)| wanted.then_some(kind))
    .collect()
}

/// The file names of a plan's outputs, in the order of [`output_kinds`].
pub fn output_names(plan: &FigurePlan) -> Vec<String> {
    output_kinds(plan)
        .into_iter()
        .map(|k| k.file_name(&plan.name))
        .collect()
}

/// The checks a figure is made under, beyond the language's own.
#[derive(Debug, Clone, Default)]
pub struct FigureChecks {
    /// Build a figure whose content does not fit its size, crowded, with a warning (W0003)
    /// instead of an error (F0124).
    pub allow_crowding: bool,
    /// A journal's artwork targets, checked on the laid-out figure (`[journal]`).
    pub journal: Option<Journal>,
}

/// What a figure is made for.
pub enum Purpose {
    /// Every output file, each recording this provenance.
    Files(Provenance),
    /// Only the checks: compute and lay out, then stop (no file is drawn or encoded).
    Validate,
}

/// Computes and lays out one figure and, unless validating, renders its output files (in
/// memory). A figure whose content does not fit its size fails (F0124), unless
/// `checks.allow_crowding` builds it crowded with a warning (W0003); a journal's targets add
/// warnings (W0008–W0011).
///
/// A panic while making the figure (a bug) is caught and returned as that figure's
/// [`BuildError::Internal`] failure, naming the figure, so the other figures of the run are
/// still made and recorded. See [`report_figure_panics_as_failures`] for the message.
pub fn render_figure(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
    purpose: &Purpose,
    checks: &FigureChecks,
) -> Result<FigureOutputs, FigureError> {
    let caught = IN_FIGURE.with(|inside| {
        let was = inside.replace(true);
        let result = panic::catch_unwind(AssertUnwindSafe(|| {
            make_outputs(plan, book, table, purpose, checks)
        }));
        inside.set(was);
        result
    });
    caught.unwrap_or_else(|payload| {
        let what = LAST_PANIC
            .with(|last| last.borrow_mut().take())
            .unwrap_or_else(|| panic_text(payload.as_ref()).to_owned());
        Err(FigureError::Build(BuildError::Internal(format!(
            "figure `{}` could not be made: {what}",
            plan.name
        ))))
    })
}

thread_local! {
    /// Whether this thread is making a figure (its panics become the figure's failure).
    static IN_FIGURE: Cell<bool> = const { Cell::new(false) };
    /// The message and place of the last panic inside a figure on this thread.
    static LAST_PANIC: RefCell<Option<String>> = const { RefCell::new(None) };
}

/// Makes panics inside [`render_figure`] silent on standard error, their message and place
/// kept for the figure's failure instead; other panics are printed as before. For programs
/// whose standard error must hold only their own output (the command line, whose JSON
/// messages are one object per line). Call it once, before any figure is made.
pub fn report_figure_panics_as_failures() {
    let previous = panic::take_hook();
    panic::set_hook(Box::new(move |info| {
        if IN_FIGURE.with(Cell::get) {
            let place = info
                .location()
                .map_or(String::new(), |l| format!(" ({}:{})", l.file(), l.line()));
            let text = format!("{}{place}", panic_text(info.payload()));
            LAST_PANIC.with(|last| *last.borrow_mut() = Some(text));
        } else {
            previous(info);
        }
    }));
}

/// The text a panic was given, when it was given one.
fn panic_text(payload: &(dyn Any + Send)) -> &str {
    payload
        .downcast_ref::<&str>()
        .copied()
        .or_else(|| payload.downcast_ref::<String>().map(String::as_str))
        .unwrap_or("a panic without a message")
}

fn make_outputs(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
    purpose: &Purpose,
    checks: &FigureChecks,
) -> Result<FigureOutputs, FigureError> {
    let allow_crowding = checks.allow_crowding;
    let numbers = compute::compute(plan, book, table).map_err(|e| match e {
        ComputeError::Data(d) => {
            FigureError::Data(d.into_iter().map(|d| naming_data_file(d, table)).collect())
        }
        ComputeError::Internal(m) => FigureError::Build(BuildError::Internal(m)),
    })?;
    let mut warnings = numbers.warnings.clone();
    let laid = layout::layout(plan, &numbers);
    if let Some(crowding) = &laid.crowding {
        let diagnostic = crowding.diagnostic(plan, allow_crowding);
        if !allow_crowding {
            warnings.push(diagnostic);
            return Err(FigureError::Data(warnings));
        }
        warnings.push(diagnostic);
    }
    let mut scene = laid.scene;
    if let Some(journal) = &checks.journal {
        warnings.extend(super::journal::check(plan, &scene, journal));
    }
    // Files without a title still tell readers which figure they are.
    scene.title.get_or_insert_with(|| plan.name.clone());
    let provenance = match purpose {
        Purpose::Files(p) => p,
        Purpose::Validate => {
            scene.validate().map_err(|e| internal(e.into()))?;
            if plan.formats.png || plan.formats.tiff {
                // The raster limits, without drawing.
                export::png_pixel_size(scene.width_mm, scene.height_mm, f64::from(plan.dpi))
                    .map_err(limit)?;
            }
            return Ok(FigureOutputs {
                files: Vec::new(),
                summary: numbers.summary,
                warnings,
            });
        }
    };
    let alt_text = alt::describe(plan, book, &numbers);
    // Screen readers read the caption (when there is one), then what the figure shows.
    scene.description = Some(match &plan.caption {
        Some(caption) => format!("{} {alt_text}", markup::plain(caption)),
        None => alt_text.clone(),
    });
    let rendered = export::render(&scene)
        .map_err(internal)?
        .with_provenance(provenance.clone());
    let dpi = f64::from(plan.dpi);
    let text = plan.formats.text;
    let mut files = Vec::new();
    for kind in output_kinds(plan) {
        let bytes = match kind {
            OutputKind::Svg => rendered.svg(text).map_err(internal)?.into_bytes(),
            OutputKind::Png => rendered.png(dpi).map_err(limit)?,
            OutputKind::Pdf => rendered.pdf(text).map_err(internal)?,
            OutputKind::Tiff => rendered.tiff(dpi).map_err(limit)?,
            OutputKind::Summary => compute::summary::to_csv(&numbers.summary).into_bytes(),
            OutputKind::AltText => format!("{alt_text}\n").into_bytes(),
        };
        files.push((kind.file_name(&plan.name), bytes));
    }
    Ok(FigureOutputs {
        files,
        summary: numbers.summary,
        warnings,
    })
}

/// A failure of drawing that is a bug, not the user's doing.
fn internal(e: ExportError) -> FigureError {
    FigureError::Build(BuildError::Internal(e.to_string()))
}

/// A failure of drawing that a smaller size or dpi avoids (raster limits).
fn limit(e: ExportError) -> FigureError {
    FigureError::Build(BuildError::Limit(e.to_string()))
}

/// A problem found in the data's values names the data file: when none of its labels points
/// into the file (they point at the spec), the file is attached, so the row numbers of the
/// message can be found.
fn naming_data_file(d: Diagnostic, table: &Table) -> Diagnostic {
    if d.file.is_some() {
        d
    } else {
        d.with_file(table.path())
    }
}

/// The data stage's view of a codebook, reading every declared column.
pub fn table_spec(book: &Codebook) -> TableSpec {
    table_spec_reading(book, &(0..book.vars.len()).map(VarId).collect())
}

/// The data stage's view of a codebook, reading the cells of the variables in `read` only
/// (the others are only looked for in the header).
pub fn table_spec_reading(book: &Codebook, read: &BTreeSet<VarId>) -> TableSpec {
    TableSpec {
        path: book.path.clone(),
        path_span: book.path_span,
        format: book.format.clone(),
        missing: book.missing.clone(),
        columns: book
            .vars
            .iter()
            .enumerate()
            .map(|(i, v)| ColumnSpec {
                name: v.name.clone(),
                header: v.column.clone(),
                decl_span: v.span,
                read: read.contains(&VarId(i)),
                kind: match v.scale {
                    Scale::Id => ColumnKind::Id,
                    Scale::Nominal | Scale::Ordinal => ColumnKind::Categorical {
                        levels: v.levels.clone(),
                        ordered: v.scale == Scale::Ordinal,
                    },
                    Scale::Interval | Scale::Ratio => ColumnKind::Numeric {
                        ratio: v.scale == Scale::Ratio,
                    },
                },
            })
            .collect(),
    }
}
