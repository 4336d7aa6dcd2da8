//! Syntax errors in plain words, and the text edits that let parsing go on past them.
//!
//! The parser reports where it stopped and what it was [`Expect`]ing there. [`recover`] turns
//! that into one [`Diagnostic`] — choosing a specific code (an unclosed string, a missing `}`,
//! `=` for `==`, ...) from the surrounding tokens, or the general "expected …, found …" — and
//! an [`Edit`] of the working copy of the text that removes or closes the broken part, so the
//! next parse can find the next, independent error.
//!
//! Invariants: edits never move text (they blank, replace a range by text of the same length,
//! or append at the end), so byte offsets stay valid for the original text; messages never
//! name grammar rules.

use super::scan::{Scan, Tok, TokKind};
use crate::diag::{Code, Diagnostic, SourceId, Span};

/// Something the parser was looking for when it stopped, in user terms. The order is the
/// order in which they are listed in a message.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Expect {
    TopItem,
    Statement,
    Name,
    BlockName,
    BlockPath,
    IncludePath,
    OpenBrace,
    Colon,
    Value,
    Condition,
    CompareOp,
    In,
    FilterValue,
    OpenParen,
    Comma,
    CloseParen,
    And,
    Or,
    StmtEnd,
    CloseBrace,
    EndOfFile,
}

impl Expect {
    fn phrase(self) -> &'static str {
        match self {
            Expect::TopItem => "a `data` or `figure` block or `include`",
            Expect::Statement => "a statement",
            Expect::Name => "a word",
            Expect::BlockName => "a name for the block",
            Expect::BlockPath => "a file path in double quotes",
            Expect::IncludePath => "the path of a file in double quotes",
            Expect::OpenBrace => "`{`",
            Expect::Colon => "`:`",
            Expect::Value => "a value",
            Expect::Condition => "a condition",
            Expect::CompareOp => "a comparison such as `==`",
            Expect::In => "`in`",
            Expect::FilterValue => "a string or a number",
            Expect::OpenParen => "`(`",
            Expect::Comma => "`,`",
            Expect::CloseParen => "`)`",
            Expect::And => "`and`",
            Expect::Or => "`or`",
            Expect::StmtEnd => "the end of the statement",
            Expect::CloseBrace => "`}`",
            Expect::EndOfFile => "the end of the file",
        }
    }
}

/// Where and why one parse stopped.
#[derive(Debug, Clone)]
pub struct Failure {
    /// Byte offset in the working text.
    pub pos: usize,
    /// What would have been accepted at `pos` (sorted, no repeats).
    pub expected: Vec<Expect>,
}

/// A change to the working copy of the text that keeps every byte offset in place.
#[derive(Debug, Clone, PartialEq)]
pub enum Edit {
    /// Every byte of `[start, end)` except line breaks becomes a space.
    Blank { start: usize, end: usize },
    /// `[start, end)` becomes `with`, padded with spaces to the same length.
    Replace {
        start: usize,
        end: usize,
        with: &'static str,
    },
    /// Text added at the end.
    Append(String),
}

impl Edit {
    /// Applies the edit; returns false (and changes nothing) when it would change nothing or
    /// would not keep the text valid.
    pub fn apply(&self, work: &mut String) -> bool {
        match self {
            Edit::Append(more) => {
                work.push_str(more);
                !more.is_empty()
            }
            Edit::Blank { start, end } => rewrite(work, *start, *end, |b| match b {
                b'\n' | b'\r' => b,
                _ => b' ',
            }),
            Edit::Replace { start, end, with } => {
                if with.len() > end.saturating_sub(*start) {
                    return false;
                }
                let fill = with.as_bytes();
                let mut k = 0;
                rewrite(work, *start, *end, |_| {
                    let b = fill.get(k).copied().unwrap_or(b' ');
                    k += 1;
                    b
                })
            }
        }
    }
}

