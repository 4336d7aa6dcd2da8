//! The parser: pest grammar `grammar/figura.pest`, converted at once into the [`ast`] types.
//!
//! [`parse`] never stops at the first error. When pest fails, [`recover`] explains the failure
//! and edits a working copy of the text (blanking the broken statement, or closing what is
//! open) without moving any byte, and the parse is run again — at most [`MAX_ERRORS`] times,
//! so the work stays linear in the text. Problems the grammar accepts on purpose (unknown
//! escapes, unknown units, numbers that overflow) are reported while converting; shape
//! problems of whole statements by [`checks`].
//!
//! Invariant: pest types never leave this file. Every span in the tree and in the diagnostics
//! is a byte range inside the text that was passed in.

use pest::error::{ErrorVariant, InputLocation};
use pest::iterators::Pair;
use pest::Parser as _;

use super::ast::*;
use super::checks;
use super::recover::{self, Context, Expect, Failure};
use super::scan::Scan;
use crate::diag::{Code, Diagnostic, SourceId, Span};

/// The deepest nesting of `(` accepted; deeper text is rejected before parsing (`F0013`).
pub const MAX_NESTING: usize = 64;

/// The deepest `where` condition accepted (`and`, `or`, `not` and parentheses each add a level).
pub const MAX_CONDITION_DEPTH: usize = 256;

/// How many failures at the end of the text are repaired by appending (a `)` and a `}`).
const MAX_FAILURES_AT_END: usize = 2;

/// The most syntax errors reported for one file; parsing stops after that many (`F0019`).
pub const MAX_ERRORS: usize = 50;

#[derive(pest_derive::Parser)]
#[grammar = "grammar/figura.pest"]
struct FiguraParser;

/// Parses one spec file.
///
/// Returns the tree, or every syntax error found (each with a code, a primary span, and help).
pub fn parse(source: SourceId, text: &str) -> Result<SpecFile, Vec<Diagnostic>> {
    let first_scan = Scan::new(text, MAX_NESTING);
    if let Some(paren) = first_scan.too_deep {
        let paren = first_scan.toks[paren];
        return Err(vec![recover::too_deep(source, &paren, MAX_NESTING)]);
    }
    let mut work = text.to_owned();
    let mut diagnostics: Vec<Diagnostic> = Vec::new();
    let mut tree = None;
    // Failures at the very end are fixed by appending; more than a few means no progress.
    let mut failures_at_end = 0;
    loop {
        match parse_once(source, &work) {
            Ok((file, found)) => {
                diagnostics.extend(found);
                tree = Some(file);
                break;
            }
            Err(Stop::Limit(pos)) => {
                diagnostics.push(limit_reached(source, pos));
                break;
            }
            Err(Stop::Failed(failure)) => {
                if failure.pos >= text.len() {
                    failures_at_end += 1;
                    if failures_at_end > MAX_FAILURES_AT_END {
                        break;
                    }
                }
                let scan = Scan::new(&work, usize::MAX);
                let cx = Context {
                    source,
                    work: &work,
                    scan: &scan,
                };
                let recovery = recover::recover(&failure, &cx);
                let repeated = diagnostics.last().is_some_and(|d| {
                    d.code == recovery.diagnostic.code && d.span() == recovery.diagnostic.span()
                });
                if repeated {
                    break;
                }
                diagnostics.push(recovery.diagnostic);
                if diagnostics.len() >= MAX_ERRORS {
                    diagnostics.push(too_many_errors());
                    break;
                }
                let Some(edit) = recovery.edit else { break };
                if !edit.apply(&mut work) {
                    break;
                }
            }
        }
    }
    match tree {
        Some(file) if diagnostics.is_empty() => Ok(file),
        _ => Err(finish(diagnostics, text)),
    }
}

/// Keeps every span inside `text` and orders diagnostics by position.
fn finish(mut diagnostics: Vec<Diagnostic>, text: &str) -> Vec<Diagnostic> {
    let clamp = |at: usize| {
        let mut at = at.min(text.len());
        while !text.is_char_boundary(at) {
            at -= 1;
        }
        at
    };
    for d in &mut diagnostics {
        for label in &mut d.labels {
            let end = clamp(label.span.end);
            label.span = Span::new(label.span.source, clamp(label.span.start).min(end), end);
        }
    }
    diagnostics.sort_by_key(|d| {
        (
            d.code == Code::TooManySyntaxErrors,
            d.span().map_or(usize::MAX, |s| s.start),
        )
    });
    diagnostics
}

