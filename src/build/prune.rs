//! Removing outputs Figura wrote and no longer needs: orphaned figures' files at each build,
//! and every output with `figura clean`.
//!
//! Guarantees: only files listed in an output folder's manifest, under a name an output can
//! have (see [`super::manifest::is_output_name`]), are ever removed — never data, specs or
//! other files in the folder; a file already gone is not an error; the folder itself is
//! removed only when nothing else is left in it.

use std::collections::BTreeSet;
use std::fs;
use std::io::ErrorKind;
use std::path::{Path, PathBuf};

use super::manifest::{self, Manifest};
use super::{load, BuildError, BuildOptions};

/// The output folders a run over `specs` may have written to: `--out` (or the project's
/// `out`), else `out/` beside each spec file.
pub fn output_dirs(specs: &[PathBuf], out: Option<&Path>) -> BTreeSet<PathBuf> {
    match out {
        Some(dir) => BTreeSet::from([dir.to_path_buf()]),
        None => specs
            .iter()
            .map(|s| s.parent().unwrap_or(Path::new(".")).join("out"))
            .collect(),
    }
}

/// Removes the files `names` of folder `dir`; returns the paths removed.
pub fn remove_files(dir: &Path, names: &[String]) -> Result<Vec<PathBuf>, BuildError> {
    let mut removed = Vec::new();
    for name in names {
        let path = dir.join(name);
        match fs::remove_file(&path) {
            Ok(()) => removed.push(path),
            Err(e) if e.kind() == ErrorKind::NotFound => {}
            Err(e) => return Err(BuildError::io(&path, e)),
        }
    }
    Ok(removed)
}

/// What `figura clean` did.
#[derive(Debug, Default)]
pub struct Cleaned {
    /// Files removed, in folder order then name order.
    pub removed: Vec<PathBuf>,
    /// Output folders removed because they were left empty.
    pub folders: Vec<PathBuf>,
}

/// Removes every output listed in the manifests of the run's output folders, and the
/// manifests; then each folder, if nothing else is left in it.
pub fn clean(options: &BuildOptions) -> Result<Cleaned, BuildError> {
    let specs = load::find_specs(&options.paths)?;
    let mut cleaned = Cleaned::default();
    for dir in output_dirs(&specs, options.out.as_deref()) {
        let manifest_path = dir.join(manifest::FILE_NAME);
        if !manifest_path.is_file() {
            continue;
        }
        let listed = Manifest::read(&dir).listed_files();
        cleaned.removed.extend(remove_files(&dir, &listed)?);
        cleaned
            .removed
            .extend(remove_files(&dir, &[manifest::FILE_NAME.to_string()])?);
        if fs::remove_dir(&dir).is_ok() {
            cleaned.folders.push(dir);
        }
    }
    Ok(cleaned)
}
