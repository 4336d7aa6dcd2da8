//! The build: spec files → checked plans → data → numbers → scenes → files on disk.
//!
//! This is the only stage besides `data` and `export` that touches the file system: it finds
//! and reads specs, reads each data file once, and writes every output atomically.
//!
//! Invariant: a failing figure never stops the others; every diagnostic of every figure is
//! collected and returned together.

pub mod load;
mod write;

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use crate::check::{self, Codebook, FigurePlan, Program, Scale};
use crate::compute::{self, ComputeError};
use crate::data::{self, ColumnKind, ColumnSpec, Table, TableSpec};
use crate::diag::{Diagnostic, SourceMap};
use crate::export;
use crate::layout;

pub use write::write_atomic;

/// A failure that is not a diagnostic of a spec or data file: an I/O error or a limit.
#[derive(Debug)]
pub enum BuildError {
    Io {
        path: PathBuf,
        message: String,
    },
    Limit(String),
    /// A broken promise between stages.
    Internal(String),
}

impl BuildError {
    pub fn io(path: &Path, e: std::io::Error) -> Self {
        BuildError::Io {
            path: path.to_path_buf(),
            message: e.to_string(),
        }
    }
}

impl std::fmt::Display for BuildError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            BuildError::Io { path, message } => write!(f, "{}: {message}", path.display()),
            BuildError::Limit(m) => write!(f, "{m}"),
            BuildError::Internal(m) => write!(f, "internal error (please report): {m}"),
        }
    }
}

impl std::error::Error for BuildError {}

/// What a build or check is asked to do.
#[derive(Debug, Clone, Default)]
pub struct BuildOptions {
    /// Spec files or folders.
    pub paths: Vec<PathBuf>,
    /// Output folder for every figure; default `out/` beside each spec.
    pub out: Option<PathBuf>,
    /// Parse, check and read data, but write nothing.
    pub check_only: bool,
}

/// The outcome of a build: what was written and every diagnostic.
#[derive(Debug, Default)]
pub struct BuildReport {
    pub sources: SourceMap,
    pub diagnostics: Vec<Diagnostic>,
    /// Files written, in order.
    pub written: Vec<PathBuf>,
    pub figures_built: usize,
    pub figures_failed: usize,
}

impl BuildReport {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }

    pub fn has_warnings(&self) -> bool {
        self.diagnostics.iter().any(|d| !d.is_error())
    }
}

/// One figure's finished outputs, in memory.
pub struct FigureOutputs {
    /// (file name, bytes), in a fixed order: svg, png, pdf, summary.
    pub files: Vec<(String, Vec<u8>)>,
}

/// Runs a build (or a check) over the given paths.
pub fn build(options: &BuildOptions) -> Result<BuildReport, BuildError> {
    let mut report = BuildReport::default();
    let specs = load::find_specs(&options.paths)?;
    let loaded = load::load(&specs, &mut report.sources)?;
    report.diagnostics.extend(loaded.diags);
    let (program, diags) = check::check(&loaded.units);
    report.diagnostics.extend(diags);
    let tables = read_tables(&program, &mut report)?;
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let Some(Ok(table)) = tables.get(&plan.data) else {
            report.figures_failed += 1;
            continue;
        };
        match render_figure(plan, book, table) {
            Ok(outputs) => {
                report.figures_built += 1;
                if !options.check_only {
                    let dir = output_dir(plan, options.out.as_deref());
                    for (name, bytes) in outputs.files {
                        let path = dir.join(name);
                        write_atomic(&path, &bytes)?;
                        report.written.push(path);
                    }
                }
            }
            Err(FigureError::Data(diags)) => {
                report.figures_failed += 1;
                report.diagnostics.extend(diags);
            }
            Err(FigureError::Build(e)) => return Err(e),
        }
    }
    Ok(report)
}

/// Reads every data file that some figure uses, once.
fn read_tables(
    program: &Program,
    report: &mut BuildReport,
) -> Result<BTreeMap<usize, Result<Table, ()>>, BuildError> {
    let mut tables = BTreeMap::new();
    for plan in &program.figures {
        if tables.contains_key(&plan.data) {
            continue;
        }
        let spec = table_spec(&program.codebooks[plan.data]);
        let table = match data::read_table(&spec, &mut report.sources) {
            Ok(t) => Ok(t),
            Err(diags) => {
                report.diagnostics.extend(diags);
                Err(())
            }
        };
        tables.insert(plan.data, table);
    }
    Ok(tables)
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

/// Why one figure could not be made.
pub enum FigureError {
    Data(Vec<Diagnostic>),
    Build(BuildError),
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
    if plan.formats.svg {
        files.push((
            format!("{}.svg", plan.name),
            rendered.svg().as_bytes().to_vec(),
        ));
    }
    if plan.formats.png {
        let png = rendered
            .png(f64::from(plan.dpi))
            .map_err(|e| FigureError::Build(BuildError::Limit(e.to_string())))?;
        files.push((format!("{}.png", plan.name), png));
    }
    if plan.formats.pdf {
        let pdf = rendered
            .pdf()
            .map_err(|e| FigureError::Build(BuildError::Internal(e.to_string())))?;
        files.push((format!("{}.pdf", plan.name), pdf));
    }
    files.push((
        format!("{}.summary.csv", plan.name),
        compute::summary::to_csv(&numbers.summary).into_bytes(),
    ));
    Ok(FigureOutputs { files })
}

/// `--out DIR`, or `out/` beside the figure's spec file.
pub fn output_dir(plan: &FigurePlan, out: Option<&Path>) -> PathBuf {
    match out {
        Some(dir) => dir.to_path_buf(),
        None => plan
            .spec_path
            .parent()
            .unwrap_or(Path::new("."))
            .join("out"),
    }
}
