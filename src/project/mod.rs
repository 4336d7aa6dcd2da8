//! Projects: a `figura.toml` at a manuscript's root, found by searching upward.
//!
//! ```toml
//! [project]
//! specs = ["figures"]     # folders searched for *.figura (default ["."])
//! out = "figures/out"     # every output here (default: out/ beside each spec)
//! allow-outside = ["../shared-data"]  # folders outside the project specs may use
//! numbers = ["tex", "typ", "json"]  # manuscript numbers files (default: none)
//!
//! [defaults]
//! formats = ["svg", "png"]
//! dpi = 300
//!
//! [journal]               # check every figure against a journal's artwork targets
//! widths = [85, 114, 174] # mm
//! min-text = 6            # pt
//! min-line = 0.25         # pt
//! dpi = 300
//! ```
//!
//! Guarantees: every problem of the file is reported at once, each with the span of the key or
//! value at fault (an unknown key, a value of the wrong type, a format that does not exist, a
//! dpi outside the supported limits); paths in a [`Project`] are usable from the folder the
//! search started in (relative when that folder is inside the project); every `specs` and `out`
//! folder lies, after symbolic links are followed, inside the project's folder or a folder of
//! `allow-outside` (see [`crate::build::paths::Bounds`]).
//!
//! Codes: `P0001` the file is not TOML, `P0002` an unknown table or key, `P0003` a value of the
//! wrong type or outside its limits, `P0004` a `specs` or `out` folder outside the project.

pub mod new;

use std::fs;
use std::path::{Path, PathBuf};

use toml::de::{DeTable, DeValue};
use toml::Spanned;

use crate::build::journal::Journal;
use crate::build::paths::{relative_to, resolved, Bounds, RootKind};
use crate::check::{FigureDefaults, Formats, DPI_LIMITS};
use crate::diag::{did_you_mean, Code, Diagnostic, SourceId, SourceMap, Span};
use crate::files;
use crate::numbers::NumbersFormat;

/// The file that marks a project's root.
pub const FILE_NAME: &str = "figura.toml";

/// Largest project file read, in bytes (a resource limit; the file is a few lines).
pub const MAX_FILE_BYTES: u64 = 1024 * 1024;

/// The settings of a `figura.toml`, as written (paths relative to the file's folder).
#[derive(Debug, Clone, PartialEq)]
pub struct Settings {
    /// Folders (or files) searched for specs.
    pub specs: Vec<PathBuf>,
    /// The one output folder, when set.
    pub out: Option<PathBuf>,
    /// Folders outside the project that specs may read from and write to.
    pub allow_outside: Vec<PathBuf>,
    /// Manuscript numbers files to write in each output folder.
    pub numbers: Vec<NumbersFormat>,
    pub defaults: FigureDefaults,
    /// The journal's artwork targets, when the file has a `[journal]` table.
    pub journal: Option<Journal>,
    /// Each path of `specs` and `out` as written, with its span, for messages about it.
    pub written: Vec<WrittenPath>,
}

impl Default for Settings {
    fn default() -> Self {
        Settings {
            specs: vec![PathBuf::from(".")],
            out: None,
            allow_outside: Vec::new(),
            numbers: Vec::new(),
            defaults: FigureDefaults::default(),
            journal: None,
            written: Vec::new(),
        }
    }
}

/// A path written in `figura.toml`: the key it belongs to, the path, its string's span.
#[derive(Debug, Clone, PartialEq)]
pub struct WrittenPath {
    pub key: &'static str,
    pub path: PathBuf,
    pub span: Span,
}

/// A found project: its root and settings, with paths joined to the root.
#[derive(Debug, Clone, PartialEq)]
pub struct Project {
    /// The folder holding `figura.toml`.
    pub root: PathBuf,
    /// The `figura.toml` itself.
    pub file: PathBuf,
    /// Spec folders, joined to the root.
    pub specs: Vec<PathBuf>,
    /// The output folder, joined to the root.
    pub out: Option<PathBuf>,
    /// Folders outside the project that specs may read from and write to, joined to the root.
    pub allow_outside: Vec<PathBuf>,
    /// Manuscript numbers files to write in each output folder.
    pub numbers: Vec<NumbersFormat>,
    pub defaults: FigureDefaults,
    /// The journal's artwork targets, when the file has a `[journal]` table.
    pub journal: Option<Journal>,
}

/// Why a project could not be opened.
#[derive(Debug)]
pub enum ProjectError {
    /// The file could not be read.
    Io { path: PathBuf, message: String },
    /// The file was read but is wrong; the diagnostics point into `sources`.
    Invalid {
        sources: SourceMap,
        diagnostics: Vec<Diagnostic>,
    },
}

