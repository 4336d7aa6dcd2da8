//! `difference from("LEVEL")`: each level's mean difference from a reference level of x, with
//! its interval, on an axis of its own under the data — paired when x is a within factor of
//! the data's subjects, Welch's otherwise.

use crate::diag::{Code, Diagnostic, Span};

use super::super::plan::ErrorBar;
use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Fitted, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "difference",
    draws: "each level's mean difference from a reference level of x, with its interval (paired or Welch), on an axis of its own under the data",
    options: &[
        OptionDecl::call("from", "from(\"LEVEL\")"),
        OptionDecl::call("error", "error(ci(L))"),
        OptionDecl::flag("dots"),
    ],
    x: XNeed::Categories,
    y: YNeed::Numbers {
        refusal: Refusal::Mean,
    },
    shows: Shows::Comparison,
    linear_x: false,
    alone: false,
    read,
};

/// The interval level without `error(...)`.
const DEFAULT_LEVEL: f64 = 0.95;

/// Options of `difference`.
#[derive(Debug, Clone, PartialEq)]
pub struct DifferenceOpts {
    /// The reference level of x: its name in the data and its display text.
    pub reference: String,
    pub reference_label: String,
    /// The interval's level.
    pub level: f64,
    /// x is a within factor of the data's subjects: each subject's own differences are used.
    pub paired: bool,
    /// Each subject's difference is drawn as a dot (paired only).
    pub dots: bool,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let level = interval_level(input, diags);
    let dots = input.opts.flag("dots").map(|f| f.span);
    let Some(from) = input.opts.call("from") else {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                "`difference` needs the level to compare with",
            )
            .with_label(input.stmt.head.span, "difference from which level?")
            .with_help("write `difference from(\"LEVEL\")`, naming the reference level of x"),
        );
        return None;
    };
    let axes = input.axes?;
    let reference = reference_level(input, axes, from, diags);
    let paired = paired(input, axes, dots, diags);
    let log = log_axis(axes, diags);
    let (level, (reference, reference_label), paired) = (level?, reference?, paired?);
    log?;
    let opts = DifferenceOpts {
        reference,
        reference_label,
        level,
        paired,
        dots: dots.is_some(),
    };
    let traits = Traits {
        one_value_per_subject: paired,
        ..Traits::default()
    };
    Some((Layer::Difference(opts), traits))
}

/// `error(ci(L))`, or the default level; the design, not the option, decides the interval.
fn interval_level(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    match options::error_bar(input.opts, &["ci"], diags).ok()? {
        None => Some(DEFAULT_LEVEL),
        Some((ErrorBar::Ci { level }, _)) => Some(level),
        Some((_, span)) => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "the design chooses a difference's interval: paired for a within factor, Welch's otherwise",
                )
                .with_label(span, "an interval kind")
                .with_help("write `error(ci(0.95))`"),
            );
            None
        }
    }
}

/// The reference level: one of x's declared levels, and not its only one.
fn reference_level(
    input: &ReadInput,
    axes: Fitted,
    from: &crate::syntax::ast::Call,
    diags: &mut Vec<Diagnostic>,
) -> Option<(String, String)> {
    let x = input.book.var(axes.x.var);
    let Some(levels) = &x.levels else {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!("`{}` has no declared levels to compare with", x.name),
            )
            .with_label(from.span, "reference level")
            .with_label(x.span, "levels not declared")
            .with_help("add `levels(...)` to the declaration so the reference level is checked"),
        );
        return None;
    };
    let shape = "from(\"LEVEL\")";
    let unknown = |name: &str| format!("\"{name}\" is not a level of `{}`", x.name);
    let (index, span) = options::declared_level(from, levels, shape, unknown, diags)?;
    if levels.len() < 2 {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!(
                    "`{}` has one level only: there is nothing to compare with it",
                    x.name
                ),
            )
            .with_label(span, "the only level")
            .with_label(x.span, "declared with one level")
            .with_help("a difference needs x to have a second level"),
        );
        return None;
    }
    let label = x
        .labels
        .as_ref()
        .and_then(|l| l.get(index))
        .unwrap_or(&levels[index]);
    Some((levels[index].clone(), label.clone()))
}

/// Whether the differences are paired: x a within factor of the data's subjects. Each
/// subject's dots need pairs.
fn paired(
    input: &ReadInput,
    axes: Fitted,
    dots: Option<Span>,
    diags: &mut Vec<Diagnostic>,
) -> Option<bool> {
    let book = input.book;
    let x = axes.x;
    let within = book.is_within(x.var);
    if within && book.subject.is_none() {
        diags.push(
            Diagnostic::new(
                Code::WithinIntervalNotWithin,
                format!(
                    "paired differences need the data's subject, and data `{}` declares none",
                    book.name
                ),
            )
            .with_label(input.stmt.head.span, "differences within subjects")
            .with_label(x.name_span, "a within factor")
            .with_help("add `subject ID` to the data block"),
        );
        return None;
    }
    if let (Some(dots), false) = (dots, within) {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!(
                    "each subject's difference needs paired values, and `{}` is not a within factor",
                    book.var(x.var).name
                ),
            )
            .with_label(dots, "one dot per subject")
            .with_label(x.name_span, "groups of different subjects")
            .with_help("remove `dots`: between groups only the means are compared (Welch)"),
        );
        return None;
    }
    Some(within)
}

/// A difference of means is drawn on a linear axis.
fn log_axis(axes: Fitted, diags: &mut Vec<Diagnostic>) -> Option<()> {
    let Some(log) = axes.y.and_then(|y| y.log_span) else {
        return Some(());
    };
    diags.push(
        Diagnostic::new(
            Code::LayerDoesNotFit,
            "a difference of means is not drawn on a log axis",
        )
        .with_label(log, "log scale")
        .with_help(
            "remove `scale(log)`; on a log scale, levels compare as ratios, not differences",
        ),
    );
    None
}

/// The lower panel: each level's difference from the reference, with its interval.
pub fn key(opts: &DifferenceOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let level = key::percent(opts.level);
    let meaning = if opts.paired {
        let mut m = format!(
            "mean difference from {} within {}, {level} CI (paired t)",
            opts.reference_label,
            ctx.subjects()
        );
        if opts.dots {
            m.push_str(&format!(
                "; small dots: each {}'s difference",
                ctx.subject()
            ));
        }
        m
    } else {
        format!(
            "difference of means from {}, {level} CI (Welch)",
            opts.reference_label
        )
    };
    Some(MarkKey::new("Below the data", meaning))
}
