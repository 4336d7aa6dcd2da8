//! `guide`: a reference line (`guide y(0)`) or band (`guide y(10, 20)`) at values the spec
//! gives, across x or y, optionally labelled (`label("normal limit")`). Drawn behind the data.

use crate::diag::{Code, Diagnostic, Span};
use crate::syntax::ast::{Call, Num};

use super::super::terms;
use super::key::{KeyContext, MarkKey};
use super::{Fitted, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "guide",
    draws: "a reference line at a value of x or y, or a band between two values, behind the data, with an optional label",
    options: &[
        OptionDecl::call("x", "x(V) | x(LO, HI)"),
        OptionDecl::call("y", "y(V) | y(LO, HI)"),
        OptionDecl::call("label", "label(\"TEXT\")"),
    ],
    x: XNeed::Either,
    y: YNeed::Any,
    shows: Shows::Reference,
    linear_x: false,
    alone: false,
    read,
};

/// Which axis a guide marks a value of: `x(...)` is a vertical line, `y(...)` a horizontal one.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GuideAxis {
    X,
    Y,
}

impl GuideAxis {
    pub fn word(self) -> &'static str {
        match self {
            GuideAxis::X => "x",
            GuideAxis::Y => "y",
        }
    }
}

/// Options of `guide`.
#[derive(Debug, Clone, PartialEq)]
pub struct GuideOpts {
    pub axis: GuideAxis,
    /// A line at one value, or a band between two (`low < high`), in the axis's units.
    pub low: f64,
    pub high: f64,
    pub label: Option<String>,
    /// The values as written in the spec, for the key ("0", "10 to 20").
    pub written: String,
}

impl GuideOpts {
    /// A band between two values (else a line at one).
    pub fn is_band(&self) -> bool {
        self.low < self.high
    }
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let opts = input.opts;
    let (axis, call) = match (opts.call("x"), opts.call("y")) {
        (Some(x), None) => (GuideAxis::X, x),
        (None, Some(y)) => (GuideAxis::Y, y),
        (Some(x), Some(y)) => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "a guide marks a value of x or of y, not both",
                )
                .with_label(y.span, "across y")
                .with_label(x.span, "across x")
                .with_help("write one `guide` statement for each: `guide x(100)` and `guide y(0)`"),
            );
            return None;
        }
        (None, None) => {
            diags.push(
                Diagnostic::new(Code::MissingStatement, "`guide` needs a value: `x(...)` or `y(...)`")
                    .with_label(input.stmt.head.span, "a guide at which value?")
                    .with_help("write `guide y(0)` for a line across the plot at y = 0, or `guide x(10, 20)` for a band from x = 10 to 20"),
            );
            return None;
        }
    };
    let before = diags.len();
    let values = values(call, diags);
    let label = label(input, diags);
    if let (Some(values), Some(axes)) = (&values, input.axes) {
        check_axis(input, axes, axis, call, values, diags);
    }
    if diags.len() > before {
        return None;
    }
    let values = values?;
    let written = values
        .iter()
        .map(|n| n.text.clone())
        .collect::<Vec<_>>()
        .join(" to ");
    let guide = GuideOpts {
        axis,
        low: values[0].value,
        high: values[values.len() - 1].value,
        label: label?,
        written,
    };
    Some((Layer::Guide(guide), Traits::default()))
}

/// One value (a line) or two in increasing order (a band).
fn values<'a>(call: &'a Call, diags: &mut Vec<Diagnostic>) -> Option<Vec<&'a Num>> {
    let word = &call.name.name;
    let shape = format!("{word}(0)");
    let items = &call.args.items;
    if !(1..=2).contains(&items.len()) {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!(
                    "a guide takes one value (a line) or two (a band), found {}",
                    items.len()
                ),
            )
            .with_label(call.args.span, "here")
            .with_help(format!(
                "write `{word}(0)` for a line, or `{word}(10, 20)` for a band from 10 to 20"
            )),
        );
        return None;
    }
    let nums: Vec<&Num> = items
        .iter()
        .filter_map(|t| terms::expect_num(t, &shape, diags))
        .collect();
    if nums.len() != items.len() {
        return None;
    }
    if let [low, high] = nums[..] {
        if low.value >= high.value {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    format!(
                        "a band runs from a lower to a higher value, found {} then {}",
                        low.text, high.text
                    ),
                )
                .with_label(call.args.span, "not increasing")
                .with_help(format!(
                    "write the lower end first, e.g. `{word}({}, {})`; for a line give one value",
                    high.text, low.text
                )),
            );
            return None;
        }
    }
    Some(nums)
}

/// `label("...")`: `Some(None)` without it.
fn label(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<Option<String>> {
    let Some(c) = input.opts.call("label") else {
        return Some(None);
    };
    let shape = "label(\"normal limit\")";
    let s = terms::single(c, shape, diags).and_then(|t| terms::expect_str(t, shape, diags))?;
    if s.value.trim().is_empty() {
        diags.push(
            Diagnostic::new(Code::BadArgument, "a guide's label needs some text")
                .with_label(s.span, "empty")
                .with_help("write the label, e.g. `label(\"normal limit\")`, or leave it out"),
        );
        return None;
    }
    Some(Some(s.value.clone()))
}

/// The axis must be numeric (a value of a category is not a place on a line), and a log axis
/// has no place for zero or below.
fn check_axis(
    input: &ReadInput,
    axes: Fitted,
    axis: GuideAxis,
    call: &Call,
    values: &[&Num],
    diags: &mut Vec<Diagnostic>,
) {
    let var = match axis {
        GuideAxis::X => Some(axes.x),
        GuideAxis::Y => axes.y,
    };
    let word = axis.word();
    if let Some(var) = var.filter(|v| !v.scale.is_numeric()) {
        let name = &input.book.var(var.var).name;
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!(
                    "a guide across {word} needs a numeric {word}, and `{name}` is {}",
                    var.scale.as_str()
                ),
            )
            .with_label(call.span, "a value on a number line")
            .with_label(var.name_span, format!("{word} is {}", var.scale.as_str()))
            .with_help("a guide marks a number on an interval or ratio axis, and categories have no place between them: put the guide on the figure's numeric axis, or remove it"),
        );
        return;
    }
    let log: Option<Span> = var.and_then(|v| v.log_span);
    if let (Some(log), Some(n)) = (log, values.iter().find(|n| n.value <= 0.0)) {
        diags.push(
            Diagnostic::new(
                Code::LayerDoesNotFit,
                format!("a log axis has no place for {}", n.text),
            )
            .with_label(n.span, "zero or below")
            .with_label(log, "log scale")
            .with_help("give a positive value, or use a linear scale"),
        );
    }
}

/// A labelled guide says what it is on the figure; an unlabelled one is named in the key.
pub fn key(opts: &GuideOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    if opts.label.is_some() {
        return None;
    }
    let axis = opts.axis.word();
    Some(if opts.is_band() {
        MarkKey::new("Shaded band", format!("{axis} from {}", opts.written))
    } else {
        MarkKey::new("Dashed line", format!("{axis} = {}", opts.written))
    })
}
