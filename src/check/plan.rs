//! The checked plan: what the checker hands to the later stages.
//!
//! Guarantees, once a [`FigurePlan`] exists:
//! - every variable reference is resolved to a declared variable of its data block;
//! - every layer fits the figure's axes and the scales of their variables (a histogram holds a
//!   numeric x by type; a mean holds a numeric y by type; lines hold the declared subject);
//! - option values are in range (jitter in [0, 1], interval levels in (0, 1), sizes positive);
//! - `colour` and `panels` are categorical variables.
//!
//! What is NOT known yet: anything that depends on the data's values (a subject with two rows in
//! one cell, zeros on a log axis). Those are checked when the numbers are computed, and reported
//! with the spans kept here.

use std::path::PathBuf;

use crate::diag::Span;

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
    /// Percentile bootstrap interval.
    Bootstrap {
        level: f64,
    },
}

/// Kernel bandwidth rule.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Bandwidth {
    Silverman,
    Scott,
    Fixed(f64),
}

/// A layer over a categorical x and no y.
#[derive(Debug, Clone, PartialEq)]
pub enum CountLayer {
    Counts { heights: Heights, span: Span },
}

/// A layer over a categorical x and a numeric y.
#[derive(Debug, Clone, PartialEq)]
pub enum CatNumLayer {
    Points {
        jitter: f64,
        span: Span,
    },
    Box {
        whiskers: Whiskers,
        span: Span,
    },
    Mean {
        error: Option<ErrorBar>,
        bar: bool,
        span: Span,
    },
    Median {
        error: Option<ErrorBar>,
        span: Span,
    },
    Lines {
        by: VarId,
        span: Span,
    },
    Violin {
        bandwidth: Bandwidth,
        span: Span,
    },
}

/// A layer over a categorical x and an ordinal y.
#[derive(Debug, Clone, PartialEq)]
pub enum CatOrdLayer {
    Median { span: Span },
}

/// A layer over a numeric x and no y.
#[derive(Debug, Clone, PartialEq)]
pub enum DistLayer {
    Histogram {
        rule: BinRule,
        heights: Heights,
        span: Span,
    },
    Density {
        bandwidth: Bandwidth,
        span: Span,
    },
}

/// A layer over a numeric x and a numeric y.
#[derive(Debug, Clone, PartialEq)]
pub enum XyLayer {
    Points { span: Span },
    Fit { band: Option<f64>, span: Span },
}

/// The figure's axes and layers; each shape admits only the layers that fit it.
#[derive(Debug, Clone, PartialEq)]
pub enum Frame {
    /// `counts`: categorical x, bar heights on y.
    Counts { x: CatAxis, layers: Vec<CountLayer> },
    /// Categorical x, numeric y: points, box, mean, median, lines, violin.
    CatNum {
        x: CatAxis,
        y: NumAxis,
        layers: Vec<CatNumLayer>,
    },
    /// Categorical x, ordinal y: medians only.
    CatOrd {
        x: CatAxis,
        y: CatAxis,
        layers: Vec<CatOrdLayer>,
    },
    /// Numeric x, no y: histogram, density.
    Dist { x: NumAxis, layers: Vec<DistLayer> },
    /// Numeric x and y: points, fit.
    Xy {
        x: NumAxis,
        y: NumAxis,
        layers: Vec<XyLayer>,
    },
    /// Ordinal x occasions, categorical y states: flows.
    Flows {
        x: CatAxis,
        y: CatAxis,
        by: VarId,
        span: Span,
    },
}

/// Output formats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Formats {
    pub svg: bool,
    pub png: bool,
    pub pdf: bool,
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
    pub caption: Option<String>,
    pub frame: Frame,
    pub colour: Option<CatVar>,
    pub panels: Option<CatVar>,
    pub filter: Option<Filter>,
    pub width_mm: f64,
    pub height_mm: f64,
    pub formats: Formats,
    pub dpi: u32,
}

impl FigurePlan {
    /// The variables computing this figure reads: its axes, `lines by` and the subjects of
    /// `flows`, `colour`, `panels`, the filter's variables, and the data block's subject (every
    /// figure counts subjects and checks repeated ones). The build reads only these columns.
    pub fn variables(&self, book: &Codebook) -> std::collections::BTreeSet<VarId> {
        let mut vars: Vec<VarId> = book.subject.into_iter().collect();
        match &self.frame {
            Frame::Counts { x, .. } => vars.push(x.var.var),
            Frame::CatNum { x, y, layers } => {
                vars.extend([x.var.var, y.var.var]);
                vars.extend(layers.iter().filter_map(|layer| match layer {
                    CatNumLayer::Lines { by, .. } => Some(*by),
                    _ => None,
                }));
            }
            Frame::CatOrd { x, y, .. } => vars.extend([x.var.var, y.var.var]),
            Frame::Dist { x, .. } => vars.push(x.var.var),
            Frame::Xy { x, y, .. } => vars.extend([x.var.var, y.var.var]),
            Frame::Flows { x, y, by, .. } => vars.extend([x.var.var, y.var.var, *by]),
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
