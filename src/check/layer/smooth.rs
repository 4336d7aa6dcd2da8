//! `smooth`: a LOWESS curve of y on x per colour group (Cleveland 1979), over a scatter or over
//! each subject's trajectory; on log axes the smooth of the logs.

use crate::diag::{Code, Diagnostic};

use super::super::plan::SummaryDetail;
use super::super::terms;
use super::key::{KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "smooth",
    draws: "a LOWESS curve of y on x per colour group (of the logs on log axes): a local trend that assumes no shape",
    options: &[
        OptionDecl::call("span", "span(F)"),
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

/// The span without `span(F)`: each local line uses the nearest two thirds of the pairs
/// (Cleveland 1979 suggests 0.2 to 0.8; 2/3 is the usual default).
pub const DEFAULT_SPAN: f64 = 2.0 / 3.0;

/// Options of `smooth`.
#[derive(Debug, Clone, PartialEq)]
pub struct SmoothOpts {
    /// The share of the pairs each local line uses, in (0, 1].
    pub span: f64,
    /// Whether the summary lists the curve at every point drawn.
    pub summary: SummaryDetail,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let span = span(input, diags);
    let summary = options::summary_detail(input.opts, diags);
    let opts = SmoothOpts {
        span: span?,
        summary: summary?,
    };
    Some((Layer::Smooth(opts), Traits::default()))
}

/// `span(F)`, a share of the pairs in (0, 1]; [`DEFAULT_SPAN`] without it.
fn span(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<f64> {
    let Some(c) = input.opts.call("span") else {
        return Some(DEFAULT_SPAN);
    };
    let shape = "span(0.5)";
    let n = terms::single(c, shape, diags).and_then(|t| terms::expect_num(t, shape, diags))?;
    if n.value > 0.0 && n.value <= 1.0 {
        return Some(n.value);
    }
    diags.push(
        Diagnostic::new(
            Code::BadArgument,
            format!("a span is a share of the pairs, above 0 and at most 1, found {}", n.text),
        )
        .with_label(n.span, "not in (0, 1]")
        .with_help("write e.g. `span(0.5)`: each local line uses the nearest half of the pairs; larger spans give smoother curves"),
    );
    None
}

/// The curve, its method and its span.
pub fn key(opts: &SmoothOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let of = match (ctx.x_log, ctx.y_log) {
        (true, true) => " of log y on log x",
        (false, true) => " of log y on x",
        (true, false) => " of y on log x",
        (false, false) => "",
    };
    Some(MarkKey::new(
        "Curves",
        format!("LOWESS smooth{of} (span {})", span_text(opts.span)),
    ))
}

/// A span for reading: "2/3" for the default, else the number as written.
pub fn span_text(span: f64) -> String {
    if span == DEFAULT_SPAN {
        "2/3".to_string()
    } else {
        format!("{span}")
    }
}
