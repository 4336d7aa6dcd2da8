//! The figure's look in one place: type sizes, line widths, spacing, colours and the smallest
//! sizes layout may use.
//!
//! The house style, from these principles (the reference's §10 states them for users):
//! - **Ink for data.** No background, no panel border, no grid lines unless asked for (`grid`,
//!   faint); axes are thin, grey and set apart from the data.
//! - **Range frames** (Tufte 1983, *The Visual Display of Quantitative Information*): an axis
//!   line spans only the range of the data it shows, so the frame itself reports the minimum and
//!   maximum; ticks point outwards, away from the data; each axis stands a small offset away from
//!   the data area, so no mark sits on an axis line.
//! - **Titles that read horizontally.** The y-axis title is a short heading above the y axis,
//!   read without turning the page; panel labels sit at the panel's left edge, like headings.
//! - **No title inside the figure by default.** Journals print the title in the caption; a
//!   `title` names the figure in the SVG (for screen readers) and is drawn only on request.
//! - **n as a table row.** The n of each category is a row of numbers under the axis, with `n`
//!   as the row's heading, not a repeated `n = ` under every label.
//! - **Marks explain themselves**: a key under the plot names every summary mark.
//!
//! Sizes are for the final printed figure: text from [`MIN_TEXT_PT`] (6 pt) to 9 pt, the range
//! journals ask for. Layout never sets text smaller than [`MIN_TEXT_PT`], a panel narrower than
//! [`MIN_PANEL_WIDTH_MM`] or shorter than [`MIN_PANEL_HEIGHT_MM`]: when a figure cannot hold its
//! content at its size, it says so (F0124) instead of shrinking it further.

use crate::scene::{Colour, TextStyle, Weight};

/// Ink for text and summary marks.
pub const INK: Colour = Colour::from_hex(0x1A1A1A);
/// Axis lines and ticks.
pub const AXIS_INK: Colour = Colour::from_hex(0x5C5C5C);
/// Secondary text (n, key, caption).
pub const MUTED: Colour = Colour::from_hex(0x595959);
/// Reference lines at the y ticks, drawn only on request (`grid`).
pub const GRID: Colour = Colour::from_hex(0xEBEBEB);
/// Data marks of a figure without colour groups.
pub const DATA_COLOUR: Colour = Colour::from_hex(0x0072B2);

/// Smallest text layout may set.
pub const MIN_TEXT_PT: f64 = 6.0;
/// Narrowest and shortest data area of a panel.
pub const MIN_PANEL_WIDTH_MM: f64 = 12.0;
pub const MIN_PANEL_HEIGHT_MM: f64 = 10.0;
/// The strip of estimates under a panel (`difference`): its share of the height the data area
/// and it have together, and its least height.
pub const ESTIMATE_SHARE: f64 = 0.3;
pub const MIN_ESTIMATE_HEIGHT_MM: f64 = 10.0;
/// Most lines a category label, a panel label or a legend label may wrap onto.
pub const MAX_LABEL_LINES: usize = 2;

