//! Colours of the user's choosing: `colours("#1b7837", "#762a83")` beside `levels(...)` gives
//! each level of a nominal or ordinal variable its colour, for every figure coloured by it.
//!
//! Checks:
//! - each colour is sRGB hex, `#rrggbb` or `#rgb` ([`crate::colour::hex`]); anything else is
//!   `F0204`, pointing at the character at fault;
//! - one colour per declared level (`F0210`, as `labels`);
//! - `W0012`: two colours that must be told apart fall below a CIEDE2000 distance as seen with
//!   normal colour vision or simulated protanopia, deuteranopia or tritanopia (Machado et al.
//!   2009; [`crate::colour::distinct`]): every pair of a nominal variable's levels below
//!   [`TELL_APART`], neighbouring levels of an ordinal one below [`ORDERED_NEIGHBOURS`];
//! - `W0013` (a figure's check, [`alike_in_grey`]): a figure coloured by user colours whose
//!   groups look alike in greyscale (ΔE00 of their greys below [`TELL_APART`]) and that tells
//!   them apart in no other way (`colour VAR shapes`, `colour VAR dashes`).
//!
//! The greyscale check is for user colours only. The default palette for groups (Okabe–Ito) is
//! chosen to be told apart by hue, also under colour-vision deficiency, and not by lightness:
//! from four groups some of its colours are close greys, so a greyscale warning would fire on
//! most coloured figures. Figures meant for greyscale print should add `shapes` or `dashes`,
//! which the reference recommends.

use crate::colour::distinct::{pairs_too_close, ColourPair, ORDERED_NEIGHBOURS, TELL_APART};
use crate::colour::hex::parse_hex;
use crate::colour::vision::Vision;
use crate::diag::{Code, Diagnostic, Span};
use crate::scene::Colour;
use crate::syntax::ast::Call;

use super::plan::{LevelColours, Scale};
use super::terms;

/// `colours(...)`: one sRGB colour per declared level.
pub fn level_colours(
    c: &Call,
    levels: Option<&Vec<String>>,
    levels_span: Option<Span>,
    scale: Scale,
    diags: &mut Vec<Diagnostic>,
) -> Option<LevelColours> {
    let shape = "colours(\"#1b7837\", \"#762a83\")";
    let mut colours = Vec::new();
    let mut spans = Vec::new();
    let mut ok = true;
    for term in &c.args.items {
        let Some(s) = terms::expect_str(term, shape, diags) else {
            ok = false;
            continue;
        };
        match parse_hex(&s.value) {
            Ok(colour) => {
                colours.push(colour);
                spans.push(s.span);
            }
            Err(e) => {
                ok = false;
                let at = e.span(s.value.len());
                let exact = s.span.len() == s.value.len() + 2 && !at.is_empty();
                let span = if exact {
                    Span::new(
                        s.span.source,
                        s.span.start + 1 + at.start,
                        s.span.start + 1 + at.end,
                    )
                } else {
                    s.span
                };
                diags.push(
                    Diagnostic::new(
                        Code::BadArgument,
                        format!("\"{}\" is not a colour: {e}", s.value),
                    )
                    .with_label(span, "not sRGB hex")
                    .with_help(
                        "write each colour as sRGB hex, `#rrggbb` (or `#rgb`), e.g. `\"#1b7837\"`",
                    ),
                );
            }
        }
    }
    if !ok {
        return None;
    }
    let Some(levels) = levels else {
        diags.push(
            Diagnostic::new(
                Code::LevelsMismatch,
                "`colours(...)` needs `levels(...)` to say which colour is which",
            )
            .with_label(c.span, "colours without levels")
            .with_help("add `levels(...)` listing the values as they appear in the data"),
        );
        return None;
    };
    if levels.len() != colours.len() {
        let mut d = Diagnostic::new(
            Code::LevelsMismatch,
            format!("{} colours for {} levels", colours.len(), levels.len()),
        )
        .with_label(c.span, "colours");
        if let Some(span) = levels_span {
            d = d.with_label(span, "levels");
        }
        diags.push(d.with_help("give one colour per level, in the same order"));
        return None;
    }
    diags.extend(too_close(&colours, &spans, levels, scale));
    Some(LevelColours {
        colours,
        span: c.span,
    })
}

