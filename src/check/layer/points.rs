//! `points`: every value as a dot — over a categorical x spread across the band by `jitter`,
//! or placed without randomness by `arrange(stack)` (a dot plot) or `arrange(swarm)`.

use crate::diag::{Code, Diagnostic};
use crate::syntax::ast::Term;

use super::super::terms;
use super::key::{KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "points",
    draws: "every value as a dot; over a categorical x, spread across the band by `jitter` or placed side by side by `arrange`",
    options: &[
        OptionDecl::call("jitter", "jitter(F)"),
        OptionDecl::call("arrange", "arrange(stack | swarm)"),
    ],
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
    /// Dots placed side by side where they would overlap, instead of jittered.
    pub arrange: Option<Arrange>,
}

/// How `arrange(...)` places the dots of a cell across its band.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Arrange {
    /// Wilkinson's dot plot: values binned by the dot's width, each bin a row of dots.
    Stack,
    /// Each dot at the place nearest the band's centre where it overlaps no dot before it.
    Swarm,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let jitter = options::jitter(input.opts, diags)?;
    let arrange = match input.opts.call("arrange") {
        None => None,
        Some(c) => {
            let shape = "arrange(swarm)";
            let w = terms::single(c, shape, diags)
                .and_then(|t: &Term| terms::expect_choice(t, &["stack", "swarm"], shape, diags))?;
            if let Some(j) = input.opts.call("jitter") {
                diags.push(
                    Diagnostic::new(
                        Code::BadArgument,
                        "give either `jitter(...)` or `arrange(...)`, not both",
                    )
                    .with_label(c.span, "places the dots without randomness")
                    .with_label(j.span, "spreads them at random")
                    .with_help("keep `arrange(...)` to place every dot where it overlaps no other, or `jitter(...)` to spread them"),
                );
                return None;
            }
            if input.axes.is_some_and(|a| !a.x.scale.is_categorical()) {
                diags.push(
                    Diagnostic::new(
                        Code::LayerDoesNotFit,
                        "`arrange` places dots across a category's band, and x is numeric",
                    )
                    .with_label(c.span, "across a band")
                    .with_help(
                        "remove `arrange(...)`: in a scatter plot each dot's place is its x value",
                    ),
                );
                return None;
            }
            Some(if w.name == "stack" {
                Arrange::Stack
            } else {
                Arrange::Swarm
            })
        }
    };
    let traits = Traits {
        jitter: Some(jitter),
        ..Traits::default()
    };
    Some((Layer::Points(PointsOpts { jitter, arrange }), traits))
}

/// Dots are the values themselves: nothing to explain (the figure's key says how trials were
/// averaged, when they were); arranged dots say how they were placed.
pub fn key(opts: &PointsOpts, _ctx: &KeyContext) -> Option<MarkKey> {
    let meaning = match opts.arrange? {
        Arrange::Stack => "the values, binned by the dot's width and set side by side",
        Arrange::Swarm => "the values, set side by side where they would overlap",
    };
    Some(MarkKey::new("Dots", meaning))
}
