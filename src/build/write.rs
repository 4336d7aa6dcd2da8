//! Writing outputs atomically: a temporary file in the same folder, then a rename.
//!
//! Guarantees: a reader never sees a half-written output; an interrupted build leaves either the
//! old file or the new one; the temporary file is removed when writing fails.

use std::fs;
use std::io::Write as _;
use std::path::Path;

use super::BuildError;

/// Writes `bytes` to `path` atomically, creating the folder if needed.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), BuildError> {
    let dir = path.parent().unwrap_or(Path::new("."));
    fs::create_dir_all(dir).map_err(|e| BuildError::io(dir, e))?;
    let name = path
        .file_name()
        .and_then(|n| n.to_str())
        .unwrap_or("output");
    let tmp = dir.join(format!(".{name}.{}.tmp", std::process::id()));
    let result = (|| {
        let mut f = fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = fs::remove_file(&tmp);
        return Err(BuildError::io(path, e));
    }
    Ok(())
}
