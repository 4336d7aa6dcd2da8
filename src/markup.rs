//! Label markup: raised and lowered text, italics, bold and Greek letters in the text users
//! write for display (titles, captions, axis and variable labels, units, level labels).
//!
//! The syntax is Figura's own, chosen to read plainly in a spec and to leave ordinary labels
//! alone:
//!
//! | written | shown |
//! |---|---|
//! | `cm^2^`, `m·s^-2^` | raised, smaller text (a superscript): cm², m·s⁻² |
//! | `V_max_`, `CO_2_` | lowered, smaller text (a subscript) |
//! | `*Homo sapiens*` | italic |
//! | `!A!` | bold |
//! | `@alpha`, `@Delta`, `@eta^2^` | a Greek letter by its English name (lower case, or capital with a capital first letter) |
//! | `^^`, `__`, `**`, `!!`, `@@` | the character itself |
//!
//! A marker opens only when the character after it is not a space and the same marker closes
//! it later in the text; a marker that opens nothing and closes nothing is shown as it is
//! (`5 * 3`, `Yes!`, `p < .05*`), so ordinary text needs no escapes; one before a letter or
//! digit that never closes (`cm^2`) is reported, as it looks meant. Markers of different kinds
//! nest (`^*n*^`); raised and lowered text do not (inside one, the other's marker is shown as
//! it is). `@` followed by a word that is not a Greek letter's name is shown as it is.
//!
//! The result of [`parse`] is a *styled string*: the visible characters, with style changes
//! written as single characters U+0010–U+001B ([`STYLE_BASE`] + the style's index), each
//! setting the style of the text after it. These control characters can come from nowhere
//! else: spec strings and data files cannot hold them (`F0020`, `D0020`). So styled strings
//! travel through the plan, the numbers and the layout as ordinary `String`s, join and wrap like
//! them, and only the font ([`crate::font::measure`]) and the SVG writer read the styles
//! ([`runs`]); [`plain`] gives the text without styles for places that hold plain text (file
//! metadata, alt text, manuscript numbers).

use std::ops::Range;

/// Where a run of text sits relative to the baseline.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub enum Position {
    #[default]
    Base,
    /// Superscript: smaller, above the baseline.
    Raised,
    /// Subscript: smaller, below the baseline.
    Lowered,
}

/// The style of a run of text, on top of the text mark's own size and weight.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Default)]
pub struct RunStyle {
    pub italic: bool,
    pub bold: bool,
    pub position: Position,
}

impl RunStyle {
    /// The style's index, 0–11.
    fn index(self) -> u32 {
        let position = match self.position {
            Position::Base => 0,
            Position::Raised => 1,
            Position::Lowered => 2,
        };
        position * 4 + u32::from(self.bold) * 2 + u32::from(self.italic)
    }

    fn from_index(i: u32) -> Option<RunStyle> {
        let position = match i / 4 {
            0 => Position::Base,
            1 => Position::Raised,
            2 => Position::Lowered,
            _ => return None,
        };
        Some(RunStyle {
            italic: i & 1 == 1,
            bold: i & 2 == 2,
            position,
        })
    }

    /// The character that sets this style in a styled string.
    pub fn code(self) -> char {
        char::from_u32(u32::from(STYLE_BASE) + self.index()).unwrap_or(STYLE_BASE)
    }

    /// The style a character of a styled string sets, if it is a style code.
    pub fn of_code(c: char) -> Option<RunStyle> {
        u32::from(c)
            .checked_sub(u32::from(STYLE_BASE))
            .and_then(RunStyle::from_index)
    }
}

/// The first style code (plain text); the codes run to U+001B.
pub const STYLE_BASE: char = '\u{10}';

/// A run of text in one style.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Run {
    pub text: String,
    pub style: RunStyle,
}

/// Something in the written text that may not read as meant, with its byte range in it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Problem {
    /// A marker that looks like it opens styled text but is never closed: shown as written.
    Unclosed { marker: char, at: Range<usize> },
    /// `@word` where the word is not a Greek letter's name: shown as written.
    NotGreek {
        name: String,
        at: Range<usize>,
        closest: Option<&'static str>,
    },
}

/// A text read for markup: the styled string, and what may not read as meant.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Parsed {
    pub text: String,
    pub problems: Vec<Problem>,
}

/// The markers and the style each one toggles.
const MARKERS: [char; 4] = ['^', '_', '*', '!'];

