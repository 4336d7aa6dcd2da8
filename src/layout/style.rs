//! The figure's look in one place: type sizes, line widths, spacing and colours.
//!
//! Sizes are for the final printed figure (text 6.5–9 pt, the range journals ask for).
//! Colours of groups come from the Okabe–Ito palette (see [`crate::colour::palette`]).

use crate::colour::palette;
use crate::scene::{Colour, TextStyle, Weight};

/// Ink for text, axes and summary marks.
pub const INK: Colour = Colour::from_hex(0x222222);
/// Secondary text (n labels, caption).
pub const MUTED: Colour = Colour::from_hex(0x666666);
/// Reference lines at the y ticks.
pub const GRID: Colour = Colour::from_hex(0xE8E8E8);

pub const MARGIN_MM: f64 = 2.5;
pub const GAP_MM: f64 = 1.2;
pub const TICK_MM: f64 = 1.0;
pub const PANEL_GAP_MM: f64 = 4.0;
pub const AXIS_WIDTH_MM: f64 = 0.25;
pub const GRID_WIDTH_MM: f64 = 0.2;
pub const POINT_RADIUS_MM: f64 = 0.55;
pub const POINT_OPACITY: f64 = 0.6;
pub const LINE_OPACITY: f64 = 0.4;
/// Bars (counts, means) alone, and under points.
pub const BAR_OPACITY: f64 = 0.75;
pub const BAR_UNDER_POINTS_OPACITY: f64 = 0.25;
pub const LINE_WIDTH_MM: f64 = 0.25;
pub const BOX_LINE_MM: f64 = 0.3;
pub const MEDIAN_LINE_MM: f64 = 0.55;
pub const ESTIMATE_RADIUS_MM: f64 = 0.8;
pub const ERROR_LINE_MM: f64 = 0.35;
pub const CAP_MM: f64 = 2.2;
/// Extra width of the white line drawn under an interval so it stands out from the points.
pub const HALO_MM: f64 = 0.5;
/// Share of a category's band that its groups use (the rest separates categories).
pub const BAND_FILL: f64 = 0.8;
/// Padding added beyond the data at each end of a numeric axis, as a share of its span.
pub const AXIS_PAD: f64 = 0.04;

pub fn title() -> TextStyle {
    TextStyle {
        size_pt: 9.0,
        weight: Weight::Bold,
        colour: INK,
    }
}

pub fn panel_label() -> TextStyle {
    TextStyle {
        size_pt: 8.0,
        weight: Weight::Bold,
        colour: INK,
    }
}

pub fn axis_title() -> TextStyle {
    TextStyle {
        size_pt: 8.0,
        weight: Weight::Regular,
        colour: INK,
    }
}

pub fn tick_label() -> TextStyle {
    TextStyle {
        size_pt: 7.0,
        weight: Weight::Regular,
        colour: INK,
    }
}

pub fn small_tick_label() -> TextStyle {
    TextStyle {
        size_pt: 6.0,
        ..tick_label()
    }
}

pub fn n_label() -> TextStyle {
    TextStyle {
        size_pt: 6.0,
        weight: Weight::Regular,
        colour: MUTED,
    }
}

pub fn legend_label() -> TextStyle {
    tick_label()
}

pub fn caption() -> TextStyle {
    TextStyle {
        size_pt: 7.0,
        weight: Weight::Regular,
        colour: MUTED,
    }
}

/// Colour of group `g` of `n`; a figure without colour groups uses the palette's first colour.
pub fn group_colour(g: usize, n: usize) -> Colour {
    palette::group_colours(n.max(1))
        .and_then(|c| c.get(g).copied())
        .unwrap_or(INK)
}
