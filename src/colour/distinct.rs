//! Checking that colours which must be told apart can be, by every reader.
//!
//! Two colours are compared as seen under each [`Vision`] (normal colour vision, the three
//! simulated dichromacies, greyscale) with CIEDE2000 ([`ciede2000`]). The checker reports,
//! per vision, the closest pair, and lists every pair closer than a threshold, ready to become
//! a warning: which two colours, for which readers, and how far apart they are.
//!
//! Thresholds (ΔE00):
//! - [`TELL_APART`] = 10 for colours that name groups (a reader matches a mark to its legend
//!   entry by colour alone). ΔE00 ≈ 1 is about one just-noticeable difference for large
//!   patches side by side; data marks are small and apart, and the difference needed to tell
//!   such marks apart grows several-fold as they shrink (Stone, Szafir & Setlur 2014, "An
//!   engineering model for color difference as a function of size", Color and Imaging
//!   Conference; Szafir 2018, "Modeling color difference for visualization design", IEEE
//!   TVCG 24(1); both cited from memory, for the direction of the effect rather than a
//!   number). 10 is common practice for "clearly different colours" and sits just under the
//!   closest pair of the Okabe–Ito palette under simulated dichromacy (10.9, orange and
//!   reddish purple under tritanopia), a palette designed and widely accepted as safe for
//!   these readers: a warning at that level would be noise.
//! - [`ORDERED_NEIGHBOURS`] = 3 for neighbouring levels of an ordered palette, which are read
//!   in order and side by side (legend keys, stacked bars) rather than matched one by one:
//!   ΔE00 of about 2 is where a difference between adjacent patches is seen at a glance
//!   (common practice in colour tolerancing); 3 leaves a margin.

use super::difference::ciede2000;
use super::space::{Lab, LinearRgb};
use super::vision::Vision;
use crate::scene::Colour;

/// ΔE00 below which two colours that name groups are too close (see the module doc).
pub const TELL_APART: f64 = 10.0;

/// ΔE00 below which two neighbouring levels of an ordered palette are too close.
pub const ORDERED_NEIGHBOURS: f64 = 3.0;

/// Two colours of a set (indices into it, `first < second`), their difference as seen under
/// one vision.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ColourPair {
    pub first: usize,
    pub second: usize,
    pub vision: Vision,
    /// CIEDE2000 between the two colours as seen under `vision`.
    pub delta_e: f64,
}

/// CIEDE2000 between two colours as seen under `vision`.
pub fn difference_seen(first: Colour, second: Colour, vision: Vision) -> f64 {
    ciede2000(seen_lab(first, vision), seen_lab(second, vision))
}

/// The closest pair of `colours` under `vision` (the first in index order on a tie); `None`
/// for fewer than two colours.
pub fn closest_pair(colours: &[Colour], vision: Vision) -> Option<ColourPair> {
    pairs_seen(colours, vision)
        .into_iter()
        .reduce(|best, p| if p.delta_e < best.delta_e { p } else { best })
}

/// Every pair closer than `min_delta_e` under some vision, in the order of [`Vision::ALL`],
/// then by index.
pub fn pairs_too_close(colours: &[Colour], min_delta_e: f64) -> Vec<ColourPair> {
    Vision::ALL
        .into_iter()
        .flat_map(|vision| pairs_seen(colours, vision))
        .filter(|p| p.delta_e < min_delta_e)
        .collect()
}

/// Every pair of `colours` with its difference under `vision`, by index.
fn pairs_seen(colours: &[Colour], vision: Vision) -> Vec<ColourPair> {
    let labs: Vec<Lab> = colours.iter().map(|&c| seen_lab(c, vision)).collect();
    let mut pairs = Vec::with_capacity(labs.len() * labs.len().saturating_sub(1) / 2);
    for (first, &a) in labs.iter().enumerate() {
        for (second, &b) in labs.iter().enumerate().skip(first + 1) {
            pairs.push(ColourPair {
                first,
                second,
                vision,
                delta_e: ciede2000(a, b),
            });
        }
    }
    pairs
}

fn seen_lab(colour: Colour, vision: Vision) -> Lab {
    vision.simulate(LinearRgb::from_colour(colour)).to_lab()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_red_green_pair_fails_only_for_red_green_readers_and_in_grey() {
        // Pure red and a green of similar lightness: distinct for normal vision and
        // tritanopia, confused under protanopia and deuteranopia (the classic confusion).
        let colours = [Colour::from_hex(0xcc3333), Colour::from_hex(0x668800)];
        let failing: Vec<Vision> = pairs_too_close(&colours, TELL_APART)
            .iter()
            .map(|p| p.vision)
            .collect();
        assert!(!failing.contains(&Vision::Normal), "{failing:?}");
        assert!(!failing.contains(&Vision::Tritanopia), "{failing:?}");
        assert!(failing.contains(&Vision::Deuteranopia), "{failing:?}");
    }

    #[test]
    fn closest_pair_finds_the_nearest_and_needs_two_colours() {
        let colours = [
            Colour::BLACK,
            Colour::from_hex(0x777777),
            Colour::from_hex(0x7a7a7a),
        ];
        let p = closest_pair(&colours, Vision::Normal).unwrap();
        assert_eq!((p.first, p.second), (1, 2));
        assert!(p.delta_e > 0.0 && p.delta_e < 2.0, "{p:?}");
        assert_eq!(closest_pair(&colours[..1], Vision::Normal), None);
        assert!(pairs_too_close(&[], TELL_APART).is_empty());
    }

    #[test]
    fn identical_colours_are_reported_under_every_vision() {
        let c = Colour::from_hex(0x0072b2);
        let found = pairs_too_close(&[c, c], TELL_APART);
        let visions: Vec<Vision> = found.iter().map(|p| p.vision).collect();
        assert_eq!(visions, Vision::ALL);
        assert!(found.iter().all(|p| p.delta_e == 0.0));
    }
}
