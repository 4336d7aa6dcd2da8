//! Every diagnostic code, in one table.
//!
//! Each row gives the code's name (used in the code), its stable text (`F0101`), its severity
//! and its meaning in one line. The language reference's code table (§13) is generated from
//! this table and a test fails when they drift apart (`tests/codes.rs`); the coverage tests
//! iterate [`Code::ALL`]. A code never changes meaning once released; new problems get new
//! codes.
//!
//! Ranges: `F00xx` syntax, `F01xx` rules of the language, `F02xx` form of statements and files,
//! `W00xx` warnings, `D00xx` data files, `P00xx` project files.

use super::Severity;

macro_rules! code_table {
    ($($name:ident = $text:literal, $severity:ident, $meaning:literal;)*) => {
        /// A stable diagnostic code.
        #[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
        pub enum Code {
            $(#[doc = $meaning] $name,)*
        }

        impl Code {
            /// Every code, in the order of the table.
            pub const ALL: &'static [Code] = &[$(Code::$name,)*];

            /// The code as users see it, e.g. `F0101`.
            pub fn as_str(self) -> &'static str {
                match self {
                    $(Code::$name => $text,)*
                }
            }

            /// How serious a diagnostic with this code is.
            pub fn severity(self) -> Severity {
                match self {
                    $(Code::$name => Severity::$severity,)*
                }
            }

            /// What the code means, in one line.
            pub fn meaning(self) -> &'static str {
                match self {
                    $(Code::$name => $meaning,)*
                }
            }
        }
    };
}

