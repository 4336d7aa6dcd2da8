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
pub mod key;
pub mod layer;
mod levels;
pub mod summary;

use crate::check::plan::{
    Axes, AxisScale, Codebook, FigurePlan, GroupMarks, LayerPlan, NumAxis, Scale, Variable,
};
use crate::colour::scheme::{self, Scheme};
use crate::data::Table;
use crate::diag::{Code, Diagnostic};
use crate::scene::Colour;

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
    /// Its tick labels give sizes without a sign: heights stacked either side of zero.
    pub magnitudes: bool,
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
    /// One colour per shown level, from the palette its level of measurement calls for
    /// ([`crate::colour::scheme`]), or from the variable's `colours(...)`.
    pub colours: Vec<Colour>,
    /// How the groups are told apart besides colour (shapes of dots, dashes of lines).
    pub marks: GroupMarks,
}

impl Legend {
    /// A legend of unordered groups (the figure gives it its palette once it is complete).
    pub fn new(title: String, levels: Levels) -> Legend {
        let colours = scheme::colours(Scheme::Groups, levels.len()).unwrap_or_default();
        Legend {
            title,
            levels,
            colours,
            marks: GroupMarks::default(),
        }
    }
}

/// Beyond this many values in one cell, `points` warn (W0004): so many dots hide each other,
/// and a box, violin or density shows them better. Layout draws the dots of such a cell as one
/// shape.
pub const POINTS_PER_CELL_CAP: usize = 5_000;

/// One panel.
#[derive(Debug, Clone, PartialEq)]
pub struct PanelData {
    /// Empty when the figure has no panels.
    pub label: String,
    pub layers: Vec<LayerMarks>,
    /// The n shown under each x slot (categorical x), per colour group: always an `n` (or a
    /// count) of the summary, of the layer [`cells::Cells::n_source`] chooses. Empty over a
    /// numeric x.
    pub n_by_x: Vec<Vec<usize>>,
}

/// A figure's numbers, ready for layout.
#[derive(Debug, Clone, PartialEq)]
pub struct FigureData {
    pub x: XScale,
    pub y: YScale,
    pub legend: Option<Legend>,
    pub panels: Vec<PanelData>,
    /// The axis of estimates drawn under every panel (`difference`), when a layer draws one.
    pub estimates: Option<NumScale>,
    pub summary: Vec<SummaryRow>,
    /// The largest width quantity any layer draws (a violin's density, a flow's subjects): every
    /// such mark of the figure is drawn on one scale.
    pub width_peak: f64,
    /// The key's sentences drawn under the plot: what each summary mark is, how trials were
    /// averaged, what n counts (empty with `key off`).
    pub key: Vec<String>,
    /// The same sentences whether the key is drawn or not (the alt text says them too).
    pub marks: Vec<String>,
    /// Warnings found in the data (too many dots to show apart).
    pub warnings: Vec<Diagnostic>,
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
    let mut rows_by_layer = vec![Vec::new(); plan.layers.len()];
    let mut notes = vec![None; plan.layers.len()];
    for p in 0..cells.panels.len() {
        let mut marks = Vec::with_capacity(plan.layers.len());
        for (i, l) in plan.layers.iter().enumerate() {
            let out = layer::compute(l, &cells, p)?;
            check_finite(&out, l)?;
            summary.extend_from_slice(&out.rows);
            rows_by_layer[i].extend_from_slice(&out.rows);
            notes[i] = notes[i].or(out.note);
            marks.push(merged.add(out));
        }
        panels.push(PanelData {
            label: cells.panels.labels[p].clone(),
            layers: marks,
            n_by_x: Vec::new(),
        });
    }
    let n_source = cells.n_source(&rows_by_layer);
    if let Some(source) = n_source {
        for (p, panel) in panels.iter_mut().enumerate() {
            panel.n_by_x = cells.n_by_x(p, source, &rows_by_layer[source]);
        }
    }
    let legend = match merged.legend.take() {
        Some(states) => match &plan.axes {
            Axes::CatCat { y, .. } => Some(coloured(states, book.var(y.var.var))),
            _ => Some(states),
        },
        None => plan.colour.as_ref().map(|c| {
            let var = book.var(c.var);
            let mut legend = coloured(Legend::new(var.title(), cells.groups.clone()), var);
            legend.marks = plan.group_marks;
            legend
        }),
    };
    let groups_differ = panels
        .iter()
        .flat_map(|p| &p.n_by_x)
        .any(|n| n.windows(2).any(|w| w[0] != w[1]));
    let marks = key::key(&cells, n_source, groups_differ, &notes);
    let key = if plan.key { marks.clone() } else { Vec::new() };
    let mut warnings = many_points(&cells);
    warnings.append(&mut merged.warnings);
    Ok(FigureData {
        x: x_scale(&cells, &merged),
        y: y_scale(&cells, &merged),
        legend,
        panels,
        estimates: merged.estimates.take().map(|(title, extent)| NumScale {
            title,
            extent: extent.get(),
            range: None,
            log: false,
            include_zero: true,
            magnitudes: false,
        }),
        summary,
        width_peak: merged.width_peak,
        key,
        marks,
        warnings,
    })
}

