//! Layers: reading their options, and fitting them to the figure's axes (the scale rules).

use crate::diag::Code;
use crate::diag::{Diagnostic, Span};
use crate::syntax::ast::{Call, Ident, Plain, Term};

use super::codebook::resolve;
use super::figure::{not_categorical, AxisVar};
use super::plan::{
    Bandwidth, BinRule, CatNumLayer, CatOrdLayer, Codebook, CountLayer, DistLayer, ErrorBar, Frame,
    Heights, Scale, VarId, Whiskers, XyLayer,
};
use super::terms::{self, Accepts, Options};

/// Every layer word.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LayerKind {
    Counts,
    Histogram,
    Points,
    Box,
    Mean,
    Median,
    Lines,
    Density,
    Violin,
    Fit,
    Flows,
}

impl LayerKind {
    pub const ALL: [LayerKind; 11] = [
        LayerKind::Counts,
        LayerKind::Histogram,
        LayerKind::Points,
        LayerKind::Box,
        LayerKind::Mean,
        LayerKind::Median,
        LayerKind::Lines,
        LayerKind::Density,
        LayerKind::Violin,
        LayerKind::Fit,
        LayerKind::Flows,
    ];

    pub fn word(self) -> &'static str {
        match self {
            LayerKind::Counts => "counts",
            LayerKind::Histogram => "histogram",
            LayerKind::Points => "points",
            LayerKind::Box => "box",
            LayerKind::Mean => "mean",
            LayerKind::Median => "median",
            LayerKind::Lines => "lines",
            LayerKind::Density => "density",
            LayerKind::Violin => "violin",
            LayerKind::Fit => "fit",
            LayerKind::Flows => "flows",
        }
    }

    pub fn from_word(word: &str) -> Option<LayerKind> {
        LayerKind::ALL.into_iter().find(|k| k.word() == word)
    }

    fn accepts(self) -> Accepts<'static> {
        let (calls, flags): (&[&str], &[&str]) = match self {
            LayerKind::Counts => (&["heights"], &[]),
            LayerKind::Histogram => (&["bins", "width", "heights"], &[]),
            LayerKind::Points => (&["jitter"], &[]),
            LayerKind::Box => (&["whiskers"], &[]),
            LayerKind::Mean => (&["error"], &["bar"]),
            LayerKind::Median => (&["error"], &[]),
            LayerKind::Lines | LayerKind::Flows => (&["by"], &[]),
            LayerKind::Density | LayerKind::Violin => (&["bandwidth"], &[]),
            LayerKind::Fit => (&["band"], &["linear"]),
        };
        Accepts {
            what: self.quoted(),
            calls,
            flags,
        }
    }

    fn quoted(self) -> &'static str {
        match self {
            LayerKind::Counts => "`counts`",
            LayerKind::Histogram => "`histogram`",
            LayerKind::Points => "`points`",
            LayerKind::Box => "`box`",
            LayerKind::Mean => "`mean`",
            LayerKind::Median => "`median`",
            LayerKind::Lines => "`lines`",
            LayerKind::Density => "`density`",
            LayerKind::Violin => "`violin`",
            LayerKind::Fit => "`fit`",
            LayerKind::Flows => "`flows`",
        }
    }
}

/// A layer's options, read but not yet fitted to the axes.
#[derive(Debug, Clone)]
pub struct RawLayer {
    pub kind: LayerKind,
    pub head: Span,
    pub span: Span,
    heights: Option<(Heights, Span)>,
    bins: Option<BinRule>,
    jitter: f64,
    whiskers: Whiskers,
    error: Option<(ErrorBar, Span)>,
    bar: Option<Span>,
    by: Option<(VarId, Span)>,
    bandwidth: Bandwidth,
    band: Option<f64>,
}

