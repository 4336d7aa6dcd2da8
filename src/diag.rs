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

    /// 1-based line and column (in characters) of a byte offset.
    pub fn line_col(&self, id: SourceId, offset: usize) -> (usize, usize) {
        let text = self.text(id);
        let offset = offset.min(text.len());
        let before = &text[..offset];
        let line = before.matches('\n').count() + 1;
        let line_start = before.rfind('\n').map_or(0, |i| i + 1);
        let col = before[line_start..].chars().count() + 1;
        (line, col)
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
    /// A file the problem is about when there is no span to show (an unreadable data file).
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
