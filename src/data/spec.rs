//! What the data stage is asked to read: one file, how it is written, and the columns the
//! codebook declares.
//!
//! The checker builds the [`FileFormat`] of a `data` block (from the file's extension and the
//! block's `separator`, `decimal`, `encoding`, `sheet` and `cells` statements); the build turns
//! a checked block into a [`TableSpec`]. Everything here is already resolved: the path is
//! absolute (or relative to the working folder), defaults are applied to the missing tokens,
//! and every column knows the header it is read from.

use std::path::{Path, PathBuf};

use crate::diag::Span;

/// One data file and the columns to read from it.
#[derive(Debug, Clone, PartialEq)]
pub struct TableSpec {
    /// The file to read, already resolved against the spec file's folder.
    pub path: PathBuf,
    /// The path string in the spec; errors about the file as a whole point here.
    pub path_span: Span,
    /// How the file is written.
    pub format: FileFormat,
    /// Cell texts read as missing (the codebook default is `""` and `"NA"`).
    pub missing: Vec<String>,
    /// The declared columns, in declaration order. Undeclared columns of the file are ignored.
    pub columns: Vec<ColumnSpec>,
}

/// One declared variable and the file column it is read from.
#[derive(Debug, Clone, PartialEq)]
pub struct ColumnSpec {
    /// The variable's name in the spec.
    pub name: String,
    /// The header it is read from: `column("...")` when given, else the name.
    pub header: String,
    /// The declaration in the spec.
    pub decl_span: Span,
    pub kind: ColumnKind,
    /// Whether its cells are read. A column no figure being made uses is only looked for in
    /// the header (so a declaration the file lacks is still an error), and is not in the table.
    pub read: bool,
}

/// How the cells of a column are read.
#[derive(Debug, Clone, PartialEq)]
pub enum ColumnKind {
    /// Identifies the observational unit; any text except a missing token.
    Id,
    /// Nominal or ordinal categories.
    Categorical {
        /// The declared levels, complete and in display order; `None` = the distinct values in
        /// order of first appearance.
        levels: Option<Vec<String>>,
        ordered: bool,
    },
    /// Interval or ratio numbers; `ratio` columns have a true zero and reject negative values.
    Numeric { ratio: bool },
}

/// How a data file is written.
#[derive(Debug, Clone, PartialEq)]
pub enum FileFormat {
    /// Delimited text (CSV, TSV and their dialects).
    Text(TextFormat),
    /// An Excel workbook (`.xlsx`).
    Workbook(WorkbookFormat),
    /// An Apache Parquet file.
    Parquet,
}

impl FileFormat {
    /// The format a file's name implies before any statement of its block: `.xlsx` is a
    /// workbook, `.parquet` (or `.parq`) Parquet, `.tsv` tab-separated text, anything else
    /// comma-separated text (extensions in any letter case).
    pub fn for_path(path: &Path) -> FileFormat {
        let extension = path
            .extension()
            .and_then(|e| e.to_str())
            .map(str::to_ascii_lowercase);
        match extension.as_deref() {
            Some("xlsx") => FileFormat::Workbook(WorkbookFormat::default()),
            Some("parquet" | "parq") => FileFormat::Parquet,
            Some("tsv") => FileFormat::Text(TextFormat {
                separator: Separator::Tab,
                ..TextFormat::default()
            }),
            _ => FileFormat::Text(TextFormat::default()),
        }
    }

    /// The kind of file in words, for messages: "a text file", "a workbook", "a Parquet file".
    pub fn kind_words(&self) -> &'static str {
        match self {
            FileFormat::Text(_) => "a text file",
            FileFormat::Workbook(_) => "a workbook",
            FileFormat::Parquet => "a Parquet file",
        }
    }
}

/// The dialect of a delimited text file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct TextFormat {
    pub separator: Separator,
    pub decimal: DecimalMark,
    pub encoding: &'static encoding_rs::Encoding,
}

impl Default for TextFormat {
    fn default() -> Self {
        TextFormat {
            separator: Separator::Comma,
            decimal: DecimalMark::Point,
            encoding: encoding_rs::UTF_8,
        }
    }
}

/// The character between fields of a text file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Separator {
    Comma,
    Semicolon,
    Tab,
    Pipe,
}

impl Separator {
    /// Every separator, in the order help lines list them.
    pub const ALL: [Separator; 4] = [
        Separator::Comma,
        Separator::Semicolon,
        Separator::Tab,
        Separator::Pipe,
    ];

    /// The byte between fields.
    pub fn byte(self) -> u8 {
        match self {
            Separator::Comma => b',',
            Separator::Semicolon => b';',
            Separator::Tab => b'\t',
            Separator::Pipe => b'|',
        }
    }

    /// Its name in the spec: `separator semicolon`.
    pub fn word(self) -> &'static str {
        match self {
            Separator::Comma => "comma",
            Separator::Semicolon => "semicolon",
            Separator::Tab => "tab",
            Separator::Pipe => "pipe",
        }
    }

    /// Its plural in messages: "separated by semicolons".
    pub fn plural(self) -> &'static str {
        match self {
            Separator::Comma => "commas",
            Separator::Semicolon => "semicolons",
            Separator::Tab => "tabs",
            Separator::Pipe => "vertical bars",
        }
    }

    /// The separator written by `word`.
    pub fn from_word(word: &str) -> Option<Separator> {
        Separator::ALL.into_iter().find(|s| s.word() == word)
    }
}