/// Reads a layer statement's options; `None` when they are malformed (already reported).
pub fn read_layer(book: &Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<RawLayer> {
    let kind = LayerKind::from_word(&p.head.name)?;
    let before = diags.len();
    let opts = terms::options(&p.terms, &kind.accepts(), diags);
    let mut layer = RawLayer {
        kind,
        head: p.head.span,
        span: p.span,
        heights: None,
        bins: None,
        jitter: 0.0,
        whiskers: Whiskers::Tukey,
        error: None,
        bar: opts.flag("bar").map(|f| f.span),
        by: None,
        bandwidth: Bandwidth::Silverman,
        band: None,
    };
    read_shared_options(book, &opts, &mut layer, diags);
    if matches!(kind, LayerKind::Lines | LayerKind::Flows) && opts.call("by").is_none() {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!("{} needs `by(SUBJECT)`", kind.quoted()),
            )
            .with_label(p.head.span, "joins whose values?")
            .with_help(format!(
                "write `{} by(participant)`, naming the data's subject",
                kind.word()
            )),
        );
    }
    (diags.len() == before).then_some(layer)
}

fn read_shared_options(
    book: &Codebook,
    opts: &Options,
    layer: &mut RawLayer,
    diags: &mut Vec<Diagnostic>,
) {
    if let Some(c) = opts.call("heights") {
        let choices: &[&str] = if layer.kind == LayerKind::Histogram {
            &["count", "percent", "density"]
        } else {
            &["count", "percent"]
        };
        let shape = "heights(percent)";
        if let Some(w) = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_choice(t, choices, shape, diags))
        {
            let h = match w.name.as_str() {
                "percent" => Heights::Percent,
                "density" => Heights::Density,
                _ => Heights::Count,
            };
            layer.heights = Some((h, c.span));
        }
    }
    if let Some(c) = opts.call("bins") {
        layer.bins = bins(c, diags);
    }
    if let Some(c) = opts.call("width") {
        if layer.bins.is_some() {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "give either `bins(...)` or `width(...)`, not both",
                )
                .with_label(c.span, "width")
                .with_help("`width(W)` fixes the bin width; `bins(...)` chooses one from the data"),
            );
        } else if let Some(w) = positive(c, "width(5)", diags) {
            layer.bins = Some(BinRule::Width(w));
        }
    }
    if let Some(c) = opts.call("jitter") {
        layer.jitter = jitter(c, diags).unwrap_or(0.0);
    }
    if let Some(c) = opts.call("whiskers") {
        let shape = "whiskers(tukey)";
        if let Some(w) = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_choice(t, &["tukey", "range"], shape, diags))
        {
            layer.whiskers = if w.name == "range" {
                Whiskers::Range
            } else {
                Whiskers::Tukey
            };
        }
    }
    if let Some(c) = opts.call("error") {
        layer.error = error_bar(c, layer.kind, diags).map(|e| (e, c.span));
    }
    if let Some(c) = opts.call("by") {
        let shape = "by(participant)";
        if let Some(w) =
            terms::single(c, shape, diags).and_then(|t| terms::expect_word(t, shape, diags))
        {
            layer.by = resolve(book, w, diags).map(|id| (id, w.span));
        }
    }
    if let Some(c) = opts.call("bandwidth") {
        layer.bandwidth = bandwidth(c, diags).unwrap_or(Bandwidth::Silverman);
    }
    if let Some(c) = opts.call("band") {
        layer.band = level_arg(c, "band(0.95)", diags);
    }
}

fn bins(c: &Call, diags: &mut Vec<Diagnostic>) -> Option<BinRule> {
    let shape = "bins(fd)";
    match terms::single(c, shape, diags)? {
        Term::Num(n) => {
            if n.value.fract() == 0.0 && (1.0..=1000.0).contains(&n.value) {
                Some(BinRule::Count(n.value as u32))
            } else {
                diags.push(
                    Diagnostic::new(Code::BadArgument, "a bin count is a whole number from 1 to 1000")
                        .with_label(n.span, "not a bin count")
                        .with_help("write e.g. `bins(20)`, or a rule: `bins(sturges)`, `bins(scott)`, `bins(fd)`"),
                );
                None
            }
        }
        t => {
            let w = terms::expect_choice(t, &["sturges", "scott", "fd"], shape, diags)?;
            Some(match w.name.as_str() {
                "sturges" => BinRule::Sturges,
                "scott" => BinRule::Scott,
                _ => BinRule::FreedmanDiaconis,
            })
        }
    }
}

fn positive(c: &Call, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let n = terms::single(c, shape, diags).and_then(|t| terms::expect_num(t, shape, diags))?;
    if n.value > 0.0 && n.value.is_finite() {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            format!("`{}` must be positive", c.name.name),
        )
        .with_label(n.span, "not positive")
        .with_help(format!("write e.g. `{shape}`")),
    );
    None
}

