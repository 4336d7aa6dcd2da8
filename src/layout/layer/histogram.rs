//! `histogram`: adjacent bars over the bins; translucent and outlined in their colour when
//! colour groups overlap.

use crate::compute::layer::Bin;
use crate::scene::{Colour, Fill, Mark, Stroke};

use super::super::style::*;
use super::super::PanelFrame;

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, bins: &[Bin]) {
    let overlay = frame.n_groups > 1;
    for b in bins {
        let colour = group_colour(b.group, frame.n_groups);
        let (x0, x1) = (frame.x_num(b.lo), frame.x_num(b.hi));
        let (y_top, y_zero) = (frame.y(b.height), frame.y(0.0));
        out.push(Mark::Rect {
            x: x0,
            y: y_top,
            width: x1 - x0,
            height: y_zero - y_top,
            fill: Some(Fill {
                colour,
                opacity: if overlay {
                    BIN_OVERLAY_OPACITY
                } else {
                    BIN_OPACITY
                },
            }),
            stroke: Some(Stroke::solid(
                if overlay { colour } else { Colour::WHITE },
                BIN_EDGE_MM,
            )),
        });
    }
}