impl std::fmt::Display for ProjectError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ProjectError::Io { path, message } => write!(f, "{}: {message}", path.display()),
            ProjectError::Invalid { diagnostics, .. } => {
                write!(f, "the project file has {} problem(s)", diagnostics.len())
            }
        }
    }
}

/// The nearest folder at or above `start` holding a `figura.toml`, as a path usable from
/// `start`: `.` for `start` itself, `..` for its parent, and so on. `start` must be absolute.
pub fn find_root(start: &Path) -> Option<PathBuf> {
    let mut relative = PathBuf::from(".");
    for (depth, dir) in start.ancestors().enumerate() {
        if dir.join(FILE_NAME).is_file() {
            return Some(relative);
        }
        relative = if depth == 0 {
            PathBuf::from("..")
        } else {
            relative.join("..")
        };
    }
    None
}

/// Finds the project around `start` (absolute, usually the current folder) and reads it;
/// `Ok(None)` when no folder at or above `start` has a `figura.toml`. The spec folders and
/// the output folder are given relative to `start` (`figures` seen from `figures/` is `.`).
pub fn discover(start: &Path) -> Result<Option<Project>, ProjectError> {
    let Some(root) = find_root(start) else {
        return Ok(None);
    };
    let project = open(&root)?;
    let near = |p: &Path| relative_to(&start.join(p), start);
    Ok(Some(Project {
        specs: project.specs.iter().map(|p| near(p)).collect(),
        out: project.out.as_deref().map(near),
        ..project
    }))
}

/// Reads the project whose root folder is `root`.
pub fn open(root: &Path) -> Result<Project, ProjectError> {
    let file = root.join(FILE_NAME);
    let text = read_text(&file)?;
    let mut sources = SourceMap::new();
    let id = sources.add(&file, text);
    let invalid = |diagnostics| ProjectError::Invalid {
        sources: sources.clone(),
        diagnostics,
    };
    let settings = parse(id, sources.text(id)).map_err(invalid)?;
    let allow_outside: Vec<PathBuf> = settings
        .allow_outside
        .iter()
        .map(|p| join(root, p))
        .collect();
    let outside = outside_paths(root, &settings.written, &allow_outside);
    if !outside.is_empty() {
        return Err(invalid(outside));
    }
    Ok(Project {
        root: root.to_path_buf(),
        specs: settings.specs.iter().map(|p| join(root, p)).collect(),
        out: settings.out.as_deref().map(|p| join(root, p)),
        allow_outside,
        numbers: settings.numbers,
        defaults: settings.defaults,
        journal: settings.journal,
        file,
    })
}

/// `P0004` for each spec or output path that leads outside the project folder `root` (after
/// following symbolic links) into no folder of `allow_outside`.
fn outside_paths(
    root: &Path,
    written: &[WrittenPath],
    allow_outside: &[PathBuf],
) -> Vec<Diagnostic> {
    let bounds = Bounds {
        root: fs::canonicalize(root).unwrap_or_else(|_| root.to_path_buf()),
        kind: RootKind::ProjectFile,
        allowed: allow_outside.iter().filter_map(|p| resolved(p)).collect(),
    };
    written
        .iter()
        .filter(|w| !bounds.admits(&join(root, &w.path)))
        .map(|w| {
            Diagnostic::new(
                Code::SpecsOutsideProject,
                format!(
                    "`{}` leads outside the project folder: \"{}\"",
                    w.key,
                    w.path.display()
                ),
            )
            .with_label(w.span, "outside the project")
            .with_help(format!(
                "specs and outputs stay inside {}; to use a folder elsewhere, open it under \
                 [project]: allow-outside = [\"{}\"]",
                bounds.describe(),
                w.path.display()
            ))
        })
        .collect()
}

/// `root/path`, without a leading `./` when the root is the current folder.
fn join(root: &Path, path: &Path) -> PathBuf {
    if root == Path::new(".") {
        path.to_path_buf()
    } else {
        root.join(path)
    }
}

fn read_text(path: &Path) -> Result<String, ProjectError> {
    let io = |message: String| ProjectError::Io {
        path: path.to_path_buf(),
        message,
    };
    let bytes = files::read_regular(path, MAX_FILE_BYTES).map_err(|e| io(e.to_string()))?;
    String::from_utf8(bytes).map_err(|_| io("not UTF-8 text".to_string()))
}

