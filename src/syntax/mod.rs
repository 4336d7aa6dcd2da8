//! The `syntax` stage: spec text → syntax tree ([`ast::SpecFile`]), or syntax errors.
//!
//! Guarantees of [`parse`]:
//! - On success, the tree holds every `include`, block and statement of the file, every
//!   comment (for the formatter), and every number with its original text. Every span is a
//!   byte range of the text it was given.
//! - On failure, it returns every independent error it could find (up to a limit), each
//!   with a stable code `F0001`–`F0020`, a message in plain words, a labelled span inside the
//!   text, and a help line. It never panics, whatever the input, and its work grows linearly
//!   with the text.
//! - Nesting deeper than [`MAX_NESTING`] parentheses is refused before parsing, so no input
//!   can exhaust the stack.
//!
//! Code map: `grammar/figura.pest` (the grammar), `parse` (pest and the conversion to the
//! tree; pest types stay there), `recover` (plain-words diagnostics and the edits that let
//! parsing continue), `scan` (a forgiving token scan that recovery relies on), `checks`
//! (statement-shape checks after parsing).

pub mod ast;
mod checks;
mod parse;
mod recover;
mod scan;

pub use parse::{parse, MAX_CONDITION_DEPTH, MAX_ERRORS, MAX_NESTING};

/// Whether text Figura writes out (titles, labels, levels, ...) may hold `c`: every character
/// XML 1.0 allows — an SVG is XML — so not the control characters U+0000–U+001F other than
/// tab, line feed and carriage return, and not U+FFFE or U+FFFF. Strings in a spec are
/// checked with it (`F0020`), and so is the text of a data file (`D0020`).
pub fn is_text_char(c: char) -> bool {
    !matches!(c, '\u{0}'..='\u{8}' | '\u{b}' | '\u{c}' | '\u{e}'..='\u{1f}' | '\u{fffe}' | '\u{ffff}')
}