/// The character between the whole and the fractional part of a number in a text file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DecimalMark {
    /// `3.5`
    Point,
    /// `3,5`
    Comma,
}

impl DecimalMark {
    /// Its name in the spec: `decimal comma`.
    pub fn word(self) -> &'static str {
        match self {
            DecimalMark::Point => "point",
            DecimalMark::Comma => "comma",
        }
    }

    pub fn from_word(word: &str) -> Option<DecimalMark> {
        [DecimalMark::Point, DecimalMark::Comma]
            .into_iter()
            .find(|d| d.word() == word)
    }
}

/// Which part of a workbook is read.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct WorkbookFormat {
    /// The sheet's name; `None` = the first sheet.
    pub sheet: Option<String>,
    /// The block of cells holding the table (its first row is the header); `None` = the
    /// whole sheet.
    pub cells: Option<CellRange>,
}

/// A rectangle of cells, like `B2:F200`; rows and columns 0-based and inclusive.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct CellRange {
    pub first_row: u32,
    pub first_column: u32,
    pub last_row: u32,
    pub last_column: u32,
}

impl CellRange {
    /// Reads `A1:D20` (letters and row numbers as a spreadsheet shows them, any letter case);
    /// `None` for anything else, or when the first cell is below or right of the last.
    pub fn parse(text: &str) -> Option<CellRange> {
        let (first, last) = text.split_once(':')?;
        let (first_row, first_column) = cell_reference(first)?;
        let (last_row, last_column) = cell_reference(last)?;
        (first_row <= last_row && first_column <= last_column).then_some(CellRange {
            first_row,
            first_column,
            last_row,
            last_column,
        })
    }

    pub fn contains(&self, row: u32, column: u32) -> bool {
        (self.first_row..=self.last_row).contains(&row)
            && (self.first_column..=self.last_column).contains(&column)
    }
}

/// Largest row and column of a workbook sheet (1 048 576 rows, 16 384 columns: `XFD`).
const SHEET_ROWS: u32 = 1 << 20;
const SHEET_COLUMNS: u32 = 1 << 14;

/// `C14` → (13, 2), 0-based.
fn cell_reference(text: &str) -> Option<(u32, u32)> {
    let split = text.find(|c: char| c.is_ascii_digit())?;
    let (letters, digits) = text.split_at(split);
    if letters.is_empty() || letters.len() > 3 || !letters.chars().all(|c| c.is_ascii_alphabetic())
    {
        return None;
    }
    if !digits.chars().all(|c| c.is_ascii_digit()) || digits.starts_with('0') {
        return None;
    }
    let row: u32 = digits.parse().ok()?;
    let column = letters.bytes().fold(0u32, |n, b| {
        n * 26 + u32::from(b.to_ascii_uppercase() - b'A' + 1)
    });
    (row <= SHEET_ROWS && column <= SHEET_COLUMNS).then(|| (row - 1, column - 1))
}

/// The letters of a 0-based column: 0 → `A`, 27 → `AB`.
pub fn column_letters(column: u32) -> String {
    let mut n = u64::from(column) + 1;
    let mut letters = Vec::new();
    while n > 0 {
        let digit = ((n - 1) % 26) as u8;
        letters.push(char::from(b'A' + digit));
        n = (n - 1) / 26;
    }
    letters.iter().rev().collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cell_ranges_read_as_a_spreadsheet_shows_them() {
        assert_eq!(
            CellRange::parse("b2:F200"),
            Some(CellRange {
                first_row: 1,
                first_column: 1,
                last_row: 199,
                last_column: 5
            })
        );
        assert_eq!(
            CellRange::parse("A1:XFD1048576").map(|r| (r.last_row, r.last_column)),
            Some((1_048_575, 16_383))
        );
        for bad in [
            "A1",
            "A0:B2",
            "B2:A1",
            "A1:XFE1",
            "1A:B2",
            "A1:B1048577",
            "A01:B2",
            "",
        ] {
            assert_eq!(CellRange::parse(bad), None, "{bad}");
        }
    }

    #[test]
    fn column_letters_count_like_a_spreadsheet() {
        // Common practice: A..Z, then AA..AZ, BA.., ZZ, AAA; XFD is the last column.
        for (n, letters) in [
            (0, "A"),
            (25, "Z"),
            (26, "AA"),
            (27, "AB"),
            (701, "ZZ"),
            (702, "AAA"),
        ] {
            assert_eq!(column_letters(n), letters);
        }
        assert_eq!(column_letters(16_383), "XFD");
    }

    #[test]
    fn file_names_choose_the_format() {
        let text = |p: &str| match FileFormat::for_path(Path::new(p)) {
            FileFormat::Text(t) => Some(t.separator),
            _ => None,
        };
        assert_eq!(text("a.csv"), Some(Separator::Comma));
        assert_eq!(text("a.TSV"), Some(Separator::Tab));
        assert_eq!(text("a.txt"), Some(Separator::Comma));
        assert!(matches!(
            FileFormat::for_path(Path::new("a.XLSX")),
            FileFormat::Workbook(_)
        ));
        assert_eq!(
            FileFormat::for_path(Path::new("a.parquet")),
            FileFormat::Parquet
        );
    }
}
