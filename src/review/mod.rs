//! `figura diff`: what a change does to the figures, for the review of a pull request.
//!
//! Both sides (git revisions of the current repository, folders, or the working tree; see
//! [`side`]) are built with the library's build into temporary folders, and compared figure
//! by figure ([`compare`]): added, removed, changed and unchanged figures; every summary
//! number that moved; for each changed figure a picture of before, after and the changed
//! pixels ([`picture`]). The report folder receives `NAME.diff.png` for each changed figure,
//! `report.md` (to paste into a review comment; see [`markdown`]) and `index.html` (one
//! self-contained page with the pictures inlined and a line diff of the changed spec and data
//! files; see [`html`]).
//!
//! Invariant: the repository and its work tree are only read. Revisions are read as blobs
//! into a temporary folder, builds write only into temporary folders, and the only files
//! written outside them are the report's (atomically, in the report folder).

mod compare;
mod git;
mod html;
mod lines;
mod markdown;
mod picture;
mod quotes;
mod side;
mod sources;

use std::fmt;
use std::path::{Path, PathBuf};

use tempfile::TempDir;

use crate::build::{self, write_atomic, BuildError, BuildOptions, BuildReport};
use crate::numbers::NumbersFormat;

use compare::Outputs;
pub use compare::{FigureDiff, StatChange, StatKey, State};
pub use quotes::QuoteChange;
use side::{Side, SideSpec};
use sources::{SourceChange, SourceText};

/// What to compare and where to write the report.
#[derive(Debug, Clone)]
pub struct DiffOptions {
    /// The old side: a folder or a git revision.
    pub base: String,
    /// The new side: a folder or a git revision; `None` is the working tree.
    pub head: Option<String>,
    /// The folder the report is written into (created if needed).
    pub report_dir: PathBuf,
    /// Where the report folder will be published (a URL): `report.md` then links its
    /// pictures there instead of embedding small previews.
    pub image_url: Option<String>,
}

/// Why a comparison could not be made.
#[derive(Debug)]
pub enum ReviewError {
    /// A git command failed, or a revision does not exist.
    Git(String),
    Io {
        path: PathBuf,
        message: String,
    },
    /// One side has errors in its specs or data; its diagnostics are in the report.
    Build {
        side: String,
        report: Box<BuildReport>,
    },
    /// A side's `figura.toml` could not be read.
    Project(String),
    /// The build failed outright (I/O, limits).
    BuildFailed(BuildError),
    /// A summary file could not be read.
    Summary(String),
    /// A picture could not be read or composed.
    Picture(String),
}

impl ReviewError {
    pub fn io(path: &Path, e: std::io::Error) -> Self {
        ReviewError::Io {
            path: path.to_path_buf(),
            message: e.to_string(),
        }
    }
}

impl fmt::Display for ReviewError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ReviewError::Git(m) => write!(f, "{m}"),
            ReviewError::Io { path, message } => write!(f, "{}: {message}", path.display()),
            ReviewError::Build { side, .. } => write!(f, "the {side} side does not build"),
            ReviewError::BuildFailed(e) => write!(f, "{e}"),
            ReviewError::Project(m) => write!(f, "cannot read the project file: {m}"),
            ReviewError::Summary(m) => write!(f, "cannot read a summary: {m}"),
            ReviewError::Picture(m) => write!(f, "cannot compare pictures: {m}"),
        }
    }
}

impl std::error::Error for ReviewError {}

impl From<BuildError> for ReviewError {
    fn from(e: BuildError) -> Self {
        match e {
            BuildError::Io { path, message } => ReviewError::Io { path, message },
            other => ReviewError::BuildFailed(other),
        }
    }
}

