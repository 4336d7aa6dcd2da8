//! `figura watch`: build, then rebuild whenever an input changes, until interrupted.
//!
//! Each round resolves the project again (so an edited `figura.toml` takes effect), runs an
//! incremental build (only figures whose inputs changed are made), prints its diagnostics and
//! closing line, then waits. The spec folders are watched recursively, and the folders of data
//! files, included files and `figura.toml` directly. A round starts when a watched input
//! changes, any `*.figura` file or `figura.toml` changes; bursts of events (an editor's save)
//! are gathered for [`SETTLE`] first. The build's own outputs never start a round.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::sync::mpsc::{self, Receiver, RecvTimeoutError};
use std::time::{Duration, Instant};

use notify::{Event, EventKind, RecommendedWatcher, RecursiveMode, Watcher as _};

use crate::build::{paths, BuildOptions, Mode};
use crate::project;

use super::{print, progress, resolve_target, run_options, Exit, Format, WatchArgs, EXIT_FAILURE};

/// Quiet time that ends a burst of file events.
const SETTLE: Duration = Duration::from_millis(150);

/// What one round depends on.
#[derive(Default)]
struct Watched {
    /// Folders watched with their subfolders.
    trees: BTreeSet<PathBuf>,
    /// Folders watched without their subfolders.
    folders: BTreeSet<PathBuf>,
    /// Input files, absolute.
    files: BTreeSet<PathBuf>,
}

pub fn run(args: &WatchArgs) -> Result<i32, Exit> {
    let (tx, rx) = mpsc::channel();
    let mut watcher = notify::recommended_watcher(tx).map_err(|e| {
        eprintln!("error: cannot watch files: {e}");
        EXIT_FAILURE
    })?;
    let mut current = Watched::default();
    let mut first = true;
    loop {
        let next = round(args);
        update_watches(&mut watcher, &current, &next);
        current = next;
        if first {
            eprintln!("watching for changes (Ctrl-C to stop)");
            first = false;
        }
        let changed = wait_for_change(&rx, &current)?;
        eprintln!(
            "changed: {}",
            changed
                .iter()
                .map(|p| shown(p).display().to_string())
                .collect::<Vec<_>>()
                .join(", ")
        );
    }
}

/// A changed file as it is shown: relative to the current folder.
fn shown(path: &Path) -> PathBuf {
    let relative = paths::relative_to(path, Path::new("."));
    paths::display_path(&relative)
}

/// Builds once and prints the outcome; returns what to watch next.
fn round(args: &WatchArgs) -> Watched {
    let format = args.common.message_format;
    let mut watched = Watched::default();
    if let Some(root) = std::env::current_dir()
        .ok()
        .and_then(|cwd| project::find_root(&cwd))
    {
        watched.folders.insert(absolute(&root));
        watched
            .files
            .insert(absolute(&root.join(project::FILE_NAME)));
    }
    let Ok(target) = resolve_target(&args.common.paths, args.out.out.as_deref(), format) else {
        return watched;
    };
    for path in &target.paths {
        if path.is_dir() {
            watched.trees.insert(absolute(path));
        } else {
            watch_file(&mut watched, path);
        }
    }
    let options = BuildOptions {
        jobs: args.jobs.jobs,
        allow_crowding: args.common.allow_crowding,
        ..target.options(Mode::Build)
    };
    let started = Instant::now();
    let reporter = progress::Reporter::new(format == Format::Json);
    let Ok(report) = run_options(&options, &reporter) else {
        return watched;
    };
    reporter.finish();
    print::report(&report, format);
    if format == Format::Human {
        print::build_line(&report, started.elapsed());
    }
    for input in &report.inputs {
        watch_file(&mut watched, input);
    }
    watched
}

fn watch_file(watched: &mut Watched, file: &Path) {
    let file = absolute(file);
    if let Some(dir) = file.parent() {
        watched.folders.insert(dir.to_path_buf());
    }
    watched.files.insert(file);
}

/// The path made absolute and resolved on disk as far as it exists.
fn absolute(path: &Path) -> PathBuf {
    paths::resolved(path).unwrap_or_else(|| path.to_path_buf())
}

/// Watches what `next` needs and stops watching what only `current` needed.
fn update_watches(watcher: &mut RecommendedWatcher, current: &Watched, next: &Watched) {
    let under_tree = |dir: &Path| next.trees.iter().any(|t| dir.starts_with(t));
    let wanted: BTreeSet<(PathBuf, bool)> = next
        .trees
        .iter()
        .map(|t| (t.clone(), true))
        .chain(
            next.folders
                .iter()
                .filter(|f| !under_tree(f))
                .map(|f| (f.clone(), false)),
        )
        .collect();
    let had: BTreeSet<(PathBuf, bool)> = current
        .trees
        .iter()
        .map(|t| (t.clone(), true))
        .chain(current.folders.iter().map(|f| (f.clone(), false)))
        .collect();
    for (path, _) in had.difference(&wanted) {
        let _ = watcher.unwatch(path);
    }
    for (path, recursive) in wanted.difference(&had) {
        let mode = if *recursive {
            RecursiveMode::Recursive
        } else {
            RecursiveMode::NonRecursive
        };
        if let Err(e) = watcher.watch(path, mode) {
            eprintln!("warning: cannot watch {}: {e}", path.display());
        }
    }
}

/// Blocks until an input changes; returns the changed inputs of the burst, sorted.
fn wait_for_change(
    rx: &Receiver<notify::Result<Event>>,
    watched: &Watched,
) -> Result<Vec<PathBuf>, Exit> {
    let mut changed = BTreeSet::new();
    loop {
        let received = if changed.is_empty() {
            rx.recv().map_err(|_| RecvTimeoutError::Disconnected)
        } else {
            rx.recv_timeout(SETTLE)
        };
        match received {
            Ok(Ok(event)) => changed.extend(relevant(&event, watched)),
            Ok(Err(e)) => eprintln!("warning: file watching: {e}"),
            Err(RecvTimeoutError::Timeout) => return Ok(changed.into_iter().collect()),
            Err(RecvTimeoutError::Disconnected) => {
                eprintln!("error: file watching stopped");
                return Err(EXIT_FAILURE);
            }
        }
    }
}

/// The paths of an event that are inputs: watched files, spec files and project files.
fn relevant(event: &Event, watched: &Watched) -> Vec<PathBuf> {
    if matches!(event.kind, EventKind::Access(_)) {
        return Vec::new();
    }
    event
        .paths
        .iter()
        .filter(|p| {
            watched.files.contains(*p)
                || p.extension().is_some_and(|e| e == "figura")
                || p.file_name().is_some_and(|n| n == project::FILE_NAME)
        })
        .cloned()
        .collect()
}
