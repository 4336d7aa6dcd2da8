//! The syntax tree of one `.figura` file.
//!
//! The tree is deliberately generic: a block is a list of statements, and a statement is a
//! sequence of terms (words, strings, numbers, lengths and calls such as `ci(0.95)`). What a
//! statement *means* is decided by the checker, which can then say precisely what is wrong
//! with an unknown option or a misplaced argument.
//!
//! Invariant: every node carries the byte span of the text it came from. Nothing here refers
//! to pest; the parser converts pest's tree into these types at once.

use crate::diag::Span;

/// One parsed `.figura` file.
#[derive(Debug, Clone, PartialEq)]
pub struct SpecFile {
    pub items: Vec<Item>,
    /// Every `# ...` comment, in source order (kept for the formatter).
    pub comments: Vec<Comment>,
}

/// A `# ...` comment; the span covers the `#` up to (not including) the newline.
/// `text` is the comment exactly as written, `#` included.
#[derive(Debug, Clone, PartialEq)]
pub struct Comment {
    pub text: String,
    pub span: Span,
}

/// A top-level item.
#[derive(Debug, Clone, PartialEq)]
pub enum Item {
    /// `include "path.figura"`
    Include(Include),
    /// `data NAME "file.csv" { ... }`, `figure NAME { ... }` or any other `WORD NAME ... { }`.
    Block(Block),
}

#[derive(Debug, Clone, PartialEq)]
pub struct Include {
    pub path: Str,
    pub span: Span,
}

/// A block: `KIND NAME [STRING] { statements }`.
///
/// The parser accepts any kind word; the checker accepts `data` and `figure`.
#[derive(Debug, Clone, PartialEq)]
pub struct Block {
    pub kind: Ident,
    pub name: Ident,
    /// The file path of a `data` block.
    pub path: Option<Str>,
    pub statements: Vec<Statement>,
    pub span: Span,
}

/// One statement inside a block.
#[derive(Debug, Clone, PartialEq)]
pub enum Statement {
    /// `NAME: head terms...` (a variable declaration in a `data` block) or `head terms...`.
    Plain(Plain),
    /// `where EXPR` (a row filter in a figure).
    Where(Where),
}

impl Statement {
    pub fn span(&self) -> Span {
        match self {
            Statement::Plain(p) => p.span,
            Statement::Where(w) => w.span,
        }
    }
}

/// A statement made of terms.
///
/// `speed: ratio label("Reading speed")` has `target = Some(speed)`, `head = ratio` and one
/// term; `missing("NA", "")` has `head = missing` with `head_args = Some([...])`;
/// `size 85mm x 60mm` has `head = size` and three terms.
#[derive(Debug, Clone, PartialEq)]
pub struct Plain {
    pub target: Option<Ident>,
    pub head: Ident,
    /// Arguments written directly after the head word, as in `missing("NA")`.
    pub head_args: Option<Args>,
    pub terms: Vec<Term>,
    pub span: Span,
}

/// A parenthesised, comma-separated argument list, with the span of the parentheses.
#[derive(Debug, Clone, PartialEq)]
pub struct Args {
    pub items: Vec<Term>,
    pub span: Span,
}

/// One term of a statement or argument list.
#[derive(Debug, Clone, PartialEq)]
pub enum Term {
    Word(Ident),
    Str(Str),
    Num(Num),
    Length(Length),
    /// `name(args)`, e.g. `jitter(0.2)` or `ci(0.95, within)`.
    Call(Call),
}

impl Term {
    pub fn span(&self) -> Span {
        match self {
            Term::Word(t) => t.span,
            Term::Str(t) => t.span,
            Term::Num(t) => t.span,
            Term::Length(t) => t.span,
            Term::Call(t) => t.span,
        }
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Ident {
    pub name: String,
    pub span: Span,
}

/// A string literal with escapes resolved; the span includes the quotes.
#[derive(Debug, Clone, PartialEq)]
pub struct Str {
    pub value: String,
    pub span: Span,
}

/// A number literal: its value and its text as written.
#[derive(Debug, Clone, PartialEq)]
pub struct Num {
    pub value: f64,
    pub text: String,
    pub span: Span,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LengthUnit {
    Mm,
    Cm,
    In,
    Pt,
}

impl LengthUnit {
    /// Millimetres per unit.
    pub fn mm(self) -> f64 {
        match self {
            LengthUnit::Mm => 1.0,
            LengthUnit::Cm => 10.0,
            LengthUnit::In => 25.4,
            LengthUnit::Pt => 25.4 / 72.0,
        }
    }

    pub fn as_str(self) -> &'static str {
        match self {
            LengthUnit::Mm => "mm",
            LengthUnit::Cm => "cm",
            LengthUnit::In => "in",
            LengthUnit::Pt => "pt",
        }
    }
}

/// A length such as `85mm`.
#[derive(Debug, Clone, PartialEq)]
pub struct Length {
    pub value: f64,
    /// The number as written, without the unit.
    pub text: String,
    pub unit: LengthUnit,
    pub span: Span,
}

impl Length {
    pub fn to_mm(&self) -> f64 {
        self.value * self.unit.mm()
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Call {
    pub name: Ident,
    pub args: Args,
    pub span: Span,
}

/// `where EXPR`.
#[derive(Debug, Clone, PartialEq)]
pub struct Where {
    pub expr: Expr,
    pub span: Span,
}

/// A filter expression.
#[derive(Debug, Clone, PartialEq)]
pub enum Expr {
    /// `VAR OP VALUE`, e.g. `session == "morning"` or `age >= 18`.
    Compare {
        var: Ident,
        op: CompareOp,
        op_span: Span,
        value: Value,
        span: Span,
    },
    /// `VAR in ("a", "b")`
    In {
        var: Ident,
        values: Vec<Value>,
        span: Span,
    },
    Not {
        inner: Box<Expr>,
        span: Span,
    },
    And(Box<Expr>, Box<Expr>),
    Or(Box<Expr>, Box<Expr>),
    /// `( expr )`; kept so the formatter can reproduce it.
    Group {
        inner: Box<Expr>,
        span: Span,
    },
}

impl Expr {
    pub fn span(&self) -> Span {
        match self {
            Expr::Compare { span, .. } | Expr::In { span, .. } => *span,
            Expr::Not { span, .. } | Expr::Group { span, .. } => *span,
            Expr::And(a, b) | Expr::Or(a, b) => a.span().to(b.span()),
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum CompareOp {
    Eq,
    Ne,
    Lt,
    Le,
    Gt,
    Ge,
}

impl CompareOp {
    pub fn as_str(self) -> &'static str {
        match self {
            CompareOp::Eq => "==",
            CompareOp::Ne => "!=",
            CompareOp::Lt => "<",
            CompareOp::Le => "<=",
            CompareOp::Gt => ">",
            CompareOp::Ge => ">=",
        }
    }

    pub fn is_ordering(self) -> bool {
        !matches!(self, CompareOp::Eq | CompareOp::Ne)
    }
}

/// A literal on the right of a comparison.
#[derive(Debug, Clone, PartialEq)]
pub enum Value {
    Str(Str),
    Num(Num),
}

impl Value {
    pub fn span(&self) -> Span {
        match self {
            Value::Str(s) => s.span,
            Value::Num(n) => n.span,
        }
    }
}
