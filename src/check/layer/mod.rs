//! The layer registry: every layer declares, once, its word, its options, the axes it takes and
//! its properties, in one file of this folder.
//!
//! A declaration ([`LayerDecl`]) is data: the generic checks read it — unknown and repeated
//! options ([`crate::check::terms`]), whether the layer fits the figure's axes and the scales
//! of its variables ([`shape`]), the warnings about hidden data — and so do the formatter (the
//! order of a layer's options), the "did you mean" lists and the language reference's layer
//! table ([`reference_table`]). A layer's own file adds its typed options and the rules only it
//! has (a `mean bar` on an interval y, `lines` across a between factor).
//!
//! Guarantee: a [`LayerPlan`] holds options of the right type and in range, for a layer that
//! fits the figure's axes ([`crate::check::Axes`]).
//!
//! Adding a layer: a file here with its `DECL`, its options struct, its `read` function and its
//! `key` function (what its marks mean, for the key under the figure); a variant of [`Layer`]
//! and its arm in [`Layer::key`]; its declaration in [`LAYERS`]. See DEVELOPERS.md, "How to add a layer".

mod boxplot;
mod counts;
mod density;
mod difference;
mod ecdf;
mod fit;
mod flows;
mod guide;
mod histogram;
pub mod key;
mod lines;
mod mean;
mod median;
pub(super) mod options;
mod points;
pub(super) mod shape;
mod smooth;
mod stack;
mod violin;

use crate::diag::{Diagnostic, Span};
use crate::syntax::ast::Plain;

use super::axes::AxisVar;
use super::plan::{Codebook, Scale};
use super::terms::{Accepts, Options};

pub use boxplot::BoxOpts;
pub use counts::CountsOpts;
pub use density::DensityOpts;
pub use difference::DifferenceOpts;
pub use ecdf::EcdfOpts;
pub use fit::FitOpts;
pub use flows::FlowsOpts;
pub use guide::{GuideAxis, GuideOpts};
pub use histogram::HistogramOpts;
pub use key::{KeyContext, MarkKey};
pub use lines::LinesOpts;
pub use mean::MeanOpts;
pub use median::MedianOpts;
pub use points::{Arrange, PointsOpts};
pub use smooth::{span_text, SmoothOpts};
pub use stack::StackOpts;
pub use violin::ViolinOpts;

/// Every layer, in the order of the language reference.
pub static LAYERS: &[&LayerDecl] = &[
    &points::DECL,
    &boxplot::DECL,
    &violin::DECL,
    &mean::DECL,
    &median::DECL,
    &lines::DECL,
    &difference::DECL,
    &counts::DECL,
    &stack::DECL,
    &histogram::DECL,
    &density::DECL,
    &ecdf::DECL,
    &fit::DECL,
    &smooth::DECL,
    &flows::DECL,
    &guide::DECL,
];

/// The declaration of the layer named `word`.
pub fn find(word: &str) -> Option<&'static LayerDecl> {
    LAYERS.iter().copied().find(|d| d.word == word)
}

/// A layer with its checked, typed options: one variant per layer.
#[derive(Debug, Clone, PartialEq)]
pub enum Layer {
    Points(PointsOpts),
    Box(BoxOpts),
    Violin(ViolinOpts),
    Mean(MeanOpts),
    Median(MedianOpts),
    Lines(LinesOpts),
    Difference(DifferenceOpts),
    Counts(CountsOpts),
    Stack(StackOpts),
    Histogram(HistogramOpts),
    Density(DensityOpts),
    Ecdf(EcdfOpts),
    Fit(FitOpts),
    Smooth(SmoothOpts),
    Flows(FlowsOpts),
    Guide(GuideOpts),
}

