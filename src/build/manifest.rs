//! The manifest: what each output folder's figures were last built from.
//!
//! One `.figura-manifest.json` per output folder records, for every figure built there, its
//! spec file (relative to the folder), the hash of its inputs (see [`super::inputs`]) and the
//! hash of every output file; for every figure whose last build failed, the hash of the
//! inputs it failed with and the outputs of its last good build, which are still on disk; and
//! the manuscript numbers files written there (see [`crate::numbers`]).
//!
//! Guarantees: the content is deterministic (sorted keys, no times, `/` separators), so the
//! manifest can be committed beside the figures and checked by CI; a missing or unreadable
//! manifest reads as empty, which only makes figures rebuild.
//!
//! The manifest is also the list of files Figura may delete: the outputs of a figure that no
//! longer exists (*orphaned*), an output a figure no longer makes, and with `figura clean`
//! every output. Only names that an output of that figure can have are ever deleted
//! ([`is_output_name`]), so an edited manifest cannot point a deletion at another file.

use std::collections::{BTreeMap, BTreeSet};
use std::fs;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::numbers::NumbersFormat;

use super::inputs::hash_file;
use super::paths::relative_path;
use super::render::OutputKind;

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
    /// The manuscript numbers files, when the project asks for them.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub numbers: Option<NumbersEntry>,
}

/// The manuscript numbers files of an output folder.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct NumbersEntry {
    /// The hash of what they are made from: the formats and every figure's input hash.
    pub inputs: String,
    /// File name → hash of its bytes.
    pub outputs: BTreeMap<String, String>,
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
    /// Outputs of the figure's last successful build, still on disk.
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub outputs: BTreeMap<String, String>,
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
        outputs_freshness(dir, &entry.outputs)
    }
}

/// Whether every recorded output of folder `dir` (file name → hash) is present with its
/// recorded bytes: up to date, missing (a file is gone) or stale (a file changed). Every
/// file is read and hashed.
pub fn outputs_freshness(dir: &Path, outputs: &BTreeMap<String, String>) -> Freshness {
    for (file, hash) in outputs {
        match hash_file(&dir.join(file)) {
            None => return Freshness::Missing,
            Some(h) if h.to_hex().as_str() != hash => return Freshness::Stale,
            Some(_) => {}
        }
    }
    Freshness::UpToDate
}

/// Which figures a run speaks for, to tell orphaned manifest entries from entries of other
/// runs sharing an output folder.
pub struct Scope<'a> {
    /// Canonical paths of every spec file of the run.
    pub specs: &'a BTreeSet<PathBuf>,
    /// The name of every figure block of those files (checked or not).
    pub figures: &'a BTreeSet<String>,
}

/// A figure recorded in a manifest whose block no longer exists, and its files there.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Orphan {
    pub name: String,
    /// Its output files, by name (only names an output of it can have).
    pub files: Vec<String>,
}

/// Builds the next manifest of one output folder.
pub struct Update {
    dir_canonical: Option<PathBuf>,
    manifest: Manifest,
    orphans: Vec<Orphan>,
    /// Outputs that figures made in this run no longer make.
    dropped: Vec<String>,
}

impl Update {
    /// Starts from `old`. An entry is orphaned when its figure is not in `scope` and its spec
    /// file is either gone or part of the run; orphans are dropped (and their files listed,
    /// see [`Update::finish`]). Other entries are kept: figures of other runs sharing the
    /// folder, and figures of this run, until [`Update::built`] or [`Update::failed`] replace
    /// them.
    pub fn new(dir: &Path, old: &Manifest, scope: &Scope, tool: &str) -> Update {
        let dir_canonical = fs::canonicalize(dir).ok();
        let orphaned = |name: &str, spec: &str| {
            if scope.figures.contains(name) {
                return false;
            }
            let Some(d) = &dir_canonical else {
                return true;
            };
            fs::canonicalize(d.join(spec)).map_or(true, |p| scope.specs.contains(&p))
        };
        let mut manifest = Manifest {
            format: FORMAT,
            tool: tool.to_string(),
            figures: BTreeMap::new(),
            failing: BTreeMap::new(),
            numbers: old.numbers.clone(),
        };
        let mut orphans = Vec::new();
        for (name, entry) in &old.figures {
            if orphaned(name, &entry.spec) {
                orphans.push(Orphan::new(name, &entry.outputs));
            } else {
                manifest.figures.insert(name.clone(), entry.clone());
            }
        }
        for (name, failing) in &old.failing {
            if orphaned(name, &failing.spec) {
                orphans.push(Orphan::new(name, &failing.outputs));
            } else {
                manifest.failing.insert(name.clone(), failing.clone());
            }
        }
        orphans.sort_by(|a, b| a.name.cmp(&b.name));
        Update {
            dir_canonical,
            manifest,
            orphans,
            dropped: Vec::new(),
        }
    }

