//! Finding and reading spec files: folders searched for `*.figura`, includes resolved.
//!
//! Guarantees: files are read once each, in a sorted, deterministic order; every include is
//! resolved relative to the including file; missing includes and include cycles are
//! diagnostics with the span of the `include` statement.

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};

use crate::check::SpecUnit;
use crate::diag::{Code, Diagnostic, SourceId, SourceMap};
use crate::syntax::{self, ast::Item};

use super::BuildError;

/// Largest spec file read, in bytes (a resource limit; specs are small text files).
pub const MAX_SPEC_BYTES: u64 = 4 * 1024 * 1024;

/// Spec files named on the command line, or found in the folders named there (recursively,
/// skipping hidden folders and `out`/`target` folders), sorted.
pub fn find_specs(paths: &[PathBuf]) -> Result<Vec<PathBuf>, BuildError> {
    let mut out = Vec::new();
    for p in paths {
        let meta = fs::metadata(p).map_err(|e| BuildError::io(p, e))?;
        if meta.is_dir() {
            walk(p, &mut out)?;
        } else {
            out.push(p.clone());
        }
    }
    out.sort();
    out.dedup();
    Ok(out)
}

fn walk(dir: &Path, out: &mut Vec<PathBuf>) -> Result<(), BuildError> {
    // Paths found in the current folder are written without a leading `./`.
    let here = dir == Path::new(".");
    let mut entries: Vec<PathBuf> = fs::read_dir(dir)
        .map_err(|e| BuildError::io(dir, e))?
        .filter_map(|e| {
            e.ok()
                .map(|e| if here { e.file_name().into() } else { e.path() })
        })
        .collect();
    entries.sort();
    for path in entries {
        let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("");
        if path.is_dir() {
            if !name.starts_with('.') && name != "out" && name != "target" {
                walk(&path, out)?;
            }
        } else if name.ends_with(".figura") {
            out.push(path);
        }
    }
    Ok(())
}

/// Parsed spec files and the diagnostics found while reading and parsing them.
pub struct Loaded {
    pub units: Vec<SpecUnit>,
    /// The source text of each unit (same index as `units`).
    pub unit_sources: Vec<SourceId>,
    pub diags: Vec<Diagnostic>,
}

/// Reads and parses every root spec and, transitively, every file it includes.
pub fn load(roots: &[PathBuf], sources: &mut SourceMap) -> Result<Loaded, BuildError> {
    let mut loader = Loader {
        units: Vec::new(),
        unit_sources: Vec::new(),
        by_path: BTreeMap::new(),
        loading: Vec::new(),
        diags: Vec::new(),
    };
    let root_idx: Vec<Option<usize>> = roots
        .iter()
        .map(|r| loader.file(r, sources))
        .collect::<Result<_, _>>()?;
    for idx in root_idx.into_iter().flatten() {
        loader.units[idx].build_figures = true;
    }
    // Transitive visibility: each unit sees what its includes see.
    let direct: Vec<Vec<usize>> = loader.units.iter().map(|u| u.sees.clone()).collect();
    for (i, unit) in loader.units.iter_mut().enumerate() {
        let mut seen = vec![false; direct.len()];
        let mut stack = direct[i].clone();
        while let Some(j) = stack.pop() {
            if j != i && !seen[j] {
                seen[j] = true;
                stack.extend(&direct[j]);
            }
        }
        unit.sees = (0..direct.len()).filter(|&j| seen[j]).collect();
    }
    Ok(Loaded {
        units: loader.units,
        unit_sources: loader.unit_sources,
        diags: loader.diags,
    })
}

struct Loader {
    units: Vec<SpecUnit>,
    unit_sources: Vec<SourceId>,
    by_path: BTreeMap<PathBuf, Option<usize>>,
    /// Files being loaded (the include chain), to find cycles.
    loading: Vec<PathBuf>,
    diags: Vec<Diagnostic>,
}

