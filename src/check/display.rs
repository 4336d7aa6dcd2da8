//! Text written for display — titles, captions, axis and variable labels, units, level
//! labels — read for label markup ([`crate::markup`]), with warnings for what may not read as
//! meant: a marker never closed (`W0005`), `@word` that names no Greek letter (`W0006`), and
//! characters the bundled font cannot draw (`W0007`). Each warning points at the characters in
//! the string (at the whole string when it holds escapes, whose text differs from the value).

use crate::diag::{Code, Diagnostic, Span};
use crate::font;
use crate::markup::{self, Problem};
use crate::scene::Weight;
use crate::syntax::ast::Str;

/// The styled string of a string written for display; warnings go to `diags`.
pub fn text(s: &Str, diags: &mut Vec<Diagnostic>) -> String {
    let parsed = markup::parse(&s.value);
    for problem in &parsed.problems {
        diags.push(match problem {
            Problem::Unclosed { marker, at } => Diagnostic::new(
                Code::MarkupUnclosed,
                format!("`{marker}` opens {} that never closes", opened(*marker)),
            )
            .with_label(within(s, at.clone()), "shown as written")
            .with_help(format!(
                "close it with a second `{marker}` ({}), or write `{marker}{marker}` to show the \
                 character itself",
                example(*marker)
            )),
            Problem::NotGreek { name, at, closest } => {
                Diagnostic::new(Code::NotGreek, format!("`@{name}` names no Greek letter"))
                    .with_label(within(s, at.clone()), "shown as written")
                    .with_help(match closest {
                        Some(c) => format!("did you mean `@{c}`? Write `@@` to show `@` itself"),
                        None => {
                            "Greek letters are written by name, `@alpha` to `@omega` (`@Delta` for \
                         the capital); write `@@` to show `@` itself"
                                .to_string()
                        }
                    })
            }
        });
    }
    let weights = [Weight::Regular, Weight::Bold];
    let mut missing: Vec<char> = Vec::new();
    for weight in weights {
        for c in font::missing_chars(&parsed.text, weight) {
            if !missing.contains(&c) {
                missing.push(c);
            }
        }
    }
    for c in missing {
        let at = s.value.find(c).map_or(0..0, |i| i..i + c.len_utf8());
        diags.push(
            Diagnostic::new(
                Code::MissingGlyph,
                format!(
                    "the font cannot draw `{c}` (U+{:04X}): it would show as an empty box",
                    u32::from(c)
                ),
            )
            .with_label(within(s, at), "not in the font")
            .with_help(
                "Figura draws text with Noto Sans (Latin, Greek and Cyrillic letters, digits, \
                 punctuation and common symbols); write the text with those characters",
            ),
        );
    }
    parsed.text
}

/// A marker used as meant.
fn example(marker: char) -> &'static str {
    match marker {
        '^' => "`cm^2^`",
        '_' => "`V_max_`",
        '*' => "`*p*`",
        _ => "`!A!`",
    }
}

/// What a marker opens, in words.
fn opened(marker: char) -> &'static str {
    match marker {
        '^' => "raised text",
        '_' => "lowered text",
        '*' => "italic text",
        _ => "bold text",
    }
}

/// The span of bytes `at` of the string's value, inside its quotes; the whole string when its
/// text differs from its value (escapes) or `at` is empty.
fn within(s: &Str, at: std::ops::Range<usize>) -> Span {
    let plain = s.span.len() == s.value.len() + 2;
    if plain && !at.is_empty() && at.end <= s.value.len() {
        Span::new(
            s.span.source,
            s.span.start + 1 + at.start,
            s.span.start + 1 + at.end,
        )
    } else {
        s.span
    }
}
