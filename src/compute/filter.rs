//! The figure's `where` filter: which rows are kept. Missing values never satisfy a comparison
//! (three-valued logic: `not` of a missing test stays missing).

use crate::check::plan::{Codebook, Filter};
use crate::data::Table;

use super::levels::{codes, numbers};
use super::ComputeError;

/// Which rows pass the figure's filter. Missing values never satisfy a comparison.
pub fn filter_rows(
    table: &Table,
    book: &Codebook,
    filter: Option<&Filter>,
) -> Result<Vec<bool>, ComputeError> {
    let n = table.n_rows();
    match filter {
        None => Ok(vec![true; n]),
        Some(f) => (0..n)
            .map(|row| eval(table, book, f, row).map(|v| v == Some(true)))
            .collect(),
    }
}

/// Three-valued: `None` when a value the test needs is missing (`not` of missing stays missing).
fn eval(
    table: &Table,
    book: &Codebook,
    f: &Filter,
    row: usize,
) -> Result<Option<bool>, ComputeError> {
    Ok(match f {
        Filter::Levels { var, keep } => {
            let (codes, _) = codes(table, book, *var)?;
            codes.get(row).map(|c| keep.contains(&(c as usize)))
        }
        Filter::Numeric { var, op, value } => {
            let values = numbers(table, book, *var)?;
            values.get(row).map(|v| {
                use crate::syntax::ast::CompareOp::*;
                match op {
                    Eq => v == *value,
                    Ne => v != *value,
                    Lt => v < *value,
                    Le => v <= *value,
                    Gt => v > *value,
                    Ge => v >= *value,
                }
            })
        }
        Filter::Not(inner) => eval(table, book, inner, row)?.map(|b| !b),
        Filter::And(a, b) => match (eval(table, book, a, row)?, eval(table, book, b, row)?) {
            (Some(false), _) | (_, Some(false)) => Some(false),
            (Some(true), Some(true)) => Some(true),
            _ => None,
        },
        Filter::Or(a, b) => match (eval(table, book, a, row)?, eval(table, book, b, row)?) {
            (Some(true), _) | (_, Some(true)) => Some(true),
            (Some(false), Some(false)) => Some(false),
            _ => None,
        },
    })
}
