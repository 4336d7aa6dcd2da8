//! The two sides of a comparison: a git revision, a folder or the working tree, each made
//! into a folder of specs that can be built.
//!
//! A revision's files are copied out of the repository into a temporary folder (see
//! [`super::git`]); a folder and the working tree are built where they are (the build writes
//! only into the output folder it is given). What is built is the current folder's place in
//! each side: the project around it (the nearest `figura.toml` at or above it, inside the
//! side), else that folder. So `figura diff` gives the same report from any folder of a
//! project. Paths in the report are relative to the side's top: the repository's top folder
//! for a revision and the working tree, the folder itself for a folder.

use std::path::{Path, PathBuf};

use tempfile::TempDir;

use super::git::Repo;
use super::ReviewError;

/// What a command-line argument names.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum SideSpec {
    /// The files as they are now, in the current folder.
    WorkTree,
    /// An existing folder.
    Folder(PathBuf),
    /// A git revision of the current repository.
    Revision(String),
}

impl SideSpec {
    /// An argument that names an existing folder is a folder; anything else a revision;
    /// no argument is the working tree.
    pub fn from_arg(arg: Option<&str>, cwd: &Path) -> SideSpec {
        match arg {
            None => SideSpec::WorkTree,
            Some(a) if cwd.join(a).is_dir() => SideSpec::Folder(cwd.join(a)),
            Some(a) => SideSpec::Revision(a.to_owned()),
        }
    }
}

/// One side, ready to build.
#[derive(Debug)]
pub struct Side {
    /// How the side is named in reports, e.g. `HEAD~1 (3f2a9c1)` or `working tree`.
    pub label: String,
    /// The folder whose specs are built (when it is inside no project).
    pub root: PathBuf,
    /// The top folder of a revision's copy: what it builds reads and writes only inside.
    pub work_tree: Option<PathBuf>,
    /// The folder paths are shown relative to; `root` lies inside it.
    pub top: PathBuf,
    /// Holds a revision's files for as long as the side lives.
    _files: Option<TempDir>,
}

/// Makes the folder of one side. `scratch` is where temporary folders go.
pub fn prepare(spec: &SideSpec, cwd: &Path, scratch: &Path) -> Result<Side, ReviewError> {
    let mut side = prepare_as_named(spec, cwd, scratch)?;
    // Resolved on disk, so that `root` and `top` compare as paths whatever links lead there.
    for path in [&mut side.root, &mut side.top] {
        if let Ok(real) = std::fs::canonicalize(&*path) {
            *path = real;
        }
    }
    Ok(side)
}

fn prepare_as_named(spec: &SideSpec, cwd: &Path, scratch: &Path) -> Result<Side, ReviewError> {
    match spec {
        SideSpec::WorkTree => Ok(Side {
            label: "working tree".to_owned(),
            root: cwd.to_path_buf(),
            work_tree: None,
            top: Repo::discover(cwd).map_or_else(|_| cwd.to_path_buf(), |r| r.top().to_path_buf()),
            _files: None,
        }),
        SideSpec::Folder(dir) => Ok(Side {
            label: dir.display().to_string(),
            root: dir.clone(),
            work_tree: None,
            top: dir.clone(),
            _files: None,
        }),
        SideSpec::Revision(rev) => {
            let repo = Repo::discover(cwd)?;
            let commit = repo.commit(rev).ok_or_else(|| {
                ReviewError::Git(format!(
                    "`{rev}` is neither a folder nor a revision of the repository at {}",
                    repo.top().display()
                ))
            })?;
            let prefix = Repo::prefix_of(cwd)?;
            let files = TempDir::with_prefix_in("figura-side-", scratch)
                .map_err(|e| ReviewError::io(scratch, e))?;
            repo.extract(&commit, files.path())?;
            let short = commit.get(..7).unwrap_or(&commit);
            Ok(Side {
                label: format!("{rev} ({short})"),
                root: files.path().join(prefix),
                work_tree: Some(files.path().to_path_buf()),
                top: files.path().to_path_buf(),
                _files: Some(files),
            })
        }
    }
}

impl Side {
    /// The folder of the project the side's folder is in: the nearest folder at or above
    /// `root`, and not above `top`, that holds a `figura.toml`.
    pub fn project_root(&self) -> Option<PathBuf> {
        for dir in self.root.ancestors() {
            if dir.join(crate::project::FILE_NAME).is_file() {
                return Some(dir.to_path_buf());
            }
            if dir == self.top {
                break;
            }
        }
        None
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn arguments_name_folders_revisions_or_the_work_tree() {
        let dir = tempfile::tempdir().unwrap();
        std::fs::create_dir(dir.path().join("old")).unwrap();
        assert_eq!(SideSpec::from_arg(None, dir.path()), SideSpec::WorkTree);
        assert_eq!(
            SideSpec::from_arg(Some("old"), dir.path()),
            SideSpec::Folder(dir.path().join("old"))
        );
        assert_eq!(
            SideSpec::from_arg(Some("HEAD~1"), dir.path()),
            SideSpec::Revision("HEAD~1".to_owned())
        );
    }
}