/// Reads the text of a `figura.toml` (source `id`), reporting every problem found.
pub fn parse(id: SourceId, text: &str) -> Result<Settings, Vec<Diagnostic>> {
    let doc = DeTable::parse(text).map_err(|e| vec![toml_error(id, text, &e)])?;
    let mut reader = Reader {
        id,
        diags: Vec::new(),
    };
    let mut settings = Settings::default();
    for (key, value) in sorted(doc.get_ref()) {
        match key.get_ref().as_ref() {
            "project" => reader.project(value, &mut settings),
            "defaults" => reader.defaults(value, &mut settings.defaults),
            "journal" => settings.journal = reader.journal(value),
            _ => reader.unknown(key, "", &["project", "defaults", "journal"]),
        }
    }
    if reader.diags.is_empty() {
        Ok(settings)
    } else {
        Err(reader.diags)
    }
}

/// A table's entries in the order they are written.
fn sorted<'t, 'i>(
    table: &'t DeTable<'i>,
) -> Vec<(
    &'t Spanned<toml::de::DeString<'i>>,
    &'t Spanned<DeValue<'i>>,
)> {
    let mut entries: Vec<_> = table.iter().collect();
    entries.sort_by_key(|(k, _)| k.span().start);
    entries
}

fn toml_error(id: SourceId, text: &str, e: &toml::de::Error) -> Diagnostic {
    let span = e.span().unwrap_or(0..0);
    let end = span.end.max(span.start).min(text.len());
    let start = span.start.min(end);
    Diagnostic::new(Code::NotToml, format!("{} is not valid TOML", FILE_NAME))
        .with_label(Span::new(id, start, end), e.message().trim().to_string())
        .with_help(SHAPE_HELP)
}

const SHAPE_HELP: &str = "the file holds `[project]` with specs = [\"figures\"] and out = \"figures/out\", `[defaults]` with formats = [\"svg\", \"png\"] and dpi = 300, and `[journal]` with widths = [85, 114, 174], min-text = 6, min-line = 0.25 and dpi = 300";

struct Reader {
    id: SourceId,
    diags: Vec<Diagnostic>,
}

impl Reader {
    fn span<T>(&self, s: &Spanned<T>) -> Span {
        let r = s.span();
        Span::new(self.id, r.start, r.end)
    }

    fn table<'t, 'i>(
        &mut self,
        value: &'t Spanned<DeValue<'i>>,
        name: &str,
    ) -> Option<&'t DeTable<'i>> {
        match value.get_ref() {
            DeValue::Table(t) => Some(t),
            other => {
                self.wrong_type(value, &format!("`{name}` is a table"), other.type_str());
                None
            }
        }
    }

    fn project(&mut self, value: &Spanned<DeValue<'_>>, settings: &mut Settings) {
        let Some(table) = self.table(value, "project") else {
            return;
        };
        for (key, value) in sorted(table) {
            match key.get_ref().as_ref() {
                "specs" => {
                    if let Some(list) = self.paths(value, "specs", "`specs` is a list of folders") {
                        settings.specs = list.iter().map(|w| w.path.clone()).collect();
                        settings.written.extend(list);
                    }
                }
                "out" => {
                    if let Some(s) = self.string(value, "`out` is a folder") {
                        settings.out = Some(PathBuf::from(&s));
                        settings.written.push(WrittenPath {
                            key: "out",
                            path: PathBuf::from(s),
                            span: self.span(value),
                        });
                    }
                }
                "allow-outside" => {
                    let expected = "`allow-outside` is a list of folders";
                    if let Some(list) = self.paths(value, "allow-outside", expected) {
                        settings.allow_outside = list.into_iter().map(|w| w.path).collect();
                    }
                }
                "numbers" => {
                    if let Some(n) = self.numbers(value) {
                        settings.numbers = n;
                    }
                }
                _ => self.unknown(
                    key,
                    "project.",
                    &["specs", "out", "allow-outside", "numbers"],
                ),
            }
        }
    }

    fn defaults(&mut self, value: &Spanned<DeValue<'_>>, defaults: &mut FigureDefaults) {
        let Some(table) = self.table(value, "defaults") else {
            return;
        };
        for (key, value) in sorted(table) {
            match key.get_ref().as_ref() {
                "formats" => {
                    if let Some(f) = self.formats(value) {
                        defaults.formats = f;
                    }
                }
                "dpi" => {
                    if let Some(dpi) = self.dpi(value) {
                        defaults.dpi = dpi;
                    }
                }
                _ => self.unknown(key, "defaults.", &["formats", "dpi"]),
            }
        }
    }