fn jitter(c: &Call, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let shape = "jitter(0.2)";
    let n = terms::single(c, shape, diags).and_then(|t| terms::expect_num(t, shape, diags))?;
    if (0.0..=1.0).contains(&n.value) {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            "jitter is a fraction of the band, from 0 to 1",
        )
        .with_label(n.span, "out of range")
        .with_help("write e.g. `jitter(0.2)`: points spread over a fifth of each level's band"),
    );
    None
}

/// An interval level: a number strictly between 0 and 1 (rule 8).
fn level(term: &Term, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let n = terms::expect_num(term, shape, diags)?;
    if n.value > 0.0 && n.value < 1.0 {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::LevelOutOfRange,
            format!(
                "an interval level must lie between 0 and 1, found {}",
                n.text
            ),
        )
        .with_label(n.span, "not in (0, 1)")
        .with_help("write the coverage as a fraction, e.g. 0.95 for a 95% interval"),
    );
    None
}

fn level_arg(c: &Call, shape: &str, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    terms::single(c, shape, diags).and_then(|t| level(t, shape, diags))
}

fn error_bar(c: &Call, kind: LayerKind, diags: &mut Vec<Diagnostic>) -> Option<ErrorBar> {
    let shape = "error(ci(0.95))";
    let term = terms::single(c, shape, diags)?;
    let choices: &[&str] = if kind == LayerKind::Median {
        &["boot"]
    } else {
        &["sd", "se", "ci", "boot"]
    };
    let (name, args): (&Ident, Option<&Call>) = match term {
        Term::Word(w) => (w, None),
        Term::Call(inner) => (&inner.name, Some(inner)),
        other => {
            terms::expect_word(other, shape, diags);
            return None;
        }
    };
    terms::expect_choice(&Term::Word(name.clone()), choices, shape, diags)?;
    match (name.name.as_str(), args) {
        ("sd", None) => Some(ErrorBar::Sd),
        ("se", None) => Some(ErrorBar::Se),
        ("ci", Some(call)) => ci(call, diags),
        ("boot", Some(call)) => {
            level_arg(call, "boot(0.95)", diags).map(|level| ErrorBar::Bootstrap { level })
        }
        (word, _) => {
            let fix = match word {
                "ci" => "ci(0.95)",
                "boot" => "boot(0.95)",
                _ => word,
            };
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!("`{word}` is written `{fix}` here"),
                )
                .with_label(term.span(), "malformed")
                .with_help(format!("write `error({fix})`")),
            );
            None
        }
    }
}

fn ci(call: &Call, diags: &mut Vec<Diagnostic>) -> Option<ErrorBar> {
    let shape = "ci(0.95) or ci(0.95, within)";
    match call.args.items.as_slice() {
        [l] => level(l, shape, diags).map(|level| ErrorBar::Ci { level }),
        [l, w] => {
            let level = level(l, shape, diags);
            let within = terms::expect_choice(w, &["within"], shape, diags);
            Some(ErrorBar::CiWithin { level: level? }).filter(|_| within.is_some())
        }
        _ => {
            terms::arity(call, 1, shape, diags);
            None
        }
    }
}

fn bandwidth(c: &Call, diags: &mut Vec<Diagnostic>) -> Option<Bandwidth> {
    let shape = "bandwidth(silverman)";
    match terms::single(c, shape, diags)? {
        Term::Num(_) => positive(c, "bandwidth(2.5)", diags).map(Bandwidth::Fixed),
        t => {
            let w = terms::expect_choice(t, &["silverman", "scott"], shape, diags)?;
            Some(if w.name == "scott" {
                Bandwidth::Scott
            } else {
                Bandwidth::Silverman
            })
        }
    }
}

/// The axes and layers of a figure, for [`frame`].
pub struct FrameInput {
    pub x: AxisVar,
    /// `None` without a `y` statement; `Some(None)` when its variable did not resolve.
    pub y: Option<Option<AxisVar>>,
    pub layers: Vec<RawLayer>,
}

