//! The command line: argument parsing, one function per command, exit codes in one place.
//!
//! Exit status: 0 success; 1 a spec or data error (or a warning with `--deny-warnings`, or,
//! with `build --check`, a figure that is stale, missing or failing); 2 a bad command line or
//! an I/O failure.
//!
//! Which figures a command works on: the PATHs given, else the project (the nearest
//! `figura.toml` at or above the current folder), else the current folder. A project's `out`
//! and `[defaults]` also apply to PATHs inside it.

mod print;
mod progress;
mod watch;

use std::ffi::OsString;
use std::num::NonZeroUsize;
use std::path::{Path, PathBuf};
use std::time::Instant;

use clap::{Args, Parser, Subcommand, ValueEnum};

use crate::build::journal::Journal;
use crate::build::{self, BuildOptions, BuildReport, Mode};
use crate::check::FigureDefaults;
use crate::numbers::NumbersFormat;
use crate::project::{self, Project, ProjectError};

#[derive(Parser, Debug)]
#[command(
    name = "figura",
    version,
    about = "Compile checked statistical figures from .figura specs"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Build the figures whose inputs changed: SVG, PNG, PDF and a summary of every number.
    Build(BuildArgs),
    /// Parse, check, read the data of and make every figure; write nothing.
    Check(CommonArgs),
    /// Create a project in a new folder: figura.toml, a demo dataset and a spec.
    New(NewArgs),
    /// Build, then rebuild whenever a spec, an included file or a data file changes.
    Watch(WatchArgs),
    /// List every figure with its spec file, data file and state.
    List(ListArgs),
    /// Rewrite specs in the canonical layout, keeping every comment.
    Fmt(FmtArgs),
    /// Compare the figures of two revisions or folders and write a review report.
    Diff(DiffArgs),
    /// Remove every output Figura wrote (the files its manifests list), and nothing else.
    Clean(CleanArgs),
}

#[derive(Args, Debug)]
struct CommonArgs {
    /// Spec files, or folders searched for *.figura (default: the project, else the current
    /// folder).
    paths: Vec<PathBuf>,
    /// Treat warnings as errors (exit 1).
    #[arg(long)]
    deny_warnings: bool,
    /// Build a figure whose content does not fit its size anyway, crowded, with a warning
    /// (W0003) instead of an error (F0124).
    #[arg(long)]
    allow_crowding: bool,
    /// How diagnostics are printed.
    #[arg(long, value_enum, default_value = "human")]
    message_format: Format,
}

#[derive(Args, Debug)]
struct OutArgs {
    /// Write every output to this folder (default: the project's `out`, else out/ beside
    /// each spec).
    #[arg(long)]
    out: Option<PathBuf>,
}

#[derive(Args, Debug)]
struct JobsArgs {
    /// Figures made at the same time (default: one per core).
    #[arg(long, short)]
    jobs: Option<NonZeroUsize>,
}

#[derive(Args, Debug)]
struct BuildArgs {
    #[command(flatten)]
    common: CommonArgs,
    #[command(flatten)]
    out: OutArgs,
    #[command(flatten)]
    jobs: JobsArgs,
    /// Rebuild every figure, even those that are up to date.
    #[arg(long, conflicts_with = "check")]
    force: bool,
    /// Write nothing; exit 1 when any figure's outputs are stale or missing, naming each.
    #[arg(long)]
    check: bool,
}

#[derive(Args, Debug)]
struct NewArgs {
    /// The folder to create (it must not exist, or be empty).
    dir: PathBuf,
}

#[derive(Args, Debug)]
struct WatchArgs {
    #[command(flatten)]
    common: CommonArgs,
    #[command(flatten)]
    out: OutArgs,
    #[command(flatten)]
    jobs: JobsArgs,
}

#[derive(Args, Debug)]
struct CleanArgs {
    /// Spec files, or folders searched for *.figura (default: the project, else the current
    /// folder).
    paths: Vec<PathBuf>,
    #[command(flatten)]
    out: OutArgs,
}

#[derive(Args, Debug)]
struct ListArgs {
    /// Spec files, or folders searched for *.figura (default: the project, else the current
    /// folder).
    paths: Vec<PathBuf>,
    #[command(flatten)]
    out: OutArgs,
}

#[derive(ValueEnum, Clone, Copy, Debug, PartialEq, Eq)]
enum Format {
    Human,
    Json,
}

/// Exit codes.
pub const EXIT_OK: i32 = 0;
pub const EXIT_DIAGNOSTICS: i32 = 1;
pub const EXIT_FAILURE: i32 = 2;

/// Runs the command line and returns the exit status.
pub fn run(args: impl IntoIterator<Item = OsString>) -> i32 {
    let cli = match Cli::try_parse_from(args) {
        Ok(cli) => cli,
        Err(e) => {
            let _ = e.print();
            return if e.use_stderr() {
                EXIT_FAILURE
            } else {
                EXIT_OK
            };
        }
    };
    let result = match cli.command {
        Command::Build(args) => run_build(&args),
        Command::Check(args) => run_check(&args),
        Command::New(args) => run_new(&args),
        Command::Watch(args) => watch::run(&args),
        Command::List(args) => run_list(&args),
        Command::Fmt(args) => Ok(run_fmt(&args)),
        Command::Diff(args) => Ok(run_diff(&args)),
        Command::Clean(args) => run_clean(&args),
    };
    result.unwrap_or_else(|code| code)
}

