//! `density`: a Gaussian kernel density curve of a numeric x.

use crate::diag::Diagnostic;

use super::super::plan::{Bandwidth, SummaryDetail};
use super::key::{self, KeyContext, MarkKey};
use super::{options, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "density",
    draws: "a kernel density curve of x per colour group",
    options: &[
        OptionDecl::call("bandwidth", "bandwidth(silverman | scott | W)"),
        OptionDecl::call("summary", "summary(full)"),
    ],
    x: XNeed::Numbers,
    y: YNeed::None {
        what: "it shows how x is distributed",
    },
    shows: Shows::Distribution,
    linear_x: true,
    alone: false,
    read,
};

/// Options of `density`.
#[derive(Debug, Clone, PartialEq)]
pub struct DensityOpts {
    pub bandwidth: Bandwidth,
    /// Whether the summary lists the density at every point drawn.
    pub summary: SummaryDetail,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let (bandwidth, summary) = options::kernel(input.opts, diags)?;
    let opts = DensityOpts { bandwidth, summary };
    Some((Layer::Density(opts), Traits::default()))
}

/// The curve and its bandwidth.
pub fn key(opts: &DensityOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    Some(MarkKey::new(
        "Curves",
        format!("kernel density ({})", key::bandwidth(opts.bandwidth)),
    ))
}
