//! `violin`: the kernel density of each cell's values, mirrored, with the quartiles marked.

use crate::diag::Diagnostic;

use super::super::plan::{Bandwidth, SummaryDetail};
use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "violin",
    draws: "the density of each cell's values, mirrored, trimmed to the data, with its quartiles",
    options: &[
        OptionDecl::call("bandwidth", "bandwidth(silverman | scott | W)"),
        OptionDecl::call("summary", "summary(full)"),
    ],
    x: XNeed::Categories,
    y: YNeed::Numbers {
        refusal: Refusal::Numbers,
    },
    shows: Shows::Distribution,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `violin`.
#[derive(Debug, Clone, PartialEq)]
pub struct ViolinOpts {
    pub bandwidth: Bandwidth,
    /// Whether the summary lists the density at every point drawn.
    pub summary: SummaryDetail,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let (bandwidth, summary) = options::kernel(input.opts, diags)?;
    let opts = ViolinOpts { bandwidth, summary };
    Some((Layer::Violin(opts), Traits::default()))
}

/// The density outline, with its quartile and median lines.
pub fn key(opts: &ViolinOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    Some(MarkKey::new(
        "Violins",
        format!(
            "kernel density ({}), dashed quartiles, solid median",
            key::bandwidth(opts.bandwidth)
        ),
    ))
}
