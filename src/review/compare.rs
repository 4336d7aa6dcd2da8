//! Figure by figure: which figures were added, removed, changed or left as they were, and
//! which numbers of their summaries moved.
//!
//! A figure is *changed* when any of its output files differs in bytes (outputs are
//! deterministic, so equal inputs give equal bytes), except the PDF, which is compared by
//! presence only: it is drawn from the same drawing as the SVG, so it changes exactly when the
//! SVG does, and the PDF writer does not order its resource dictionaries the same way in every
//! process. Its numbers are compared row by row on the key `panel,layer,group,x,stat`, so
//! rows that appear or disappear are reported too. The values of a list statistic (one
//! `outliers` row per outlier) are compared as sets: a value on both sides is no change, and
//! the others are listed as removed or added — never paired by position. Other keys that
//! repeat (a layer written twice) are paired in order.
//!
//! For reading, numbers are shown rounded to the decimals that give their difference two
//! significant digits (see [`StatChange::shown`]); the exact values stay in the change.

use std::collections::BTreeMap;
use std::fs;
use std::path::Path;

use crate::compute::summary::format_number;
use crate::numbers::LIST_STATS;

use super::ReviewError;

/// The suffix of the summary file of a figure.
pub const SUMMARY_SUFFIX: &str = ".summary.csv";

/// The picture and document files a figure can have, by extension.
const PICTURE_EXTENSIONS: [&str; 3] = ["svg", "png", "pdf"];

/// The output files of one figure: file name → bytes.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Outputs {
    pub files: BTreeMap<String, Vec<u8>>,
}

impl Outputs {
    pub fn get(&self, name: &str) -> Option<&[u8]> {
        self.files.get(name).map(Vec::as_slice)
    }
}

/// Every figure in a build's output folder, by name (a figure always has a summary file).
pub fn read_outputs(dir: &Path) -> Result<BTreeMap<String, Outputs>, ReviewError> {
    let mut figures: BTreeMap<String, Outputs> = BTreeMap::new();
    let entries = fs::read_dir(dir).map_err(|e| ReviewError::io(dir, e))?;
    let mut names: Vec<String> = entries
        .filter_map(|e| e.ok())
        .filter_map(|e| e.file_name().into_string().ok())
        .collect();
    names.sort();
    for name in names.iter().filter_map(|n| n.strip_suffix(SUMMARY_SUFFIX)) {
        figures.insert(name.to_owned(), Outputs::default());
    }
    for file in &names {
        let Some(figure) = figure_of(file) else {
            continue;
        };
        if let Some(outputs) = figures.get_mut(figure) {
            let path = dir.join(file);
            let bytes = fs::read(&path).map_err(|e| ReviewError::io(&path, e))?;
            outputs.files.insert(file.clone(), bytes);
        }
    }
    Ok(figures)
}

/// The figure a file of an output folder belongs to, from its name.
fn figure_of(file: &str) -> Option<&str> {
    if let Some(name) = file.strip_suffix(SUMMARY_SUFFIX) {
        return Some(name);
    }
    let (name, ext) = file.rsplit_once('.')?;
    PICTURE_EXTENSIONS.contains(&ext).then_some(name)
}

/// How a figure differs between the two sides.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum State {
    Changed,
    Added,
    Removed,
    Unchanged,
}

impl State {
    pub fn as_str(self) -> &'static str {
        match self {
            State::Changed => "changed",
            State::Added => "added",
            State::Removed => "removed",
            State::Unchanged => "unchanged",
        }
    }
}

/// Where a number sits in a summary: `panel,layer,group,x,stat`, and which occurrence of that
/// key it is (0 for the first).
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord)]
pub struct StatKey {
    pub panel: String,
    pub layer: String,
    pub group: String,
    pub x: String,
    pub stat: String,
    pub occurrence: usize,
}

