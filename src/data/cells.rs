//! Turning the cells of one declared column into typed values, one row at a time.
//!
//! A [`ColumnBuilder`] accepts every cell: a good cell becomes a value, a missing token or an
//! empty cell becomes missing, and a bad cell becomes missing plus a [`CellProblem`] for the
//! caller to report, so the column always has one entry per row. Missing tokens match the cell
//! as written or with its surrounding whitespace trimmed; levels and ids match the cell exactly
//! as written. A number cell of a workbook or Parquet file is missing when a missing token
//! reads as the same number, and is read as the text [`number_text`] gives it in a categorical
//! or id column.
//!
//! Texts are interned without a copy per cell: each distinct text is stored once, in an arena,
//! and found again through a hash table of codes. Codes follow the order of declaration or of
//! first appearance, never the hash order.

use crate::diag::Code;
use std::hash::BuildHasher;

use hashbrown::HashTable;
use rustc_hash::FxBuildHasher;

use super::column::{Codes, Names, Numbers};
use super::numbers::{parse_number, NonFinite, NotNumberHint, NumberProblem};
use super::spec::{ColumnKind, DecimalMark};
use super::table::Column;

/// One cell as a file holds it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(super) enum Cell<'a> {
    /// Text, read as written (CSV fields, workbook text, Parquet strings).
    Text(&'a str),
    /// A number stored as a number (workbooks, Parquet).
    Number(f64),
    /// A date or time stored as one (workbooks), written as ISO 8601 text.
    Date(&'a str),
    /// No value at all (an empty workbook cell, a Parquet null).
    Empty,
    /// A cell that cannot be read (a row of the wrong width): missing, and no problem of its own.
    Unread,
}

impl Cell<'_> {
    /// The cell as messages quote it.
    pub(super) fn shown(&self) -> String {
        match self {
            Cell::Text(text) | Cell::Date(text) => (*text).to_owned(),
            Cell::Number(value) => number_text(*value),
            Cell::Empty | Cell::Unread => String::new(),
        }
    }
}

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
    /// A new value past the cap on distinct values of a column without declared levels
    /// (reported once per column).
    TooManyLevels,
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
            CellProblem::TooManyLevels => Code::TooManyLevels,
        }
    }
}

/// A number as text: whole numbers below 2⁵³ without a decimal point (`3`, `-12`), others in
/// the shortest form that reads back the same (`2.5`, `1e-7`, `1e300`).
pub(super) fn number_text(value: f64) -> String {
    const EXACT: f64 = 9_007_199_254_740_992.0; // 2^53
    if value.fract() == 0.0 && value.abs() < EXACT {
        format!("{}", value + 0.0)
    } else if value.is_finite() && (1e-6..1e15).contains(&value.abs()) {
        format!("{value}")
    } else {
        format!("{value:?}")
    }
}

/// The codebook's missing tokens, ready to compare cells with.
#[derive(Debug, Clone, Default)]
pub(super) struct MissingTokens {
    tokens: Vec<String>,
    /// The tokens that read as numbers (a point as decimal mark), for number cells.
    numbers: Vec<f64>,
}

impl MissingTokens {
    pub(super) fn new(tokens: &[String]) -> Self {
        MissingTokens {
            numbers: tokens
                .iter()
                .filter_map(|t| parse_number(t, DecimalMark::Point).ok())
                .collect(),
            tokens: tokens.to_vec(),
        }
    }

    /// Whether a text cell is a missing token, as written or trimmed.
    pub(super) fn is_missing(&self, cell: &str) -> bool {
        if self.tokens.iter().any(|t| t == cell) {
            return true;
        }
        // Only a cell that starts or ends with a space (or a non-ASCII character, which may be
        // a space too) can trim to something else.
        let edge = |b: Option<&u8>| b.is_some_and(|&b| b.is_ascii_whitespace() || b >= 0x80);
        let bytes = cell.as_bytes();
        if !edge(bytes.first()) && !edge(bytes.last()) {
            return false;
        }
        let trimmed = cell.trim();
        self.tokens.iter().any(|t| t == trimmed)
    }

    /// Whether a number cell is a missing token.
    fn is_missing_number(&self, value: f64) -> bool {
        self.numbers.contains(&value)
    }
}

