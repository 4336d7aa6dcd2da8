//! Ordered palettes for ordinal variables: sequential, and diverging around a midpoint level.
//!
//! Designed here, in OKLCh (Ottosson 2020), from these principles:
//!
//! 1. **Order is lightness.** Lightness is the one colour dimension every reader perceives as
//!    ordered, and the only one that survives every colour-vision deficiency and greyscale;
//!    hue sequences are not read as ordered (Borland & Taylor 2007, "Rainbow color map (still)
//!    considered harmful", IEEE CG&A 27(2); Brewer 1994, "Color use guidelines for mapping and
//!    visualization" — both from memory). So OKLab lightness falls strictly along the levels,
//!    in equal steps (OKLab L is built to be perceptually uniform in lightness).
//! 2. **Light to dark on a white page.** The first (lowest) level is the lightest; levels are
//!    placed as if the page white were one more level beyond the lightest, never reached:
//!    with `n` levels, `L = D + (W − D)·j / n` for `j = 0` (darkest, the last level) to
//!    `n − 1`, where `D` = [`DARKEST`] = 0.30 and `W` = [`PAGE`] = 0.92. Few levels are then
//!    mid-tones far apart (2 levels: 0.61 and 0.30), and even at 12 levels the lightest
//!    (0.87) stays clearly off the page. The darkest stays clear of the black of text and
//!    axes.
//! 3. **One hue family per direction, drifting with lightness.** The sequential palette is a
//!    blue family whose hue turns from 220° (light, towards cyan) to 272° (dark, towards
//!    indigo). Blue is kept apart from red and green under protanopia and deuteranopia (the
//!    blue–yellow opponent axis survives them); the drift towards cyan at the light end uses
//!    the part of the sRGB gamut that has chroma there, and under tritanopia the drift along
//!    the red–green axis adds a little to what lightness already separates. One family reads
//!    as "more of the same", which is what an ordinal scale says.
//! 4. **Moderate chroma, inside the gamut.** Chroma is 85% of the most the sRGB gamut allows
//!    at that lightness and hue, capped at 0.14: colourful enough to read as colour, never
//!    clipped, and smooth along the levels.
//! 5. **Diverging: two arms meeting at a light neutral.** The midpoint level is an exact grey
//!    of OKLab lightness [`NEUTRAL`] = 0.85 (as far from the page as any level must be); levels below it take the warm arm (hue from 80°,
//!    amber, to 42°, brown), levels above it the cool arm of principle 3. Both arms darken in
//!    equal steps away from the midpoint, the same step on both sides (set by the longer arm,
//!    at most [`MAX_ARM_STEP`]), with equal chroma at equal distance: two levels equally far
//!    from the midpoint look equally strong, whichever side has more levels. Warm against
//!    cool stays apart under protanopia and deuteranopia (yellow–blue) and under tritanopia
//!    (the warm arm turns pink-red, the cool arm teal). In greyscale a diverging palette shows
//!    the distance from the midpoint, not its side: that is inherent in symmetric lightness.
//!
//! Guarantees (tested below, for every size and midpoint): lightness strictly monotone along
//! the levels (along each arm for a diverging palette); CIEDE2000 from the first level (from
//! the midpoint, along each arm) strictly increasing; neighbouring levels at least
//! [`ORDERED_NEIGHBOURS`] apart under every [`Vision`]; every level at least [`TELL_APART`]
//! from the page white.
//!
//! [`Vision`]: super::vision::Vision
//! [`ORDERED_NEIGHBOURS`]: super::distinct::ORDERED_NEIGHBOURS
//! [`TELL_APART`]: super::distinct::TELL_APART

use super::space::{LinearRgb, Oklch};
use crate::scene::Colour;

/// Fewest levels of an ordered palette.
pub const MIN_LEVELS: usize = 2;
/// Most levels of an ordered palette.
pub const MAX_LEVELS: usize = 12;

/// OKLab lightness of the darkest level.
pub const DARKEST: f64 = 0.30;
/// OKLab lightness of the page side of the sequential scale: one step beyond the lightest
/// level, never used.
pub const PAGE: f64 = 0.92;
/// OKLab lightness of the neutral midpoint of a diverging palette.
pub const NEUTRAL: f64 = 0.85;
/// Largest lightness step between neighbours on a diverging arm.
pub const MAX_ARM_STEP: f64 = 0.20;

/// Share of the gamut's largest chroma that a level takes.
const CHROMA_SHARE: f64 = 0.85;
/// Largest chroma of any level.
const CHROMA_CAP: f64 = 0.14;
/// Chroma beyond any sRGB colour: the upper end of the gamut search.
const CHROMA_SEARCH_MAX: f64 = 0.5;
/// Halvings in the gamut search: 2⁻⁴⁰ of the search range, far below 8-bit resolution.
const CHROMA_SEARCH_STEPS: usize = 40;

