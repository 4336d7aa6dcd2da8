//! Writing outputs safely: a new temporary file in the same folder, then a rename.
//!
//! Guarantees: a reader never sees a half-written output; an interrupted build leaves either the
//! old file or the new one; the temporary file is removed when writing fails; a file whose
//! content would not change is not written at all (its modification time stays).
//!
//! Safety on a shared or hostile file system: the temporary file is created with
//! `O_CREAT | O_EXCL` under an unpredictable name (`.NAME.RANDOM.figura-tmp`, through the
//! `tempfile` crate), so it can never be a file or a symbolic link planted in advance; the
//! rename replaces whatever is at the output's name — a symbolic link included — and never
//! writes through it. An output folder beside a spec must lie inside the spec's project
//! ([`check_output_dir`]), so a link planted as the folder cannot send outputs elsewhere.
//!
//! The writer holds a lock on its temporary file while it writes. A temporary file nobody
//! holds a lock on was left by a build that was killed; [`remove_stale_temp_files`] removes
//! those, and a build calls it for every folder it writes a manifest into.
//!
//! Durability: [`write_atomic`] (used for files people write by hand, such as specs that
//! `figura fmt` rewrites) syncs each file before the rename. Build outputs
//! ([`write_if_changed`]) are not synced, and their folder must exist (the build creates each
//! output folder once): after a crash an output may be empty or old, but every build compares
//! each output with the hash its folder's manifest recorded and rebuilds any that differ, so
//! nothing is lost, and a build of many figures does not wait for the disk once per file.

use std::fs;
use std::io::{self, Write as _};
use std::path::Path;

use super::paths::Bounds;
use super::BuildError;

/// The last extension of temporary files.
pub const TEMP_SUFFIX: &str = "figura-tmp";

/// Writes `bytes` to `path` atomically, not synced, unless the file already holds exactly
/// these bytes; returns whether it wrote. The folder must exist.
pub fn write_if_changed(path: &Path, bytes: &[u8]) -> Result<bool, BuildError> {
    if same_content(path, bytes) {
        return Ok(false);
    }
    replace(path, bytes, false)?;
    Ok(true)
}

/// Whether `path` is a regular file (not a link to one) holding exactly `bytes`.
fn same_content(path: &Path, bytes: &[u8]) -> bool {
    match fs::symlink_metadata(path) {
        Ok(meta) if meta.is_file() && meta.len() == bytes.len() as u64 => {
            crate::files::read_regular(path, meta.len()).is_ok_and(|old| old == bytes)
        }
        _ => false,
    }
}

/// Writes `bytes` to `path` atomically and synced, creating the folder if needed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), BuildError> {
    let dir = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    fs::create_dir_all(dir).map_err(|e| BuildError::io(dir, e))?;
    replace(path, bytes, true)
}

/// Writes a temporary file beside `path` (synced when `sync`), then renames it over `path`.
fn replace(path: &Path, bytes: &[u8], sync: bool) -> Result<(), BuildError> {
    let dir = path.parent().unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .and_then(|n| n.to_str())
        .unwrap_or("output");
    // A cleaner in another process may take a temporary file for a stale one in the instant
    // between its creation and its lock; then the rename finds it gone, and one retry is
    // enough.
    let mut result = write_once(dir, name, path, bytes, sync);
    if matches!(&result, Err(e) if e.kind() == io::ErrorKind::NotFound) {
        result = write_once(dir, name, path, bytes, sync);
    }
    result.map_err(|e| BuildError::io(path, e))
}

fn write_once(dir: &Path, name: &str, path: &Path, bytes: &[u8], sync: bool) -> io::Result<()> {
    let prefix = format!(".{name}.");
    let suffix = format!(".{TEMP_SUFFIX}");
    let mut builder = tempfile::Builder::new();
    builder.prefix(&prefix).suffix(&suffix);
    #[cfg(unix)]
    {
        // Like any new file: readable by others as the umask allows (tempfile's default is
        // readable by the owner only).
        use std::os::unix::fs::PermissionsExt;
        builder.permissions(fs::Permissions::from_mode(0o666));
    }
    let mut tmp = builder.tempfile_in(dir)?;
    // A file system without locks still gets its outputs; only the cleaning of other
    // builds' leftovers depends on the lock.
    let _ = tmp.as_file().try_lock();
    tmp.write_all(bytes)?;
    if sync {
        tmp.as_file().sync_all()?;
    }
    // Dropped on failure, which removes the temporary file.
    tmp.persist(path).map_err(|e| e.error)?;
    Ok(())
}

