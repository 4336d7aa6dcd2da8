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
//! - rows without a subject, a state or an occasion are counted as `n_missing` of their panel,
//!   never followed; a row without a panel value belongs to no panel and counts nowhere;
//! - the layer's `width_peak` is the most subjects at any occasion, so panels share a scale.
//!
//! Summary rows, per panel: `n` (subjects) and `n_missing` with x empty; per occasion `n`,
//! `n_missing` and one `count` per state (group = state); then per pair of consecutive
//! occasions `A->B` one `count` per pair of states `s->t`, zeros included, in level order.

use std::collections::BTreeMap;

use crate::check::layer::FlowsOpts;
use crate::check::plan::Axes;
use crate::diag::{Code, Diagnostic, Span};

use super::super::cells::{check_colours, repeated_subject, Values};
use super::super::levels::Levels;
use super::super::summary::{RowKey, SummaryRow};
use super::super::{ComputeError, Legend};
use super::{At, LayerMarks, LayerOutput, Stat, YUse};

/// Subjects in each state at each occasion, and how many moved between consecutive occasions.
#[derive(Debug, Clone, PartialEq)]
pub struct FlowMarks {
    /// `stacks[o][s]`: subjects in state slot `s` at occasion slot `o`.
    pub stacks: Vec<Vec<usize>>,
    /// `moves[o][s][t]`: subjects in state `s` at occasion `o` and state `t` at occasion `o + 1`.
    pub moves: Vec<Vec<Vec<usize>>>,
}

pub fn compute(_opts: &FlowsOpts, at: &At, span: Span) -> Result<LayerOutput, ComputeError> {
    let placed = at.levels()?;
    let cells = at.cells;
    let (Axes::CatCat { y, .. }, Some(states)) = (&cells.plan.axes, &cells.y_levels) else {
        return Err(at.misplaced("occasions and states"));
    };
    check_colours(states, &cells.book.var(y.var.var).name, y.var.span)?;
    check_one_state(at, placed, span)?;
    let marks = count_panel(placed, at.panel, cells.x_levels.len(), states.len());
    let rows = summarise(at, placed, states, &marks);
    let width_peak = marks
        .stacks
        .iter()
        .map(|s| s.iter().sum::<usize>())
        .max()
        .unwrap_or(0) as f64;
    let legend = Legend::new(cells.title(y.var.var, &y.title), states.clone());
    Ok(LayerOutput {
        width_peak,
        y_use: YUse::Hidden,
        legend: Some(legend),
        ..LayerOutput::new(LayerMarks::Flows(marks), rows)
    })
}

/// The first subject with two states at one occasion, as an error.
fn check_one_state(at: &At, placed: &Values, span: Span) -> Result<(), ComputeError> {
    let Some((subject, cell, first, second)) = repeated_subject(&placed.placed) else {
        return Ok(());
    };
    let cells = at.cells;
    let mut occasion = format!("occasion \"{}\"", cells.x_levels.names[cell.x]);
    if cells.plan.panels.is_some() {
        occasion.push_str(&format!(" in panel \"{}\"", cells.panels.names[cell.panel]));
    }
    Err(Diagnostic::new(
        Code::SubjectRepeatedInCell,
        format!(
            "subject \"{}\" has more than one state at {occasion} (data rows {} and {})",
            cells.subject_name(subject),
            cells.file_row(first),
            cells.file_row(second)
        ),
    )
    .with_label(span, "follows one state per subject and occasion")
    .with_help("a flow needs each subject's single state at each occasion; correct the data, or keep one row per subject and occasion with `where`")
    .into())
}

/// Stacks and moves of one panel.
fn count_panel(placed: &Values, panel: usize, n_occasions: usize, n_states: usize) -> FlowMarks {
    let mut path: BTreeMap<u32, Vec<Option<usize>>> = BTreeMap::new();
    for o in placed.placed.in_panel(panel) {
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
    FlowMarks { stacks, moves }
}

fn summarise(at: &At, placed: &Values, states: &Levels, marks: &FlowMarks) -> Vec<SummaryRow> {
    let (p, cells) = (at.panel, at.cells);
    let key = |x: String, group: String| RowKey {
        panel: cells.panel_name(p),
        layer: at.layer,
        group,
        x,
    };
    let placed = &placed.placed;
    let here = || placed.in_panel(p);
    let mut subjects: Vec<u32> = here().filter_map(|o| o.subject).collect();
    subjects.sort_unstable();
    subjects.dedup();
    let anonymous = here().filter(|o| o.subject.is_none()).count();
    let state_missing: usize = placed
        .missing
        .iter()
        .filter(|(c, _)| c.panel == p)
        .map(|(_, n)| n)
        .sum();
    let mut rows = Vec::new();
    let whole = key(String::new(), String::new());
    rows.push(whole.count(Stat::N, subjects.len()));
    rows.push(whole.count(
        Stat::NMissing,
        placed.unplaced_in(p) + anonymous + state_missing,
    ));
    for (o, name) in cells.x_levels.names.iter().enumerate() {
        let k = key(name.clone(), String::new());
        rows.push(k.count(Stat::N, marks.stacks[o].iter().sum()));
        let missing = placed
            .missing
            .iter()
            .filter(|(c, _)| c.panel == p && c.x == o)
            .map(|(_, n)| n)
            .sum::<usize>()
            + here()
                .filter(|ob| ob.cell.x == o && ob.subject.is_none())
                .count();
        rows.push(k.count(Stat::NMissing, missing));
        for (s, state) in states.names.iter().enumerate() {
            rows.push(key(name.clone(), state.clone()).count(Stat::Count, marks.stacks[o][s]));
        }
    }
    for (o, step) in marks.moves.iter().enumerate() {
        let names = &cells.x_levels.names;
        let x = format!("{}->{}", names[o], names[o + 1]);
        for (s, from) in states.names.iter().enumerate() {
            for (t, to) in states.names.iter().enumerate() {
                rows.push(key(x.clone(), format!("{from}->{to}")).count(Stat::Count, step[s][t]));
            }
        }
    }
    rows
}