impl Layer {
    /// What the layer's marks mean, for the key under the figure; `None` when the axes say it
    /// all (bars of counts).
    pub fn key(&self, ctx: &KeyContext) -> Option<MarkKey> {
        match self {
            Layer::Points(o) => points::key(o, ctx),
            Layer::Box(o) => boxplot::key(o, ctx),
            Layer::Violin(o) => violin::key(o, ctx),
            Layer::Mean(o) => mean::key(o, ctx),
            Layer::Median(o) => median::key(o, ctx),
            Layer::Lines(o) => lines::key(o, ctx),
            Layer::Difference(o) => difference::key(o, ctx),
            Layer::Counts(o) => counts::key(o, ctx),
            Layer::Stack(o) => stack::key(o, ctx),
            Layer::Histogram(o) => histogram::key(o, ctx),
            Layer::Density(o) => density::key(o, ctx),
            Layer::Ecdf(o) => ecdf::key(o, ctx),
            Layer::Fit(o) => fit::key(o, ctx),
            Layer::Smooth(o) => smooth::key(o, ctx),
            Layer::Flows(o) => flows::key(o, ctx),
            Layer::Guide(o) => guide::key(o, ctx),
        }
    }
}

/// One checked layer of a figure.
#[derive(Debug, Clone, PartialEq)]
pub struct LayerPlan {
    pub decl: &'static LayerDecl,
    pub layer: Layer,
    /// What the layer asks of the rest of the figure.
    pub traits: Traits,
    /// The layer's word, and its whole statement.
    pub head: Span,
    pub span: Span,
}

/// What a layer, with its options, asks of the figure beyond its own marks.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Traits {
    /// The layer joins or compares one value per subject and cell, so a subject with two values
    /// in a cell is an error (unless the data declare `replicates`).
    pub one_value_per_subject: bool,
    /// The horizontal spread of the figure's dots, as a share of a group's band: set by
    /// `points`, followed by `lines` so they meet the dots they join.
    pub jitter: Option<f64>,
    /// The layer summarises values and should be shown with them or their spread (W0001).
    pub needs_spread: bool,
    /// The layer draws bars that hide the values unless `points` show them (W0002): the span
    /// of what draws them.
    pub needs_points: Option<Span>,
    /// The layer follows each subject's own rows, so repeated trials are never collapsed for it
    /// (`flows`: one state per subject and occasion, whatever the data block says).
    pub keeps_trials: bool,
    /// The layer reads a numeric x as occasions of each subject (trajectories, means per x
    /// value): repeated trials collapse per subject and x value, not into one point per subject.
    pub x_occasions: bool,
}

/// What a layer needs on x.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum XNeed {
    Categories,
    Numbers,
    Either,
}

/// What a layer needs on y.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum YNeed {
    /// No `y`: the layer draws its own heights; `what` says what they show.
    None { what: &'static str },
    /// An interval or ratio y; `refusal` says which rule a categorical y breaks.
    Numbers { refusal: Refusal },
    /// An interval, ratio or ordinal y.
    NumbersOrOrdinal { refusal: Refusal },
    /// A nominal or ordinal y.
    Categories,
    /// Any figure: the layer draws in the units of whatever axes it has (guides).
    Any,
}

/// Which rule a layer that summarises numbers breaks when given categories.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Refusal {
    /// A mean needs equal intervals (F0104).
    Mean,
    /// The layer needs ordered values: a nominal y breaks F0105, an ordinal one F0117.
    Order,
    /// The layer needs numbers (F0117).
    Numbers,
}

/// What a layer shows of the data, for the warnings about hidden data (W0001, W0002).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shows {
    /// Every value as a mark.
    Values,
    /// The distribution or the values' spread (box, violin, lines, histogram, ...).
    Distribution,
    /// A summary value (mean, median, fitted line).
    Estimate,
    /// Counts of rows.
    Counts,
    /// Nothing of the data: a reference from the spec (guides).
    Reference,
    /// An estimate that compares levels, drawn on an axis of its own beside the data
    /// (differences): never the figure's n, and never shown without the data it compares.
    Comparison,
}

/// One option of a layer: `name(args)` or a bare flag word.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct OptionDecl {
    pub name: &'static str,
    /// How it is written, for help lines and the reference, e.g. `jitter(F)`.
    pub form: &'static str,
    pub flag: bool,
}

impl OptionDecl {
    pub const fn call(name: &'static str, form: &'static str) -> OptionDecl {
        OptionDecl {
            name,
            form,
            flag: false,
        }
    }

    pub const fn flag(name: &'static str) -> OptionDecl {
        OptionDecl {
            name,
            form: name,
            flag: true,
        }
    }
}

