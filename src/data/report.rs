//! Collecting the data errors of one file: every error is counted, the first few are kept in
//! full, and the rest are summed up in one closing diagnostic so a broken file cannot flood the
//! terminal. Also the shared wording for places in a data file (`speeds.csv row 14`).
//!
//! A text file's text is not kept while it is read. Labels into it use the [`SourceId`] the
//! text will get ([`Report::text_source`]); only when a kept diagnostic has such a label is the
//! file read again and its text added to the source map ([`Report::finish`]). Should the file
//! have changed in between, a label that no longer fits the text is moved to the path in the
//! spec, so no label ever points outside its text.

use std::collections::BTreeMap;
use std::fmt::Write as _;
use std::path::{Path, PathBuf};

use crate::diag::{Code, Diagnostic, SourceId, SourceMap, Span};

/// How a data file is named in messages: its file name, or the whole path when it has none.
pub(super) fn file_label(path: &Path) -> String {
    path.file_name()
        .map(|name| name.to_string_lossy().into_owned())
        .unwrap_or_else(|| path.display().to_string())
}

/// `speeds.csv row 14`, plus `(line 15)` when blank lines or quoted line breaks make the line
/// differ from the row.
pub(super) fn row_label(file: &str, file_row: usize, line: usize) -> String {
    if file_row == line {
        format!("{file} row {file_row}")
    } else {
        format!("{file} row {file_row} (line {line})")
    }
}

/// Longest cell text quoted in full in a message; longer texts are cut with `…`.
const SHOWN_CHARS: usize = 40;

/// A cell or header text in double quotes, escaped, cut after [`SHOWN_CHARS`] characters.
pub(super) fn quoted(text: &str) -> String {
    if text.chars().count() <= SHOWN_CHARS {
        return format!("{text:?}");
    }
    let cut: String = text.chars().take(SHOWN_CHARS).collect();
    let escaped = format!("{cut:?}");
    // Put the ellipsis inside the closing quote: "abc…"
    format!("{}…\"", &escaped[..escaped.len() - 1])
}

/// A list of texts for a help line: `"a", "b", "c"`, cut after `max` items with `, …`.
pub(super) fn quoted_list<'a>(items: impl IntoIterator<Item = &'a str>, max: usize) -> String {
    let mut out = String::new();
    for (i, item) in items.into_iter().enumerate() {
        if i == max {
            out.push_str(", …");
            break;
        }
        if i > 0 {
            out.push_str(", ");
        }
        out.push_str(&quoted(item));
    }
    out
}

/// The errors of one data file, capped.
pub(super) struct Report {
    file: String,
    path: PathBuf,
    path_span: Span,
    max_shown: usize,
    shown: Vec<Diagnostic>,
    /// Errors past the cap, counted by code (a `BTreeMap` so the summary's order is fixed).
    hidden: BTreeMap<Code, usize>,
    /// The id the file's text gets in the source map if a diagnostic quotes it.
    text_source: SourceId,
}

impl Report {
    /// A report for the file `path`; `sources` is the map the file's text would be added to.
    pub(super) fn new(path: &Path, path_span: Span, max_shown: usize, sources: &SourceMap) -> Self {
        Report {
            file: file_label(path),
            path: path.to_path_buf(),
            path_span,
            max_shown,
            shown: Vec::new(),
            hidden: BTreeMap::new(),
            text_source: SourceId(u32::try_from(sources.files().len()).unwrap_or(u32::MAX)),
        }
    }

    /// The source id of the file's text, for labels into it.
    pub(super) fn text_source(&self) -> SourceId {
        self.text_source
    }

    /// Whether a kept diagnostic points into the file's text.
    pub(super) fn quotes_text(&self) -> bool {
        self.shown
            .iter()
            .flat_map(|d| &d.labels)
            .any(|l| l.span.source == self.text_source)
    }

    /// Records one error with stable `code`; `make` builds it from the file's name only while
    /// under the cap, so a file with millions of bad cells costs a counter each, not a message.
    pub(super) fn add(&mut self, code: Code, make: impl FnOnce(&str) -> Diagnostic) {
        if self.shown.len() < self.max_shown {
            let diagnostic = make(&self.file);
            debug_assert_eq!(diagnostic.code, code);
            self.shown.push(diagnostic);
        } else {
            *self.hidden.entry(code).or_insert(0) += 1;
        }
    }

    /// Records an error about the file as a whole, already written; `None` for the reader to
    /// return.
    pub(super) fn refuse<T>(&mut self, error: Diagnostic) -> Option<T> {
        self.add(error.code, |_| error);
        None
    }

    pub(super) fn is_empty(&self) -> bool {
        self.shown.is_empty() && self.hidden.is_empty()
    }

    /// The kept diagnostics, followed by the summary of the hidden ones if there are any.
    /// `text` is the file's text when a diagnostic quotes it (`None`: it could not be read
    /// again); it is added to `sources` under [`Report::text_source`].
    pub(super) fn finish(
        mut self,
        text: Option<String>,
        sources: &mut SourceMap,
    ) -> Vec<Diagnostic> {
        let kept = match text {
            Some(text) if self.quotes_text() => {
                let id = sources.add(&self.path, text);
                (id == self.text_source).then(|| sources.text(id))
            }
            _ => None,
        };
        let (source, fallback) = (self.text_source, self.path_span);
        for label in self.shown.iter_mut().flat_map(|d| d.labels.iter_mut()) {
            let fits = |span: Span| {
                kept.is_some_and(|text: &str| {
                    span.end <= text.len()
                        && text.is_char_boundary(span.start)
                        && text.is_char_boundary(span.end)
                })
            };
            if label.span.source == source && !fits(label.span) {
                label.span = fallback;
            }
        }
        let n_hidden: usize = self.hidden.values().sum();
        if n_hidden > 0 {
            let mut by_code = String::new();
            for (i, (code, count)) in self.hidden.iter().enumerate() {
                if i > 0 {
                    by_code.push_str(", ");
                }
                let _ = write!(by_code, "{code}: {count}");
            }
            let noun = if n_hidden == 1 { "error" } else { "errors" };
            self.shown.push(
                Diagnostic::new(
                    Code::MoreDataErrors,
                    format!(
                        "{}: {n_hidden} more data {noun} not shown ({by_code})",
                        self.file
                    ),
                )
                .with_label(self.path_span, "data file")
                .with_help(format!(
                    "only the first {} errors of a file are shown; fix them and run again",
                    self.max_shown
                ))
                .with_file(&self.path),
            );
        }
        self.shown
    }
}
