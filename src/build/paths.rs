//! Path helpers shared by the build, the project file and the command line.
//!
//! Nothing here changes a file; [`resolved`] and [`relative_to`] only ask the file system where
//! existing folders really are (symbolic links followed).

use std::fs;
use std::path::{Component, Path, PathBuf};

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
    let mut existing = path;
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
