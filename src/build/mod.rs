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
pub mod journal;
pub mod load;
pub mod manifest;
mod numbers;
pub mod paths;
pub mod prune;
mod render;
mod write;

use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fs;
use std::num::NonZeroUsize;
use std::path::{Path, PathBuf};

use rayon::prelude::*;

use crate::check::plan::VarId;
use crate::check::{self, FigureDefaults, FigurePlan, Program};
use crate::compute::ComputeError;
use crate::compute::SummaryRow;
use crate::data::{self, Table};
use crate::diag::{Diagnostic, SourceMap, Span};
use crate::export;
use crate::numbers::{FigureNumbers, NumbersFormat};

use inputs::InputHasher;
use manifest::{Freshness, Manifest, NumbersEntry, Scope};

pub use render::{
    output_kinds, output_names, render_figure, report_figure_panics_as_failures, table_spec,
    table_spec_reading, FigureChecks, FigureError, FigureOutputs, OutputKind, Purpose,
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
    /// The top folder of a copy of a work tree (a revision `figura diff` builds): specs
    /// inside read and write only inside it (see [`paths::Bounds::around`]).
    pub work_tree: Option<PathBuf>,
    /// The manuscript numbers files written in each output folder (none by default).
    pub numbers: Vec<NumbersFormat>,
    /// Build a figure whose content does not fit its size anyway, crowded, with a warning
    /// (W0003) instead of an error (F0124).
    pub allow_crowding: bool,
    /// A journal's artwork targets, checked on every figure made (`[journal]` in
    /// `figura.toml`); none by default.
    pub journal: Option<journal::Journal>,
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
            work_tree: None,
            numbers: Vec::new(),
            allow_crowding: false,
            journal: None,
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
    /// Figures recorded in a manifest whose block is gone: found (status runs) or whose
    /// files were removed (builds).
    pub orphans: Vec<OrphanStatus>,
    /// Output files removed by a build: orphans' files, outputs figures no longer make.
    pub removed: Vec<PathBuf>,
    /// The numbers files of each output folder, when the run asks for them.
    pub numbers: Vec<NumbersStatus>,
}

/// A figure that no longer exists but whose outputs a manifest records.
#[derive(Debug, Clone, PartialEq)]
pub struct OrphanStatus {
    pub name: String,
    /// Its output folder.
    pub dir: PathBuf,
    /// Its files there, by name.
    pub files: Vec<String>,
}

/// The numbers files of one output folder.
#[derive(Debug, Clone, PartialEq)]
pub struct NumbersStatus {
    pub dir: PathBuf,
    /// File names, in the order of the formats asked for.
    pub files: Vec<String>,
    /// `UpToDate` or `Built` in a build; `UpToDate`, `Stale` or `Missing` in a status run.
    pub state: FigureState,
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

