//! Computing a figure's numbers: checked plan + typed table → marks in data units + summary.
//!
//! Guarantees of a [`FigureData`]:
//! - every panel has one entry per layer of the plan, in the order written;
//! - positions on a categorical axis are slots in display order; colour groups are slots too;
//! - every number drawn also appears in `summary`, in a fixed order (panel, layer, x, group);
//! - the data-dependent rules (a subject twice in one cell, zeros on a log axis) have been
//!   applied and reported as diagnostics.
//!
//! Invariant: no I/O and no geometry here — values stay in data units; the layout maps them.

mod cat;
mod dist;
mod flows;
pub mod rows;
pub mod summary;
mod violin;
mod xy;

use crate::check::plan::{Codebook, FigurePlan, Frame, VarId};
use crate::data::{Codes, Names, Table};
use crate::diag::Diagnostic;

pub use rows::Levels;
pub use summary::{StatValue, SummaryRow};

/// Why a figure's numbers could not be computed.
#[derive(Debug)]
pub enum ComputeError {
    /// Problems in the data, reported against the spec and data files.
    Data(Vec<Diagnostic>),
    /// A broken promise between stages (a bug): the message says which.
    Internal(String),
}

impl From<Diagnostic> for ComputeError {
    fn from(d: Diagnostic) -> Self {
        ComputeError::Data(vec![d])
    }
}

/// A numeric axis's data extent and settings.
#[derive(Debug, Clone, PartialEq)]
pub struct NumScale {
    pub title: String,
    /// Smallest and largest value drawn (including error bars and whiskers).
    pub extent: (f64, f64),
    /// A range fixed by the spec.
    pub range: Option<(f64, f64)>,
    pub log: bool,
    /// Bars start at zero, so zero must be on the axis.
    pub include_zero: bool,
}

/// The x axis.
#[derive(Debug, Clone, PartialEq)]
pub enum XScale {
    Categories { title: String, levels: Levels },
    Numbers(NumScale),
}

/// The y axis.
#[derive(Debug, Clone, PartialEq)]
pub enum YScale {
    Numbers(NumScale),
    Categories {
        title: String,
        levels: Levels,
    },
    /// No y axis: the marks show their own quantities (the stacked states of flows).
    Hidden,
}

/// The colour legend.
#[derive(Debug, Clone, PartialEq)]
pub struct Legend {
    pub title: String,
    pub levels: Levels,
}

/// A bar on a categorical axis (counts, or a mean drawn as a bar).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bar {
    pub x: usize,
    pub group: usize,
    pub height: f64,
}

/// A histogram bar.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bin {
    pub lo: f64,
    pub hi: f64,
    pub group: usize,
    pub height: f64,
}

/// A point over a categorical x; `offset` is its jitter as a fraction of the band in [−0.5, 0.5).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CatPoint {
    pub x: usize,
    pub group: usize,
    pub offset: f64,
    pub y: f64,
}

/// A box of a box plot.
#[derive(Debug, Clone, PartialEq)]
pub struct BoxMark {
    pub x: usize,
    pub group: usize,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
    pub whisker_low: f64,
    pub whisker_high: f64,
    pub outliers: Vec<f64>,
}

/// A central value with an optional interval.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    pub x: usize,
    pub group: usize,
    pub centre: f64,
    pub interval: Option<(f64, f64)>,
}

/// One subject's values joined across x.
#[derive(Debug, Clone, PartialEq)]
pub struct SubjectPath {
    pub group: usize,
    /// (x slot, jitter offset, y), in x order.
    pub points: Vec<(usize, f64, f64)>,
}

/// The median level of an ordinal y.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LevelMark {
    pub x: usize,
    pub group: usize,
    /// Slot of the median level on the y axis, with the quartile levels.
    pub median: usize,
    pub q1: usize,
    pub q3: usize,
}

/// A curve in data units (a density).
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    pub group: usize,
    pub points: Vec<(f64, f64)>,
}

/// A violin: the density of one cell's values, mirrored about the slot's centre.
#[derive(Debug, Clone, PartialEq)]
pub struct ViolinMark {
    pub x: usize,
    pub group: usize,
    /// (y, density) in ascending y, from the smallest to the largest value of the cell.
    pub outline: Vec<(f64, f64)>,
    pub q1: f64,
    pub median: f64,
    pub q3: f64,
}