/// Chooses the frame from the scales of x and y and fits every layer into it.
pub fn frame(book: &Codebook, input: FrameInput, diags: &mut Vec<Diagnostic>) -> Option<Frame> {
    let FrameInput { x, y, layers } = input;
    let y = match y {
        Some(None) => return None,
        Some(Some(y)) => Some(y),
        None => None,
    };
    if x.scale == Scale::Id {
        diags.push(not_categorical(book.var(x.var), x.name_span, "an axis"));
        return None;
    }
    // Warnings (W0001, W0002) leave the frame standing; only new errors reject it.
    let errors = |diags: &[Diagnostic]| diags.iter().filter(|d| d.is_error()).count();
    let before = errors(diags);
    let frame = match (x.scale.is_categorical(), y) {
        (true, None) => counts_frame(&x, &layers, diags),
        (true, Some(y)) if y.scale.is_numeric() => cat_num_frame(book, &x, &y, &layers, diags),
        (true, Some(y)) => cat_cat_frame(book, &x, &y, &layers, diags),
        (false, None) => dist_frame(&x, &layers, diags),
        (false, Some(y)) => xy_frame(book, &x, &y, &layers, diags),
    };
    (errors(diags) == before).then_some(frame).flatten()
}

fn y_missing(layer: &RawLayer) -> Diagnostic {
    Diagnostic::new(
        Code::YMissing,
        format!("{} needs a `y` variable", layer.kind.quoted()),
    )
    .with_label(layer.head, "shows values on y")
    .with_help("add `y VARIABLE` naming the measure to show")
}

fn y_not_used(layer: &RawLayer, y: &AxisVar) -> Diagnostic {
    let what = if layer.kind == LayerKind::Density {
        "it shows how x is distributed"
    } else {
        "it counts rows of x"
    };
    Diagnostic::new(
        Code::YNotUsed,
        format!("{} has no `y`: {what}", layer.kind.quoted()),
    )
    .with_label(layer.head, "draws its own heights")
    .with_label(y.name_span, "y given here")
    .with_help("remove `y`, or choose a layer that shows y values (points, box, mean, ...)")
}

fn counts_frame(x: &AxisVar, layers: &[RawLayer], diags: &mut Vec<Diagnostic>) -> Option<Frame> {
    let mut out = Vec::new();
    for layer in layers {
        match layer.kind {
            LayerKind::Counts => out.push(CountLayer::Counts {
                heights: layer.heights.map_or(Heights::Count, |h| h.0),
                span: layer.span,
            }),
            LayerKind::Histogram | LayerKind::Density => diags.push(
                Diagnostic::new(
                    Code::HistogramOfCategories,
                    format!(
                        "{} needs an interval or ratio variable",
                        layer.kind.quoted()
                    ),
                )
                .with_label(x.name_span, format!("x is {}", x.scale.as_str()))
                .with_label(layer.head, "needs numbers on x")
                .with_help("use `counts` to show how many rows fall in each level"),
            ),
            _ => diags.push(y_missing(layer)),
        }
    }
    Some(Frame::Counts {
        x: x.cat_axis(),
        layers: out,
    })
}

fn dist_frame(x: &AxisVar, layers: &[RawLayer], diags: &mut Vec<Diagnostic>) -> Option<Frame> {
    if let (Some(log), Some(layer)) = (x.log_span, layers.first()) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!(
                    "{} works in equal steps of x, which a log axis would distort",
                    layer.kind.quoted()
                ),
            )
            .with_label(log, "log scale")
            .with_label(layer.head, "bins and kernels have one width in data units")
            .with_help("remove `scale(log)`; to show a skewed ratio variable, a log scale suits `points` against another variable"),
        );
    }
    let mut out = Vec::new();
    for layer in layers {
        match layer.kind {
            LayerKind::Histogram => out.push(DistLayer::Histogram {
                rule: layer.bins.unwrap_or(BinRule::Sturges),
                heights: layer.heights.map_or(Heights::Count, |h| h.0),
                span: layer.span,
            }),
            LayerKind::Density => out.push(DistLayer::Density {
                bandwidth: layer.bandwidth,
                span: layer.span,
            }),
            LayerKind::Counts => diags.push(
                Diagnostic::new(
                    Code::CountsOfNumbers,
                    "`counts` needs a nominal or ordinal variable",
                )
                .with_label(x.name_span, format!("x is {}", x.scale.as_str()))
                .with_label(layer.head, "counts categories")
                .with_help("use `histogram` to show the distribution of a numeric variable"),
            ),
            _ => diags.push(y_missing(layer)),
        }
    }
    Some(Frame::Dist {
        x: x.num_axis(),
        layers: out,
    })
}

