//! The cells step: a figure's kept rows placed into cells, once, for every layer.
//!
//! A cell is a panel level, an x level (always 0 over a numeric x) and a colour level. The step
//! filters the rows, chooses the levels shown, places each kept row's measured value in its
//! cell, collapses repeated trials of a subject, and applies the rules that depend on the data
//! (a subject twice in one cell, zeros on a log axis, more colour levels than colours).
//!
//! Guarantees of [`Cells`]:
//! - [`Placed`] matches the figure's axes: rows for `counts`, values for a numeric y (or a
//!   numeric x alone), level slots for a categorical y, pairs for a numeric x and y;
//! - observations are in table-row order (collapsed trials take the row of their first trial);
//!   each cell's values are also kept sorted;
//! - a row whose panel, x or colour value is missing is in no cell (counted in its panel's
//!   `unplaced` when its panel is known); a placed row whose measured value is missing counts
//!   in its cell's `n_missing`;
//! - with `replicates`, each subject has one value per cell; without, a subject with two values
//!   in one cell is an error when a layer joins or compares one value per subject.

use std::collections::BTreeMap;

use crate::check::layer::Shows;
use crate::check::plan::{
    Axes, AxisScale, CatAxis, CatVar, Codebook, Collapse, FigurePlan, LayerPlan, LevelOrder,
    NumAxis, VarId,
};
use crate::data::{Codes, Names, Numbers, Table};
use crate::diag::{Code, Diagnostic, Span};

use super::filter::filter_rows;
use super::layer::Stat;
use super::levels::{self, axis_levels, codes, numbers, shown_levels, Levels};
use super::summary::{StatValue, SummaryRow};
use super::ComputeError;

/// A cell: panel slot, x slot (0 when x is numeric) and colour group slot.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Cell {
    pub panel: usize,
    pub x: usize,
    pub group: usize,
}

/// One placed value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Obs<T> {
    pub cell: Cell,
    /// The table row it came from (of the first trial, when trials are collapsed).
    pub row: usize,
    /// The subject's code, when the data declare a subject.
    pub subject: Option<u32>,
    pub value: T,
}

/// Observations of one measured quantity, placed in cells.
#[derive(Debug, Clone)]
pub struct Placement<T> {
    /// In table-row order.
    pub obs: Vec<Obs<T>>,
    /// Placed rows of each cell whose measured value is missing.
    pub missing: BTreeMap<Cell, usize>,
    /// Kept rows of each panel that could not be placed in a cell (a missing x or colour
    /// value); a row whose panel value is missing belongs to no panel and is not counted.
    pub unplaced: BTreeMap<usize, usize>,
}

impl<T> Placement<T> {
    /// Placed rows of `cell` whose measured value is missing.
    pub fn n_missing(&self, cell: Cell) -> usize {
        self.missing.get(&cell).copied().unwrap_or(0)
    }

    /// Kept rows of `panel` without a cell (a missing x or colour value).
    pub fn unplaced_in(&self, panel: usize) -> usize {
        self.unplaced.get(&panel).copied().unwrap_or(0)
    }

    /// The observations of one panel, in row order.
    pub fn in_panel(&self, panel: usize) -> impl Iterator<Item = &Obs<T>> {
        self.obs.iter().filter(move |o| o.cell.panel == panel)
    }
}

/// Numbers (a numeric y, or a numeric x alone) or level slots (a categorical y), with each
/// cell's values sorted.
#[derive(Debug, Clone)]
pub struct Values {
    pub placed: Placement<f64>,
    sorted: BTreeMap<Cell, Vec<f64>>,
}

impl Values {
    fn new(placed: Placement<f64>) -> Values {
        let mut sorted: BTreeMap<Cell, Vec<f64>> = BTreeMap::new();
        for o in &placed.obs {
            sorted.entry(o.cell).or_default().push(o.value);
        }
        sorted.values_mut().for_each(|v| v.sort_by(f64::total_cmp));
        Values { placed, sorted }
    }

    /// The values of `cell`, ascending.
    pub fn sorted(&self, cell: Cell) -> &[f64] {
        self.sorted.get(&cell).map_or(&[], Vec::as_slice)
    }

    /// Every placed value, in row order.
    pub fn all(&self) -> impl Iterator<Item = f64> + '_ {
        self.placed.obs.iter().map(|o| o.value)
    }
}