/// The picture shown for a figure in the report.
#[derive(Debug, Clone)]
pub enum Picture {
    /// Unchanged figures are not shown.
    None,
    /// A changed figure: before, after and the changed pixels, as PNG.
    Diff {
        before: Vec<u8>,
        after: Vec<u8>,
        changed: Vec<u8>,
        /// The changed pixels at most [`PREVIEW_WIDTH`] wide, for `report.md`.
        preview: Vec<u8>,
        changed_pixels: usize,
        compared_pixels: usize,
    },
    /// An added or removed figure: its one picture, as PNG.
    Single(Vec<u8>),
    /// The figure has neither a PNG nor an SVG on a side it exists on.
    Unavailable,
}

impl Picture {
    /// The share of pixels that changed, 0 to 1 (0 for anything but a changed figure).
    pub fn changed_share(&self) -> f64 {
        match self {
            Picture::Diff {
                changed_pixels,
                compared_pixels,
                ..
            } => *changed_pixels as f64 / (*compared_pixels).max(1) as f64,
            _ => 0.0,
        }
    }
}

/// The width of the changed-pixels preview embedded in `report.md`, in pixels.
pub const PREVIEW_WIDTH: u32 = 480;

/// The files of a changed figure in the report folder: before, after, changed pixels.
pub fn picture_files(figure: &str) -> [String; 3] {
    ["before", "after", "changed"].map(|what| format!("{figure}.{what}.png"))
}

/// One figure in the report.
#[derive(Debug, Clone)]
pub struct FigureReview {
    pub diff: FigureDiff,
    pub picture: Picture,
}

/// Everything the report shows.
#[derive(Debug, Clone)]
pub struct Review {
    pub base: String,
    pub head: String,
    /// Changed figures, the most changed pixels first; then added, removed and unchanged
    /// figures, each group by name.
    pub figures: Vec<FigureReview>,
    /// Spec and data files that differ.
    pub sources: Vec<SourceChange>,
    /// Quoted numbers (see [`crate::numbers`]) whose text changed; empty when neither side
    /// writes numbers files.
    pub quotes: Vec<QuoteChange>,
}

impl Review {
    pub fn count(&self, state: State) -> usize {
        self.figures
            .iter()
            .filter(|f| f.diff.state == state)
            .count()
    }

    /// Whether any figure was added, removed or changed.
    pub fn any_change(&self) -> bool {
        self.figures
            .iter()
            .any(|f| f.diff.state != State::Unchanged)
    }

    /// A few lines for the terminal: each figure that differs, and the counts.
    pub fn summary_text(&self) -> String {
        let mut out = format!("base: {}\nhead: {}\n", self.base, self.head);
        for f in self
            .figures
            .iter()
            .filter(|f| f.diff.state != State::Unchanged)
        {
            let numbers = match f.diff.numbers.len() {
                0 => String::new(),
                1 => " (1 number moved)".to_owned(),
                n => format!(" ({n} numbers moved)"),
            };
            out.push_str(&format!(
                "{:<9} {}{numbers}\n",
                f.diff.state.as_str(),
                f.diff.name
            ));
        }
        match self.quotes.len() {
            0 => {}
            1 => out.push_str("1 quoted number changed\n"),
            n => out.push_str(&format!("{n} quoted numbers changed\n")),
        }
        out.push_str(&format!(
            "{} changed, {} added, {} removed, {} unchanged\n",
            self.count(State::Changed),
            self.count(State::Added),
            self.count(State::Removed),
            self.count(State::Unchanged)
        ));
        out
    }
}

/// The outcome of `figura diff`: the review and the files written.
#[derive(Debug)]
pub struct DiffOutcome {
    pub review: Review,
    pub written: Vec<PathBuf>,
}

impl DiffOutcome {
    pub fn any_change(&self) -> bool {
        self.review.any_change()
    }

    pub fn summary_text(&self) -> String {
        let mut out = self.review.summary_text();
        for path in &self.written {
            if path.extension().is_some_and(|e| e == "md" || e == "html") {
                out.push_str(&format!("wrote {}\n", path.display()));
            }
        }
        out
    }
}

