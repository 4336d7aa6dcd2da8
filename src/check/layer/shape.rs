//! Fitting a layer to the figure's axes: one generic function reads what the layer's
//! declaration needs on x and y and reports the rule a mismatch breaks (§8).
//!
//! The order of the checks decides which rule is named when several are broken: a `y` the
//! layer cannot use (or lacks) first, then the scale of y, then the scale of x, then a log x
//! under a layer of equal-width bins or kernels.

use crate::diag::{Code, Diagnostic, Span};

use super::super::axes::{not_categorical, AxisVar};
use super::super::plan::{Codebook, Scale};
use super::{LayerDecl, Refusal, XNeed, YNeed};

/// Whether `decl` fits x and y; every rule it breaks is reported.
pub fn fits(
    decl: &LayerDecl,
    head: Span,
    book: &Codebook,
    x: &AxisVar,
    y: Option<&AxisVar>,
    diags: &mut Vec<Diagnostic>,
) -> bool {
    let problem = match (decl.y, y) {
        (YNeed::None { what }, Some(y)) => Some(y_not_used(decl, head, y, what)),
        (YNeed::None { .. } | YNeed::Any, None) => x_problem(decl, head, book, x, false),
        (_, None) => Some(y_missing(decl, head)),
        (_, Some(y)) if !decl.takes_y(y.scale) => Some(y_problem(decl, head, book, y)),
        (_, Some(_)) => x_problem(decl, head, book, x, true),
    }
    .or_else(|| log_problem(decl, head, x));
    match problem {
        Some(d) => {
            diags.push(d);
            false
        }
        None => true,
    }
}

fn y_missing(decl: &LayerDecl, head: Span) -> Diagnostic {
    Diagnostic::new(
        Code::YMissing,
        format!("{} needs a `y` variable", decl.quoted()),
    )
    .with_label(head, "shows values on y")
    .with_help("add `y VARIABLE` naming the measure to show")
}

fn y_not_used(decl: &LayerDecl, head: Span, y: &AxisVar, what: &str) -> Diagnostic {
    Diagnostic::new(
        Code::YNotUsed,
        format!("{} has no `y`: {what}", decl.quoted()),
    )
    .with_label(head, "draws its own heights")
    .with_label(y.name_span, "y given here")
    .with_help("remove `y`, or choose a layer that shows y values (points, box, mean, ...)")
}

/// A y of a scale the layer cannot show.
fn y_problem(decl: &LayerDecl, head: Span, book: &Codebook, y: &AxisVar) -> Diagnostic {
    let name = &book.var(y.var).name;
    let scale = y.scale.as_str();
    let refusal = match decl.y {
        YNeed::Numbers { refusal } | YNeed::NumbersOrOrdinal { refusal } => refusal,
        YNeed::Categories => {
            return Diagnostic::new(
                Code::LayerDoesNotFit,
                format!("{} needs a nominal or ordinal y", decl.quoted()),
            )
            .with_label(y.name_span, format!("y is {scale}"))
            .with_help("put the nominal or ordinal state on y");
        }
        YNeed::None { .. } | YNeed::Any => Refusal::Numbers,
    };
    match (refusal, y.scale) {
        (Refusal::Mean, Scale::Nominal | Scale::Ordinal) => Diagnostic::new(
            Code::MeanOfCategories,
            format!("a mean of `{name}` treats {scale} categories as numbers"),
        )
        .with_label(y.name_span, format!("y is {scale}"))
        .with_label(head, "needs equal intervals")
        .with_help(if y.scale == Scale::Ordinal {
            "use `median`, or declare the variable `interval` if equal spacing of its levels is defensible"
        } else {
            "nominal categories have no order and no mean; show them with `counts`"
        }),
        (Refusal::Order, Scale::Nominal) => Diagnostic::new(
            Code::MedianOfNominal,
            format!(
                "{} of a nominal variable: its categories have no order",
                decl.quoted()
            ),
        )
        .with_label(y.name_span, "y is nominal")
        .with_label(head, "needs ordered values")
        .with_help(format!("put `{name}` on x and show it with `counts`")),
        _ => Diagnostic::new(
            Code::YNotNumeric,
            format!("{} needs an interval or ratio `y`", decl.quoted()),
        )
        .with_label(y.name_span, format!("y is {scale}"))
        .with_label(head, "needs numbers on y")
        .with_help(if y.scale == Scale::Ordinal {
            "for ordered ratings use `median`"
        } else {
            "choose a numeric y"
        }),
    }
}

/// An x of a kind the layer cannot use; `with_y` tells layers over y from layers over x alone.
fn x_problem(
    decl: &LayerDecl,
    head: Span,
    book: &Codebook,
    x: &AxisVar,
    with_y: bool,
) -> Option<Diagnostic> {
    let categorical = x.scale.is_categorical();
    let scale = x.scale.as_str();
    let name = &book.var(x.var).name;
    match (decl.x, categorical, with_y) {
        (XNeed::Either, ..) | (XNeed::Categories, true, _) | (XNeed::Numbers, false, _) => None,
        (XNeed::Numbers, true, false) => Some(
            Diagnostic::new(
                Code::HistogramOfCategories,
                format!("{} needs an interval or ratio variable", decl.quoted()),
            )
            .with_label(x.name_span, format!("x is {scale}"))
            .with_label(head, "needs numbers on x")
            .with_help("use `counts` to show how many rows fall in each level"),
        ),
        (XNeed::Numbers, true, true) => Some(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!("{} needs a numeric x, and `{name}` is {scale}", decl.quoted()),
            )
            .with_label(x.name_span, format!("x is {scale}"))
            .with_label(head, "works along a numeric x")
            .with_help("put an interval or ratio variable on x; to compare groups, use `points` with `box` or `mean`"),
        ),
        (XNeed::Categories, false, false) => Some(
            Diagnostic::new(
                Code::CountsOfNumbers,
                format!("{} needs a nominal or ordinal variable", decl.quoted()),
            )
            .with_label(x.name_span, format!("x is {scale}"))
            .with_label(head, "counts categories")
            .with_help("use `histogram` to show the distribution of a numeric variable"),
        ),
        (XNeed::Categories, false, true) => Some(
            not_categorical(
                book.var(x.var),
                x.name_span,
                &format!("{} groups by x and", decl.quoted()),
            )
            .with_label(head, "needs categories on x"),
        ),
    }
}

/// A log x under a layer whose bins or kernels have one width in data units.
fn log_problem(decl: &LayerDecl, head: Span, x: &AxisVar) -> Option<Diagnostic> {
    let log = x.log_span.filter(|_| decl.linear_x)?;
    Some(
        Diagnostic::new(
            Code::LayerDoesNotFit,
            format!(
                "{} works in equal steps of x, which a log axis would distort",
                decl.quoted()
            ),
        )
        .with_label(log, "log scale")
        .with_label(head, "bins and kernels have one width in data units")
        .with_help("remove `scale(log)`; to show a skewed ratio variable, a log scale suits `points` against another variable"),
    )
}