/// An (x, y) pair.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pair {
    pub x: f64,
    pub y: f64,
}

/// The figure's rows in cells, in the form its axes call for.
#[derive(Debug, Clone)]
pub enum Placed {
    /// Categorical x, no y: every kept row with its x level; a row whose x is missing counts in
    /// the `n_missing` of its panel and colour group (cell x 0).
    Rows(Placement<()>),
    /// A numeric y over a categorical x, or a numeric x alone.
    Values(Values),
    /// A categorical y: the slot of each row's level among the y levels.
    Levels(Values),
    /// A numeric x and y: complete pairs; a pair with either value missing is missing.
    Pairs(Placement<Pair>),
}

/// Everything the layers compute from: the plan, the levels shown and the placed rows.
pub struct Cells<'a> {
    pub plan: &'a FigurePlan,
    pub book: &'a Codebook,
    pub table: &'a Table,
    /// Panel levels; one unnamed level without `panels`.
    pub panels: Levels,
    /// Colour levels; one unnamed level without `colour`.
    pub groups: Levels,
    /// Levels shown on a categorical x; one unnamed level over a numeric x.
    pub x_levels: Levels,
    /// Every level of a categorical y (an ordinal y keeps its spacing, flow states their places).
    pub y_levels: Option<Levels>,
    pub placed: Placed,
    /// The figure's jitter (set by `points`), which `lines` follow.
    pub jitter: f64,
    /// The fewest and most trials a subject had in one cell, when `replicates` collapsed them
    /// (for the key: "each participant's mean of 6 trials").
    pub trials: Option<(usize, usize)>,
    subjects: Option<&'a Names>,
}

/// Columns that sort rows into cells.
struct Sorter<'a> {
    keep: Vec<bool>,
    panel: Option<(&'a Codes, &'a Levels)>,
    x: Option<(&'a Codes, &'a Levels)>,
    group: Option<(&'a Codes, &'a Levels)>,
    subject: Option<&'a Codes>,
}

/// The slot of a row's level in `part`; slot 0 when the figure does not split by it.
fn slot(part: Option<(&Codes, &Levels)>, row: usize) -> Option<usize> {
    match part {
        None => Some(0),
        Some((codes, levels)) => codes.get(row).and_then(|c| levels.slot(c)),
    }
}

impl Sorter<'_> {
    fn cell(&self, row: usize) -> Option<Cell> {
        Some(Cell {
            panel: slot(self.panel, row)?,
            x: slot(self.x, row)?,
            group: slot(self.group, row)?,
        })
    }

    /// Places every kept row's value (`None` when missing) in its cell.
    fn place<T>(&self, value: impl Fn(usize) -> Option<T>) -> Placement<T> {
        let mut out = Placement {
            obs: Vec::new(),
            missing: BTreeMap::new(),
            unplaced: BTreeMap::new(),
        };
        for row in (0..self.keep.len()).filter(|&r| self.keep[r]) {
            let Some(cell) = self.cell(row) else {
                if let Some(panel) = slot(self.panel, row) {
                    *out.unplaced.entry(panel).or_default() += 1;
                }
                continue;
            };
            match value(row) {
                Some(value) => out.obs.push(Obs {
                    cell,
                    row,
                    subject: self.subject.and_then(|s| s.get(row)),
                    value,
                }),
                None => *out.missing.entry(cell).or_default() += 1,
            }
        }
        out
    }

    /// `counts`: kept rows with an x level in their cells; a row whose x is missing (and whose
    /// panel and colour are known) counts in the `n_missing` of its panel and group, at x 0.
    fn place_rows(&self) -> Placement<()> {
        let mut placed = self.place(|_| Some(()));
        let x_missing = |row: usize| self.x.is_some_and(|(codes, _)| codes.get(row).is_none());
        for row in (0..self.keep.len()).filter(|&r| self.keep[r] && x_missing(r)) {
            if let (Some(panel), Some(group)) = (slot(self.panel, row), slot(self.group, row)) {
                let cell = Cell { panel, x: 0, group };
                *placed.missing.entry(cell).or_default() += 1;
            }
        }
        placed
    }
}

