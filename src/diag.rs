//! Diagnostics: the data every stage reports problems with, kept apart from how they are shown.
//!
//! A [`Diagnostic`] has a stable code (`F0xxx` for spec errors, `D0xxx` for data errors,
//! `W0xxx` for warnings), a one-line message, labelled spans into source texts held by a
//! [`SourceMap`], and a help line that says how to fix it. Spans are byte ranges into one
//! source; line and column are computed only when a diagnostic is printed (see [`crate::report`]).
//!
//! Invariant: no stage stops at its first problem. Stages collect every diagnostic they can
//! find and return them together.

use std::path::{Path, PathBuf};
use std::sync::OnceLock;

pub mod codes;

pub use codes::Code;

/// Index of a source text in a [`SourceMap`].
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct SourceId(pub u32);

/// A byte range `[start, end)` in one source text.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub struct Span {
    pub source: SourceId,
    pub start: usize,
    pub end: usize,
}

impl Span {
    pub fn new(source: SourceId, start: usize, end: usize) -> Self {
        debug_assert!(start <= end);
        Span { source, start, end }
    }

    /// The smallest span covering both (which must be in the same source).
    pub fn to(self, other: Span) -> Span {
        Span::new(
            self.source,
            self.start.min(other.start),
            self.end.max(other.end),
        )
    }

    pub fn len(&self) -> usize {
        self.end - self.start
    }

    pub fn is_empty(&self) -> bool {
        self.start == self.end
    }
}

/// One text that diagnostics can point into: a spec file or a data file.
#[derive(Debug, Clone)]
pub struct SourceFile {
    pub path: PathBuf,
    pub text: String,
    /// Byte offset of the start of every line, computed once when first needed.
    line_starts: OnceLock<Vec<usize>>,
}

impl SourceFile {
    /// Byte offsets where lines start: 0, then after every `\n`, `\r\n` or lone `\r`.
    pub fn line_starts(&self) -> &[usize] {
        self.line_starts.get_or_init(|| {
            let bytes = self.text.as_bytes();
            let mut starts = vec![0];
            for (i, &b) in bytes.iter().enumerate() {
                let breaks = b == b'\n' || (b == b'\r' && bytes.get(i + 1) != Some(&b'\n'));
                if breaks {
                    starts.push(i + 1);
                }
            }
            starts
        })
    }

    /// 0-based index of the line holding byte `offset` (clamped to the text).
    pub fn line_index(&self, offset: usize) -> usize {
        let offset = offset.min(self.text.len());
        self.line_starts().partition_point(|&s| s <= offset) - 1
    }

    /// The byte range of line `index` (0-based), without its line break.
    pub fn line_range(&self, index: usize) -> std::ops::Range<usize> {
        let starts = self.line_starts();
        let start = starts[index.min(starts.len() - 1)];
        let next = starts.get(index + 1).copied().unwrap_or(self.text.len());
        let bytes = self.text.as_bytes();
        let mut end = next;
        if end > start && bytes[end - 1] == b'\n' {
            end -= 1;
        }
        if end > start && bytes[end - 1] == b'\r' {
            end -= 1;
        }
        start..end
    }

    /// The number of lines (a text without a line break has one).
    pub fn line_count(&self) -> usize {
        self.line_starts().len()
    }
}

/// Every source text read in one run, addressed by [`SourceId`].
#[derive(Debug, Default, Clone)]
pub struct SourceMap {
    files: Vec<SourceFile>,
}

impl SourceMap {
    pub fn new() -> Self {
        SourceMap::default()
    }

    /// Adds a text and returns its id. The same path may be added twice (ids differ).
    pub fn add(&mut self, path: impl Into<PathBuf>, text: impl Into<String>) -> SourceId {
        let id = SourceId(self.files.len() as u32);
        self.files.push(SourceFile {
            path: path.into(),
            text: text.into(),
            line_starts: OnceLock::new(),
        });
        id
    }

    /// Every source text, in the order added.
    pub fn files(&self) -> &[SourceFile] {
        &self.files
    }

    pub fn get(&self, id: SourceId) -> &SourceFile {
        &self.files[id.0 as usize]
    }

    pub fn path(&self, id: SourceId) -> &Path {
        &self.get(id).path
    }

