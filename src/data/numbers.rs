//! Reading one numeric cell.
//!
//! Accepted: surrounding whitespace, an optional sign, decimal digits with an optional decimal
//! point (`12`, `-3.5`, `.5`, `4.`), and an optional exponent (`1.2e3`, `5E-02`). The result is
//! always finite, and `-0` reads as `0`. Rejected with a reason: `nan`, `inf`, `infinity` (any
//! case or sign; they are never values), numbers too large for a double (`1e999`), and every
//! other text, with a hint when it looks like digit grouping, a decimal comma, a unit, a
//! missing-value marker or a spreadsheet error.

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

/// Reads a numeric cell (not a missing token; the caller checks those first).
pub(super) fn parse_number(cell: &str) -> Result<f64, NumberProblem> {
    let text = cell.trim();
    if let Some(kind) = non_finite_word(text) {
        return Err(NumberProblem::NotFinite(kind));
    }
    if !is_plain_number(text) {
        return Err(NumberProblem::NotNumber(hint_for(text)));
    }
    match text.parse::<f64>() {
        // `v + 0.0` turns -0.0 into 0.0 and leaves every other value unchanged.
        Ok(v) if v.is_finite() => Ok(v + 0.0),
        Ok(_) => Err(NumberProblem::NotFinite(NonFinite::Overflow)),
        Err(_) => Err(NumberProblem::NotNumber(NotNumberHint::Other)),
    }
}

fn non_finite_word(text: &str) -> Option<NonFinite> {
    let unsigned = text.strip_prefix(['+', '-']).unwrap_or(text);
    let lower = unsigned.to_ascii_lowercase();
    match lower.as_str() {
        "nan" => Some(NonFinite::NotANumber),
        "inf" | "infinity" => Some(NonFinite::Infinity),
        _ => None,
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
        assert_eq!(parse_number(" 12 "), Ok(12.0));
        assert_eq!(parse_number("-3.5"), Ok(-3.5));
        assert_eq!(parse_number("+.5"), Ok(0.5));
        assert_eq!(parse_number("4."), Ok(4.0));
        assert_eq!(parse_number("1.2e3"), Ok(1200.0));
        assert_eq!(parse_number("5E-02"), Ok(0.05));
        assert_eq!(parse_number("1e-999"), Ok(0.0));
        let zero = parse_number("-0").unwrap_or(f64::NAN);
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
                parse_number(text),
                Err(NumberProblem::NotFinite(kind)),
                "{text}"
            );
        }
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
                parse_number(text),
                Err(NumberProblem::NotNumber(hint)),
                "{text}"
            );
        }
    }
}