/// Compares the two sides named in `options`, from the current folder.
pub fn diff(options: &DiffOptions) -> Result<DiffOutcome, ReviewError> {
    let cwd = std::env::current_dir().map_err(|e| ReviewError::io(Path::new("."), e))?;
    diff_in(options, &cwd)
}

/// Compares the two sides named in `options`, as if run from `cwd`.
pub fn diff_in(options: &DiffOptions, cwd: &Path) -> Result<DiffOutcome, ReviewError> {
    let scratch = TempDir::with_prefix("figura-diff-")
        .map_err(|e| ReviewError::io(&std::env::temp_dir(), e))?;
    let base_spec = SideSpec::from_arg(Some(&options.base), cwd);
    let head_spec = SideSpec::from_arg(options.head.as_deref(), cwd);
    let base = side::prepare(&base_spec, cwd, scratch.path())?;
    let head = side::prepare(&head_spec, cwd, scratch.path())?;
    let old = build_side(&base, "base", &scratch.path().join("base-out"))?;
    let new = build_side(&head, "head", &scratch.path().join("head-out"))?;
    let diffs = compare::compare_figures(&old.figures, &new.figures)?;
    let mut figures = diffs
        .into_iter()
        .map(|diff| {
            let picture = picture_of(&diff, &old, &new)?;
            Ok(FigureReview { diff, picture })
        })
        .collect::<Result<Vec<_>, ReviewError>>()?;
    // Largest change first; a stable sort keeps states and names in order otherwise.
    figures.sort_by(|a, b| {
        a.diff
            .state
            .cmp(&b.diff.state)
            .then(
                b.picture
                    .changed_share()
                    .total_cmp(&a.picture.changed_share()),
            )
            .then(b.diff.numbers.len().cmp(&a.diff.numbers.len()))
    });
    let review = Review {
        base: base.label.clone(),
        head: head.label.clone(),
        figures,
        sources: sources::changes(&old.sources, &new.sources),
        quotes: quotes::changes(old.quotes.as_ref(), new.quotes.as_ref()),
    };
    let written = write_report(&review, &options.report_dir, options.image_url.as_deref())?;
    Ok(DiffOutcome { review, written })
}

/// One side, built.
struct Built {
    figures: std::collections::BTreeMap<String, Outputs>,
    sources: Vec<SourceText>,
    /// The quoted numbers, when the side's project writes them.
    quotes: Option<quotes::Quotes>,
}

fn build_side(side: &Side, which: &str, out: &Path) -> Result<Built, ReviewError> {
    std::fs::create_dir_all(&side.root).map_err(|e| ReviewError::io(&side.root, e))?;
    std::fs::create_dir_all(out).map_err(|e| ReviewError::io(out, e))?;
    // A side inside a project builds the project's specs with its settings.
    let project = match side.project_root() {
        Some(root) => {
            Some(crate::project::open(&root).map_err(|e| ReviewError::Project(e.to_string()))?)
        }
        None => None,
    };
    // The numbers are always written as JSON too, to compare the quoted numbers.
    let numbers = project.as_ref().map_or_else(Vec::new, |p| {
        let mut formats = p.numbers.clone();
        if !formats.is_empty() && !formats.contains(&NumbersFormat::Json) {
            formats.push(NumbersFormat::Json);
        }
        formats
    });
    let options = BuildOptions {
        paths: project
            .as_ref()
            .map_or_else(|| vec![side.root.clone()], |p| p.specs.clone()),
        out: Some(out.to_path_buf()),
        defaults: project.map(|p| p.defaults).unwrap_or_default(),
        work_tree: side.work_tree.clone(),
        numbers,
        ..BuildOptions::default()
    };
    let report = build::build(&options, &build::NoProgress)?;
    if report.has_errors() {
        return Err(ReviewError::Build {
            side: format!("{which} ({})", side.label),
            report: Box::new(report),
        });
    }
    Ok(Built {
        figures: compare::read_outputs(out)?,
        sources: sources::collect(&report.sources, &report.inputs, &side.top),
        quotes: quotes::read(out)?,
    })
}

