//! Stable codes of the checker's diagnostics (documented in `grammar/README.md`).
//!
//! `F01xx` are the rules of the language contract (§4 of the reference), `F02xx` are errors in
//! the form of a statement, `W00xx` are warnings. A code never changes meaning once released.

/// A variable name that is not declared.
pub const UNKNOWN_VARIABLE: &str = "F0101";
/// `histogram` (or `density`) of a nominal or ordinal variable.
pub const HISTOGRAM_OF_CATEGORIES: &str = "F0102";
/// `counts` of an interval or ratio variable.
pub const COUNTS_OF_NUMBERS: &str = "F0103";
/// `mean` of a nominal or ordinal `y`.
pub const MEAN_OF_CATEGORIES: &str = "F0104";
/// `median` or `box` of a nominal `y` (or `box` of an ordinal one).
pub const MEDIAN_OF_NOMINAL: &str = "F0105";
/// `order(count)` or `order(name)` on an ordinal axis.
pub const ORDINAL_REORDERED: &str = "F0106";
/// `panels`, `colour` or a categorical axis on a numeric variable or an id.
pub const NOT_CATEGORICAL: &str = "F0107";
/// `lines by(ID)` where ID is not the subject or x is a between factor.
pub const LINES_ACROSS_SUBJECTS: &str = "F0108";
/// A subject has more than one value in one cell (found in the data).
pub const SUBJECT_REPEATED_IN_CELL: &str = "F0109";
/// `ci(L, within)` where x is not a within factor.
pub const WITHIN_INTERVAL_NOT_WITHIN: &str = "F0110";
/// An interval level outside (0, 1).
pub const LEVEL_OUT_OF_RANGE: &str = "F0111";
/// `mean bar` on an interval `y`.
pub const BAR_WITHOUT_ZERO: &str = "F0112";
/// `scale(log)` on an interval variable.
pub const LOG_OF_INTERVAL: &str = "F0113";
/// `scale(log)` on ratio data with a zero (found in the data).
pub const LOG_OF_ZERO: &str = "F0114";
/// `y` missing for a layer that needs it.
pub const Y_MISSING: &str = "F0115";
/// `y` present for a layer that has none.
pub const Y_NOT_USED: &str = "F0116";
/// A layer that needs a numeric `y` was given a categorical one.
pub const Y_NOT_NUMERIC: &str = "F0117";
/// A layer over a numeric `x` was given a second numeric `y` it cannot use, or vice versa.
pub const LAYER_DOES_NOT_FIT: &str = "F0118";
/// More levels to tell apart by colour than the palette has colours (found in the data).
pub const TOO_MANY_COLOURS: &str = "F0119";

/// A statement word that does not exist in this block.
pub const UNKNOWN_STATEMENT: &str = "F0201";
/// An option a statement does not take.
pub const UNKNOWN_OPTION: &str = "F0202";
/// A statement or option given twice.
pub const REPEATED: &str = "F0203";
/// An argument of the wrong kind, count or value.
pub const BAD_ARGUMENT: &str = "F0204";
/// A required statement (`from`, `x`, a layer) is missing.
pub const MISSING_STATEMENT: &str = "F0205";
/// `from` names a data block that is not visible.
pub const UNKNOWN_DATA: &str = "F0206";
/// A name declared twice (variable, data block or figure).
pub const DUPLICATE_NAME: &str = "F0207";
/// An unknown scale word in a declaration.
pub const UNKNOWN_SCALE: &str = "F0208";
/// An ordinal variable without `levels(...)`.
pub const ORDINAL_WITHOUT_LEVELS: &str = "F0209";
/// `labels(...)` of another length than `levels(...)`, or a repeated level.
pub const LEVELS_MISMATCH: &str = "F0210";
/// A design statement (`subject`, `within`, `between`) naming the wrong kind of variable.
pub const BAD_DESIGN: &str = "F0211";
/// A block kind other than `data` and `figure`.
pub const UNKNOWN_BLOCK: &str = "F0212";
/// A size, dpi or other resource outside the supported limits.
pub const OUT_OF_LIMITS: &str = "F0213";
/// A level in a filter that the variable does not declare, or a comparison its scale forbids.
pub const BAD_FILTER: &str = "F0214";
/// An included file that does not exist.
pub const INCLUDE_MISSING: &str = "F0220";
/// Files that include each other in a cycle.
pub const INCLUDE_CYCLE: &str = "F0221";
/// A spec file that is not UTF-8 text.
pub const SPEC_NOT_UTF8: &str = "F0222";
/// The summary of a spec file's problems past the per-file cap.
pub const MORE_ERRORS: &str = "F0223";
/// Files that include each other more deeply than the limit.
pub const INCLUDE_TOO_DEEP: &str = "F0224";
/// A data or include path that leads outside the project folder.
pub const OUTSIDE_PROJECT: &str = "F0225";

/// `mean` with no layer that shows spread or the individual values.
pub const MEAN_ALONE: &str = "W0001";
/// `mean bar` without `points`.
pub const BAR_WITHOUT_POINTS: &str = "W0002";