impl StatKey {
    /// The stat's name for display: `outliers`, or `outliers #2` for a repeated key.
    pub fn stat_label(&self) -> String {
        if self.occurrence == 0 {
            self.stat.clone()
        } else {
            format!("{} #{}", self.stat, self.occurrence + 1)
        }
    }
}

/// One number that moved, appeared or disappeared.
#[derive(Debug, Clone, PartialEq)]
pub struct StatChange {
    pub key: StatKey,
    /// The value before (`None`: the row is new).
    pub old: Option<String>,
    /// The value after (`None`: the row is gone).
    pub new: Option<String>,
}

/// A change as the report shows it: both values and the difference, rounded for reading.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Shown {
    pub old: Option<String>,
    pub new: Option<String>,
    /// `new − old` with its sign, when both are numbers.
    pub difference: Option<String>,
}

impl StatChange {
    /// `new − old` when both are numbers.
    fn delta(&self) -> Option<f64> {
        let old: f64 = self.old.as_deref()?.parse().ok()?;
        let new: f64 = self.new.as_deref()?.parse().ok()?;
        Some(new - old)
    }

    /// How large the change is, for ordering: `|new − old| / max(|old|, |new|)`, 0 to 1 for
    /// moved numbers (1 when one side is 0); `None` for a row that appeared or disappeared or
    /// a value that is not a number.
    pub fn size(&self) -> Option<f64> {
        let d = self.delta()?.abs();
        let old: f64 = self.old.as_deref()?.parse().ok()?;
        let new: f64 = self.new.as_deref()?.parse().ok()?;
        let scale = old.abs().max(new.abs());
        Some(if scale > 0.0 { d / scale } else { 0.0 })
    }

    /// The values rounded to the decimals that give the difference two significant digits
    /// (a value with fewer decimals is shown exactly); a value without the other side gets
    /// four significant digits. Level names are shown as they are.
    pub fn shown(&self) -> Shown {
        let decimals = self.delta().and_then(decimals_for_difference);
        let show = |text: Option<&str>| {
            let text = text?;
            let Ok(v) = text.parse::<f64>() else {
                return Some(text.to_owned());
            };
            let d = decimals.unwrap_or_else(|| significant_decimals(v, 4));
            Some(rounded(v, text, d))
        };
        Shown {
            old: show(self.old.as_deref()),
            new: show(self.new.as_deref()),
            difference: self
                .delta()
                .map(|d| signed(d, decimals.unwrap_or(MAX_DECIMALS))),
        }
    }
}

/// The most decimals shown.
const MAX_DECIMALS: usize = 17;

/// Decimals that give `d` two significant digits (at least 0); `None` for 0 or not finite.
fn decimals_for_difference(d: f64) -> Option<usize> {
    if d == 0.0 || !d.is_finite() {
        return None;
    }
    let decimals = 1 - d.abs().log10().floor() as i32;
    Some(decimals.clamp(0, MAX_DECIMALS as i32) as usize)
}

/// Decimals that give `v` `digits` significant digits (at least 0).
fn significant_decimals(v: f64, digits: i32) -> usize {
    if v == 0.0 || !v.is_finite() {
        return 0;
    }
    let decimals = digits - 1 - v.abs().log10().floor() as i32;
    decimals.clamp(0, MAX_DECIMALS as i32) as usize
}

/// `v` (written `text` in the summary) at `decimals` decimals, or exactly when its text has
/// no more decimals than that.
fn rounded(v: f64, text: &str, decimals: usize) -> String {
    let own = text.split_once('.').map_or(0, |(_, f)| f.len());
    if own <= decimals || text.contains(['e', 'E']) {
        text.to_owned()
    } else {
        let fixed = format!("{v:.decimals$}");
        match fixed.strip_prefix('-') {
            Some(rest) if rest.chars().all(|c| c == '0' || c == '.') => rest.to_owned(),
            _ => fixed,
        }
    }
}