fn xy_frame(
    book: &Codebook,
    x: &AxisVar,
    y: &AxisVar,
    layers: &[RawLayer],
    diags: &mut Vec<Diagnostic>,
) -> Option<Frame> {
    if !y.scale.is_numeric() {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                "with a numeric x, y must be numeric too",
            )
            .with_label(y.name_span, format!("y is {}", y.scale.as_str()))
            .with_help("put the categorical variable on x and the numeric one on y"),
        );
        return None;
    }
    let mut out = Vec::new();
    for layer in layers {
        match layer.kind {
            LayerKind::Points => out.push(XyLayer::Points { span: layer.span }),
            LayerKind::Fit => out.push(XyLayer::Fit {
                band: layer.band,
                span: layer.span,
            }),
            LayerKind::Counts | LayerKind::Histogram | LayerKind::Density => {
                diags.push(y_not_used(layer, y))
            }
            _ => diags.push(
                not_categorical(
                    book.var(x.var),
                    x.name_span,
                    &format!("{} groups by x and", layer.kind.quoted()),
                )
                .with_label(layer.head, "needs categories on x"),
            ),
        }
    }
    Some(Frame::Xy {
        x: x.num_axis(),
        y: y.num_axis(),
        layers: out,
    })
}

fn cat_cat_frame(
    book: &Codebook,
    x: &AxisVar,
    y: &AxisVar,
    layers: &[RawLayer],
    diags: &mut Vec<Diagnostic>,
) -> Option<Frame> {
    let yvar = book.var(y.var);
    if y.scale == Scale::Id {
        diags.push(
            Diagnostic::new(Code::YNotNumeric, "an id is never a measure")
                .with_label(y.name_span, "y is an id")
                .with_help("put a measured variable on y"),
        );
        return None;
    }
    if let Some(flows) = layers.iter().find(|l| l.kind == LayerKind::Flows) {
        return flows_frame(book, x, y, flows, layers, diags);
    }
    let mut out = Vec::new();
    for layer in layers {
        match (layer.kind, y.scale) {
            (LayerKind::Median, Scale::Ordinal) => {
                if let Some((_, span)) = layer.error {
                    diags.push(
                        Diagnostic::new(Code::BadArgument, "the median of an ordinal variable is a level; it has no bootstrap interval here")
                            .with_label(span, "interval of a level")
                            .with_help("remove `error(...)`: the drawn line already spans the quartile levels"),
                    );
                }
                out.push(CatOrdLayer::Median { span: layer.span })
            }
            (LayerKind::Mean, _) => diags.push(
                Diagnostic::new(Code::MeanOfCategories, format!("a mean of `{}` treats {} categories as numbers", yvar.name, y.scale.as_str()))
                    .with_label(y.name_span, format!("y is {}", y.scale.as_str()))
                    .with_label(layer.head, "needs equal intervals")
                    .with_help(if y.scale == Scale::Ordinal {
                        "use `median`, or declare the variable `interval` if equal spacing of its levels is defensible"
                    } else {
                        "nominal categories have no order and no mean; show them with `counts`"
                    }),
            ),
            (LayerKind::Median | LayerKind::Box, Scale::Nominal) => diags.push(
                Diagnostic::new(Code::MedianOfNominal, format!("{} of a nominal variable: its categories have no order", layer.kind.quoted()))
                    .with_label(y.name_span, "y is nominal")
                    .with_label(layer.head, "needs ordered values")
                    .with_help(format!("put `{}` on x and show it with `counts`", yvar.name)),
            ),
            (LayerKind::Counts | LayerKind::Histogram | LayerKind::Density, _) => diags.push(y_not_used(layer, y)),
            _ => diags.push(
                Diagnostic::new(Code::YNotNumeric, format!("{} needs an interval or ratio `y`", layer.kind.quoted()))
                    .with_label(y.name_span, format!("y is {}", y.scale.as_str()))
                    .with_label(layer.head, "needs numbers on y")
                    .with_help(if y.scale == Scale::Ordinal { "for ordered ratings use `median`" } else { "choose a numeric y" }),
            ),
        }
    }
    Some(Frame::CatOrd {
        x: x.cat_axis(),
        y: y.cat_axis(),
        layers: out,
    })
}

