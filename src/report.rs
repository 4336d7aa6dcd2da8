//! Showing diagnostics: human-readable (through miette) or one JSON object per line.
//!
//! The diagnostic data lives in [`crate::diag`]; this module only decides how it looks.
//!
//! Guarantees: rendering never panics and its output and time are bounded per diagnostic,
//! whatever the size of the files the labels point into (see `report/excerpt.rs`); no byte of a
//! source, message or label can reach the terminal as a control character.

mod excerpt;

use std::ops::Range;
use std::path::Path;

use miette::{GraphicalReportHandler, GraphicalTheme, LabeledSpan, MietteDiagnostic};
use serde::Serialize;

use crate::diag::{Diagnostic, Label, Severity, SourceMap};
use excerpt::{visible_text, Excerpt, CONTEXT_LINES, MAX_LABELS};

pub use excerpt::MAX_LINE_CHARS;

/// How diagnostics are printed.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MessageFormat {
    Human { colour: bool },
    Json,
}

/// Renders every diagnostic in the chosen format, errors and warnings in the order found.
pub fn render_all(diags: &[Diagnostic], sources: &SourceMap, format: MessageFormat) -> String {
    let mut out = String::new();
    for d in diags {
        match format {
            MessageFormat::Human { colour } => out.push_str(&human(d, sources, colour)),
            MessageFormat::Json => {
                out.push_str(&json(d, sources));
                out.push('\n');
            }
        }
    }
    out
}

/// One diagnostic as miette draws it: code, message, the source lines with labels, and help.
///
/// The lines come from an `Excerpt`: only those around the labels, cut when long, with
/// control characters made visible, so the text printed and the time taken are bounded per
/// diagnostic whatever the size of the source.
pub fn human(d: &Diagnostic, sources: &SourceMap, colour: bool) -> String {
    let mut md = MietteDiagnostic::new(visible_text(&d.message))
        .with_code(d.code.as_str())
        .with_severity(match d.severity {
            Severity::Error => miette::Severity::Error,
            Severity::Warning => miette::Severity::Warning,
        });
    if let Some(help) = &d.help {
        md = md.with_help(visible_text(help));
    }
    let source_id = d.span().map(|s| s.source);
    let here: Vec<&Label> = d
        .labels
        .iter()
        .filter(|l| Some(l.span.source) == source_id)
        .collect();
    let shown = &here[..here.len().min(MAX_LABELS)];
    let theme = if colour {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    let handler = GraphicalReportHandler::new_themed(theme)
        .with_width(100)
        .with_context_lines(CONTEXT_LINES);
    let mut text = String::new();
    let result = match source_id {
        Some(id) => {
            let file = sources.get(id);
            let spans: Vec<Range<usize>> = shown.iter().map(|l| l.span.start..l.span.end).collect();
            let (excerpt, mapped) = Excerpt::new(file.path.display().to_string(), file, &spans);
            let labels = shown.iter().zip(mapped).enumerate().map(|(i, (l, at))| {
                let span = (at.start, at.len());
                let label = Some(visible_text(&l.text));
                if i == 0 {
                    LabeledSpan::new_primary_with_span(label, span)
                } else {
                    LabeledSpan::new_with_span(label, span)
                }
            });
            let report = miette::Report::new(md.with_labels(labels)).with_source_code(excerpt);
            handler.render_report(&mut text, report.as_ref())
        }
        None => handler.render_report(&mut text, &md),
    };
    if result.is_err() {
        text = format!(
            "{}[{}]: {}\n",
            if d.is_error() { "error" } else { "warning" },
            d.code,
            visible_text(&d.message)
        );
    }
    if let Some(file) = d.file.as_deref().filter(|f| !names_its_file(d, f, sources)) {
        text.push_str(&format!(
            "  in {}\n",
            visible_text(&file.display().to_string())
        ));
    }
    if here.len() > shown.len() {
        text.push_str(&format!(
            "  note: {} more places in this file are not shown\n",
            here.len() - shown.len()
        ));
    }
    // Labels in other files (e.g. a declaration in an included file) are listed by location.
    for l in d.labels.iter().filter(|l| Some(l.span.source) != source_id) {
        let (line, col) = sources.line_col(l.span.source, l.span.start);
        text.push_str(&format!(
            "  note: {} ({}:{line}:{col})\n",
            visible_text(&l.text),
            sources.path(l.span.source).display()
        ));
    }
    text
}

/// Whether what is shown of `d` already names `file`: a label points into it, or the message
/// holds its name.
fn names_its_file(d: &Diagnostic, file: &Path, sources: &SourceMap) -> bool {
    let in_message = file
        .file_name()
        .and_then(|n| n.to_str())
        .is_some_and(|n| d.message.contains(n));
    in_message || d.labels.iter().any(|l| sources.path(l.span.source) == file)
}

#[derive(Serialize)]
struct JsonLabel<'a> {
    file: String,
    line: usize,
    column: usize,
    end_line: usize,
    end_column: usize,
    start: usize,
    end: usize,
    text: &'a str,
}

#[derive(Serialize)]
struct JsonDiagnostic<'a> {
    severity: &'static str,
    code: &'a str,
    message: &'a str,
    file: Option<String>,
    line: Option<usize>,
    column: Option<usize>,
    labels: Vec<JsonLabel<'a>>,
    help: Option<&'a str>,
    /// The file the problem is in, when neither a label nor the message names it.
    #[serde(skip_serializing_if = "Option::is_none")]
    in_file: Option<String>,
}

/// One diagnostic as a single-line JSON object.
pub fn json(d: &Diagnostic, sources: &SourceMap) -> String {
    let labels: Vec<JsonLabel> = d
        .labels
        .iter()
        .map(|l| {
            let (line, column) = sources.line_col(l.span.source, l.span.start);
            let (end_line, end_column) = sources.line_col(l.span.source, l.span.end);
            JsonLabel {
                file: sources.path(l.span.source).display().to_string(),
                line,
                column,
                end_line,
                end_column,
                start: l.span.start,
                end: l.span.end,
                text: &l.text,
            }
        })
        .collect();
    let first = labels.first();
    let obj = JsonDiagnostic {
        severity: if d.is_error() { "error" } else { "warning" },
        code: d.code.as_str(),
        message: &d.message,
        file: first
            .map(|l| l.file.clone())
            .or_else(|| d.file.as_ref().map(|f| f.display().to_string())),
        line: first.map(|l| l.line),
        column: first.map(|l| l.column),
        labels,
        help: d.help.as_deref(),
        in_file: d
            .file
            .as_deref()
            .filter(|f| !names_its_file(d, f, sources))
            .map(|f| f.display().to_string()),
    };
    serde_json::to_string(&obj)
        .unwrap_or_else(|e| format!("{{\"severity\":\"error\",\"message\":\"{e}\"}}"))
}
