//! `stack`: the share of each level of a categorical y at each level of x, as 100% stacked
//! bars in level order; `stack diverging` centres them on the neutral level of an ordinal y.

use crate::diag::{Code, Diagnostic};

use super::super::plan::Scale;
use super::key::{KeyContext, MarkKey};
use super::{Fitted, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "stack",
    draws: "100% stacked bars of the levels of y at each level of x, in level order; `diverging` centres them on the neutral level",
    options: &[OptionDecl::flag("diverging")],
    x: XNeed::Categories,
    y: YNeed::Categories,
    shows: Shows::Distribution,
    linear_x: false,
    alone: true,
    read,
};

/// Options of `stack`.
#[derive(Debug, Clone, PartialEq)]
pub struct StackOpts {
    /// `diverging`: the neutral level of y (its index among the declared levels), on which the
    /// bars are centred.
    pub diverging: Option<usize>,
    /// The neutral level's display text, and y's title, for the key.
    pub midpoint_label: Option<String>,
    pub y_title: String,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let y_title = input
        .axes
        .and_then(|a| a.y)
        .map(|y| {
            let var = input.book.var(y.var);
            y.title
                .clone()
                .or(var.label.clone())
                .unwrap_or(var.name.clone())
        })
        .unwrap_or_default();
    let mut opts = StackOpts {
        diverging: None,
        midpoint_label: None,
        y_title,
    };
    if let (Some(flag), Some(axes)) = (input.opts.flag("diverging"), input.axes) {
        let midpoint = midpoint(input, axes, flag.span, diags)?;
        let y = input.book.var(axes.y?.var);
        let label = y.labels.as_ref().and_then(|l| l.get(midpoint));
        let name = y.levels.as_ref().and_then(|l| l.get(midpoint));
        opts.midpoint_label = label.or(name).cloned();
        opts.diverging = Some(midpoint);
    }
    Some((Layer::Stack(opts), Traits::default()))
}

/// The neutral level `diverging` centres on: the `midpoint(...)` of an ordinal y.
fn midpoint(
    input: &ReadInput,
    axes: Fitted,
    flag: crate::diag::Span,
    diags: &mut Vec<Diagnostic>,
) -> Option<usize> {
    let y = axes.y?;
    let var = input.book.var(y.var);
    if let (Scale::Ordinal, Some(m)) = (y.scale, var.midpoint) {
        return Some(m);
    }
    let (message, help) = if y.scale == Scale::Ordinal {
        (
            format!("`{}` declares no neutral level to centre the bars on", var.name),
            format!(
                "add `midpoint(\"...\")` naming the neutral level to the declaration of `{}`, or remove `diverging`",
                var.name
            ),
        )
    } else {
        (
            format!(
                "`{}` is nominal: its levels have no middle to centre on",
                var.name
            ),
            "remove `diverging`: the bars of a nominal variable stack from zero".to_string(),
        )
    };
    diags.push(
        Diagnostic::new(Code::LayerDoesNotFit, message)
            .with_label(flag, "centred on the neutral level")
            .with_label(var.span, "declared here")
            .with_help(help),
    );
    None
}

/// Stacked bars of percentages.
pub fn key(opts: &StackOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    let y = &opts.y_title;
    let meaning = match &opts.midpoint_label {
        Some(m) => format!(
            "percent of each level of {y}, centred on the neutral level ({m}): lower levels below zero, higher above"
        ),
        None => format!("percent of each level of {y}, the first at the bottom"),
    };
    Some(MarkKey::new("Bars", meaning))
}