    pub fn text(&self, id: SourceId) -> &str {
        &self.get(id).text
    }

    /// The text a span covers.
    pub fn slice(&self, span: Span) -> &str {
        &self.text(span.source)[span.start..span.end]
    }

    /// 1-based line and column (in characters) of a byte offset. Lines end at `\n`, `\r\n`
    /// or a lone `\r`; the work is a binary search plus the length of the line's start.
    pub fn line_col(&self, id: SourceId, offset: usize) -> (usize, usize) {
        let file = self.get(id);
        let mut offset = offset.min(file.text.len());
        while !file.text.is_char_boundary(offset) {
            offset -= 1;
        }
        let line = file.line_index(offset);
        let line_start = file.line_starts()[line];
        let col = file.text[line_start..offset].chars().count() + 1;
        (line + 1, col)
    }
}

/// How serious a diagnostic is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Severity {
    Warning,
    Error,
}

/// A span with a short text shown under it.
#[derive(Debug, Clone, PartialEq)]
pub struct Label {
    pub span: Span,
    pub text: String,
}

/// One problem found in a spec or a data file.
#[derive(Debug, Clone, PartialEq)]
pub struct Diagnostic {
    pub severity: Severity,
    /// Stable code, e.g. `F0002`; documented in the language reference.
    pub code: Code,
    /// One line, plain words, no trailing full stop.
    pub message: String,
    /// The first label is the primary location.
    pub labels: Vec<Label>,
    /// How to fix it.
    pub help: Option<String>,
    /// The file the problem is about, when the labels do not point into it: an unreadable
    /// data file, or the data file whose rows a message about the data counts in.
    pub file: Option<PathBuf>,
}

impl Diagnostic {
    /// A diagnostic with `code`'s severity (from the table in [`codes`]).
    pub fn new(code: Code, message: impl Into<String>) -> Self {
        Diagnostic {
            severity: code.severity(),
            code,
            message: message.into(),
            labels: Vec::new(),
            help: None,
            file: None,
        }
    }

    /// Adds a labelled span (the first one added is the primary location).
    pub fn with_label(mut self, span: Span, text: impl Into<String>) -> Self {
        self.labels.push(Label {
            span,
            text: text.into(),
        });
        self
    }

    pub fn with_help(mut self, help: impl Into<String>) -> Self {
        self.help = Some(help.into());
        self
    }

    pub fn with_file(mut self, file: impl Into<PathBuf>) -> Self {
        self.file = Some(file.into());
        self
    }

    pub fn is_error(&self) -> bool {
        self.severity == Severity::Error
    }

    /// The primary span, if any.
    pub fn span(&self) -> Option<Span> {
        self.labels.first().map(|l| l.span)
    }
}

/// The closest of `candidates` to `name`, when it is close enough to be a likely typo.
///
/// Uses Levenshtein distance on lower-cased text; a candidate qualifies when the distance is at
/// most a third of the longer length (at least 1). Ties go to the earlier candidate.
pub fn did_you_mean<'a>(
    name: &str,
    candidates: impl IntoIterator<Item = &'a str>,
) -> Option<&'a str> {
    let wanted = name.to_lowercase();
    let mut best: Option<(&str, usize)> = None;
    for cand in candidates {
        let d = strsim::levenshtein(&wanted, &cand.to_lowercase());
        let limit = (wanted.chars().count().max(cand.chars().count()) / 3).max(1);
        if d <= limit && best.is_none_or(|(_, bd)| d < bd) {
            best = Some((cand, d));
        }
    }
    best.map(|(c, _)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn suggests_close_names_only() {
        let names = ["speed", "session", "medium"];
        assert_eq!(did_you_mean("sped", names), Some("speed"));
        assert_eq!(did_you_mean("Medium", names), Some("medium"));
        assert_eq!(did_you_mean("altitude", names), None);
    }

    #[test]
    fn line_and_column_are_one_based() {
        let mut map = SourceMap::new();
        let id = map.add("a.figura", "ab\ncdé\nf");
        assert_eq!(map.line_col(id, 0), (1, 1));
        assert_eq!(map.line_col(id, 3), (2, 1));
        assert_eq!(map.line_col(id, 7), (2, 4));
    }
}
