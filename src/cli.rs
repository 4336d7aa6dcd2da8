//! The command line: argument parsing, one function per command, exit codes in one place.
//!
//! Exit status: 0 success; 1 a spec or data error (or a warning with `--deny-warnings`);
//! 2 a bad command line or an I/O failure.

use std::ffi::OsString;
use std::io::{IsTerminal, Write as _};
use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

use crate::build::{self, BuildOptions, BuildReport};
use crate::report::{self, MessageFormat};

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
    /// Build figures: SVG, PNG, PDF and a summary of every number shown.
    Build(BuildArgs),
    /// Parse, check and read the data of every figure; write nothing.
    Check(CommonArgs),
    /// Rewrite specs in the canonical layout, keeping every comment.
    Fmt(FmtArgs),
    /// Compare the figures of two revisions or folders and write a review report.
    Diff(DiffArgs),
}

#[derive(Args, Debug)]
struct CommonArgs {
    /// Spec files, or folders searched for *.figura (default: the current folder).
    paths: Vec<PathBuf>,
    /// Treat warnings as errors (exit 1).
    #[arg(long)]
    deny_warnings: bool,
    /// How diagnostics are printed.
    #[arg(long, value_enum, default_value = "human")]
    message_format: Format,
}

#[derive(Args, Debug)]
struct BuildArgs {
    #[command(flatten)]
    common: CommonArgs,
    /// Write every output to this folder (default: out/ beside each spec).
    #[arg(long)]
    out: Option<PathBuf>,
}

#[derive(ValueEnum, Clone, Copy, Debug)]
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
    match cli.command {
        Command::Build(args) => run_build(&args.common, args.out, false),
        Command::Check(args) => run_build(&args, None, true),
        Command::Fmt(args) => run_fmt(&args),
        Command::Diff(args) => run_diff(&args),
    }
}

fn run_build(args: &CommonArgs, out: Option<PathBuf>, check_only: bool) -> i32 {
    let paths = if args.paths.is_empty() {
        vec![PathBuf::from(".")]
    } else {
        args.paths.clone()
    };
    let options = BuildOptions {
        paths,
        out,
        check_only,
    };
    let report = match build::build(&options) {
        Ok(r) => r,
        Err(e) => {
            eprintln!("error: {e}");
            return EXIT_FAILURE;
        }
    };
    print_diagnostics(&report, args.message_format);
    if !matches!(args.message_format, Format::Json) {
        print_closing_line(&report, check_only);
    }
    exit_code(&report, args.deny_warnings)
}

fn print_diagnostics(report: &BuildReport, format: Format) {
    let format = match format {
        Format::Json => MessageFormat::Json,
        Format::Human => MessageFormat::Human {
            colour: std::io::stderr().is_terminal(),
        },
    };
    let text = report::render_all(&report.diagnostics, &report.sources, format);
    let mut err = std::io::stderr().lock();
    let _ = err.write_all(text.as_bytes());
}

fn print_closing_line(report: &BuildReport, check_only: bool) {
    let errors = report.diagnostics.iter().filter(|d| d.is_error()).count();
    let warnings = report.diagnostics.len() - errors;
    let verb = if check_only { "checked" } else { "built" };
    eprintln!(
        "{} figure{} {verb}, {} failed; {errors} error{}, {warnings} warning{}",
        report.figures_built,
        if report.figures_built == 1 { "" } else { "s" },
        report.figures_failed,
        if errors == 1 { "" } else { "s" },
        if warnings == 1 { "" } else { "s" },
    );
}

fn exit_code(report: &BuildReport, deny_warnings: bool) -> i32 {
    if report.has_errors() || (deny_warnings && report.has_warnings()) {
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
    let text = report::render_all(
        &report.diagnostics,
        &report.sources,
        MessageFormat::Human {
            colour: std::io::stderr().is_terminal(),
        },
    );
    eprint!("{text}");
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
    /// Folder to write report.md, index.html and NAME.diff.png into (picture diffs of an
    /// earlier report there are replaced).
    #[arg(long)]
    report: PathBuf,
}

/// `figura diff`: 0 when no figure changed, 1 when any was added, removed or changed, 2 on
/// an error (a bad revision, a side that does not build, an I/O failure).
fn run_diff(args: &DiffArgs) -> i32 {
    use crate::review::{self, DiffOptions, ReviewError};
    let options = DiffOptions {
        base: args.base.clone(),
        head: args.head.clone(),
        report_dir: args.report.clone(),
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
            print_diagnostics(&failed, Format::Human);
            eprintln!("error: the {side} side does not build; fix it to compare figures");
            EXIT_FAILURE
        }
        Err(e) => {
            eprintln!("error: {e}");
            EXIT_FAILURE
        }
    }
}
