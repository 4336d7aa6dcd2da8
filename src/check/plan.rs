//! The checked plan: what the checker hands to the later stages.
//!
//! Guarantees, once a [`FigurePlan`] exists:
//! - every variable reference is resolved to a declared variable of its data block;
//! - every layer fits the figure's axes and the scales of their variables (the axes are typed:
//!   a numeric axis holds a `NumVar`, a categorical one a `CatVar`), and holds its options typed
//!   and in range (see [`super::layer`]); lines and flows hold the declared subject;
//! - option values are in range (jitter in [0, 1], interval levels in (0, 1), sizes positive);
//! - `colour` and `panels` are categorical variables.
//!
//! What is NOT known yet: anything that depends on the data's values (a subject with two rows in
//! one cell, zeros on a log axis). Those are checked when the numbers are computed, and reported
//! with the spans kept here.

use std::path::PathBuf;

use crate::diag::Span;
use crate::scene::TextForm;

pub use super::layer::{Layer, LayerPlan};

/// Stevens' level of measurement of a variable, plus `id`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scale {
    Id,
    Nominal,
    Ordinal,
    Interval,
    Ratio,
}

impl Scale {
    pub fn as_str(self) -> &'static str {
        match self {
            Scale::Id => "id",
            Scale::Nominal => "nominal",
            Scale::Ordinal => "ordinal",
            Scale::Interval => "interval",
            Scale::Ratio => "ratio",
        }
    }

    pub fn is_categorical(self) -> bool {
        matches!(self, Scale::Nominal | Scale::Ordinal)
    }

    pub fn is_numeric(self) -> bool {
        matches!(self, Scale::Interval | Scale::Ratio)
    }
}

/// Index of a variable within its [`Codebook`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct VarId(pub usize);

/// One declared variable.
#[derive(Debug, Clone, PartialEq)]
pub struct Variable {
    pub name: String,
    /// The CSV header it is read from.
    pub column: String,
    pub scale: Scale,
    /// Declared levels (complete and ordered), for nominal and ordinal variables.
    pub levels: Option<Vec<String>>,
    /// Display text per declared level.
    pub labels: Option<Vec<String>>,
    /// The user's colour per declared level (`colours("#1b7837", ...)`), for figures coloured
    /// by this variable.
    pub colours: Option<LevelColours>,
    /// The neutral middle level of an ordinal scale (`midpoint("neutral")`), as an index into
    /// `levels`: its colours diverge around it.
    pub midpoint: Option<usize>,
    /// Axis title.
    pub label: Option<String>,
    pub unit: Option<String>,
    /// The whole declaration.
    pub span: Span,
}

impl Variable {
    /// `Label (unit)`, falling back to the name.
    pub fn title(&self) -> String {
        let base = self.label.clone().unwrap_or_else(|| self.name.clone());
        match &self.unit {
            Some(u) => format!("{base} ({u})"),
            None => base,
        }
    }
}

/// Ways of telling colour groups apart besides colour, for readers who cannot see the colours
/// apart and for greyscale print.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct GroupMarks {
    /// Dots take a shape per group (`colour VAR shapes`).
    pub shapes: bool,
    /// Lines and curves take a dash pattern per group (`colour VAR dashes`).
    pub dashes: bool,
}

/// The colours a variable's declaration gives its levels, one per declared level.
#[derive(Debug, Clone, PartialEq)]
pub struct LevelColours {
    pub colours: Vec<crate::scene::Colour>,
    /// The `colours(...)` option.
    pub span: Span,
}

/// How repeated trials of one subject in one cell are reduced to one value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Collapse {
    Mean,
    Median,
}

/// `replicates VAR collapse(...)`.
#[derive(Debug, Clone, PartialEq)]
pub struct Replicates {
    pub var: VarId,
    pub collapse: Collapse,
    pub span: Span,
}

/// A checked `data` block.
#[derive(Debug, Clone, PartialEq)]
pub struct Codebook {
    pub name: String,
    /// The data file, resolved against the spec's folder.
    pub path: PathBuf,
    pub path_span: Span,
    /// How the file is written: its extension and the block's reading statements.
    pub format: crate::data::FileFormat,
    pub missing: Vec<String>,
    pub vars: Vec<Variable>,
    pub subject: Option<VarId>,
    pub within: Vec<VarId>,
    pub between: Vec<VarId>,
    /// Where each `within` and `between` factor is first named, for the design's data errors.
    pub factor_spans: Vec<(VarId, Span)>,
    pub replicates: Option<Replicates>,
    pub span: Span,
}