impl Loader {
    /// Loads one file (once); `None` when it did not parse.
    fn file(&mut self, path: &Path, sources: &mut SourceMap) -> Result<Option<usize>, BuildError> {
        let key = fs::canonicalize(path).unwrap_or_else(|_| path.to_path_buf());
        if let Some(known) = self.by_path.get(&key) {
            return Ok(*known);
        }
        self.by_path.insert(key.clone(), None);
        self.loading.push(key.clone());
        let result = self.parse_file(path, key, sources);
        self.loading.pop();
        result
    }

    fn parse_file(
        &mut self,
        path: &Path,
        key: PathBuf,
        sources: &mut SourceMap,
    ) -> Result<Option<usize>, BuildError> {
        let text = match read_spec(path)? {
            SpecText::Text(t) => t,
            SpecText::NotUtf8 { offset } => {
                self.diags.push(not_utf8(path, offset));
                return Ok(None);
            }
        };
        let id = sources.add(path, text);
        let ast = match syntax::parse(id, sources.text(id)) {
            Ok(ast) => ast,
            Err(diags) => {
                self.diags.extend(diags);
                return Ok(None);
            }
        };
        let idx = self.units.len();
        self.by_path.insert(key, Some(idx));
        let includes: Vec<_> = ast
            .items
            .iter()
            .filter_map(|i| match i {
                Item::Include(inc) => Some(inc.clone()),
                Item::Block(_) => None,
            })
            .collect();
        self.units.push(SpecUnit {
            path: path.to_path_buf(),
            ast,
            sees: Vec::new(),
            build_figures: false,
        });
        self.unit_sources.push(id);
        let dir = path.parent().unwrap_or(Path::new("."));
        for inc in includes {
            let target = dir.join(&inc.path.value);
            if !target.is_file() {
                self.diags.push(
                    Diagnostic::new(
                        Code::IncludeMissing,
                        format!("included file \"{}\" was not found", inc.path.value),
                    )
                    .with_label(inc.path.span, "no such file")
                    .with_help("include paths are relative to the file that includes them"),
                );
                continue;
            }
            let canon = fs::canonicalize(&target).unwrap_or_else(|_| target.clone());
            if self.loading.contains(&canon) {
                self.diags.push(
                    Diagnostic::new(Code::IncludeCycle, format!("\"{}\" includes itself, directly or through other files", inc.path.value))
                        .with_label(inc.span, "include cycle")
                        .with_help("remove one of the includes so that files include each other in one direction only"),
                );
                continue;
            }
            if let Some(j) = self.file(&target, sources)? {
                self.units[idx].sees.push(j);
            }
        }
        Ok(Some(idx))
    }
}

/// A spec file's content: text, or the offset of its first byte that is not UTF-8.
enum SpecText {
    Text(String),
    NotUtf8 { offset: usize },
}

/// A spec that is not UTF-8 is a diagnostic of that file (exit 1), not a failure of the run.
fn not_utf8(path: &Path, offset: usize) -> Diagnostic {
    Diagnostic::new(
        Code::SpecNotUtf8,
        format!(
            "{} is not UTF-8 text (first bad byte at offset {offset})",
            path.display()
        ),
    )
    .with_file(path)
    .with_help("save the spec as UTF-8 (most editors offer it under \"Save with encoding\")")
}

fn read_spec(path: &Path) -> Result<SpecText, BuildError> {
    let meta = fs::metadata(path).map_err(|e| BuildError::io(path, e))?;
    if meta.len() > MAX_SPEC_BYTES {
        return Err(BuildError::Limit(format!(
            "{} is {} bytes; spec files are limited to {} bytes",
            path.display(),
            meta.len(),
            MAX_SPEC_BYTES
        )));
    }
    let bytes = fs::read(path).map_err(|e| BuildError::io(path, e))?;
    Ok(match String::from_utf8(bytes) {
        Ok(text) => SpecText::Text(text),
        Err(e) => SpecText::NotUtf8 {
            offset: e.utf8_error().valid_up_to(),
        },
    })
}
