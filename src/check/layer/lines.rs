//! `lines by(SUBJECT)`: each subject's values joined across the levels of x, or over a numeric
//! x (a time) in time order: each subject's trajectory.

use crate::diag::{Code, Diagnostic};

use super::super::plan::{Scale, VarId};
use super::key::{KeyContext, MarkKey};
use super::{
    options, Layer, LayerDecl, OptionDecl, ReadInput, Refusal, Shows, Traits, XNeed, YNeed,
};

pub static DECL: LayerDecl = LayerDecl {
    word: "lines",
    draws: "each subject's values joined across the levels of x, or in order of a numeric x (each subject's trajectory over time)",
    options: &[OptionDecl::call("by", "by(SUBJECT)")],
    x: XNeed::Either,
    y: YNeed::Numbers {
        refusal: Refusal::Numbers,
    },
    shows: Shows::Distribution,
    linear_x: false,
    alone: false,
    read,
};

/// Options of `lines`.
#[derive(Debug, Clone, PartialEq)]
pub struct LinesOpts {
    /// The data's subject.
    pub by: VarId,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let book = input.book;
    let (by, _) = options::by_subject(&DECL, book, input.opts, &input.stmt.head, diags)?;
    let numeric_x = input.axes.is_some_and(|a| a.x.scale.is_numeric());
    if let Some(axes) = input.axes.filter(|_| !numeric_x) {
        let x = axes.x;
        let xvar = book.var(x.var);
        if book.is_between(x.var) {
            diags.push(
                Diagnostic::new(Code::LinesAcrossSubjects, format!("lines would join different subjects: `{}` is a between factor", xvar.name))
                    .with_label(x.name_span, "each subject is in one group only")
                    .with_help("lines join one subject's values across a within factor; remove `lines` or put a within factor on x"),
            );
            return None;
        }
        if !book.is_within(x.var) && x.scale != Scale::Ordinal {
            diags.push(
                Diagnostic::new(Code::LinesAcrossSubjects, format!("lines need x to be a within factor or an ordinal occasion, and `{}` is neither", xvar.name))
                    .with_label(x.name_span, "not listed under `within`")
                    .with_help(format!("list `{}` under `within` in data `{}` if every subject was measured at each level", xvar.name, book.name)),
            );
            return None;
        }
    }
    let traits = Traits {
        one_value_per_subject: true,
        x_occasions: numeric_x,
        ..Traits::default()
    };
    Some((Layer::Lines(LinesOpts { by }), traits))
}

/// One line per subject.
pub fn key(_opts: &LinesOpts, ctx: &KeyContext) -> Option<MarkKey> {
    Some(MarkKey::new(
        "Thin lines",
        format!("each {}'s values, joined", ctx.subject()),
    ))
}
