//! `box`: Tukey's box plot of the values in each cell, optionally notched at the median.

use crate::diag::Diagnostic;
use crate::syntax::ast::Term;

use super::super::plan::Whiskers;
use super::super::terms;
use super::key::{KeyContext, MarkKey};
use super::{Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "box",
    draws: "quartiles as a box, the median as a line, whiskers and outliers",
    options: &[
        OptionDecl::call("whiskers", "whiskers(tukey | range)"),
        OptionDecl::flag("notch"),
    ],
    x: XNeed::Categories,
    y: YNeed::Numbers {
        refusal: Refusal::Order,
    },
    shows: Shows::Distribution,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `box`.
#[derive(Debug, Clone, PartialEq)]
pub struct BoxOpts {
    pub whiskers: Whiskers,
    /// McGill–Tukey–Larsen notches around the median.
    pub notch: bool,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let whiskers = match input.opts.call("whiskers") {
        None => Whiskers::Tukey,
        Some(c) => {
            let shape = "whiskers(tukey)";
            let w = terms::single(c, shape, diags)
                .and_then(|t: &Term| terms::expect_choice(t, &["tukey", "range"], shape, diags))?;
            if w.name == "range" {
                Whiskers::Range
            } else {
                Whiskers::Tukey
            }
        }
    };
    let notch = input.opts.flag("notch").is_some();
    Some((Layer::Box(BoxOpts { whiskers, notch }), Traits::default()))
}

/// The box, its whiskers and (when no points show them) the outliers.
pub fn key(opts: &BoxOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let meaning = match opts.whiskers {
        Whiskers::Tukey if ctx.shows_points => "median and quartiles, whiskers to 1.5 IQR",
        Whiskers::Tukey => "median and quartiles, whiskers to 1.5 IQR, circles beyond",
        Whiskers::Range => "median and quartiles, whiskers to the extremes",
    };
    let meaning = if opts.notch {
        format!("{meaning}; notches: median ± 1.58 IQR / sqrt(n)")
    } else {
        meaning.to_string()
    };
    Some(MarkKey::new("Boxes", meaning))
}