/// W0012 for each pair that must be told apart and cannot be, under some vision.
fn too_close(
    colours: &[Colour],
    spans: &[Span],
    levels: &[String],
    scale: Scale,
) -> Vec<Diagnostic> {
    let (threshold, must) = match scale {
        Scale::Ordinal => (ORDERED_NEIGHBOURS, "neighbouring levels"),
        _ => (TELL_APART, "levels"),
    };
    let mut worst: Vec<ColourPair> = Vec::new();
    for pair in pairs_too_close(colours, threshold) {
        let needed = scale != Scale::Ordinal || pair.second == pair.first + 1;
        if pair.vision == Vision::Greyscale || !needed {
            continue;
        }
        // One warning per pair: the vision under which it is closest.
        match worst
            .iter_mut()
            .find(|p| (p.first, p.second) == (pair.first, pair.second))
        {
            Some(p) if pair.delta_e < p.delta_e => *p = pair,
            Some(_) => {}
            None => worst.push(pair),
        }
    }
    worst
        .into_iter()
        .map(|p| {
            Diagnostic::new(
                Code::ColoursTooClose,
                format!(
                    "the colours of \"{}\" ({}) and \"{}\" ({}) are {} apart {} (ΔE00 {:.1}, at least {} tells {must} apart)",
                    levels[p.first],
                    colours[p.first],
                    levels[p.second],
                    colours[p.second],
                    if p.delta_e < 1.0 { "not visibly" } else { "too little" },
                    seen_by(p.vision),
                    p.delta_e,
                    threshold
                ),
            )
            .with_label(spans[p.first], "this colour")
            .with_label(spans[p.second], "and this one")
            .with_help(
                "choose colours that differ in lightness as well as hue, or leave out \
                 `colours(...)` for the default palette, which readers with colour-vision \
                 deficiencies can tell apart",
            )
        })
        .collect()
}

/// Who sees the colours so: "for readers with protanopia".
fn seen_by(vision: Vision) -> &'static str {
    match vision {
        Vision::Normal => "for every reader",
        Vision::Protanopia => "for readers with protanopia (no red cones)",
        Vision::Deuteranopia => "for readers with deuteranopia (no green cones)",
        Vision::Tritanopia => "for readers with tritanopia (no blue cones)",
        Vision::Greyscale => "in greyscale",
    }
}

/// W0013: a figure coloured by `colours` whose groups look alike in greyscale, with nothing
/// else to tell them apart; `at` is the figure's `colour` statement.
pub fn alike_in_grey(
    colours: &LevelColours,
    levels: &[String],
    var_name: &str,
    at: Span,
) -> Option<Diagnostic> {
    let pair = pairs_too_close(&colours.colours, TELL_APART)
        .into_iter()
        .filter(|p| p.vision == Vision::Greyscale)
        .reduce(|a, b| if b.delta_e < a.delta_e { b } else { a })?;
    Some(
        Diagnostic::new(
            Code::ColoursAlikeInGrey,
            format!(
                "in greyscale, \"{}\" and \"{}\" of `{var_name}` look alike (ΔE00 {:.1} of their greys)",
                levels[pair.first], levels[pair.second], pair.delta_e
            ),
        )
        .with_label(at, "told apart by colour only")
        .with_label(colours.span, "the colours")
        .with_help(format!(
            "add a second way to tell the groups apart: `colour {var_name} shapes` gives dots \
             a shape per group, `colour {var_name} dashes` lines a dash pattern per group"
        )),
    )
}