/// Rule F0123: a layer whose numbers overflowed (data near the largest double) cannot be
/// drawn; every number of a figure is finite.
fn check_finite(out: &layer::LayerOutput, l: &LayerPlan) -> Result<(), ComputeError> {
    let rows_finite = out.rows.iter().all(|r| match r.value {
        StatValue::Number(v) => v.is_finite(),
        StatValue::Level(_) => true,
    });
    let estimates_finite = out
        .estimate_axis
        .as_ref()
        .is_none_or(|(_, e)| !e.saw_not_finite());
    if rows_finite && estimates_finite && !out.x.saw_not_finite() && !out.y.saw_not_finite() {
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

/// The legend with the colours of its variable's declaration (`colours(...)`), else the palette
/// its level of measurement calls for: unordered groups take distinct hues; ordinal levels the
/// ordered palette (diverging around a declared midpoint). Either way each level keeps the
/// colour of its place among every declared level, so a filter never changes a level's colour.
fn coloured(mut legend: Legend, var: &Variable) -> Legend {
    if let (Some(own), Some(declared)) = (&var.colours, &var.levels) {
        let colours: Option<Vec<Colour>> = legend
            .levels
            .names
            .iter()
            .map(|name| {
                let slot = declared.iter().position(|d| d == name)?;
                own.colours.get(slot).copied()
            })
            .collect();
        if let Some(colours) = colours {
            legend.colours = colours;
            return legend;
        }
    }
    let scheme = match (var.scale, var.midpoint) {
        (Scale::Ordinal, Some(midpoint)) => Scheme::Diverging { midpoint },
        (Scale::Ordinal, None) => Scheme::Ordered,
        _ => return legend,
    };
    let declared = var.levels.as_deref().unwrap_or_default();
    let slots: Option<Vec<usize>> = legend
        .levels
        .names
        .iter()
        .map(|name| declared.iter().position(|d| d == name))
        .collect();
    let colours = slots.and_then(|slots| {
        let palette = scheme::colours(scheme, declared.len())?;
        Some(slots.iter().map(|&s| palette[s]).collect())
    });
    if let Some(colours) = colours.or_else(|| scheme::colours(Scheme::Ordered, legend.levels.len()))
    {
        legend.colours = colours;
    }
    legend
}

/// W0004: a `points` layer with more values in one cell than dots can show apart.
fn many_points(cells: &Cells) -> Vec<Diagnostic> {
    let Some(layer) = cells
        .plan
        .layers
        .iter()
        .find(|l| l.decl.shows == crate::check::layer::Shows::Values)
    else {
        return Vec::new();
    };
    let mut per_cell: std::collections::BTreeMap<cells::Cell, usize> = Default::default();
    let mut count = |cell| *per_cell.entry(cell).or_default() += 1;
    match &cells.placed {
        Placed::Values(v) => v.placed.obs.iter().for_each(|o| count(o.cell)),
        Placed::Pairs(p) => p.obs.iter().for_each(|o| count(o.cell)),
        Placed::Rows(_) | Placed::Levels(_) => {}
    }
    let Some(most) = per_cell.values().copied().max() else {
        return Vec::new();
    };
    if most <= POINTS_PER_CELL_CAP {
        return Vec::new();
    }
    vec![Diagnostic::new(
        Code::ManyPoints,
        format!(
            "`points` draws {most} dots in one cell, more than the {POINTS_PER_CELL_CAP} that can be told apart"
        ),
    )
    .with_label(layer.head, "one dot per value")
    .with_help(
        "show so many values with `box`, `violin` or `density` (or `histogram`); beyond the limit a cell's dots are drawn as one shape",
    )]
}

/// What every layer's output adds up to for the figure.
#[derive(Default)]
struct Merged {
    x: Extent,
    y: Extent,
    y_from_zero: bool,
    /// The heights title of the last layer that draws its own heights.
    heights: Option<&'static str>,
    /// Those heights are stacked either side of zero.
    split: bool,
    y_hidden: bool,
    width_peak: f64,
    legend: Option<Legend>,
    /// The title and values of the axis of estimates under the panels.
    estimates: Option<(String, Extent)>,
    /// Warnings of every layer, each once (a layer warns in each panel it finds a problem).
    warnings: Vec<Diagnostic>,
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
            YUse::Split(title) => {
                self.heights = Some(title);
                self.split = true;
            }
            YUse::Hidden => self.y_hidden = true,
        }
        self.width_peak = self.width_peak.max(out.width_peak);
        if out.legend.is_some() {
            self.legend = out.legend;
        }
        if let Some((title, extent)) = out.estimate_axis {
            let merged = self.estimates.get_or_insert((title, Extent::default()));
            merged.1.merge(extent);
        }
        for w in out.warnings {
            let seen = self
                .warnings
                .iter()
                .any(|d| d.code == w.code && d.span() == w.span());
            if !seen {
                self.warnings.push(w);
            }
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
        magnitudes: false,
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
            magnitudes: false,
        }),
        Axes::CatCat { .. } if merged.y_hidden => YScale::Hidden,
        Axes::CatCat { .. } if merged.heights.is_some() => YScale::Numbers(NumScale {
            title: merged.heights.unwrap_or("Percent").to_string(),
            extent: merged.y.get(),
            range: None,
            log: false,
            include_zero: true,
            magnitudes: merged.split,
        }),
        Axes::CatCat { y, .. } => YScale::Categories {
            title: cells.title(y.var.var, &y.title),
            levels: cells.y_levels.clone().unwrap_or_else(Levels::single),
        },
    }
}
