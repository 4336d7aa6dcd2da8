//! Colours for groups: the qualitative palette of Okabe & Ito, safe for colour-vision
//! deficiency.
//!
//! Source: Masataka Okabe and Kei Ito, "Color Universal Design (CUD) — How to make figures and
//! presentations that are friendly to colorblind people" (2008). The eight colours and their
//! RGB values are theirs; the order below is ours, chosen for figures on a white page:
//! - blue and orange first: the pair stays distinct under every common colour-vision
//!   deficiency and in greyscale (dark against light);
//! - then bluish green, vermillion and reddish purple, which differ from the first two in
//!   lightness or hue for all viewers;
//! - sky blue after them, since it is easiest to confuse with blue;
//! - black late, because axes and text are already black-ish and a lone series is often drawn
//!   in a neutral colour;
//! - yellow last: it has poor contrast on white.
//!
//! Checked with [`crate::colour::distinct`] (`tests/colour.rs`): at every size from 1 to
//! [`MAX_GROUPS`] no two colours come closer than [`crate::colour::distinct::TELL_APART`]
//! (ΔE00 10) under normal vision or simulated protanopia, deuteranopia or tritanopia (closest:
//! 10.9, orange and reddish purple under tritanopia). In greyscale the palette holds up to 3
//! groups only: from 4 groups on some pairs differ in hue alone (bluish green and vermillion
//! 3.3; from 6 groups orange and sky blue 0.6), so a greyscale reader needs another cue.
//!
//! Guarantee: the palette has exactly [`MAX_GROUPS`] distinct colours, and
//! [`group_colours`] never repeats one (it refuses more groups than colours instead of
//! cycling, so two groups can never share a colour).

use crate::scene::Colour;

/// One palette colour with its name as published.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PaletteEntry {
    pub name: &'static str,
    pub colour: Colour,
}

/// Number of colours in the palette, hence the most groups a figure can tell apart by colour.
pub const MAX_GROUPS: usize = 8;

/// The Okabe–Ito colours (RGB values from Okabe & Ito 2008), in the order groups use them.
pub const OKABE_ITO: [PaletteEntry; MAX_GROUPS] = [
    PaletteEntry {
        name: "blue",
        colour: Colour::from_hex(0x0072B2),
    },
    PaletteEntry {
        name: "orange",
        colour: Colour::from_hex(0xE69F00),
    },
    PaletteEntry {
        name: "bluish green",
        colour: Colour::from_hex(0x009E73),
    },
    PaletteEntry {
        name: "vermillion",
        colour: Colour::from_hex(0xD55E00),
    },
    PaletteEntry {
        name: "reddish purple",
        colour: Colour::from_hex(0xCC79A7),
    },
    PaletteEntry {
        name: "sky blue",
        colour: Colour::from_hex(0x56B4E9),
    },
    PaletteEntry {
        name: "black",
        colour: Colour::from_hex(0x000000),
    },
    PaletteEntry {
        name: "yellow",
        colour: Colour::from_hex(0xF0E442),
    },
];

/// The colours for `n_groups` groups, in palette order; `None` when there are more groups
/// than colours.
pub fn group_colours(n_groups: usize) -> Option<Vec<Colour>> {
    (n_groups <= MAX_GROUPS).then(|| OKABE_ITO[..n_groups].iter().map(|e| e.colour).collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn palette_holds_the_published_colours_once_each() {
        // Values from Okabe & Ito (2008), "Color Universal Design".
        let mut hex: Vec<String> = OKABE_ITO.iter().map(|e| e.colour.to_string()).collect();
        hex.sort();
        assert_eq!(
            hex,
            [
                "#000000", "#0072b2", "#009e73", "#56b4e9", "#cc79a7", "#d55e00", "#e69f00",
                "#f0e442"
            ]
        );
    }

    #[test]
    fn yellow_comes_last_and_too_many_groups_are_refused() {
        assert_eq!(OKABE_ITO[MAX_GROUPS - 1].name, "yellow");
        assert_eq!(
            group_colours(2),
            Some(vec![OKABE_ITO[0].colour, OKABE_ITO[1].colour])
        );
        assert_eq!(group_colours(0), Some(vec![]));
        assert_eq!(group_colours(MAX_GROUPS + 1), None);
    }
}