/// Refuses an output folder that lies outside `bounds` once symbolic links are followed.
/// `None` bounds (a folder the user named) admit any folder.
pub fn check_output_dir(dir: &Path, bounds: Option<&Bounds>) -> Result<(), BuildError> {
    match bounds {
        Some(b) if !b.admits(dir) => Err(BuildError::Limit(format!(
            "{}: the output folder leads outside {} (through a symbolic link), so nothing is \
             written there; remove the link, choose a folder with --out DIR, or open the \
             folder with allow-outside under [project] in figura.toml",
            dir.display(),
            b.describe(),
        ))),
        _ => Ok(()),
    }
}

/// Removes the temporary files in `dir` that no running build is writing: those left by a
/// build that was killed between creating and renaming them. Returns how many it removed.
pub fn remove_stale_temp_files(dir: &Path) -> usize {
    let Ok(entries) = fs::read_dir(dir) else {
        return 0;
    };
    let suffix = format!(".{TEMP_SUFFIX}");
    let mut removed = 0;
    for entry in entries.flatten() {
        let name = entry.file_name();
        let is_temp = name
            .to_str()
            .is_some_and(|n| n.starts_with('.') && n.ends_with(&suffix));
        // Only regular files: a link or a folder of that name is left alone.
        if !is_temp || !entry.file_type().is_ok_and(|t| t.is_file()) {
            continue;
        }
        let path = entry.path();
        let Ok((file, _)) = crate::files::open_regular(&path) else {
            continue;
        };
        // A writer holds its lock until the rename; a file we can lock has no writer.
        if file.try_lock().is_ok() && fs::remove_file(&path).is_ok() {
            removed += 1;
        }
    }
    removed
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn writes_replace_a_planted_link_instead_of_following_it() {
        let dir = tempfile::tempdir().unwrap();
        let victim = dir.path().join("victim.txt");
        fs::write(&victim, "precious").unwrap();
        let out = dir.path().join("out");
        fs::create_dir(&out).unwrap();
        let target = out.join("f.svg");
        #[cfg(unix)]
        std::os::unix::fs::symlink(&victim, &target).unwrap();
        assert!(
            write_if_changed(&target, b"precious").unwrap(),
            "a link is never the same"
        );
        assert_eq!(fs::read_to_string(&victim).unwrap(), "precious");
        assert!(fs::symlink_metadata(&target).unwrap().is_file());
        assert_eq!(fs::read(&target).unwrap(), b"precious");
        write_atomic(&target, b"new").unwrap();
        assert_eq!(fs::read_to_string(&victim).unwrap(), "precious");
    }

    #[test]
    fn temporary_names_are_unpredictable_and_left_files_are_cleaned() {
        let dir = tempfile::tempdir().unwrap();
        let stale = dir.path().join(format!(".f.svg.12345.{TEMP_SUFFIX}"));
        fs::write(&stale, "half").unwrap();
        let held_path = dir.path().join(format!(".g.svg.abcdef.{TEMP_SUFFIX}"));
        let held = fs::File::create(&held_path).unwrap();
        held.lock().unwrap();
        write_atomic(&dir.path().join("f.svg"), b"whole").unwrap();
        assert_eq!(remove_stale_temp_files(dir.path()), 1);
        assert!(!stale.exists());
        assert!(held_path.exists(), "a file being written is kept");
        drop(held);
        assert_eq!(remove_stale_temp_files(dir.path()), 1);
        let left: Vec<_> = fs::read_dir(dir.path()).unwrap().flatten().collect();
        assert_eq!(left.len(), 1, "only f.svg: {left:?}");
    }
}