    fn spec_text(&self, spec: &Path) -> String {
        let rel = match (&self.dir_canonical, fs::canonicalize(spec)) {
            (Some(dir), Ok(spec)) => relative_path(&spec, dir),
            _ => spec.to_path_buf(),
        };
        slash_path(&rel)
    }

    /// The outputs recorded for `name` before this update (built or failing).
    fn recorded(&self, name: &str) -> Option<&BTreeMap<String, String>> {
        self.manifest
            .figures
            .get(name)
            .map(|e| &e.outputs)
            .or_else(|| self.manifest.failing.get(name).map(|f| &f.outputs))
    }

    /// Records a figure built (or found up to date) from `inputs`, with its outputs' hashes.
    /// Outputs it made before and makes no more are dropped.
    pub fn built(
        &mut self,
        name: &str,
        spec: &Path,
        inputs: &str,
        outputs: BTreeMap<String, String>,
    ) {
        let spec = self.spec_text(spec);
        if let Some(before) = self.recorded(name) {
            let gone = before
                .keys()
                .filter(|f| !outputs.contains_key(*f) && is_output_name(name, f))
                .cloned()
                .collect::<Vec<_>>();
            self.dropped.extend(gone);
        }
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

    /// Records a figure that failed with `inputs`; the outputs of its last good build stay
    /// recorded, as they stay on disk.
    pub fn failed(&mut self, name: &str, spec: &Path, inputs: &str) {
        let spec = self.spec_text(spec);
        let outputs = self.recorded(name).cloned().unwrap_or_default();
        self.manifest.figures.remove(name);
        self.manifest.failing.insert(
            name.to_string(),
            Failing {
                spec,
                inputs: inputs.to_string(),
                outputs,
            },
        );
    }

    /// Records the numbers files written from `inputs` (or none).
    pub fn numbers(&mut self, numbers: Option<NumbersEntry>) {
        if let Some(before) = &self.manifest.numbers {
            let keep = numbers.as_ref().map(|n| &n.outputs);
            let gone = before
                .outputs
                .keys()
                .filter(|f| keep.is_none_or(|k| !k.contains_key(*f)) && is_numbers_name(f))
                .cloned()
                .collect::<Vec<_>>();
            self.dropped.extend(gone);
        }
        self.manifest.numbers = numbers;
    }

    /// The orphaned figures found when the update started.
    pub fn orphans(&self) -> &[Orphan] {
        &self.orphans
    }

    /// The next manifest, and the files of the folder it no longer lists: every orphan's
    /// files and the outputs figures no longer make (sorted).
    pub fn finish(self) -> (Manifest, Vec<String>) {
        let mut files: Vec<String> = self
            .orphans
            .iter()
            .flat_map(|o| o.files.iter().cloned())
            .chain(self.dropped)
            .collect();
        files.sort();
        files.dedup();
        (self.manifest, files)
    }
}

impl Orphan {
    fn new(name: &str, outputs: &BTreeMap<String, String>) -> Orphan {
        Orphan {
            name: name.to_string(),
            files: outputs
                .keys()
                .filter(|f| is_output_name(name, f))
                .cloned()
                .collect(),
        }
    }
}

impl Manifest {
    /// Every file of the folder the manifest lists: outputs of built and failing figures and
    /// the numbers files (only names such files can have), sorted.
    pub fn listed_files(&self) -> Vec<String> {
        let figures = self.figures.iter().map(|(n, e)| (n, &e.outputs));
        let failing = self.failing.iter().map(|(n, f)| (n, &f.outputs));
        let mut files: Vec<String> = figures
            .chain(failing)
            .flat_map(|(name, outputs)| {
                outputs
                    .keys()
                    .filter(move |f| is_output_name(name, f))
                    .cloned()
            })
            .chain(
                self.numbers
                    .iter()
                    .flat_map(|n| n.outputs.keys().filter(|f| is_numbers_name(f)).cloned()),
            )
            .collect();
        files.sort();
        files.dedup();
        files
    }
}

/// Whether `file` is a name an output of figure `figure` can have: `FIGURE.EXT` for one of
/// the output kinds, with no folder in it.
pub fn is_output_name(figure: &str, file: &str) -> bool {
    let plain = |s: &str| !s.is_empty() && !s.contains(['/', '\\']) && s != "." && s != "..";
    plain(figure)
        && plain(file)
        && OutputKind::ALL
            .iter()
            .any(|kind| kind.file_name(figure) == file)
}

/// Whether `file` is the name of a numbers file.
pub fn is_numbers_name(file: &str) -> bool {
    NumbersFormat::ALL.iter().any(|f| f.file_name() == file)
}

/// A relative path written with `/` between components, the same on every system.
fn slash_path(path: &Path) -> String {
    path.components()
        .map(|c| c.as_os_str().to_string_lossy().into_owned())
        .collect::<Vec<_>>()
        .join("/")
}
