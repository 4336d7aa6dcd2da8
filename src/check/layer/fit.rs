//! `fit linear`: the least squares line of y on x per colour group, with its band; on log axes
//! the line is fitted to the logs.

use crate::diag::Diagnostic;

use super::super::plan::{Band, BandKind, SummaryDetail};
use super::key::{self, KeyContext, MarkKey};
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

/// The fitted line and its band.
pub fn key(opts: &FitOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let line = match (ctx.x_log, ctx.y_log) {
        (true, true) => "least squares line of log y on log x (a power law)",
        (false, true) => "least squares line of log y on x",
        (true, false) => "least squares line of y on log x",
        (false, false) => "least squares line",
    };
    let meaning = match opts.band {
        Some(Band { level, kind }) => {
            let of = match kind {
                BandKind::Mean => "CI of the mean",
                BandKind::Prediction => "prediction interval for one new value",
            };
            format!("{line}, band: {} {of}", key::percent(level))
        }
        None => line.to_string(),
    };
    Some(MarkKey::new("Lines", meaning))
}
