//! `counts`: a bar from zero per level and colour group.

use crate::compute::layer::Bar;
use crate::scene::Mark;

use super::super::PanelFrame;
use super::draw_bars;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, bars: &[Bar]) {
    draw_bars(out, frame, bars);
}