fn rewrite(work: &mut String, start: usize, end: usize, mut f: impl FnMut(u8) -> u8) -> bool {
    if start >= end
        || end > work.len()
        || !work.is_char_boundary(start)
        || !work.is_char_boundary(end)
    {
        return false;
    }
    let mut bytes = std::mem::take(work).into_bytes();
    let before = bytes[start..end].to_vec();
    for b in &mut bytes[start..end] {
        *b = f(*b);
    }
    let changed = bytes[start..end] != before[..];
    match String::from_utf8(bytes) {
        Ok(text) => {
            *work = text;
            changed
        }
        Err(err) => {
            // Only ASCII is written over whole characters, so this cannot happen; restore anyway.
            let mut bytes = err.into_bytes();
            bytes[start..end].copy_from_slice(&before);
            *work = String::from_utf8(bytes).unwrap_or_default();
            false
        }
    }
}

/// The diagnostic for one failure and the edit to continue with (none: stop parsing).
#[derive(Debug)]
pub struct Recovery {
    pub diagnostic: Diagnostic,
    pub edit: Option<Edit>,
}

/// What recovery looks at.
pub struct Context<'a> {
    pub source: SourceId,
    /// The working copy the failure refers to.
    pub work: &'a str,
    /// The scan of `work`.
    pub scan: &'a Scan,
}

impl Context<'_> {
    fn span(&self, start: usize, end: usize) -> Span {
        Span::new(self.source, start, end.max(start))
    }

    fn tok_span(&self, t: &Tok) -> Span {
        self.span(t.start, t.end)
    }

    fn text(&self, t: &Tok) -> &str {
        &self.work[t.start..t.end]
    }
}

/// What the parser found where it stopped: the span and a description for messages.
struct Found {
    start: usize,
    end: usize,
    /// Index of the token at the failure position, if one starts there.
    tok: Option<usize>,
    kind: Option<TokKind>,
    what: String,
}

fn found_at(cx: &Context, pos: usize) -> Found {
    let at_end = Found {
        start: pos,
        end: pos,
        tok: None,
        kind: None,
        what: "the end of the file".to_owned(),
    };
    let idx = cx.scan.index_at(pos);
    let Some(t) = cx.scan.toks.get(idx) else {
        return at_end;
    };
    if t.start > pos && cx.work[pos..t.start].trim().is_empty() && t.kind == TokKind::Newline {
        // Trailing spaces before a line break.
        return Found {
            start: pos,
            end: pos,
            tok: Some(idx),
            kind: Some(TokKind::Newline),
            what: "the end of the line".to_owned(),
        };
    }
    let start = pos.max(t.start);
    let what = match t.kind {
        TokKind::Newline => "the end of the line".to_owned(),
        TokKind::Comment => "a comment".to_owned(),
        TokKind::Other => describe_char(&cx.work[start..t.end]),
        _ => quote(&cx.work[start..t.end]),
    };
    let end = if t.kind == TokKind::Newline {
        start
    } else {
        t.end
    };
    Found {
        start,
        end,
        tok: (t.start == pos).then_some(idx),
        kind: Some(t.kind),
        what,
    }
}

/// Token text in backticks, shortened when long.
fn quote(text: &str) -> String {
    const MAX_CHARS: usize = 24;
    if text.chars().count() > MAX_CHARS {
        let short: String = text.chars().take(MAX_CHARS - 1).collect();
        format!("`{short}…`")
    } else {
        format!("`{text}`")
    }
}

/// A single character in backticks, or its code point when it would be invisible.
fn describe_char(text: &str) -> String {
    match text.chars().next() {
        Some(c) if c.is_whitespace() || c.is_control() || c == '\u{FEFF}' => {
            format!("the invisible character U+{:04X}", c as u32)
        }
        Some(c) => format!("`{c}`"),
        None => "the end of the file".to_owned(),
    }
}

fn list(items: &[&str]) -> String {
    match items {
        [] => String::new(),
        [one] => (*one).to_owned(),
        [init @ .., last] => format!("{} or {}", init.join(", "), last),
    }
}