/// The Greek letters by name, lower case; a capital first letter gives the capital letter.
const GREEK: [(&str, char, char); 24] = [
    ("alpha", 'α', 'Α'),
    ("beta", 'β', 'Β'),
    ("gamma", 'γ', 'Γ'),
    ("delta", 'δ', 'Δ'),
    ("epsilon", 'ε', 'Ε'),
    ("zeta", 'ζ', 'Ζ'),
    ("eta", 'η', 'Η'),
    ("theta", 'θ', 'Θ'),
    ("iota", 'ι', 'Ι'),
    ("kappa", 'κ', 'Κ'),
    ("lambda", 'λ', 'Λ'),
    ("mu", 'μ', 'Μ'),
    ("nu", 'ν', 'Ν'),
    ("xi", 'ξ', 'Ξ'),
    ("omicron", 'ο', 'Ο'),
    ("pi", 'π', 'Π'),
    ("rho", 'ρ', 'Ρ'),
    ("sigma", 'σ', 'Σ'),
    ("tau", 'τ', 'Τ'),
    ("upsilon", 'υ', 'Υ'),
    ("phi", 'φ', 'Φ'),
    ("chi", 'χ', 'Χ'),
    ("psi", 'ψ', 'Ψ'),
    ("omega", 'ω', 'Ω'),
];

/// The Greek letter `@name` stands for.
fn greek(name: &str) -> Option<char> {
    let lower = name.to_ascii_lowercase();
    let (_, small, capital) = GREEK.iter().find(|(n, _, _)| *n == lower)?;
    let first_upper = name.chars().next().is_some_and(|c| c.is_ascii_uppercase());
    let rest_lower = name.chars().skip(1).all(|c| c.is_ascii_lowercase());
    match (first_upper, rest_lower) {
        (false, true) => Some(*small),
        (true, true) => Some(*capital),
        _ => None,
    }
}

/// Whether a text holds anything markup reads.
fn has_markup(text: &str) -> bool {
    text.contains(['^', '_', '*', '!', '@'])
}

/// Reads the markup of `text` into a styled string (see the module doc).
pub fn parse(text: &str) -> Parsed {
    if !has_markup(text) {
        return Parsed {
            text: text.to_string(),
            problems: Vec::new(),
        };
    }
    let chars: Vec<(usize, char)> = text.char_indices().collect();
    let mut out = String::with_capacity(text.len() + 4);
    let mut problems = Vec::new();
    let mut style = RunStyle::default();
    let mut i = 0;
    while i < chars.len() {
        let (at, c) = chars[i];
        let next = chars.get(i + 1).map(|&(_, n)| n);
        if c == '@' {
            if next == Some('@') {
                out.push('@');
                i += 2;
                continue;
            }
            let name: String = chars[i + 1..]
                .iter()
                .map(|&(_, c)| c)
                .take_while(char::is_ascii_alphabetic)
                .collect();
            if let Some(letter) = greek(&name) {
                out.push(letter);
                i += 1 + name.len();
                continue;
            }
            if !name.is_empty() {
                let lower = name.to_ascii_lowercase();
                let closest = GREEK
                    .iter()
                    .map(|(n, _, _)| *n)
                    .filter(|n| strsim::levenshtein(n, &lower) <= 2)
                    .min_by_key(|n| strsim::levenshtein(n, &lower));
                problems.push(Problem::NotGreek {
                    at: at..at + 1 + name.len(),
                    name,
                    closest,
                });
            }
            out.push('@');
            i += 1;
            continue;
        }
        if !MARKERS.contains(&c) {
            out.push(c);
            i += 1;
            continue;
        }
        if next == Some(c) {
            out.push(c);
            i += 2;
            continue;
        }
        let open = is_open(style, c);
        let blocked = matches!(
            (c, style.position),
            ('^', Position::Lowered) | ('_', Position::Raised)
        );
        if open {
            style = toggled(style, c);
            out.push(style.code());
        } else if !blocked && next.is_some_and(|n| !n.is_whitespace()) {
            if closes_later(&chars[i + 1..], c) {
                style = toggled(style, c);
                out.push(style.code());
            } else {
                // Only a marker before a letter or digit looks meant (`cm^2`, `*p`); one
                // before punctuation (`.05*.`) is plain text.
                if c != '!' && next.is_some_and(char::is_alphanumeric) {
                    problems.push(Problem::Unclosed {
                        marker: c,
                        at: at..at + 1,
                    });
                }
                out.push(c);
            }
        } else {
            out.push(c);
        }
        i += 1;
    }
    if style != RunStyle::default() {
        out.push(RunStyle::default().code());
    }
    Parsed {
        text: out,
        problems,
    }
}

