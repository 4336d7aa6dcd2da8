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
/// Share of a group's band a bar (counts, means) takes.
pub const BAR_SHARE: f64 = 0.85;
/// Histogram bars alone, and overlapping colour groups (outlined in their colour).
pub const BIN_OPACITY: f64 = 0.8;
pub const BIN_OVERLAY_OPACITY: f64 = 0.45;
pub const BIN_EDGE_MM: f64 = 0.2;
pub const DENSITY_AREA_OPACITY: f64 = 0.15;
/// Lines of distribution curves (density, cumulative distribution).
pub const CURVE_LINE_MM: f64 = 0.4;
/// A box's width as a share of its group's band, and at most this.
pub const BOX_WIDTH_SHARE: f64 = 0.5;
pub const BOX_MAX_WIDTH_MM: f64 = 8.0;
/// Outliers are open circles this much larger than points.
pub const OUTLIER_RADIUS_SCALE: f64 = 1.2;
/// An interval's caps take at most this share of the group's band.
pub const CAP_SHARE: f64 = 0.4;
/// The outline of a mean's dot or a median's diamond, and the diamond's size against the dot.
pub const ESTIMATE_OUTLINE_MM: f64 = 0.3;
pub const DIAMOND_SCALE: f64 = 1.1;
/// An ordinal median's dot against an estimate's, and its white outline.
pub const LEVEL_DOT_SCALE: f64 = 1.2;
pub const LEVEL_DOT_OUTLINE_MM: f64 = 0.25;
pub const FIT_BAND_OPACITY: f64 = 0.18;
/// Half the width of the widest violin, as a share of its group's band, and at most this.
pub const VIOLIN_HALF_SHARE: f64 = 0.45;
pub const VIOLIN_HALF_MAX_MM: f64 = 9.0;
pub const VIOLIN_FILL_OPACITY: f64 = 0.25;
/// Dashes (on, off) of the quartile lines of a violin.
pub const QUARTILE_DASH_MM: [f64; 2] = [0.8, 0.5];
/// Flows: share of an occasion's band taken by its stacked bar, and the bar's widest and
/// narrowest; the gap between stacked states, and the most of the panel's height the gaps may
/// take; the ribbons' opacity.
pub const FLOW_BAR_SHARE: f64 = 0.16;
pub const FLOW_BAR_MAX_MM: f64 = 5.0;
pub const FLOW_BAR_MIN_MM: f64 = 1.6;
pub const FLOW_STATE_GAP_MM: f64 = 1.6;
pub const FLOW_GAPS_MAX_SHARE: f64 = 0.25;
pub const FLOW_RIBBON_OPACITY: f64 = 0.42;
/// Legend: a swatch's side as a share of the line height; the gap between wrapped rows as a
/// share of the gap.
pub const SWATCH_SHARE: f64 = 0.7;

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
