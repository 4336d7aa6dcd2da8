//! Syntax checks on whole statements of a parsed tree.
//!
//! These are mistakes of form that hold whatever a statement means, and that the grammar lets
//! through so that the rest of the file still parses: `include` inside a block, a unit written
//! apart from its number (`85 mm`), and a bare number in a `W x H` size (`85 x 60`).
//! What a statement means is left to the checker.

use super::ast::*;
use super::recover::{is_unit, unit_apart};
use crate::diag::{Code, Diagnostic};

/// Every problem of form in `file`, whose spans point into `text`.
pub fn check(file: &SpecFile, text: &str) -> Vec<Diagnostic> {
    let mut found = Vec::new();
    for item in &file.items {
        let Item::Block(block) = item else { continue };
        for statement in &block.statements {
            if let Statement::Plain(plain) = statement {
                include_in_block(plain, &mut found);
                units_apart(&plain.terms, text, &mut found);
                bare_sizes(&plain.terms, &mut found);
            }
        }
    }
    found
}

fn include_in_block(plain: &Plain, found: &mut Vec<Diagnostic>) {
    if plain.target.is_none() && plain.head.name == "include" {
        found.push(
            Diagnostic::new(
                Code::IncludeInBlock,
                "`include` is only allowed at the top level",
            )
            .with_label(plain.span, "inside a block")
            .with_help("move this line out of the block, above or below any `{ }`"),
        );
    }
}

/// `85 mm`: a number followed, after spaces only, by a unit word.
fn units_apart(terms: &[Term], text: &str, found: &mut Vec<Diagnostic>) {
    for pair in terms.windows(2) {
        let [Term::Num(num), Term::Word(word)] = pair else {
            continue;
        };
        let between = text.get(num.span.end..word.span.start).unwrap_or("");
        if is_unit(&word.name) && between.chars().all(|c| c == ' ' || c == '\t') {
            found.push(unit_apart(num.span.to(word.span), &num.text, &word.name));
        }
    }
}

/// `85 x 60mm`: a size written `W x H` where a side has no unit.
fn bare_sizes(terms: &[Term], found: &mut Vec<Diagnostic>) {
    for triple in terms.windows(3) {
        let [left, Term::Word(x), right] = triple else {
            continue;
        };
        let is_size_side = |t: &Term| matches!(t, Term::Num(_) | Term::Length(_));
        if x.name != "x" || !is_size_side(left) || !is_size_side(right) {
            continue;
        }
        for side in [left, right] {
            if let Term::Num(num) = side {
                found.push(needs_unit(num));
            }
        }
    }
}

fn needs_unit(num: &Num) -> Diagnostic {
    let mm = num.value;
    let n = &num.text;
    let cm = short(mm / LengthUnit::Cm.mm(), 2);
    let inch = short(mm / LengthUnit::In.mm(), 1);
    let pt = short(mm / LengthUnit::Pt.mm(), 0);
    Diagnostic::new(
        Code::SizeWithoutUnit,
        format!("`{n}` needs a unit here: write `{n}mm`, `{cm}cm`, `{inch}in` or `{pt}pt`"),
    )
    .with_label(num.span, "a size needs a unit")
    .with_help("a size is two lengths, each a number followed directly by `mm`, `cm`, `in` or `pt`")
}

/// `v` rounded to `decimals` places, without trailing zeros.
fn short(v: f64, decimals: usize) -> String {
    let text = format!("{v:.decimals$}");
    let text = if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.')
    } else {
        &text
    };
    if text == "-0" {
        "0".to_owned()
    } else {
        text.to_owned()
    }
}

#[cfg(test)]
mod tests {
    use super::short;

    #[test]
    fn shortens_suggested_lengths() {
        // 85 mm = 8.5 cm = 3.346 in = 240.9 pt (1 in = 25.4 mm = 72 pt, by definition).
        assert_eq!(short(85.0 / 10.0, 2), "8.5");
        assert_eq!(short(85.0 / 25.4, 1), "3.3");
        assert_eq!(short(85.0 * 72.0 / 25.4, 0), "241");
        assert_eq!(short(-0.001, 1), "0");
    }
}