/// A figure's picture as PNG bytes: its PNG file, or its SVG drawn; `None` without either.
fn png_of(outputs: &Outputs, name: &str) -> Result<Option<Vec<u8>>, ReviewError> {
    if let Some(png) = outputs.get(&format!("{name}.png")) {
        return Ok(Some(png.to_vec()));
    }
    let Some(svg) = outputs.get(&format!("{name}.svg")) else {
        return Ok(None);
    };
    let image = picture::rasterize_svg(svg).map_err(ReviewError::Picture)?;
    picture::encode(&image)
        .map(Some)
        .map_err(ReviewError::Picture)
}

fn picture_of(diff: &FigureDiff, old: &Built, new: &Built) -> Result<Picture, ReviewError> {
    let name = &diff.name;
    let png = |built: &Built| match built.figures.get(name) {
        Some(outputs) => png_of(outputs, name),
        None => Ok(None),
    };
    let picture = match diff.state {
        State::Unchanged => Picture::None,
        State::Added => png(new)?.map_or(Picture::Unavailable, Picture::Single),
        State::Removed => png(old)?.map_or(Picture::Unavailable, Picture::Single),
        State::Changed => match (png(old)?, png(new)?) {
            (Some(before), Some(after)) => {
                let decode = |b: &[u8]| picture::decode_png(b).map_err(ReviewError::Picture);
                let changes = picture::changes(&decode(&before)?, &decode(&after)?);
                let encode =
                    |img: &picture::Image| picture::encode(img).map_err(ReviewError::Picture);
                Picture::Diff {
                    changed: encode(&changes.picture)?,
                    preview: encode(&picture::preview(&changes.picture, PREVIEW_WIDTH))?,
                    before,
                    after,
                    changed_pixels: changes.changed_pixels,
                    compared_pixels: changes.compared_pixels,
                }
            }
            _ => Picture::Unavailable,
        },
    };
    Ok(picture)
}

/// The suffixes of the pictures a report writes (and an earlier version's picture diffs).
const PICTURE_SUFFIXES: [&str; 4] = [".before.png", ".after.png", ".changed.png", ".diff.png"];

/// Removes pictures of an earlier report that this one does not write again.
fn remove_stale_pictures(dir: &Path, keep: &[String]) -> Result<(), ReviewError> {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return Ok(());
    };
    for entry in entries.filter_map(|e| e.ok()) {
        let name = entry.file_name().to_string_lossy().into_owned();
        let ours = PICTURE_SUFFIXES.iter().any(|s| name.ends_with(s));
        if ours && !keep.contains(&name) && entry.path().is_file() {
            std::fs::remove_file(entry.path()).map_err(|e| ReviewError::io(&entry.path(), e))?;
        }
    }
    Ok(())
}

/// Writes the pictures, `report.md` and `index.html` (replacing the pictures of an earlier
/// report); returns the paths written.
fn write_report(
    review: &Review,
    dir: &Path,
    image_url: Option<&str>,
) -> Result<Vec<PathBuf>, ReviewError> {
    let mut files: Vec<(String, Vec<u8>)> = Vec::new();
    for f in &review.figures {
        if let Picture::Diff {
            before,
            after,
            changed,
            ..
        } = &f.picture
        {
            let names = picture_files(&f.diff.name);
            for (name, png) in names.into_iter().zip([before, after, changed]) {
                files.push((name, png.clone()));
            }
        }
    }
    let pictures: Vec<String> = files.iter().map(|(name, _)| name.clone()).collect();
    remove_stale_pictures(dir, &pictures)?;
    files.push((
        "report.md".to_owned(),
        markdown::report(review, image_url).into_bytes(),
    ));
    files.push(("index.html".to_owned(), html::page(review).into_bytes()));
    let mut written = Vec::new();
    for (name, bytes) in files {
        let path = dir.join(name);
        write_atomic(&path, &bytes)?;
        written.push(path);
    }
    Ok(written)
}