/// The failure in plain words, with an edit to continue.
pub fn recover(failure: &Failure, cx: &Context) -> Recovery {
    let pos = failure.pos.min(cx.work.len());
    let found = found_at(cx, pos);
    if let Some(s) = cx.scan.unclosed_string_at(pos) {
        // The string runs to the end of its line. Drop its statement up to there, or all of
        // it when the statement goes on in a list whose `)` comes later.
        let scan = cx.scan;
        let (first, end) = scan.statement_around(pos);
        let start = scan
            .toks
            .get(first)
            .map_or(s.start, |t| t.start.min(s.start));
        let list_goes_on = scan.toks[first.min(end)..end]
            .iter()
            .any(|t| t.kind == TokKind::LParen && t.start < s.start)
            && scan.unclosed_parens(first, s.start).is_empty();
        let stop = if list_goes_on {
            scan.byte_range(first, end, pos).1
        } else {
            s.end
        };
        return Recovery {
            diagnostic: unclosed_string(cx, s),
            edit: Some(Edit::Blank { start, end: stop }),
        };
    }
    match cx.scan.open_block_at(pos) {
        Some(open) => in_block(failure, cx, &found, open),
        None => at_top_level(failure, cx, &found),
    }
}

fn unclosed_string(cx: &Context, s: &Tok) -> Diagnostic {
    Diagnostic::new(Code::UnclosedString, "this string is not closed")
        .with_label(cx.tok_span(s), "no closing `\"` on this line")
        .with_help(
            "end the string with `\"` on the same line; to put a line break inside a string, \
             write `\\n`",
        )
}

// ---------------------------------------------------------------------------------------------
// Inside a block

fn in_block(failure: &Failure, cx: &Context, found: &Found, open: usize) -> Recovery {
    let scan = cx.scan;
    let pos = found.start;
    let (first, end) = scan.statement_around(pos);
    match found.kind {
        None => return at_end_of_file(failure, cx, open, first, pos),
        Some(TokKind::LBrace) => return nested_brace(failure, cx, found, open, first),
        Some(TokKind::RBrace) => {
            let parens = scan.unclosed_parens(first, pos);
            if let Some(&paren) = parens.last() {
                let start = scan.byte_range(first, end, pos).0;
                return Recovery {
                    diagnostic: unclosed_paren(cx, &scan.toks[paren], found, &failure.expected),
                    edit: Some(Edit::Blank { start, end: pos }),
                };
            }
        }
        Some(TokKind::RParen) => {
            if let Some(d) = stray_close_paren(cx, found) {
                return d;
            }
        }
        _ => {}
    }
    let parens = scan.unclosed_parens(first, pos);
    if let Some(&paren) = parens.last() {
        // Most likely the statement ended on an earlier line without its `)`: drop the
        // statement up to the line the parser stopped on, and parse that line afresh.
        let paren_tok = scan.toks[paren];
        let found_idx = scan.index_at(pos);
        let found_line = scan.line_first(found_idx);
        let stop = if scan.line_first(paren) < found_line && found_line > first {
            scan.toks[found_line - 1].start
        } else {
            scan.toks
                .get(scan.line_end(found_idx))
                .map_or(cx.work.len(), |t| t.start)
        };
        return Recovery {
            diagnostic: unclosed_paren(cx, &paren_tok, found, &failure.expected),
            edit: Some(Edit::Blank {
                start: scan.toks[first].start,
                end: stop,
            }),
        };
    }
    let diagnostic = statement_error(failure, cx, found);
    let (start, stop) = scan.byte_range(first, end, pos);
    Recovery {
        diagnostic,
        edit: Some(Edit::Blank { start, end: stop }),
    }
}

/// The file ended inside a block: close what is open by appending to the text.
fn at_end_of_file(
    failure: &Failure,
    cx: &Context,
    open: usize,
    first: usize,
    pos: usize,
) -> Recovery {
    let parens = cx.scan.unclosed_parens(first, pos);
    if let Some(&paren) = parens.last() {
        let found = found_at(cx, pos);
        return Recovery {
            diagnostic: unclosed_paren(cx, &cx.scan.toks[paren], &found, &failure.expected),
            edit: Some(Edit::Append(")".repeat(parens.len()))),
        };
    }
    Recovery {
        diagnostic: unclosed_block(cx, open, None),
        edit: Some(Edit::Append("\n}".to_owned())),
    }
}

