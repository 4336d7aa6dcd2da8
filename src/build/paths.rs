//! Path helpers shared by the build, the project file and the command line, and the
//! containment of every path a spec names ([`Bounds`]).
//!
//! Nothing here changes a file; [`resolved`] and [`relative_to`] only ask the file system where
//! existing folders really are (symbolic links followed).
//!
//! Containment: the data, include and output paths of a spec must lead, once every symbolic
//! link is followed, into its *project root* — the folder of the nearest `figura.toml` above
//! the spec; without one, the top folder of the git work tree that holds the spec; outside
//! any, the spec's own folder — or into a folder that the project's `allow-outside` opens.
//! Everything that reads or writes a file a spec names asks [`Bounds::admits`] first, so a
//! spec from someone else's branch cannot read or overwrite files elsewhere on the machine,
//! and `figura diff` never shows such a file.

use std::fs;
use std::path::{Component, Path, PathBuf};

use crate::project;

/// How a spec's project root was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RootKind {
    /// The folder of the nearest `figura.toml` at or above the spec.
    ProjectFile,
    /// The top folder of the git work tree that holds the spec (or of the copy of a revision
    /// that `figura diff` builds).
    WorkTree,
    /// The spec's own folder: no project file and no work tree above it.
    SpecFolder,
}

/// The folders the paths of one spec may lead into: its project root and the folders the
/// project opens with `allow-outside`, all resolved (symbolic links followed).
#[derive(Debug, Clone, PartialEq)]
pub struct Bounds {
    /// The project root, resolved.
    pub root: PathBuf,
    pub kind: RootKind,
    /// Folders outside the root that `allow-outside` opens, resolved.
    pub allowed: Vec<PathBuf>,
}

impl Bounds {
    /// The bounds of the specs in folder `dir`. `top`, when given, is the top folder of a
    /// copy of a work tree (a revision `figura diff` builds): the bounds never reach past it,
    /// whatever a `figura.toml` inside opens, and it stands for the work tree's top.
    pub fn around(dir: &Path, top: Option<&Path>) -> Bounds {
        let dir = resolved(dir).unwrap_or_else(|| dir.to_path_buf());
        let top = top.map(|t| fs::canonicalize(t).unwrap_or_else(|_| t.to_path_buf()));
        let within_top = |p: &Path| top.as_deref().is_none_or(|t| p.starts_with(t));
        if let Some(root) = dir
            .ancestors()
            .take_while(|a| within_top(a))
            .find(|a| a.join(project::FILE_NAME).is_file())
        {
            let allowed = project::open(root)
                .map(|p| p.allow_outside)
                .unwrap_or_default()
                .iter()
                .filter_map(|p| resolved(p))
                .filter(|p| within_top(p))
                .collect();
            return Bounds {
                root: root.to_path_buf(),
                kind: RootKind::ProjectFile,
                allowed,
            };
        }
        let work_tree = match top {
            Some(t) => Some(t),
            None => dir
                .ancestors()
                .find(|a| a.join(".git").exists())
                .map(Path::to_path_buf),
        };
        match work_tree {
            Some(root) => Bounds {
                root,
                kind: RootKind::WorkTree,
                allowed: Vec::new(),
            },
            None => Bounds {
                root: dir,
                kind: RootKind::SpecFolder,
                allowed: Vec::new(),
            },
        }
    }

    /// Whether `path`, resolved, lies inside the root or an allowed folder. A path whose
    /// missing part holds `..` is never admitted.
    pub fn admits(&self, path: &Path) -> bool {
        let inside = |p: &Path, folder: &Path| folder.is_absolute() && p.starts_with(folder);
        resolved(path)
            .is_some_and(|p| inside(&p, &self.root) || self.allowed.iter().any(|a| inside(&p, a)))
    }

    /// Where paths may lead, in words: "the project folder /work/paper (the folder of its
    /// figura.toml)".
    pub fn describe(&self) -> String {
        let root = self.root.display();
        match self.kind {
            RootKind::ProjectFile => {
                format!(
                    "the project folder {root} (the folder of its {})",
                    project::FILE_NAME
                )
            }
            RootKind::WorkTree => format!("the work tree {root}"),
            RootKind::SpecFolder => format!("the spec's folder {root}"),
        }
    }

    /// How to let paths lead further: the help of a refused path.
    pub fn widen_help(&self) -> String {
        let example = "allow-outside = [\"../shared-data\"]";
        match self.kind {
            RootKind::ProjectFile => format!(
                "move the file into the project, or open its folder in {} under [project]: {example}",
                project::FILE_NAME
            ),
            RootKind::WorkTree => format!(
                "move the file into the work tree, or create a {} at its top that opens the \
                 file's folder under [project]: {example}",
                project::FILE_NAME
            ),
            RootKind::SpecFolder => format!(
                "outside a project or git work tree a spec reads and writes only inside its own \
                 folder; move the file there, or create a {} in a folder that holds both (and \
                 open other folders under [project]: {example})",
                project::FILE_NAME
            ),
        }
    }
}

/// `path` relative to `base`; both absolute and free of `.`/`..` (canonical).
pub fn relative_path(path: &Path, base: &Path) -> PathBuf {
    let p: Vec<Component> = path.components().collect();
    let b: Vec<Component> = base.components().collect();
    let common = p.iter().zip(&b).take_while(|(x, y)| x == y).count();
    let mut out = PathBuf::new();
    for _ in common..b.len() {
        out.push("..");
    }
    for c in &p[common..] {
        out.push(c.as_os_str());
    }
    if out.as_os_str().is_empty() {
        out.push(".");
    }
    out
}

/// The absolute, canonical form of `path` as far as it exists; the part that does not exist
/// yet (an output folder before the first build) is appended as written. `None` when even
/// the current folder cannot be resolved, or the missing part holds `..`.
pub fn resolved(path: &Path) -> Option<PathBuf> {
    let mut missing = Vec::new();
    // `a.figura`'s parent is the empty path: the current folder.
    let mut existing = if path.as_os_str().is_empty() {
        Path::new(".")
    } else {
        path
    };
    loop {
        if let Ok(found) = fs::canonicalize(existing) {
            return Some(missing.iter().rev().fold(found, |p, name| p.join(name)));
        }
        let name = existing.file_name()?;
        missing.push(name);
        existing = match existing.parent() {
            Some(parent) if !parent.as_os_str().is_empty() => parent,
            _ => Path::new("."),
        };
    }
}

/// `path` rewritten relative to folder `base` (e.g. `../figures` seen from `figures/` is `.`);
/// unchanged when either cannot be resolved.
pub fn relative_to(path: &Path, base: &Path) -> PathBuf {
    match (resolved(path), fs::canonicalize(base)) {
        (Some(p), Ok(b)) => relative_path(&p, &b),
        _ => path.to_path_buf(),
    }
}

/// A path as a person reads it: `.` components dropped and `name/..` pairs folded
/// (`figures/../data/x.csv` → `data/x.csv`). For display only: with symbolic links the
/// folded path can differ from the real one.
pub fn display_path(path: &Path) -> PathBuf {
    let mut out: Vec<Component> = Vec::new();
    for c in path.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir if matches!(out.last(), Some(Component::Normal(_))) => {
                out.pop();
            }
            other => out.push(other),
        }
    }
    if out.is_empty() {
        return PathBuf::from(".");
    }
    out.iter().collect()
}
