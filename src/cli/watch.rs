//! `figura watch`: build, then rebuild whenever an input changes, until interrupted.
//!
//! Each round resolves the project again (so an edited `figura.toml` takes effect), runs an
//! incremental build (only figures whose inputs changed are made), prints its diagnostics and
//! closing line, then waits. The spec folders are watched recursively, and the folders of data
//! files, included files and `figura.toml` directly. A round starts when a watched input, any
//! `*.figura` file or `figura.toml` is created, written, renamed or removed — whatever way an
//! editor saves (in place, `sed -i`, or a new file renamed over the old one).
//!
//! File events are gathered by `notify-debouncer-full`, which merges the events of one save
//! (a rename's two halves, a write after a create) and hands them over once a path has been
//! quiet for [`DEBOUNCE`]. Only events that change a file count: opening, reading and closing
//! a file after reading it are access events, so a viewer that keeps reading the outputs
//! neither starts rounds nor delays them. The build's own outputs never start a round.

use std::collections::BTreeSet;
use std::path::{Path, PathBuf};
use std::sync::mpsc::{self, Receiver, RecvTimeoutError};
use std::time::{Duration, Instant};

use notify::event::{EventKind, ModifyKind};
use notify::{RecommendedWatcher, RecursiveMode};
use notify_debouncer_full::{
    new_debouncer, DebounceEventResult, DebouncedEvent, Debouncer, RecommendedCache,
};

use crate::build::{paths, BuildOptions, Mode};
use crate::project;

use super::{print, progress, resolve_target, run_options, Exit, Format, WatchArgs, EXIT_FAILURE};

/// How long a path must be quiet before its events are handed over.
const DEBOUNCE: Duration = Duration::from_millis(200);

/// After the first change of a burst, how long to keep gathering changes of other paths (an
/// editor that saves several files at once starts one round).
const GATHER: Duration = Duration::from_millis(250);

type FileWatcher = Debouncer<RecommendedWatcher, RecommendedCache>;

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

impl Watched {
    /// The folders to watch and whether with their subfolders; a folder inside a watched tree
    /// is covered by the tree.
    fn roots(&self) -> BTreeSet<(PathBuf, bool)> {
        let under_tree = |dir: &Path| self.trees.iter().any(|t| dir.starts_with(t));
        let trees = self.trees.iter().map(|t| (t.clone(), true));
        let folders = self
            .folders
            .iter()
            .filter(|f| !under_tree(f))
            .map(|f| (f.clone(), false));
        trees.chain(folders).collect()
    }
}

pub fn run(args: &WatchArgs) -> Result<i32, Exit> {
    let (tx, rx) = mpsc::channel();
    let mut watcher = new_debouncer(DEBOUNCE, None, tx).map_err(|e| {
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
        print::removed(&report);
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
fn update_watches(watcher: &mut FileWatcher, current: &Watched, next: &Watched) {
    let (had, wanted) = (current.roots(), next.roots());
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
    rx: &Receiver<DebounceEventResult>,
    watched: &Watched,
) -> Result<Vec<PathBuf>, Exit> {
    let mut changed = BTreeSet::new();
    let mut deadline: Option<Instant> = None;
    loop {
        let received = match deadline {
            None => rx.recv().map_err(|_| RecvTimeoutError::Disconnected),
            Some(end) => rx.recv_timeout(end.saturating_duration_since(Instant::now())),
        };
        match received {
            Ok(Ok(events)) => {
                for event in &events {
                    changed.extend(relevant(event, watched));
                }
                if !changed.is_empty() && deadline.is_none() {
                    deadline = Some(Instant::now() + GATHER);
                }
            }
            Ok(Err(errors)) => {
                for e in errors {
                    eprintln!("warning: file watching: {e}");
                }
            }
            Err(RecvTimeoutError::Timeout) => return Ok(changed.into_iter().collect()),
            Err(RecvTimeoutError::Disconnected) => {
                eprintln!("error: file watching stopped");
                return Err(EXIT_FAILURE);
            }
        }
    }
}

/// Whether an event kind changes a file: created, written, renamed or removed. Opening,
/// reading and closing (access events) and changes of metadata alone (permissions, times)
/// are not changes.
fn changes_content(kind: &EventKind) -> bool {
    match kind {
        EventKind::Create(_) | EventKind::Remove(_) => true,
        EventKind::Modify(m) => !matches!(m, ModifyKind::Metadata(_)),
        EventKind::Access(_) | EventKind::Any | EventKind::Other => false,
    }
}

/// The paths of an event that are inputs: watched files, spec files and project files.
fn relevant(event: &DebouncedEvent, watched: &Watched) -> Vec<PathBuf> {
    if !changes_content(&event.kind) {
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

#[cfg(test)]
mod tests {
    use super::*;
    use notify::event::{AccessKind, AccessMode, CreateKind, DataChange, MetadataKind, RenameMode};

    #[test]
    fn only_changes_of_content_count() {
        assert!(changes_content(&EventKind::Create(CreateKind::File)));
        assert!(changes_content(&EventKind::Modify(ModifyKind::Data(
            DataChange::Any
        ))));
        assert!(changes_content(&EventKind::Modify(ModifyKind::Name(
            RenameMode::Both
        ))));
        assert!(!changes_content(&EventKind::Access(AccessKind::Open(
            AccessMode::Any
        ))));
        assert!(!changes_content(&EventKind::Access(AccessKind::Close(
            AccessMode::Read
        ))));
        assert!(!changes_content(&EventKind::Modify(ModifyKind::Metadata(
            MetadataKind::AccessTime
        ))));
    }

    #[test]
    fn a_folder_inside_a_watched_tree_is_not_watched_twice() {
        let mut w = Watched::default();
        w.trees.insert(PathBuf::from("/p/figures"));
        w.folders.insert(PathBuf::from("/p/figures"));
        w.folders.insert(PathBuf::from("/p/data"));
        let roots: Vec<_> = w.roots().into_iter().collect();
        assert_eq!(
            roots,
            [
                (PathBuf::from("/p/data"), false),
                (PathBuf::from("/p/figures"), true)
            ]
        );
        // The same set before and after a round: nothing is unwatched.
        assert!(w.roots().difference(&w.roots()).next().is_none());
    }
}