fn unclosed_block(cx: &Context, open: usize, next_header: Option<Span>) -> Diagnostic {
    let scan = cx.scan;
    let header_first = scan.header_first(open);
    let header = cx.span(scan.toks[header_first].start, scan.toks[open].end);
    let mut d = Diagnostic::new(
        Code::UnclosedBlock,
        "missing `}` to close the block that starts here",
    )
    .with_label(header, "this block is not closed");
    if let Some(next) = next_header {
        d = d.with_label(next, "the next block starts here");
    }
    d.with_help("add `}` on its own line after the block's last statement")
}

fn unclosed_paren(cx: &Context, paren: &Tok, found: &Found, expected: &[Expect]) -> Diagnostic {
    let mut d = Diagnostic::new(Code::UnclosedParen, "this `(` is not closed")
        .with_label(cx.tok_span(paren), "this `(` has no matching `)`");
    let phrases = phrases(expected);
    if found.kind.is_some() && !phrases.is_empty() {
        d = d.with_label(
            cx.span(found.start, found.end),
            format!("expected {} before {}", list(&phrases), found.what),
        );
    }
    let in_filter = [Expect::Condition, Expect::And, Expect::Or]
        .iter()
        .any(|e| expected.contains(e));
    d.with_help(if in_filter {
        "add `)` after the last condition inside the parentheses"
    } else {
        "add `)` after the last argument; arguments are separated by `,`"
    })
}

fn stray_close_paren(cx: &Context, found: &Found) -> Option<Recovery> {
    let idx = found.tok?;
    let t = &cx.scan.toks[idx];
    if t.partner.is_some() {
        return None;
    }
    Some(Recovery {
        diagnostic: Diagnostic::new(Code::UnmatchedParen, "`)` has no matching `(`")
            .with_label(cx.tok_span(t), "nothing to close here")
            .with_help(
                "remove this `)`, or add the `(` it closes directly after the option's name, \
                 as in `jitter(0.2)`",
            ),
        edit: Some(Edit::Blank {
            start: t.start,
            end: t.end,
        }),
    })
}

/// A `{` inside a block: usually the next block's header after a missing `}`.
fn nested_brace(
    failure: &Failure,
    cx: &Context,
    found: &Found,
    open: usize,
    first: usize,
) -> Recovery {
    let scan = cx.scan;
    let brace = found.tok.unwrap_or_else(|| scan.index_at(found.start));
    let kind_word = scan.toks.get(first).map_or("", |t| cx.text(t));
    if scan.looks_like_header(first, brace) && !is_stray_statement(kind_word) {
        if let Some(slot) = closing_slot(scan, first) {
            let next = cx.span(scan.toks[first].start, found.end);
            return Recovery {
                diagnostic: unclosed_block(cx, open, Some(next)),
                edit: Some(Edit::Replace {
                    start: slot.start,
                    end: slot.end,
                    with: "}",
                }),
            };
        }
    }
    let diagnostic = general(failure, cx, found).with_help(
        "blocks cannot be nested: `{` only opens a `data` or `figure` block at the top level",
    );
    let start = scan.toks.get(first).map_or(found.start, |t| t.start);
    let stop = scan.toks[brace]
        .partner
        .map_or(cx.work.len(), |close| scan.toks[close].end);
    Recovery {
        diagnostic,
        edit: Some(Edit::Blank { start, end: stop }),
    }
}

/// A token before the statement starting at token `first` that can be overwritten by the
/// missing `}`: the `;` or line break ending the previous statement, or the comment before
/// that line break (overwriting the line break itself would extend the comment).
fn closing_slot(scan: &Scan, first: usize) -> Option<Tok> {
    let before = scan.toks[..first].last()?;
    match before.kind {
        TokKind::Semi => Some(*before),
        TokKind::Newline => match first.checked_sub(2).map(|i| scan.toks[i]) {
            Some(t) if t.kind == TokKind::Comment => Some(t),
            _ => Some(*before),
        },
        _ => None,
    }
}