impl<'a> Cells<'a> {
    /// Runs the cells step for one figure.
    pub fn new(
        plan: &'a FigurePlan,
        book: &'a Codebook,
        table: &'a Table,
    ) -> Result<Cells<'a>, ComputeError> {
        let keep = filter_rows(table, book, plan.filter.as_ref())?;
        check_filter_keeps_rows(plan, table, &keep)?;
        let (panels, panel_codes) = grouping(table, book, plan.panels.as_ref(), &keep)?;
        let (groups, group_codes) = grouping(table, book, plan.colour.as_ref(), &keep)?;
        if let Some(c) = &plan.colour {
            check_colours(&groups, &book.var(c.var).name, c.span)?;
        }
        let subjects = match book.subject {
            Some(s) => Some(codes(table, book, s)?),
            None => None,
        };
        let x_levels = match &plan.axes {
            Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } => {
                axis_levels(table, book, x, &keep)?
            }
            Axes::Num { .. } | Axes::NumNum { .. } => Levels::single(),
        };
        let y_levels = match &plan.axes {
            Axes::CatCat { y, .. } => Some(levels::levels(table, book, &y.var, y.order, &keep)?),
            _ => None,
        };
        let x_codes = match &plan.axes {
            Axes::Cat { x } | Axes::CatNum { x, .. } | Axes::CatCat { x, .. } => {
                Some(codes(table, book, x.var.var)?.0)
            }
            Axes::Num { .. } | Axes::NumNum { .. } => None,
        };
        let mut cells = Cells {
            plan,
            book,
            table,
            panels,
            groups,
            x_levels,
            y_levels,
            placed: Placed::Rows(Placement {
                obs: Vec::new(),
                missing: BTreeMap::new(),
                unplaced: BTreeMap::new(),
            }),
            jitter: plan
                .layers
                .iter()
                .find_map(|l| l.traits.jitter)
                .unwrap_or(0.0),
            trials: None,
            subjects: subjects.map(|(_, names)| names),
        };
        let sorter = Sorter {
            keep,
            panel: panel_codes.map(|c| (c, &cells.panels)),
            x: x_codes.map(|c| (c, &cells.x_levels)),
            group: group_codes.map(|c| (c, &cells.groups)),
            subject: subjects.map(|(c, _)| c),
        };
        let (placed, trials) = match &plan.axes {
            Axes::Cat { .. } => (Placed::Rows(sorter.place_rows()), None),
            Axes::CatNum { y, .. } => {
                let (values, trials) = cells.measured(&sorter, y)?;
                (Placed::Values(values), trials)
            }
            Axes::Num { x } => {
                let (values, trials) = cells.measured(&sorter, x)?;
                (Placed::Values(values), trials)
            }
            Axes::CatCat { y, .. } => {
                let (levels, trials) = cells.level_slots(&sorter, y)?;
                (Placed::Levels(levels), trials)
            }
            Axes::NumNum { x, y } => {
                let (pairs, trials) = cells.pairs(&sorter, x, y)?;
                (Placed::Pairs(pairs), trials)
            }
        };
        cells.placed = placed;
        cells.trials = trials;
        Ok(cells)
    }

    /// The values of a numeric axis, collapsed or checked for repeated subjects, and checked
    /// against a log scale; with the trials per collapsed value.
    fn measured(&self, sorter: &Sorter, axis: &NumAxis) -> Result<(Values, Trials), ComputeError> {
        let column = numbers(self.table, self.book, axis.var.var)?;
        let mut placed = sorter.place(|row| column.get(row));
        let trials = match &self.book.replicates {
            Some(rep) => collapse(&mut placed, numeric_collapse(rep.collapse)),
            None => {
                self.check_one_value_per_subject(&placed)?;
                None
            }
        };
        self.check_log(axis, placed.obs.iter().map(|o| (o.row, o.value)))?;
        Ok((Values::new(placed), trials))
    }

    /// The slot of each row's level among the y levels.
    fn level_slots(&self, sorter: &Sorter, y: &CatAxis) -> Result<(Values, Trials), ComputeError> {
        let (y_codes, _) = codes(self.table, self.book, y.var.var)?;
        let y_levels = self
            .y_levels
            .as_ref()
            .ok_or_else(|| ComputeError::Internal("a categorical y without levels".to_string()))?;
        let mut placed = sorter.place(|row| {
            y_codes
                .get(row)
                .and_then(|c| y_levels.slot(c))
                .map(|s| s as f64)
        });
        // Ordinal trials collapse to a level, their median by definition 1, whatever the
        // block's `collapse` says (a mean of levels is not defined); a layer that follows each
        // trial's state (flows) keeps them as they are.
        let follows_trials = self.plan.layers.iter().any(|l| l.traits.keeps_trials);
        let trials = if self.book.replicates.is_some() && y.var.ordered && !follows_trials {
            collapse(&mut placed, level_median)
        } else {
            None
        };
        Ok((Values::new(placed), trials))
    }

    /// Complete (x, y) pairs; with `replicates`, x and y collapsed alike per subject and cell.
    fn pairs(
        &self,
        sorter: &Sorter,
        x: &NumAxis,
        y: &NumAxis,
    ) -> Result<(Placement<Pair>, Trials), ComputeError> {
        let xs = numbers(self.table, self.book, x.var.var)?;
        let ys = numbers(self.table, self.book, y.var.var)?;
        let complete = |own: &Numbers, row: usize| xs.get(row).and(ys.get(row)).and(own.get(row));
        let mut placed_x = sorter.place(|row| complete(xs, row));
        let mut placed_y = sorter.place(|row| complete(ys, row));
        // Trials collapse into one point per subject and cell, unless a layer follows each
        // subject over x (then per subject and x value, after pairing).
        let occasions = self.plan.layers.iter().any(|l| l.traits.x_occasions);
        let mut trials = self
            .book
            .replicates
            .as_ref()
            .filter(|_| !occasions)
            .and_then(|rep| {
                collapse(&mut placed_y, numeric_collapse(rep.collapse));
                collapse(&mut placed_x, numeric_collapse(rep.collapse))
            });
        // Both placements saw the same rows, so their observations pair up one to one.
        let obs = placed_x
            .obs
            .iter()
            .zip(&placed_y.obs)
            .map(|(a, b)| Obs {
                cell: a.cell,
                row: a.row,
                subject: a.subject,
                value: Pair {
                    x: a.value,
                    y: b.value,
                },
            })
            .collect();
        let mut pairs = Placement {
            obs,
            missing: placed_x.missing,
            unplaced: placed_x.unplaced,
        };
        if occasions {
            trials = match &self.book.replicates {
                Some(rep) => collapse_at_x(&mut pairs, numeric_collapse(rep.collapse)),
                None => {
                    self.check_one_value_per_occasion(&pairs, x)?;
                    None
                }
            };
        }
        self.check_log(x, pairs.obs.iter().map(|o| (o.row, o.value.x)))?;
        self.check_log(y, pairs.obs.iter().map(|o| (o.row, o.value.y)))?;
        Ok((pairs, trials))
    }

    /// Rule F0109 in the data: a subject with two values in one cell, under a layer that joins
    /// or compares one value per subject.
    fn check_one_value_per_subject(&self, placed: &Placement<f64>) -> Result<(), ComputeError> {
        let Some(layer) = self.one_value_layer() else {
            return Ok(());
        };
        let Some((subject, cell, first, second)) = repeated_subject(placed) else {
            return Ok(());
        };
        let x = format!("x = \"{}\"", self.x_levels.names[cell.x]);
        Err(self.repeated_error(layer, subject, cell, x, (first, second)))
    }

    /// The first layer that joins or compares one value per subject and cell.
    fn one_value_layer(&self) -> Option<&LayerPlan> {
        self.plan
            .layers
            .iter()
            .find(|l| l.traits.one_value_per_subject)
    }

    /// F0109 for `subject` twice in `cell` (its x described by `x`), at table rows `rows`.
    fn repeated_error(
        &self,
        layer: &LayerPlan,
        subject: u32,
        cell: Cell,
        x: String,
        rows: (usize, usize),
    ) -> ComputeError {
        let mut parts = vec![x];
        if self.plan.colour.is_some() {
            parts.push(format!("colour = \"{}\"", self.groups.names[cell.group]));
        }
        if self.plan.panels.is_some() {
            parts.push(format!("panel = \"{}\"", self.panels.names[cell.panel]));
        }
        repeated_subject_error(
            &self.subject_name(subject),
            &format!("({})", parts.join(", ")),
            (self.file_row(rows.0), self.file_row(rows.1)),
            layer.span,
        )
        .into()
    }

    /// Rule F0109 in the data over a numeric x: a subject with two values at one x value, under
    /// a layer that joins one value per subject and x value (a trajectory).
    fn check_one_value_per_occasion(
        &self,
        pairs: &Placement<Pair>,
        x: &NumAxis,
    ) -> Result<(), ComputeError> {
        let Some(layer) = self.one_value_layer() else {
            return Ok(());
        };
        let mut seen: BTreeMap<(Cell, u32, u64), usize> = BTreeMap::new();
        for o in &pairs.obs {
            let Some(s) = o.subject else { continue };
            let Some(first) = seen.insert((o.cell, s, o.value.x.to_bits()), o.row) else {
                continue;
            };
            let var = &self.book.var(x.var.var).name;
            let at = format!("{var} = {}", super::summary::format_number(o.value.x));
            return Err(self.repeated_error(layer, s, o.cell, at, (first, o.row)));
        }
        Ok(())
    }

    /// Rule F0114 in the data: a value at or below zero on a log axis; `values` are (row, value).
    fn check_log(
        &self,
        axis: &NumAxis,
        mut values: impl Iterator<Item = (usize, f64)>,
    ) -> Result<(), ComputeError> {
        let (AxisScale::Log, Some(span)) = (axis.scale, axis.scale_span) else {
            return Ok(());
        };
        let Some((row, _)) = values.find(|(_, v)| *v <= 0.0) else {
            return Ok(());
        };
        let var = self.book.var(axis.var.var);
        Err(Diagnostic::new(
            Code::LogOfZero,
            format!("`{}` has a zero (data row {}), and a log scale cannot show zero", var.name, self.file_row(row)),
        )
        .with_label(span, "log scale")
        .with_help("use a linear scale, or filter out the zeros with `where` if they are not part of the question")
        .into())
    }

    /// The row of the data file a table row came from, as a spreadsheet numbers it (the header
    /// is row 1; blank lines count), for messages.
    pub fn file_row(&self, row: usize) -> usize {
        self.table.row_place(row).map_or(row + 2, |p| p.file_row)
    }

    /// An axis or legend title: the one given, else the variable's label and unit.
    pub fn title(&self, var: VarId, given: &Option<String>) -> String {
        given.clone().unwrap_or_else(|| self.book.var(var).title())
    }

    /// The name of a subject code.
    pub fn subject_name(&self, code: u32) -> String {
        self.subjects
            .and_then(|names| names.get(code as usize).map(str::to_owned))
            .unwrap_or_default()
    }

    /// A panel's level name; empty without `panels`.
    pub fn panel_name(&self, p: usize) -> String {
        if self.plan.panels.is_some() {
            self.panels.names[p].clone()
        } else {
            String::new()
        }
    }

    /// A colour group's level name; empty without `colour`.
    pub fn group_name(&self, g: usize) -> String {
        if self.plan.colour.is_some() {
            self.groups.names[g].clone()
        } else {
            String::new()
        }
    }

    /// Every cell of a panel, x level first, then colour group.
    pub fn cells_of(&self, panel: usize) -> impl Iterator<Item = Cell> + '_ {
        (0..self.x_levels.len())
            .flat_map(move |x| (0..self.groups.len()).map(move |group| Cell { panel, x, group }))
    }

    /// Which layer's `n` the figure shows under its x levels, so that every n shown is an n of
    /// the summary: the first layer (in the order written) that reports an `n` per cell among
    /// the summary marks (mean, median), else the distributions (box, violin, flows), else the
    /// values (points), else the counts (their `count` per cell). `rows[i]` are the summary
    /// rows of layer `i`, every panel together. `None` over a numeric x.
    pub fn n_source(&self, rows: &[Vec<SummaryRow>]) -> Option<usize> {
        if !self.x_is_categorical() {
            return None;
        }
        let rank = |shows: Shows| match shows {
            Shows::Estimate => 0,
            Shows::Distribution => 1,
            Shows::Values => 2,
            Shows::Counts => 3,
            Shows::Reference => 4,
            Shows::Comparison => 5,
        };
        let reports_cells = |i: usize| {
            let stat = n_stat(self.plan.layers[i].decl.shows);
            rows[i].iter().any(|r| r.stat == stat && !r.x.is_empty())
        };
        (0..self.plan.layers.len())
            .filter(|&i| reports_cells(i))
            .min_by_key(|&i| (rank(self.plan.layers[i].decl.shows), i))
    }

    /// The n shown under each x slot of a panel, per colour group (`n[x][group]`): the `n` (or,
    /// for counts, the `count`) that layer `source` reports for that cell in its summary rows
    /// `rows`; 0 for a cell it reports nothing for.
    pub fn n_by_x(&self, panel: usize, source: usize, rows: &[SummaryRow]) -> Vec<Vec<usize>> {
        let mut n = vec![vec![0; self.groups.len()]; self.x_levels.len()];
        let stat = n_stat(self.plan.layers[source].decl.shows);
        let panel_name = self.panel_name(panel);
        for r in rows
            .iter()
            .filter(|r| r.stat == stat && r.panel == panel_name)
        {
            let x = self.x_levels.names.iter().position(|name| *name == r.x);
            let group = if self.plan.colour.is_some() {
                self.groups.names.iter().position(|name| *name == r.group)
            } else {
                Some(0)
            };
            if let (Some(x), Some(g), StatValue::Number(v)) = (x, group, &r.value) {
                n[x][g] = *v as usize;
            }
        }
        n
    }

    fn x_is_categorical(&self) -> bool {
        matches!(
            self.plan.axes,
            Axes::Cat { .. } | Axes::CatNum { .. } | Axes::CatCat { .. }
        )
    }
}

