//! `guide`: a reference line or band at values the spec gives, in every panel. Nothing is
//! computed from the data; the values are in the summary (every number drawn is) and on the
//! axis (the axis reaches them, as it reaches the data).
//!
//! Summary rows per panel (`group` and `x` empty): `x_line` or `y_line` for a line,
//! `x_band_low` and `x_band_high` (or `y_…`) for a band.

use crate::check::layer::{GuideAxis, GuideOpts};

use super::super::extent::Extent;
use super::{At, LayerMarks, LayerOutput, Stat};

/// A reference line (`low == high`) or band, in the axis's units, with its label.
#[derive(Debug, Clone, PartialEq)]
pub struct GuideMark {
    pub axis: GuideAxis,
    pub low: f64,
    pub high: f64,
    pub label: Option<String>,
}

pub fn compute(opts: &GuideOpts, at: &At) -> LayerOutput {
    let k = at.key(0, "");
    // A guide belongs to the panel, not to a colour group.
    let k = super::super::summary::RowKey {
        group: String::new(),
        ..k
    };
    let stats = match (opts.axis, opts.is_band()) {
        (GuideAxis::X, false) => vec![(Stat::XLine, opts.low)],
        (GuideAxis::Y, false) => vec![(Stat::YLine, opts.low)],
        (GuideAxis::X, true) => vec![(Stat::XBandLow, opts.low), (Stat::XBandHigh, opts.high)],
        (GuideAxis::Y, true) => vec![(Stat::YBandLow, opts.low), (Stat::YBandHigh, opts.high)],
    };
    let rows = stats.iter().map(|(s, v)| k.number(*s, *v)).collect();
    let mut extent = Extent::default();
    extent.add(opts.low);
    extent.add(opts.high);
    let mark = GuideMark {
        axis: opts.axis,
        low: opts.low,
        high: opts.high,
        label: opts.label.clone(),
    };
    let (x, y) = match opts.axis {
        GuideAxis::X => (extent, Extent::default()),
        GuideAxis::Y => (Extent::default(), extent),
    };
    LayerOutput {
        x,
        y,
        ..LayerOutput::new(LayerMarks::Guide(mark), rows)
    }
}
