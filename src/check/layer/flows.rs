//! `flows by(SUBJECT)`: how subjects move between states (y) from one occasion (x) to the next.

use crate::diag::{Code, Diagnostic};

use super::super::plan::{Scale, VarId};
use super::key::{KeyContext, MarkKey};
use super::{options, Layer, LayerDecl, OptionDecl, ReadInput, Shows, Traits, XNeed, YNeed};

pub static DECL: LayerDecl = LayerDecl {
    word: "flows",
    draws: "subjects in each state at each occasion, and ribbons of those who move between states",
    options: &[OptionDecl::call("by", "by(SUBJECT)")],
    x: XNeed::Categories,
    y: YNeed::Categories,
    shows: Shows::Distribution,
    linear_x: false,
    alone: true,
    read,
};

/// Options of `flows`.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowsOpts {
    /// The data's subject.
    pub by: VarId,
}

fn read(input: &ReadInput, diags: &mut Vec<Diagnostic>) -> Option<(Layer, Traits)> {
    let book = input.book;
    let (by, _) = options::by_subject(&DECL, book, input.opts, &input.stmt.head, diags)?;
    if let Some(axes) = input.axes {
        let x = axes.x;
        if x.scale != Scale::Ordinal || !book.is_within(x.var) {
            diags.push(
                Diagnostic::new(
                    Code::LinesAcrossSubjects,
                    "flows need x to be an ordinal within factor (the occasions)",
                )
                .with_label(
                    x.name_span,
                    "not ordered occasions measured on every subject",
                )
                .with_help(
                    "declare the occasions `ordinal levels(...)` and list them under `within`",
                ),
            );
            return None;
        }
    }
    let traits = Traits {
        keeps_trials: true,
        ..Traits::default()
    };
    Some((Layer::Flows(FlowsOpts { by }), traits))
}

/// Stacked bars of states and ribbons of moves.
pub fn key(_opts: &FlowsOpts, ctx: &KeyContext) -> Option<MarkKey> {
    let subjects = ctx.subjects();
    Some(MarkKey::new(
        "Bars",
        format!("{subjects} in each state; ribbons: {subjects} moving between states from one occasion to the next"),
    ))
}
