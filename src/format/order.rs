//! The canonical order of the options of a statement, and how its terms are separated.
//!
//! A statement's terms are its *fixed* terms (read by position, e.g. the variable of `x medium`
//! or the three terms of `size 85mm x 60mm`) followed by its *options* (`name(args)` or a bare
//! flag word such as `bar`), which the checker looks up by name, so their order carries no
//! meaning. The formatter keeps the fixed terms as written and sorts the options into the order
//! their statement declares them in: a layer's options in the order of its declaration
//! ([`crate::check::layer`]), an axis's in [`AXIS_OPTIONS`], a variable's in
//! [`VARIABLE_OPTIONS`]; options the statement does not know keep their written order, after
//! the known ones.
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

use crate::check::{layer, AXIS_OPTIONS, REPLICATES_OPTIONS, VARIABLE_OPTIONS};
use crate::syntax::ast::{Plain, Term};

/// The options a statement declares, in canonical order; `None` when every term is fixed.
fn declared_options(block_kind: &str, stmt: &Plain) -> Option<Vec<&'static str>> {
    match block_kind {
        "data" if stmt.target.is_some() => Some(VARIABLE_OPTIONS.to_vec()),
        "data" if stmt.head.name == "replicates" => Some(REPLICATES_OPTIONS.to_vec()),
        "figure" if stmt.target.is_some() => None,
        "figure" if matches!(stmt.head.name.as_str(), "x" | "y") => Some(AXIS_OPTIONS.to_vec()),
        "figure" => {
            layer::find(&stmt.head.name).map(|d| d.options.iter().map(|o| o.name).collect())
        }
        _ => None,
    }
}

/// How many leading terms of a statement are fixed; `None` when every term is fixed.
fn fixed_terms(block_kind: &str, stmt: &Plain) -> Option<usize> {
    match block_kind {
        "data" if stmt.target.is_some() => Some(0),
        "data" if stmt.head.name == "replicates" => Some(1),
        "figure" if stmt.target.is_some() => None,
        "figure" if matches!(stmt.head.name.as_str(), "x" | "y") => Some(1),
        "figure" if layer::find(&stmt.head.name).is_some() => Some(0),
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

fn rank(order: &[&str], term: &Term) -> usize {
    option_name(term)
        .and_then(|name| order.iter().position(|o| *o == name))
        .unwrap_or(order.len())
}

/// The statement's terms in canonical order.
pub fn canonical_terms<'a>(block_kind: &str, stmt: &'a Plain) -> Vec<&'a Term> {
    let mut terms: Vec<&Term> = stmt.terms.iter().collect();
    if let (Some(fixed), Some(order)) = (
        fixed_terms(block_kind, stmt),
        declared_options(block_kind, stmt),
    ) {
        let fixed = fixed.min(terms.len());
        // A stable sort: options of equal rank (unknown or repeated) keep their order.
        terms[fixed..].sort_by_key(|t| rank(&order, t));
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
