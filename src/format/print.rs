//! The canonical text of one statement, term, filter condition or block header.
//!
//! Everything here is printed on one line: the caller places comments and line breaks.

use crate::syntax::ast::{Args, Block, Expr, Include, Plain, Statement, Str, Term, Value};

use super::order;

/// A string literal with its quotes, escaping what must be escaped (`"`, `\` and line breaks).
pub fn string(s: &Str) -> String {
    let mut out = String::with_capacity(s.value.len() + 2);
    out.push('"');
    for c in s.value.chars() {
        match c {
            '"' => out.push_str("\\\""),
            '\\' => out.push_str("\\\\"),
            '\n' => out.push_str("\\n"),
            other => out.push(other),
        }
    }
    out.push('"');
    out
}

fn args(a: &Args) -> String {
    let items: Vec<String> = a.items.iter().map(term).collect();
    format!("({})", items.join(", "))
}

/// One term: a word, string, number or length as written, or `name(args)`.
pub fn term(t: &Term) -> String {
    match t {
        Term::Word(w) => w.name.clone(),
        Term::Str(s) => string(s),
        Term::Num(n) => n.text.clone(),
        Term::Length(l) => format!("{}{}", l.text, l.unit.as_str()),
        Term::Call(c) => format!("{}{}", c.name.name, args(&c.args)),
    }
}

fn value(v: &Value) -> String {
    match v {
        Value::Str(s) => string(s),
        Value::Num(n) => n.text.clone(),
    }
}

/// A filter condition. The tree keeps every parenthesised group and folds `and`/`or` to the
/// left, so printing each node in place reads back as the same tree.
pub fn expr(e: &Expr) -> String {
    match e {
        Expr::Compare {
            var, op, value: v, ..
        } => {
            format!("{} {} {}", var.name, op.as_str(), value(v))
        }
        Expr::In { var, values, .. } => {
            let items: Vec<String> = values.iter().map(value).collect();
            format!("{} in ({})", var.name, items.join(", "))
        }
        Expr::Not { inner, .. } => format!("not {}", expr(inner)),
        Expr::And(a, b) => format!("{} and {}", expr(a), expr(b)),
        Expr::Or(a, b) => format!("{} or {}", expr(a), expr(b)),
        Expr::Group { inner, .. } => format!("({})", expr(inner)),
    }
}

fn plain(block_kind: &str, p: &Plain) -> String {
    let mut out = String::new();
    if let Some(target) = &p.target {
        out.push_str(&target.name);
        out.push_str(": ");
    }
    out.push_str(&p.head.name);
    if let Some(a) = &p.head_args {
        out.push_str(&args(a));
    }
    let terms: Vec<String> = order::canonical_terms(block_kind, p)
        .into_iter()
        .map(term)
        .collect();
    if !terms.is_empty() {
        out.push(' ');
        out.push_str(&terms.join(order::separator(block_kind, p)));
    }
    out
}

/// One statement of a block of kind `block_kind`.
pub fn statement(block_kind: &str, s: &Statement) -> String {
    match s {
        Statement::Plain(p) => plain(block_kind, p),
        Statement::Where(w) => format!("where {}", expr(&w.expr)),
    }
}

/// `include "path"`.
pub fn include(i: &Include) -> String {
    format!("include {}", string(&i.path))
}

/// `KIND NAME ["path"]`, without the brace.
pub fn block_header(b: &Block) -> String {
    match &b.path {
        Some(path) => format!("{} {} {}", b.kind.name, b.name.name, string(path)),
        None => format!("{} {}", b.kind.name, b.name.name),
    }
}
