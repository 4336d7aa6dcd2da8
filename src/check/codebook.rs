//! Checking `data` blocks: variables with their scales, missing-value markers and the design.

use std::path::Path;

use crate::data::{CellRange, DecimalMark, FileFormat, Separator, TextFormat, WorkbookFormat};
use crate::diag::{did_you_mean, Code, Diagnostic, Span};
use crate::syntax::ast::{Block, Ident, Plain, Statement, Term};

use super::colours;
use super::display;
use super::layer::options;
use super::plan::{Codebook, Collapse, Replicates, Scale, VarId, Variable};
use super::terms::{self, Accepts};

/// The options of a variable declaration, in canonical order (`levels` and `labels` only for
/// nominal and ordinal variables, `midpoint` only for ordinal ones).
pub const VARIABLE_OPTIONS: &[&str] = &[
    "levels", "labels", "colours", "midpoint", "label", "unit", "column",
];
/// The options of `replicates VAR`.
pub const REPLICATES_OPTIONS: &[&str] = &["collapse"];

const SCALES: [&str; 5] = ["id", "nominal", "ordinal", "interval", "ratio"];
const DATA_STATEMENTS: [&str; 10] = [
    "missing",
    "subject",
    "within",
    "between",
    "replicates",
    "separator",
    "decimal",
    "encoding",
    "sheet",
    "cells",
];
/// The statements that say how the file is read, and the kind of file each is for.
const READING_STATEMENTS: [(&str, FileKind); 5] = [
    ("separator", FileKind::Text),
    ("decimal", FileKind::Text),
    ("encoding", FileKind::Text),
    ("sheet", FileKind::Workbook),
    ("cells", FileKind::Workbook),
];

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum FileKind {
    Text,
    Workbook,
}

/// Checks one `data` block; `spec_dir` is the folder of the spec file that declares it.
pub fn check_data_block(
    block: &Block,
    spec_dir: &Path,
    diags: &mut Vec<Diagnostic>,
) -> Option<Codebook> {
    let Some(path) = &block.path else {
        diags.push(
            Diagnostic::new(
                Code::MissingStatement,
                format!("data block `{}` names no file", block.name.name),
            )
            .with_label(block.name.span, "which file?")
            .with_help(format!(
                "write `data {} \"file.csv\" {{ ... }}`",
                block.name.name
            )),
        );
        return None;
    };
    let mut book = Codebook {
        name: block.name.name.clone(),
        path: spec_dir.join(&path.value),
        path_span: path.span,
        format: FileFormat::for_path(Path::new(&path.value)),
        missing: vec![String::new(), "NA".to_string()],
        vars: Vec::new(),
        subject: None,
        within: Vec::new(),
        between: Vec::new(),
        factor_spans: Vec::new(),
        replicates: None,
        span: block.span,
    };
    let mut design: Vec<&Plain> = Vec::new();
    let mut reading: Vec<&Plain> = Vec::new();
    let mut missing_seen: Option<Span> = None;
    for stmt in &block.statements {
        match stmt {
            Statement::Plain(p) if p.target.is_some() => declare(&mut book, p, diags),
            Statement::Plain(p)
                if READING_STATEMENTS
                    .iter()
                    .any(|(name, _)| *name == p.head.name) =>
            {
                reading.push(p)
            }
            Statement::Plain(p) if p.head.name == "missing" => {
                if let Some(first) = missing_seen {
                    diags.push(repeated(&p.head, first));
                    continue;
                }
                missing_seen = Some(p.head.span);
                if let Some(list) = missing_list(p, diags) {
                    book.missing = list;
                }
            }
            Statement::Plain(p) if DATA_STATEMENTS.contains(&p.head.name.as_str()) => {
                design.push(p)
            }
            Statement::Plain(p) => diags.push(unknown_statement(&p.head)),
            Statement::Where(w) => diags.push(
                Diagnostic::new(
                    Code::UnknownStatement,
                    "`where` belongs in a figure, not in a data block",
                )
                .with_label(w.span, "not allowed here")
                .with_help("move the filter into the figure that should show a subset"),
            ),
        }
    }
    for p in design {
        apply_design(&mut book, p, diags);
    }
    read_format(&mut book, &path.value, &reading, diags);
    Some(book)
}

