//! `median`: the median of each cell — a value with an optional interval for a numeric y, a
//! level with its quartile levels for an ordinal y.

use crate::diag::{Code, Diagnostic};

use super::super::plan::{ErrorBar, Scale};
use super::key::{self, KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "median",
    draws: "the median of each cell (of an ordinal y: its level, with the quartile levels)",
    options: &[OptionDecl::call("error", "error(boot(L))")],
    x: XNeed::Categories,
    y: YNeed::NumbersOrOrdinal {
        refusal: Refusal::Order,
    },
    shows: Shows::Estimate,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `median`.
#[derive(Debug, Clone, PartialEq)]
pub struct MedianOpts {
    /// Always `None` for an ordinal y.
    pub error: Option<ErrorBar>,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let error = options::error_bar(input.opts, &["boot"], diags).ok()?;
    let ordinal = input
        .axes
        .and_then(|a| a.y)
        .is_some_and(|y| y.scale == Scale::Ordinal);
    if let (true, Some((_, span))) = (ordinal, error) {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "the median of an ordinal variable is a level; it has no bootstrap interval here",
            )
            .with_label(span, "interval of a level")
            .with_help("remove `error(...)`: the drawn line already spans the quartile levels"),
        );
        return None;
    }
    let opts = MedianOpts {
        error: error.map(|(e, _)| e),
    };
    Some((Layer::Median(opts), Traits::default()))
}

/// A numeric median's diamond with its interval, or an ordinal median level with the
/// quartile levels.
pub fn key(opts: &MedianOpts, ctx: &KeyContext) -> Option<MarkKey> {
    Some(if ctx.y_ordinal {
        MarkKey::new("Dots and thick lines", "median level, interquartile range")
    } else {
        MarkKey::new("Diamonds", key::with_error("median", opts.error))
    })
}