impl Codebook {
    pub fn var(&self, id: VarId) -> &Variable {
        &self.vars[id.0]
    }

    pub fn find(&self, name: &str) -> Option<VarId> {
        self.vars.iter().position(|v| v.name == name).map(VarId)
    }

    pub fn is_within(&self, id: VarId) -> bool {
        self.within.contains(&id)
    }

    pub fn is_between(&self, id: VarId) -> bool {
        self.between.contains(&id)
    }

    /// Where a design factor is named in its `within` or `between` statement (else the
    /// variable's declaration).
    pub fn factor_span(&self, id: VarId) -> Span {
        self.factor_spans
            .iter()
            .find(|(v, _)| *v == id)
            .map_or(self.var(id).span, |(_, s)| *s)
    }
}

/// A reference to a categorical (nominal or ordinal) variable, with the span that named it.
#[derive(Debug, Clone, PartialEq)]
pub struct CatVar {
    pub var: VarId,
    pub ordered: bool,
    pub span: Span,
}

/// A reference to a numeric (interval or ratio) variable.
#[derive(Debug, Clone, PartialEq)]
pub struct NumVar {
    pub var: VarId,
    pub ratio: bool,
    pub span: Span,
}

/// Display order of a categorical axis.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LevelOrder {
    /// Declared (or first-appearance) order.
    Levels,
    /// Most frequent first; ties keep level order.
    Count,
    /// Alphabetical by display text.
    Name,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum AxisScale {
    Linear,
    Log,
}

/// A categorical axis.
#[derive(Debug, Clone, PartialEq)]
pub struct CatAxis {
    pub var: CatVar,
    pub title: Option<String>,
    pub order: LevelOrder,
}

/// A numeric axis.
#[derive(Debug, Clone, PartialEq)]
pub struct NumAxis {
    pub var: NumVar,
    pub title: Option<String>,
    pub range: Option<(f64, f64)>,
    pub scale: AxisScale,
    /// The `scale(log)` option, for data errors (zeros on a log axis).
    pub scale_span: Option<Span>,
}

/// Heights of `counts` and `histogram` bars.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Heights {
    Count,
    Percent,
    Density,
}

/// How a histogram's bin width is chosen.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum BinRule {
    Sturges,
    Scott,
    FreedmanDiaconis,
    /// About this many bins (the width is rounded to a readable step).
    Count(u32),
    /// Exactly this width.
    Width(f64),
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Whiskers {
    Tukey,
    Range,
}

/// Error bars of a `mean` layer.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ErrorBar {
    Sd,
    Se,
    Ci {
        level: f64,
    },
    /// Cousineau–Morey within-subject interval.
    CiWithin {
        level: f64,
    },
    /// Bootstrap interval: percentile, or bias-corrected and accelerated.
    Bootstrap {
        level: f64,
        method: BootMethod,
    },
}

/// How a bootstrap interval is read from the resampled statistics.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BootMethod {
    /// The `(1 − L)/2` and `1 − (1 − L)/2` quantiles (Efron & Tibshirani 1993, §13.3).
    Percentile,
    /// Bias-corrected and accelerated (Efron 1987).
    Bca,
}

/// What the band of a fitted line shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum BandKind {
    /// The confidence interval for the mean response.
    Mean,
    /// The prediction interval for one new observation.
    Prediction,
}

/// The band of a fitted line: its level and what it shows.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Band {
    pub level: f64,
    pub kind: BandKind,
}

/// How much of a drawn curve the summary lists.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum SummaryDetail {
    /// The curve's defining numbers only (a bandwidth, a fit's coefficients).
    #[default]
    Default,
    /// Also every point at which the curve is drawn (`summary(full)`).
    Full,
}

/// Kernel bandwidth rule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Bandwidth {
    Silverman,
    Scott,
    Fixed(f64),
}

/// The figure's axes; the shape (categorical or numeric x, and y) decides which layers fit.
#[derive(Debug, Clone, PartialEq)]
pub enum Axes {
    /// Categorical x, no y (`counts`).
    Cat { x: CatAxis },
    /// Categorical x, numeric y (points, box, violin, mean, median, lines).
    CatNum { x: CatAxis, y: NumAxis },
    /// Categorical x and y (ordinal medians, flows).
    CatCat { x: CatAxis, y: CatAxis },
    /// Numeric x, no y (histogram, density).
    Num { x: NumAxis },
    /// Numeric x and y (points, fit).
    NumNum { x: NumAxis, y: NumAxis },
}