/// The statistic that counts a cell's values in a layer's summary: `count` for counts, `n`
/// for every other layer.
fn n_stat(shows: Shows) -> Stat {
    match shows {
        Shows::Counts => Stat::Count,
        _ => Stat::N,
    }
}

/// The fewest and most trials collapsed into one value, when any were.
type Trials = Option<(usize, usize)>;

/// Collapses repeated trials: one value per subject per cell, `reduce` of its trials' values
/// (in row order, at least one). Returns the fewest and most trials a collapsed value had.
fn collapse(placed: &mut Placement<f64>, reduce: fn(&mut [f64]) -> f64) -> Trials {
    collapse_by(
        placed,
        |o| o.subject.map(|s| (o.cell, s)),
        |trials| {
            let mut values: Vec<f64> = trials.iter().map(|o| o.value).collect();
            reduce(&mut values)
        },
    )
}

/// Collapses the trials of each subject at each x value of a numeric x (the occasions of a
/// trajectory): their y reduced by `reduce`, x kept.
fn collapse_at_x(pairs: &mut Placement<Pair>, reduce: fn(&mut [f64]) -> f64) -> Trials {
    collapse_by(
        pairs,
        |o| o.subject.map(|s| (o.cell, s, o.value.x.to_bits())),
        |trials| {
            let mut ys: Vec<f64> = trials.iter().map(|o| o.value.y).collect();
            Pair {
                x: trials[0].value.x,
                y: reduce(&mut ys),
            }
        },
    )
}

