//! Dot plots without randomness: Wilkinson's stacks and a deterministic swarm.
//!
//! Stacks (Wilkinson 1999, "Dot plots", The American Statistician 53(3): 276–281, pages cited
//! from memory; the dot-density algorithm): values are taken in ascending order (ties in input
//! order). A stack
//! starts at the smallest value `s` not yet in a stack and takes every following value `v`
//! with `v − s < w`, `w` the bin width (the dot diameter in data units). The stack is drawn at
//! the midpoint of its smallest and largest value; its dots have height indices 0, 1, 2, … in
//! ascending order. The next stack starts at the next value. The paper's optional smoothing of
//! neighbouring stack positions is not applied, so stacks stay at their data midpoints (two
//! stacks' centres are more than `w/2` apart).
//!
//! Swarm (common practice; a deterministic sweep): positions are `pᵢ = yᵢ · scale` in
//! millimetres along the value axis; points are placed one at a time in ascending `p` (ties in
//! input order), each at the offset `o` across the axis with the smallest `|o|` at which its
//! dot (radius `r`) overlaps no dot placed before it: two dots overlap when their centres are
//! closer than `2r` (a gap of 1e-9·r is forgiven for rounding). The candidates are 0 and the
//! offsets that just touch an earlier dot, `oⱼ ± √((2r)² − (pᵢ − pⱼ)²)`; of two candidates
//! equally far from the axis the positive one wins. The result is a pure function of the
//! input: the same values give the same offsets on every machine.
//!
//! Degenerate cases: no values give no places; a bin width, scale or radius that is not a
//! positive finite number is an error (`InvalidWidth`), as is a non-finite value or position.

use super::error::{ensure_finite, StatError};

/// Where one value's dot goes in a Wilkinson dot plot.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StackedDot {
    /// The centre of its stack, in data units.
    pub centre: f64,
    /// 0 for the bottom dot of its stack, 1 for the next, and so on.
    pub height: usize,
}

/// The stack of each value (in input order) for bin width `width` (Wilkinson's dot-density
/// algorithm, see the module doc).
pub fn dot_stacks(values: &[f64], width: f64) -> Result<Vec<StackedDot>, StatError> {
    ensure_finite(values)?;
    ensure_positive(width)?;
    let order = ascending_order(values);
    let mut places = vec![
        StackedDot {
            centre: 0.0,
            height: 0,
        };
        values.len()
    ];
    let mut start = 0;
    while start < order.len() {
        let first = values[order[start]];
        let end = start
            + order[start..]
                .iter()
                .take_while(|&&i| values[i] - first < width)
                .count();
        let last = values[order[end - 1]];
        let centre = first + (last - first) / 2.0;
        for (height, &i) in order[start..end].iter().enumerate() {
            places[i] = StackedDot { centre, height };
        }
        start = end;
    }
    Ok(places)
}

/// The offset across the axis (millimetres, in input order) of each value's dot in a swarm:
/// `values` in data units, `scale` millimetres per data unit, dots of radius `radius` mm.
pub fn swarm_offsets(values: &[f64], scale: f64, radius: f64) -> Result<Vec<f64>, StatError> {
    ensure_finite(values)?;
    ensure_positive(scale)?;
    ensure_positive(radius)?;
    let positions: Vec<f64> = values.iter().map(|&y| y * scale).collect();
    ensure_finite(&positions)?;
    let order = ascending_order(&positions);
    let diameter = 2.0 * radius;
    let slack = 1e-9 * radius;
    let mut offsets = vec![0.0; values.len()];
    // Placed dots as (position, offset), ascending in position.
    let mut placed: Vec<(f64, f64)> = Vec::with_capacity(values.len());
    for &i in &order {
        let p = positions[i];
        // Earlier dots near enough in position to touch: (their offset, the gap needed).
        let near: Vec<(f64, f64)> = placed
            .iter()
            .rev()
            .take_while(|&&(q, _)| p - q < diameter)
            .map(|&(q, o)| (o, (diameter * diameter - (p - q) * (p - q)).sqrt()))
            .collect();
        let mut candidates: Vec<f64> = vec![0.0];
        candidates.extend(near.iter().flat_map(|&(o, gap)| [o + gap, o - gap]));
        // Nearest the axis first; of ± the same distance, the positive one.
        candidates.sort_by(|a, b| a.abs().total_cmp(&b.abs()).then(b.total_cmp(a)));
        let free = |c: f64| near.iter().all(|&(o, gap)| (c - o).abs() >= gap - slack);
        // A candidate just touching the farthest dot on one side is always free.
        let offset = candidates.into_iter().find(|&c| free(c)).unwrap_or(0.0);
        offsets[i] = offset;
        placed.push((p, offset));
    }
    Ok(offsets)
}