/// A difference rounded to `decimals` decimals, written shortest, with its sign.
fn signed(d: f64, decimals: usize) -> String {
    if !d.is_finite() {
        return format!("{d}");
    }
    let rounded: f64 = format!("{d:.decimals$}").parse().unwrap_or(d);
    let text = format_number(rounded);
    if rounded > 0.0 {
        format!("+{text}")
    } else {
        text
    }
}

/// The rows of a summary file, keyed; in file order.
pub fn parse_summary(bytes: &[u8]) -> Result<Vec<(StatKey, String)>, String> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .from_reader(bytes);
    let mut seen: BTreeMap<[String; 5], usize> = BTreeMap::new();
    let mut rows = Vec::new();
    for record in reader.records() {
        let record = record.map_err(|e| e.to_string())?;
        let field = |i: usize| record.get(i).unwrap_or("").to_owned();
        let base = [field(0), field(1), field(2), field(3), field(4)];
        let occurrence = seen.entry(base.clone()).or_insert(0);
        let [panel, layer, group, x, stat] = base;
        rows.push((
            StatKey {
                panel,
                layer,
                group,
                x,
                stat,
                occurrence: *occurrence,
            },
            field(5),
        ));
        *occurrence += 1;
    }
    Ok(rows)
}

/// Every number that differs between two summaries: rows in the new file's order, then rows
/// that only the old file has, in its order; the values of list statistics compared as sets
/// (see the module doc). Then ordered by size of change, largest first (see
/// [`StatChange::size`]); rows that appeared or disappeared after the moved ones.
pub fn compare_numbers(old: &[(StatKey, String)], new: &[(StatKey, String)]) -> Vec<StatChange> {
    let is_list = |k: &StatKey| LIST_STATS.contains(&k.stat.as_str());
    let (old_lists, old_rows): (Vec<_>, Vec<_>) = old.iter().partition(|(k, _)| is_list(k));
    let (new_lists, new_rows): (Vec<_>, Vec<_>) = new.iter().partition(|(k, _)| is_list(k));
    let old_map: BTreeMap<&StatKey, &String> = old_rows.iter().map(|(k, v)| (k, v)).collect();
    let new_map: BTreeMap<&StatKey, &String> = new_rows.iter().map(|(k, v)| (k, v)).collect();
    let mut changes = Vec::new();
    for (key, value) in &new_rows {
        match old_map.get(key) {
            Some(before) if *before == value => {}
            before => changes.push(StatChange {
                key: key.clone(),
                old: before.map(|b| (*b).clone()),
                new: Some(value.clone()),
            }),
        }
    }
    for (key, value) in &old_rows {
        if !new_map.contains_key(key) {
            changes.push(StatChange {
                key: key.clone(),
                old: Some(value.clone()),
                new: None,
            });
        }
    }
    changes.extend(set_changes(&old_lists, &new_lists));
    // A stable sort: equal sizes keep the order above.
    changes.sort_by(|a, b| match (a.size(), b.size()) {
        (Some(x), Some(y)) => y.total_cmp(&x),
        (Some(_), None) => std::cmp::Ordering::Less,
        (None, Some(_)) => std::cmp::Ordering::Greater,
        (None, None) => std::cmp::Ordering::Equal,
    });
    changes
}