/// A statement-level error with a specific code where one fits, else the general one.
fn statement_error(failure: &Failure, cx: &Context, found: &Found) -> Diagnostic {
    if let Some(d) = bad_character(cx, found) {
        return d;
    }
    let scan = cx.scan;
    let text = cx.work.get(found.start..found.end).unwrap_or("");
    let prev = scan.tok_before(found.start).map(|(_, t)| *t);
    let glued = prev.is_some_and(|p| p.end == found.start);
    if found.kind == Some(TokKind::Op) && text == "=" {
        return Diagnostic::new(Code::AssignmentInFilter, "`=` is not a comparison")
            .with_label(cx.span(found.start, found.end), "write `==` here")
            .with_help("test equality with `==`, as in `where session == \"morning\"`");
    }
    if found.kind == Some(TokKind::Name) && failure.expected.contains(&Expect::FilterValue) {
        return Diagnostic::new(
            Code::BareFilterValue,
            format!(
                "a filter compares with a string or a number, found {}",
                found.what
            ),
        )
        .with_label(cx.span(found.start, found.end), "not a string or a number")
        .with_help(format!("put text values in double quotes: `\"{text}\"`"));
    }
    if let Some(p) = prev {
        let prev_text = cx.text(&p);
        if found.kind == Some(TokKind::LParen)
            && p.kind == TokKind::Name
            && !glued
            && !failure.expected.contains(&Expect::Condition)
        {
            return Diagnostic::new(
                Code::SpaceBeforeParen,
                "the `(` of an option must follow its name directly",
            )
            .with_label(cx.span(p.end, found.end), "space before `(`")
            .with_help(format!("remove the space: write `{prev_text}(`"));
        }
        if found.kind == Some(TokKind::Name) && is_unit(text) && p.kind == TokKind::Number {
            return unit_apart(cx.span(p.start, found.end), prev_text, text);
        }
    }
    general(failure, cx, found)
}

/// A unit written apart from its number (`85 mm`); shared with the checks after parsing.
pub fn unit_apart(span: Span, number: &str, unit: &str) -> Diagnostic {
    Diagnostic::new(Code::DetachedUnit, "a unit must follow its number directly")
        .with_label(span, format!("space between `{number}` and `{unit}`"))
        .with_help(format!("write `{number}{unit}`"))
}

/// The length units, as written after a number.
pub const UNITS: [&str; 4] = ["mm", "cm", "in", "pt"];

pub fn is_unit(word: &str) -> bool {
    UNITS.contains(&word)
}

/// A character that can never appear outside a string, or `-` inside a name.
fn bad_character(cx: &Context, found: &Found) -> Option<Diagnostic> {
    if found.kind != Some(TokKind::Other) {
        return None;
    }
    let scan = cx.scan;
    let text = &cx.work[found.start..found.end];
    if text == "." {
        // Part of a badly written number; the general message explains numbers.
        return None;
    }
    let span = cx.span(found.start, found.end);
    let prev = scan.tok_before(found.start).map(|(_, t)| *t);
    let next = found
        .tok
        .and_then(|i| scan.toks.get(i + 1))
        .filter(|t| t.start == found.end);
    if let (Some(p), Some(n)) = (prev, next) {
        let joins_names = text == "-"
            && p.kind == TokKind::Name
            && p.end == found.start
            && matches!(n.kind, TokKind::Name | TokKind::Number);
        if joins_names {
            let fixed = hyphenated_name(cx, p.start).replace('-', "_");
            return Some(
                Diagnostic::new(Code::StrayCharacter, "a name cannot contain `-`")
                    .with_label(span, "not allowed in a name")
                    .with_help(format!("use `_` instead: `{fixed}`")),
            );
        }
    }
    Some(
        Diagnostic::new(
            Code::StrayCharacter,
            format!("{} cannot be used here", found.what),
        )
        .with_label(span, "not allowed outside a string")
        .with_help("names use letters, digits and `_`; put any other text in double quotes"),
    )
}

/// The run of names, numbers and `-` glued together from `start`, as in `speed-by-medium`.
fn hyphenated_name<'a>(cx: &Context<'a>, start: usize) -> &'a str {
    let scan = cx.scan;
    let mut end = start;
    for t in &scan.toks[scan.index_at(start)..] {
        let glued = t.start == end || t.start == start;
        let part = matches!(t.kind, TokKind::Name | TokKind::Number)
            || (t.kind == TokKind::Other && &cx.work[t.start..t.end] == "-");
        if !glued || !part {
            break;
        }
        end = t.end;
    }
    &cx.work[start..end]
}