    /// Whether every figure and numbers file is up to date and nothing is orphaned (what
    /// `build --check` asks).
    pub fn all_up_to_date(&self) -> bool {
        self.figures
            .iter()
            .all(|f| f.state == FigureState::UpToDate)
            && self
                .numbers
                .iter()
                .all(|n| n.state == FigureState::UpToDate)
            && self.orphans.is_empty()
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
    /// Its spec and data hashes, as its files record them.
    hashes: inputs::FigureHashes,
    freshness: Freshness,
}

/// What became of one checked figure in a run.
enum Outcome {
    /// Up to date: nothing made.
    Kept,
    /// Made, with the hash of each output file and the summary.
    Made(BTreeMap<String, String>, Vec<SummaryRow>),
    Failed,
    /// A status run's comparison.
    Compared(Freshness),
}

impl Outcome {
    fn state(&self) -> FigureState {
        match self {
            Outcome::Kept => FigureState::UpToDate,
            Outcome::Made(..) => FigureState::Built,
            Outcome::Failed => FigureState::Failed,
            Outcome::Compared(Freshness::UpToDate) => FigureState::UpToDate,
            Outcome::Compared(Freshness::Stale) => FigureState::Stale,
            Outcome::Compared(Freshness::Missing) => FigureState::Missing,
            Outcome::Compared(Freshness::Failing) => FigureState::Failed,
        }
    }
}

/// One figure made in this run: its outputs' hashes and summary, or why it failed.
struct Made {
    result: Result<(BTreeMap<String, String>, Vec<SummaryRow>), FigureError>,
    written: Vec<PathBuf>,
    warnings: Vec<Diagnostic>,
}

/// Runs a build, a validation or a status check over the given paths.
pub fn build(options: &BuildOptions, progress: &dyn Progress) -> Result<BuildReport, BuildError> {
    let mut report = BuildReport::default();
    let specs = load::find_specs(&options.paths)?;
    let loaded = load::load(&specs, options.work_tree.as_deref(), &mut report.sources)?;
    report.diagnostics.extend(loaded.diags.iter().cloned());
    let (mut program, diags) = check::check_with(&loaded.units, &options.defaults);
    report.diagnostics.extend(diags);
    report.diagnostics.extend(loaded.contain_data(&mut program));
    let pool = thread_pool(options.jobs)?;
    let (jobs, mut manifests) = plan_jobs(options, &loaded, &program, &mut report, &pool)?;
    let mut tables = Tables::new();
    let outcomes: Vec<Outcome> = match options.mode {
        Mode::Status => jobs
            .iter()
            .map(|j| Outcome::Compared(j.freshness))
            .collect(),
        Mode::Build | Mode::Validate => make_all(
            &program,
            &jobs,
            options,
            &mut tables,
            &mut report,
            &pool,
            progress,
        ),
    };
    let run = Run {
        options,
        specs: &specs,
        units: &loaded.units,
        program: &program,
        jobs: &jobs,
        outcomes: &outcomes,
    };
    match options.mode {
        Mode::Build => write_manifests(&run, &mut tables, &mut manifests, &mut report)?,
        Mode::Status => status_of_folders(&run, &manifests, &mut report),
        Mode::Validate => {}
    }
    let states: Vec<FigureState> = outcomes.iter().map(Outcome::state).collect();
    report.figures = figure_statuses(&loaded.units, &program, &jobs, &states);
    report.inputs = input_files(&specs, &loaded.units, &program);
    Ok(report)
}

/// The manifests read so far, by output folder.
type Manifests = BTreeMap<PathBuf, Manifest>;

/// The tables read so far, by codebook, with the variables read; `None` for a table with
/// errors.
type Tables = BTreeMap<usize, (BTreeSet<VarId>, Option<Table>)>;

/// What a run found and made, for the steps that look at whole output folders.
struct Run<'r, 'p> {
    options: &'r BuildOptions,
    specs: &'r [PathBuf],
    units: &'r [check::SpecUnit],
    program: &'p Program,
    jobs: &'r [Job<'p>],
    outcomes: &'r [Outcome],
}

