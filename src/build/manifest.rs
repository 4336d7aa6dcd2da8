//! The manifest: what each output folder's figures were last built from.
//!
//! One `.figura-manifest.json` per output folder records, for every figure built there, its
//! spec file (relative to the folder), the hash of its inputs (see [`super::inputs`]) and the
//! hash of every output file; and, for every figure whose last build failed, the hash of the
//! inputs it failed with.
//!
//! Guarantees: the content is deterministic (sorted keys, no times, `/` separators), so the
//! manifest can be committed beside the figures and checked by CI; a missing or unreadable
//! manifest reads as empty, which only makes figures rebuild.

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use super::inputs::hash_file;
use super::paths::relative_path;

/// The manifest's file name inside an output folder.
pub const FILE_NAME: &str = ".figura-manifest.json";

/// The manifest format written by this version.
const FORMAT: u32 = 1;

#[derive(Debug, Clone, Default, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Manifest {
    pub format: u32,
    /// The tool that wrote it, for people reading the file (the version is also in every hash).
    pub tool: String,
    /// Figures built successfully, by name.
    pub figures: BTreeMap<String, Entry>,
    /// Figures whose last build failed, by name.
    #[serde(default)]
    pub failing: BTreeMap<String, Failing>,
}

/// One figure built successfully.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Entry {
    /// The spec file, relative to the output folder.
    pub spec: String,
    /// The hash of the figure's inputs.
    pub inputs: String,
    /// Output file name → hash of its bytes.
    pub outputs: BTreeMap<String, String>,
}

/// One figure whose last build failed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Failing {
    pub spec: String,
    pub inputs: String,
}

/// How a figure's outputs compare with its inputs.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Freshness {
    /// Every output is present, unchanged, and made from the current inputs.
    UpToDate,
    /// The outputs were made from other inputs, or an output was changed since.
    Stale,
    /// Never built here, or an output file is gone.
    Missing,
    /// The last build failed with these same inputs.
    Failing,
}

impl Manifest {
    /// Reads the manifest of `dir`; empty when there is none or it cannot be read (a
    /// manifest is a regular file of at most 64 MiB).
    pub fn read(dir: &Path) -> Manifest {
        crate::files::read_regular(&dir.join(FILE_NAME), 64 << 20)
            .ok()
            .and_then(|bytes| serde_json::from_slice::<Manifest>(&bytes).ok())
            .filter(|m| m.format == FORMAT)
            .unwrap_or_default()
    }

    /// The manifest's file content: pretty JSON with a final newline.
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut text = serde_json::to_string_pretty(self).unwrap_or_default();
        text.push('\n');
        text.into_bytes()
    }

    /// How the outputs of figure `name` in folder `dir` compare with `inputs`, given the
    /// output file names the figure makes now. Every output file is read and hashed.
    pub fn freshness(&self, dir: &Path, name: &str, inputs: &str, outputs: &[String]) -> Freshness {
        let Some(entry) = self.figures.get(name) else {
            return match self.failing.get(name) {
                Some(f) if f.inputs == inputs => Freshness::Failing,
                _ => Freshness::Missing,
            };
        };
        let recorded: BTreeSet<&str> = entry.outputs.keys().map(String::as_str).collect();
        let wanted: BTreeSet<&str> = outputs.iter().map(String::as_str).collect();
        if entry.inputs != inputs || recorded != wanted {
            return Freshness::Stale;
        }
        for (file, hash) in &entry.outputs {
            match hash_file(&dir.join(file)) {
                None => return Freshness::Missing,
                Some(h) if h.to_hex().as_str() != hash => return Freshness::Stale,
                Some(_) => {}
            }
        }
        Freshness::UpToDate
    }
}

/// Builds the next manifest of one output folder.
pub struct Update {
    dir_canonical: Option<PathBuf>,
    manifest: Manifest,
}

impl Update {
    /// Starts from the entries of `old` whose spec file still exists and is not among
    /// `rebuilt_specs` (canonical paths of every spec file of this build): figures of other
    /// builds sharing the folder are kept, figures removed from this build's files are dropped.
    pub fn new(
        dir: &Path,
        old: &Manifest,
        rebuilt_specs: &BTreeSet<PathBuf>,
        tool: &str,
    ) -> Update {
        let dir_canonical = fs::canonicalize(dir).ok();
        let keep = |spec: &str| {
            let Some(d) = &dir_canonical else {
                return false;
            };
            fs::canonicalize(d.join(spec)).is_ok_and(|p| !rebuilt_specs.contains(&p))
        };
        let manifest = Manifest {
            format: FORMAT,
            tool: tool.to_string(),
            figures: old
                .figures
                .iter()
                .filter(|(_, e)| keep(&e.spec))
                .map(|(k, e)| (k.clone(), e.clone()))
                .collect(),
            failing: old
                .failing
                .iter()
                .filter(|(_, f)| keep(&f.spec))
                .map(|(k, f)| (k.clone(), f.clone()))
                .collect(),
        };
        Update {
            dir_canonical,
            manifest,
        }
    }

    fn spec_text(&self, spec: &Path) -> String {
        let rel = match (&self.dir_canonical, fs::canonicalize(spec)) {
            (Some(dir), Ok(spec)) => relative_path(&spec, dir),
            _ => spec.to_path_buf(),
        };
        slash_path(&rel)
    }

    /// Records a figure built (or found up to date) from `inputs`, with its outputs' hashes.
    pub fn built(
        &mut self,
        name: &str,
        spec: &Path,
        inputs: &str,
        outputs: BTreeMap<String, String>,
    ) {
        let spec = self.spec_text(spec);
        self.manifest.failing.remove(name);
        self.manifest.figures.insert(
            name.to_string(),
            Entry {
                spec,
                inputs: inputs.to_string(),
                outputs,
            },
        );
    }

    /// Records a figure that failed with `inputs`.
    pub fn failed(&mut self, name: &str, spec: &Path, inputs: &str) {
        let spec = self.spec_text(spec);
        self.manifest.figures.remove(name);
        self.manifest.failing.insert(
            name.to_string(),
            Failing {
                spec,
                inputs: inputs.to_string(),
            },
        );
    }

    pub fn finish(self) -> Manifest {
        self.manifest
    }
}

/// A relative path written with `/` between components, the same on every system.
fn slash_path(path: &Path) -> String {
    path.components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect::<Vec<_>>()
        .join("/")
}
