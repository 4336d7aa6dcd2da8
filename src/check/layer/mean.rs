//! `mean`: the mean of each cell, as a dot or a bar from zero, with an optional error bar; on a
//! log y axis, the geometric mean with intervals computed on the logs. Over a numeric x, the
//! mean at each distinct x value (occasions shared by the data). `join` joins each colour
//! group's means in x order, which needs an x whose levels have an order (F0125).

use crate::diag::{Code, Diagnostic, Span};

use super::super::plan::{ErrorBar, LevelOrder, Scale};
use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Fitted, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "mean",
    draws: "the mean of each cell (over a numeric x, at each x value) as a dot or a bar from zero, with an error bar; `join` joins each colour group's means in x order",
    options: &[
        OptionDecl::flag("bar"),
        OptionDecl::flag("join"),
        OptionDecl::call(
            "error",
            "error(sd | se | ci(L) | ci(L, within) | boot(L) | boot(L, bca))",
        ),
    ],
    x: XNeed::Either,
    y: YNeed::Numbers {
        refusal: Refusal::Mean,
    },
    shows: Shows::Estimate,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `mean`.
#[derive(Debug, Clone, PartialEq)]
pub struct MeanOpts {
    pub error: Option<ErrorBar>,
    /// Drawn as a bar from zero (under the dot).
    pub bar: bool,
    /// Each colour group's means joined by a line, in x order.
    pub join: bool,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let error = options::error_bar(input.opts, &["sd", "se", "ci", "boot"], diags).ok()?;
    let bar = input.opts.flag("bar").map(|f| f.span);
    let join = input.opts.flag("join").map(|f| f.span);
    let before = diags.len();
    if let (Some(bar), Some(join)) = (bar, join) {
        diags.push(
            Diagnostic::new(Code::BadArgument, "give either `bar` or `join`, not both")
                .with_label(join, "a line over bars")
                .with_label(bar, "bars from zero")
                .with_help("a line across the tops of bars reads as a second measure: show the means as joined dots (`join`), or as bars without a line"),
        );
    }
    if let Some(axes) = input.axes {
        check_bar(input, axes, bar, diags);
        check_within(input, axes, error, diags);
        if let Some(join) = join {
            check_join(input, axes, join, diags);
        }
    }
    if diags.len() > before {
        return None;
    }
    let within = matches!(error, Some((ErrorBar::CiWithin { .. }, _)));
    let opts = MeanOpts {
        error: error.map(|(e, _)| e),
        bar: bar.is_some(),
        join: join.is_some(),
    };
    let traits = Traits {
        one_value_per_subject: within,
        needs_spread: true,
        needs_points: bar,
        x_occasions: input.axes.is_some_and(|a| a.x.scale.is_numeric()),
        ..Traits::default()
    };
    Some((Layer::Mean(opts), traits))
}

/// A bar from zero needs a y with a true zero (F0112) on a linear axis, and categories on x.
fn check_bar(input: &ReadInput, axes: Fitted, bar: Option<Span>, diags: &mut Vec<Diagnostic>) {
    let (Some(bar), Some(y)) = (bar, axes.y) else {
        return;
    };
    if axes.x.scale.is_numeric() {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                "bars of means need categories on x, and x is numeric",
            )
            .with_label(bar, "bar drawn from zero")
            .with_label(axes.x.name_span, format!("x is {}", axes.x.scale.as_str()))
            .with_help("remove `bar`: over a numeric x the means are dots at their x values, joined with `join`"),
        );
    }
    if let Some(log) = y.log_span {
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
    if y.scale == Scale::Interval {
        diags.push(
            Diagnostic::new(
                Code::BarWithoutZero,
                format!(
                    "a bar from zero is meaningless: `{}` is interval, with no true zero",
                    input.book.var(y.var).name
                ),
            )
            .with_label(bar, "bar drawn from zero")
            .with_label(y.name_span, "y is interval")
            .with_help("remove `bar` and show the mean as a point with an interval"),
        );
    }
}

/// A within-subject interval needs x to be a within factor and the data's subject (F0110).
fn check_within(
    input: &ReadInput,
    axes: Fitted,
    error: Option<(ErrorBar, Span)>,
    diags: &mut Vec<Diagnostic>,
) {
    let Some((ErrorBar::CiWithin { .. }, span)) = error else {
        return;
    };
    let (book, x) = (input.book, axes.x);
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

/// Joined means need x levels in a meaningful order (F0125): a numeric or ordinal x, or a
/// within factor whose levels the data block declares (its levels are then the occasions or
/// conditions in the order the design gives them), shown in that order.
fn check_join(input: &ReadInput, axes: Fitted, join: Span, diags: &mut Vec<Diagnostic>) {
    let (book, x) = (input.book, axes.x);
    let var = book.var(x.var);
    if let Some((_, order)) = x.order.filter(|(o, _)| *o != LevelOrder::Levels) {
        diags.push(
            Diagnostic::new(
                Code::JoinWithoutOrder,
                format!(
                    "joined means follow the order of `{}`'s levels, and `order(...)` changes it",
                    var.name
                ),
            )
            .with_label(join, "joins the means in x order")
            .with_label(order, "reorders x")
            .with_help("remove `order(...)` to keep the declared order, or remove `join`"),
        );
        return;
    }
    let declared_within = book.is_within(x.var) && var.levels.is_some();
    if x.scale != Scale::Nominal || declared_within {
        return;
    }
    let why = if book.is_within(x.var) {
        "nominal, its levels in the order the data list them"
    } else {
        "nominal: its levels have no order"
    };
    diags.push(
        Diagnostic::new(Code::JoinWithoutOrder, format!("a line joining the means across `{}` would imply an order its levels do not have", var.name))
            .with_label(join, "joins the means in x order")
            .with_label(x.name_span, why)
            .with_help(if book.is_within(x.var) {
                format!("declare the order of `{}`'s levels with `levels(...)` in data `{}`, or remove `join`", var.name, book.name)
            } else {
                format!("remove `join`, or declare `{}` ordinal if its levels are ordered (doses, occasions)", var.name)
            }),
    );
}

/// The mean's dot (and bar), with its error bar; a within-subject interval uses complete
/// subjects only.
pub fn key(opts: &MeanOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let marks = match (opts.bar, opts.join) {
        (true, _) => "Bars and large dots",
        (false, true) => "Large dots joined by lines",
        (false, false) => "Large dots",
    };
    // On a log axis the mean is geometric: computed on the logs, intervals back-transformed.
    let mut key = if ctx.y_log {
        let mut meaning = key::with_error("geometric mean", opts.error);
        if opts.error.is_some() {
            meaning.push_str(", from the logs");
        }
        MarkKey::new(marks, meaning)
    } else {
        MarkKey::new(marks, key::with_error("mean", opts.error))
    };
    key.complete_subjects = matches!(opts.error, Some(ErrorBar::CiWithin { .. }));
    Some(key)
}
