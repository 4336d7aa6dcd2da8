//! Finding and reading spec files: folders searched for `*.figura`, includes resolved, every
//! path a spec names kept inside its project.
//!
//! Guarantees: files are read once each, in a sorted, deterministic order; every include is
//! resolved relative to the including file; missing includes, include cycles and include
//! chains deeper than [`MAX_INCLUDE_DEPTH`] are diagnostics with the span of the `include`
//! statement. The folder walk follows no symbolic link (two links to `.` cannot make it loop,
//! a link to `/usr` cannot make it read the system). Spec files are read through
//! [`crate::files`] (regular files of at most [`MAX_SPEC_BYTES`]).
//!
//! Containment ([`Bounds`]): an include, a data file and an output folder must lead, after
//! symbolic links are followed, inside the project of the spec that names it (`F0225`, or a
//! failure for an output folder), so neither a spec's text nor its diagnostics can bring in a
//! file from elsewhere. An include must name a `.figura` file, so no other file of the project
//! is ever read as a spec and quoted in a syntax error. Specs named on the command line are
//! the user's own choice and are read wherever they are.

use std::collections::BTreeMap;
use std::fs;
use std::path::{Path, PathBuf};
use std::rc::Rc;

use crate::check::{Program, SpecUnit};
use crate::diag::{Code, Diagnostic, SourceId, SourceMap};
use crate::files::{self, FileKind, ReadError};
use crate::syntax::{self, ast::Item};

use super::paths::Bounds;
use super::BuildError;

/// Largest spec file read, in bytes (a resource limit; specs are small text files).
pub const MAX_SPEC_BYTES: u64 = 4 * 1024 * 1024;

/// The longest chain of files including each other (`a` includes `b` includes `c` ... ).
pub const MAX_INCLUDE_DEPTH: usize = 32;

/// The file extension of spec files.
const SPEC_EXTENSION: &str = "figura";

/// Spec files named on the command line, or found in the folders named there (recursively,
/// skipping hidden folders, `out`/`target` folders and every symbolic link), sorted.
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
    let mut entries: Vec<(PathBuf, fs::FileType)> = fs::read_dir(dir)
        .map_err(|e| BuildError::io(dir, e))?
        .filter_map(|e| {
            let e = e.ok()?;
            // The entry's own type: a symbolic link is a link, whatever it points to.
            let kind = e.file_type().ok()?;
            let path = if here { e.file_name().into() } else { e.path() };
            Some((path, kind))
        })
        .collect();
    entries.sort_by(|a, b| a.0.cmp(&b.0));
    for (path, kind) in entries {
        let name = path.file_name().and_then(|n| n.to_str()).unwrap_or("");
        if kind.is_dir() {
            if !name.starts_with('.') && name != "out" && name != "target" {
                walk(&path, out)?;
            }
        } else if kind.is_file() && is_spec_name(&path) {
            out.push(path);
        }
    }
    Ok(())
}

fn is_spec_name(path: &Path) -> bool {
    path.extension().is_some_and(|e| e == SPEC_EXTENSION)
}

/// Parsed spec files and the diagnostics found while reading and parsing them.
pub struct Loaded {
    pub units: Vec<SpecUnit>,
    /// The source text of each unit (same index as `units`).
    pub unit_sources: Vec<SourceId>,
    /// Where the paths of each unit may lead (same index as `units`).
    pub bounds: Vec<Rc<Bounds>>,
    pub diags: Vec<Diagnostic>,
}

impl Loaded {
    /// The bounds of the unit whose text is `source`.
    fn bounds_of_source(&self, source: SourceId) -> Option<&Bounds> {
        let idx = self.unit_sources.iter().position(|&s| s == source)?;
        Some(&self.bounds[idx])
    }

    /// The bounds of the spec file `spec`.
    pub fn bounds_of_spec(&self, spec: &Path) -> Option<&Bounds> {
        let idx = self.units.iter().position(|u| u.path == spec)?;
        Some(&self.bounds[idx])
    }

    /// Refuses every data block whose file lies outside the project of the spec declaring
    /// it (`F0225` at its path), and drops the figures that read such a block, so the file is
    /// never hashed or read. Returns the diagnostics.
    pub fn contain_data(&self, program: &mut Program) -> Vec<Diagnostic> {
        let mut diags = Vec::new();
        let mut refused = Vec::new();
        for (idx, book) in program.codebooks.iter().enumerate() {
            let Some(bounds) = self.bounds_of_source(book.path_span.source) else {
                continue;
            };
            if !bounds.admits(&book.path) {
                let written = book.path_span;
                diags.push(outside(bounds, "data file", written));
                refused.push(idx);
            }
        }
        program.figures.retain(|f| !refused.contains(&f.data));
        diags
    }
}

/// `F0225`: a path in a spec leads outside its project.
fn outside(bounds: &Bounds, what: &str, path_span: crate::diag::Span) -> Diagnostic {
    Diagnostic::new(
        Code::OutsideProject,
        format!("this {what} is outside {}", bounds.describe()),
    )
    .with_label(path_span, "leads outside the project")
    .with_help(bounds.widen_help())
}

/// Reads and parses every root spec and, transitively, every file it includes. `top`, when
/// given, is the top folder of a copy of a work tree (see [`Bounds::around`]).
pub fn load(
    roots: &[PathBuf],
    top: Option<&Path>,
    sources: &mut SourceMap,
) -> Result<Loaded, BuildError> {
    let mut loader = Loader {
        top: top.map(Path::to_path_buf),
        units: Vec::new(),
        unit_sources: Vec::new(),
        bounds: Vec::new(),
        by_path: BTreeMap::new(),
        bounds_by_dir: BTreeMap::new(),
        loading: Vec::new(),
        diags: Vec::new(),
    };
    if let Some(top) = top {
        // A copy of a revision builds its own specs only.
        let inside = Bounds {
            root: fs::canonicalize(top).unwrap_or_else(|_| top.to_path_buf()),
            kind: super::paths::RootKind::WorkTree,
            allowed: Vec::new(),
        };
        if let Some(outside) = roots.iter().find(|r| !inside.admits(r)) {
            return Err(BuildError::Limit(format!(
                "{}: a spec folder outside the revision's files is not built",
                outside.display()
            )));
        }
    }
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
        bounds: loader.bounds,
        diags: loader.diags,
    })
}