/// Applies `separator`, `decimal`, `encoding` (text files), `sheet` and `cells` (workbooks).
fn read_format(
    book: &mut Codebook,
    path: &str,
    statements: &[&Plain],
    diags: &mut Vec<Diagnostic>,
) {
    let mut seen: Vec<&Plain> = Vec::new();
    for &p in statements {
        if let Some(first) = seen.iter().find(|s| s.head.name == p.head.name) {
            diags.push(repeated(&p.head, first.head.span));
            continue;
        }
        seen.push(p);
        let wanted = READING_STATEMENTS
            .iter()
            .find(|(name, _)| *name == p.head.name)
            .map(|(_, kind)| *kind);
        match (&mut book.format, wanted) {
            (FileFormat::Text(text), Some(FileKind::Text)) => text_statement(text, p, diags),
            (FileFormat::Workbook(sheet), Some(FileKind::Workbook)) => {
                workbook_statement(sheet, p, diags)
            }
            (format, Some(kind)) => diags.push(wrong_file_kind(p, kind, format, path)),
            (_, None) => {}
        }
    }
    if let FileFormat::Text(text) = &book.format {
        if text.separator == Separator::Comma && text.decimal == DecimalMark::Comma {
            let at = seen
                .iter()
                .find(|p| p.head.name == "decimal")
                .map_or(book.path_span, |p| p.span);
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "a file with decimal commas cannot have commas between fields",
                )
                .with_label(at, "decimal comma")
                .with_help("name the file's separator, e.g. `separator semicolon`"),
            );
        }
    }
}

/// `separator WORD`, `decimal WORD`, `encoding "LABEL"`.
fn text_statement(format: &mut TextFormat, p: &Plain, diags: &mut Vec<Diagnostic>) {
    match p.head.name.as_str() {
        "separator" => {
            let words: Vec<&str> = Separator::ALL.iter().map(|s| s.word()).collect();
            if let Some(word) = one_choice(p, &words, "separator semicolon", diags) {
                format.separator = Separator::from_word(&word.name).unwrap_or(format.separator);
            }
        }
        "decimal" => {
            if let Some(word) = one_choice(p, &["point", "comma"], "decimal comma", diags) {
                format.decimal = DecimalMark::from_word(&word.name).unwrap_or(format.decimal);
            }
        }
        _ => {
            let Some(label) = terms::one_string(p, "encoding \"windows-1252\"", diags) else {
                return;
            };
            match encoding_rs::Encoding::for_label(label.value.trim().as_bytes()) {
                Some(encoding)
                    if encoding.is_ascii_compatible() && encoding != encoding_rs::REPLACEMENT =>
                {
                    format.encoding = encoding;
                }
                _ => diags.push(
                    Diagnostic::new(
                        Code::BadArgument,
                        format!("\"{}\" is not an encoding Figura reads", label.value),
                    )
                    .with_label(label.span, "unknown encoding")
                    .with_help(
                        "name the encoding as the WHATWG Encoding Standard does, e.g. \"utf-8\", \
                         \"windows-1252\" (also \"latin1\"), \"iso-8859-15\" or \"shift_jis\"; \
                         UTF-16 files must be saved as UTF-8",
                    ),
                ),
            }
        }
    }
}

