//! `fit linear`: the least squares line of y on x per colour group, with its band; on log axes
//! the line is fitted to the logs.

use crate::diag::Diagnostic;

use super::super::plan::{Band, SummaryDetail};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "fit",
    draws: "the least squares line of y on x per colour group (of the logs on log axes), with a confidence or prediction band",
    options: &[
        OptionDecl::flag("linear"),
        OptionDecl::call("band", "band(L) | band(L, prediction)"),
        OptionDecl::call("summary", "summary(full)"),
    ],
    x: XNeed::Numbers,
    y: YNeed::Numbers {
        refusal: Refusal::Numbers,
    },
    shows: Shows::Estimate,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `fit`.
#[derive(Debug, Clone, PartialEq)]
pub struct FitOpts {
    /// The band around the line and the level of the coefficients' intervals; none without it.
    pub band: Option<Band>,
    /// Whether the summary lists the line and band at every point drawn.
    pub summary: SummaryDetail,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let before = diags.len();
    let band = input.opts.call("band").map(|c| options::band(c, diags));
    let summary = options::summary_detail(input.opts, diags);
    if diags.len() > before {
        return None;
    }
    let opts = FitOpts {
        band: band.flatten(),
        summary: summary?,
    };
    Some((Layer::Fit(opts), Traits::default()))
}
