//! Reading one numeric cell.
//!
//! Accepted: surrounding whitespace, an optional sign, decimal digits with an optional decimal
//! mark (`12`, `-3.5`, `.5`, `4.`), and an optional exponent (`1.2e3`, `5E-02`). The decimal
//! mark is a point, or a comma in a file whose block says `decimal comma` (`3,5`; a point is
//! then refused as digit grouping). The result is always finite, and `-0` reads as `0`.
//! Rejected with a reason: `nan`, `inf`, `infinity` (any case or sign; they are never values),
//! numbers too large for a double (`1e999`), and every other text, with a hint when it looks
//! like digit grouping, the other decimal mark, a unit, a missing-value marker or a spreadsheet
//! error.
//!
//! Cost: a well-formed cell is parsed once, with no copy (a decimal comma is swapped for a point
//! in a small buffer on the stack); only a cell that fails is looked at again to say why.

use super::spec::DecimalMark;

/// Why a cell is not a number.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum NumberProblem {
    /// Not number text at all.
    NotNumber(NotNumberHint),
    /// Number-like text with no finite value.
    NotFinite(NonFinite),
}

/// What a non-numeric cell looks like, for the help line.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum NotNumberHint {
    /// Digits with thousands separators or a decimal comma: `1,234.5`, `3,5`, `1 200`.
    Separators,
    /// A number followed by a unit or percent sign: `12 kg`, `45%`.
    Unit,
    /// A common way of writing "no value" that the codebook does not list: `n/a`, `-`, `.`.
    MissingMarker,
    /// A spreadsheet's error value: `#DIV/0!`, `#VALUE!`.
    SpreadsheetError,
    /// A date or time stored as one in a workbook.
    Date,
    /// Anything else.
    Other,
}

/// Which kind of non-finite text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum NonFinite {
    /// `nan`, in any case, with or without sign.
    NotANumber,
    /// `inf` or `infinity`, in any case, with or without sign.
    Infinity,
    /// Valid number text beyond the largest double, e.g. `1e999`.
    Overflow,
}

/// Longest cell the decimal-comma fast path copies to the stack; longer ones take the slow
/// path, which gives the same answer.
const SHORT_CELL: usize = 64;

/// Reads a numeric cell (not a missing token; the caller checks those first).
pub(super) fn parse_number(cell: &str, decimal: DecimalMark) -> Result<f64, NumberProblem> {
    let quick = match decimal {
        DecimalMark::Point => finite(cell),
        DecimalMark::Comma => with_point(cell.as_bytes())
            .and_then(|(buf, n)| std::str::from_utf8(&buf[..n]).ok().and_then(finite)),
    };
    match quick {
        Some(value) => Ok(value),
        None => explain(cell.trim(), decimal),
    }
}

/// A finite value of text Rust reads as a number (the same texts as [`is_plain_number`], plus
/// `inf` and `nan`, which are not finite); `-0` is returned as `0`.
fn finite(text: &str) -> Option<f64> {
    // `v + 0.0` turns -0.0 into 0.0 and leaves every other value unchanged.
    text.parse::<f64>()
        .ok()
        .filter(|v| v.is_finite())
        .map(|v| v + 0.0)
}

/// A short cell with its one decimal comma made a point; `None` when it holds a point, more than
/// one comma, or is too long for the buffer.
fn with_point(bytes: &[u8]) -> Option<([u8; SHORT_CELL], usize)> {
    if bytes.len() > SHORT_CELL || bytes.contains(&b'.') {
        return None;
    }
    let mut buf = [0u8; SHORT_CELL];
    let mut commas = 0;
    for (slot, &byte) in buf.iter_mut().zip(bytes) {
        *slot = if byte == b',' {
            commas += 1;
            b'.'
        } else {
            byte
        };
    }
    (commas <= 1).then_some((buf, bytes.len()))
}

