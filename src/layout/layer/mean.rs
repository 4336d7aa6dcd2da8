//! `mean`: bars from zero (with `bar`) under dots with their error bars; with `join`, each
//! colour group's means joined by a line in x order, under the dots and through their centres.
//!
//! Over a categorical x each group's means sit in the group's own slot of the band, so groups
//! stay apart and a group's line meets its own dots; the line breaks at an x level where the
//! group has no mean. Over a numeric x the groups' means at one x are set [`MEAN_DODGE_MM`]
//! apart, centred on the x value, so their intervals do not hide each other.

use crate::compute::layer::{Estimate, MeanEstimates, MeanMarks};
use crate::scene::{Mark, Point, Stroke};

use super::super::style::*;
use super::super::PanelFrame;
use super::{draw_bars, estimate_at, Centre};

pub fn draw(out: &mut Vec<Mark>, frame: &PanelFrame, means: &MeanMarks) {
    if let Some(bars) = &means.bars {
        draw_bars(out, frame, bars);
    }
    match &means.estimates {
        MeanEstimates::Slots(estimates) => {
            let place = |e: &Estimate| frame.group_slot(e.x, e.group);
            if means.join {
                // A gap in the slots (a level without a mean) breaks the line.
                join(out, frame, estimates, place, |a, b| b.x == a.x + 1);
            }
            for e in estimates {
                estimate_at(out, frame, place(e), e, Centre::Dot);
            }
        }
        MeanEstimates::Values(estimates) => {
            let place = |e: &Estimate<f64>| value_place(frame, e);
            if means.join {
                join(out, frame, estimates, place, |_, _| true);
            }
            for e in estimates {
                estimate_at(out, frame, place(e), e, Centre::Dot);
            }
        }
    }
}

/// A mean's centre over a numeric x, dodged by its group, and the width its caps may use.
///
/// The groups' means at one x are set [`MEAN_DODGE_MM`] apart around it; at an end of the axis
/// the whole set moves inwards, so no mean is cut off at the panel's edge.
fn value_place(frame: &PanelFrame, e: &Estimate<f64>) -> (f64, f64) {
    let groups = frame.n_groups.max(1) as f64;
    let half_set = (groups - 1.0) / 2.0 * MEAN_DODGE_MM;
    let reach = CLIP_GRACE_MM - ESTIMATE_RADIUS_MM - ESTIMATE_OUTLINE_MM;
    let centre = frame.x_num(e.x);
    let (left, right) = (frame.rect.x - reach, frame.rect.right() + reach);
    let shift = (right - (centre + half_set)).min(0.0) + (left - (centre - half_set)).max(0.0);
    let dodge = e.group as f64 * MEAN_DODGE_MM - half_set;
    let room = if groups > 1.0 {
        MEAN_DODGE_MM * 0.8
    } else {
        CAP_MM
    };
    (centre + shift + dodge, room / CAP_SHARE)
}

/// Each group's means joined in x order, through the centres `place` gives; `joins(a, b)`
/// says whether two neighbouring means of a group are joined.
fn join<X>(
    out: &mut Vec<Mark>,
    frame: &PanelFrame,
    estimates: &[Estimate<X>],
    place: impl Fn(&Estimate<X>) -> (f64, f64),
    joins: impl Fn(&Estimate<X>, &Estimate<X>) -> bool,
) {
    for group in 0..frame.n_groups.max(1) {
        let mine: Vec<&Estimate<X>> = estimates.iter().filter(|e| e.group == group).collect();
        let mut run: Vec<Point> = Vec::new();
        for (i, e) in mine.iter().enumerate() {
            if i > 0 && !joins(mine[i - 1], e) {
                line(out, frame, group, std::mem::take(&mut run));
            }
            run.push(Point::new(place(e).0, frame.y(e.centre)));
        }
        line(out, frame, group, run);
    }
}

fn line(out: &mut Vec<Mark>, frame: &PanelFrame, group: usize, points: Vec<Point>) {
    if points.len() < 2 {
        return;
    }
    out.push(Mark::Line {
        points,
        stroke: Stroke::solid(frame.summary_colour(group), ERROR_LINE_MM),
    });
}