/// Distinct texts numbered in order of declaration or first appearance.
#[derive(Default)]
pub(super) struct Interner {
    table: HashTable<u32>,
    names: Names,
    hasher: FxBuildHasher,
}

impl std::fmt::Debug for Interner {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Interner")
            .field("names", &self.names)
            .finish()
    }
}

impl Interner {
    fn declared(levels: &[String]) -> Self {
        let mut interner = Interner::default();
        for level in levels {
            interner.intern(level);
        }
        interner
    }

    /// The code of `text`, if it has one. A few names are compared in turn, which is quicker
    /// than hashing (the usual factor has two to five levels); more are looked up by hash.
    fn find(&self, text: &str) -> Option<u32> {
        const FEW: usize = 8;
        if self.names.len() <= FEW {
            let code = self.names.iter().position(|name| name == text)?;
            return u32::try_from(code).ok();
        }
        let hash = self.hasher.hash_one(text);
        let names = &self.names;
        self.table
            .find(hash, |&code| names.get(code as usize) == Some(text))
            .copied()
    }

    /// The code of `text`, adding it when new. Codes are below the row cap, far below
    /// `u32::MAX`; should the count ever reach it, later new values share the last code.
    fn intern(&mut self, text: &str) -> u32 {
        if let Some(code) = self.find(text) {
            return code;
        }
        let code = u32::try_from(self.names.len()).unwrap_or(u32::MAX);
        let Interner {
            table,
            names,
            hasher,
        } = self;
        names.push(text);
        let hash = hasher.hash_one(text);
        table.insert_unique(hash, code, |&c| {
            hasher.hash_one(names.get(c as usize).unwrap_or_default())
        });
        code
    }

    fn len(&self) -> usize {
        self.names.len()
    }

    fn into_names(mut self) -> Names {
        self.names.shrink_to_fit();
        self.names
    }
}

/// How a column's texts become codes.
#[derive(Debug)]
pub(super) enum Vocabulary {
    /// Declared levels: any other value is a problem.
    Declared(Interner),
    /// Values in order of first appearance, at most `limit` of them (`None`: no cap, for ids).
    Open {
        interner: Interner,
        limit: Option<usize>,
        /// The cap was reached and reported.
        full: bool,
    },
}

impl Vocabulary {
    /// The code of `text`; `Ok(None)` for a new value past a cap already reported.
    fn code(&mut self, text: &str) -> Result<Option<u32>, CellProblem> {
        match self {
            Vocabulary::Declared(levels) => match levels.find(text) {
                Some(code) => Ok(Some(code)),
                None => Err(CellProblem::NotALevel),
            },
            Vocabulary::Open {
                interner,
                limit,
                full,
            } => {
                if let Some(code) = interner.find(text) {
                    return Ok(Some(code));
                }
                if limit.is_some_and(|most| interner.len() >= most) {
                    // Reported once; later new values are missing without more messages.
                    return match std::mem::replace(full, true) {
                        true => Ok(None),
                        false => Err(CellProblem::TooManyLevels),
                    };
                }
                Ok(Some(interner.intern(text)))
            }
        }
    }

    fn into_names(self) -> Names {
        match self {
            Vocabulary::Declared(interner) | Vocabulary::Open { interner, .. } => {
                interner.into_names()
            }
        }
    }
}

/// One column being read.
#[derive(Debug)]
pub(super) enum ColumnBuilder {
    Id {
        values: Vocabulary,
        codes: Codes,
    },
    Categorical {
        levels: Vocabulary,
        codes: Codes,
    },
    Numeric {
        ratio: bool,
        decimal: DecimalMark,
        values: Numbers,
    },
}

