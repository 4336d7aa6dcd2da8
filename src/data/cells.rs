//! Turning the cells of one declared column into typed values, one row at a time.
//!
//! A [`ColumnBuilder`] accepts every cell: a good cell becomes a value, a missing token becomes
//! `None`, and a bad cell becomes `None` plus a [`CellProblem`] for the caller to report, so the
//! column always has one entry per row. Missing tokens match the cell as written or with its
//! surrounding whitespace trimmed; levels and ids match the cell exactly as written.

use crate::diag::Code;
use std::collections::BTreeMap;

use super::numbers::{parse_number, NonFinite, NotNumberHint, NumberProblem};
use super::spec::ColumnKind;
use super::table::Column;

/// What is wrong with one cell.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum CellProblem {
    /// A categorical cell outside the declared levels.
    NotALevel,
    /// A numeric cell that is not number text.
    NotANumber(NotNumberHint),
    /// A numeric cell with no finite value.
    NotFinite(NonFinite),
    /// A negative number in a ratio column.
    Negative,
    /// A missing token in an id column.
    MissingId,
}

impl CellProblem {
    /// The stable diagnostic code of this problem.
    pub(super) fn code(self) -> Code {
        match self {
            CellProblem::NotALevel => Code::NotALevel,
            CellProblem::NotANumber(_) => Code::NotANumber,
            CellProblem::NotFinite(_) => Code::NotFinite,
            CellProblem::Negative => Code::NegativeRatio,
            CellProblem::MissingId => Code::MissingId,
        }
    }
}

/// Whether a cell is one of the codebook's missing tokens.
pub(super) fn is_missing(cell: &str, missing: &[String]) -> bool {
    let trimmed = cell.trim();
    missing
        .iter()
        .any(|token| token == cell || token == trimmed)
}

/// Text values numbered in order of declaration or first appearance.
#[derive(Debug, Default)]
pub(super) struct Interner {
    index: BTreeMap<String, u32>,
    names: Vec<String>,
    codes: Vec<Option<u32>>,
    /// New values are added (inferred levels, ids) rather than rejected (declared levels).
    open: bool,
}

impl Interner {
    fn declared(levels: &[String]) -> Self {
        let mut interner = Interner::default();
        for level in levels {
            interner.intern(level);
        }
        interner
    }

    fn open() -> Self {
        Interner {
            open: true,
            ..Interner::default()
        }
    }

    /// The code of `text`, adding it when new. A file is at most
    /// [`super::MAX_FILE_BYTES`]-sized in practice, so the count stays far below `u32::MAX`;
    /// should it ever be reached, later new values share the last code rather than wrap.
    fn intern(&mut self, text: &str) -> u32 {
        if let Some(&code) = self.index.get(text) {
            return code;
        }
        let code = u32::try_from(self.names.len()).unwrap_or(u32::MAX);
        self.index.insert(text.to_owned(), code);
        self.names.push(text.to_owned());
        code
    }

    fn push(&mut self, text: &str) -> Result<(), CellProblem> {
        let code = if self.open {
            Some(self.intern(text))
        } else {
            self.index.get(text).copied()
        };
        self.codes.push(code);
        code.map(|_| ()).ok_or(CellProblem::NotALevel)
    }
}

/// One column being read.
#[derive(Debug)]
pub(super) enum ColumnBuilder {
    Id(Interner),
    Categorical(Interner),
    Numeric {
        ratio: bool,
        values: Vec<Option<f64>>,
    },
}

impl ColumnBuilder {
    pub(super) fn new(kind: &ColumnKind) -> Self {
        match kind {
            ColumnKind::Id => ColumnBuilder::Id(Interner::open()),
            ColumnKind::Categorical {
                levels: Some(levels),
                ..
            } => ColumnBuilder::Categorical(Interner::declared(levels)),
            ColumnKind::Categorical { levels: None, .. } => {
                ColumnBuilder::Categorical(Interner::open())
            }
            ColumnKind::Numeric { ratio } => ColumnBuilder::Numeric {
                ratio: *ratio,
                values: Vec::new(),
            },
        }
    }