/// Collapses the observations that share a `key` (those without one, rows without a subject,
/// stay as they are) into one, `reduce` of them (in row order, at least one), at the row of
/// the first. Returns the fewest and most observations collapsed into one.
fn collapse_by<T: Copy, K: Ord>(
    placed: &mut Placement<T>,
    key: impl Fn(&Obs<T>) -> Option<K>,
    reduce: impl Fn(&[Obs<T>]) -> T,
) -> Trials {
    let mut by_key: BTreeMap<K, Vec<Obs<T>>> = BTreeMap::new();
    let mut without_subject = Vec::new();
    for o in placed.obs.drain(..) {
        match key(&o) {
            Some(k) => by_key.entry(k).or_default().push(o),
            None => without_subject.push(o),
        }
    }
    let trials = by_key
        .values()
        .map(Vec::len)
        .fold(None, |acc, n| match acc {
            None => Some((n, n)),
            Some((lo, hi)) => Some((n.min(lo), n.max(hi))),
        });
    let mut out: Vec<Obs<T>> = by_key
        .into_values()
        .map(|trials| Obs {
            value: reduce(&trials),
            ..trials[0]
        })
        .collect();
    out.extend(without_subject);
    out.sort_by_key(|o| o.row);
    placed.obs = out;
    trials
}

