//! Shared helpers of the integration tests: expected-output files and temporary projects.
#![allow(dead_code)]

use std::path::{Path, PathBuf};

/// The repository root.
pub fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Compares `actual` with the file at `path`; with `UPDATE_EXPECT=1` writes it instead.
/// A missing expected file is a failure unless updating.
pub fn expect_file(path: &Path, actual: &str) {
    if std::env::var_os("UPDATE_EXPECT").is_some() {
        std::fs::write(path, actual).unwrap();
        return;
    }
    let expected = std::fs::read_to_string(path).unwrap_or_else(|_| {
        panic!(
            "missing expected file {} (run with UPDATE_EXPECT=1 to create it)",
            path.display()
        )
    });
    if expected != actual {
        panic!(
            "\n{} differs from the actual output.\n--- expected\n{expected}\n--- actual\n{actual}\n(run with UPDATE_EXPECT=1 to accept)",
            path.display()
        );
    }
}

/// Every file with `ext` in `dir`, sorted.
pub fn files_with_ext(dir: &Path, ext: &str) -> Vec<PathBuf> {
    let mut out: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|e| e == ext))
        .collect();
    out.sort();
    out
}