impl ColumnBuilder {
    /// A builder for a column of `kind`; `max_levels` caps the distinct values of a
    /// categorical column without declared levels.
    pub(super) fn new(kind: &ColumnKind, decimal: DecimalMark, max_levels: usize) -> Self {
        match kind {
            ColumnKind::Id => ColumnBuilder::Id {
                values: Vocabulary::Open {
                    interner: Interner::default(),
                    limit: None,
                    full: false,
                },
                codes: Codes::default(),
            },
            ColumnKind::Categorical {
                levels: Some(levels),
                ..
            } => ColumnBuilder::Categorical {
                levels: Vocabulary::Declared(Interner::declared(levels)),
                codes: Codes::default(),
            },
            ColumnKind::Categorical { levels: None, .. } => ColumnBuilder::Categorical {
                levels: Vocabulary::Open {
                    interner: Interner::default(),
                    limit: Some(max_levels),
                    full: false,
                },
                codes: Codes::default(),
            },
            ColumnKind::Numeric { ratio } => ColumnBuilder::Numeric {
                ratio: *ratio,
                decimal,
                values: Numbers::default(),
            },
        }
    }

    /// Reads the next row's cell.
    pub(super) fn push(&mut self, cell: Cell, missing: &MissingTokens) -> Result<(), CellProblem> {
        match self {
            ColumnBuilder::Id { values, codes } => push_code(values, codes, cell, missing, true),
            ColumnBuilder::Categorical { levels, codes } => {
                push_code(levels, codes, cell, missing, false)
            }
            ColumnBuilder::Numeric {
                ratio,
                decimal,
                values,
            } => {
                let read = read_number(cell, missing, *ratio, *decimal);
                values.push(read.unwrap_or(None));
                read.map(|_| ())
            }
        }
    }

    pub(super) fn finish(self) -> Column {
        match self {
            ColumnBuilder::Id { values, mut codes } => {
                codes.shrink_to_fit();
                Column::Id {
                    codes,
                    values: values.into_names(),
                }
            }
            ColumnBuilder::Categorical { levels, mut codes } => {
                codes.shrink_to_fit();
                Column::Categorical {
                    codes,
                    levels: levels.into_names(),
                }
            }
            ColumnBuilder::Numeric { mut values, .. } => {
                values.shrink_to_fit();
                Column::Numeric(values)
            }
        }
    }
}

/// Reads a categorical or id cell into `codes`.
fn push_code(
    vocabulary: &mut Vocabulary,
    codes: &mut Codes,
    cell: Cell,
    missing: &MissingTokens,
    is_id: bool,
) -> Result<(), CellProblem> {
    let number;
    let text = match cell {
        Cell::Text(text) | Cell::Date(text) => text,
        Cell::Number(value) => {
            number = number_text(value);
            number.as_str()
        }
        Cell::Unread => {
            codes.push(None);
            return Ok(());
        }
        Cell::Empty => "",
    };
    if matches!(cell, Cell::Empty) || missing.is_missing(text) {
        codes.push(None);
        return if is_id {
            Err(CellProblem::MissingId)
        } else {
            Ok(())
        };
    }
    let code = vocabulary.code(text);
    codes.push(code.unwrap_or(None));
    code.map(|_| ())
}