/// The reduction of numeric trials a data block asks for: their mean or median (definition 7).
fn numeric_collapse(how: Collapse) -> fn(&mut [f64]) -> f64 {
    match how {
        Collapse::Mean => |values| crate::stats::mean(values).unwrap_or(values[0]),
        Collapse::Median => |values| {
            values.sort_by(f64::total_cmp);
            crate::stats::quantile_sorted(values, 0.5).unwrap_or(values[0])
        },
    }
}

/// The median level of ordinal trials given as level slots (Hyndman & Fan definition 1): a
/// level some trial had, the lower middle one for an even number of trials.
fn level_median(slots: &mut [f64]) -> f64 {
    let levels: Vec<usize> = slots.iter().map(|&s| s as usize).collect();
    crate::stats::level_median(&levels).map_or(slots[0], |l| l as f64)
}

/// The first subject with more than one value in a cell, if any: (subject code, cell, rows).
pub fn repeated_subject<T>(placed: &Placement<T>) -> Option<(u32, Cell, usize, usize)> {
    let mut seen: BTreeMap<(Cell, u32), usize> = BTreeMap::new();
    for o in &placed.obs {
        let Some(s) = o.subject else { continue };
        if let Some(first) = seen.insert((o.cell, s), o.row) {
            return Some((s, o.cell, first, o.row));
        }
    }
    None
}

