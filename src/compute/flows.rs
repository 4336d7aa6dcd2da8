//! `flows by(SUBJECT)`: how subjects move between states (y) from one occasion (x) to the next,
//! counted for an alluvial diagram (Rosvall & Bergstrom 2010).
//!
//! Guarantees of the marks:
//! - a subject has at most one state per occasion (and panel); a second one is an error naming
//!   the subject, the occasion and both data rows (rule F0109, found in the data);
//! - `stacks[o][s]` counts the subjects in state `s` at occasion `o`; `moves[o][s][t]` counts the
//!   subjects in state `s` at occasion `o` and in state `t` at occasion `o + 1` (occasions in
//!   level order). A subject missing at an occasion is in no stack there and in no move to or
//!   from it, so each move's count is at most its two stacks';
//! - rows without a subject, a state or an occasion are counted as `n_missing`, never followed.
//!
//! Summary rows, per panel: `n` (subjects) and `n_missing` with x empty; per occasion `n`,
//! `n_missing` and one `count` per state (group = state); then per pair of consecutive
//! occasions `A->B` one `count` per pair of states `s->t`, zeros included, in level order.

use crate::diag::Code;
use std::collections::BTreeMap;

use crate::check::plan::CatAxis;
use crate::diag::{Diagnostic, Span};

use super::rows::{self, Levels, Placed};
use super::summary::RowKey;
use super::{
    ComputeError, Context, FigureData, FlowMarks, LayerMarks, Legend, PanelData, SummaryRow,
    XScale, YScale,
};

/// Counts the flows of every panel.
pub fn flows(
    ctx: &Context,
    x: &CatAxis,
    y: &CatAxis,
    span: Span,
) -> Result<FigureData, ComputeError> {
    let (occasions, states, placed) = ctx.place_levels(x, y)?;
    super::check_colours(&states, &ctx.book.var(y.var.var).name, y.var.span)?;
    check_one_state(ctx, &placed, &occasions, span)?;
    let mut panels = Vec::new();
    let mut summary = Vec::new();
    for p in 0..ctx.panels.len() {
        let marks = count_panel(&placed, p, occasions.len(), states.len());
        summarise(ctx, &placed, p, (&occasions, &states), &marks, &mut summary);
        panels.push(PanelData {
            label: ctx.panels.labels[p].clone(),
            n_by_x: marks.stacks.iter().map(|s| s.iter().sum()).collect(),
            layers: vec![LayerMarks::Flows(marks)],
        });
    }
    share_peak(&mut panels);
    Ok(FigureData {
        x: XScale::Categories {
            title: ctx.title(x.var.var, &x.title),
            levels: occasions,
        },
        y: YScale::Hidden,
        legend: Some(Legend {
            title: ctx.title(y.var.var, &y.title),
            levels: states,
        }),
        panels,
        summary,
    })
}

/// The first subject with two states at one occasion, as an error.
fn check_one_state(
    ctx: &Context,
    placed: &Placed,
    occasions: &Levels,
    span: Span,
) -> Result<(), ComputeError> {
    let Some((subject, cell, first, second)) = rows::repeated_subject(placed) else {
        return Ok(());
    };
    let mut at = format!("occasion \"{}\"", occasions.names[cell.x]);
    if ctx.plan.panels.is_some() {
        at.push_str(&format!(" in panel \"{}\"", ctx.panels.names[cell.panel]));
    }
    Err(Diagnostic::new(
        Code::SubjectRepeatedInCell,
        format!(
            "subject \"{}\" has more than one state at {at} (data rows {} and {})",
            ctx.subject_name(subject),
            ctx.file_row(first),
            ctx.file_row(second)
        ),
    )
    .with_label(span, "follows one state per subject and occasion")
    .with_help("a flow needs each subject's single state at each occasion; correct the data, or keep one row per subject and occasion with `where`")
    .into())
}

/// Stacks and moves of one panel.
fn count_panel(placed: &Placed, panel: usize, n_occasions: usize, n_states: usize) -> FlowMarks {
    let mut path: BTreeMap<u32, Vec<Option<usize>>> = BTreeMap::new();
    for o in placed.obs.iter().filter(|o| o.cell.panel == panel) {
        if let Some(s) = o.subject {
            path.entry(s).or_insert_with(|| vec![None; n_occasions])[o.cell.x] =
                Some(o.value as usize);
        }
    }
    let mut stacks = vec![vec![0usize; n_states]; n_occasions];
    let mut moves = vec![vec![vec![0usize; n_states]; n_states]; n_occasions.saturating_sub(1)];
    for states in path.values() {
        for (o, state) in states.iter().enumerate() {
            if let Some(s) = state {
                stacks[o][*s] += 1;
            }
        }
        for (o, pair) in states.windows(2).enumerate() {
            if let [Some(s), Some(t)] = pair {
                moves[o][*s][*t] += 1;
            }
        }
    }
    FlowMarks {
        stacks,
        moves,
        peak: 0,
    }
}

fn summarise(
    ctx: &Context,
    placed: &Placed,
    p: usize,
    (occasions, states): (&Levels, &Levels),
    marks: &FlowMarks,
    summary: &mut Vec<SummaryRow>,
) {
    let key = |x: String, group: String| RowKey {
        panel: ctx.panel_name(p),
        layer: "flows",
        group,
        x,
    };
    let here = || placed.obs.iter().filter(|o| o.cell.panel == p);
    let mut subjects: Vec<u32> = here().filter_map(|o| o.subject).collect();
    subjects.sort_unstable();
    subjects.dedup();
    let anonymous = here().filter(|o| o.subject.is_none()).count();
    let state_missing: usize = placed
        .missing_by_cell
        .iter()
        .filter(|(c, _)| c.panel == p)
        .map(|(_, n)| n)
        .sum();
    let whole = key(String::new(), String::new());
    summary.push(whole.count("n", subjects.len()));
    summary.push(whole.count("n_missing", placed.unplaced + anonymous + state_missing));
    for (o, name) in occasions.names.iter().enumerate() {
        let k = key(name.clone(), String::new());
        summary.push(k.count("n", marks.stacks[o].iter().sum()));
        let missing = placed
            .missing_by_cell
            .iter()
            .filter(|(c, _)| c.panel == p && c.x == o)
            .map(|(_, n)| n)
            .sum::<usize>()
            + here()
                .filter(|ob| ob.cell.x == o && ob.subject.is_none())
                .count();
        summary.push(k.count("n_missing", missing));
        for (s, state) in states.names.iter().enumerate() {
            summary.push(key(name.clone(), state.clone()).count("count", marks.stacks[o][s]));
        }
    }
    for (o, step) in marks.moves.iter().enumerate() {
        let x = format!("{}->{}", occasions.names[o], occasions.names[o + 1]);
        for (s, from) in states.names.iter().enumerate() {
            for (t, to) in states.names.iter().enumerate() {
                let k = key(x.clone(), format!("{from}->{to}"));
                summary.push(k.count("count", step[s][t]));
            }
        }
    }
}

/// Sets every panel's `peak` to the most subjects at any occasion of any panel.
fn share_peak(panels: &mut [PanelData]) {
    let peak = panels
        .iter()
        .flat_map(|p| &p.layers)
        .filter_map(|l| match l {
            LayerMarks::Flows(f) => f.stacks.iter().map(|s| s.iter().sum()).max(),
            _ => None,
        })
        .max()
        .unwrap_or(0);
    for layer in panels.iter_mut().flat_map(|p| &mut p.layers) {
        if let LayerMarks::Flows(f) = layer {
            f.peak = peak;
        }
    }
}
