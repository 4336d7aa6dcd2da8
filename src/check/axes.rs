//! The figure's axes: reading `x` and `y` with their options, and choosing the shape of the
//! figure from the scales of their variables ([`Axes`]).

use crate::diag::{Code, Diagnostic, Span};
use crate::syntax::ast::{Call, Plain, Term};

use super::codebook::resolve;
use super::plan::{
    Axes, AxisScale, CatAxis, CatVar, Codebook, LevelOrder, NumAxis, NumVar, Scale, Variable,
};
use super::terms::{self, Accepts};

/// The options of `x` and `y` after the variable, in canonical order.
pub const AXIS_OPTIONS: &[&str] = &["label", "range", "scale", "order"];

/// A variable named by `x` or `y`, with its axis options, before the frame decides its role.
#[derive(Debug, Clone)]
pub struct AxisVar {
    pub var: super::plan::VarId,
    pub scale: Scale,
    pub name_span: Span,
    pub title: Option<String>,
    pub range: Option<(f64, f64)>,
    pub log_span: Option<Span>,
    pub order: Option<(LevelOrder, Span)>,
}

impl AxisVar {
    pub fn cat_axis(&self) -> CatAxis {
        CatAxis {
            var: CatVar {
                var: self.var,
                ordered: self.scale == Scale::Ordinal,
                span: self.name_span,
            },
            title: self.title.clone(),
            order: self.order.map_or(LevelOrder::Levels, |(o, _)| o),
        }
    }

    pub fn num_axis(&self) -> NumAxis {
        NumAxis {
            var: NumVar {
                var: self.var,
                ratio: self.scale == Scale::Ratio,
                span: self.name_span,
            },
            title: self.title.clone(),
            range: self.range,
            scale: if self.log_span.is_some() {
                AxisScale::Log
            } else {
                AxisScale::Linear
            },
            scale_span: self.log_span,
        }
    }
}

pub fn axis_var(book: &Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<AxisVar> {
    let axis = p.head.name.as_str();
    let Some(Term::Word(name)) = p.terms.first() else {
        diags.push(
            Diagnostic::new(Code::BadArgument, format!("`{axis}` needs a variable"))
                .with_label(p.head.span, "which variable?")
                .with_help(format!("write `{axis} VARIABLE`")),
        );
        return None;
    };
    let id = resolve(book, name, diags)?;
    let var = book.var(id);
    let accepts = Accepts::calls("an axis", AXIS_OPTIONS);
    let opts = terms::options(&p.terms[1..], &accepts, diags);
    let mut out = AxisVar {
        var: id,
        scale: var.scale,
        name_span: name.span,
        title: None,
        range: None,
        log_span: None,
        order: None,
    };
    if let Some(c) = opts.call("label") {
        let shape = "label(\"Axis title\")";
        out.title = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_str(t, shape, diags))
            .map(|s| super::display::text(s, diags));
    }
    if let Some(c) = opts.call("range") {
        out.range = range(c, var.scale, diags);
    }
    if let Some(c) = opts.call("scale") {
        let shape = "scale(log)";
        let choice = terms::single(c, shape, diags)
            .and_then(|t| terms::expect_choice(t, &["linear", "log"], shape, diags));
        if let Some(w) = choice {
            if w.name == "log" {
                out.log_span = log_allowed(var, c.span, diags).then_some(c.span);
            }
        }
    }
    if let Some(c) = opts.call("order") {
        out.order = order(var, c, diags).map(|o| (o, c.span));
    }
    if let (Some(log), Some((lo, _))) = (out.log_span, out.range) {
        if lo <= 0.0 {
            diags.push(
                Diagnostic::new(Code::BadArgument, "a log axis cannot reach zero or below")
                    .with_label(log, "log scale")
                    .with_label(
                        opts.call("range").map_or(log, |c| c.span),
                        "range starts at or below zero",
                    )
                    .with_help("start the range above zero, e.g. `range(1, 1000)`"),
            );
            out.range = None;
        }
    }
    Some(out)
}

fn range(c: &Call, scale: Scale, diags: &mut Vec<Diagnostic>) -> Option<(f64, f64)> {
    let shape = "range(0, 100)";
    if !scale.is_numeric() {
        diags.push(
            Diagnostic::new(Code::BadArgument, "`range` applies to a numeric axis")
                .with_label(c.span, "on a categorical axis")
                .with_help("remove `range(...)`; a categorical axis shows its levels"),
        );
        return None;
    }
    let args = terms::arity(c, 2, shape, diags)?;
    let lo = terms::expect_num(&args[0], shape, diags)?;
    let hi = terms::expect_num(&args[1], shape, diags)?;
    if lo.value >= hi.value {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "the range's low end is not below its high end",
            )
            .with_label(c.args.span, "empty range")
            .with_help("write the lower limit first, e.g. `range(0, 100)`"),
        );
        return None;
    }
    Some((lo.value, hi.value))
}