/// The slow path: why trimmed `text` is no number, or its value when only spaces were in the
/// way.
fn explain(text: &str, decimal: DecimalMark) -> Result<f64, NumberProblem> {
    if let Some(kind) = non_finite_word(text) {
        return Err(NumberProblem::NotFinite(kind));
    }
    let plain = match decimal {
        DecimalMark::Point => text.to_owned(),
        // A point is the other decimal mark here (`3.5`), or grouping (`1.234,5`).
        DecimalMark::Comma
            if text.contains('.') && (is_plain_number(text) || looks_grouped(text)) =>
        {
            return Err(NumberProblem::NotNumber(NotNumberHint::Separators))
        }
        DecimalMark::Comma if text.contains('.') || text.matches(',').count() > 1 => {
            return Err(NumberProblem::NotNumber(hint_for(text)))
        }
        DecimalMark::Comma => text.replacen(',', ".", 1),
    };
    if !is_plain_number(&plain) {
        return Err(NumberProblem::NotNumber(hint_for(text)));
    }
    match plain.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v + 0.0),
        Ok(_) => Err(NumberProblem::NotFinite(NonFinite::Overflow)),
        Err(_) => Err(NumberProblem::NotNumber(NotNumberHint::Other)),
    }
}

fn non_finite_word(text: &str) -> Option<NonFinite> {
    let unsigned = text.strip_prefix(['+', '-']).unwrap_or(text);
    if unsigned.eq_ignore_ascii_case("nan") {
        Some(NonFinite::NotANumber)
    } else if unsigned.eq_ignore_ascii_case("inf") || unsigned.eq_ignore_ascii_case("infinity") {
        Some(NonFinite::Infinity)
    } else {
        None
    }
}

/// `[+-]? (digits [. digits?] | . digits) ([eE] [+-]? digits)?`, the whole text.
pub(super) fn is_plain_number(text: &str) -> bool {
    let bytes = text.as_bytes();
    let mut at = usize::from(matches!(bytes.first(), Some(b'+' | b'-')));
    let int_digits = count_digits(&bytes[at..]);
    at += int_digits;
    let mut frac_digits = 0;
    if bytes.get(at) == Some(&b'.') {
        at += 1;
        frac_digits = count_digits(&bytes[at..]);
        at += frac_digits;
    }
    if int_digits + frac_digits == 0 {
        return false;
    }
    if matches!(bytes.get(at), Some(b'e' | b'E')) {
        at += 1;
        at += usize::from(matches!(bytes.get(at), Some(b'+' | b'-')));
        let exp_digits = count_digits(&bytes[at..]);
        if exp_digits == 0 {
            return false;
        }
        at += exp_digits;
    }
    at == bytes.len()
}

fn count_digits(bytes: &[u8]) -> usize {
    bytes.iter().take_while(|b| b.is_ascii_digit()).count()
}

/// Texts that commonly mean "no value" (common practice in exported tables).
const MISSING_MARKERS: [&str; 13] = [
    "", "-", "--", ".", "?", "n/a", "n.a.", "na", "nd", "null", "none", "missing", "#n/a",
];

/// Whether a cell is a common way of writing "no value" (compared trimmed, ignoring case).
pub(super) fn is_common_missing_marker(cell: &str) -> bool {
    MISSING_MARKERS.contains(&cell.trim().to_lowercase().as_str())
}

fn hint_for(text: &str) -> NotNumberHint {
    if is_common_missing_marker(text) {
        NotNumberHint::MissingMarker
    } else if text.starts_with('#') && (text.ends_with('!') || text.ends_with('?')) {
        NotNumberHint::SpreadsheetError
    } else if looks_grouped(text) {
        NotNumberHint::Separators
    } else if looks_like_number_with_unit(text) {
        NotNumberHint::Unit
    } else {
        NotNumberHint::Other
    }
}

/// Characters people use to group digits or as a decimal comma.
fn is_group_mark(c: char) -> bool {
    matches!(c, ',' | '\'' | ' ' | '\u{a0}' | '\u{202f}' | '.')
}