/// Output formats, and how text is written into the SVG and PDF.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Formats {
    pub svg: bool,
    pub png: bool,
    pub pdf: bool,
    pub tiff: bool,
    /// `text(outlined)` in the `formats` statement; editable text otherwise.
    pub text: TextForm,
}

impl Formats {
    /// No format yet, editable text: the start of a list being read.
    pub const NONE: Formats = Formats {
        svg: false,
        png: false,
        pdf: false,
        tiff: false,
        text: TextForm::Editable,
    };
}

/// A checked row filter.
#[derive(Debug, Clone, PartialEq)]
pub enum Filter {
    /// Keep rows whose categorical variable's level index is in the set.
    Levels {
        var: VarId,
        keep: Vec<usize>,
    },
    /// Compare a numeric variable with a constant.
    Numeric {
        var: VarId,
        op: crate::syntax::ast::CompareOp,
        value: f64,
    },
    Not(Box<Filter>),
    And(Box<Filter>, Box<Filter>),
    Or(Box<Filter>, Box<Filter>),
}

/// Everything needed to compute and draw one figure.
#[derive(Debug, Clone, PartialEq)]
pub struct FigurePlan {
    pub name: String,
    pub name_span: Span,
    /// The spec file the figure was written in (outputs default to `out/` beside it).
    pub spec_path: PathBuf,
    /// Index into [`Program::codebooks`].
    pub data: usize,
    pub title: Option<String>,
    /// The title is drawn in the figure (`title "..." show`); otherwise it only names the
    /// figure in the SVG's `<title>`.
    pub show_title: bool,
    pub caption: Option<String>,
    /// The key naming each summary mark is drawn (`key off` leaves it out).
    pub key: bool,
    /// Faint reference lines at the y ticks (`grid`).
    pub grid: bool,
    pub axes: Axes,
    /// The layers in the order written (and drawn).
    pub layers: Vec<LayerPlan>,
    pub colour: Option<CatVar>,
    /// How groups are told apart besides colour (`colour VAR shapes dashes`).
    pub group_marks: GroupMarks,
    pub panels: Option<CatVar>,
    pub filter: Option<Filter>,
    /// The `where` statement, for a filter that keeps no rows (found in the data).
    pub filter_span: Option<Span>,
    pub width_mm: f64,
    pub height_mm: f64,
    /// The `size` statement, for a figure whose content does not fit (the figure's name when
    /// the size is the default).
    pub size_span: Span,
    pub formats: Formats,
    pub dpi: u32,
    /// The `dpi` statement, when the figure has one (for a resolution below a journal's).
    pub dpi_span: Option<Span>,
}

impl FigurePlan {
    /// The variables computing this figure reads: its axes, `colour`, `panels`, the filter's
    /// variables, the data block's subject (every figure counts subjects and checks repeated
    /// ones; the `by(...)` of `lines` and `flows` is always the subject) and its design factors
    /// (the design is checked against the data). The build reads only these columns.
    pub fn variables(&self, book: &Codebook) -> std::collections::BTreeSet<VarId> {
        let mut vars: Vec<VarId> = book.subject.into_iter().collect();
        vars.extend(book.within.iter().chain(&book.between).copied());
        match &self.axes {
            Axes::Cat { x } => vars.push(x.var.var),
            Axes::Num { x } => vars.push(x.var.var),
            Axes::CatNum { x, y } => vars.extend([x.var.var, y.var.var]),
            Axes::CatCat { x, y } => vars.extend([x.var.var, y.var.var]),
            Axes::NumNum { x, y } => vars.extend([x.var.var, y.var.var]),
        }
        vars.extend(self.colour.iter().chain(&self.panels).map(|c| c.var));
        let mut filters: Vec<&Filter> = self.filter.iter().collect();
        while let Some(filter) = filters.pop() {
            match filter {
                Filter::Levels { var, .. } | Filter::Numeric { var, .. } => vars.push(*var),
                Filter::Not(inner) => filters.push(inner),
                Filter::And(a, b) | Filter::Or(a, b) => filters.extend([&**a, &**b]),
            }
        }
        vars.into_iter().collect()
    }
}

/// All checked data blocks and figures of one build.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Program {
    pub codebooks: Vec<Codebook>,
    pub figures: Vec<FigurePlan>,
}