/// "expected …, found …" with the help that fits what was expected.
/// The phrases for what was expected, leaving out alternatives that would only confuse.
fn phrases(expected: &[Expect]) -> Vec<&'static str> {
    let has = |e: Expect| expected.contains(&e);
    let redundant = |e: &Expect| match e {
        // Commas between terms are optional, so "a value" already covers them.
        Expect::Comma => has(Expect::Value),
        Expect::EndOfFile => has(Expect::TopItem),
        // A `:` after the first word is always optional, never the likely fix.
        Expect::Colon => expected.len() > 1,
        _ => false,
    };
    expected
        .iter()
        .filter(|e| !redundant(e))
        .map(|e| e.phrase())
        .collect()
}

fn general(failure: &Failure, cx: &Context, found: &Found) -> Diagnostic {
    let mut expected = failure.expected.clone();
    if expected.contains(&Expect::BlockPath) && header_kind(cx, found.start) != Some("data") {
        // Only `data` blocks name a file.
        expected.retain(|e| *e != Expect::BlockPath);
    }
    let phrases = phrases(&expected);
    let message = if phrases.is_empty() {
        format!("unexpected {}", found.what)
    } else {
        format!("expected {}, found {}", list(&phrases), found.what)
    };
    let label = if phrases.is_empty() {
        "not expected here".to_owned()
    } else {
        format!("expected {} here", list(&phrases))
    };
    Diagnostic::new(Code::Unexpected, message)
        .with_label(cx.span(found.start, found.end), label)
        .with_help(general_help(&expected, cx, found))
}

/// The first word of the top-level line around `pos`.
fn header_kind<'a>(cx: &Context<'a>, pos: usize) -> Option<&'a str> {
    let (first, _) = cx.scan.statement_around(pos);
    let t = cx
        .scan
        .toks
        .get(first)
        .filter(|t| t.kind == TokKind::Name)?;
    cx.work.get(t.start..t.end)
}

fn general_help(expected: &[Expect], cx: &Context, found: &Found) -> String {
    let has = |e: Expect| expected.contains(&e);
    let text = cx.work.get(found.start..found.end).unwrap_or("");
    let after_number = cx
        .scan
        .tok_before(found.start)
        .is_some_and(|(_, t)| t.kind == TokKind::Number && t.end == found.start);
    let after_comma = cx
        .scan
        .tok_before(found.start)
        .is_some_and(|(_, t)| t.kind == TokKind::Comma);
    let help = if text == "." || (after_number && text.starts_with('.')) {
        "write numbers with digits on both sides of the decimal point, as in `0.5`"
    } else if has(Expect::BlockName) {
        "a block starts with its kind and a name, as in `figure speed_by_medium {`; names start \
         with a letter or `_`"
    } else if has(Expect::OpenBrace) {
        "put `{` at the end of the block's first line and `}` after its last statement"
    } else if has(Expect::OpenParen) {
        "list the values in parentheses, as in `medium in (\"paper\", \"screen\")`"
    } else if header_kind(cx, found.start) == Some("include") {
        "an `include` names one file in double quotes; put each `include` on its own line"
    } else if has(Expect::IncludePath) {
        "write the path in double quotes, as in `include \"shared/reading.figura\"`"
    } else if has(Expect::CompareOp) {
        "compare a variable with `==`, `!=`, `<`, `<=`, `>` or `>=`, or test a list with \
         `in (\"a\", \"b\")`"
    } else if has(Expect::Condition) {
        "a filter tests a variable, as in `where session == \"morning\"`; combine tests with \
         `and`, `or` and `not`"
    } else if has(Expect::CloseParen) {
        "separate arguments with `,` and close the list with `)`"
    } else if has(Expect::And) || has(Expect::Or) {
        "join conditions with `and` or `or`; the filter ends at the end of the line"
    } else if has(Expect::Statement) || has(Expect::Name) {
        "a statement starts with a word, as in `title \"...\"` or `speed: ratio`"
    } else if has(Expect::FilterValue) {
        "compare with a string in double quotes or a number, as in `session == \"morning\"` or \
         `age >= 18`"
    } else if has(Expect::Value) && after_comma {
        "remove the `,` at the end, or write the value that should follow it"
    } else if has(Expect::StmtEnd) {
        "a statement ends at the end of its line or at `;`; write text in double quotes"
    } else if has(Expect::TopItem) {
        "a file holds `data` and `figure` blocks and `include` lines"
    } else if has(Expect::Value) {
        "write a word, a number, a length such as `85mm`, or text in double quotes"
    } else {
        "compare this line with the examples in the language reference"
    };
    help.to_owned()
}