/// `sheet "NAME"`, `cells "B2:F200"`.
fn workbook_statement(format: &mut WorkbookFormat, p: &Plain, diags: &mut Vec<Diagnostic>) {
    if p.head.name == "sheet" {
        if let Some(name) = terms::one_string(p, "sheet \"Visits\"", diags) {
            format.sheet = Some(name.value.clone());
        }
        return;
    }
    let Some(range) = terms::one_string(p, "cells \"B2:F200\"", diags) else {
        return;
    };
    match CellRange::parse(range.value.trim()) {
        Some(cells) => format.cells = Some(cells),
        None => diags.push(
            Diagnostic::new(
                Code::BadArgument,
                format!("\"{}\" is not a block of cells", range.value),
            )
            .with_label(range.span, "not a cell range")
            .with_help(
                "write the top left and the bottom right cell as the sheet names them, e.g. \
                 `cells \"B2:F200\"`; the first row of the block is the header",
            ),
        ),
    }
}

/// The one word of a statement, from a fixed set.
fn one_choice<'a>(
    p: &'a Plain,
    choices: &[&str],
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a Ident> {
    terms::one_word(p, shape, diags)?;
    terms::expect_choice(&p.terms[0], choices, shape, diags)
}

fn wrong_file_kind(p: &Plain, wanted: FileKind, format: &FileFormat, path: &str) -> Diagnostic {
    let for_what = match wanted {
        FileKind::Text => "text files (CSV, TSV)",
        FileKind::Workbook => "workbooks (.xlsx)",
    };
    Diagnostic::new(
        Code::UnknownStatement,
        format!(
            "`{}` is for {for_what}, but \"{path}\" is {}",
            p.head.name,
            format.kind_words()
        ),
    )
    .with_label(p.head.span, "not for this file")
    .with_help("remove the statement; the file's extension says how it is read (.csv and others: text, .tsv: tab-separated text, .xlsx: workbook, .parquet: Parquet)")
}

fn missing_list(p: &Plain, diags: &mut Vec<Diagnostic>) -> Option<Vec<String>> {
    let shape = "missing(\"NA\", \"\")";
    match (&p.head_args, p.terms.is_empty()) {
        (Some(args), true) => terms::string_list(args, shape, diags),
        _ => {
            diags.push(
                Diagnostic::new(
                    Code::BadArgument,
                    "`missing` takes its markers in parentheses",
                )
                .with_label(p.span, "here")
                .with_help(format!("write `{shape}`")),
            );
            None
        }
    }
}

fn unknown_statement(head: &Ident) -> Diagnostic {
    let d = Diagnostic::new(
        Code::UnknownStatement,
        format!("`{}` is not a statement of a data block", head.name),
    )
    .with_label(head.span, "unknown statement");
    match did_you_mean(&head.name, DATA_STATEMENTS.iter().copied()) {
        Some(s) => d.with_help(format!("did you mean `{s}`? A variable is declared as `name: scale`")),
        None => d.with_help(
            "a data block holds declarations `name: scale ...` and `missing`, `subject`, `within`, `between`, `replicates`, and for how its file is read `separator`, `decimal`, `encoding`, `sheet`, `cells`",
        ),
    }
}

fn repeated(head: &Ident, first: Span) -> Diagnostic {
    Diagnostic::new(Code::Repeated, format!("`{}` is given twice", head.name))
        .with_label(head.span, "given again here")
        .with_label(first, "first given here")
        .with_help("keep one of them")
}