/// Digits and group marks only, at least one comma or inner space/apostrophe or two points.
fn looks_grouped(text: &str) -> bool {
    let body = text.strip_prefix(['+', '-']).unwrap_or(text);
    let all_allowed = body.chars().all(|c| c.is_ascii_digit() || is_group_mark(c));
    let has_digit = body.chars().any(|c| c.is_ascii_digit());
    let has_non_point_mark = body.chars().any(|c| is_group_mark(c) && c != '.');
    let points = body.chars().filter(|&c| c == '.').count();
    all_allowed && has_digit && (has_non_point_mark || points > 1)
}

/// A plain number, then (after optional spaces) a word or symbol with no digits: `12 kg`, `45%`.
fn looks_like_number_with_unit(text: &str) -> bool {
    let Some(split) = text.find(|c: char| c.is_alphabetic() || c == '%' || c == '°') else {
        return false;
    };
    let (number, unit) = text.split_at(split);
    is_plain_number(number.trim_end()) && !unit.chars().any(|c| c.is_ascii_digit())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_numbers_read_exactly() {
        // Values chosen so the decimal text has one nearest double; the right-hand sides are
        // Rust float literals of the same text (common practice).
        assert_eq!(parse_number(" 12 ", DecimalMark::Point), Ok(12.0));
        assert_eq!(parse_number("-3.5", DecimalMark::Point), Ok(-3.5));
        assert_eq!(parse_number("+.5", DecimalMark::Point), Ok(0.5));
        assert_eq!(parse_number("4.", DecimalMark::Point), Ok(4.0));
        assert_eq!(parse_number("1.2e3", DecimalMark::Point), Ok(1200.0));
        assert_eq!(parse_number("5E-02", DecimalMark::Point), Ok(0.05));
        assert_eq!(parse_number("1e-999", DecimalMark::Point), Ok(0.0));
        let zero = parse_number("-0", DecimalMark::Point).unwrap_or(f64::NAN);
        assert!(zero == 0.0 && zero.is_sign_positive());
    }

    #[test]
    fn non_finite_texts_are_rejected() {
        use NonFinite::*;
        for (text, kind) in [
            ("nan", NotANumber),
            ("-NaN", NotANumber),
            ("inf", Infinity),
            ("+Infinity", Infinity),
            ("1e999", Overflow),
            ("-1e400", Overflow),
        ] {
            assert_eq!(
                parse_number(text, DecimalMark::Point),
                Err(NumberProblem::NotFinite(kind)),
                "{text}"
            );
        }
    }

    #[test]
    fn a_decimal_comma_is_read_when_declared() {
        let comma = |text| parse_number(text, DecimalMark::Comma);
        assert_eq!(comma("3,5"), Ok(3.5));
        assert_eq!(comma(" -0,25 "), Ok(-0.25));
        assert_eq!(comma("12"), Ok(12.0));
        assert_eq!(comma("1,5e3"), Ok(1500.0));
        let long = format!("0,{}", "1".repeat(80));
        let expected: f64 = long.replace(',', ".").parse().expect("plain number text");
        assert_eq!(comma(&long), Ok(expected));
        for grouped in ["1.234,5", "3.5", "1,234,5"] {
            assert_eq!(
                comma(grouped),
                Err(NumberProblem::NotNumber(NotNumberHint::Separators)),
                "{grouped}"
            );
        }
        assert_eq!(
            comma("nan"),
            Err(NumberProblem::NotFinite(NonFinite::NotANumber))
        );
        assert_eq!(
            comma("1e999"),
            Err(NumberProblem::NotFinite(NonFinite::Overflow))
        );
    }

    #[test]
    fn hints_name_the_likely_mistake() {
        use NotNumberHint::*;
        for (text, hint) in [
            ("1,234.5", Separators),
            ("3,5", Separators),
            ("1 200", Separators),
            ("1.234.567", Separators),
            ("12 kg", Unit),
            ("45%", Unit),
            ("n/a", MissingMarker),
            ("-", MissingMarker),
            ("#DIV/0!", SpreadsheetError),
            ("abc", Other),
            ("0x10", Other),
            ("", MissingMarker),
            ("  ", MissingMarker),
        ] {
            assert_eq!(
                parse_number(text, DecimalMark::Point),
                Err(NumberProblem::NotNumber(hint)),
                "{text}"
            );
        }
    }
}
