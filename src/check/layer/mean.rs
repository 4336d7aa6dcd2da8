//! `mean`: the mean of each cell, as a dot or a bar from zero, with an optional error bar; on a
//! log y axis, the geometric mean with intervals computed on the logs.

use crate::diag::{Code, Diagnostic, Span};

use super::super::plan::{ErrorBar, Scale};
use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Fitted, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "mean",
    draws: "the mean of each cell as a dot (or a bar from zero), with an error bar",
    options: &[
        OptionDecl::flag("bar"),
        OptionDecl::call(
            "error",
            "error(sd | se | ci(L) | ci(L, within) | boot(L) | boot(L, bca))",
        ),
    ],
    x: XNeed::Categories,
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
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let error = options::error_bar(input.opts, &["sd", "se", "ci", "boot"], diags).ok()?;
    let bar = input.opts.flag("bar").map(|f| f.span);
    let before = diags.len();
    if let Some(axes) = input.axes {
        check_bar(input, axes, bar, diags);
        check_within(input, axes, error, diags);
    }
    if diags.len() > before {
        return None;
    }
    let within = matches!(error, Some((ErrorBar::CiWithin { .. }, _)));
    let opts = MeanOpts {
        error: error.map(|(e, _)| e),
        bar: bar.is_some(),
    };
    let traits = Traits {
        one_value_per_subject: within,
        needs_spread: true,
        needs_points: bar,
        ..Traits::default()
    };
    Some((Layer::Mean(opts), traits))
}

/// A bar from zero needs a y with a true zero (F0112) on a linear axis.
fn check_bar(input: &ReadInput, axes: Fitted, bar: Option<Span>, diags: &mut Vec<Diagnostic>) {
    let (Some(bar), Some(y)) = (bar, axes.y) else {
        return;
    };
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

/// The mean's dot (and bar), with its error bar; a within-subject interval uses complete
/// subjects only.
pub fn key(opts: &MeanOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let marks = if opts.bar {
        "Bars and large dots"
    } else {
        "Large dots"
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
