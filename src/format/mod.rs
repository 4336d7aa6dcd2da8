//! `figura fmt`: specs rewritten in one canonical layout, from the same parser as the build.
//!
//! The canonical layout:
//! - one `include`, block header, statement or comment per line; statements joined by `;` are
//!   split, and argument lists or filters written over several lines are joined;
//! - statements inside a block indented by two spaces; `}` on its own line; a block with
//!   nothing inside is written `figure name {}`;
//! - one space between words, `name: scale` in declarations, `name(a, b)` for options (no
//!   space inside the parentheses, `, ` between arguments, no trailing comma), `a == 1`,
//!   `not`, `and`, `or` and `in (...)` in filters, factor lists as `within a, b`;
//! - the options of a statement in a fixed order (see [`order`]);
//! - exactly one blank line between blocks and before a block's comments; elsewhere one blank
//!   line where the source had one or more; no blank line after `{` or before `}`;
//! - a comment after code is separated from it by two spaces; comment text is kept as written
//!   (trailing blanks removed); see [`place`] for where each comment goes;
//! - strings written with the escapes they need (`\"`, `\\`, `\n`); numbers and lengths
//!   exactly as written (`1e3` stays `1e3`); `\n` line ends and one final line break.
//!
//! Guarantees: formatting never changes what a spec means (the checker reads the same plan:
//! only option order, commas between terms, blanks and comment positions change); it keeps
//! every comment; and it is idempotent: [`format_source`] checks that its output parses and
//! formats to itself before returning it, and reports an internal error otherwise.
//!
//! Code map: `place` (comments and blank lines), `order` (option order and separators),
//! `print` (the one-line text of each node), `files` (finding, checking and rewriting files).

mod files;
pub mod order;
mod place;
mod print;

pub use files::{format_paths, FormatReport, Mode};

use crate::diag::{Diagnostic, SourceId, Span};
use crate::syntax::{
    self,
    ast::{Block, Comment, Item, SpecFile},
};

use place::{Around, CommentLine, Lines};

/// Why a text could not be formatted.
#[derive(Debug)]
pub enum FormatError {
    /// The text does not parse; every syntax error found.
    Syntax(Vec<Diagnostic>),
    /// The formatter's output would not read back as itself (a bug; nothing is written).
    Internal(String),
}

/// The canonical text of a spec. `source` is the id the diagnostics point into.
pub fn format_source(source: SourceId, text: &str) -> Result<String, FormatError> {
    let tree = syntax::parse(source, text).map_err(FormatError::Syntax)?;
    let formatted = format_tree(&tree, text);
    let again = syntax::parse(source, &formatted)
        .map(|t| format_tree(&t, &formatted))
        .map_err(|d| {
            let first = d.first().map_or_else(String::new, |d| d.message.clone());
            FormatError::Internal(format!("the formatted text does not parse: {first}"))
        })?;
    if again != formatted {
        return Err(FormatError::Internal(
            "formatting the formatted text changes it again".to_string(),
        ));
    }
    Ok(formatted)
}

/// The canonical text of a parsed spec; `text` is the source the tree's spans point into.
pub fn format_tree(tree: &SpecFile, text: &str) -> String {
    let lines = Lines::new(text);
    let spans: Vec<Span> = tree.items.iter().map(item_span).collect();
    let comments: Vec<&Comment> = tree.comments.iter().collect();
    let placed = place::place(&lines, &spans, &comments, None);
    let mut w = Writer::default();
    let mut prev_was_block: Option<bool> = None;
    for (i, item) in tree.items.iter().enumerate() {
        let around = &placed.around[i];
        let is_block = matches!(item, Item::Block(_));
        // Blocks always stand apart; consecutive includes keep the source's spacing.
        let forced = prev_was_block.is_some_and(|prev| prev || is_block);
        match item {
            Item::Include(inc) => {
                let inner: Vec<String> = placed.inside[i].iter().map(|c| trimmed(c)).collect();
                w.group(around, forced, 0, &inner);
                w.line(
                    0,
                    &with_trailing(print::include(inc), around.trailing.as_deref()),
                );
            }
            Item::Block(block) => {
                w.group(around, forced, 0, &[]);
                w.block(block, &placed.inside[i], around.trailing.as_deref(), &lines);
            }
        }
        prev_was_block = Some(is_block);
    }
    w.comments(&placed.dangling, 0);
    w.out
}

fn item_span(item: &Item) -> Span {
    match item {
        Item::Include(i) => i.span,
        Item::Block(b) => b.span,
    }
}

fn trimmed(c: &Comment) -> String {
    c.text.trim_end().to_owned()
}

fn with_trailing(code: String, comment: Option<&str>) -> String {
    match comment {
        Some(c) => format!("{code}  {c}"),
        None => code,
    }
}

/// The output text, line by line.
#[derive(Default)]
struct Writer {
    out: String,
    /// Nothing written yet in the current sequence (file or block body): no blank line here.
    fresh: bool,
}

const INDENT: &str = "  ";

impl Writer {
    fn line(&mut self, indent: usize, text: &str) {
        for _ in 0..indent {
            self.out.push_str(INDENT);
        }
        self.out.push_str(text);
        self.out.push('\n');
        self.fresh = false;
    }

    fn blank(&mut self) {
        if !self.fresh && !self.out.is_empty() {
            self.out.push('\n');
        }
    }

    /// The comments and blank lines before a node.
    fn group(&mut self, around: &Around, forced_blank: bool, indent: usize, inner: &[String]) {
        if forced_blank || around.starts_after_blank() {
            self.blank();
        }
        for (j, c) in around.leading.iter().enumerate() {
            if j > 0 && c.blank_before {
                self.blank();
            }
            self.line(indent, &c.text);
        }
        if !around.leading.is_empty() && around.blank_before {
            self.blank();
        }
        for c in inner {
            self.line(indent, c);
        }
    }

    /// Comments after the last node of a sequence.
    fn comments(&mut self, list: &[CommentLine], indent: usize) {
        for c in list {
            if c.blank_before {
                self.blank();
            }
            self.line(indent, &c.text);
        }
    }

    fn block(&mut self, b: &Block, inside: &[&Comment], trailing: Option<&str>, lines: &Lines) {
        let spans: Vec<Span> = b.statements.iter().map(|s| s.span()).collect();
        let header_line = lines.line_of(b.span.start);
        let placed = place::place(lines, &spans, inside, Some(header_line));
        let header = print::block_header(b);
        if b.statements.is_empty() && placed.dangling.is_empty() && placed.header.is_none() {
            self.line(0, &with_trailing(format!("{header} {{}}"), trailing));
            return;
        }
        self.line(
            0,
            &with_trailing(format!("{header} {{"), placed.header.as_deref()),
        );
        self.fresh = true;
        for (i, stmt) in b.statements.iter().enumerate() {
            let around = &placed.around[i];
            let inner: Vec<String> = placed.inside[i].iter().map(|c| trimmed(c)).collect();
            self.group(around, false, 1, &inner);
            let code = print::statement(&b.kind.name, stmt);
            self.line(1, &with_trailing(code, around.trailing.as_deref()));
        }
        self.comments(&placed.dangling, 1);
        self.fresh = false;
        self.line(0, &with_trailing("}".to_string(), trailing));
    }
}