    /// `[journal]`: the artwork targets, each key defaulting to common practice.
    fn journal(&mut self, value: &Spanned<DeValue<'_>>) -> Option<Journal> {
        let table = self.table(value, "journal")?;
        let mut journal = Journal::default();
        for (key, value) in sorted(table) {
            match key.get_ref().as_ref() {
                "widths" => {
                    if let Some(w) = self.widths(value) {
                        journal.widths_mm = w;
                    }
                }
                "min-text" => {
                    let limits = (1.0, 24.0);
                    if let Some(v) = self.number(value, "`min-text` is a size in points", limits) {
                        journal.min_text_pt = v;
                    }
                }
                "min-line" => {
                    let limits = (0.01, 5.0);
                    if let Some(v) = self.number(value, "`min-line` is a width in points", limits) {
                        journal.min_line_pt = v;
                    }
                }
                "dpi" => {
                    if let Some(dpi) = self.dpi(value) {
                        journal.dpi = dpi;
                    }
                }
                _ => self.unknown(key, "journal.", &["widths", "min-text", "min-line", "dpi"]),
            }
        }
        Some(journal)
    }

    /// A number (integer or float) within `limits`.
    fn number(
        &mut self,
        value: &Spanned<DeValue<'_>>,
        expected: &str,
        (lo, hi): (f64, f64),
    ) -> Option<f64> {
        let n = match value.get_ref() {
            DeValue::Integer(i) => i64::from_str_radix(i.as_str(), i.radix())
                .ok()
                .map(|n| n as f64),
            DeValue::Float(f) => f.as_str().parse::<f64>().ok(),
            other => {
                self.wrong_type(value, &format!("{expected} (a number)"), other.type_str());
                return None;
            }
        };
        match n {
            Some(n) if (lo..=hi).contains(&n) => Some(n),
            _ => {
                self.diags.push(
                    Diagnostic::new(
                        Code::BadValue,
                        format!("{expected} from {lo} to {hi}"),
                    )
                    .with_label(self.span(value), "out of limits")
                    .with_help("journals' artwork guidelines name their least sizes; the common ones are min-text = 6 and min-line = 0.25"),
                );
                None
            }
        }
    }

    /// `widths = [85, 114, 174]`: column widths in millimetres, at least one, each within the
    /// figure size limits.
    fn widths(&mut self, value: &Spanned<DeValue<'_>>) -> Option<Vec<f64>> {
        let expected = "`widths` is a list of column widths in mm such as [85, 114, 174]";
        let items = self.array(value, expected)?;
        let (lo, hi) = crate::check::SIZE_LIMITS_MM;
        let widths: Option<Vec<f64>> = items
            .iter()
            .map(|item| self.number(item, "a column width in mm", (lo, hi)))
            .collect::<Vec<_>>()
            .into_iter()
            .collect();
        if items.is_empty() {
            self.diags.push(
                Diagnostic::new(Code::BadValue, "`widths` needs at least one column width")
                    .with_label(self.span(value), "no width")
                    .with_help("write, for example, widths = [85, 114, 174]"),
            );
            return None;
        }
        widths
    }

    fn unknown(&mut self, key: &Spanned<toml::de::DeString<'_>>, prefix: &str, known: &[&str]) {
        let name = key.get_ref().as_ref();
        let list = known
            .iter()
            .map(|k| format!("`{prefix}{k}`"))
            .collect::<Vec<_>>()
            .join(", ");
        let help = match did_you_mean(name, known.iter().copied()) {
            Some(s) => format!("did you mean `{prefix}{s}`? the known keys here are {list}"),
            None => format!("the known keys here are {list}"),
        };
        self.diags.push(
            Diagnostic::new(
                Code::UnknownKey,
                format!("`{prefix}{name}` is not a setting of {FILE_NAME}"),
            )
            .with_label(self.span(key), "unknown key")
            .with_help(help),
        );
    }

    fn wrong_type(&mut self, value: &Spanned<DeValue<'_>>, expected: &str, found: &str) {
        self.diags.push(
            Diagnostic::new(Code::BadValue, format!("{expected}, not a {found}"))
                .with_label(self.span(value), "wrong type")
                .with_help(SHAPE_HELP),
        );
    }

    fn string(&mut self, value: &Spanned<DeValue<'_>>, expected: &str) -> Option<String> {
        match value.get_ref() {
            DeValue::String(s) => Some(s.to_string()),
            other => {
                self.wrong_type(value, &format!("{expected} (a string)"), other.type_str());
                None
            }
        }
    }