fn flows_frame(
    book: &Codebook,
    x: &AxisVar,
    y: &AxisVar,
    flows: &RawLayer,
    layers: &[RawLayer],
    diags: &mut Vec<Diagnostic>,
) -> Option<Frame> {
    for other in layers.iter().filter(|l| l.kind != LayerKind::Flows) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!("{} cannot share a figure with `flows`", other.kind.quoted()),
            )
            .with_label(other.head, "does not fit")
            .with_help("draw flows in a figure of their own"),
        );
    }
    let (by, by_span) = flows.by?;
    check_by_subject(book, by, by_span, diags);
    if x.scale != Scale::Ordinal || !book.is_within(x.var) {
        diags.push(
            Diagnostic::new(
                Code::LinesAcrossSubjects,
                "flows need x to be an ordinal within factor (the occasions)",
            )
            .with_label(
                x.name_span,
                "not ordered occasions measured on every subject",
            )
            .with_help("declare the occasions `ordinal levels(...)` and list them under `within`"),
        );
    }
    Some(Frame::Flows {
        x: x.cat_axis(),
        y: y.cat_axis(),
        by,
        span: flows.span,
    })
}

fn check_by_subject(book: &Codebook, by: VarId, by_span: Span, diags: &mut Vec<Diagnostic>) {
    if book.subject != Some(by) {
        let help = match book.subject {
            Some(s) => format!("write `by({})`, the data's subject", book.var(s).name),
            None => format!(
                "declare `subject {}` in data `{}` if it identifies the observational unit",
                book.var(by).name,
                book.name
            ),
        };
        diags.push(
            Diagnostic::new(
                Code::LinesAcrossSubjects,
                format!(
                    "`{}` is not the subject of data `{}`",
                    book.var(by).name,
                    book.name
                ),
            )
            .with_label(by_span, "not the subject")
            .with_help(help),
        );
    }
}

fn cat_num_frame(
    book: &Codebook,
    x: &AxisVar,
    y: &AxisVar,
    layers: &[RawLayer],
    diags: &mut Vec<Diagnostic>,
) -> Option<Frame> {
    let mut out = Vec::new();
    for layer in layers {
        let span = layer.span;
        match layer.kind {
            LayerKind::Points => out.push(CatNumLayer::Points {
                jitter: layer.jitter,
                span,
            }),
            LayerKind::Box => out.push(CatNumLayer::Box {
                whiskers: layer.whiskers,
                span,
            }),
            LayerKind::Violin => out.push(CatNumLayer::Violin {
                bandwidth: layer.bandwidth,
                span,
            }),
            LayerKind::Median => out.push(CatNumLayer::Median {
                error: layer.error.map(|e| e.0),
                span,
            }),
            LayerKind::Mean => {
                check_mean(book, x, y, layer, diags);
                out.push(CatNumLayer::Mean {
                    error: layer.error.map(|e| e.0),
                    bar: layer.bar.is_some(),
                    span,
                });
            }
            LayerKind::Lines => {
                let (by, by_span) = layer.by?;
                check_lines(book, x, by, by_span, diags);
                out.push(CatNumLayer::Lines { by, span });
            }
            LayerKind::Fit => diags.push(
                Diagnostic::new(
                    Code::LayerDoesNotFit,
                    format!(
                        "`fit` needs a numeric x, and `{}` is {}",
                        book.var(x.var).name,
                        x.scale.as_str()
                    ),
                )
                .with_label(x.name_span, format!("x is {}", x.scale.as_str()))
                .with_label(layer.head, "fits a line of y on x")
                .with_help("put an interval or ratio variable on x; to compare groups, use `points` with `box` or `mean`"),
            ),
            LayerKind::Flows => diags.push(
                Diagnostic::new(
                    Code::LayerDoesNotFit,
                    "`flows` needs a categorical y (the states)",
                )
                .with_label(y.name_span, format!("y is {}", y.scale.as_str()))
                .with_help("put the nominal or ordinal state on y"),
            ),
            LayerKind::Counts | LayerKind::Histogram | LayerKind::Density => {
                diags.push(y_not_used(layer, y))
            }
        }
    }
    warn_hidden_data(layers, diags);
    Some(Frame::CatNum {
        x: x.cat_axis(),
        y: y.num_axis(),
        layers: out,
    })
}