// ---------------------------------------------------------------------------------------------
// At the top level

fn at_top_level(failure: &Failure, cx: &Context, found: &Found) -> Recovery {
    let scan = cx.scan;
    let pos = found.start;
    if let Some(idx) = found.tok.filter(|_| found.kind == Some(TokKind::RBrace)) {
        let t = scan.toks[idx];
        return Recovery {
            diagnostic: Diagnostic::new(Code::UnmatchedBrace, "`}` has no block to close")
                .with_label(cx.tok_span(&t), "no open block here")
                .with_help("remove this `}`; each block is closed by exactly one `}`"),
            edit: Some(Edit::Blank {
                start: t.start,
                end: t.end,
            }),
        };
    }
    if found.kind == Some(TokKind::RParen) {
        if let Some(r) = stray_close_paren(cx, found) {
            return r;
        }
    }
    let idx = scan.index_at(pos);
    let (first, end) = scan.statement_around(pos);
    let first = first.min(idx);
    let line_end = scan.toks.get(end).map_or(cx.work.len(), |t| t.start);
    let item_start = scan.toks.get(first).map_or(pos, |t| t.start).min(pos);
    let first_word = scan
        .toks
        .get(first)
        .filter(|t| t.kind == TokKind::Name)
        .map(|t| cx.text(t));
    let at_line_end = matches!(found.kind, Some(TokKind::Newline | TokKind::Comment));
    if failure.expected.contains(&Expect::OpenBrace) && at_line_end {
        if let Some(brace) = brace_on_next_line(scan, end) {
            return Recovery {
                diagnostic: Diagnostic::new(
                    Code::Unexpected,
                    "the `{` of a block must be on the same line as its name",
                )
                .with_label(cx.tok_span(&brace), "move this `{` up")
                .with_help("write the block's first line as `figure NAME {`"),
                edit: Some(Edit::Replace {
                    start: tail_start(cx, pos),
                    end: brace.start,
                    with: "",
                }),
            };
        }
    }
    let diagnostic = bad_character(cx, found).unwrap_or_else(|| {
        if first_word.is_some_and(is_stray_statement) {
            stray_statement(cx, item_start, line_end)
        } else {
            general(failure, cx, found)
        }
    });
    let edit = top_level_edit(failure, cx, found, first, end, first_word);
    Recovery {
        diagnostic,
        edit: Some(edit),
    }
}

/// Whether a line starting with `word` at the top level is a statement that lost its block
/// (rather than a mistyped block header or `include`).
fn is_stray_statement(word: &str) -> bool {
    const TOP_WORDS: [&str; 3] = ["data", "figure", "include"];
    crate::diag::did_you_mean(word, TOP_WORDS).is_none()
}

fn stray_statement(cx: &Context, start: usize, end: usize) -> Diagnostic {
    Diagnostic::new(Code::OutsideBlock, "this statement is outside any block")
        .with_label(cx.span(start, end), "not inside a `data` or `figure` block")
        .with_help(
            "statements go inside a block such as `figure NAME { ... }`; check for a `}` that \
             closes the block above too early",
        )
}

