//! What layers compute: one file per layer, each a pure function of its options, the
//! figure's cells and a panel, returning the marks it draws (in data units), the summary rows
//! of every number it shows, and the extent it needs on the axes.
//!
//! This file holds what all layers share: the one dispatch over [`Layer`], the marks every
//! layer can return ([`LayerMarks`]), and the names of the numbers they report ([`Stat`]).

mod boxplot;
mod counts;
mod density;
mod difference;
mod ecdf;
mod fit;
mod flows;
mod guide;
mod histogram;
mod lines;
mod mean;
mod median;
mod points;
mod smooth;
mod stack;
mod violin;

use crate::check::layer::Shows;
use crate::check::plan::{Axes, AxisScale, BootMethod, Layer, LayerPlan};
use crate::diag::{Code, Diagnostic, Span};
use crate::stats;

use super::cells::{Cell, Cells, Placed, Placement, Values};
use super::extent::Extent;
use super::summary::{RowKey, SummaryRow};
use super::{ComputeError, Legend};

pub use boxplot::BoxMark;
pub use difference::DifferenceMarks;
pub use fit::{FitMark, FitModel};
pub use flows::FlowMarks;
pub use guide::GuideMark;
pub use histogram::Bin;
pub use lines::{PathPoint, SubjectPath};
pub use mean::{MeanEstimates, MeanKind, MeanMarks};
pub use median::LevelMark;
pub use points::{CatPoint, PointMarks};
pub use smooth::SmoothMark;
pub use stack::{StackBar, StackMarks};
pub use violin::{ViolinMark, VIOLIN_GRID};

pub use density::Curve;
pub use ecdf::EcdfMark;
pub use fit::FIT_GRID;

/// What one layer draws in one panel: one variant per layer.
#[derive(Debug, Clone, PartialEq)]
pub enum LayerMarks {
    Points(PointMarks),
    Box(Vec<BoxMark>),
    Violin(Vec<ViolinMark>),
    Mean(MeanMarks),
    Median(MedianMarks),
    Lines(Vec<SubjectPath>),
    /// Drawn under the panel, on the axis of differences.
    Difference(DifferenceMarks),
    Counts(CountMarks),
    Stack(StackMarks),
    Histogram(Vec<Bin>),
    Density(Vec<Curve>),
    Ecdf(Vec<EcdfMark>),
    Fit(Vec<FitMark>),
    Smooth(Vec<SmoothMark>),
    Flows(FlowMarks),
    Guide(GuideMark),
}

/// A bar on a categorical axis (counts, or a mean drawn as a bar).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bar {
    pub x: usize,
    pub group: usize,
    pub height: f64,
}

/// The bars of `counts`, with the Wilson interval of each percentage when asked for.
#[derive(Debug, Clone, PartialEq)]
pub struct CountMarks {
    pub bars: Vec<Bar>,
    /// The Wilson interval of each percentage that has one (`error(ci(L))`), in percent.
    pub intervals: Vec<Estimate>,
}

/// A central value with an optional interval, at an x slot (or, `Estimate<f64>`, at a value of
/// a numeric x).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate<X = usize> {
    pub x: X,
    pub group: usize,
    pub centre: f64,
    pub interval: Option<(f64, f64)>,
}

/// Medians of a numeric y (values with intervals) or of an ordinal y (levels).
#[derive(Debug, Clone, PartialEq)]
pub enum MedianMarks {
    Values(Vec<Estimate>),
    Levels(Vec<LevelMark>),
}