/// `name: scale options...`
fn declare(book: &mut Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) {
    let Some(target) = &p.target else { return };
    let Some(scale) = scale_of(&p.head, diags) else {
        return;
    };
    if let Some(prev) = book.find(&target.name) {
        diags.push(
            Diagnostic::new(
                Code::DuplicateName,
                format!("variable `{}` is declared twice", target.name),
            )
            .with_label(target.span, "declared again here")
            .with_label(book.var(prev).span, "first declared here")
            .with_help("give each variable one declaration"),
        );
        return;
    }
    let calls: Vec<&str> = VARIABLE_OPTIONS
        .iter()
        .copied()
        .filter(|o| match *o {
            "levels" | "labels" | "colours" => scale.is_categorical(),
            "midpoint" => scale == Scale::Ordinal,
            _ => true,
        })
        .collect();
    let what = format!("a {} variable", scale.as_str());
    let opts = terms::options(&p.terms, &Accepts::calls(&what, &calls), diags);
    let mut var = Variable {
        name: target.name.clone(),
        column: target.name.clone(),
        scale,
        levels: None,
        labels: None,
        colours: None,
        midpoint: None,
        label: None,
        unit: None,
        span: p.span,
    };
    if let Some(c) = opts.call("label") {
        var.label = one_display_arg(c, "label(\"Reading speed\")", diags);
    }
    if let Some(c) = opts.call("unit") {
        var.unit = one_display_arg(c, "unit(\"words/min\")", diags);
    }
    if let Some(c) = opts.call("column") {
        if let Some(col) = one_string_arg(c, "column(\"Header in the file\")", diags) {
            var.column = col;
        }
    }
    if let Some(c) = opts.call("levels") {
        var.levels = checked_levels(c, diags);
    }
    if let Some(c) = opts.call("labels") {
        var.labels = checked_labels(
            c,
            var.levels.as_ref(),
            opts.call("levels").map(|l| l.span),
            diags,
        );
    }
    if let Some(c) = opts.call("colours") {
        var.colours = colours::level_colours(
            c,
            var.levels.as_ref(),
            opts.call("levels").map(|l| l.span),
            scale,
            diags,
        );
    }
    if let (Some(c), Some(levels)) = (opts.call("midpoint"), &var.levels) {
        var.midpoint = midpoint(c, levels, diags);
    }
    if scale == Scale::Ordinal && opts.call("levels").is_none() {
        diags.push(
            Diagnostic::new(Code::OrdinalWithoutLevels, format!("ordinal variable `{}` needs its levels in order", target.name))
                .with_label(p.head.span, "ordered, but in what order?")
                .with_help(format!("add `levels(...)` from lowest to highest, e.g. `{}: ordinal levels(\"low\", \"medium\", \"high\")`", target.name)),
        );
    }
    book.vars.push(var);
}

fn scale_of(head: &Ident, diags: &mut Vec<Diagnostic>) -> Option<Scale> {
    let scale = match head.name.as_str() {
        "id" => Scale::Id,
        "nominal" => Scale::Nominal,
        "ordinal" => Scale::Ordinal,
        "interval" => Scale::Interval,
        "ratio" => Scale::Ratio,
        other => {
            let d = Diagnostic::new(
                Code::UnknownScale,
                format!("`{other}` is not a level of measurement"),
            )
            .with_label(head.span, "unknown scale");
            let help = match did_you_mean(other, SCALES.iter().copied()) {
                Some(s) => format!(
                    "did you mean `{s}`? The scales are id, nominal, ordinal, interval and ratio"
                ),
                None => "the scales are id, nominal, ordinal, interval and ratio".to_string(),
            };
            diags.push(d.with_help(help));
            return None;
        }
    };
    Some(scale)
}