/// A fitted line over the x range of its group's data, with its confidence band.
#[derive(Debug, Clone, PartialEq)]
pub struct FitMark {
    pub group: usize,
    /// (x, fitted y) in ascending x.
    pub line: Vec<(f64, f64)>,
    /// (x, low, high) of the band for the mean response, in ascending x; empty without a band.
    pub band: Vec<(f64, f64, f64)>,
}

/// Subjects in each state at each occasion, and how many moved between consecutive occasions.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowMarks {
    /// `stacks[o][s]`: subjects in state slot `s` at occasion slot `o`.
    pub stacks: Vec<Vec<usize>>,
    /// `moves[o][s][t]`: subjects in state `s` at occasion `o` and state `t` at occasion `o + 1`.
    pub moves: Vec<Vec<Vec<usize>>>,
    /// The largest number of subjects at any occasion of any panel, so panels share a scale.
    pub peak: usize,
}

/// What one layer draws in one panel.
#[derive(Debug, Clone, PartialEq)]
pub enum LayerMarks {
    Bars(Vec<Bar>),
    Bins(Vec<Bin>),
    CatPoints(Vec<CatPoint>),
    XyPoints(Vec<(f64, f64, usize)>),
    Boxes(Vec<BoxMark>),
    /// Means or medians; `dot` is false when the mean is drawn as a bar (already in `Bars`).
    Estimates {
        marks: Vec<Estimate>,
        kind: EstimateKind,
    },
    Lines(Vec<SubjectPath>),
    Levels(Vec<LevelMark>),
    Curves(Vec<Curve>),
    /// Violins; `peak` is the largest density of any violin of the layer in the figure, so
    /// every violin is drawn on one width scale (equal areas).
    Violins {
        marks: Vec<ViolinMark>,
        peak: f64,
    },
    Fits(Vec<FitMark>),
    Flows(FlowMarks),
}

/// Which central value an [`LayerMarks::Estimates`] shows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum EstimateKind {
    Mean,
    Median,
}

/// One panel.
#[derive(Debug, Clone, PartialEq)]
pub struct PanelData {
    /// Empty when the figure has no panels.
    pub label: String,
    pub layers: Vec<LayerMarks>,
    /// Number of values per x slot (categorical x), all groups together, for `n =` labels.
    pub n_by_x: Vec<usize>,
}

/// A figure's numbers, ready for layout.
#[derive(Debug, Clone, PartialEq)]
pub struct FigureData {
    pub x: XScale,
    pub y: YScale,
    pub legend: Option<Legend>,
    pub panels: Vec<PanelData>,
    pub summary: Vec<SummaryRow>,
}

/// Computes a figure's numbers from its data table.
pub fn compute(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
) -> Result<FigureData, ComputeError> {
    let ctx = Context::new(plan, book, table)?;
    match &plan.frame {
        Frame::Counts { x, layers } => cat::counts(&ctx, x, layers),
        Frame::CatNum { x, y, layers } => cat::cat_num(&ctx, x, y, layers),
        Frame::CatOrd { x, y, layers } => cat::cat_ord(&ctx, x, y, layers),
        Frame::Dist { x, layers } => dist::distribution(&ctx, x, layers),
        Frame::Xy { x, y, layers } => xy::xy(&ctx, x, y, layers),
        Frame::Flows { x, y, span, .. } => flows::flows(&ctx, x, y, *span),
    }
}

/// What every frame's computation shares: the plan, data, kept rows, panels and colour groups.
pub(crate) struct Context<'a> {
    pub plan: &'a FigurePlan,
    pub book: &'a Codebook,
    pub table: &'a Table,
    pub keep: Vec<bool>,
    pub panels: Levels,
    pub groups: Levels,
    pub panel_codes: Option<&'a Codes>,
    pub group_codes: Option<&'a Codes>,
    pub subject_codes: Option<(&'a Codes, &'a Names)>,
}

impl<'a> Context<'a> {
    fn new(
        plan: &'a FigurePlan,
        book: &'a Codebook,
        table: &'a Table,
    ) -> Result<Self, ComputeError> {
        let keep = rows::filter_rows(table, book, plan.filter.as_ref())?;
        let (panels, panel_codes) = grouping(table, book, plan.panels.as_ref(), &keep)?;
        let (groups, group_codes) = grouping(table, book, plan.colour.as_ref(), &keep)?;
        if let Some(c) = &plan.colour {
            check_colours(&groups, &book.var(c.var).name, c.span)?;
        }
        let subject_codes = match book.subject {
            Some(s) => Some(rows::codes(table, book, s)?),
            None => None,
        };
        Ok(Context {
            plan,
            book,
            table,
            keep,
            panels,
            groups,
            panel_codes,
            group_codes,
            subject_codes,
        })
    }