fn too_many_errors() -> Diagnostic {
    Diagnostic::new(
        Code::TooManySyntaxErrors,
        format!("stopped after {MAX_ERRORS} syntax errors"),
    )
    .with_help("fix the errors above and run again to see the rest")
}

fn limit_reached(source: SourceId, pos: usize) -> Diagnostic {
    Diagnostic::new(Code::TooDeep, "this file is nested too deeply to read")
        .with_label(
            Span::new(source, pos, pos),
            "the parser ran out of room here",
        )
        .with_help(format!("nest at most {MAX_NESTING} levels of `(`"))
}

enum Stop {
    Failed(Failure),
    /// pest refused to go deeper (its own stack guard).
    Limit(usize),
}

/// One pest run over `work`, converted into a tree plus the problems found while converting.
fn parse_once(source: SourceId, work: &str) -> Result<(SpecFile, Vec<Diagnostic>), Stop> {
    match FiguraParser::parse(Rule::file, work) {
        Ok(mut pairs) => {
            let mut cv = Converter {
                source,
                diagnostics: Vec::new(),
            };
            let file = match pairs.next() {
                Some(pair) => cv.file(pair),
                None => SpecFile {
                    items: Vec::new(),
                    comments: Vec::new(),
                },
            };
            let mut found = cv.diagnostics;
            found.extend(checks::check(&file, work));
            Ok((file, found))
        }
        Err(err) => {
            let pos = match err.location {
                InputLocation::Pos(p) => p,
                InputLocation::Span((start, _)) => start,
            };
            match err.variant {
                ErrorVariant::ParsingError { positives, .. } => {
                    let mut expected: Vec<Expect> =
                        positives.into_iter().filter_map(expect_of).collect();
                    expected.sort();
                    expected.dedup();
                    Err(Stop::Failed(Failure { pos, expected }))
                }
                ErrorVariant::CustomError { .. } => Err(Stop::Limit(pos)),
            }
        }
    }
}

/// What a grammar rule stands for in a message; `None` for rules never worth naming.
fn expect_of(rule: Rule) -> Option<Expect> {
    use Rule as R;
    Some(match rule {
        R::file | R::include | R::kw_include | R::block | R::block_kind => Expect::TopItem,
        R::block_name => Expect::BlockName,
        R::block_path => Expect::BlockPath,
        R::include_path => Expect::IncludePath,
        R::item_end | R::stmt_end => Expect::StmtEnd,
        R::open_brace => Expect::OpenBrace,
        R::close_brace => Expect::CloseBrace,
        R::body | R::where_stmt | R::kw_where | R::plain_stmt | R::target | R::head => {
            Expect::Statement
        }
        R::name => Expect::Name,
        R::colon => Expect::Colon,
        R::term | R::call | R::word | R::length | R::number | R::num_text | R::string | R::args => {
            Expect::Value
        }
        R::open_paren | R::value_list => Expect::OpenParen,
        R::close_paren => Expect::CloseParen,
        R::comma => Expect::Comma,
        R::condition
        | R::and_chain
        | R::negation
        | R::group
        | R::in_test
        | R::comparison
        | R::nl_condition
        | R::nl_and_chain
        | R::nl_negation
        | R::nl_in_test
        | R::nl_comparison
        | R::filter_var
        | R::kw_not => Expect::Condition,
        R::compare_op => Expect::CompareOp,
        R::kw_in => Expect::In,
        R::filter_value => Expect::FilterValue,
        R::kw_and => Expect::And,
        R::kw_or => Expect::Or,
        R::EOI => Expect::EndOfFile,
        R::COMMENT | R::unit => return None,
        // Silent rules: pest never reports them.
        R::WHITESPACE
        | R::bom
        | R::gap
        | R::item
        | R::statement
        | R::primary
        | R::nl_primary
        | R::name_char
        | R::str_char => return None,
    })
}

/// Builds the tree from pest pairs, collecting problems the grammar lets through.
struct Converter {
    source: SourceId,
    diagnostics: Vec<Diagnostic>,
}

