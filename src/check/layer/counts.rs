//! `counts`: how many rows fall in each level of a categorical x, with an optional Wilson
//! interval for each level's percentage.

use crate::diag::{Code, Diagnostic};

use super::super::plan::{ErrorBar, Heights};
use super::key::{KeyContext, MarkKey};
use super::{options, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "counts",
    draws: "a bar per level: how many rows fall in it (as a percentage, with its interval)",
    options: &[
        OptionDecl::call("heights", "heights(count | percent)"),
        OptionDecl::call("error", "error(ci(L))"),
    ],
    x: XNeed::Categories,
    y: YNeed::None {
        what: "it counts rows of x",
    },
    shows: Shows::Counts,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `counts`.
#[derive(Debug, Clone, PartialEq)]
pub struct CountsOpts {
    pub heights: Heights,
    /// The level of the Wilson interval of each percentage; only with `heights(percent)`.
    pub ci: Option<f64>,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let heights = match input.opts.call("heights") {
        None => Heights::Count,
        Some(_) => options::heights(input.opts, &["count", "percent"], diags)?,
    };
    let error = options::error_bar(input.opts, &["ci"], diags).ok()?;
    let ci = match error {
        None => None,
        Some((ErrorBar::Ci { level }, _)) if heights == Heights::Percent => Some(level),
        Some((_, span)) => {
            let (message, help) = match error {
                Some((ErrorBar::Ci { .. }, _)) => (
                    "an interval of a count needs the count as a proportion of its group",
                    "write `counts heights(percent) error(ci(0.95))`: each bar shows the percentage with its Wilson interval",
                ),
                _ => (
                    "a proportion has no within-subject interval here",
                    "write `error(ci(0.95))` for the Wilson interval of each percentage",
                ),
            };
            diags.push(
                Diagnostic::new(Code::BadArgument, message)
                    .with_label(span, "interval of a count")
                    .with_help(help),
            );
            return None;
        }
    };
    Some((Layer::Counts(CountsOpts { heights, ci }), Traits::default()))
}

/// Bars of counts are read off the y axis: nothing to add.
pub fn key(opts: &CountsOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    let level = opts.ci?;
    Some(MarkKey::new(
        "Lines on bars",
        format!(
            "{} CI of each percentage (Wilson)",
            super::key::percent(level)
        ),
    ))
}
