//! Checking `where` filters: names resolved, levels declared, comparisons that fit the scale.

use crate::diag::{did_you_mean, Code, Diagnostic};
use crate::syntax::ast::{CompareOp, Expr, Ident, Value};

use super::codebook::resolve;
use super::plan::{Codebook, Filter, Scale, Variable};

/// Checks a filter expression against a codebook.
pub fn check_filter(book: &Codebook, expr: &Expr, diags: &mut Vec<Diagnostic>) -> Option<Filter> {
    match expr {
        Expr::Group { inner, .. } => check_filter(book, inner, diags),
        Expr::Not { inner, .. } => Some(Filter::Not(Box::new(check_filter(book, inner, diags)?))),
        Expr::And(a, b) => {
            let (a, b) = (check_filter(book, a, diags), check_filter(book, b, diags));
            Some(Filter::And(Box::new(a?), Box::new(b?)))
        }
        Expr::Or(a, b) => {
            let (a, b) = (check_filter(book, a, diags), check_filter(book, b, diags));
            Some(Filter::Or(Box::new(a?), Box::new(b?)))
        }
        Expr::In { var, values, .. } => {
            let id = resolve(book, var, diags)?;
            let v = book.var(id);
            let levels = categorical_levels(v, var, diags)?;
            let mut keep = Vec::new();
            for value in values {
                keep.push(level_index(v, levels, value, diags)?);
            }
            keep.sort_unstable();
            keep.dedup();
            Some(Filter::Levels { var: id, keep })
        }
        Expr::Compare {
            var,
            op,
            op_span,
            value,
            ..
        } => {
            let id = resolve(book, var, diags)?;
            let v = book.var(id);
            if v.scale.is_numeric() {
                let Value::Num(n) = value else {
                    diags.push(
                        Diagnostic::new(
                            Code::BadFilter,
                            format!("`{}` is numeric; compare it with a number", v.name),
                        )
                        .with_label(value.span(), "a text")
                        .with_help("write the number without quotes"),
                    );
                    return None;
                };
                return Some(Filter::Numeric {
                    var: id,
                    op: *op,
                    value: n.value,
                });
            }
            let levels = categorical_levels(v, var, diags)?;
            if op.is_ordering() && v.scale != Scale::Ordinal {
                diags.push(
                    Diagnostic::new(Code::BadFilter, format!("`{}` is nominal: its levels have no order", v.name))
                        .with_label(*op_span, format!("`{}` compares order", op.as_str()))
                        .with_help("use `==`, `!=` or `in (...)`; or declare the variable ordinal if its levels are ordered"),
                );
                return None;
            }
            let idx = level_index(v, levels, value, diags)?;
            let keep: Vec<usize> = (0..levels.len())
                .filter(|&i| compare(i, *op, idx))
                .collect();
            Some(Filter::Levels { var: id, keep })
        }
    }
}

fn compare(i: usize, op: CompareOp, j: usize) -> bool {
    match op {
        CompareOp::Eq => i == j,
        CompareOp::Ne => i != j,
        CompareOp::Lt => i < j,
        CompareOp::Le => i <= j,
        CompareOp::Gt => i > j,
        CompareOp::Ge => i >= j,
    }
}

fn categorical_levels<'a>(
    v: &'a Variable,
    name: &Ident,
    diags: &mut Vec<Diagnostic>,
) -> Option<&'a [String]> {
    if v.scale == Scale::Id {
        diags.push(
            Diagnostic::new(Code::BadFilter, format!("`{}` is an id; filters compare measured variables", v.name))
                .with_label(name.span, "an id")
                .with_help("filter on a factor or a measure; to drop subjects, remove their rows from a copy of the data"),
        );
        return None;
    }
    match &v.levels {
        Some(l) => Some(l),
        None => {
            diags.push(
                Diagnostic::new(
                    Code::BadFilter,
                    format!("`{}` has no declared levels to filter on", v.name),
                )
                .with_label(name.span, "levels not declared")
                .with_label(v.span, "declared here")
                .with_help("add `levels(...)` to the declaration so a misspelt level is caught"),
            );
            None
        }
    }
}

fn level_index(
    v: &Variable,
    levels: &[String],
    value: &Value,
    diags: &mut Vec<Diagnostic>,
) -> Option<usize> {
    let text = match value {
        Value::Str(s) => s.value.clone(),
        Value::Num(n) => n.text.clone(),
    };
    if let Some(i) = levels.iter().position(|l| *l == text) {
        return Some(i);
    }
    let d = Diagnostic::new(
        Code::BadFilter,
        format!("\"{text}\" is not a level of `{}`", v.name),
    )
    .with_label(value.span(), "unknown level");
    let help = match did_you_mean(&text, levels.iter().map(String::as_str)) {
        Some(s) => format!("did you mean \"{s}\"?"),
        None => format!(
            "the levels are {}",
            levels
                .iter()
                .map(|l| format!("\"{l}\""))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    };
    diags.push(d.with_help(help));
    None
}
