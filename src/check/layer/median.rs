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
    options: &[OptionDecl::call(
        "error",
        "error(ci(L) | boot(L) | boot(L, bca))",
    )],
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
    let error = options::error_bar(input.opts, &["ci", "boot"], diags).ok()?;
    if let Some((ErrorBar::CiWithin { .. }, span)) = error {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "a median has no within-subject interval",
            )
            .with_label(span, "within-subject interval of a median")
            .with_help("write `error(ci(0.95))` for the order-statistic interval of each cell's median"),
        );
        return None;
    }
    let ordinal = input
        .axes
        .and_then(|a| a.y)
        .is_some_and(|y| y.scale == Scale::Ordinal);
    if let (true, Some((_, span))) = (ordinal, error) {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "the median of an ordinal variable is a level; it has no interval here",
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
        let meaning = match opts.error {
            // The interval between two order statistics, from the binomial distribution.
            Some(ErrorBar::Ci { level }) => {
                format!("median, {} CI (distribution-free)", key::percent(level))
            }
            error => key::with_error("median", error),
        };
        MarkKey::new("Diamonds", meaning)
    })
}