/// Indices of `values` in ascending order, ties in input order.
fn ascending_order(values: &[f64]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..values.len()).collect();
    order.sort_by(|&a, &b| values[a].total_cmp(&values[b]));
    order
}

fn ensure_positive(width: f64) -> Result<(), StatError> {
    if width.is_finite() && width > 0.0 {
        Ok(())
    } else {
        Err(StatError::InvalidWidth(width))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Reference: Wilkinson's (1999) dot-density algorithm by hand with w = 1: stacks start at
    // 1.0 (takes 1.2 and 1.9), 2.5 (takes 2.6) and 5.0; centres at the midpoints.
    #[test]
    fn stacks_by_hand() {
        let values = [2.6, 1.0, 5.0, 1.9, 1.2, 2.5];
        let got = dot_stacks(&values, 1.0).unwrap();
        let expected = [
            (2.55, 1),
            (1.45, 0),
            (5.0, 0),
            (1.45, 2),
            (1.45, 1),
            (2.55, 0),
        ];
        for (g, (centre, height)) in got.iter().zip(expected) {
            assert!(
                (g.centre - centre).abs() < 1e-15 && g.height == height,
                "{g:?}"
            );
        }
        // A value exactly one width above a stack's start begins a new stack.
        let edge = dot_stacks(&[0.0, 1.0], 1.0).unwrap();
        assert_eq!((edge[1].centre, edge[1].height), (1.0, 0));
        assert_eq!(dot_stacks(&[], 1.0), Ok(Vec::new()));
        assert_eq!(dot_stacks(&[1.0], 0.0), Err(StatError::InvalidWidth(0.0)));
    }

    fn overlaps(values: &[f64], offsets: &[f64], scale: f64, radius: f64) -> bool {
        (0..values.len()).any(|i| {
            (0..i).any(|j| {
                let dy = (values[i] - values[j]) * scale;
                let dx = offsets[i] - offsets[j];
                (dx * dx + dy * dy).sqrt() < 2.0 * radius * (1.0 - 1e-9)
            })
        })
    }

    // Reference: the module doc's sweep, by hand and as properties (no two dots overlap; each
    // dot is as near the axis as the earlier dots allow).
    #[test]
    fn swarm_by_hand_and_without_overlap() {
        // Equal values: 0, then +2r, then −2r, then +4r.
        let same = swarm_offsets(&[1.0; 4], 10.0, 0.5).unwrap();
        assert_eq!(same, vec![0.0, 1.0, -1.0, 2.0]);
        // Far apart: all on the axis.
        assert_eq!(
            swarm_offsets(&[0.0, 1.0, 2.0], 10.0, 0.5).unwrap(),
            vec![0.0; 3]
        );
        // Half a diameter apart in position: the second dot moves by √(1 − 0.25).
        let near = swarm_offsets(&[0.0, 0.05], 10.0, 0.5).unwrap();
        assert_eq!(near[0], 0.0);
        assert!((near[1] - 0.75f64.sqrt()).abs() < 1e-15);
        // A larger, deterministic sample.
        let values: Vec<f64> = (0..200)
            .map(|i| ((i * 37 % 101) as f64 / 101.0).powi(2) * 3.0)
            .collect();
        let offsets = swarm_offsets(&values, 20.0, 0.6).unwrap();
        assert!(!overlaps(&values, &offsets, 20.0, 0.6));
        assert_eq!(offsets, swarm_offsets(&values, 20.0, 0.6).unwrap());
        assert_eq!(
            swarm_offsets(&[1.0], 0.0, 1.0),
            Err(StatError::InvalidWidth(0.0))
        );
        assert_eq!(
            swarm_offsets(&[1e308, -1e308], 10.0, 1.0),
            Err(StatError::NonFiniteValue)
        );
    }
}
