//! One figure, from its checked plan and its table to the bytes of every output file.
//!
//! Pure apart from the CPU: nothing here touches the file system, so figures can be made on
//! any thread in any order and give the same bytes.

use std::collections::BTreeSet;

use crate::check::plan::VarId;
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
pub fn render_figure(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
) -> Result<FigureOutputs, FigureError> {
    let numbers = compute::compute(plan, book, table).map_err(|e| match e {
        ComputeError::Data(d) => FigureError::Data(d),
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