code_table! {
    // Syntax errors, found while reading a spec file.
    Unexpected = "F0001", Error, "The text does not fit here: the message says what would fit and what was found.";
    UnclosedString = "F0002", Error, "A string is not closed before the end of its line.";
    UnknownEscape = "F0003", Error, "A `\\` in a string is followed by something other than `\"`, `\\` or `n`.";
    UnclosedBlock = "F0004", Error, "A block's `{` has no `}`.";
    UnmatchedBrace = "F0005", Error, "A `}` outside any block.";
    UnclosedParen = "F0006", Error, "A `(` with no `)` before the statement, block or file ends.";
    UnmatchedParen = "F0007", Error, "A `)` with nothing to close.";
    NumberTooLarge = "F0008", Error, "A number beyond the range of a double-precision number.";
    SizeWithoutUnit = "F0009", Error, "A side of a size `W x H` without a unit.";
    UnknownUnit = "F0010", Error, "A number followed by letters that are not a unit (`mm`, `cm`, `in`, `pt`).";
    DetachedUnit = "F0011", Error, "A unit written apart from its number (`85 mm`).";
    IncludeInBlock = "F0012", Error, "An `include` line inside a block.";
    TooDeep = "F0013", Error, "Parentheses or a filter nested too deeply to read.";
    StrayCharacter = "F0014", Error, "A character that is only allowed inside a string, or a `-` in a name.";
    AssignmentInFilter = "F0015", Error, "A filter uses `=` where `==` is meant.";
    BareFilterValue = "F0016", Error, "A filter compares with a bare word instead of a string or a number.";
    OutsideBlock = "F0017", Error, "A statement at the top level, outside any block.";
    SpaceBeforeParen = "F0018", Error, "A space between an option's name and its `(`.";
    TooManySyntaxErrors = "F0019", Error, "Reading stopped after too many syntax errors.";
    NotTextInString = "F0020", Error, "A string holds a character text cannot hold (a control character, U+FFFE, U+FFFF).";

    // Rules of the language: what a figure may show.
    UnknownVariable = "F0101", Error, "A variable name that is not declared.";
    HistogramOfCategories = "F0102", Error, "A layer that needs a numeric x (`histogram`, `density`, ...) over a nominal or ordinal x.";
    CountsOfNumbers = "F0103", Error, "`counts` of an interval or ratio variable.";
    MeanOfCategories = "F0104", Error, "`mean` of a nominal or ordinal `y`.";
    MedianOfNominal = "F0105", Error, "`median` or `box` of a nominal `y`.";
    OrdinalReordered = "F0106", Error, "`order(count)` or `order(name)` on an ordinal axis.";
    NotCategorical = "F0107", Error, "`panels`, `colour` or a categorical axis on a numeric variable or an id.";
    LinesAcrossSubjects = "F0108", Error, "`lines` or `flows` not by the subject, or across a between factor.";
    SubjectRepeatedInCell = "F0109", Error, "A subject has more than one value in one cell (found in the data).";
    WithinIntervalNotWithin = "F0110", Error, "A within-subject interval where x is not a within factor, or without a subject.";
    LevelOutOfRange = "F0111", Error, "An interval level outside (0, 1).";
    BarWithoutZero = "F0112", Error, "`mean bar` on an interval `y`.";
    LogOfInterval = "F0113", Error, "`scale(log)` on an interval variable or a categorical axis.";
    LogOfZero = "F0114", Error, "A value at or below zero on a log axis (found in the data).";
    YMissing = "F0115", Error, "A layer that shows values on `y` without a `y`.";
    YNotUsed = "F0116", Error, "A layer that draws its own heights in a figure with `y`.";
    YNotNumeric = "F0117", Error, "A layer that needs a numeric `y` was given a categorical one or an id.";
    LayerDoesNotFit = "F0118", Error, "A layer that does not fit the figure's axes or its other layers.";
    TooManyColours = "F0119", Error, "More levels to tell apart by colour than the palette has colours (found in the data).";
    EmptyFilter = "F0120", Error, "A `where` filter that keeps no rows of the data (found in the data).";
    BetweenVariesWithinSubject = "F0121", Error, "A subject listed at two levels of a `between` factor (found in the data).";
    WithinNeverRepeated = "F0122", Error, "A `within` factor at which no subject was measured at two levels (found in the data).";
    BeyondDoubleRange = "F0123", Error, "A statistic of the data beyond the range of double-precision numbers (found in the data).";
    FigureCrowded = "F0124", Error, "The figure's content does not fit its size: text would overlap, shrink below 6 pt or leave the page (found when it is laid out).";
    JoinWithoutOrder = "F0125", Error, "`mean join` across an x whose levels have no order: a nominal x that is not a within factor with declared levels, or an x reordered by `order(...)`.";
    SmoothTooLarge = "F0126", Error, "`smooth` of more pairs in one panel and colour group than LOWESS is computed for (found in the data).";

    // Form of statements and files.
    UnknownStatement = "F0201", Error, "A statement word that does not exist in this kind of block.";
    UnknownOption = "F0202", Error, "An option the statement does not take.";
    Repeated = "F0203", Error, "A statement or option given twice.";
    BadArgument = "F0204", Error, "An argument of the wrong kind, count or value.";
    MissingStatement = "F0205", Error, "A required part is missing (`from`, `x`, a layer, `by(...)`).";
    UnknownData = "F0206", Error, "`from` names a data block that is not visible from the file.";
    DuplicateName = "F0207", Error, "A name declared twice (variable, data block or figure).";
    UnknownScale = "F0208", Error, "An unknown level of measurement in a declaration.";
    OrdinalWithoutLevels = "F0209", Error, "An ordinal variable without `levels(...)`.";
    LevelsMismatch = "F0210", Error, "`labels(...)` of another length than `levels(...)`, or a level listed twice.";
    BadDesign = "F0211", Error, "A design statement (`subject`, `within`, `between`) naming the wrong kind of variable.";
    UnknownBlock = "F0212", Error, "A block kind other than `data` and `figure`.";
    OutOfLimits = "F0213", Error, "A size, dpi or other setting outside the supported limits.";
    BadFilter = "F0214", Error, "A filter value the variable cannot take, or a comparison its scale forbids.";
    IncludeMissing = "F0220", Error, "An included file that does not exist.";
    IncludeCycle = "F0221", Error, "Files that include each other in a cycle.";
    SpecNotUtf8 = "F0222", Error, "A spec file that is not UTF-8 text.";
    MoreErrors = "F0223", Error, "More problems in a spec file than are shown (a warning when every hidden one is).";
    IncludeTooDeep = "F0224", Error, "Files that include each other more deeply than the limit.";
    OutsideProject = "F0225", Error, "A data or include path that leads outside the project folder.";

    // Warnings.
    MeanAlone = "W0001", Warning, "A `mean` with no layer that shows the values or their spread.";
    BarWithoutPoints = "W0002", Warning, "`mean bar` without `points`.";
    CrowdingAllowed = "W0003", Warning, "The figure's content does not fit its size, and `--allow-crowding` built it anyway.";
    ManyPoints = "W0004", Warning, "`points` with more values in one cell than dots can show apart (found in the data).";
    MarkupUnclosed = "W0005", Warning, "A label-markup mark (`^`, `_`, `*`) that opens styled text and is never closed: shown as written.";
    NotGreek = "W0006", Warning, "`@NAME` in a label that names no Greek letter: shown as written.";
    MissingGlyph = "W0007", Warning, "Text holds a character the bundled font cannot draw.";
    TextTooSmall = "W0008", Warning, "Text smaller at the printed size than the journal's least size (`[journal] min-text`; found when laid out).";
    LineTooThin = "W0009", Warning, "Lines thinner than the journal's least width (`[journal] min-line`; found when laid out).";
    LowResolution = "W0010", Warning, "A PNG or TIFF below the journal's least resolution (`[journal] dpi`).";
    TooWide = "W0011", Warning, "A figure wider than the journal's widest column (`[journal] widths`).";
    ColoursTooClose = "W0012", Warning, "Two colours of a variable's levels that readers with a colour-vision deficiency may not tell apart.";
    ColoursAlikeInGrey = "W0013", Warning, "A figure's group colours look alike in greyscale, and no shapes or dashes tell the groups apart.";
    MeansAtScatteredX = "W0014", Warning, "`mean` over a numeric x whose values the data do not share: most means are of a single value (found in the data).";
    SmoothTooFewPairs = "W0015", Warning, "`smooth` of a colour group with too few pairs for local lines: no curve is drawn for it (found in the data).";
    FewValues = "W0016", Warning, "A layer drawn from fewer values than it needs: a box or violin of fewer than 5 values without `points`, a difference without values at its reference level (found in the data).";

    // Data files.
    Unreadable = "D0001", Error, "The data file is missing, a folder, or cannot be read.";
    TooLarge = "D0002", Error, "The data file is larger than the size limit.";
    NotUtf8 = "D0003", Error, "The data file is not UTF-8 text.";
    NulByte = "D0004", Error, "The data file holds a NUL byte (UTF-16, or not text).";
    EmptyFile = "D0005", Error, "The data file has no header row.";
    HeaderOnly = "D0006", Error, "The data file has a header row and no data rows.";
    Malformed = "D0007", Error, "A quoted field is never closed, or the file is not a table.";
    MissingColumn = "D0008", Error, "A declared column is not in the header.";
    DuplicateHeader = "D0009", Error, "A declared column's header appears more than once.";
    RaggedRow = "D0010", Error, "A row has more or fewer fields than the header.";
    NotALevel = "D0011", Error, "A categorical value outside the declared levels.";
    NotANumber = "D0012", Error, "A value that is not a number in a numeric column.";
    NotFinite = "D0013", Error, "`nan`, `inf` or a number too large for a double.";
    NegativeRatio = "D0014", Error, "A negative value in a ratio column.";
    MissingId = "D0015", Error, "A missing value in an id column.";
    MoreDataErrors = "D0016", Error, "More data errors in the file than are shown.";
    NotTextChar = "D0020", Error, "The data file holds a character text cannot hold (a control character, U+FFFE, U+FFFF).";
    RowTooLong = "D0021", Error, "A row of a text file longer than the limit.";
    TooManyLevels = "D0022", Error, "More distinct values of a variable without declared levels than the limit.";
    TooManyRows = "D0023", Error, "More data rows than the limit.";
    NotAWorkbook = "D0024", Error, "A workbook that cannot be read.";
    NoSheet = "D0025", Error, "The sheet or cells the data block names are not in the workbook.";
    NotParquet = "D0026", Error, "A Parquet file that cannot be read.";
    ColumnType = "D0027", Error, "A Parquet column whose type cannot hold the declared variable's values.";

    // Project files.
    NotToml = "P0001", Error, "`figura.toml` is not valid TOML.";
    UnknownKey = "P0002", Error, "A table or key that `figura.toml` does not have.";
    BadValue = "P0003", Error, "A value of the wrong type, or outside its limits, in `figura.toml`.";
    SpecsOutsideProject = "P0004", Error, "A spec or output folder outside the project folder that `allow-outside` does not open.";
}