/// The value of a numeric cell: `Ok(None)` when missing.
fn read_number(
    cell: Cell,
    missing: &MissingTokens,
    ratio: bool,
    decimal: DecimalMark,
) -> Result<Option<f64>, CellProblem> {
    let value = match cell {
        Cell::Unread | Cell::Empty => return Ok(None),
        Cell::Text(text) if missing.is_missing(text) => return Ok(None),
        Cell::Text(text) => parse_number(text, decimal).map_err(|problem| match problem {
            NumberProblem::NotNumber(hint) => CellProblem::NotANumber(hint),
            NumberProblem::NotFinite(kind) => CellProblem::NotFinite(kind),
        })?,
        Cell::Date(_) => return Err(CellProblem::NotANumber(NotNumberHint::Date)),
        Cell::Number(value) if missing.is_missing_number(value) => return Ok(None),
        Cell::Number(value) if value.is_nan() => {
            return Err(CellProblem::NotFinite(NonFinite::NotANumber))
        }
        Cell::Number(value) if value.is_infinite() => {
            return Err(CellProblem::NotFinite(NonFinite::Infinity))
        }
        Cell::Number(value) => value + 0.0,
    };
    if ratio && value < 0.0 {
        return Err(CellProblem::Negative);
    }
    Ok(Some(value))
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

    fn missing() -> MissingTokens {
        MissingTokens::new(&strings(&["", "NA"]))
    }

    #[test]
    fn inferred_levels_follow_first_appearance() {
        let kind = ColumnKind::Categorical {
            levels: None,
            ordered: false,
        };
        let mut column = ColumnBuilder::new(&kind, DecimalMark::Point, 10);
        for cell in ["b", "a", "NA", "b", "c"] {
            assert_eq!(column.push(Cell::Text(cell), &missing()), Ok(()));
        }
        let Column::Categorical { codes, levels } = column.finish() else {
            panic!("a categorical column");
        };
        assert_eq!(
            codes.iter().collect::<Vec<_>>(),
            [Some(0), Some(1), None, Some(0), Some(2)]
        );
        assert_eq!(levels, ["b", "a", "c"]);
    }

    #[test]
    fn the_level_cap_is_reported_once() {
        let kind = ColumnKind::Categorical {
            levels: None,
            ordered: false,
        };
        let mut column = ColumnBuilder::new(&kind, DecimalMark::Point, 2);
        let results: Vec<_> = ["a", "b", "c", "a", "d"]
            .into_iter()
            .map(|c| column.push(Cell::Text(c), &missing()))
            .collect();
        assert_eq!(
            results,
            [
                Ok(()),
                Ok(()),
                Err(CellProblem::TooManyLevels),
                Ok(()),
                Ok(())
            ]
        );
    }

    #[test]
    fn number_cells_in_every_kind_of_column() {
        let tokens = MissingTokens::new(&strings(&["", "-99"]));
        let mut numeric =
            ColumnBuilder::new(&ColumnKind::Numeric { ratio: true }, DecimalMark::Point, 10);
        assert_eq!(numeric.push(Cell::Number(-99.0), &tokens), Ok(()));
        assert_eq!(numeric.push(Cell::Number(-0.0), &tokens), Ok(()));
        assert_eq!(
            numeric.push(Cell::Number(-1.0), &tokens),
            Err(CellProblem::Negative)
        );
        assert_eq!(
            numeric.push(Cell::Number(f64::NAN), &tokens),
            Err(CellProblem::NotFinite(NonFinite::NotANumber))
        );
        assert_eq!(
            numeric.push(Cell::Date("2024-03-01"), &tokens),
            Err(CellProblem::NotANumber(NotNumberHint::Date))
        );
        let Column::Numeric(values) = numeric.finish() else {
            panic!("a numeric column");
        };
        assert_eq!(
            values.iter().collect::<Vec<_>>(),
            [None, Some(0.0), None, None, None]
        );
        assert!(values.get(1).is_some_and(f64::is_sign_positive));
        let levels = ColumnKind::Categorical {
            levels: Some(strings(&["1", "2", "2.5"])),
            ordered: true,
        };
        let mut ordinal = ColumnBuilder::new(&levels, DecimalMark::Point, 10);
        for value in [1.0, 2.5, 2.0] {
            assert_eq!(ordinal.push(Cell::Number(value), &tokens), Ok(()));
        }
        assert_eq!(
            ordinal.push(Cell::Number(3.0), &tokens),
            Err(CellProblem::NotALevel)
        );
        let mut ids = ColumnBuilder::new(&ColumnKind::Id, DecimalMark::Point, 10);
        assert_eq!(ids.push(Cell::Empty, &tokens), Err(CellProblem::MissingId));
        assert_eq!(ids.push(Cell::Unread, &tokens), Ok(()));
    }

    #[test]
    fn numbers_as_text() {
        // Shortest round-trip texts, as Rust formats them (common practice).
        for (value, text) in [
            (3.0, "3"),
            (-12.0, "-12"),
            (-0.0, "0"),
            (2.5, "2.5"),
            (0.1, "0.1"),
            (1e-7, "1e-7"),
            (1e300, "1e300"),
            (123456.75, "123456.75"),
        ] {
            assert_eq!(number_text(value), text);
        }
    }

    #[test]
    fn missing_tokens_match_as_written_or_trimmed() {
        let tokens = MissingTokens::new(&strings(&["NA", "-"]));
        assert!(tokens.is_missing("NA"));
        assert!(tokens.is_missing(" - "));
        assert!(tokens.is_missing("\u{a0}NA"));
        assert!(!tokens.is_missing("na"));
        assert!(!tokens.is_missing(""));
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