/// Whether the style `marker` toggles is on.
fn is_open(style: RunStyle, marker: char) -> bool {
    match marker {
        '^' => style.position == Position::Raised,
        '_' => style.position == Position::Lowered,
        '*' => style.italic,
        _ => style.bold,
    }
}

fn toggled(mut style: RunStyle, marker: char) -> RunStyle {
    match marker {
        '^' if style.position == Position::Raised => style.position = Position::Base,
        '^' => style.position = Position::Raised,
        '_' if style.position == Position::Lowered => style.position = Position::Base,
        '_' => style.position = Position::Lowered,
        '*' => style.italic = !style.italic,
        _ => style.bold = !style.bold,
    }
    style
}

/// Whether a single `marker` (not doubled) follows in `rest`.
fn closes_later(rest: &[(usize, char)], marker: char) -> bool {
    let mut i = 0;
    while i < rest.len() {
        if rest[i].1 == marker {
            if rest.get(i + 1).is_some_and(|&(_, n)| n == marker) {
                i += 2;
                continue;
            }
            return true;
        }
        i += 1;
    }
    false
}

/// The runs of a styled string, in order, each non-empty; adjacent runs differ in style.
pub fn runs(styled: &str) -> Vec<Run> {
    let mut out: Vec<Run> = Vec::new();
    let mut style = RunStyle::default();
    for c in styled.chars() {
        if let Some(s) = RunStyle::of_code(c) {
            style = s;
            continue;
        }
        match out.last_mut() {
            Some(run) if run.style == style => run.text.push(c),
            _ => out.push(Run {
                text: c.to_string(),
                style,
            }),
        }
    }
    out
}

/// Whether a styled string holds any style other than plain text.
pub fn is_styled(text: &str) -> bool {
    text.chars().any(|c| RunStyle::of_code(c).is_some())
}

/// Joins runs back into a styled string (the inverse of [`runs`]).
pub fn styled(runs: &[Run]) -> String {
    let mut out = String::new();
    let mut style = RunStyle::default();
    for run in runs {
        if run.style != style {
            out.push(run.style.code());
            style = run.style;
        }
        out.push_str(&run.text);
    }
    if style != RunStyle::default() {
        out.push(RunStyle::default().code());
    }
    out
}

/// The style in force at the end of a styled string.
pub fn style_at_end(styled: &str) -> RunStyle {
    styled
        .chars()
        .rev()
        .find_map(RunStyle::of_code)
        .unwrap_or_default()
}

/// The text of a styled string without its styles, for plain-text places: raised text whose
/// every character has a superscript form is written in those (`cm²`, `m·s⁻²`), lowered text
/// likewise in subscript forms (`CO₂`); other styled text is written as it is.
pub fn plain(styled: &str) -> String {
    if !is_styled(styled) {
        return styled.to_string();
    }
    let mut out = String::with_capacity(styled.len());
    for run in runs(styled) {
        let table: &[(char, char)] = match run.style.position {
            Position::Base => &[],
            Position::Raised => &SUPERSCRIPTS,
            Position::Lowered => &SUBSCRIPTS,
        };
        let mapped: Option<String> = run
            .text
            .chars()
            .map(|c| table.iter().find(|(from, _)| *from == c).map(|(_, to)| *to))
            .collect();
        match mapped {
            Some(text) if !table.is_empty() => out.push_str(&text),
            _ => out.push_str(&run.text),
        }
    }
    out
}

/// Characters with a superscript form in Unicode (common in units).
const SUPERSCRIPTS: [(char, char); 16] = [
    ('0', '⁰'),
    ('1', '¹'),
    ('2', '²'),
    ('3', '³'),
    ('4', '⁴'),
    ('5', '⁵'),
    ('6', '⁶'),
    ('7', '⁷'),
    ('8', '⁸'),
    ('9', '⁹'),
    ('-', '⁻'),
    ('−', '⁻'),
    ('+', '⁺'),
    ('=', '⁼'),
    ('(', '⁽'),
    (')', '⁾'),
];

