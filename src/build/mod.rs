//! The build: spec files → checked plans → data → numbers → scenes → files on disk.
//!
//! This is the only stage besides `data` and `export` that touches the file system: it finds
//! and reads specs, reads each data file once, and writes every output atomically.
//!
//! A run: find and parse the specs ([`load`]), check them, hash each figure's inputs
//! ([`inputs`]) and compare with the output folder's manifest ([`manifest`]); then read the
//! tables the out-of-date figures need, make those figures in parallel (rayon), write each
//! output that changed, and record the new manifest.
//!
//! Invariants: a failing figure never stops the others; every diagnostic of every figure is
//! collected and returned together, in an order that does not depend on the threads; the bytes
//! of a figure do not depend on the number of threads or the order figures are made in.

pub mod inputs;
pub mod load;
pub mod manifest;
pub mod paths;
mod render;
mod write;

use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fs;
use std::num::NonZeroUsize;
use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::check::plan::VarId;
use crate::check::{self, FigureDefaults, FigurePlan, Program};
use crate::data::{self, Table};
use crate::diag::{Diagnostic, SourceMap, Span};

use inputs::InputHasher;
use manifest::{Freshness, Manifest};

pub use render::{
    output_kinds, output_names, render_figure, table_spec, table_spec_reading, FigureError,
    FigureOutputs, OutputKind,
};
pub use write::{write_atomic, write_if_changed, TEMP_SUFFIX};

/// The version of the tool, part of every figure's input hash.
pub const TOOL_VERSION: &str = env!("CARGO_PKG_VERSION");

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

/// What a run does with the figures it finds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Mode {
    /// Make the figures whose inputs changed (every figure with `force`) and write them.
    #[default]
    Build,
    /// Make every figure in memory and write nothing: finds every spec, data and
    /// computation error (`figura check`).
    Validate,
    /// Compare each figure's outputs with its inputs; make and write nothing
    /// (`figura build --check`, `figura list`).
    Status,
}

/// What a run is asked to do.
#[derive(Debug, Clone)]
pub struct BuildOptions {
    /// Spec files or folders.
    pub paths: Vec<PathBuf>,
    /// Output folder for every figure; default `out/` beside each spec.
    pub out: Option<PathBuf>,
    /// Formats and dpi of figures that do not set their own.
    pub defaults: FigureDefaults,
    pub mode: Mode,
    /// Make every figure, whatever the manifest says.
    pub force: bool,
    /// Threads making figures; `None`: one per core.
    pub jobs: Option<NonZeroUsize>,
    /// The version that enters every input hash (normally [`TOOL_VERSION`]).
    pub tool_version: String,
}

impl Default for BuildOptions {
    fn default() -> Self {
        BuildOptions {
            paths: Vec::new(),
            out: None,
            defaults: FigureDefaults::default(),
            mode: Mode::Build,
            force: false,
            jobs: None,
            tool_version: TOOL_VERSION.to_string(),
        }
    }
}

/// Where one figure stands after a run.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FigureState {
    /// Its outputs match its inputs; nothing was made.
    UpToDate,
    /// Made in this run (written, unless the run writes nothing).
    Built,
    /// Its outputs were made from other inputs (status runs only).
    Stale,
    /// It has no outputs yet, or one is gone (status runs only).
    Missing,
    /// It fails: a spec, data or computation error, or (status runs) its last build failed
    /// with the same inputs.
    Failed,
}

impl FigureState {
    /// The state in words, as `figura list` shows it.
    pub fn as_str(self) -> &'static str {
        match self {
            FigureState::UpToDate => "up to date",
            FigureState::Built => "built",
            FigureState::Stale => "stale",
            FigureState::Missing => "missing",
            FigureState::Failed => "failing",
        }
    }
}

/// One figure of a run.
#[derive(Debug, Clone, PartialEq)]
pub struct FigureStatus {
    pub name: String,
    /// The spec file it is written in.
    pub spec: PathBuf,
    /// Its data file, when the figure passed the checker.
    pub data: Option<PathBuf>,
    /// Its output folder, when the figure passed the checker.
    pub out_dir: Option<PathBuf>,
    pub state: FigureState,
}