    fn array<'t, 'i>(
        &mut self,
        value: &'t Spanned<DeValue<'i>>,
        expected: &str,
    ) -> Option<&'t [Spanned<DeValue<'i>>]> {
        match value.get_ref() {
            DeValue::Array(items) => Some(items),
            other => {
                self.wrong_type(value, expected, other.type_str());
                None
            }
        }
    }

    /// A list of paths, each with its span.
    fn paths(
        &mut self,
        value: &Spanned<DeValue<'_>>,
        key: &'static str,
        expected: &str,
    ) -> Option<Vec<WrittenPath>> {
        let items = self.array(value, &format!("{expected} (a list of strings)"))?;
        let out: Vec<Option<WrittenPath>> = items
            .iter()
            .map(|item| {
                let path = PathBuf::from(self.string(item, expected)?);
                let span = self.span(item);
                Some(WrittenPath { key, path, span })
            })
            .collect();
        out.into_iter().collect()
    }

    fn formats(&mut self, value: &Spanned<DeValue<'_>>) -> Option<Formats> {
        let expected = "`formats` is a list such as [\"svg\", \"png\"]";
        let items = self.array(value, expected)?;
        let mut formats = Formats::NONE;
        let mut ok = true;
        for item in items {
            let Some(name) = self.string(item, expected) else {
                ok = false;
                continue;
            };
            match name.as_str() {
                "svg" => formats.svg = true,
                "png" => formats.png = true,
                "pdf" => formats.pdf = true,
                "tiff" => formats.tiff = true,
                _ => {
                    ok = false;
                    self.diags.push(
                        Diagnostic::new(
                            Code::BadValue,
                            format!("\"{name}\" is not an output format"),
                        )
                        .with_label(self.span(item), "unknown format")
                        .with_help("the formats are \"svg\", \"png\", \"pdf\" and \"tiff\""),
                    );
                }
            }
        }
        if items.is_empty() {
            self.diags.push(
                Diagnostic::new(Code::BadValue, "`formats` needs at least one format")
                    .with_label(self.span(value), "no format")
                    .with_help("write, for example, formats = [\"svg\", \"png\"]"),
            );
            return None;
        }
        ok.then_some(formats)
    }

    /// `numbers = ["tex", "typ", "json"]`: the formats in the order written, each once.
    fn numbers(&mut self, value: &Spanned<DeValue<'_>>) -> Option<Vec<NumbersFormat>> {
        let expected = "`numbers` is a list such as [\"tex\", \"typ\", \"json\"]";
        let items = self.array(value, expected)?;
        let mut formats = Vec::new();
        let mut ok = true;
        for item in items {
            let Some(word) = self.string(item, expected) else {
                ok = false;
                continue;
            };
            match NumbersFormat::from_word(&word) {
                Some(f) if !formats.contains(&f) => formats.push(f),
                Some(_) => {}
                None => {
                    ok = false;
                    let known = NumbersFormat::ALL.map(NumbersFormat::word);
                    let help = match did_you_mean(&word, known.iter().copied()) {
                        Some(s) => format!("did you mean \"{s}\"? the formats are \"tex\" (LaTeX), \"typ\" (Typst) and \"json\""),
                        None => "the formats are \"tex\" (LaTeX), \"typ\" (Typst) and \"json\"".to_string(),
                    };
                    self.diags.push(
                        Diagnostic::new(
                            Code::BadValue,
                            format!("\"{word}\" is not a numbers format"),
                        )
                        .with_label(self.span(item), "unknown format")
                        .with_help(help),
                    );
                }
            }
        }
        ok.then_some(formats)
    }

    fn dpi(&mut self, value: &Spanned<DeValue<'_>>) -> Option<u32> {
        let (lo, hi) = DPI_LIMITS;
        let n = match value.get_ref() {
            DeValue::Integer(i) => i64::from_str_radix(i.as_str(), i.radix()).ok(),
            other => {
                self.wrong_type(value, "`dpi` is a whole number", other.type_str());
                return None;
            }
        };
        match n.and_then(|n| u32::try_from(n).ok()) {
            Some(n) if (lo..=hi).contains(&n) => Some(n),
            _ => {
                self.diags.push(
                    Diagnostic::new(
                        Code::BadValue,
                        format!("dpi must be a whole number from {lo} to {hi}"),
                    )
                    .with_label(self.span(value), "out of limits")
                    .with_help(
                        "journals usually ask for 300 dpi (photographs) to 600 dpi (line art)",
                    ),
                );
                None
            }
        }
    }
}