fn log_allowed(var: &Variable, span: Span, diags: &mut Vec<Diagnostic>) -> bool {
    match var.scale {
        Scale::Ratio => true,
        Scale::Interval => {
            diags.push(
                Diagnostic::new(Code::LogOfInterval, format!("a log scale needs a true zero, and `{}` is interval", var.name))
                    .with_label(span, "log scale")
                    .with_label(var.span, "declared interval here")
                    .with_help("ratios of interval values mean nothing; use a linear scale, or declare the variable `ratio` if it has a true zero"),
            );
            false
        }
        _ => {
            diags.push(
                Diagnostic::new(
                    Code::LogOfInterval,
                    "a log scale applies to numeric variables only",
                )
                .with_label(span, "log scale on a categorical axis")
                .with_help("remove `scale(log)`"),
            );
            false
        }
    }
}

fn order(var: &Variable, c: &Call, diags: &mut Vec<Diagnostic>) -> Option<LevelOrder> {
    let shape = "order(count)";
    let w = terms::single(c, shape, diags)
        .and_then(|t| terms::expect_choice(t, &["levels", "count", "name"], shape, diags))?;
    let order = match w.name.as_str() {
        "count" => LevelOrder::Count,
        "name" => LevelOrder::Name,
        _ => LevelOrder::Levels,
    };
    if var.scale == Scale::Ordinal && order != LevelOrder::Levels {
        diags.push(
            Diagnostic::new(Code::OrdinalReordered, "an ordinal axis keeps the order of its levels")
                .with_label(c.span, "reorders an ordinal axis")
                .with_help(format!("`{}` is ordinal: remove `order(...)`, or declare it nominal if its levels have no order", var.name)),
        );
        return None;
    }
    if !var.scale.is_categorical() {
        diags.push(
            Diagnostic::new(Code::BadArgument, "`order` applies to a categorical axis")
                .with_label(c.span, "on a numeric axis")
                .with_help("remove `order(...)`"),
        );
        return None;
    }
    Some(order)
}

/// Rule 6: a grouping or categorical role on a numeric variable or an id.
pub fn not_categorical(var: &Variable, span: Span, role: &str) -> Diagnostic {
    let why = if var.scale == Scale::Id {
        "an id names observational units; it is never a category to compare".to_string()
    } else {
        format!(
            "`{}` is {}: its values are numbers, not categories",
            var.name,
            var.scale.as_str()
        )
    };
    Diagnostic::new(
        Code::NotCategorical,
        format!("{role} needs a nominal or ordinal variable"),
    )
    .with_label(span, format!("declared {}", var.scale.as_str()))
    .with_label(var.span, "declared here")
    .with_help(format!("{why}; choose a nominal or ordinal variable"))
}

/// The shape of the figure from the scales of x and y, or the rule they break together.
///
/// An id is never on an axis, and a numeric x takes only a numeric y; which layers fit the
/// shape is decided per layer ([`super::layer::shape`]).
pub fn axes(
    book: &Codebook,
    x: &AxisVar,
    y: Option<&AxisVar>,
    diags: &mut Vec<Diagnostic>,
) -> Option<Axes> {
    if x.scale == Scale::Id {
        diags.push(not_categorical(book.var(x.var), x.name_span, "an axis"));
        return None;
    }
    let Some(y) = y else {
        return Some(if x.scale.is_categorical() {
            Axes::Cat { x: x.cat_axis() }
        } else {
            Axes::Num { x: x.num_axis() }
        });
    };
    match (x.scale.is_categorical(), y.scale) {
        (true, Scale::Id) => {
            diags.push(
                Diagnostic::new(Code::YNotNumeric, "an id is never a measure")
                    .with_label(y.name_span, "y is an id")
                    .with_help("put a measured variable on y"),
            );
            None
        }
        (true, s) if s.is_numeric() => Some(Axes::CatNum {
            x: x.cat_axis(),
            y: y.num_axis(),
        }),
        (true, _) => Some(Axes::CatCat {
            x: x.cat_axis(),
            y: y.cat_axis(),
        }),
        (false, s) if s.is_numeric() => Some(Axes::NumNum {
            x: x.num_axis(),
            y: y.num_axis(),
        }),
        (false, _) => {
            diags.push(
                Diagnostic::new(
                    Code::LayerDoesNotFit,
                    "with a numeric x, y must be numeric too",
                )
                .with_label(y.name_span, format!("y is {}", y.scale.as_str()))
                .with_help("put the categorical variable on x and the numeric one on y"),
            );
            None
        }
    }
}