/// The values of list statistics that only one side has, per key (keys in order of first
/// appearance, new file first): removed ones, then added ones, each in file order.
fn set_changes(old: &[&(StatKey, String)], new: &[&(StatKey, String)]) -> Vec<StatChange> {
    let base = |k: &StatKey| StatKey {
        occurrence: 0,
        ..k.clone()
    };
    let mut order: Vec<StatKey> = Vec::new();
    let mut values: BTreeMap<StatKey, (Vec<String>, Vec<String>)> = BTreeMap::new();
    for (side, rows) in [(1, new), (0, old)] {
        for (k, v) in rows.iter().map(|r| (&r.0, &r.1)) {
            let key = base(k);
            let slot = values.entry(key.clone()).or_insert_with(|| {
                order.push(key);
                (Vec::new(), Vec::new())
            });
            if side == 0 { &mut slot.0 } else { &mut slot.1 }.push(v.clone());
        }
    }
    let mut out = Vec::new();
    for key in order {
        let Some((old_values, new_values)) = values.remove(&key) else {
            continue;
        };
        let removed = without(&old_values, &new_values);
        let added = without(&new_values, &old_values);
        out.extend(removed.into_iter().map(|v| StatChange {
            key: key.clone(),
            old: Some(v),
            new: None,
        }));
        out.extend(added.into_iter().map(|v| StatChange {
            key: key.clone(),
            old: None,
            new: Some(v),
        }));
    }
    out
}

/// The values of `values` left when each value of `other` takes away one equal value (a
/// multiset difference), in order.
fn without(values: &[String], other: &[String]) -> Vec<String> {
    let mut left: BTreeMap<&str, usize> = BTreeMap::new();
    for v in other {
        *left.entry(v.as_str()).or_default() += 1;
    }
    values
        .iter()
        .filter(|v| match left.get_mut(v.as_str()) {
            Some(n) if *n > 0 => {
                *n -= 1;
                false
            }
            _ => true,
        })
        .cloned()
        .collect()
}

/// One figure's comparison.
#[derive(Debug, Clone)]
pub struct FigureDiff {
    pub name: String,
    pub state: State,
    /// Numbers that moved (changed figures only).
    pub numbers: Vec<StatChange>,
    /// The output files that differ, e.g. `["png", "summary.csv", "svg"]`.
    pub differing: Vec<String>,
}

/// Compares the figures of two builds.
pub fn compare_figures(
    old: &BTreeMap<String, Outputs>,
    new: &BTreeMap<String, Outputs>,
) -> Result<Vec<FigureDiff>, ReviewError> {
    let mut names: Vec<&String> = old.keys().chain(new.keys()).collect();
    names.sort();
    names.dedup();
    let mut out = Vec::new();
    for name in names {
        let diff = match (old.get(name), new.get(name)) {
            (Some(a), Some(b)) => compare_one(name, a, b)?,
            (None, _) => plain(name, State::Added),
            (_, None) => plain(name, State::Removed),
        };
        out.push(diff);
    }
    out.sort_by(|a, b| (a.state, &a.name).cmp(&(b.state, &b.name)));
    Ok(out)
}

fn plain(name: &str, state: State) -> FigureDiff {
    FigureDiff {
        name: name.to_owned(),
        state,
        numbers: Vec::new(),
        differing: Vec::new(),
    }
}

/// Whether an output file differs between the sides (a PDF only by presence).
fn file_differs(file: &str, old: &Outputs, new: &Outputs) -> bool {
    if file.ends_with(".pdf") {
        old.get(file).is_some() != new.get(file).is_some()
    } else {
        old.get(file) != new.get(file)
    }
}