/// What the checker knows about a layer statement when it reads its options.
pub struct ReadInput<'a> {
    pub book: &'a Codebook,
    pub stmt: &'a Plain,
    pub opts: &'a Options<'a>,
    /// The figure's axes, when the layer fits them (layer rules that depend on the axes run
    /// only then).
    pub axes: Option<Fitted<'a>>,
}

/// The axes a layer fits, for the rules of its own file.
#[derive(Clone, Copy)]
pub struct Fitted<'a> {
    pub x: &'a AxisVar,
    pub y: Option<&'a AxisVar>,
}

/// Reads a layer's typed options and applies its own rules; `None` after an error (reported).
pub type ReadFn = fn(&ReadInput, &mut Vec<Diagnostic>) -> Option<(Layer, Traits)>;

/// Everything the checker, the formatter and the reference know about one layer.
pub struct LayerDecl {
    /// The layer's statement word.
    pub word: &'static str,
    /// What it draws, in one line (the reference's layer table).
    pub draws: &'static str,
    /// Its options in canonical order (the formatter's order).
    pub options: &'static [OptionDecl],
    pub x: XNeed,
    pub y: YNeed,
    pub shows: Shows,
    /// Its bins or kernels have one width in data units, so a log x would distort them.
    pub linear_x: bool,
    /// It draws a figure of its own: no other layer, no `colour`.
    pub alone: bool,
    pub read: ReadFn,
}

impl LayerDecl {
    /// The layer's word in backquotes, for messages.
    pub fn quoted(&self) -> String {
        format!("`{}`", self.word)
    }

    /// The options, as the generic option reader takes them.
    pub fn accepts<'s>(&self, what: &'s str) -> Accepts<'s> {
        Accepts::from_decls(what, self.options)
    }

    /// Whether a y of this scale is one the layer can show.
    pub fn takes_y(&self, scale: Scale) -> bool {
        match self.y {
            YNeed::None { .. } => false,
            YNeed::Numbers { .. } => scale.is_numeric(),
            YNeed::NumbersOrOrdinal { .. } => scale.is_numeric() || scale == Scale::Ordinal,
            YNeed::Categories => scale.is_categorical(),
            YNeed::Any => true,
        }
    }
}

impl std::fmt::Debug for LayerDecl {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "LayerDecl({})", self.word)
    }
}

impl PartialEq for LayerDecl {
    fn eq(&self, other: &Self) -> bool {
        self.word == other.word
    }
}

/// Reads one layer statement whose word is a layer: its options, then (when it fits the axes)
/// its own rules.
pub fn read(
    decl: &'static LayerDecl,
    book: &Codebook,
    stmt: &Plain,
    opts: &Options,
    axes: Option<Fitted>,
    diags: &mut Vec<Diagnostic>,
) -> Option<LayerPlan> {
    let input = ReadInput {
        book,
        stmt,
        opts,
        axes,
    };
    let (layer, traits) = (decl.read)(&input, diags)?;
    Some(LayerPlan {
        decl,
        layer,
        traits,
        head: stmt.head.span,
        span: stmt.span,
    })
}

/// The language reference's table of layers (§6), as Markdown.
pub fn reference_table() -> String {
    let mut out = String::from("| layer | x | y | options | draws |\n|---|---|---|---|---|\n");
    for d in LAYERS {
        let x = match d.x {
            XNeed::Categories => "nominal, ordinal",
            XNeed::Numbers => "interval, ratio",
            XNeed::Either => "any but id",
        };
        let y = match d.y {
            YNeed::None { .. } => "none",
            YNeed::Numbers { .. } => "interval, ratio",
            YNeed::NumbersOrOrdinal { .. } => "interval, ratio, ordinal",
            YNeed::Categories => "nominal, ordinal",
            YNeed::Any => "any or none",
        };
        let options = if d.options.is_empty() {
            "—".to_string()
        } else {
            d.options
                .iter()
                .map(|o| format!("`{}`", o.form.replace('|', "\\|")))
                .collect::<Vec<_>>()
                .join(", ")
        };
        out.push_str(&format!(
            "| `{}` | {x} | {y} | {options} | {} |\n",
            d.word, d.draws
        ));
    }
    out
}