/// A diagnostic for a subject with two values in one cell (rule F0109, found in the data);
/// `rows` are the two rows of the data file (header = row 1).
fn repeated_subject_error(
    subject: &str,
    cell: &str,
    rows: (usize, usize),
    layer_span: Span,
) -> Diagnostic {
    Diagnostic::new(
        Code::SubjectRepeatedInCell,
        format!("subject \"{subject}\" has more than one value in cell {cell} (data rows {} and {})", rows.0, rows.1),
    )
    .with_label(layer_span, "joins one value per subject and cell")
    .with_help("if these are repeated trials, declare `replicates TRIAL collapse(mean)` in the data block; otherwise correct the data")
}

/// Rule F0120 in the data: a `where` filter that keeps none of the file's rows would draw an
/// empty figure.
fn check_filter_keeps_rows(
    plan: &FigurePlan,
    table: &Table,
    keep: &[bool],
) -> Result<(), ComputeError> {
    let Some(span) = plan.filter_span else {
        return Ok(());
    };
    if keep.contains(&true) {
        return Ok(());
    }
    Err(Diagnostic::new(
        Code::EmptyFilter,
        format!(
            "the filter keeps none of the {} rows of {}",
            table.n_rows(),
            table.file_label()
        ),
    )
    .with_label(span, "keeps no rows")
    .with_help("check the values it compares with: a level's spelling, a number's unit and range")
    .into())
}

/// Levels told apart by colour must not outnumber the palette's colours (no colour is ever
/// used twice: see [`crate::colour::palette`]).
pub fn check_colours(levels: &Levels, var: &str, span: Span) -> Result<(), ComputeError> {
    let most = crate::colour::palette::MAX_GROUPS;
    if levels.len() <= most {
        return Ok(());
    }
    Err(Diagnostic::new(
        Code::TooManyColours,
        format!(
            "`{var}` has {} levels to tell apart by colour, more than the palette's {most}",
            levels.len()
        ),
    )
    .with_label(span, "one colour per level")
    .with_help("show this variable in `panels` instead, or keep fewer levels with `where`")
    .into())
}

/// The shown levels of a `panels` or `colour` variable, with its codes per row.
type Grouping<'t> = (Levels, Option<&'t Codes>);

/// The shown levels and the codes of a `panels` or `colour` variable; one unnamed level when
/// the figure has none.
fn grouping<'t>(
    table: &'t Table,
    book: &Codebook,
    var: Option<&CatVar>,
    keep: &[bool],
) -> Result<Grouping<'t>, ComputeError> {
    match var {
        Some(v) => Ok((
            shown_levels(table, book, v, LevelOrder::Levels, keep)?,
            Some(codes(table, book, v.var)?.0),
        )),
        None => Ok((Levels::single(), None)),
    }
}