/// A hue family: its hue (degrees) at the light end ([`PAGE`]) and at the dark end
/// ([`DARKEST`]), linear in lightness between them.
#[derive(Debug, Clone, Copy)]
struct Arm {
    hue_light: f64,
    hue_dark: f64,
}

/// The blue family of the sequential palette and of the upper diverging arm.
const COOL: Arm = Arm {
    hue_light: 220.0,
    hue_dark: 272.0,
};
/// The amber-to-brown family of the lower diverging arm.
const WARM: Arm = Arm {
    hue_light: 80.0,
    hue_dark: 42.0,
};

impl Arm {
    fn hue(self, lightness: f64) -> f64 {
        let t = (lightness - DARKEST) / (PAGE - DARKEST);
        self.hue_dark + (self.hue_light - self.hue_dark) * t
    }

    /// The chroma this arm gives a level of `lightness`.
    fn chroma(self, lightness: f64) -> f64 {
        (CHROMA_SHARE * max_chroma(lightness, self.hue(lightness))).min(CHROMA_CAP)
    }

    fn shade(self, lightness: f64, chroma: f64) -> Colour {
        Oklch {
            l: lightness,
            c: chroma,
            h: self.hue(lightness),
        }
        .to_linear_rgb()
        .to_colour()
    }
}

/// A sequential palette of `n_levels` colours, lightest first; `None` outside
/// [`MIN_LEVELS`]`..=`[`MAX_LEVELS`].
pub fn sequential(n_levels: usize) -> Option<Vec<Colour>> {
    if !(MIN_LEVELS..=MAX_LEVELS).contains(&n_levels) {
        return None;
    }
    let step = (PAGE - DARKEST) / n_levels as f64;
    let colours = (0..n_levels)
        .map(|level| {
            let lightness = DARKEST + step * (n_levels - 1 - level) as f64;
            COOL.shade(lightness, COOL.chroma(lightness))
        })
        .collect();
    Some(colours)
}

/// A diverging palette of `n_levels` colours around the level at index `midpoint` (a light
/// grey); lower levels warm, higher levels cool, darker with distance from the midpoint.
/// `None` when `n_levels` is outside [`MIN_LEVELS`]`..=`[`MAX_LEVELS`] or `midpoint` is not
/// one of the levels. A midpoint at either end gives one arm only.
pub fn diverging(n_levels: usize, midpoint: usize) -> Option<Vec<Colour>> {
    if !(MIN_LEVELS..=MAX_LEVELS).contains(&n_levels) || midpoint >= n_levels {
        return None;
    }
    let longest_arm = midpoint.max(n_levels - 1 - midpoint);
    let step = ((NEUTRAL - DARKEST) / longest_arm as f64).min(MAX_ARM_STEP);
    let colours = (0..n_levels)
        .map(|level| {
            let distance = level.abs_diff(midpoint);
            if distance == 0 {
                return neutral(NEUTRAL);
            }
            let lightness = NEUTRAL - step * distance as f64;
            // Equal chroma on both arms at equal distance: the smaller of the two.
            let chroma = WARM.chroma(lightness).min(COOL.chroma(lightness));
            let arm = if level < midpoint { WARM } else { COOL };
            arm.shade(lightness, chroma)
        })
        .collect();
    Some(colours)
}

/// The grey of OKLab lightness `lightness`. OKLab's matrices map linear grey `(Y, Y, Y)` to
/// `L = ∛Y` (their rows sum to 1), so the grey is built directly and stays exactly neutral.
fn neutral(lightness: f64) -> Colour {
    LinearRgb::grey(lightness * lightness * lightness).to_colour()
}

/// The largest chroma at `lightness` and `hue` inside the sRGB gamut, by bisection.
fn max_chroma(lightness: f64, hue: f64) -> f64 {
    let in_gamut = |c: f64| {
        Oklch {
            l: lightness,
            c,
            h: hue,
        }
        .to_linear_rgb()
        .is_in_gamut()
    };
    let (mut inside, mut outside) = (0.0, CHROMA_SEARCH_MAX);
    for _ in 0..CHROMA_SEARCH_STEPS {
        let mid = (inside + outside) / 2.0;
        if in_gamut(mid) {
            inside = mid;
        } else {
            outside = mid;
        }
    }
    inside
}

#[cfg(test)]
mod tests {
    use super::super::difference::ciede2000;
    use super::super::distinct::{difference_seen, ORDERED_NEIGHBOURS, TELL_APART};
    use super::super::space::{Lab, Oklab};
    use super::super::vision::Vision;
    use super::*;

    fn lightness(c: Colour) -> f64 {
        Oklab::from_colour(c).l
    }

    fn all_sequential() -> impl Iterator<Item = Vec<Colour>> {
        (MIN_LEVELS..=MAX_LEVELS).map(|n| sequential(n).unwrap())
    }