    /// Reads the next row's cell; `None` is a cell that cannot be read (a row with the wrong
    /// number of fields, a column the header lacks) and is stored as missing without a problem.
    pub(super) fn push(
        &mut self,
        cell: Option<&str>,
        missing: &[String],
    ) -> Result<(), CellProblem> {
        let Some(cell) = cell.filter(|c| !is_missing(c, missing)) else {
            return self.push_missing(cell.is_some());
        };
        match self {
            ColumnBuilder::Id(ids) => ids.push(cell),
            ColumnBuilder::Categorical(levels) => levels.push(cell),
            ColumnBuilder::Numeric { ratio, values } => {
                let read = read_number(cell, *ratio);
                values.push(read.ok());
                read.map(|_| ())
            }
        }
    }

    /// Stores a missing entry; a missing token in an id column is a problem, an unreadable
    /// cell (`was_read == false`) never is.
    fn push_missing(&mut self, was_read: bool) -> Result<(), CellProblem> {
        match self {
            ColumnBuilder::Id(ids) => {
                ids.codes.push(None);
                if was_read {
                    return Err(CellProblem::MissingId);
                }
            }
            ColumnBuilder::Categorical(levels) => levels.codes.push(None),
            ColumnBuilder::Numeric { values, .. } => values.push(None),
        }
        Ok(())
    }

    pub(super) fn finish(self) -> Column {
        match self {
            ColumnBuilder::Id(ids) => Column::Id {
                codes: ids.codes,
                values: ids.names,
            },
            ColumnBuilder::Categorical(levels) => Column::Categorical {
                codes: levels.codes,
                levels: levels.names,
            },
            ColumnBuilder::Numeric { values, .. } => Column::Numeric(values),
        }
    }
}

fn read_number(cell: &str, ratio: bool) -> Result<f64, CellProblem> {
    let value = parse_number(cell).map_err(|problem| match problem {
        NumberProblem::NotNumber(hint) => CellProblem::NotANumber(hint),
        NumberProblem::NotFinite(kind) => CellProblem::NotFinite(kind),
    })?;
    if ratio && value < 0.0 {
        return Err(CellProblem::Negative);
    }
    Ok(value)
}

/// Why a value was not taken for a declared level, for the help line.
#[derive(Debug, Clone, PartialEq, Eq)]
pub(super) enum LevelHint<'a> {
    /// The same apart from letter case or spacing.
    CaseOrSpacing(&'a str),
    /// A close spelling.
    Close(&'a str),
    /// None close: list the levels.
    List,
}

/// The declared level a stray value most likely means.
pub(super) fn level_hint<'a>(value: &str, levels: &'a [String]) -> LevelHint<'a> {
    let wanted = normalize(value);
    if let Some(level) = levels.iter().find(|l| normalize(l) == wanted) {
        return LevelHint::CaseOrSpacing(level);
    }
    let value = value.trim();
    match crate::diag::did_you_mean(value, levels.iter().map(String::as_str)) {
        // Between one-character texts every pair is one edit apart: no real likeness.
        Some(level) if value.chars().count().max(level.chars().count()) > 1 => {
            LevelHint::Close(level)
        }
        _ => LevelHint::List,
    }
}

/// Lower case, surrounding space trimmed, inner runs of space made one space.
fn normalize(text: &str) -> String {
    text.split_whitespace()
        .collect::<Vec<_>>()
        .join(" ")
        .to_lowercase()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn strings(items: &[&str]) -> Vec<String> {
        items.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn inferred_levels_follow_first_appearance() {
        let mut column = ColumnBuilder::new(&ColumnKind::Categorical {
            levels: None,
            ordered: false,
        });
        let missing = strings(&["", "NA"]);
        for cell in ["b", "a", "NA", "b", "c"] {
            assert_eq!(column.push(Some(cell), &missing), Ok(()));
        }
        assert_eq!(
            column.finish(),
            Column::Categorical {
                codes: vec![Some(0), Some(1), None, Some(0), Some(2)],
                levels: strings(&["b", "a", "c"]),
            }
        );
    }

    #[test]
    fn level_hints() {
        let levels = strings(&["paper", "screen", "audio book"]);
        assert_eq!(
            level_hint("Screen", &levels),
            LevelHint::CaseOrSpacing("screen")
        );
        assert_eq!(
            level_hint(" audio  Book ", &levels),
            LevelHint::CaseOrSpacing("audio book")
        );
        assert_eq!(level_hint("papr", &levels), LevelHint::Close("paper"));
        assert_eq!(level_hint("radio", &levels), LevelHint::List);
        let one_letter = strings(&["A", "B"]);
        assert_eq!(level_hint("C", &one_letter), LevelHint::List);
        assert_eq!(level_hint("AB", &one_letter), LevelHint::Close("A"));
    }
}