/// The outcome of a run: every figure's state, every diagnostic, what was written.
#[derive(Debug, Default)]
pub struct BuildReport {
    pub sources: SourceMap,
    pub diagnostics: Vec<Diagnostic>,
    /// Every figure of the spec files, in file order then block order.
    pub figures: Vec<FigureStatus>,
    /// Files written, in figure order.
    pub written: Vec<PathBuf>,
    /// Failures that are not diagnostics (I/O, limits); the figures they stopped are failed.
    pub failures: Vec<BuildError>,
    /// Every file the run depends on: spec files, included files and data files, sorted.
    pub inputs: Vec<PathBuf>,
}

impl BuildReport {
    pub fn has_errors(&self) -> bool {
        self.diagnostics.iter().any(Diagnostic::is_error)
    }

    pub fn has_warnings(&self) -> bool {
        self.diagnostics.iter().any(|d| !d.is_error())
    }

    /// The number of figures in `state`.
    pub fn count(&self, state: FigureState) -> usize {
        self.figures.iter().filter(|f| f.state == state).count()
    }
}

/// Hears about figures as they are made, from any thread.
pub trait Progress: Sync {
    /// `count` figures are about to be made.
    fn start(&self, _count: usize) {}
    /// Figure `name` is done; `ok` is false when it failed.
    fn done(&self, _name: &str, _ok: bool) {}
}

/// A [`Progress`] that ignores everything.
pub struct NoProgress;

impl Progress for NoProgress {}

/// One checked figure and what its outputs are compared with.
struct Job<'p> {
    plan: &'p FigurePlan,
    dir: PathBuf,
    /// The hex hash of its inputs.
    inputs: String,
    freshness: Freshness,
}

/// What became of one checked figure in a run.
enum Outcome {
    /// Up to date: nothing made.
    Kept,
    /// Made, with the hash of each output file.
    Made(BTreeMap<String, String>),
    Failed,
    /// A status run's comparison.
    Compared(Freshness),
}

impl Outcome {
    fn state(&self) -> FigureState {
        match self {
            Outcome::Kept => FigureState::UpToDate,
            Outcome::Made(_) => FigureState::Built,
            Outcome::Failed => FigureState::Failed,
            Outcome::Compared(Freshness::UpToDate) => FigureState::UpToDate,
            Outcome::Compared(Freshness::Stale) => FigureState::Stale,
            Outcome::Compared(Freshness::Missing) => FigureState::Missing,
            Outcome::Compared(Freshness::Failing) => FigureState::Failed,
        }
    }
}

/// One figure made in this run: its outputs' hashes, or why it failed.
struct Made {
    result: Result<BTreeMap<String, String>, FigureError>,
    written: Vec<PathBuf>,
}

/// Runs a build, a validation or a status check over the given paths.
pub fn build(options: &BuildOptions, progress: &dyn Progress) -> Result<BuildReport, BuildError> {
    let mut report = BuildReport::default();
    let specs = load::find_specs(&options.paths)?;
    let loaded = load::load(&specs, &mut report.sources)?;
    report.diagnostics.extend(loaded.diags.iter().cloned());
    let (program, diags) = check::check_with(&loaded.units, &options.defaults);
    report.diagnostics.extend(diags);
    let pool = thread_pool(options.jobs)?;
    let (jobs, mut manifests) = plan_jobs(options, &loaded, &program, &report.sources, &pool)?;
    let outcomes: Vec<Outcome> = match options.mode {
        Mode::Status => jobs
            .iter()
            .map(|j| Outcome::Compared(j.freshness))
            .collect(),
        Mode::Build | Mode::Validate => {
            make_all(&program, &jobs, options.mode, &mut report, &pool, progress)
        }
    };
    if options.mode == Mode::Build {
        write_manifests(
            options,
            &specs,
            &jobs,
            &outcomes,
            &mut manifests,
            &mut report,
        )?;
    }
    let states: Vec<FigureState> = outcomes.iter().map(Outcome::state).collect();
    report.figures = figure_statuses(&loaded.units, &program, &jobs, &states);
    report.inputs = input_files(&specs, &loaded.units, &program);
    Ok(report)
}

/// The manifests read so far, by output folder.
type Manifests = BTreeMap<PathBuf, Manifest>;

