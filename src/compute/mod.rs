//! Computing a figure's numbers: checked plan + typed table → marks in data units + summary.
//!
//! Two steps: the cells step ([`cells`]) places the figure's rows into cells once, then each
//! layer ([`layer`]) computes its marks, summary rows and extents from those cells, panel by
//! panel; the axes' extents and the shared width scale are merged once, after every layer.
//!
//! Guarantees of a [`FigureData`]:
//! - every panel has one entry per layer of the plan, in the order written;
//! - positions on a categorical axis are slots in display order; colour groups are slots too;
//! - every number drawn also appears in `summary`, in a fixed order (panel, layer, then the
//!   layer's own order: x and group, or group and bin);
//! - the data-dependent rules (a subject twice in one cell, zeros on a log axis, more colour
//!   levels than colours, a filter that keeps no rows) have been applied and reported as
//!   diagnostics, and every number is finite (a statistic that overflows is `F0123`); the
//!   design's rules ([`check_design`]) run once per data block, before.
//!
//! Invariant: no I/O and no geometry here — values stay in data units; the layout maps them.

pub mod cells;
mod design;
mod extent;
mod filter;
pub mod layer;
mod levels;
pub mod summary;

use crate::check::plan::{Axes, AxisScale, Codebook, FigurePlan, LayerPlan, NumAxis};
use crate::data::Table;
use crate::diag::{Code, Diagnostic};

use cells::{Cells, Placed};
use extent::Extent;
use layer::YUse;

pub use design::check_design;
pub use layer::{LayerMarks, Stat};
pub use levels::Levels;
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
    /// The largest width quantity any layer draws (a violin's density, a flow's subjects): every
    /// such mark of the figure is drawn on one scale.
    pub width_peak: f64,
}

/// Computes a figure's numbers from its data table.
pub fn compute(
    plan: &FigurePlan,
    book: &Codebook,
    table: &Table,
) -> Result<FigureData, ComputeError> {
    let cells = Cells::new(plan, book, table)?;
    let mut merged = Merged::default();
    if let (Axes::Num { .. }, Placed::Values(values)) = (&plan.axes, &cells.placed) {
        // A distribution's axis covers every value, drawn in a bin or not.
        values.all().for_each(|v| merged.x.add(v));
    }
    let mut panels = Vec::with_capacity(cells.panels.len());
    let mut summary = Vec::new();
    for p in 0..cells.panels.len() {
        let mut marks = Vec::with_capacity(plan.layers.len());
        for l in &plan.layers {
            let out = layer::compute(l, &cells, p)?;
            check_finite(&out, l)?;
            summary.extend_from_slice(&out.rows);
            marks.push(merged.add(out));
        }
        panels.push(PanelData {
            label: cells.panels.labels[p].clone(),
            layers: marks,
            n_by_x: cells.n_by_x(p),
        });
    }
    let legend = merged.legend.take().or_else(|| {
        plan.colour.as_ref().map(|c| Legend {
            title: book.var(c.var).title(),
            levels: cells.groups.clone(),
        })
    });
    Ok(FigureData {
        x: x_scale(&cells, &merged),
        y: y_scale(&cells, &merged),
        legend,
        panels,
        summary,
        width_peak: merged.width_peak,
    })
}

/// Rule F0123: a layer whose numbers overflowed (data near the largest double) cannot be
/// drawn; every number of a figure is finite.
fn check_finite(out: &layer::LayerOutput, l: &LayerPlan) -> Result<(), ComputeError> {
    let rows_finite = out.rows.iter().all(|r| match r.value {
        StatValue::Number(v) => v.is_finite(),
        StatValue::Level(_) => true,
    });
    if rows_finite && !out.x.saw_not_finite() && !out.y.saw_not_finite() {
        return Ok(());
    }
    Err(Diagnostic::new(
        Code::BeyondDoubleRange,
        format!(
            "{} gives a number beyond the range of double-precision numbers for these data",
            l.decl.quoted()
        ),
    )
    .with_label(l.span, "overflows")
    .with_help("the values are too large in magnitude for this statistic: measure the variable in a larger unit (and say so in its `unit`)")
    .into())
}

/// What every layer's output adds up to for the figure.
#[derive(Default)]
struct Merged {
    x: Extent,
    y: Extent,
    y_from_zero: bool,
    /// The heights title of the last layer that draws its own heights.
    heights: Option<&'static str>,
    y_hidden: bool,
    width_peak: f64,
    legend: Option<Legend>,
}

impl Merged {
    /// Merges one layer's output and returns its marks.
    fn add(&mut self, out: layer::LayerOutput) -> LayerMarks {
        self.x.merge(out.x);
        self.y.merge(out.y);
        self.y_from_zero |= out.y_from_zero;
        match out.y_use {
            YUse::Data => {}
            YUse::Heights(title) => self.heights = Some(title),
            YUse::Hidden => self.y_hidden = true,
        }
        self.width_peak = self.width_peak.max(out.width_peak);
        if out.legend.is_some() {
            self.legend = out.legend;
        }
        out.marks
    }
}

fn num_scale(cells: &Cells, axis: &NumAxis, extent: Extent, include_zero: bool) -> NumScale {
    NumScale {
        title: cells.title(axis.var.var, &axis.title),
        extent: extent.get(),
        range: axis.range,
        log: axis.scale == AxisScale::Log,
        include_zero,
    }
}

fn x_scale(cells: &Cells, merged: &Merged) -> XScale {
    match &cells.plan.axes {
        Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } => XScale::Categories {
            title: cells.title(x.var.var, &x.title),
            levels: cells.x_levels.clone(),
        },
        Axes::Num { x } | Axes::NumNum { x, .. } => {
            XScale::Numbers(num_scale(cells, x, merged.x, false))
        }
    }
}

fn y_scale(cells: &Cells, merged: &Merged) -> YScale {
    match &cells.plan.axes {
        Axes::CatNum { y, .. } | Axes::NumNum { y, .. } => {
            YScale::Numbers(num_scale(cells, y, merged.y, merged.y_from_zero))
        }
        Axes::Cat { .. } | Axes::Num { .. } => YScale::Numbers(NumScale {
            title: merged.heights.unwrap_or("Count").to_string(),
            extent: merged.y.get(),
            range: None,
            log: false,
            include_zero: true,
        }),
        Axes::CatCat { .. } if merged.y_hidden => YScale::Hidden,
        Axes::CatCat { y, .. } => YScale::Categories {
            title: cells.title(y.var.var, &y.title),
            levels: cells.y_levels.clone().unwrap_or_else(Levels::single),
        },
    }
}