fn one_string_arg(
    c: &crate::syntax::ast::Call,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<String> {
    let term = terms::single(c, shape, diags)?;
    terms::expect_str(term, shape, diags).map(|s| s.value.clone())
}

/// One string of text to display, its markup read (see [`crate::markup`]).
fn one_display_arg(
    c: &crate::syntax::ast::Call,
    shape: &str,
    diags: &mut Vec<Diagnostic>,
) -> Option<String> {
    let term = terms::single(c, shape, diags)?;
    terms::expect_str(term, shape, diags).map(|s| display::text(s, diags))
}

fn checked_levels(
    c: &crate::syntax::ast::Call,
    diags: &mut Vec<Diagnostic>,
) -> Option<Vec<String>> {
    let list = terms::level_list(&c.args, "levels(\"a\", \"b\")", diags)?;
    if list.is_empty() {
        diags.push(
            Diagnostic::new(Code::LevelsMismatch, "`levels()` is empty")
                .with_label(c.span, "no levels")
                .with_help("list every level, e.g. `levels(\"paper\", \"screen\")`"),
        );
        return None;
    }
    for (i, (name, span)) in list.iter().enumerate() {
        if let Some((_, first)) = list[..i].iter().find(|(n, _)| n == name) {
            diags.push(
                Diagnostic::new(
                    Code::LevelsMismatch,
                    format!("level \"{name}\" is listed twice"),
                )
                .with_label(*span, "listed again here")
                .with_label(*first, "first listed here")
                .with_help("list each level once"),
            );
            return None;
        }
    }
    Some(list.into_iter().map(|(n, _)| n).collect())
}

/// `midpoint(LEVEL)`: one of the declared levels, the neutral middle of an ordinal scale.
fn midpoint(
    c: &crate::syntax::ast::Call,
    levels: &[String],
    diags: &mut Vec<Diagnostic>,
) -> Option<usize> {
    let unknown = |name: &str| format!("\"{name}\" is not a level, so it cannot be the midpoint");
    options::declared_level(c, levels, "midpoint(\"neutral\")", unknown, diags).map(|(i, _)| i)
}

fn checked_labels(
    c: &crate::syntax::ast::Call,
    levels: Option<&Vec<String>>,
    levels_span: Option<Span>,
    diags: &mut Vec<Diagnostic>,
) -> Option<Vec<String>> {
    let shape = "labels(\"Paper\", \"Screen\")";
    let labels = c
        .args
        .items
        .iter()
        .map(|t| terms::expect_str(t, shape, diags).map(|s| display::text(s, diags)))
        .collect::<Option<Vec<String>>>()?;
    match (levels, levels_span) {
        (Some(levels), _) if levels.len() == labels.len() => Some(labels),
        (Some(levels), Some(span)) => {
            diags.push(
                Diagnostic::new(
                    Code::LevelsMismatch,
                    format!("{} labels for {} levels", labels.len(), levels.len()),
                )
                .with_label(c.span, "labels")
                .with_label(span, "levels")
                .with_help("give one label per level, in the same order"),
            );
            None
        }
        _ => {
            diags.push(
                Diagnostic::new(
                    Code::LevelsMismatch,
                    "`labels(...)` needs `levels(...)` to say which label is which",
                )
                .with_label(c.span, "labels without levels")
                .with_help("add `levels(...)` listing the values as they appear in the data"),
            );
            None
        }
    }
}

/// `subject`, `within`, `between`, `replicates`.
fn apply_design(book: &mut Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) {
    match p.head.name.as_str() {
        "subject" => {
            if let Some(first) = book.subject {
                diags.push(
                    Diagnostic::new(Code::Repeated, "`subject` is given twice")
                        .with_label(p.head.span, "given again here")
                        .with_label(book.var(first).span, "the subject declared first")
                        .with_help(
                            "a data block has one kind of observational unit; keep one `subject`",
                        ),
                );
                return;
            }
            let Some(name) = terms::one_word(p, "subject participant", diags) else {
                return;
            };
            let Some(id) = resolve(book, name, diags) else {
                return;
            };
            if book.var(id).scale != Scale::Id {
                diags.push(
                    Diagnostic::new(
                        Code::BadDesign,
                        format!("the subject `{}` must be an id variable", name.name),
                    )
                    .with_label(
                        name.span,
                        format!("declared {}", book.var(id).scale.as_str()),
                    )
                    .with_label(book.var(id).span, "declared here")
                    .with_help(format!("declare it as `{}: id`", name.name)),
                );
                return;
            }
            book.subject = Some(id);
        }
        "within" | "between" => {
            for term in &p.terms {
                let Some(name) = terms::expect_word(term, "within medium, session", diags) else {
                    continue;
                };
                let Some(id) = resolve(book, name, diags) else {
                    continue;
                };
                add_factor(book, p.head.name == "within", id, name, diags);
            }
            if p.terms.is_empty() {
                diags.push(
                    Diagnostic::new(
                        Code::BadArgument,
                        format!("`{}` needs at least one factor", p.head.name),
                    )
                    .with_label(p.head.span, "no factor")
                    .with_help(format!("write `{} factor1, factor2`", p.head.name)),
                );
            }
        }
        "replicates" => replicates(book, p, diags),
        _ => {}
    }
}

fn add_factor(
    book: &mut Codebook,
    within: bool,
    id: VarId,
    name: &Ident,
    diags: &mut Vec<Diagnostic>,
) {
    let var = book.var(id);
    if !var.scale.is_categorical() {
        diags.push(
            Diagnostic::new(
                Code::BadDesign,
                format!("factor `{}` must be nominal or ordinal", name.name),
            )
            .with_label(name.span, format!("declared {}", var.scale.as_str()))
            .with_help("a factor's levels are conditions or groups; declare it nominal or ordinal"),
        );
        return;
    }
    let (this, other) = if within {
        ("within", "between")
    } else {
        ("between", "within")
    };
    let in_other = if within {
        book.is_between(id)
    } else {
        book.is_within(id)
    };
    if in_other {
        diags.push(
            Diagnostic::new(Code::BadDesign, format!("`{}` cannot be both a within and a between factor", name.name))
                .with_label(name.span, format!("listed as {this} here, but already {other}"))
                .with_help("a factor either splits subjects into groups (between) or is measured on every subject (within)"),
        );
        return;
    }
    let list = if within {
        &mut book.within
    } else {
        &mut book.between
    };
    if !list.contains(&id) {
        list.push(id);
        book.factor_spans.push((id, name.span));
    }
}

fn replicates(book: &mut Codebook, p: &Plain, diags: &mut Vec<Diagnostic>) {
    let shape = "replicates trial collapse(mean)";
    let Some(Term::Word(name)) = p.terms.first() else {
        diags.push(
            Diagnostic::new(
                Code::BadArgument,
                "`replicates` needs the variable that numbers the trials",
            )
            .with_label(p.head.span, "which variable?")
            .with_help(format!("write `{shape}`")),
        );
        return;
    };
    let Some(id) = resolve(book, name, diags) else {
        return;
    };
    let accepts = Accepts::calls("`replicates`", REPLICATES_OPTIONS);
    let opts = terms::options(&p.terms[1..], &accepts, diags);
    let collapse = match opts.call("collapse") {
        None => Collapse::Mean,
        Some(c) => {
            let Some(t) = terms::single(c, "collapse(mean)", diags) else {
                return;
            };
            match terms::expect_choice(t, &["mean", "median"], "collapse(mean)", diags) {
                Some(w) if w.name == "median" => Collapse::Median,
                Some(_) => Collapse::Mean,
                None => return,
            }
        }
    };
    if book.replicates.is_some() {
        diags.push(repeated(&p.head, p.head.span));
        return;
    }
    book.replicates = Some(Replicates {
        var: id,
        collapse,
        span: p.span,
    });
}

/// Looks up a variable, reporting an unknown name with the closest declared one.
pub fn resolve(book: &Codebook, name: &Ident, diags: &mut Vec<Diagnostic>) -> Option<VarId> {
    if let Some(id) = book.find(&name.name) {
        return Some(id);
    }
    diags.push(unknown_variable(book, name));
    None
}

pub fn unknown_variable(book: &Codebook, name: &Ident) -> Diagnostic {
    let d = Diagnostic::new(
        Code::UnknownVariable,
        format!("`{}` is not a variable of data `{}`", name.name, book.name),
    )
    .with_label(name.span, "not declared");
    match did_you_mean(&name.name, book.vars.iter().map(|v| v.name.as_str())) {
        Some(s) => d.with_help(format!("did you mean `{s}`?")),
        None => {
            let all: Vec<&str> = book.vars.iter().map(|v| v.name.as_str()).collect();
            d.with_help(format!("declared variables: {}", all.join(", ")))
        }
    }
}
