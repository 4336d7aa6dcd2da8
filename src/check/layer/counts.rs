//! `counts`: how many rows fall in each level of a categorical x.

use crate::diag::Diagnostic;

use super::super::plan::Heights;
use super::key::{KeyContext, MarkKey};
use super::{options, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "counts",
    draws: "a bar per level: how many rows fall in it",
    options: &[OptionDecl::call("heights", "heights(count | percent)")],
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
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let heights = match input.opts.call("heights") {
        None => Heights::Count,
        Some(_) => options::heights(input.opts, &["count", "percent"], diags)?,
    };
    Some((Layer::Counts(CountsOpts { heights }), Traits::default()))
}

/// Bars of counts are read off the y axis: nothing to add.
pub fn key(_opts: &CountsOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    None
}
