//! `counts`: a bar from zero per level and colour group, with the Wilson interval of its
//! percentage as an error bar when asked for.

use crate::compute::layer::CountMarks;
use crate::scene::Mark;

use super::super::PanelFrame;
use super::{draw_bars, draw_interval};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, counts: &CountMarks) {
    draw_bars(out, frame, &counts.bars);
    for e in &counts.intervals {
        draw_interval(out, frame, e);
    }
}