    /// Every diverging palette, as (palette, midpoint).
    fn all_diverging() -> impl Iterator<Item = (Vec<Colour>, usize)> {
        (MIN_LEVELS..=MAX_LEVELS).flat_map(|n| (0..n).map(move |m| (diverging(n, m).unwrap(), m)))
    }

    /// Walks from `start` outwards to the end in direction `towards_end` (false = to index 0).
    fn arm(palette: &[Colour], start: usize, towards_end: bool) -> Vec<Colour> {
        if towards_end {
            palette[start..].to_vec()
        } else {
            palette[..=start].iter().rev().copied().collect()
        }
    }

    /// Along `levels`: lightness strictly falls, and ΔE00 from the first strictly grows.
    fn assert_ordered(levels: &[Colour], what: &str) {
        for w in levels.windows(2) {
            assert!(
                lightness(w[1]) < lightness(w[0]),
                "{what}: lightness {levels:?}"
            );
        }
        let first = Lab::from_colour(levels[0]);
        let from_first: Vec<f64> = levels
            .iter()
            .map(|&c| ciede2000(first, Lab::from_colour(c)))
            .collect();
        for w in from_first.windows(2) {
            assert!(w[1] > w[0], "{what}: ΔE00 from the first {from_first:?}");
        }
    }

    fn assert_neighbours_apart(levels: &[Colour], what: &str) {
        for vision in Vision::ALL {
            for (i, w) in levels.windows(2).enumerate() {
                let d = difference_seen(w[0], w[1], vision);
                assert!(
                    d >= ORDERED_NEIGHBOURS,
                    "{what}, levels {i} and {}, {}: ΔE00 {d:.2}",
                    i + 1,
                    vision.name()
                );
            }
        }
    }

    fn assert_off_the_page(levels: &[Colour], what: &str) {
        for &c in levels {
            let d = difference_seen(c, Colour::WHITE, Vision::Normal);
            assert!(d >= TELL_APART, "{what}: {c} is ΔE00 {d:.2} from white");
        }
    }

    #[test]
    fn sizes_outside_the_range_and_midpoints_outside_the_levels_are_refused() {
        assert_eq!(sequential(1), None);
        assert_eq!(sequential(MAX_LEVELS + 1), None);
        assert_eq!(diverging(1, 0), None);
        assert_eq!(diverging(MAX_LEVELS + 1, 6), None);
        assert_eq!(diverging(5, 5), None);
        assert_eq!(sequential(2).map(|p| p.len()), Some(2));
        assert_eq!(diverging(12, 0).map(|p| p.len()), Some(12));
    }

    #[test]
    fn sequential_levels_are_ordered_apart_and_off_the_page() {
        for palette in all_sequential() {
            let what = format!("sequential({})", palette.len());
            assert_ordered(&palette, &what);
            assert_neighbours_apart(&palette, &what);
            assert_off_the_page(&palette, &what);
        }
    }

    #[test]
    fn sequential_lightness_follows_the_design() {
        // Principle 2: L = 0.30 + 0.62·j/n, to the 8-bit rounding of the colours.
        for palette in all_sequential() {
            let n = palette.len();
            for (level, &c) in palette.iter().enumerate() {
                let expected = DARKEST + (PAGE - DARKEST) * (n - 1 - level) as f64 / n as f64;
                assert!(
                    (lightness(c) - expected).abs() < 0.003,
                    "n {n}, level {level}"
                );
            }
        }
    }

    #[test]
    fn diverging_arms_are_ordered_apart_and_meet_at_a_grey() {
        for (palette, m) in all_diverging() {
            let what = format!("diverging({}, {m})", palette.len());
            let mid = palette[m];
            assert!(mid.r == mid.g && mid.g == mid.b, "{what}: midpoint {mid}");
            for towards_end in [false, true] {
                let levels = arm(&palette, m, towards_end);
                if levels.len() > 1 {
                    assert_ordered(&levels, &what);
                }
            }
            assert_neighbours_apart(&palette, &what);
            assert_off_the_page(&palette, &what);
        }
    }

    #[test]
    fn diverging_levels_equally_far_from_the_midpoint_are_equally_light() {
        for (palette, m) in all_diverging() {
            for d in 1..=m.min(palette.len() - 1 - m) {
                let (below, above) = (palette[m - d], palette[m + d]);
                let gap = (lightness(below) - lightness(above)).abs();
                assert!(gap < 0.005, "{}, {m}, distance {d}: {gap}", palette.len());
            }
        }
    }

    #[test]
    fn arms_keep_their_hue_families() {
        let hue = |c: Colour| Oklab::from_colour(c).to_oklch().h;
        for (palette, m) in all_diverging() {
            for (level, &c) in palette.iter().enumerate() {
                let h = hue(c);
                if level < m {
                    assert!((35.0..=90.0).contains(&h), "warm level {c}: hue {h}");
                } else if level > m {
                    assert!((210.0..=280.0).contains(&h), "cool level {c}: hue {h}");
                }
            }
        }
    }
}