/// Hashes every checked figure's inputs and compares them with its output folder's manifest
/// (unless the run makes every figure anyway); returns the jobs and the manifests read.
fn plan_jobs<'p>(
    options: &BuildOptions,
    loaded: &load::Loaded,
    program: &'p Program,
    report: &mut BuildReport,
    pool: &rayon::ThreadPool,
) -> Result<(Vec<Job<'p>>, Manifests), BuildError> {
    let blocks = inputs::figure_blocks(&loaded.units);
    let mut hasher = InputHasher::new(
        &loaded.units,
        &loaded.unit_sources,
        &report.sources,
        &options.tool_version,
        &options.defaults,
    );
    let mut manifests = Manifests::new();
    let compare = options.mode != Mode::Validate && !options.force;
    let mut jobs = Vec::with_capacity(program.figures.len());
    for plan in &program.figures {
        let book = &program.codebooks[plan.data];
        let hashes = hasher
            .plan(&blocks, plan, &book.path)
            .ok_or_else(|| BuildError::Internal(format!("figure `{}` has no block", plan.name)))?;
        let dir = output_dir(plan, options.out.as_deref());
        // `--out` is the user's own choice; the folder beside a spec must stay in its project.
        if options.out.is_none() {
            if let Err(e) = write::check_output_dir(&dir, loaded.bounds_of_spec(&plan.spec_path)) {
                report.failures.push(e);
                continue;
            }
        }
        if compare && !manifests.contains_key(&dir) {
            manifests.insert(dir.clone(), Manifest::read(&dir));
        }
        jobs.push(Job {
            plan,
            dir,
            inputs: hashes.inputs.to_hex().to_string(),
            hashes,
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
    options: &BuildOptions,
    tables: &mut Tables,
    report: &mut BuildReport,
    pool: &rayon::ThreadPool,
    progress: &dyn Progress,
) -> Vec<Outcome> {
    let mode = options.mode;
    let tool = format!("figura {}", options.tool_version);
    let todo: Vec<usize> = (0..jobs.len())
        .filter(|&i| jobs[i].freshness != Freshness::UpToDate)
        .collect();
    let needed = columns_of(program, todo.iter().map(|&i| jobs[i].plan));
    read_tables(program, &needed, tables, report);
    let tables = &*tables;
    let folder_errors = match mode {
        Mode::Build => create_folders(todo.iter().map(|&i| jobs[i].dir.as_path())),
        _ => BTreeMap::new(),
    };
    progress.start(todo.len());
    let made: Vec<Made> = pool.install(|| {
        todo.par_iter()
            .map(|&i| {
                let job = &jobs[i];
                let made = match tables.get(&job.plan.data) {
                    Some((_, Some(table))) => match folder_errors.get(&job.dir) {
                        Some(message) => Made {
                            result: Err(FigureError::Build(BuildError::Io {
                                path: job.dir.clone(),
                                message: message.clone(),
                            })),
                            written: Vec::new(),
                            warnings: Vec::new(),
                        },
                        None => make(job, program, table, options, &tool),
                    },
                    // The table's errors were reported when it was read.
                    _ => Made {
                        result: Err(FigureError::Data(Vec::new())),
                        written: Vec::new(),
                        warnings: Vec::new(),
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
        report.diagnostics.extend(made.warnings);
        outcomes[i] = match made.result {
            Ok((hashes, summary)) => Outcome::Made(hashes, summary),
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

/// The variables each data block's figures use (its columns to read), by codebook.
fn columns_of<'p>(
    program: &Program,
    plans: impl Iterator<Item = &'p FigurePlan>,
) -> BTreeMap<usize, BTreeSet<VarId>> {
    let mut needed: BTreeMap<usize, BTreeSet<VarId>> = BTreeMap::new();
    for plan in plans {
        let book = &program.codebooks[plan.data];
        needed
            .entry(plan.data)
            .or_default()
            .extend(plan.variables(book));
    }
    needed
}

/// Reads the tables of the codebooks in `needed` with the columns listed (the figures being
/// made use no others), once each: a table read before is read again only when it lacks a
/// column now needed.
fn read_tables(
    program: &Program,
    needed: &BTreeMap<usize, BTreeSet<VarId>>,
    tables: &mut Tables,
    report: &mut BuildReport,
) {
    for (&idx, vars) in needed {
        if let Some((read, _)) = tables.get(&idx) {
            if vars.is_subset(read) {
                continue;
            }
        }
        let mut vars = vars.clone();
        if let Some((read, _)) = tables.get(&idx) {
            vars.extend(read.iter().copied());
        }
        let book = &program.codebooks[idx];
        let spec = table_spec_reading(book, &vars);
        let table = match data::read_table(&spec, &mut report.sources) {
            Ok(t) => design_checked(book, t, report),
            Err(diags) => {
                report.diagnostics.extend(diags);
                None
            }
        };
        tables.insert(idx, (vars, table));
    }
}

/// Creates each output folder once (outputs are then written without creating folders);
/// returns the folders that could not be created, with the reason.
fn create_folders<'a>(dirs: impl Iterator<Item = &'a Path>) -> BTreeMap<PathBuf, String> {
    let dirs: BTreeSet<&Path> = dirs.collect();
    dirs.into_iter()
        .filter_map(|dir| {
            fs::create_dir_all(dir)
                .err()
                .map(|e| (dir.to_path_buf(), e.to_string()))
        })
        .collect()
}

/// The table when the data fit the block's declared design; `None` (the errors reported) when
/// they do not, so no figure of the block is made.
fn design_checked(book: &check::Codebook, table: Table, report: &mut BuildReport) -> Option<Table> {
    match crate::compute::check_design(book, &table) {
        Ok(diags) if diags.is_empty() => return Some(table),
        Ok(diags) | Err(ComputeError::Data(diags)) => report.diagnostics.extend(diags),
        Err(ComputeError::Internal(m)) => report.failures.push(BuildError::Internal(m)),
    }
    None
}

/// Makes one figure and, in a build, writes each output whose bytes changed (its folder
/// exists: [`create_folders`]).
fn make(job: &Job, program: &Program, table: &Table, options: &BuildOptions, tool: &str) -> Made {
    let book = &program.codebooks[job.plan.data];
    let mode = options.mode;
    let purpose = match mode {
        Mode::Validate => Purpose::Validate,
        _ => Purpose::Files(export::Provenance {
            tool: tool.to_string(),
            spec: job.hashes.spec.to_hex().to_string(),
            data: job
                .hashes
                .data
                .map_or_else(String::new, |d| d.to_hex().to_string()),
        }),
    };
    let checks = FigureChecks {
        allow_crowding: options.allow_crowding,
        journal: options.journal.clone(),
    };
    let outputs = match render_figure(job.plan, book, table, &purpose, &checks) {
        Ok(o) => o,
        Err(e) => {
            return Made {
                result: Err(e),
                written: Vec::new(),
                warnings: Vec::new(),
            }
        }
    };
    let warnings = outputs.warnings;
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
                        warnings,
                    }
                }
            }
        }
        hashes.insert(name, blake3::hash(&bytes).to_hex().to_string());
    }
    Made {
        result: Ok((hashes, outputs.summary)),
        written,
        warnings,
    }
}

/// The spec files and figure names a run speaks for (see [`Scope`]).
fn scope_parts(run: &Run) -> (BTreeSet<PathBuf>, BTreeSet<String>) {
    let specs = run
        .specs
        .iter()
        .filter_map(|p| fs::canonicalize(p).ok())
        .collect();
    let figures = run
        .units
        .iter()
        .filter(|u| u.build_figures)
        .flat_map(inputs::figure_blocks_of)
        .map(|b| b.name.name.clone())
        .collect();
    (specs, figures)
}

/// Every output folder of the run, with the jobs that write into it: the folders of the
/// checked figures, and the folders the run's spec files may have written to before (which
/// may hold only orphans now).
fn folders(run: &Run) -> BTreeMap<PathBuf, Vec<usize>> {
    let mut by_dir: BTreeMap<PathBuf, Vec<usize>> =
        prune::output_dirs(run.specs, run.options.out.as_deref())
            .into_iter()
            .filter(|d| d.join(manifest::FILE_NAME).is_file())
            .map(|d| (d, Vec::new()))
            .collect();
    for (i, job) in run.jobs.iter().enumerate() {
        by_dir.entry(job.dir.clone()).or_default().push(i);
    }
    by_dir
}

/// The figures of a folder as its numbers files see them.
fn members<'r>(run: &'r Run, members: &[usize]) -> Vec<numbers::Member<'r>> {
    members
        .iter()
        .map(|&i| numbers::Member {
            name: &run.jobs[i].plan.name,
            inputs: &run.jobs[i].inputs,
            made: match &run.outcomes[i] {
                Outcome::Kept | Outcome::Made(..) => true,
                Outcome::Failed => false,
                Outcome::Compared(f) => *f != Freshness::Failing,
            },
        })
        .collect()
}

/// Records, in each output folder's manifest, what its figures were built from; removes
/// the files of orphaned figures and outputs figures no longer make; writes the numbers
/// files that are not up to date.
fn write_manifests(
    run: &Run,
    tables: &mut Tables,
    manifests: &mut Manifests,
    report: &mut BuildReport,
) -> Result<(), BuildError> {
    let (specs, figures) = scope_parts(run);
    let scope = Scope {
        specs: &specs,
        figures: &figures,
    };
    let tool = format!("figura {}", run.options.tool_version);
    for (dir, members) in folders(run) {
        write::remove_stale_temp_files(&dir);
        let old = manifests
            .remove(&dir)
            .unwrap_or_else(|| Manifest::read(&dir));
        let mut update = manifest::Update::new(&dir, &old, &scope, &tool);
        for &i in &members {
            let job = &run.jobs[i];
            let (name, spec) = (job.plan.name.as_str(), job.plan.spec_path.as_path());
            match &run.outcomes[i] {
                Outcome::Kept => {
                    if let Some(entry) = old.figures.get(name) {
                        update.built(name, spec, &job.inputs, entry.outputs.clone());
                    }
                }
                Outcome::Made(hashes, _) => update.built(name, spec, &job.inputs, hashes.clone()),
                Outcome::Failed => update.failed(name, spec, &job.inputs),
                Outcome::Compared(_) => {}
            }
        }
        let numbers = folder_numbers(run, &dir, &members, old.numbers.as_ref(), tables, report)?;
        update.numbers(numbers);
        report.orphans.extend(orphans_of(&dir, &update));
        let (next, unlisted) = update.finish();
        report.removed.extend(prune::remove_files(&dir, &unlisted)?);
        let path = dir.join(manifest::FILE_NAME);
        if next.figures.is_empty() && next.failing.is_empty() && !path.exists() {
            continue;
        }
        // A folder whose figures all failed was not created for outputs.
        fs::create_dir_all(&dir).map_err(|e| BuildError::io(&dir, e))?;
        if write_if_changed(&path, &next.to_bytes())? {
            report.written.push(path);
        }
    }
    Ok(())
}

fn orphans_of(dir: &Path, update: &manifest::Update) -> Vec<OrphanStatus> {
    update
        .orphans()
        .iter()
        .map(|o| OrphanStatus {
            name: o.name.clone(),
            dir: dir.to_path_buf(),
            files: o.files.clone(),
        })
        .collect()
}

/// Makes the numbers files of folder `dir` unless they are up to date; returns the entry to
/// record (`None` when the run asks for no numbers files).
fn folder_numbers(
    run: &Run,
    dir: &Path,
    indices: &[usize],
    recorded: Option<&NumbersEntry>,
    tables: &mut Tables,
    report: &mut BuildReport,
) -> Result<Option<NumbersEntry>, BuildError> {
    let formats = &run.options.numbers;
    if formats.is_empty() || indices.is_empty() {
        return Ok(None);
    }
    let inputs = numbers::inputs_hash(formats, &members(run, indices));
    let files: Vec<String> = formats.iter().map(|f| f.file_name().to_string()).collect();
    if numbers::freshness(dir, recorded, formats, &inputs) == Freshness::UpToDate {
        report.numbers.push(NumbersStatus {
            dir: dir.to_path_buf(),
            files,
            state: FigureState::UpToDate,
        });
        return Ok(recorded.cloned());
    }
    let figures = summaries(run, indices, tables, report);
    let made = numbers::files(formats, &figures);
    for (name, bytes) in &made {
        let path = dir.join(name);
        if write_if_changed(&path, bytes)? {
            report.written.push(path);
        }
    }
    report.numbers.push(NumbersStatus {
        dir: dir.to_path_buf(),
        files,
        state: FigureState::Built,
    });
    Ok(Some(numbers::entry(inputs, &made)))
}

/// The summaries of the figures `indices` that were made or are up to date: those made in
/// this run as they were made, the others computed again from their tables.
fn summaries(
    run: &Run,
    indices: &[usize],
    tables: &mut Tables,
    report: &mut BuildReport,
) -> Vec<FigureNumbers> {
    let kept = columns_of(
        run.program,
        indices
            .iter()
            .filter(|&&i| matches!(run.outcomes[i], Outcome::Kept))
            .map(|&i| run.jobs[i].plan),
    );
    read_tables(run.program, &kept, tables, report);
    let mut out = Vec::new();
    for &i in indices {
        let plan = run.jobs[i].plan;
        let book = &run.program.codebooks[plan.data];
        let rows = match &run.outcomes[i] {
            Outcome::Made(_, rows) => Some(rows.clone()),
            Outcome::Kept => match tables.get(&plan.data) {
                Some((_, Some(table))) => crate::compute::compute(plan, book, table)
                    .ok()
                    .map(|data| data.summary),
                _ => None,
            },
            Outcome::Failed | Outcome::Compared(_) => None,
        };
        if let Some(rows) = rows {
            out.push(FigureNumbers {
                figure: plan.name.clone(),
                unit: crate::numbers::measured_unit(plan, book),
                rows,
            });
        }
    }
    out
}

/// A status run's view of each output folder: orphaned figures and numbers files.
fn status_of_folders(run: &Run, manifests: &Manifests, report: &mut BuildReport) {
    let (specs, figures) = scope_parts(run);
    let scope = Scope {
        specs: &specs,
        figures: &figures,
    };
    for (dir, indices) in folders(run) {
        let old = manifests
            .get(&dir)
            .cloned()
            .unwrap_or_else(|| Manifest::read(&dir));
        let update = manifest::Update::new(&dir, &old, &scope, "");
        report.orphans.extend(orphans_of(&dir, &update));
        let formats = &run.options.numbers;
        if formats.is_empty() || indices.is_empty() {
            continue;
        }
        let inputs = numbers::inputs_hash(formats, &members(run, &indices));
        let state = match numbers::freshness(&dir, old.numbers.as_ref(), formats, &inputs) {
            Freshness::UpToDate => FigureState::UpToDate,
            Freshness::Missing => FigureState::Missing,
            Freshness::Stale | Freshness::Failing => FigureState::Stale,
        };
        report.numbers.push(NumbersStatus {
            dir,
            files: formats.iter().map(|f| f.file_name().to_string()).collect(),
            state,
        });
    }
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
