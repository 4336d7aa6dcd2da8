//! Which palette a figure's colours take, from the level of measurement of what they show.
//!
//! - nominal levels (unordered) → the qualitative Okabe–Ito palette ([`super::palette`]);
//! - ordinal levels → the sequential ordered palette ([`super::ordered::sequential`]), lightest
//!   first, so the colours keep the order;
//! - ordinal levels with a declared midpoint (`midpoint("neutral")`) → the diverging palette
//!   around it ([`super::ordered::diverging`]).
//!
//! The palette is built over every declared level and each shown level takes its own colour, so
//! a filter that hides some levels never changes the colours of the others.

use super::{ordered, palette};
use crate::scene::Colour;

/// The kind of palette a set of levels takes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Scheme {
    /// Unordered groups: distinct hues.
    Groups,
    /// Ordered levels: one hue family, lightness falling along the levels.
    Ordered,
    /// Ordered levels around a neutral midpoint (the index of the midpoint level).
    Diverging { midpoint: usize },
}

/// The colours of `n_levels` levels under `scheme`; `None` when the palette has too few
/// colours. An ordered scheme of a single level takes the palette's darkest shade; one with
/// more levels than the ordered palettes hold is refused (the caller reports it).
pub fn colours(scheme: Scheme, n_levels: usize) -> Option<Vec<Colour>> {
    match scheme {
        Scheme::Groups => palette::group_colours(n_levels),
        Scheme::Ordered | Scheme::Diverging { .. } if n_levels < ordered::MIN_LEVELS => {
            ordered::sequential(ordered::MIN_LEVELS).map(|c| c[1..=n_levels].to_vec())
        }
        Scheme::Ordered => ordered::sequential(n_levels),
        Scheme::Diverging { midpoint } => ordered::diverging(n_levels, midpoint),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_scheme_uses_its_palette() {
        assert_eq!(colours(Scheme::Groups, 3), palette::group_colours(3));
        assert_eq!(colours(Scheme::Ordered, 4), ordered::sequential(4));
        assert_eq!(
            colours(Scheme::Diverging { midpoint: 2 }, 5),
            ordered::diverging(5, 2)
        );
        assert_eq!(colours(Scheme::Ordered, 1).map(|c| c.len()), Some(1));
        assert_eq!(colours(Scheme::Ordered, ordered::MAX_LEVELS + 1), None);
    }
}