/// What the y axis shows, as far as one layer is concerned.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum YUse {
    /// The data's y variable.
    Data,
    /// The layer's own heights from zero (count, percent, density): the axis title.
    Heights(&'static str),
    /// The layer's own heights stacked either side of zero (a diverging stack): the axis title;
    /// the axis labels their sizes, unsigned.
    Split(&'static str),
    /// No y axis: the layer draws its own vertical quantities (flows).
    Hidden,
}

/// One layer's results in one panel.
#[derive(Debug, Clone)]
pub struct LayerOutput {
    pub marks: LayerMarks,
    pub rows: Vec<SummaryRow>,
    /// The data values it draws on each numeric axis.
    pub x: Extent,
    pub y: Extent,
    /// Bars drawn from zero: zero must be on the y axis.
    pub y_from_zero: bool,
    pub y_use: YUse,
    /// The largest width quantity it draws (a violin's density, a flow's subjects), so the
    /// figure draws every such mark on one scale.
    pub width_peak: f64,
    /// A legend the layer brings (flows: its states), in place of the colour legend.
    pub legend: Option<Legend>,
    /// The title and values of the axis of estimates under the panels (`difference`).
    pub estimate_axis: Option<(String, Extent)>,
    /// Words the key adds to the layer's sentence when the data call for them ("no interval
    /// from fewer than 2 pairs").
    pub note: Option<&'static str>,
    /// Warnings about the data the layer draws (too few values).
    pub warnings: Vec<Diagnostic>,
}

impl LayerOutput {
    fn new(marks: LayerMarks, rows: Vec<SummaryRow>) -> LayerOutput {
        LayerOutput {
            marks,
            rows,
            x: Extent::default(),
            y: Extent::default(),
            y_from_zero: false,
            y_use: YUse::Data,
            width_peak: 0.0,
            legend: None,
            estimate_axis: None,
            note: None,
            warnings: Vec::new(),
        }
    }
}

/// Computes one layer in one panel.
pub fn compute(
    layer: &LayerPlan,
    cells: &Cells,
    panel: usize,
) -> Result<LayerOutput, ComputeError> {
    let at = At {
        cells,
        panel,
        layer: layer.decl.word,
        head: layer.head,
    };
    match &layer.layer {
        Layer::Points(o) => points::compute(o, &at),
        Layer::Box(o) => boxplot::compute(o, &at, at.values()?),
        Layer::Violin(o) => violin::compute(o, &at, at.values()?),
        Layer::Mean(o) => mean::compute(o, &at, layer.head),
        Layer::Median(o) => median::compute(o, &at),
        Layer::Lines(o) => lines::compute(o, &at),
        Layer::Difference(o) => difference::compute(o, &at, at.values()?),
        Layer::Counts(o) => counts::compute(o, &at, at.rows()?),
        Layer::Stack(o) => stack::compute(o, &at),
        Layer::Histogram(o) => histogram::compute(o, &at, at.values()?),
        Layer::Density(o) => density::compute(o, &at, at.values()?),
        Layer::Ecdf(o) => ecdf::compute(o, &at, at.values()?),
        Layer::Fit(o) => fit::compute(o, &at, at.pairs()?),
        Layer::Smooth(o) => smooth::compute(o, &at, at.pairs()?, layer.head),
        Layer::Flows(o) => flows::compute(o, &at, layer.span),
        Layer::Guide(o) => Ok(guide::compute(o, &at)),
    }
}

/// Where a layer is computed: the figure's cells, one panel, the layer's word (and where it is
/// written, for warnings).
pub struct At<'c, 'a> {
    pub cells: &'c Cells<'a>,
    pub panel: usize,
    pub layer: &'static str,
    pub head: Span,
}

impl At<'_, '_> {
    /// The summary key of a colour group at an x (empty for rows about a whole group).
    fn key(&self, group: usize, x: impl Into<String>) -> RowKey {
        RowKey {
            panel: self.cells.panel_name(self.panel),
            layer: self.layer,
            group: self.cells.group_name(group),
            x: x.into(),
        }
    }

    /// The key of a cell: its x level's name and colour group.
    fn cell_key(&self, cell: Cell) -> RowKey {
        self.key(cell.group, self.cells.x_levels.names[cell.x].clone())
    }

    /// The cell of this panel at x slot `x` and colour group `group`.
    fn cell(&self, x: usize, group: usize) -> Cell {
        Cell {
            panel: self.panel,
            x,
            group,
        }
    }

    /// Visits every cell of the panel (x level, then colour group): pushes the cell's `n` and
    /// `n_missing` rows, then calls `f` with the cell, its sorted values and its key.
    fn each_cell<'v>(
        &self,
        values: &'v Values,
        rows: &mut Vec<SummaryRow>,
        mut f: impl FnMut(Cell, &'v [f64], &RowKey, &mut Vec<SummaryRow>),
    ) {
        for cell in self.cells.cells_of(self.panel) {
            let sorted = values.sorted(cell);
            let key = self.cell_key(cell);
            n_rows(rows, &key, sorted.len(), values.placed.n_missing(cell));
            f(cell, sorted, &key, rows);
        }
    }

    /// Visits every colour group of the panel over a numeric x: pushes its `n` and `n_missing`
    /// rows (`x` empty), then calls `f` with the group, its sorted values and its key.
    fn each_group<'v>(
        &self,
        values: &'v Values,
        rows: &mut Vec<SummaryRow>,
        mut f: impl FnMut(usize, &'v [f64], &RowKey, &mut Vec<SummaryRow>),
    ) {
        for group in 0..self.cells.groups.len() {
            let cell = self.cell(0, group);
            let sorted = values.sorted(cell);
            let key = self.key(group, "");
            n_rows(rows, &key, sorted.len(), values.placed.n_missing(cell));
            f(group, sorted, &key, rows);
        }
    }

    /// The pairs of colour group `group` in this panel (a numeric x), after pushing the group's
    /// `n` and `n_missing` rows; with the group's key (`x` empty).
    fn group_pairs(
        &self,
        pairs: &Placement<super::cells::Pair>,
        group: usize,
        rows: &mut Vec<SummaryRow>,
    ) -> (Vec<super::cells::Pair>, RowKey) {
        let here: Vec<super::cells::Pair> = pairs
            .in_panel(self.panel)
            .filter(|o| o.cell.group == group)
            .map(|o| o.value)
            .collect();
        let key = self.key(group, "");
        n_rows(rows, &key, here.len(), pairs.n_missing(self.cell(0, group)));
        (here, key)
    }

    /// Whether the figure's y axis is logarithmic.
    fn y_is_log(&self) -> bool {
        matches!(&self.cells.plan.axes, Axes::CatNum { y, .. } | Axes::NumNum { y, .. } if y.scale == AxisScale::Log)
    }

    /// Whether the figure's x axis is logarithmic.
    fn x_is_log(&self) -> bool {
        matches!(&self.cells.plan.axes, Axes::Num { x } | Axes::NumNum { x, .. } if x.scale == AxisScale::Log)
    }

    /// Whether the measured variable of a distribution (x alone) or of values by category (y) is
    /// a ratio variable, whose densities are reflected at zero.
    fn measure_is_ratio(&self) -> bool {
        match &self.cells.plan.axes {
            Axes::Num { x } => x.var.ratio,
            Axes::CatNum { y, .. } => y.var.ratio,
            Axes::Cat { .. } | Axes::CatCat { .. } | Axes::NumNum { .. } => false,
        }
    }

    fn values(&self) -> Result<&Values, ComputeError> {
        match &self.cells.placed {
            Placed::Values(v) => Ok(v),
            _ => Err(self.misplaced("numbers")),
        }
    }

    fn levels(&self) -> Result<&Values, ComputeError> {
        match &self.cells.placed {
            Placed::Levels(v) => Ok(v),
            _ => Err(self.misplaced("levels")),
        }
    }

    fn rows(&self) -> Result<&Placement<()>, ComputeError> {
        match &self.cells.placed {
            Placed::Rows(r) => Ok(r),
            _ => Err(self.misplaced("rows")),
        }
    }

    fn pairs(&self) -> Result<&Placement<super::cells::Pair>, ComputeError> {
        match &self.cells.placed {
            Placed::Pairs(p) => Ok(p),
            _ => Err(self.misplaced("pairs")),
        }
    }

    fn misplaced(&self, wanted: &str) -> ComputeError {
        ComputeError::Internal(format!(
            "layer `{}` needs {wanted}, which the checker's axes do not give",
            self.layer
        ))
    }
}

/// The level-`level` bootstrap interval of `statistic` of `values` by `method` (the same
/// resamples for both methods), if it is defined.
fn boot_interval(
    values: &[f64],
    statistic: stats::BootstrapStatistic,
    level: f64,
    method: BootMethod,
) -> Option<(f64, f64)> {
    let settings = stats::BootstrapSettings::default();
    match method {
        BootMethod::Percentile => stats::bootstrap_interval(values, statistic, level, settings)
            .ok()
            .map(|b| (b.low, b.high)),
        BootMethod::Bca => stats::bca_interval(values, statistic, level, settings)
            .ok()
            .map(|b| (b.low, b.high)),
    }
}

/// Fewest values a box or violin describes a distribution from: below it, quartiles and a
/// density rest on too few values to mean much, and a figure that does not show the values
/// themselves warns (W0016; common practice, no single standard).
pub const LEAST_FOR_SHAPE: usize = 5;

/// Tracks the cell of a layer with the fewest values (at least one) for [`few_values`].
#[derive(Debug, Default)]
struct Smallest(Option<(usize, RowKey)>);

impl Smallest {
    fn see(&mut self, n: usize, key: &RowKey) {
        if n > 0 && self.0.as_ref().is_none_or(|(m, _)| n < *m) {
            self.0 = Some((n, key.clone()));
        }
    }
}

/// W0016: a shape (`what`: "a box", "a violin") drawn from fewer than [`LEAST_FOR_SHAPE`]
/// values, naming its smallest cell, in a figure whose dots do not show the values.
fn few_values(at: &At, smallest: Smallest, what: &str) -> Option<Diagnostic> {
    let shows_values = at
        .cells
        .plan
        .layers
        .iter()
        .any(|l| l.decl.shows == Shows::Values);
    let (n, key) = smallest
        .0
        .filter(|(n, _)| *n < LEAST_FOR_SHAPE && !shows_values)?;
    let mut place = vec![format!("x = \"{}\"", key.x)];
    if !key.group.is_empty() {
        place.push(format!("colour = \"{}\"", key.group));
    }
    if !key.panel.is_empty() {
        place.push(format!("panel = \"{}\"", key.panel));
    }
    let values = if n == 1 { "value" } else { "values" };
    Some(
        Diagnostic::new(
            Code::FewValues,
            format!("{what} of {n} {values} ({}): too few to describe a distribution", place.join(", ")),
        )
        .with_label(at.head, format!("drawn from {n} {values}"))
        .with_help(format!(
            "add `points` to show so few values; {what} needs about {LEAST_FOR_SHAPE} values to mean much (common practice)"
        )),
    )
}

/// Pushes a cell's `n` and `n_missing` rows.
fn n_rows(rows: &mut Vec<SummaryRow>, key: &RowKey, n: usize, n_missing: usize) {
    rows.push(key.count(Stat::N, n));
    rows.push(key.count(Stat::NMissing, n_missing));
}

macro_rules! stat_table {
    ($($name:ident = $text:literal, $meaning:literal;)*) => {
        /// The name of a number in the summary (the `stat` column): one table for every layer.
        #[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
        pub enum Stat {
            $(#[doc = $meaning] $name,)*
        }

        impl Stat {
            /// Every statistic, in the order of the reference's table.
            pub const ALL: &'static [Stat] = &[$(Stat::$name,)*];

            /// The name as written in the summary.
            pub fn as_str(self) -> &'static str {
                match self {
                    $(Stat::$name => $text,)*
                }
            }

            /// What it means and which layers report it.
            pub fn meaning(self) -> &'static str {
                match self {
                    $(Stat::$name => $meaning,)*
                }
            }
        }
    };
}