fn compare_one(name: &str, old: &Outputs, new: &Outputs) -> Result<FigureDiff, ReviewError> {
    let mut files: Vec<&String> = old.files.keys().chain(new.files.keys()).collect();
    files.sort();
    files.dedup();
    let differing: Vec<String> = files
        .into_iter()
        .filter(|f| file_differs(f, old, new))
        .map(|f| {
            f.strip_prefix(name)
                .unwrap_or(f)
                .trim_start_matches('.')
                .to_owned()
        })
        .collect();
    let summary = format!("{name}{SUMMARY_SUFFIX}");
    let rows = |o: &Outputs| {
        parse_summary(o.get(&summary).unwrap_or_default())
            .map_err(|e| ReviewError::Summary(format!("{summary}: {e}")))
    };
    let numbers = compare_numbers(&rows(old)?, &rows(new)?);
    let state = if differing.is_empty() {
        State::Unchanged
    } else {
        State::Changed
    };
    Ok(FigureDiff {
        name: name.to_owned(),
        state,
        numbers,
        differing,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const OLD: &str = "panel,layer,group,x,stat,value\n\
        ,box,,paper,median,210\n\
        ,box,,paper,outliers,90\n\
        ,box,,paper,outliers,400\n\
        ,histogram,,\"[0,2.5)\",count,3\n";
    const NEW: &str = "panel,layer,group,x,stat,value\n\
        ,box,,paper,median,212.5\n\
        ,box,,paper,outliers,90\n\
        ,histogram,,\"[0,2.5)\",count,3\n\
        ,histogram,,\"[2.5,5]\",count,1\n";

    #[test]
    fn moved_new_and_gone_numbers_are_listed_and_outliers_compared_as_sets() {
        let old = parse_summary(OLD.as_bytes()).unwrap();
        let new = parse_summary(NEW.as_bytes()).unwrap();
        let changes = compare_numbers(&old, &new);
        // One line per change: x, stat, old → new (difference).
        let shown: Vec<String> = changes
            .iter()
            .map(|c| {
                let s = c.shown();
                format!(
                    "{} {}: {:?} -> {:?} ({:?})",
                    c.key.x,
                    c.key.stat_label(),
                    s.old,
                    s.new,
                    s.difference
                )
            })
            .collect();
        assert_eq!(
            shown,
            [
                "paper median: Some(\"210\") -> Some(\"212.5\") (Some(\"+2.5\"))",
                "[2.5,5] count: None -> Some(\"1\") (None)",
                "paper outliers: Some(\"400\") -> None (None)",
            ]
        );
        // 51.1 stopped being an outlier and 65.9 became one: not "51.1 → 65.9".
        let rows = |vals: &[&str]| -> Vec<(StatKey, String)> {
            let text: String = vals
                .iter()
                .map(|v| format!(",box,,a,outliers,{v}\n"))
                .collect();
            parse_summary(format!("panel,layer,group,x,stat,value\n{text}").as_bytes()).unwrap()
        };
        let changes = compare_numbers(&rows(&["12", "51.1", "80"]), &rows(&["12", "65.9", "80"]));
        let pairs: Vec<(Option<&str>, Option<&str>)> = changes
            .iter()
            .map(|c| (c.old.as_deref(), c.new.as_deref()))
            .collect();
        assert_eq!(pairs, [(Some("51.1"), None), (None, Some("65.9"))]);
    }

    #[test]
    fn numbers_are_rounded_to_show_their_change() {
        let change = |old: &str, new: &str| StatChange {
            key: parse_summary(b"panel,layer,group,x,stat,value\n,mean,,a,mean,0\n").unwrap()[0]
                .0
                .clone(),
            old: Some(old.into()),
            new: Some(new.into()),
        };
        let s = change("228.49530354827652", "229.12345678").shown();
        assert_eq!(
            (s.old.as_deref(), s.new.as_deref(), s.difference.as_deref()),
            (Some("228.50"), Some("229.12"), Some("+0.63"))
        );
        // Short values stay exact.
        let s = change("88.5", "95.5").shown();
        assert_eq!(
            (s.old.as_deref(), s.new.as_deref(), s.difference.as_deref()),
            (Some("88.5"), Some("95.5"), Some("+7"))
        );
        let s = change("0.1", "0.30000000000000004").shown();
        assert_eq!(s.difference.as_deref(), Some("+0.2"));
        assert_eq!(change("10", "9").size(), Some(0.1));
    }

    #[test]
    fn output_files_belong_to_their_figure() {
        assert_eq!(figure_of("a_b.summary.csv"), Some("a_b"));
        assert_eq!(figure_of("a_b.png"), Some("a_b"));
        assert_eq!(figure_of("manifest.json"), None);
    }
}