pub const MARGIN_MM: f64 = 2.0;
pub const GAP_MM: f64 = 1.0;
/// Smallest clear space between two pieces of text side by side.
pub const TEXT_GAP_MM: f64 = 1.2;
/// Length of a tick, outside the axis line.
pub const TICK_MM: f64 = 1.0;
/// Clear space between the data area and an axis line.
pub const AXIS_OFFSET_MM: f64 = 1.5;
/// How far beyond the data area marks are still drawn (a dot on the edge stays whole); less
/// than [`AXIS_OFFSET_MM`], so no mark reaches an axis.
pub const CLIP_GRACE_MM: f64 = 0.8;
/// Clear space between panels side by side (besides the next panel's y ticks) and between rows.
pub const PANEL_GAP_MM: f64 = 3.0;
pub const AXIS_WIDTH_MM: f64 = 0.2;
pub const GRID_WIDTH_MM: f64 = 0.15;
/// Vertical room per y tick the axis aims for, and the fewest and most ticks it aims for.
pub const MM_PER_Y_TICK: f64 = 9.0;
pub const Y_TICKS: (usize, usize) = (3, 7);
/// Horizontal room per x tick a numeric x axis aims for, and the fewest and most ticks.
pub const MM_PER_X_TICK: f64 = 16.0;
pub const X_TICKS: (usize, usize) = (2, 7);
/// Clear space between y labels one above the other, and between upright labels side by side.
pub const Y_LABEL_GAP_MM: f64 = 0.6;
pub const UPRIGHT_GAP_MM: f64 = 0.4;
/// Space under a drawn title.
pub const TITLE_GAP_MM: f64 = 1.5;
/// The panels' shape the grid prefers: the score of a grid is the smaller of a panel's width
/// and this times its height.
pub const PANEL_ASPECT: f64 = 1.3;
/// Share of a category's band that its groups use (the rest separates categories).
pub const BAND_FILL: f64 = 0.8;
/// Padding added beyond the data at each end of a numeric axis, as a share of its span.
pub const AXIS_PAD: f64 = 0.04;

pub const POINT_RADIUS_MM: f64 = 0.55;
pub const POINT_OPACITY: f64 = 0.6;
/// A cell with more dots than [`crate::compute::POINTS_PER_CELL_CAP`] (where `points` warn)
/// is drawn as one shape: overlapping dots no longer darken, and dots closer than this are
/// drawn once. This keeps files small and fast to draw.
pub const MERGED_DOT_GRID_MM: f64 = 0.25;
pub const LINE_OPACITY: f64 = 0.4;
/// Bars (counts, means) alone, and under points.
pub const BAR_OPACITY: f64 = 0.8;
pub const BAR_UNDER_POINTS_OPACITY: f64 = 0.25;
pub const LINE_WIDTH_MM: f64 = 0.25;
pub const BOX_LINE_MM: f64 = 0.3;
pub const MEDIAN_LINE_MM: f64 = 0.55;
pub const ESTIMATE_RADIUS_MM: f64 = 0.8;
pub const ERROR_LINE_MM: f64 = 0.35;
pub const CAP_MM: f64 = 2.2;
/// Extra width of the white line drawn under an interval so it stands out from the points.
pub const HALO_MM: f64 = 0.5;
/// Share of a group's band a bar (counts, means) takes.
pub const BAR_SHARE: f64 = 0.85;
/// Histogram bars of one group; hairline separators between bins are drawn only when bins
/// are at least [`BIN_SEPARATOR_MIN_MM`] wide, so many narrow bins never turn white.
pub const BIN_OPACITY: f64 = 0.8;
pub const BIN_SEPARATOR_MM: f64 = 0.12;
pub const BIN_SEPARATOR_MIN_MM: f64 = 1.0;
pub const DENSITY_AREA_OPACITY: f64 = 0.15;
/// Lines of distribution curves (density, cumulative distribution, outlined histograms).
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
/// Dashes (on, off) of the quartile lines of a violin, and of a confidence band's edges when
/// colour groups overlap.
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
/// The shapes of dots that tell colour groups apart (`colour VAR shapes`), in group order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DotShape {
    Circle,
    Square,
    TriangleUp,
    Diamond,
    TriangleDown,
    Plus,
    Pentagon,
    Cross,
}
pub const GROUP_SHAPES: [DotShape; 8] = [
    DotShape::Circle,
    DotShape::Square,
    DotShape::TriangleUp,
    DotShape::Diamond,
    DotShape::TriangleDown,
    DotShape::Plus,
    DotShape::Pentagon,
    DotShape::Cross,
];
/// The dash patterns (on, off, ...) of lines that tell colour groups apart (`colour VAR
/// dashes`), in group order; the first is solid. Each differs from the others in its rhythm,
/// and the shortest dash is longer than the widest line is thick.
pub const GROUP_DASHES_MM: [&[f64]; 8] = [
    &[],
    &[1.6, 0.8],
    &[0.5, 0.6],
    &[1.6, 0.6, 0.5, 0.6],
    &[3.0, 1.0],
    &[0.9, 0.9],
    &[2.4, 0.6, 0.5, 0.6, 0.5, 0.6],
    &[1.2, 1.4, 0.5, 1.4],
];
/// A legend's line swatch is this many swatch sides long when its groups are dashed, so the
/// pattern shows.
pub const DASHED_SWATCH_SIDES: f64 = 3.0;
/// Means over a numeric x: the distance between neighbouring colour groups' means at one x,
/// so their intervals do not hide each other.
pub const MEAN_DODGE_MM: f64 = 1.2;
/// Reference lines (`guide`): grey, dashed, behind the data; bands a faint tint of ink; their
/// labels keep this far from the line and from the panel's edges.
pub const GUIDE_INK: Colour = Colour::from_hex(0x808080);
pub const GUIDE_LINE_MM: f64 = 0.3;
pub const GUIDE_DASH_MM: [f64; 2] = [1.4, 0.9];
pub const GUIDE_BAND_OPACITY: f64 = 0.08;
pub const GUIDE_LABEL_GAP_MM: f64 = 0.6;
/// Stacked bars of shares (`stack`): the share of an x level's band a bar takes, and at most
/// this; the white line between its segments.
pub const STACK_BAR_SHARE: f64 = 0.6;
pub const STACK_BAR_MAX_MM: f64 = 14.0;
pub const STACK_SEPARATOR_MM: f64 = 0.15;
/// Legend: a swatch's side as a share of the line height; the clear space kept between a
/// legend placed inside a panel and the data.
pub const SWATCH_SHARE: f64 = 0.75;
pub const LEGEND_CLEARANCE_MM: f64 = 1.0;
/// A legend label wraps at this share of the room the legend has; items in a row keep this
/// much apart.
pub const LEGEND_LABEL_SHARE: f64 = 0.5;
pub const LEGEND_ITEM_GAP_MM: f64 = 3.0;

