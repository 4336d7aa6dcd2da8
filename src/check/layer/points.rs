//! `points`: every value as a dot.

use crate::diag::Diagnostic;

use super::key::{KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "points",
    draws: "every value as a dot; over a categorical x, spread across the band by `jitter`",
    options: &[OptionDecl::call("jitter", "jitter(F)")],
    x: XNeed::Either,
    y: YNeed::Numbers {
        refusal: Refusal::Numbers,
    },
    shows: Shows::Values,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `points`.
#[derive(Debug, Clone, PartialEq)]
pub struct PointsOpts {
    /// Spread across a group's band, as a share of it, in [0, 1].
    pub jitter: f64,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let jitter = options::jitter(input.opts, diags)?;
    let traits = Traits {
        jitter: Some(jitter),
        ..Traits::default()
    };
    Some((Layer::Points(PointsOpts { jitter }), traits))
}

/// Dots are the values themselves: nothing to explain (the figure's key says how trials were
/// averaged, when they were).
pub fn key(_opts: &PointsOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    None
}