impl std::fmt::Display for Code {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

impl PartialEq<&str> for Code {
    fn eq(&self, other: &&str) -> bool {
        self.as_str() == *other
    }
}

impl PartialEq<str> for Code {
    fn eq(&self, other: &str) -> bool {
        self.as_str() == other
    }
}

/// The families of codes, in the order of the reference, with the heading of each.
pub const FAMILIES: &[(&str, &str)] = &[
    ("F00", "Syntax errors"),
    ("F01", "Rules of the language"),
    ("F02", "Form of statements and files"),
    ("W00", "Warnings"),
    ("D00", "Data errors"),
    ("P00", "Project file errors"),
];

/// The reference's table of codes (§13), as Markdown: one row per code, in the order of the
/// table, with the family it belongs to.
pub fn reference_table() -> String {
    let mut out = String::from("| code | kind | severity | meaning |\n|---|---|---|---|\n");
    for c in Code::ALL {
        let family = FAMILIES
            .iter()
            .find(|(prefix, _)| c.as_str().starts_with(prefix))
            .map_or("", |(_, heading)| heading);
        let severity = match c.severity() {
            Severity::Error => "error",
            Severity::Warning => "warning",
        };
        out.push_str(&format!(
            "| `{c}` | {family} | {severity} | {} |\n",
            c.meaning()
        ));
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_unique_and_well_formed() {
        let mut seen = std::collections::BTreeSet::new();
        for c in Code::ALL {
            let text = c.as_str();
            assert!(seen.insert(text), "{text} is in the table twice");
            assert_eq!(text.len(), 5, "{text}");
            assert!(FAMILIES.iter().any(|(p, _)| text.starts_with(p)), "{text}");
            assert_eq!(
                c.severity() == Severity::Warning,
                text.starts_with('W'),
                "{text}: warnings are exactly the W codes"
            );
        }
    }
}
