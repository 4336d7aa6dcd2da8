//! Writing outputs atomically: a temporary file in the same folder, then a rename.
//!
//! Guarantees: a reader never sees a half-written output; an interrupted build leaves either the
//! old file or the new one; the temporary file is removed when writing fails; a file whose
//! content would not change is not written at all (its modification time stays).
//!
//! Temporary files are named `.NAME.PID.figura-tmp`, beside their target; only a process killed
//! between creating and renaming one can leave it behind.
//!
//! Durability: [`write_atomic`] (used for files people write by hand, such as specs that
//! `figura fmt` rewrites) syncs each file before the rename. Build outputs
//! ([`write_if_changed`]) are not synced, and their folder must exist (the build creates each
//! output folder once): after a crash an output may be empty or old, but every build compares
//! each output with the hash its folder's manifest recorded and rebuilds any that differ, so
//! nothing is lost, and a build of many figures does not wait for the disk once per file.

use std::fs;
use std::io::Write as _;
use std::path::Path;

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

/// Whether the file at `path` exists and holds exactly `bytes`.
fn same_content(path: &Path, bytes: &[u8]) -> bool {
    match fs::metadata(path) {
        Ok(meta) if meta.is_file() && meta.len() == bytes.len() as u64 => {
            fs::read(path).is_ok_and(|old| old == bytes)
        }
        _ => false,
    }
}

/// Writes `bytes` to `path` atomically and synced, creating the folder if needed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), BuildError> {
    let dir = path.parent().unwrap_or(Path::new("."));
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
    let tmp = dir.join(format!(".{name}.{}.{TEMP_SUFFIX}", std::process::id()));
    let result = (|| {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        if sync {
            f.sync_all()?;
        }
        fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = fs::remove_file(&tmp);
        return Err(BuildError::io(path, e));
    }
    Ok(())
}
