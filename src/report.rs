//! Showing diagnostics: human-readable (through miette) or one JSON object per line.
//!
//! The diagnostic data lives in [`crate::diag`]; this module only decides how it looks.

use miette::{GraphicalReportHandler, GraphicalTheme, LabeledSpan, MietteDiagnostic, NamedSource};
use serde::Serialize;

use crate::diag::{Diagnostic, Severity, SourceMap};

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
pub fn human(d: &Diagnostic, sources: &SourceMap, colour: bool) -> String {
    let mut md = MietteDiagnostic::new(d.message.clone())
        .with_code(d.code.as_str())
        .with_severity(match d.severity {
            Severity::Error => miette::Severity::Error,
            Severity::Warning => miette::Severity::Warning,
        });
    if let Some(help) = &d.help {
        md = md.with_help(help.clone());
    }
    let source_id = d.span().map(|s| s.source);
    let labels: Vec<LabeledSpan> = d
        .labels
        .iter()
        .enumerate()
        .filter(|(_, l)| Some(l.span.source) == source_id)
        .map(|(i, l)| {
            let span = (l.span.start, l.span.len());
            if i == 0 {
                LabeledSpan::new_primary_with_span(Some(l.text.clone()), span)
            } else {
                LabeledSpan::new_with_span(Some(l.text.clone()), span)
            }
        })
        .collect();
    md = md.with_labels(labels);
    let theme = if colour {
        GraphicalTheme::unicode()
    } else {
        GraphicalTheme::unicode_nocolor()
    };
    let handler = GraphicalReportHandler::new_themed(theme).with_width(100);
    let mut text = String::new();
    let result = match source_id {
        Some(id) => {
            let file = sources.get(id);
            let report = miette::Report::new(md).with_source_code(NamedSource::new(
                file.path.display().to_string(),
                file.text.clone(),
            ));
            handler.render_report(&mut text, report.as_ref())
        }
        None => handler.render_report(&mut text, &md),
    };
    if result.is_err() {
        text = format!(
            "{}[{}]: {}\n",
            if d.is_error() { "error" } else { "warning" },
            d.code,
            d.message
        );
    }
    if let (None, Some(file)) = (source_id, &d.file) {
        text.push_str(&format!("  in {}\n", file.display()));
    }
    // Labels in other files (e.g. a declaration in an included file) are listed by location.
    for l in d.labels.iter().filter(|l| Some(l.span.source) != source_id) {
        let (line, col) = sources.line_col(l.span.source, l.span.start);
        text.push_str(&format!(
            "  note: {} ({}:{line}:{col})\n",
            l.text,
            sources.path(l.span.source).display()
        ));
    }
    text
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
    };
    serde_json::to_string(&obj)
        .unwrap_or_else(|e| format!("{{\"severity\":\"error\",\"message\":\"{e}\"}}"))
}