/// The children of a pair that carry content (comments and punctuation dropped).
fn parts(pair: Pair<'_, Rule>) -> impl Iterator<Item = Pair<'_, Rule>> {
    pair.into_inner().filter(|p| {
        !matches!(
            p.as_rule(),
            Rule::COMMENT
                | Rule::EOI
                | Rule::open_brace
                | Rule::close_brace
                | Rule::open_paren
                | Rule::close_paren
                | Rule::comma
                | Rule::colon
                | Rule::stmt_end
                | Rule::item_end
                | Rule::kw_include
                | Rule::kw_where
                | Rule::kw_in
        )
    })
}

impl Converter {
    fn span(&self, pair: &Pair<'_, Rule>) -> Span {
        let s = pair.as_span();
        Span::new(self.source, s.start(), s.end())
    }

    /// The span of a pair without the spaces and comments pest skips at its end (which it
    /// includes when an optional or repeated part at the end matched nothing).
    fn content_span(&self, pair: &Pair<'_, Rule>) -> Span {
        let start = pair.as_span().start();
        let end = pair
            .clone()
            .into_inner()
            .filter(|p| p.as_rule() != Rule::COMMENT)
            .map(|p| p.as_span().end())
            .max()
            .unwrap_or_else(|| pair.as_span().end());
        Span::new(self.source, start, end)
    }

    fn error(&mut self, d: Diagnostic) {
        self.diagnostics.push(d);
    }

    fn file(&mut self, pair: Pair<'_, Rule>) -> SpecFile {
        let comments = pair
            .clone()
            .into_inner()
            .flatten()
            .filter(|p| p.as_rule() == Rule::COMMENT)
            .map(|p| Comment {
                text: p.as_str().to_owned(),
                span: self.span(&p),
            })
            .collect();
        let mut items = Vec::new();
        for p in parts(pair) {
            match p.as_rule() {
                Rule::include => items.push(Item::Include(self.include(p))),
                Rule::block => items.push(Item::Block(self.block(p))),
                _ => {}
            }
        }
        SpecFile { items, comments }
    }

    fn include(&mut self, pair: Pair<'_, Rule>) -> Include {
        let start = pair.as_span().start();
        let path = parts(pair).next().map(|p| self.string(p));
        let path = path.unwrap_or_else(|| Str {
            value: String::new(),
            span: Span::new(self.source, start, start),
        });
        Include {
            span: Span::new(self.source, start, path.span.end),
            path,
        }
    }

    fn block(&mut self, pair: Pair<'_, Rule>) -> Block {
        let span = self.span(&pair);
        let mut kind = None;
        let mut name = None;
        let mut path = None;
        let mut statements = Vec::new();
        for p in parts(pair) {
            match p.as_rule() {
                Rule::block_kind => kind = Some(self.ident(&p)),
                Rule::block_name => name = Some(self.ident(&p)),
                Rule::block_path => path = Some(self.string(p)),
                Rule::body => statements = self.body(p),
                _ => {}
            }
        }
        let missing = || Ident {
            name: String::new(),
            span: Span::new(span.source, span.start, span.start),
        };
        Block {
            kind: kind.unwrap_or_else(missing),
            name: name.unwrap_or_else(missing),
            path,
            statements,
            span,
        }
    }

    fn body(&mut self, pair: Pair<'_, Rule>) -> Vec<Statement> {
        let mut statements = Vec::new();
        for p in parts(pair) {
            match p.as_rule() {
                Rule::plain_stmt => statements.push(Statement::Plain(self.plain(p))),
                Rule::where_stmt => statements.push(Statement::Where(self.where_stmt(p))),
                _ => {}
            }
        }
        statements
    }

    fn ident(&self, pair: &Pair<'_, Rule>) -> Ident {
        Ident {
            name: pair.as_str().to_owned(),
            span: self.span(pair),
        }
    }

    /// The `name` inside a `target`, `head` or `call`.
    fn inner_name(&self, pair: &Pair<'_, Rule>) -> Ident {
        pair.clone()
            .into_inner()
            .find(|p| p.as_rule() == Rule::name)
            .map_or_else(|| self.ident(pair), |p| self.ident(&p))
    }

    fn plain(&mut self, pair: Pair<'_, Rule>) -> Plain {
        let span = self.content_span(&pair);
        let mut target = None;
        let mut head = None;
        let mut head_args = None;
        let mut terms = Vec::new();
        for p in parts(pair) {
            match p.as_rule() {
                Rule::target => target = Some(self.inner_name(&p)),
                Rule::head => {
                    head = Some(self.inner_name(&p));
                    head_args = p
                        .into_inner()
                        .find(|q| q.as_rule() == Rule::args)
                        .map(|q| self.args(q));
                }
                Rule::term => {
                    if let Some(t) = self.term(p) {
                        terms.push(t);
                    }
                }
                _ => {}
            }
        }
        Plain {
            target,
            head: head.unwrap_or_else(|| Ident {
                name: String::new(),
                span: Span::new(span.source, span.start, span.start),
            }),
            head_args,
            terms,
            span,
        }
    }

    fn args(&mut self, pair: Pair<'_, Rule>) -> Args {
        let span = self.span(&pair);
        let items = parts(pair)
            .filter(|p| p.as_rule() == Rule::term)
            .filter_map(|p| self.term(p))
            .collect();
        Args { items, span }
    }

    fn term(&mut self, pair: Pair<'_, Rule>) -> Option<Term> {
        let inner = pair.into_inner().next()?;
        Some(match inner.as_rule() {
            Rule::word => Term::Word(self.ident(&inner)),
            Rule::string => Term::Str(self.string(inner)),
            Rule::number => Term::Num(self.number(inner)),
            Rule::length => Term::Length(self.length(inner)),
            Rule::call => {
                let span = self.span(&inner);
                let name = self.inner_name(&inner);
                let args_pair = inner.into_inner().find(|p| p.as_rule() == Rule::args)?;
                Term::Call(Call {
                    name,
                    args: self.args(args_pair),
                    span,
                })
            }
            _ => return None,
        })
    }

    /// A string literal (quotes included in the pair) with its escapes resolved.
    fn string(&mut self, pair: Pair<'_, Rule>) -> Str {
        let span = self.span(&pair);
        let raw = pair.as_str();
        let body = raw
            .strip_prefix('"')
            .and_then(|r| r.strip_suffix('"'))
            .unwrap_or("");
        let body_start = span.start + 1;
        let mut value = String::with_capacity(body.len());
        let mut chars = body.char_indices();
        while let Some((i, c)) = chars.next() {
            if !super::is_text_char(c) {
                let at = Span::new(self.source, body_start + i, body_start + i + c.len_utf8());
                self.error(not_text(at, c));
                continue;
            }
            if c != '\\' {
                value.push(c);
                continue;
            }
            match chars.next() {
                Some((_, '"')) => value.push('"'),
                Some((_, '\\')) => value.push('\\'),
                Some((_, 'n')) => value.push('\n'),
                Some((j, other)) => {
                    let at = Span::new(
                        self.source,
                        body_start + i,
                        body_start + j + other.len_utf8(),
                    );
                    self.error(unknown_escape(at, other));
                    value.push(other);
                }
                None => {}
            }
        }
        Str { value, span }
    }

    /// The value of a number's text; reports values too large for a double.
    fn value(&mut self, text: &str, span: Span) -> f64 {
        match text.parse::<f64>() {
            Ok(v) if v.is_finite() => v,
            _ => {
                self.error(
                    Diagnostic::new(Code::NumberTooLarge, "a number is too large")
                        .with_label(span, "larger than the largest number Figura can hold")
                        .with_help("numbers must lie between -1.7e308 and 1.7e308"),
                );
                0.0
            }
        }
    }

    fn number(&mut self, pair: Pair<'_, Rule>) -> Num {
        let span = self.span(&pair);
        let text = pair.as_str().to_owned();
        let value = self.value(&text, span);
        Num { value, text, span }
    }

    fn length(&mut self, pair: Pair<'_, Rule>) -> Length {
        let span = self.span(&pair);
        let mut text = String::new();
        let mut unit_text = "";
        let mut num_span = span;
        for p in pair.into_inner() {
            match p.as_rule() {
                Rule::num_text => {
                    text = p.as_str().to_owned();
                    num_span = self.span(&p);
                }
                Rule::unit => unit_text = p.as_str(),
                _ => {}
            }
        }
        let value = self.value(&text, num_span);
        let unit = match unit_text {
            "mm" => LengthUnit::Mm,
            "cm" => LengthUnit::Cm,
            "in" => LengthUnit::In,
            "pt" => LengthUnit::Pt,
            other => {
                let unit_span = Span::new(self.source, num_span.end, span.end);
                self.error(unknown_unit(unit_span, &text, other));
                LengthUnit::Mm
            }
        };
        Length {
            value,
            text,
            unit,
            span,
        }
    }

    fn where_stmt(&mut self, pair: Pair<'_, Rule>) -> Where {
        let span = self.span(&pair);
        let mut depth_reported = false;
        let expr = parts(pair)
            .find(|p| p.as_rule() == Rule::condition)
            .map(|p| self.condition(p, &mut depth_reported).0);
        let expr = expr.unwrap_or_else(|| empty_condition(span));
        let span = Span::new(span.source, span.start, expr.span().end);
        Where { expr, span }
    }

    /// `a or b or c` (and `a and b and c`), folded to the left. Returns the expression and
    /// its depth.
    fn condition(&mut self, pair: Pair<'_, Rule>, reported: &mut bool) -> (Expr, usize) {
        let span = self.span(&pair);
        let is_or = matches!(pair.as_rule(), Rule::condition | Rule::nl_condition);
        let join = if is_or { Expr::Or } else { Expr::And };
        let mut acc: Option<(Expr, usize)> = None;
        for p in pair.into_inner() {
            let next = match p.as_rule() {
                Rule::and_chain | Rule::nl_and_chain => self.condition(p, reported),
                Rule::negation | Rule::nl_negation => self.negation(p, reported),
                _ => continue,
            };
            acc = Some(match acc {
                None => next,
                Some((left, depth)) => {
                    let depth = depth.max(next.1) + 1;
                    if !self.depth_ok(depth, span, reported) {
                        return (left, depth);
                    }
                    (join(Box::new(left), Box::new(next.0)), depth)
                }
            });
        }
        acc.unwrap_or_else(|| (empty_condition(span), 1))
    }

    fn depth_ok(&mut self, depth: usize, span: Span, reported: &mut bool) -> bool {
        if depth <= MAX_CONDITION_DEPTH {
            return true;
        }
        if !*reported {
            *reported = true;
            self.error(
                Diagnostic::new(Code::TooDeep, "this filter is nested too deeply")
                    .with_label(span, format!("more than {MAX_CONDITION_DEPTH} levels"))
                    .with_help(
                        "split the condition, or test a list of values with `VAR in (\"a\", \"b\")`",
                    ),
            );
        }
        false
    }

    /// `not not ... primary`.
    fn negation(&mut self, pair: Pair<'_, Rule>, reported: &mut bool) -> (Expr, usize) {
        let span = self.span(&pair);
        let mut nots = Vec::new();
        let mut inner = None;
        for p in pair.into_inner() {
            match p.as_rule() {
                Rule::kw_not => nots.push(p.as_span().start()),
                Rule::group => inner = Some(self.group(p, reported)),
                Rule::in_test | Rule::nl_in_test => inner = Some((self.in_test(p), 1)),
                Rule::comparison | Rule::nl_comparison => inner = Some((self.comparison(p), 1)),
                _ => {}
            }
        }
        let (mut expr, mut depth) = inner.unwrap_or_else(|| (empty_condition(span), 1));
        for start in nots.into_iter().rev() {
            depth += 1;
            if !self.depth_ok(depth, span, reported) {
                break;
            }
            let span = Span::new(self.source, start, expr.span().end);
            expr = Expr::Not {
                inner: Box::new(expr),
                span,
            };
        }
        (expr, depth)
    }

    fn group(&mut self, pair: Pair<'_, Rule>, reported: &mut bool) -> (Expr, usize) {
        let span = self.span(&pair);
        let inner = parts(pair)
            .find(|p| p.as_rule() == Rule::nl_condition)
            .map(|p| self.condition(p, reported));
        let (inner, depth) = inner.unwrap_or_else(|| (empty_condition(span), 1));
        let depth = depth + 1;
        if !self.depth_ok(depth, span, reported) {
            return (inner, depth);
        }
        (
            Expr::Group {
                inner: Box::new(inner),
                span,
            },
            depth,
        )
    }

    fn filter_var(&self, pair: Option<Pair<'_, Rule>>, at: Span) -> Ident {
        pair.map_or_else(
            || Ident {
                name: String::new(),
                span: Span::new(at.source, at.start, at.start),
            },
            |p| self.ident(&p),
        )
    }

    fn comparison(&mut self, pair: Pair<'_, Rule>) -> Expr {
        let span = self.span(&pair);
        let mut var = None;
        let mut op = (CompareOp::Eq, span);
        let mut value = None;
        for p in parts(pair) {
            match p.as_rule() {
                Rule::filter_var => var = Some(p),
                Rule::compare_op => op = (compare_op(p.as_str()), self.span(&p)),
                Rule::filter_value => value = self.filter_value(p),
                _ => {}
            }
        }
        let var = self.filter_var(var, span);
        let value = value.unwrap_or_else(|| {
            Value::Str(Str {
                value: String::new(),
                span: Span::new(span.source, span.end, span.end),
            })
        });
        Expr::Compare {
            var,
            op: op.0,
            op_span: op.1,
            value,
            span,
        }
    }

    fn in_test(&mut self, pair: Pair<'_, Rule>) -> Expr {
        let span = self.span(&pair);
        let mut var = None;
        let mut values = Vec::new();
        for p in parts(pair) {
            match p.as_rule() {
                Rule::filter_var => var = Some(p),
                Rule::value_list => {
                    for v in parts(p) {
                        if let Some(v) = self.filter_value(v) {
                            values.push(v);
                        }
                    }
                }
                _ => {}
            }
        }
        Expr::In {
            var: self.filter_var(var, span),
            values,
            span,
        }
    }

    fn filter_value(&mut self, pair: Pair<'_, Rule>) -> Option<Value> {
        let inner = pair.into_inner().next()?;
        match inner.as_rule() {
            Rule::string => Some(Value::Str(self.string(inner))),
            Rule::number => Some(Value::Num(self.number(inner))),
            _ => None,
        }
    }
}

fn compare_op(text: &str) -> CompareOp {
    match text {
        "!=" => CompareOp::Ne,
        "<" => CompareOp::Lt,
        "<=" => CompareOp::Le,
        ">" => CompareOp::Gt,
        ">=" => CompareOp::Ge,
        _ => CompareOp::Eq,
    }
}

/// Stands in for a condition the grammar guarantees but a pair lacks (never on valid input).
fn empty_condition(span: Span) -> Expr {
    Expr::Group {
        inner: Box::new(Expr::In {
            var: Ident {
                name: String::new(),
                span,
            },
            values: Vec::new(),
            span,
        }),
        span,
    }
}

fn unknown_escape(span: Span, c: char) -> Diagnostic {
    let shown: String = if c.is_control() || c.is_whitespace() {
        format!("U+{:04X}", c as u32)
    } else {
        c.to_string()
    };
    Diagnostic::new(Code::UnknownEscape, format!("unknown escape `\\{shown}`"))
        .with_label(span, "not an escape Figura knows")
        .with_help(
            "strings allow only `\\\"`, `\\\\` and `\\n`; write a backslash as `\\\\` \
             (in file paths, `/` works on every system)",
        )
}

/// F0020: a character no text may hold (it could not be written into an SVG).
fn not_text(span: Span, c: char) -> Diagnostic {
    Diagnostic::new(
        Code::NotTextInString,
        format!(
            "a string holds the character U+{:04X}, which text cannot hold",
            c as u32
        ),
    )
    .with_label(span, "not a character of text")
    .with_help(
        "remove it (it is invisible, and titles, labels and levels are written into SVG files, \
         which cannot hold it); write a line break as `\\n`",
    )
}

fn unknown_unit(span: Span, number: &str, unit: &str) -> Diagnostic {
    let lower = unit.to_ascii_lowercase();
    let help = if recover::is_unit(&lower) {
        format!("units are written in lower case: `{number}{lower}`")
    } else if unit.starts_with('x') {
        "write sizes with spaces around `x`, as in `85mm x 60mm`".to_owned()
    } else {
        format!(
            "write a length as a number followed directly by {}, as in `85mm`",
            units_list()
        )
    };
    Diagnostic::new(Code::UnknownUnit, format!("unknown unit `{unit}`"))
        .with_label(span, format!("after `{number}`"))
        .with_help(help)
}

fn units_list() -> String {
    let quoted: Vec<String> = recover::UNITS.iter().map(|u| format!("`{u}`")).collect();
    format!(
        "{} or {}",
        quoted[..quoted.len() - 1].join(", "),
        quoted[quoted.len() - 1]
    )
}