fn top_level_edit(
    failure: &Failure,
    cx: &Context,
    found: &Found,
    first: usize,
    end: usize,
    first_word: Option<&str>,
) -> Edit {
    let scan = cx.scan;
    let pos = found.start;
    let line_stop = scan.toks.get(end).map_or(cx.work.len(), |t| t.start);
    let start = scan.toks.get(first).map_or(pos, |t| t.start).min(pos);
    // A header without `{`: add it where the parser wanted it, unless the next line is a
    // header itself (then the block is probably just a stray line).
    let at_line_end = matches!(
        found.kind,
        None | Some(TokKind::Newline) | Some(TokKind::Comment)
    );
    if failure.expected.contains(&Expect::OpenBrace) && at_line_end && !next_line_opens(scan, end) {
        return match found.kind {
            None => Edit::Append(" {}".to_owned()),
            _ => {
                let t = scan.toks[scan.index_at(pos)];
                Edit::Replace {
                    start: tail_start(cx, pos),
                    end: t.end.max(pos + 1).min(cx.work.len()),
                    with: "{",
                }
            }
        };
    }
    // A broken header before a `{` on the same line: keep the block, replace the header.
    if let Some(brace_tok) = scan.toks.get(end).filter(|t| t.kind == TokKind::LBrace) {
        let header_start = start;
        let brace_tok = *brace_tok;
        if brace_tok.start.saturating_sub(header_start) >= "a b".len() {
            return Edit::Replace {
                start: header_start,
                end: brace_tok.start,
                with: "a b",
            };
        }
        let stop = brace_tok
            .partner
            .map_or(cx.work.len(), |close| scan.toks[close].end);
        return Edit::Blank {
            start: header_start,
            end: stop,
        };
    }
    if first_word.is_some_and(is_stray_statement) {
        return Edit::Blank {
            start,
            end: stray_run_end(cx, end),
        };
    }
    Edit::Blank {
        start,
        end: line_stop,
    }
}

/// Where an edit of the line break at `pos` must start: at a comment that ends right before
/// it (editing only the line break would extend the comment over the next line), else `pos`.
fn tail_start(cx: &Context, pos: usize) -> usize {
    let idx = cx.scan.index_at(pos);
    idx.checked_sub(1)
        .map(|i| cx.scan.toks[i])
        .filter(|t| {
            t.kind == TokKind::Comment && t.end <= pos && cx.work[t.end..pos].trim().is_empty()
        })
        .map_or(pos, |t| t.start)
}

/// The `{` that starts the first non-empty line after token `from`, if it does.
fn brace_on_next_line(scan: &Scan, from: usize) -> Option<Tok> {
    let rest = scan.toks.get(from..).unwrap_or(&[]);
    rest.iter()
        .find(|t| !matches!(t.kind, TokKind::Newline | TokKind::Comment))
        .filter(|t| t.kind == TokKind::LBrace)
        .copied()
}

/// Whether the first non-empty line after token `from` contains a `{`.
fn next_line_opens(scan: &Scan, from: usize) -> bool {
    let rest = scan.toks.get(from..).unwrap_or(&[]);
    let mut line = rest
        .iter()
        .skip_while(|t| matches!(t.kind, TokKind::Newline | TokKind::Comment | TokKind::Semi));
    line.by_ref()
        .take_while(|t| t.kind != TokKind::Newline)
        .any(|t| t.kind == TokKind::LBrace)
}

/// End of a run of stray statements starting at the line ending at token `from`: up to the
/// next line that opens a block or is an `include`, or through a `}` that has no block.
fn stray_run_end(cx: &Context, from: usize) -> usize {
    let scan = cx.scan;
    let mut line_start = true;
    for i in from..scan.toks.len() {
        let t = &scan.toks[i];
        match t.kind {
            TokKind::Newline => line_start = true,
            TokKind::Comment => {}
            TokKind::RBrace if t.partner.is_none() => return t.end,
            TokKind::LBrace => return scan.toks[scan.line_first(i)].start,
            TokKind::Name if line_start && cx.text(t) == "include" => return t.start,
            _ => line_start = false,
        }
    }
    cx.work.len()
}

/// Nesting deeper than the parser allows, found before parsing.
pub fn too_deep(source: SourceId, paren: &Tok, limit: usize) -> Diagnostic {
    Diagnostic::new(Code::TooDeep, "parentheses are nested too deeply")
        .with_label(
            Span::new(source, paren.start, paren.end),
            format!("more than {limit} levels deep"),
        )
        .with_help(format!(
            "nest at most {limit} levels of `(`; check for a `(` that is never closed"
        ))
}
