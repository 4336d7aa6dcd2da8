//! Figure by figure: which figures were added, removed, changed or left as they were, and
//! which numbers of their summaries moved.
//!
//! A figure is *changed* when any of its output files differs in bytes (outputs are
//! deterministic, so equal inputs give equal bytes), except the PDF, which is compared by
//! presence only: it is drawn from the same drawing as the SVG, so it changes exactly when the
//! SVG does, and the PDF writer does not order its resource dictionaries the same way in every
//! process. Its numbers are compared row by row on
//! the key `panel,layer,group,x,stat` (with a running count for keys that repeat, such as one
//! `outliers` row per outlier), so rows that appear or disappear are reported too.

use std::collections::BTreeMap;
use std::fs;
use std::path::Path;

use crate::compute::summary::format_number;

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

impl StatChange {
    /// `new − old` when both are numbers, written for reading (`+2`, `-0.35`).
    pub fn difference(&self) -> Option<String> {
        let old: f64 = self.old.as_deref()?.parse().ok()?;
        let new: f64 = self.new.as_deref()?.parse().ok()?;
        Some(signed(new - old))
    }
}

/// A difference rounded to 6 significant digits (so `0.30000000000000004` reads `+0.3`),
/// with its sign.
fn signed(d: f64) -> String {
    if !d.is_finite() {
        return format!("{d}");
    }
    // Scientific notation with 5 decimals is exactly 6 significant digits.
    let rounded: f64 = format!("{d:.5e}").parse().unwrap_or(d);
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
/// that only the old file has, in its order.
pub fn compare_numbers(old: &[(StatKey, String)], new: &[(StatKey, String)]) -> Vec<StatChange> {
    let old_map: BTreeMap<&StatKey, &String> = old.iter().map(|(k, v)| (k, v)).collect();
    let new_map: BTreeMap<&StatKey, &String> = new.iter().map(|(k, v)| (k, v)).collect();
    let mut changes = Vec::new();
    for (key, value) in new {
        match old_map.get(key) {
            Some(before) if *before == value => {}
            before => changes.push(StatChange {
                key: key.clone(),
                old: before.map(|b| (*b).clone()),
                new: Some(value.clone()),
            }),
        }
    }
    for (key, value) in old {
        if !new_map.contains_key(key) {
            changes.push(StatChange {
                key: key.clone(),
                old: Some(value.clone()),
                new: None,
            });
        }
    }
    changes
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
    fn moved_new_and_gone_numbers_are_listed() {
        let old = parse_summary(OLD.as_bytes()).unwrap();
        let new = parse_summary(NEW.as_bytes()).unwrap();
        let changes = compare_numbers(&old, &new);
        // One line per change: x, stat, old → new (difference).
        let shown: Vec<String> = changes
            .iter()
            .map(|c| {
                format!(
                    "{} {}: {:?} -> {:?} ({:?})",
                    c.key.x,
                    c.key.stat_label(),
                    c.old,
                    c.new,
                    c.difference()
                )
            })
            .collect();
        assert_eq!(
            shown,
            [
                "paper median: Some(\"210\") -> Some(\"212.5\") (Some(\"+2.5\"))",
                "[2.5,5] count: None -> Some(\"1\") (None)",
                "paper outliers #2: Some(\"400\") -> None (None)",
            ]
        );
    }

    #[test]
    fn differences_read_well() {
        assert_eq!(signed(0.1 + 0.2), "+0.3");
        assert_eq!(signed(-2.0), "-2");
        assert_eq!(signed(0.0), "0");
        assert_eq!(signed(1234567.0), "+1234570");
    }

    #[test]
    fn output_files_belong_to_their_figure() {
        assert_eq!(figure_of("a_b.summary.csv"), Some("a_b"));
        assert_eq!(figure_of("a_b.png"), Some("a_b"));
        assert_eq!(figure_of("manifest.json"), None);
    }
}
