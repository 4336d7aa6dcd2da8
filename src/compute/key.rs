//! The key under a figure: what each summary mark is, how trials were averaged, and what the
//! n under the axis counts — derived from the plan (each layer's [`MarkKey`]) and the cells
//! (the subject, the trials collapsed per value).
//!
//! Example: "Dots: each participant's mean of 6 trials. Boxes: median and quartiles, whiskers
//! to 1.5 IQR. Large dots: mean, 95% CI (within-subject, Cousineau–Morey). n: participants
//! with a value at every level, the only ones the mean uses." Plain dots need no sentence:
//! they are the values.

use crate::check::layer::key::plural;
use crate::check::layer::{KeyContext, MarkKey, Shows};
use crate::check::plan::{Axes, AxisScale, Collapse};

use super::cells::{repeated_subject, Cells, Placed};

/// The key's sentences, in the order of the layers, each ending in a full stop.
/// `groups_differ`: the colour groups of some category have different n (the n row then
/// gives each group's).
/// `notes[i]`: words layer `i` adds to its sentence because of the data (too few values for
/// an interval somewhere).
pub fn key(
    cells: &Cells,
    n_source: Option<usize>,
    groups_differ: bool,
    notes: &[Option<&str>],
) -> Vec<String> {
    let plan = cells.plan;
    let book = cells.book;
    let subject = book.subject.map(|s| words(&book.var(s).name));
    let ctx = KeyContext {
        y_ordinal: matches!(&plan.axes, Axes::CatCat { y, .. } if y.var.ordered),
        shows_points: plan.layers.iter().any(|l| l.decl.shows == Shows::Values),
        subject: subject.as_deref(),
        x_log: matches!(&plan.axes, Axes::Num { x } | Axes::NumNum { x, .. } if x.scale == AxisScale::Log),
        y_log: matches!(&plan.axes, Axes::CatNum { y, .. } | Axes::NumNum { y, .. } if y.scale == AxisScale::Log),
    };
    let keys: Vec<Option<MarkKey>> = plan.layers.iter().map(|l| l.layer.key(&ctx)).collect();
    let trials = averaged(cells, ctx.subject());
    let mut out: Vec<String> = Vec::new();
    if let Some(t) = &trials {
        let marks = if ctx.shows_points { "Dots" } else { "Values" };
        if plan.layers.iter().any(|l| l.decl.shows != Shows::Counts) {
            out.push(format!("{marks}: {t}."));
        }
    }
    for (key, note) in keys
        .iter()
        .zip(notes)
        .filter_map(|(k, n)| Some((k.as_ref()?, n)))
    {
        let sentence = match note {
            Some(note) => format!("{}: {}; {note}.", key.marks, key.meaning),
            None => format!("{}: {}.", key.marks, key.meaning),
        };
        if !out.contains(&sentence) {
            out.push(sentence);
        }
    }
    if let Some(i) = n_source {
        let complete = keys[i].as_ref().is_some_and(|k| k.complete_subjects);
        let per_group = match (&plan.colour, groups_differ) {
            (Some(_), true) => " in each colour group, in the legend's order",
            (Some(_), false) => " in each colour group",
            (None, _) => "",
        };
        out.push(format!(
            "n: {}{per_group}.",
            n_counts(cells, i, complete, ctx.subject())
        ));
    }
    out
}

/// "each participant's mean of 6 trials", when `replicates` collapsed trials into one value.
fn averaged(cells: &Cells, subject: &str) -> Option<String> {
    let rep = cells.book.replicates.as_ref()?;
    let (lo, hi) = cells.trials?;
    let how = match rep.collapse {
        Collapse::Mean => "mean",
        Collapse::Median => "median",
    };
    let trial = words(&cells.book.var(rep.var).name);
    let count = if lo == hi {
        format!("{lo} {}", counted(&trial, lo))
    } else {
        format!("{lo}–{hi} {}", counted(&trial, hi))
    };
    Some(format!("each {subject}'s {how} of {count}"))
}

/// What the n under the axis counts, from the layer that gives it.
fn n_counts(cells: &Cells, source: usize, complete: bool, subject: &str) -> String {
    let layer = &cells.plan.layers[source];
    let subjects = plural(subject);
    if complete {
        format!("{subjects} with a value at every level, the only ones the mean uses")
    } else if layer.traits.keeps_trials {
        format!("{subjects} with a state at the occasion")
    } else if layer.decl.shows == Shows::Counts {
        "rows counted".to_string()
    } else if one_value_per_subject(cells) {
        subjects
    } else {
        "values".to_string()
    }
}

/// Every value placed has a subject, and no subject has two values in one cell.
fn one_value_per_subject(cells: &Cells) -> bool {
    let (Placed::Values(v) | Placed::Levels(v)) = &cells.placed else {
        return false;
    };
    cells.book.subject.is_some()
        && v.placed.obs.iter().all(|o| o.subject.is_some())
        && repeated_subject(&v.placed).is_none()
}

/// A variable's name as words: `reaction_time` → "reaction time".
fn words(name: &str) -> String {
    name.replace('_', " ")
}

/// A count noun for `n` things: "trial", "trials".
fn counted(noun: &str, n: usize) -> String {
    if n == 1 {
        noun.to_string()
    } else {
        plural(noun)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counted_nouns_take_a_plural() {
        assert_eq!(counted("trial", 6), "trials");
        assert_eq!(counted("trial", 1), "trial");
        assert_eq!(words("reaction_time"), "reaction time");
    }
}
