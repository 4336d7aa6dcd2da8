//! `mean`: bars from zero (with `bar`) under dots with their error bars.

use crate::compute::layer::{Bar, Estimate};
use crate::scene::Mark;

use super::super::PanelFrame;
use super::{draw_bars, draw_estimate, Centre};

pub fn draw(
    out: &mut Vec<Mark>,
    frame: &PanelFrame,
    bars: &Option<Vec<Bar>>,
    estimates: &[Estimate],
) {
    if let Some(bars) = bars {
        draw_bars(out, frame, bars);
    }
    for e in estimates {
        draw_estimate(out, frame, e, Centre::Dot);
    }
}