fn check_mean(
    book: &Codebook,
    x: &AxisVar,
    y: &AxisVar,
    layer: &RawLayer,
    diags: &mut Vec<Diagnostic>,
) {
    if let (Some(bar), Some(log)) = (layer.bar, y.log_span) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                "a bar from zero cannot be drawn on a log axis",
            )
            .with_label(bar, "bar drawn from zero")
            .with_label(log, "log scale has no zero")
            .with_help("remove `bar` and show the mean as a point, or use a linear scale"),
        );
    }
    if let (Some(bar), Scale::Interval) = (layer.bar, y.scale) {
        diags.push(
            Diagnostic::new(
                Code::BarWithoutZero,
                format!(
                    "a bar from zero is meaningless: `{}` is interval, with no true zero",
                    book.var(y.var).name
                ),
            )
            .with_label(bar, "bar drawn from zero")
            .with_label(y.name_span, "y is interval")
            .with_help("remove `bar` and show the mean as a point with an interval"),
        );
    }
    if let Some((ErrorBar::CiWithin { .. }, span)) = layer.error {
        if !book.is_within(x.var) {
            diags.push(
                Diagnostic::new(Code::WithinIntervalNotWithin, format!("a within-subject interval needs x to be a within factor, and `{}` is not", book.var(x.var).name))
                    .with_label(span, "within-subject interval")
                    .with_label(x.name_span, if book.is_between(x.var) { "a between factor" } else { "not listed under `within`" })
                    .with_help("use `ci(0.95)` to compare groups, or list x under `within` if every subject was measured at every level"),
            );
        } else if book.subject.is_none() {
            diags.push(
                Diagnostic::new(Code::WithinIntervalNotWithin, format!("a within-subject interval needs the data's subject, and data `{}` declares none", book.name))
                    .with_label(span, "within-subject interval")
                    .with_help("add `subject ID` to the data block"),
            );
        }
    }
}

fn check_lines(
    book: &Codebook,
    x: &AxisVar,
    by: VarId,
    by_span: Span,
    diags: &mut Vec<Diagnostic>,
) {
    check_by_subject(book, by, by_span, diags);
    let xvar = book.var(x.var);
    if book.is_between(x.var) {
        diags.push(
            Diagnostic::new(Code::LinesAcrossSubjects, format!("lines would join different subjects: `{}` is a between factor", xvar.name))
                .with_label(x.name_span, "each subject is in one group only")
                .with_help("lines join one subject's values across a within factor; remove `lines` or put a within factor on x"),
        );
    } else if !book.is_within(x.var) && x.scale != Scale::Ordinal {
        diags.push(
            Diagnostic::new(Code::LinesAcrossSubjects, format!("lines need x to be a within factor or an ordinal occasion, and `{}` is neither", xvar.name))
                .with_label(x.name_span, "not listed under `within`")
                .with_help(format!("list `{}` under `within` in data `{}` if every subject was measured at each level", xvar.name, book.name)),
        );
    }
}

/// The two warnings of §4: a mean with nothing that shows spread or values; bars without points.
fn warn_hidden_data(layers: &[RawLayer], diags: &mut Vec<Diagnostic>) {
    let shows_values = |k: LayerKind| {
        matches!(
            k,
            LayerKind::Points | LayerKind::Box | LayerKind::Violin | LayerKind::Lines
        )
    };
    let has_points = layers.iter().any(|l| l.kind == LayerKind::Points);
    for layer in layers.iter().filter(|l| l.kind == LayerKind::Mean) {
        if !layers.iter().any(|l| shows_values(l.kind)) {
            diags.push(
                Diagnostic::new(Code::MeanAlone, "a mean alone hides how the values spread")
                    .with_label(layer.head, "only the mean is shown")
                    .with_help(
                        "add `points`, `box` or `violin` so readers see the distribution and n",
                    ),
            );
        }
        if let (Some(bar), false) = (layer.bar, has_points) {
            diags.push(
                Diagnostic::new(
                    Code::BarWithoutPoints,
                    "bars of means hide the distribution",
                )
                .with_label(bar, "bar without points")
                .with_help("add `points jitter(0.2)` to show the individual values"),
            );
        }
    }
}