/// A command's early end: the exit status, after the reason was printed.
type Exit = i32;

/// The figures a command works on, and the settings that apply to them.
struct Target {
    paths: Vec<PathBuf>,
    out: Option<PathBuf>,
    defaults: FigureDefaults,
    numbers: Vec<NumbersFormat>,
    journal: Option<Journal>,
}

impl Target {
    fn options(&self, mode: Mode) -> BuildOptions {
        BuildOptions {
            paths: self.paths.clone(),
            out: self.out.clone(),
            defaults: self.defaults,
            numbers: self.numbers.clone(),
            journal: self.journal.clone(),
            mode,
            ..BuildOptions::default()
        }
    }
}

/// Decides what to work on: the PATHs, or the project, or the current folder.
fn resolve_target(paths: &[PathBuf], out: Option<&Path>, format: Format) -> Result<Target, Exit> {
    let cwd = std::env::current_dir().map_err(|e| {
        eprintln!("error: cannot read the current folder: {e}");
        EXIT_FAILURE
    })?;
    let project = match project::discover(&cwd) {
        Ok(p) => p.filter(|p| paths.iter().all(|path| inside(path, &p.root))),
        Err(e) => return Err(project_error(&e, format)),
    };
    let target = match project {
        Some(Project {
            specs,
            out: project_out,
            defaults,
            numbers,
            journal,
            ..
        }) => Target {
            paths: if paths.is_empty() {
                specs
            } else {
                paths.to_vec()
            },
            out: out.map(Path::to_path_buf).or(project_out),
            defaults,
            numbers,
            journal,
        },
        None => Target {
            paths: if paths.is_empty() {
                vec![PathBuf::from(".")]
            } else {
                paths.to_vec()
            },
            out: out.map(Path::to_path_buf),
            defaults: FigureDefaults::default(),
            numbers: Vec::new(),
            journal: None,
        },
    };
    Ok(target)
}

/// Whether `path` lies inside folder `root` (both resolved on disk).
fn inside(path: &Path, root: &Path) -> bool {
    match (std::fs::canonicalize(path), std::fs::canonicalize(root)) {
        (Ok(p), Ok(r)) => p.starts_with(r),
        _ => false,
    }
}

fn project_error(e: &ProjectError, format: Format) -> Exit {
    match e {
        ProjectError::Io { .. } => {
            eprintln!("error: {e}");
            EXIT_FAILURE
        }
        ProjectError::Invalid {
            sources,
            diagnostics,
        } => {
            print::diagnostics(diagnostics, sources, format);
            EXIT_DIAGNOSTICS
        }
    }
}

/// Runs the build library, turning a run-stopping failure into exit status 2.
fn run_options(
    options: &BuildOptions,
    progress: &dyn build::Progress,
) -> Result<BuildReport, Exit> {
    build::build(options, progress).map_err(|e| {
        eprintln!("error: {e}");
        EXIT_FAILURE
    })
}

fn run_build(args: &BuildArgs) -> Result<i32, Exit> {
    let common = &args.common;
    let target = resolve_target(
        &common.paths,
        args.out.out.as_deref(),
        common.message_format,
    )?;
    let mode = if args.check {
        Mode::Status
    } else {
        Mode::Build
    };
    let options = BuildOptions {
        force: args.force,
        jobs: args.jobs.jobs,
        allow_crowding: common.allow_crowding,
        ..target.options(mode)
    };
    let started = Instant::now();
    let reporter = progress::Reporter::new(common.message_format == Format::Json);
    let report = run_options(&options, &reporter)?;
    reporter.finish();
    print::report(&report, common.message_format);
    if common.message_format == Format::Human {
        if args.check {
            print::out_of_date(&report);
            print::status_line(&report, started.elapsed());
        } else {
            print::removed(&report);
            print::build_line(&report, started.elapsed());
        }
    }
    let stale = args.check && !report.all_up_to_date();
    Ok(
        exit_code(&report, common.deny_warnings).max(if stale {
            EXIT_DIAGNOSTICS
        } else {
            EXIT_OK
        }),
    )
}

fn run_check(args: &CommonArgs) -> Result<i32, Exit> {
    let target = resolve_target(&args.paths, None, args.message_format)?;
    let started = Instant::now();
    let options = BuildOptions {
        allow_crowding: args.allow_crowding,
        ..target.options(Mode::Validate)
    };
    let report = run_options(&options, &build::NoProgress)?;
    print::report(&report, args.message_format);
    if args.message_format == Format::Human {
        print::check_line(&report, started.elapsed());
    }
    Ok(exit_code(&report, args.deny_warnings))
}

