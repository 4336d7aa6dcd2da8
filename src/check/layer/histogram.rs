//! `histogram`: counts of a numeric x in bins of one readable width.

use crate::diag::Diagnostic;

use super::super::plan::{BinRule, Heights};
use super::key::{KeyContext, MarkKey};
use super::{options, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "histogram",
    draws: "bars over bins of one width: how many values fall in each",
    options: &[
        OptionDecl::call("bins", "bins(N | sturges | scott | fd)"),
        OptionDecl::call("width", "width(W)"),
        OptionDecl::call("heights", "heights(count | percent | density)"),
    ],
    x: XNeed::Numbers,
    y: YNeed::None {
        what: "it counts rows of x",
    },
    shows: Shows::Distribution,
    linear_x: true,
    alone: false,
    read,
};

/// Options of `histogram`.
#[derive(Debug, Clone, PartialEq)]
pub struct HistogramOpts {
    pub rule: BinRule,
    pub heights: Heights,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let before = diags.len();
    let heights = options::heights(input.opts, &["count", "percent", "density"], diags);
    let rule = options::bin_rule(input.opts, diags);
    if diags.len() > before {
        return None;
    }
    let opts = HistogramOpts {
        rule: rule.unwrap_or(BinRule::Sturges),
        heights: heights.unwrap_or(Heights::Count),
    };
    Some((Layer::Histogram(opts), Traits::default()))
}

/// Bars of a histogram are read off the y axis: nothing to add.
pub fn key(_opts: &HistogramOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    None
}