struct Loader {
    top: Option<PathBuf>,
    units: Vec<SpecUnit>,
    unit_sources: Vec<SourceId>,
    bounds: Vec<Rc<Bounds>>,
    by_path: BTreeMap<PathBuf, Option<usize>>,
    /// Bounds already found, by the resolved folder of a spec.
    bounds_by_dir: BTreeMap<PathBuf, Rc<Bounds>>,
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

    /// The bounds of a spec in folder `dir`, found once per folder.
    fn bounds_for(&mut self, dir: &Path) -> Rc<Bounds> {
        let key = fs::canonicalize(dir).unwrap_or_else(|_| dir.to_path_buf());
        let top = self.top.as_deref();
        Rc::clone(
            self.bounds_by_dir
                .entry(key)
                .or_insert_with_key(|k| Rc::new(Bounds::around(k, top))),
        )
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
        // `a.figura`'s parent is the empty path: includes are joined to it as written (so
        // messages show `b.figura`, not `./b.figura`), bounds are found from `.`.
        let dir = path.parent().unwrap_or(Path::new(""));
        let bounds = if dir.as_os_str().is_empty() {
            self.bounds_for(Path::new("."))
        } else {
            self.bounds_for(dir)
        };
        self.bounds.push(Rc::clone(&bounds));
        for inc in includes {
            let target = dir.join(&inc.path.value);
            if let Err(d) = self.admit_include(&bounds, &inc, &target) {
                self.diags.push(d);
                continue;
            }
            if let Some(j) = self.file(&target, sources)? {
                self.units[idx].sees.push(j);
            }
        }
        Ok(Some(idx))
    }

    /// Whether the file of an `include` may be read: a `.figura` regular file inside the
    /// project, not already in the chain being loaded, not too deep.
    fn admit_include(
        &self,
        bounds: &Bounds,
        inc: &syntax::ast::Include,
        target: &Path,
    ) -> Result<(), Diagnostic> {
        let written = &inc.path.value;
        if !bounds.admits(target) {
            return Err(outside(bounds, "included file", inc.path.span));
        }
        if !is_spec_name(target) {
            return Err(Diagnostic::new(
                Code::IncludeMissing,
                format!("included file \"{written}\" is not a spec file"),
            )
            .with_label(inc.path.span, "not a .figura file")
            .with_help("an include names another spec file, ending in .figura"));
        }
        match fs::metadata(target) {
            Ok(meta) if meta.is_file() => {}
            Ok(meta) => {
                return Err(Diagnostic::new(
                    Code::IncludeMissing,
                    format!(
                        "included file \"{written}\" is {}, not a spec file",
                        FileKind::of(&meta).describe()
                    ),
                )
                .with_label(inc.path.span, "not a regular file")
                .with_help("an include names another spec file, ending in .figura"))
            }
            Err(_) => {
                return Err(Diagnostic::new(
                    Code::IncludeMissing,
                    format!("included file \"{written}\" was not found"),
                )
                .with_label(inc.path.span, "no such file")
                .with_help("include paths are relative to the file that includes them"))
            }
        }
        let canon = fs::canonicalize(target).unwrap_or_else(|_| target.to_path_buf());
        if self.loading.contains(&canon) {
            return Err(Diagnostic::new(
                Code::IncludeCycle,
                format!("\"{written}\" includes itself, directly or through other files"),
            )
            .with_label(inc.span, "include cycle")
            .with_help(
                "remove one of the includes so that files include each other in one direction only",
            ));
        }
        if self.loading.len() >= MAX_INCLUDE_DEPTH {
            return Err(Diagnostic::new(
                Code::IncludeTooDeep,
                format!("files include each other more than {MAX_INCLUDE_DEPTH} deep"),
            )
            .with_label(inc.span, "one include too many")
            .with_help(
                "include the shared data blocks directly from the specs that use them, \
                 instead of through a long chain of files",
            ));
        }
        Ok(())
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
    let bytes = files::read_regular(path, MAX_SPEC_BYTES).map_err(|e| match e {
        ReadError::TooLarge { size, .. } => BuildError::Limit(format!(
            "{} is {}; spec files are limited to {MAX_SPEC_BYTES} bytes",
            path.display(),
            size.map_or_else(|| "larger".to_owned(), |n| format!("{n} bytes"))
        )),
        other => BuildError::Io {
            path: path.to_path_buf(),
            message: other.to_string(),
        },
    })?;
    Ok(match String::from_utf8(bytes) {
        Ok(text) => SpecText::Text(text),
        Err(e) => SpecText::NotUtf8 {
            offset: e.utf8_error().valid_up_to(),
        },
    })
}

/// The text of a spec file, for commands that only rewrite it (`figura fmt`): a file that is
/// not UTF-8 is an I/O failure there.
pub fn read_spec_text(path: &Path) -> Result<String, BuildError> {
    match read_spec(path)? {
        SpecText::Text(text) => Ok(text),
        SpecText::NotUtf8 { offset } => Err(BuildError::Io {
            path: path.to_path_buf(),
            message: format!("not UTF-8 text (first bad byte at offset {offset})"),
        }),
    }
}