fn text(size_pt: f64, weight: Weight, colour: Colour) -> TextStyle {
    TextStyle {
        size_pt,
        weight,
        colour,
    }
}

/// The figure's title, when drawn (`title "..." show`).
pub fn title() -> TextStyle {
    text(9.0, Weight::Bold, INK)
}

/// A panel's label, above it at its left edge.
pub fn panel_label() -> TextStyle {
    text(7.5, Weight::Bold, INK)
}

pub fn axis_title() -> TextStyle {
    text(7.5, Weight::Regular, INK)
}

pub fn tick_label() -> TextStyle {
    text(7.0, Weight::Regular, INK)
}

pub fn small_tick_label() -> TextStyle {
    TextStyle {
        size_pt: MIN_TEXT_PT,
        ..tick_label()
    }
}

pub fn n_label() -> TextStyle {
    text(MIN_TEXT_PT, Weight::Regular, MUTED)
}

/// The heading of the n row (`n`), in the y labels' column.
pub fn n_heading() -> TextStyle {
    text(MIN_TEXT_PT, Weight::Bold, MUTED)
}

pub fn legend_title() -> TextStyle {
    text(7.0, Weight::Bold, INK)
}

pub fn legend_label() -> TextStyle {
    tick_label()
}

/// The key under the plot that names every summary mark.
pub fn key_text() -> TextStyle {
    text(6.5, Weight::Regular, MUTED)
}

pub fn caption() -> TextStyle {
    text(7.0, Weight::Regular, MUTED)
}

/// A reference line's label (`guide ... label("...")`), inside the panel.
pub fn guide_label() -> TextStyle {
    text(6.5, Weight::Regular, MUTED)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn no_text_style_is_below_the_minimum() {
        for style in [
            title(),
            panel_label(),
            axis_title(),
            tick_label(),
            small_tick_label(),
            n_label(),
            n_heading(),
            legend_title(),
            legend_label(),
            key_text(),
            caption(),
            guide_label(),
        ] {
            assert!(style.size_pt >= MIN_TEXT_PT, "{style:?}");
        }
    }
}
