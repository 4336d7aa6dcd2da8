//! `fit linear`: the least squares line of y on x per colour group, with its band.

use crate::diag::Diagnostic;

use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "fit",
    draws: "the least squares line of y on x per colour group, with a confidence band",
    options: &[
        OptionDecl::flag("linear"),
        OptionDecl::call("band", "band(L)"),
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
    /// The level of the confidence band for the mean response; no band without it.
    pub band: Option<f64>,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let band = match input.opts.call("band") {
        None => None,
        Some(c) => Some(options::level_arg(c, "band(0.95)", diags)?),
    };
    Some((Layer::Fit(FitOpts { band }), Traits::default()))
}

/// The fitted line and its band.
pub fn key(opts: &FitOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    let meaning = match opts.band {
        Some(level) => format!(
            "least squares line, band: {} CI of the mean",
            key::percent(level)
        ),
        None => "least squares line".to_string(),
    };
    Some(MarkKey::new("Lines", meaning))
}