stat_table! {
    N = "n", "Number of values used: per cell; per colour group (`x` empty) for `counts`, `histogram`, `density`, `ecdf`, scatter `points`, `fit`, `smooth` and `mean` over a numeric x (which also gives one per x value); for `lines`, the subjects drawn per group; for `flows`, subjects in the panel and at each occasion; for `difference`, the pairs (paired) or the level's values (Welch); for `stack`, the values at the x level.";
    NMissing = "n_missing", "Kept rows not shown because a needed value is missing (under `ci(L, within)`, also the cell's values of subjects missing another within cell; under a paired `difference`, also the level's values whose subject has none at the reference); with every `n` except that of `lines` and the per-x-value `n` of `mean` over a numeric x (its group's row counts them).";
    Count = "count", "Rows in a level or bin (`counts`, `histogram`); for `flows`, subjects in a state, or moving between two states of consecutive occasions (zeros included); for `stack`, the values at a level of y (`group`) and of x (zeros included).";
    Percent = "percent", "`100 · count / n` of the panel and colour group: `counts` and `histogram` with `heights(percent)` (no row for a group with no rows); for `stack`, `100 · count / n` of the x level (no row for an x level without values).";
    Density = "density", "`count / (n · width)`: `histogram` with `heights(density)`; the kernel density at `x`: `density` and `violin` with `summary(full)`, one row per point drawn.";
    Proportion = "proportion", "The proportion of values at or below `x` (each distinct value): `ecdf`.";
    Bandwidth = "bandwidth", "The kernel bandwidth used: `density`, `violin`.";
    Slope = "slope", "Slope of the least squares line (of ln y on ln x, ln y on x or y on ln x on log axes): `fit`.";
    SlopeSe = "slope_se", "Standard error of the slope, `s / √Sxx`: `fit` with three pairs or more.";
    SlopeCiLow = "slope_ci_low", "Lower end of the slope's interval at the band's level, from t with n − 2 df: `fit band(L)`.";
    SlopeCiHigh = "slope_ci_high", "Upper end of the slope's interval, as `slope_ci_low`.";
    Intercept = "intercept", "Intercept of the least squares line (on the logs, as `slope`): `fit`.";
    InterceptSe = "intercept_se", "Standard error of the intercept, `s · √(1/n + x̄²/Sxx)`: `fit` with three pairs or more.";
    InterceptCiLow = "intercept_ci_low", "Lower end of the intercept's interval, as `slope_ci_low`.";
    InterceptCiHigh = "intercept_ci_high", "Upper end of the intercept's interval, as `slope_ci_low`.";
    R = "r", "Pearson's correlation of x and y (of their logs on log axes; only when y varies): `fit`.";
    RSquared = "r_squared", "`r²`, the share of the variance of y the line explains (only when y varies): `fit`.";
    ResidualSd = "residual_sd", "Residual standard deviation `s = √(RSS / (n − 2))`: `fit` with three pairs or more.";
    Fitted = "fitted", "The fitted line or smooth at `x`, one row per point drawn (back on the axis's scale): `fit summary(full)`, `smooth summary(full)`.";
    Span = "span", "The share of the pairs each local line uses, as `span(F)` gives it: `smooth`.";
    Neighbours = "neighbours", "The number of pairs each local line uses, `⌊span · n⌋` (at least 2): `smooth`.";
    BandLow = "band_low", "Lower edge of the band at `x`, one row per point drawn: `fit band(L) summary(full)`.";
    BandHigh = "band_high", "Upper edge of the band at `x`, as `band_low`.";
    Mean = "mean", "The mean: `mean` on a linear axis.";
    GeometricMean = "geometric_mean", "The geometric mean `exp(mean of ln y)`: `mean` on a log y axis.";
    Sd = "sd", "Sample standard deviation: `mean error(sd)`.";
    GeometricSd = "geometric_sd", "`exp(sd of ln y)`, the factor the bar spans each side of the geometric mean (÷ and ×): `mean error(sd)` on a log axis.";
    Se = "se", "Standard error of the mean: `mean error(se)`.";
    GeometricSe = "geometric_se", "`exp(se of ln y)`, as `geometric_sd`: `mean error(se)` on a log axis.";
    Difference = "difference", "The level's mean minus the reference level's (Welch), or the mean of the subjects' differences level − reference (paired): `difference`.";
    Df = "df", "Degrees of freedom of the difference's t interval: the Welch–Satterthwaite ν (not whole), or pairs − 1: `difference` with an interval.";
    CiLow = "ci_low", "Lower end of the interval: `mean error(ci(L))`, `error(ci(L, within))`, `error(boot(L))`, `error(boot(L, bca))`; `median error(ci(L))` (an order statistic), `error(boot(L))`, `error(boot(L, bca))`; `counts heights(percent) error(ci(L))` (Wilson, in percent); `difference` (paired t or Welch).";
    CiHigh = "ci_high", "Upper end of the interval, as `ci_low`.";
    Coverage = "coverage", "The coverage the order-statistic interval achieves, at least `L`: `median error(ci(L))`.";
    Median = "median", "The median (a level name for an ordinal y): `box`, `violin`, `median`.";
    Q1 = "q1", "First quartile (a level name for an ordinal y): `box`, `violin`, `median` of an ordinal y.";
    Q3 = "q3", "Third quartile, as `q1`.";
    NotchLow = "notch_low", "Lower end of the notch, `median − 1.58 · IQR / √n`: `box notch`.";
    NotchHigh = "notch_high", "Upper end of the notch, `median + 1.58 · IQR / √n`: `box notch`.";
    WhiskerLow = "whisker_low", "Lower whisker end: `box`.";
    WhiskerHigh = "whisker_high", "Upper whisker end: `box`.";
    Outliers = "outliers", "One row per outlier, ascending: `box` with `whiskers(tukey)`, when a box has at most 30 outliers.";
    NOutliers = "n_outliers", "The number of outliers, in place of the `outliers` rows when a box has more than 30 (its extremes are `min` and `max`).";
    Min = "min", "Smallest value: `box`.";
    Max = "max", "Largest value: `box`.";
    XLine = "x_line", "Where a reference line crosses x: `guide x(V)`.";
    YLine = "y_line", "Where a reference line crosses y: `guide y(V)`.";
    XBandLow = "x_band_low", "Lower end of a reference band across x: `guide x(LO, HI)`.";
    XBandHigh = "x_band_high", "Upper end of a reference band across x, as `x_band_low`.";
    YBandLow = "y_band_low", "Lower end of a reference band across y: `guide y(LO, HI)`.";
    YBandHigh = "y_band_high", "Upper end of a reference band across y, as `y_band_low`.";
}

impl std::fmt::Display for Stat {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The reference's table of statistics (§11), as Markdown.
pub fn stat_reference_table() -> String {
    let mut out = String::from("| stat | meaning |\n|---|---|\n");
    for s in Stat::ALL {
        out.push_str(&format!("| `{s}` | {} |\n", s.meaning()));
    }
    out
}