/// Hashes every checked figure's inputs and compares them with its output folder's manifest
/// (unless the run makes every figure anyway); returns the jobs and the manifests read.
fn plan_jobs<'p>(
    options: &BuildOptions,
    loaded: &load::Loaded,
    program: &'p Program,
    sources: &SourceMap,
    pool: &rayon::ThreadPool,
) -> Result<(Vec<Job<'p>>, Manifests), BuildError> {
    let blocks = inputs::figure_blocks(&loaded.units);
    let mut hasher = InputHasher::new(
        &loaded.units,
        &loaded.unit_sources,
        sources,
        &options.tool_version,
        &options.defaults,
    );
    let mut manifests = Manifests::new();
    let compare = options.mode != Mode::Validate && !options.force;
    let mut jobs = Vec::with_capacity(program.figures.len());
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let hash = hasher
            .plan(&blocks, plan, &book.path)
            .ok_or_else(|| BuildError::Internal(format!("figure `{}` has no block", plan.name)))?;
        let dir = output_dir(plan, options.out.as_deref());
        if compare && !manifests.contains_key(&dir) {
            manifests.insert(dir.clone(), Manifest::read(&dir));
        }
        jobs.push(Job {
            plan,
            dir,
            inputs: hash.to_hex().to_string(),
            freshness: Freshness::Stale,
        });
    }
    if compare {
        // Reading and hashing the outputs is most of a no-op build: spread it over the pool.
        pool.install(|| {
            jobs.par_iter_mut().for_each(|job| {
                let manifest = &manifests[&job.dir];
                let names = output_names(job.plan);
                job.freshness = manifest.freshness(&job.dir, &job.plan.name, &job.inputs, &names);
            });
        });
    }
    Ok((jobs, manifests))
}

/// Makes every job that is not up to date, in parallel; returns what became of each job.
fn make_all(
    program: &Program,
    jobs: &[Job],
    mode: Mode,
    report: &mut BuildReport,
    pool: &rayon::ThreadPool,
    progress: &dyn Progress,
) -> Vec<Outcome> {
    let todo: Vec<usize> = (0..jobs.len())
        .filter(|&i| jobs[i].freshness != Freshness::UpToDate)
        .collect();
    let mut needed: BTreeMap<usize, BTreeSet<VarId>> = BTreeMap::new();
    for &i in &todo {
        let plan = jobs[i].plan;
        let book = &program.codebooks[plan.data];
        needed
            .entry(plan.data)
            .or_default()
            .extend(plan.variables(book));
    }
    let tables = read_tables(program, &needed, report);
    progress.start(todo.len());
    let made: Vec<Made> = pool.install(|| {
        todo.par_iter()
            .map(|&i| {
                let job = &jobs[i];
                let made = match tables.get(&job.plan.data) {
                    Some(Some(table)) => make(job, program, table, mode),
                    // The table's errors were reported when it was read.
                    _ => Made {
                        result: Err(FigureError::Data(Vec::new())),
                        written: Vec::new(),
                    },
                };
                progress.done(&job.plan.name, made.result.is_ok());
                made
            })
            .collect()
    });
    let mut outcomes: Vec<Outcome> = jobs.iter().map(|_| Outcome::Kept).collect();
    for (i, made) in todo.into_iter().zip(made) {
        report.written.extend(made.written);
        outcomes[i] = match made.result {
            Ok(hashes) => Outcome::Made(hashes),
            Err(FigureError::Data(diags)) => {
                report.diagnostics.extend(diags);
                Outcome::Failed
            }
            Err(FigureError::Build(e)) => {
                report.failures.push(e);
                Outcome::Failed
            }
        };
    }
    outcomes
}

fn thread_pool(jobs: Option<NonZeroUsize>) -> Result<rayon::ThreadPool, BuildError> {
    let mut builder = rayon::ThreadPoolBuilder::new();
    if let Some(n) = jobs {
        builder = builder.num_threads(n.get());
    }
    builder
        .build()
        .map_err(|e| BuildError::Internal(format!("cannot start the worker threads: {e}")))
}

/// Reads the tables of the codebooks in `needed`, once each, with the columns of the
/// variables listed (the figures being made use no others); `None` for a table with errors.
fn read_tables(
    program: &Program,
    needed: &BTreeMap<usize, BTreeSet<VarId>>,
    report: &mut BuildReport,
) -> BTreeMap<usize, Option<Table>> {
    needed
        .iter()
        .map(|(&idx, vars)| {
            let spec = table_spec_reading(&program.codebooks[idx], vars);
            let table = match data::read_table(&spec, &mut report.sources) {
                Ok(t) => Some(t),
                Err(diags) => {
                    report.diagnostics.extend(diags);
                    None
                }
            };
            (idx, table)
        })
        .collect()
}

