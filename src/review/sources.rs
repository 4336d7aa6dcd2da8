//! The spec and data files each side's build read, and which of them differ.
//!
//! The build keeps the text of every spec file it read (and included file) in its source map;
//! data files are read again here, from the build's list of inputs, since the build keeps no
//! data text. Paths are made relative to the side's folder so the two sides line up.

use std::collections::BTreeMap;
use std::path::{Component, Path, PathBuf};

use crate::diag::SourceMap;

/// A text one side's build read, by its path relative to the side's folder (with `/`).
#[derive(Debug, Clone, PartialEq)]
pub struct SourceText {
    pub path: String,
    pub text: String,
}

/// A path with `.` and `..` removed by reading them (no file system access).
fn normalize(path: &Path) -> PathBuf {
    let mut out = PathBuf::new();
    for c in path.components() {
        match c {
            Component::CurDir => {}
            Component::ParentDir => {
                if !out.pop() {
                    out.push("..");
                }
            }
            other => out.push(other.as_os_str()),
        }
    }
    out
}

/// `path` relative to `root`, written with `/`; paths outside `root` keep their full form.
fn relative(path: &Path, root: &Path) -> String {
    let path = normalize(path);
    let root = normalize(root);
    let shown = path.strip_prefix(&root).unwrap_or(&path);
    let parts: Vec<String> = shown
        .components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect();
    parts.join("/")
}

/// Every text in `sources`, and every other file of `inputs` (data files), once each, sorted by
/// relative path. A file that is not UTF-8 text (a workbook, a Parquet file) is stood for by
/// its size and hash, so a change to it still shows.
pub fn collect(sources: &SourceMap, inputs: &[PathBuf], root: &Path) -> Vec<SourceText> {
    let mut by_path: BTreeMap<String, String> = BTreeMap::new();
    for file in sources.files() {
        by_path
            .entry(relative(&file.path, root))
            .or_insert_with(|| file.text.clone());
    }
    for path in inputs {
        if let std::collections::btree_map::Entry::Vacant(entry) =
            by_path.entry(relative(path, root))
        {
            if let Ok(bytes) = std::fs::read(path) {
                entry.insert(String::from_utf8(bytes).unwrap_or_else(|e| {
                    let bytes = e.into_bytes();
                    format!(
                        "(not text: {} bytes, BLAKE3 {})\n",
                        bytes.len(),
                        blake3::hash(&bytes).to_hex()
                    )
                }));
            }
        }
    }
    by_path
        .into_iter()
        .map(|(path, text)| SourceText { path, text })
        .collect()
}

/// A file that differs between the sides: `old` is `None` for a new file, `new` for a
/// removed one.
#[derive(Debug, Clone, PartialEq)]
pub struct SourceChange {
    pub path: String,
    pub old: Option<String>,
    pub new: Option<String>,
}

/// The files whose text differs, sorted by path.
pub fn changes(old: &[SourceText], new: &[SourceText]) -> Vec<SourceChange> {
    let mut all: BTreeMap<&str, (Option<&str>, Option<&str>)> = BTreeMap::new();
    for s in old {
        all.entry(&s.path).or_default().0 = Some(&s.text);
    }
    for s in new {
        all.entry(&s.path).or_default().1 = Some(&s.text);
    }
    all.into_iter()
        .filter(|(_, (a, b))| a != b)
        .map(|(path, (a, b))| SourceChange {
            path: path.to_owned(),
            old: a.map(str::to_owned),
            new: b.map(str::to_owned),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn data_paths_with_dots_line_up() {
        let root = Path::new("/tmp/side/figures");
        assert_eq!(
            relative(
                Path::new("/tmp/side/figures/codebooks/../data/plots.csv"),
                root
            ),
            "data/plots.csv"
        );
        assert_eq!(
            relative(Path::new("/tmp/side/figures/./a.figura"), root),
            "a.figura"
        );
    }

    #[test]
    fn only_differing_files_are_listed() {
        let text = |p: &str, t: &str| SourceText {
            path: p.into(),
            text: t.into(),
        };
        let old = [
            text("a.figura", "x"),
            text("b.csv", "1"),
            text("gone.figura", ""),
        ];
        let new = [
            text("a.figura", "x"),
            text("b.csv", "2"),
            text("new.figura", ""),
        ];
        let paths: Vec<String> = changes(&old, &new).into_iter().map(|c| c.path).collect();
        assert_eq!(paths, ["b.csv", "gone.figura", "new.figura"]);
    }
}