fn run_list(args: &ListArgs) -> Result<i32, Exit> {
    let target = resolve_target(&args.paths, args.out.out.as_deref(), Format::Human)?;
    let report = run_options(&target.options(Mode::Status), &build::NoProgress)?;
    print::report(&report, Format::Human);
    print::figure_table(&report);
    Ok(exit_code(&report, false))
}

fn run_new(args: &NewArgs) -> Result<i32, Exit> {
    let written = project::new::create(&args.dir).map_err(|e| {
        eprintln!("error: {e}");
        EXIT_FAILURE
    })?;
    for path in &written {
        println!(
            "created {}",
            crate::build::paths::display_path(path).display()
        );
    }
    println!(
        "run `figura build` in {} to build its figures",
        crate::build::paths::display_path(&args.dir).display()
    );
    Ok(EXIT_OK)
}

/// `figura clean`: removes the outputs the manifests list, and the manifests.
fn run_clean(args: &CleanArgs) -> Result<i32, Exit> {
    let target = resolve_target(&args.paths, args.out.out.as_deref(), Format::Human)?;
    let cleaned = build::prune::clean(&target.options(Mode::Build)).map_err(|e| {
        eprintln!("error: {e}");
        EXIT_FAILURE
    })?;
    for path in &cleaned.removed {
        println!(
            "removed {}",
            crate::build::paths::display_path(path).display()
        );
    }
    eprintln!(
        "{} file{} removed{}",
        cleaned.removed.len(),
        if cleaned.removed.len() == 1 { "" } else { "s" },
        match cleaned.folders.len() {
            0 => String::new(),
            1 => ", and the empty output folder".to_string(),
            n => format!(", and {n} empty output folders"),
        }
    );
    Ok(EXIT_OK)
}

/// 2 when a figure stopped on an I/O failure or a limit; 1 for errors (and warnings when
/// denied); else 0.
fn exit_code(report: &BuildReport, deny_warnings: bool) -> i32 {
    if !report.failures.is_empty() {
        EXIT_FAILURE
    } else if report.has_errors() || (deny_warnings && report.has_warnings()) {
        EXIT_DIAGNOSTICS
    } else {
        EXIT_OK
    }
}

#[derive(Args, Debug)]
struct FmtArgs {
    /// Spec files, or folders searched for *.figura (default: the current folder).
    paths: Vec<PathBuf>,
    /// Write nothing; list the files that would change and exit 1 if there are any.
    #[arg(long)]
    check: bool,
}

/// `figura fmt`: 0 when done (or, with `--check`, nothing would change); 1 when a file would
/// change or does not parse; 2 on an I/O failure.
fn run_fmt(args: &FmtArgs) -> i32 {
    use crate::format::{self, Mode};
    let paths = if args.paths.is_empty() {
        vec![PathBuf::from(".")]
    } else {
        args.paths.clone()
    };
    let mode = if args.check { Mode::Check } else { Mode::Write };
    let report = match format::format_paths(&paths, mode) {
        Ok(r) => r,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_FAILURE;
        }
    };
    print::diagnostics(&report.diagnostics, &report.sources, Format::Human);
    for path in &report.changed {
        println!("{}", path.display());
    }
    let verb = if args.check {
        "would be reformatted"
    } else {
        "reformatted"
    };
    eprintln!(
        "{} file{} {verb}, {} already formatted",
        report.changed.len(),
        if report.changed.len() == 1 { "" } else { "s" },
        report.unchanged.len()
    );
    let would_change = args.check && !report.changed.is_empty();
    if would_change || !report.diagnostics.is_empty() {
        EXIT_DIAGNOSTICS
    } else {
        EXIT_OK
    }
}

#[derive(Args, Debug)]
struct DiffArgs {
    /// The old side: a git revision of the current repository, or a folder.
    base: String,
    /// The new side: a git revision or a folder (default: the working tree).
    head: Option<String>,
    /// Folder to write report.md, index.html and the pictures of each changed figure into
    /// (pictures of an earlier report there are replaced).
    #[arg(long)]
    report: PathBuf,
    /// The address where CI publishes the report folder: report.md then links its
    /// pictures there (instead of embedding small previews).
    #[arg(long, value_name = "URL")]
    image_url: Option<String>,
}

/// `figura diff`: 0 when no figure changed, 1 when any was added, removed or changed, 2 on
/// an error (a bad revision, a side that does not build, an I/O failure).
fn run_diff(args: &DiffArgs) -> i32 {
    use crate::review::{self, DiffOptions, ReviewError};
    let options = DiffOptions {
        base: args.base.clone(),
        head: args.head.clone(),
        report_dir: args.report.clone(),
        image_url: args.image_url.clone(),
    };
    match review::diff(&options) {
        Ok(outcome) => {
            print!("{}", outcome.summary_text());
            if outcome.any_change() {
                EXIT_DIAGNOSTICS
            } else {
                EXIT_OK
            }
        }
        Err(ReviewError::Build {
            side,
            report: failed,
        }) => {
            print::report(&failed, Format::Human);
            eprintln!("error: the {side} side does not build; fix it to compare figures");
            EXIT_FAILURE
        }
        Err(e) => {
            eprintln!("error: {e}");
            EXIT_FAILURE
        }
    }
}
