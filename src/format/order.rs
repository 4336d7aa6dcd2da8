//! The canonical order of the options of a statement, and how its terms are separated.
//!
//! A statement's terms are its *fixed* terms (read by position, e.g. the variable of `x medium`
//! or the three terms of `size 85mm x 60mm`) followed by its *options* (`name(args)` or a bare
//! flag word such as `bar`), which the checker looks up by name, so their order carries no
//! meaning. The formatter keeps the fixed terms as written and sorts the options by
//! [`OPTION_ORDER`]; options it does not know keep their written order, after the known ones.
//!
//! Which terms are options:
//! - in a `data` block: every term of a variable declaration (`speed: ratio label(...)`), and
//!   the terms after the first of `replicates trial collapse(mean)`;
//! - in a `figure` block: every term of a layer (`mean bar error(se)`), and the terms after
//!   the variable of `x` and `y`;
//! - nowhere else (`formats`, `size`, `within`, ... keep their terms as written).
//!
//! Terms are separated by one space, except the factor lists of `within` and `between`, which
//! are separated by `, `.

use crate::check::LayerKind;
use crate::syntax::ast::{Plain, Term};

/// The canonical order of options: what the data is (levels, labels), how it is named (label,
/// unit, column), how an axis shows it (range, scale, order), then each layer's options in the
/// order of the language reference (the mark before its error bars).
pub const OPTION_ORDER: &[&str] = &[
    "levels",
    "labels",
    "label",
    "unit",
    "column",
    "range",
    "scale",
    "order",
    "bins",
    "width",
    "heights",
    "jitter",
    "whiskers",
    "bar",
    "error",
    "by",
    "bandwidth",
    "linear",
    "band",
    "collapse",
];

/// How many leading terms of a statement are fixed; `None` when every term is fixed.
fn fixed_terms(block_kind: &str, stmt: &Plain) -> Option<usize> {
    match block_kind {
        "data" if stmt.target.is_some() => Some(0),
        "data" if stmt.head.name == "replicates" => Some(1),
        "figure" if stmt.target.is_some() => None,
        "figure" if matches!(stmt.head.name.as_str(), "x" | "y") => Some(1),
        "figure" if LayerKind::from_word(&stmt.head.name).is_some() => Some(0),
        _ => None,
    }
}

/// The name an option is sorted by (a call's or a flag's name).
fn option_name(term: &Term) -> Option<&str> {
    match term {
        Term::Call(c) => Some(&c.name.name),
        Term::Word(w) => Some(&w.name),
        _ => None,
    }
}

fn rank(term: &Term) -> usize {
    option_name(term)
        .and_then(|name| OPTION_ORDER.iter().position(|o| *o == name))
        .unwrap_or(OPTION_ORDER.len())
}

/// The statement's terms in canonical order.
pub fn canonical_terms<'a>(block_kind: &str, stmt: &'a Plain) -> Vec<&'a Term> {
    let mut terms: Vec<&Term> = stmt.terms.iter().collect();
    if let Some(fixed) = fixed_terms(block_kind, stmt) {
        let fixed = fixed.min(terms.len());
        // A stable sort: options of equal rank (unknown or repeated) keep their order.
        terms[fixed..].sort_by_key(|t| rank(t));
    }
    terms
}

/// What separates the statement's terms.
pub fn separator(block_kind: &str, stmt: &Plain) -> &'static str {
    let is_list = stmt.target.is_none() && matches!(stmt.head.name.as_str(), "within" | "between");
    if block_kind == "data" && is_list {
        ", "
    } else {
        " "
    }
}