/// Characters with a subscript form in Unicode.
const SUBSCRIPTS: [(char, char); 16] = [
    ('0', '₀'),
    ('1', '₁'),
    ('2', '₂'),
    ('3', '₃'),
    ('4', '₄'),
    ('5', '₅'),
    ('6', '₆'),
    ('7', '₇'),
    ('8', '₈'),
    ('9', '₉'),
    ('-', '₋'),
    ('−', '₋'),
    ('+', '₊'),
    ('=', '₌'),
    ('(', '₍'),
    (')', '₎'),
];

#[cfg(test)]
mod tests {
    use super::*;

    fn run(text: &str, style: RunStyle) -> Run {
        Run {
            text: text.to_string(),
            style,
        }
    }

    const RAISED: RunStyle = RunStyle {
        italic: false,
        bold: false,
        position: Position::Raised,
    };

    #[test]
    fn raised_lowered_italic_and_bold_runs() {
        assert_eq!(
            runs(&parse("cm^2^ area").text),
            [
                run("cm", RunStyle::default()),
                run("2", RAISED),
                run(" area", RunStyle::default())
            ]
        );
        let lowered = RunStyle {
            position: Position::Lowered,
            ..RunStyle::default()
        };
        assert_eq!(
            runs(&parse("V_max_").text),
            [run("V", RunStyle::default()), run("max", lowered)]
        );
        let italic = RunStyle {
            italic: true,
            ..RunStyle::default()
        };
        let both = RunStyle {
            italic: true,
            ..RAISED
        };
        assert_eq!(
            runs(&parse("*p*^*n*^").text),
            [run("p", italic), run("n", both)]
        );
        let bold = RunStyle {
            bold: true,
            ..RunStyle::default()
        };
        assert_eq!(runs(&parse("!A! wins").text)[0], run("A", bold));
    }

    #[test]
    fn greek_letters_by_name() {
        assert_eq!(plain(&parse("@eta^2^").text), "η²");
        assert_eq!(parse("@Delta F").text, "Δ F");
        assert_eq!(parse("a@@b.org").text, "a@b.org");
        let p = parse("@lamda");
        assert_eq!(p.text, "@lamda");
        assert_eq!(
            p.problems,
            [Problem::NotGreek {
                name: "lamda".to_string(),
                at: 0..6,
                closest: Some("lambda")
            }]
        );
        // A capital in the middle is no name.
        assert_eq!(parse("@ALPHA").text, "@ALPHA");
    }

    #[test]
    fn ordinary_text_is_left_alone() {
        for text in [
            "5 * 3 = 15",
            "Yes!",
            "p < .05*",
            "reaction_time",
            "a ^ b",
            "Words per minute",
            "x@",
        ] {
            let p = parse(text);
            assert_eq!(p.text, text, "{text}");
            assert!(!is_styled(&p.text), "{text}");
        }
        assert_eq!(
            parse("reaction_time").problems,
            [Problem::Unclosed {
                marker: '_',
                at: 8..9
            }]
        );
        assert!(parse("Yes!").problems.is_empty());
    }

    #[test]
    fn doubled_markers_are_the_characters_themselves() {
        assert_eq!(parse("2^^10").text, "2^10");
        assert_eq!(parse("a__b__c").text, "a_b_c");
        assert_eq!(parse("**note**").text, "*note*");
        assert!(parse("2^^10").problems.is_empty());
    }

    #[test]
    fn raised_and_lowered_do_not_nest() {
        let r = runs(&parse("x^a_b^").text);
        assert_eq!(r[1], run("a_b", RAISED));
    }

    #[test]
    fn plain_text_uses_unicode_forms_where_every_character_has_one() {
        assert_eq!(plain(&parse("cm^2^").text), "cm²");
        assert_eq!(plain(&parse("m·s^-2^").text), "m·s⁻²");
        assert_eq!(plain(&parse("CO_2_").text), "CO₂");
        assert_eq!(plain(&parse("V_max_").text), "Vmax");
        assert_eq!(plain(&parse("*Homo sapiens*").text), "Homo sapiens");
    }

    #[test]
    fn styled_strings_round_trip_through_runs() {
        for text in ["cm^2^", "*p* < .05", "!A! and *b*^2^", "plain"] {
            let r = runs(&parse(text).text);
            assert_eq!(runs(&styled(&r)), r, "{text}");
        }
        assert_eq!(style_at_end(&parse("*a").text), RunStyle::default());
        let every = (0..12).filter_map(RunStyle::from_index);
        for style in every {
            assert_eq!(RunStyle::of_code(style.code()), Some(style));
        }
    }
}
