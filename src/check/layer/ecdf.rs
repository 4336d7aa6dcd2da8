//! `ecdf`: the empirical cumulative distribution of a numeric x per colour group and panel.

use crate::diag::Diagnostic;

use super::key::{KeyContext, MarkKey};
use super::{Layer, LayerDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "ecdf",
    draws: "the empirical cumulative distribution of x: a step from 0 to 1 per colour group",
    options: &[],
    x: XNeed::Numbers,
    y: YNeed::None {
        what: "it shows how x is distributed",
    },
    shows: Shows::Distribution,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `ecdf` (none yet).
#[derive(Debug, Clone, PartialEq)]
pub struct EcdfOpts;

fn read(_input: &ReadInput, _diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    Some((Layer::Ecdf(EcdfOpts), Traits::default()))
}

/// The steps of the empirical distribution.
pub fn key(_opts: &EcdfOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    Some(MarkKey::new(
        "Steps",
        "proportion of values at or below each x",
    ))
}