    pub fn title(&self, var: VarId, given: &Option<String>) -> String {
        given.clone().unwrap_or_else(|| self.book.var(var).title())
    }

    pub fn legend(&self) -> Option<Legend> {
        self.plan.colour.as_ref().map(|c| Legend {
            title: self.book.var(c.var).title(),
            levels: self.groups.clone(),
        })
    }

    pub fn placement<'p>(&'p self, x: Option<(&'p Codes, &'p Levels)>) -> rows::Placement<'p> {
        rows::Placement {
            panel: self.panel_codes.map(|c| (c, &self.panels)),
            x,
            group: self.group_codes.map(|c| (c, &self.groups)),
            subject: self.subject_codes.map(|(c, _)| c),
        }
    }

    pub fn panel_name(&self, p: usize) -> String {
        if self.plan.panels.is_some() {
            self.panels.names[p].clone()
        } else {
            String::new()
        }
    }

    pub fn group_name(&self, g: usize) -> String {
        if self.plan.colour.is_some() {
            self.groups.names[g].clone()
        } else {
            String::new()
        }
    }

    /// Levels of a categorical x (as shown) and y (every level), and y's level slot placed in
    /// the cells of x: for frames whose y is categorical too (ordinal medians, flows).
    pub fn place_levels(
        &self,
        x: &crate::check::plan::CatAxis,
        y: &crate::check::plan::CatAxis,
    ) -> Result<(Levels, Levels, rows::Placed), ComputeError> {
        let x_levels = rows::axis_levels(self.table, self.book, x, &self.keep)?;
        // y keeps every level, even one a filter leaves empty: an ordinal y keeps its spacing,
        // and flow states keep their places and colours.
        let y_levels = rows::levels(self.table, self.book, &y.var, y.order, &self.keep)?;
        let (x_codes, _) = rows::codes(self.table, self.book, x.var.var)?;
        let (y_codes, _) = rows::codes(self.table, self.book, y.var.var)?;
        let y_slots: Vec<Option<f64>> = y_codes
            .iter()
            .map(|c| c.and_then(|c| y_levels.slot(c)).map(|s| s as f64))
            .collect();
        let placed = rows::place(
            y_slots,
            &self.keep,
            &self.placement(Some((x_codes, &x_levels))),
        );
        Ok((x_levels, y_levels, placed))
    }

    /// The row of the data file a table row came from, as a spreadsheet numbers it (the header
    /// is row 1; blank lines count), for messages.
    pub fn file_row(&self, row: usize) -> usize {
        self.table.row_place(row).map_or(row + 2, |p| p.file_row)
    }

    pub fn subject_name(&self, code: u32) -> String {
        self.subject_codes
            .map(|(_, names)| names[code as usize].to_owned())
            .unwrap_or_default()
    }
}

/// Levels told apart by colour must not outnumber the palette's colours (no colour is ever
/// used twice: see [`crate::palette`]).
pub(crate) fn check_colours(
    levels: &Levels,
    var: &str,
    span: crate::diag::Span,
) -> Result<(), ComputeError> {
    let most = crate::palette::MAX_GROUPS;
    if levels.len() <= most {
        return Ok(());
    }
    Err(Diagnostic::error(
        crate::check::codes::TOO_MANY_COLOURS,
        format!(
            "`{var}` has {} levels to tell apart by colour, more than the palette's {most}",
            levels.len()
        ),
    )
    .with_label(span, "one colour per level")
    .with_help("show this variable in `panels` instead, or keep fewer levels with `where`")
    .into())
}

/// The shown levels of a `panels` or `colour` variable, with its codes per row.
type Grouping<'t> = (Levels, Option<&'t Codes>);

/// The shown levels and the codes of a `panels` or `colour` variable; one unnamed level when
/// the figure has none.
fn grouping<'t>(
    table: &'t Table,
    book: &Codebook,
    var: Option<&crate::check::plan::CatVar>,
    keep: &[bool],
) -> Result<Grouping<'t>, ComputeError> {
    match var {
        Some(v) => Ok((
            rows::shown_levels(table, book, v, crate::check::plan::LevelOrder::Levels, keep)?,
            Some(rows::codes(table, book, v.var)?.0),
        )),
        None => Ok((Levels::single(), None)),
    }
}
