//! One figure, from its checked plan and its table to the bytes of every output file.
//!
//! Pure apart from the CPU: nothing here touches the file system, so figures can be made on
//! any thread in any order and give the same bytes. A panic while making one figure is that
//! figure's failure, never the run's.

use std::any::Any;
use std::cell::{Cell, RefCell};
use std::panic::{self, AssertUnwindSafe};

use crate::check::{Codebook, FigurePlan, Scale};
use crate::compute::{self, ComputeError};
use crate::data::{ColumnKind, ColumnSpec, Table, TableSpec};
use crate::diag::Diagnostic;
use crate::export;
use crate::layout;

use super::BuildError;

/// One figure's finished outputs, in memory.
pub struct FigureOutputs {
    /// (file name, bytes), in the order of [`output_kinds`].
    pub files: Vec<(String, Vec<u8>)>,
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
    Summary,
}

impl OutputKind {
    /// The file name of this output of figure `figure`.
    pub fn file_name(self, figure: &str) -> String {
        let ext = match self {
            OutputKind::Svg => "svg",
            OutputKind::Png => "png",
            OutputKind::Pdf => "pdf",
            OutputKind::Summary => "summary.csv",
        };
        format!("{figure}.{ext}")
    }
}

/// The outputs a plan asks for, in a fixed order: svg, png, pdf, summary (always).
pub fn output_kinds(plan: &FigurePlan) -> Vec<OutputKind> {
    let f = plan.formats;
    [
        (f.svg, OutputKind::Svg),
        (f.png, OutputKind::Png),
        (f.pdf, OutputKind::Pdf),
        (true, OutputKind::Summary),
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

/// Computes, lays out and renders one figure into its output files (in memory).
///
/// A panic while making the figure (a bug) is caught and returned as that figure's
/// [`BuildError::Internal`] failure, naming the figure, so the other figures of the run are
/// still made and recorded. See [`report_figure_panics_as_failures`] for the message.
pub fn render_figure(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
) -> Result<FigureOutputs, FigureError> {
    let caught = IN_FIGURE.with(|inside| {
        let was = inside.replace(true);
        let result = panic::catch_unwind(AssertUnwindSafe(|| make_outputs(plan, book, table)));
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
) -> Result<FigureOutputs, FigureError> {
    let numbers = compute::compute(plan, book, table).map_err(|e| match e {
        ComputeError::Data(d) => {
            FigureError::Data(d.into_iter().map(|d| naming_data_file(d, table)).collect())
        }
        ComputeError::Internal(m) => FigureError::Build(BuildError::Internal(m)),
    })?;
    let scene = layout::layout(plan, &numbers);
    let rendered = export::render(&scene)
        .map_err(|e| FigureError::Build(BuildError::Internal(e.to_string())))?;
    let mut files = Vec::new();
    for kind in output_kinds(plan) {
        let bytes = match kind {
            OutputKind::Svg => rendered.svg().as_bytes().to_vec(),
            OutputKind::Png => rendered
                .png(f64::from(plan.dpi))
                .map_err(|e| FigureError::Build(BuildError::Limit(e.to_string())))?,
            OutputKind::Pdf => rendered
                .pdf()
                .map_err(|e| FigureError::Build(BuildError::Internal(e.to_string())))?,
            OutputKind::Summary => compute::summary::to_csv(&numbers.summary).into_bytes(),
        };
        files.push((kind.file_name(&plan.name), bytes));
    }
    Ok(FigureOutputs { files })
}

/// A problem found in the data's values names the data file: when none of its labels points
/// into the file (they point at the spec), the file is attached, so the row numbers of the
/// message can be found.
fn naming_data_file(d: Diagnostic, table: &Table) -> Diagnostic {
    let in_table = d.labels.iter().any(|l| l.span.source == table.source());
    if in_table || d.file.is_some() {
        d
    } else {
        d.with_file(table.path())
    }
}

/// The data stage's view of a codebook.
pub fn table_spec(book: &Codebook) -> TableSpec {
    TableSpec {
        path: book.path.clone(),
        path_span: book.path_span,
        missing: book.missing.clone(),
        columns: book
            .vars
            .iter()
            .map(|v| ColumnSpec {
                name: v.name.clone(),
                header: v.column.clone(),
                decl_span: v.span,
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