/// Makes one figure and, in a build, writes each output whose bytes changed.
fn make(job: &Job, program: &Program, table: &Table, mode: Mode) -> Made {
    let book = &program.codebooks[job.plan.data];
    let outputs = match render_figure(job.plan, book, table) {
        Ok(o) => o,
        Err(e) => {
            return Made {
                result: Err(e),
                written: Vec::new(),
            }
        }
    };
    let mut hashes = BTreeMap::new();
    let mut written = Vec::new();
    for (name, bytes) in outputs.files {
        let path = job.dir.join(&name);
        if mode == Mode::Build {
            match write_if_changed(&path, &bytes) {
                Ok(true) => written.push(path),
                Ok(false) => {}
                Err(e) => {
                    return Made {
                        result: Err(FigureError::Build(e)),
                        written,
                    }
                }
            }
        }
        hashes.insert(name, blake3::hash(&bytes).to_hex().to_string());
    }
    Made {
        result: Ok(hashes),
        written,
    }
}

/// Records, in each output folder's manifest, what its figures were built from.
fn write_manifests(
    options: &BuildOptions,
    specs: &[PathBuf],
    jobs: &[Job],
    outcomes: &[Outcome],
    manifests: &mut Manifests,
    report: &mut BuildReport,
) -> Result<(), BuildError> {
    let rebuilt: BTreeSet<PathBuf> = specs
        .iter()
        .filter_map(|p| fs::canonicalize(p).ok())
        .collect();
    let tool = format!("figura {}", options.tool_version);
    let mut by_dir: BTreeMap<&Path, Vec<usize>> = BTreeMap::new();
    for (i, job) in jobs.iter().enumerate() {
        by_dir.entry(job.dir.as_path()).or_default().push(i);
    }
    for (dir, members) in by_dir {
        let old = manifests.remove(dir).unwrap_or_else(|| Manifest::read(dir));
        let mut update = manifest::Update::new(dir, &old, &rebuilt, &tool);
        for i in members {
            let job = &jobs[i];
            let (name, spec) = (job.plan.name.as_str(), job.plan.spec_path.as_path());
            match &outcomes[i] {
                Outcome::Kept => {
                    if let Some(entry) = old.figures.get(name) {
                        update.built(name, spec, &job.inputs, entry.outputs.clone());
                    }
                }
                Outcome::Made(hashes) => update.built(name, spec, &job.inputs, hashes.clone()),
                Outcome::Failed => update.failed(name, spec, &job.inputs),
                Outcome::Compared(_) => {}
            }
        }
        let next = update.finish();
        let path = dir.join(manifest::FILE_NAME);
        if next.figures.is_empty() && !path.exists() {
            continue;
        }
        if write_if_changed(&path, &next.to_bytes())? {
            report.written.push(path);
        }
    }
    Ok(())
}

/// Every figure block of the spec files, with its state (failed when it did not check).
fn figure_statuses(
    units: &[check::SpecUnit],
    program: &Program,
    jobs: &[Job],
    states: &[FigureState],
) -> Vec<FigureStatus> {
    let by_span: HashMap<Span, usize> = jobs
        .iter()
        .enumerate()
        .map(|(i, j)| (j.plan.name_span, i))
        .collect();
    let mut out = Vec::new();
    for unit in units.iter().filter(|u| u.build_figures) {
        for block in inputs::figure_blocks_of(unit) {
            let status = match by_span.get(&block.name.span) {
                Some(&i) => FigureStatus {
                    name: block.name.name.clone(),
                    spec: unit.path.clone(),
                    data: Some(program.codebooks[jobs[i].plan.data].path.clone()),
                    out_dir: Some(jobs[i].dir.clone()),
                    state: states[i],
                },
                None => FigureStatus {
                    name: block.name.name.clone(),
                    spec: unit.path.clone(),
                    data: None,
                    out_dir: None,
                    state: FigureState::Failed,
                },
            };
            out.push(status);
        }
    }
    out
}

/// Spec files, included files and data files of a run, sorted and without repeats.
fn input_files(specs: &[PathBuf], units: &[check::SpecUnit], program: &Program) -> Vec<PathBuf> {
    let files: BTreeSet<PathBuf> = specs
        .iter()
        .cloned()
        .chain(units.iter().map(|u| u.path.clone()))
        .chain(program.codebooks.iter().map(|b| b.path.clone()))
        .collect();
    files.into_iter().collect()
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
