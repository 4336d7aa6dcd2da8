//! Reading colours written by users: `#rrggbb` or `#rgb`, hexadecimal sRGB.
//!
//! `#rgb` is shorthand for `#rrggbb` with each digit doubled (`#1a7` = `#11aa77`), as in CSS
//! (common practice). Upper- and lower-case digits are accepted. Nothing else is: no spaces,
//! no names, no alpha. Every refusal says what is wrong and where, as a byte range of the text,
//! so a diagnostic can underline it.

use std::fmt;
use std::ops::Range;

use crate::scene::Colour;

/// Why a text is not a colour.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum HexError {
    /// The text is empty.
    Empty,
    /// The text does not start with `#`; `found` is its first character.
    MissingHash { found: char },
    /// A character after `#` is not a hexadecimal digit; `offset` is its byte offset.
    NotHexDigit { offset: usize, found: char },
    /// `#` is followed by `digits` hexadecimal digits, neither 3 nor 6.
    WrongLength { digits: usize },
}

impl HexError {
    /// The byte range of the text the error is about (for a diagnostic's label), given the
    /// text's length in bytes.
    pub fn span(&self, text_len: usize) -> Range<usize> {
        match *self {
            HexError::Empty => 0..0,
            HexError::MissingHash { found } => 0..found.len_utf8(),
            HexError::NotHexDigit { offset, found } => offset..offset + found.len_utf8(),
            HexError::WrongLength { .. } => 0..text_len,
        }
    }
}

impl fmt::Display for HexError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            HexError::Empty => write!(f, "the colour is empty"),
            HexError::MissingHash { found } => {
                write!(
                    f,
                    "a colour starts with `#`, not `{}`",
                    found.escape_debug()
                )
            }
            HexError::NotHexDigit { found, .. } => write!(
                f,
                "`{}` is not a hexadecimal digit (0–9, a–f)",
                found.escape_debug()
            ),
            HexError::WrongLength { digits } => write!(
                f,
                "a colour has 6 hexadecimal digits (or 3 for short), this one has {digits}"
            ),
        }
    }
}

impl std::error::Error for HexError {}

/// Reads `#rrggbb` or `#rgb` as an sRGB colour.
pub fn parse_hex(text: &str) -> Result<Colour, HexError> {
    let mut chars = text.char_indices();
    match chars.next() {
        None => return Err(HexError::Empty),
        Some((_, '#')) => {}
        Some((_, found)) => return Err(HexError::MissingHash { found }),
    }
    let mut digits = Vec::with_capacity(6);
    for (offset, found) in chars {
        let digit = found
            .to_digit(16)
            .ok_or(HexError::NotHexDigit { offset, found })?;
        digits.push(digit as u8);
    }
    let [r, g, b] = match digits[..] {
        [r, g, b] => [r, g, b].map(|d| d * 17),
        [r1, r0, g1, g0, b1, b0] => [r1 * 16 + r0, g1 * 16 + g0, b1 * 16 + b0],
        _ => {
            return Err(HexError::WrongLength {
                digits: digits.len(),
            })
        }
    };
    Ok(Colour::rgb(r, g, b))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn long_and_short_forms_in_either_case() {
        assert_eq!(parse_hex("#1b7837"), Ok(Colour::from_hex(0x1b7837)));
        assert_eq!(parse_hex("#1B7837"), Ok(Colour::from_hex(0x1b7837)));
        assert_eq!(parse_hex("#1a7"), Ok(Colour::from_hex(0x11aa77)));
        assert_eq!(parse_hex("#FFF"), Ok(Colour::WHITE));
        assert_eq!(parse_hex("#000000"), Ok(Colour::BLACK));
    }

    #[test]
    fn every_refusal_names_the_problem_and_its_place() {
        let cases: [(&str, HexError, Range<usize>, &str); 7] = [
            ("", HexError::Empty, 0..0, "the colour is empty"),
            (
                "1b7837",
                HexError::MissingHash { found: '1' },
                0..1,
                "a colour starts with `#`, not `1`",
            ),
            (
                "#12345g",
                HexError::NotHexDigit {
                    offset: 6,
                    found: 'g',
                },
                6..7,
                "`g` is not a hexadecimal digit (0–9, a–f)",
            ),
            (
                "# 12345",
                HexError::NotHexDigit {
                    offset: 1,
                    found: ' ',
                },
                1..2,
                "` ` is not a hexadecimal digit (0–9, a–f)",
            ),
            (
                "#1é3",
                HexError::NotHexDigit {
                    offset: 2,
                    found: 'é',
                },
                2..4,
                "`é` is not a hexadecimal digit (0–9, a–f)",
            ),
            (
                "#12345",
                HexError::WrongLength { digits: 5 },
                0..6,
                "a colour has 6 hexadecimal digits (or 3 for short), this one has 5",
            ),
            (
                "#",
                HexError::WrongLength { digits: 0 },
                0..1,
                "a colour has 6 hexadecimal digits (or 3 for short), this one has 0",
            ),
        ];
        for (text, error, span, message) in cases {
            assert_eq!(parse_hex(text), Err(error.clone()), "{text:?}");
            assert_eq!(error.span(text.len()), span, "{text:?}");
            assert_eq!(error.to_string(), message, "{text:?}");
        }
        // Eight digits (a colour with alpha) is refused too: colours are opaque.
        assert_eq!(
            parse_hex("#1b7837ff"),
            Err(HexError::WrongLength { digits: 8 })
        );
    }

    #[test]
    fn every_colour_survives_writing_and_reading() {
        for v in (0..=0xff_ffffu32).step_by(0x1f3a7) {
            let c = Colour::from_hex(v);
            assert_eq!(parse_hex(&c.to_string()), Ok(c));
        }
    }
}
