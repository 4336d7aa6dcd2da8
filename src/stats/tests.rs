//! Unit tests: degenerate inputs, readable steps and hand-checkable cases. The outside
//! references (NIST StRD, Student 1908, numpy and scipy) are in `tests/stats_*.rs`; each case
//! here names where its expected value comes from.

use super::*;

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol * b.abs().max(1.0)
}

// --- summary ---------------------------------------------------------------------------------

#[test]
fn summaries_of_degenerate_inputs() {
    let too_few = |found| StatError::TooFewValues { needed: 2, found };
    assert_eq!(
        moments(&[]),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    assert_eq!(
        mean(&[]),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    let one = moments(&[4.5]).unwrap();
    assert_eq!((one.n, one.mean, one.sd, one.se()), (1, 4.5, None, None));
    assert_eq!(sample_sd(&[4.5]), Err(too_few(1)));
    assert_eq!(standard_error(&[4.5]), Err(too_few(1)));
    // All equal: the sd is exactly zero, even with a large offset.
    assert_eq!(sample_sd(&[1e12 + 0.5; 7]), Ok(0.0));
    assert_eq!(moments(&[1.0, f64::NAN]), Err(StatError::NonFiniteValue));
    assert_eq!(mean(&[f64::INFINITY]), Err(StatError::NonFiniteValue));
    // Two values: sd = |a − b| / √2 (definition of the n − 1 sd).
    assert!(close(sample_sd(&[1.0, 3.0]).unwrap(), 2f64.sqrt(), 1e-15));
}

// --- quantiles -------------------------------------------------------------------------------

#[test]
fn definition_7_by_hand() {
    // Hyndman & Fan (1996) definition 7: h = (n − 1)p, linear between order statistics.
    let sorted = [1.0, 2.0, 3.0, 4.0];
    assert_eq!(quantile_sorted(&sorted, 0.25), Ok(1.75));
    assert_eq!(quantile_sorted(&sorted, 0.5), Ok(2.5));
    assert_eq!(quantile_sorted(&sorted, 1.0), Ok(4.0));
    assert_eq!(quantile_sorted(&sorted, 0.0), Ok(1.0));
    assert_eq!(quantile_sorted(&[7.0], 0.3), Ok(7.0));
    assert_eq!(
        quantile_sorted(&[], 0.5),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    assert_eq!(
        quantile_sorted(&sorted, 1.5),
        Err(StatError::InvalidProbability(1.5))
    );
    assert!(quantile_sorted(&sorted, f64::NAN).is_err());
    let q = quartiles(&[3.0, 1.0, 2.0]).unwrap();
    assert_eq!((q.q1, q.median, q.q3, q.iqr()), (1.5, 2.0, 2.5, 1.0));
}

#[test]
fn definition_1_on_levels() {
    // Hyndman & Fan definition 1: the first level whose cumulative proportion reaches p.
    assert_eq!(ordinal_quantile(&[1, 1], 0.5), Ok(0));
    assert_eq!(ordinal_quantile(&[1, 1], 0.51), Ok(1));
    assert_eq!(
        ordinal_quantile(&[0, 3, 0], 0.0),
        Ok(1),
        "p = 0 is the lowest observed level"
    );
    assert_eq!(
        ordinal_quantile(&[0, 3, 0], 1.0),
        Ok(1),
        "p = 1 is the highest observed level"
    );
    let q = ordinal_quartiles(&[2, 0, 5, 1]).unwrap();
    // Cumulative proportions 0.25, 0.25, 0.875, 1: level 0 reaches 0.25 exactly.
    assert_eq!((q.q1, q.median, q.q3), (0, 2, 2));
    assert_eq!(
        ordinal_quantile(&[0, 0], 0.5),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    assert_eq!(
        ordinal_quantile(&[], 0.5),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    assert_eq!(
        ordinal_quantile(&[1], -0.1),
        Err(StatError::InvalidProbability(-0.1))
    );
}

// --- intervals -------------------------------------------------------------------------------

#[test]
fn intervals_need_two_values_and_a_valid_level() {
    assert_eq!(
        mean_interval(&[2.0], Spread::Se),
        Err(StatError::TooFewValues {
            needed: 2,
            found: 1
        })
    );
    assert_eq!(mean_ci(&[1.0, 2.0], 1.0), Err(StatError::InvalidLevel(1.0)));
    assert_eq!(mean_ci(&[1.0, 2.0], 0.0), Err(StatError::InvalidLevel(0.0)));
    let sd = mean_interval(&[1.0, 3.0], Spread::Sd).unwrap();
    assert_eq!(
        (sd.mean, sd.low, sd.high),
        (2.0, 2.0 - sd.half_width, 2.0 + sd.half_width)
    );
    // All equal: a zero-width interval, not an error.
    assert_eq!(mean_ci(&[5.0; 4], 0.95).unwrap().half_width, 0.0);
}

#[test]
fn t_quantiles_by_hand_and_at_the_edges() {
    // With 1 df the t distribution is Cauchy: t(p) = tan(π(p − 1/2)) (textbook identity).
    let p = 0.975;
    let cauchy = (std::f64::consts::PI * (p - 0.5)).tan();
    assert!(close(t_quantile(p, 1.0).unwrap(), cauchy, 1e-13));
    // With 2 df: t(p) = (2p − 1) / √(2p(1 − p)) (textbook closed form).
    let closed = (2.0 * p - 1.0) / (2.0 * p * (1.0 - p)).sqrt();
    assert!(close(t_quantile(p, 2.0).unwrap(), closed, 1e-13));
    assert_eq!(t_quantile(0.5, 7.0), Ok(0.0));
    assert_eq!(
        t_quantile(0.25, 4.0).unwrap(),
        -t_quantile(0.75, 4.0).unwrap()
    );
    assert_eq!(
        t_quantile(0.0, 4.0),
        Err(StatError::InvalidProbability(0.0))
    );
    assert_eq!(
        t_quantile(1.0, 4.0),
        Err(StatError::InvalidProbability(1.0))
    );
    assert_eq!(
        t_quantile(0.9, 0.0),
        Err(StatError::InvalidDegreesOfFreedom(0.0))
    );
    assert!(t_quantile(0.9, f64::NAN).is_err());
    assert!(t_quantile(f64::NAN, 3.0).is_err());
}

// --- within-subject intervals ----------------------------------------------------------------

#[test]
fn within_subject_degenerate_inputs() {
    let rows = vec![vec![Some(1.0), Some(2.0)], vec![Some(1.0)]];
    assert_eq!(
        within_subject_intervals(&rows, Spread::Se),
        Err(StatError::LengthMismatch { left: 2, right: 1 })
    );
    let one_cell = vec![vec![Some(1.0)], vec![Some(2.0)]];
    assert_eq!(
        within_subject_intervals(&one_cell, Spread::Se),
        Err(StatError::TooFewCells { found: 1 })
    );
    let empty: Vec<Vec<Option<f64>>> = Vec::new();
    assert_eq!(
        within_subject_intervals(&empty, Spread::Se),
        Err(StatError::TooFewCells { found: 0 })
    );
    // One complete subject after dropping: too few.
    let mostly_missing = vec![vec![Some(1.0), None], vec![Some(1.0), Some(2.0)]];
    assert_eq!(
        within_subject_intervals(&mostly_missing, Spread::Se),
        Err(StatError::TooFewValues {
            needed: 2,
            found: 1
        })
    );
}

#[test]
fn within_subject_drops_incomplete_subjects_and_removes_subject_offsets() {
    // Subjects that differ only by a constant have no within-subject spread (definition).
    let rows = vec![
        vec![Some(1.0), Some(3.0), Some(8.0)],
        vec![Some(11.0), Some(13.0), Some(18.0)],
        vec![Some(101.0), None, Some(108.0)],
        vec![Some(-4.0), Some(-2.0), Some(3.0)],
    ];
    let result = within_subject_intervals(&rows, Spread::Ci { level: 0.95 }).unwrap();
    assert_eq!((result.n_subjects, result.n_dropped), (3, 1));
    for (cell, want) in result.cells.iter().zip([8.0 / 3.0, 14.0 / 3.0, 29.0 / 3.0]) {
        assert!(close(cell.mean, want, 1e-15), "{} vs {want}", cell.mean);
    }
    assert!(result
        .cells
        .iter()
        .all(|c| c.half_width.abs() < 1e-12 && c.n == 3));
}

// Reference: Hyndman & Fan (1996) definition 1 by hand: the lower middle level for an even
// count, a level some trial had; the same as the counts form.
#[test]
fn level_median_is_a_level() {
    assert_eq!(level_median(&[1, 5]), Ok(1));
    assert_eq!(level_median(&[5, 1]), Ok(1));
    assert_eq!(level_median(&[2, 2, 3]), Ok(2));
    assert_eq!(level_median(&[4, 0, 4, 0]), Ok(0));
    assert_eq!(level_median(&[3]), Ok(3));
    assert_eq!(level_quantile(&[0, 1, 2, 3], 0.75), Ok(2));
    assert_eq!(level_quantile(&[0, 1, 2, 3], 0.76), Ok(3));
    assert_eq!(ordinal_quantile(&[1, 1, 1, 1], 0.75), Ok(2));
    assert_eq!(
        level_median(&[]),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    assert_eq!(
        level_quantile(&[1], 1.5),
        Err(StatError::InvalidProbability(1.5))
    );
}

// --- box -------------------------------------------------------------------------------------

#[test]
fn box_by_hand() {
    // Tukey fences at 1.5 IQR: q1 = 2, q3 = 4 (definition 7), fences −1 and 7.
    let b = box_summary(&[4.0, 100.0, 1.0, 3.0, 2.0], Whiskers::Tukey).unwrap();
    assert_eq!((b.q1, b.median, b.q3), (2.0, 3.0, 4.0));
    assert_eq!((b.whisker_low, b.whisker_high), (1.0, 4.0));
    assert_eq!(b.outliers, vec![100.0]);
    assert_eq!((b.min, b.max, b.n), (1.0, 100.0, 5));
    let r = box_summary(&[4.0, 100.0, 1.0, 3.0, 2.0], Whiskers::Range).unwrap();
    assert_eq!(
        (r.whisker_low, r.whisker_high, r.outliers.len()),
        (1.0, 100.0, 0)
    );
}

#[test]
fn box_degenerate_inputs() {
    let one = box_summary(&[3.0], Whiskers::Tukey).unwrap();
    assert_eq!(
        (
            one.q1,
            one.median,
            one.q3,
            one.whisker_low,
            one.whisker_high
        ),
        (3.0, 3.0, 3.0, 3.0, 3.0)
    );
    assert!(one.outliers.is_empty());
    // Zero IQR: every value off the common one is an outlier (fences equal the quartiles).
    let flat = box_summary(&[5.0, 5.0, 5.0, 5.0, 9.0, 1.0, 5.0, 5.0], Whiskers::Tukey).unwrap();
    assert_eq!((flat.whisker_low, flat.whisker_high), (5.0, 5.0));
    assert_eq!(flat.outliers, vec![1.0, 9.0]);
    // A whisker never points back into the box (common practice): interpolated q1 = 7.5 lies
    // between 0 (beyond the fence) and 10.
    let gap = box_summary(&[0.0, 10.0, 10.0, 10.0, 10.5], Whiskers::Tukey).unwrap();
    assert!(gap.whisker_low <= gap.q1 && gap.whisker_high >= gap.q3);
    assert_eq!(
        box_summary(&[], Whiskers::Tukey).map(|b| b.n),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
}

// --- readable steps and ticks (common practice) ----------------------------------------------

#[test]
fn readable_step_nearest_on_a_log_scale() {
    let nearest = |raw: f64| readable_step(raw, StepRounding::Nearest).unwrap().value();
    // Geometric midpoints per decade: √2 ≈ 1.414, √5 ≈ 2.236, √12.5 ≈ 3.536, √50 ≈ 7.071.
    assert_eq!(nearest(1.4), 1.0);
    assert_eq!(nearest(1.5), 2.0);
    assert_eq!(nearest(2.2), 2.0);
    assert_eq!(nearest(2.3), 2.5);
    assert_eq!(nearest(3.5), 2.5);
    assert_eq!(nearest(3.6), 5.0);
    assert_eq!(nearest(7.0), 5.0);
    assert_eq!(nearest(7.1), 10.0);
    assert_eq!(nearest(0.3), 0.25);
    assert_eq!(nearest(0.0013), 0.001);
    assert_eq!(nearest(42_000.0), 50_000.0);
    assert_eq!(nearest(1e-7), 1e-7);
    assert_eq!(nearest(1000.0), 1000.0);
}

#[test]
fn readable_step_up_and_rejects() {
    let up = |raw: f64| readable_step(raw, StepRounding::Up).unwrap().value();
    assert_eq!(up(1.0), 1.0);
    assert_eq!(
        up(1.000_000_000_1),
        1.0,
        "floating noise does not push a step up"
    );
    assert_eq!(up(1.1), 2.0);
    assert_eq!(up(2.2), 2.5);
    assert_eq!(up(3.0), 5.0);
    assert_eq!(up(6.0), 10.0);
    assert_eq!(up(0.07), 0.1);
    for bad in [0.0, -1.0, f64::NAN, f64::INFINITY, 1e-300, 1e300] {
        assert_eq!(readable_step(bad, StepRounding::Nearest), None, "{bad}");
    }
}

#[test]
fn readable_step_multiples_are_the_nearest_doubles_to_decimals() {
    let tenth = readable_step(0.1, StepRounding::Nearest).unwrap();
    let fifth = readable_step(0.2, StepRounding::Nearest).unwrap();
    let quarter_milli = readable_step(0.00025, StepRounding::Nearest).unwrap();
    for k in -1000_i64..=1000 {
        assert_eq!(tenth.multiple(k), format!("{k}e-1").parse::<f64>().unwrap());
        assert_eq!(
            fifth.multiple(k),
            format!("{}e-1", 2 * k).parse::<f64>().unwrap()
        );
        assert_eq!(
            quarter_milli.multiple(k),
            format!("{}e-5", 25 * k).parse::<f64>().unwrap()
        );
    }
    assert_eq!(fifth.multiple(3), 0.6, "not 0.6000000000000001");
    assert_eq!(fifth.floor_index(0.6), Some(3));
    assert_eq!(fifth.ceil_index(0.6), Some(3));
    assert_eq!(fifth.floor_index(0.59), Some(2));
    assert_eq!(fifth.ceil_index(-0.59), Some(-2));
    assert_eq!(fifth.floor_index(1e300), None);
    assert_eq!(fifth.larger().value(), 0.25);
    assert_eq!(fifth.smaller().value(), 0.1);
    assert_eq!(tenth.smaller().value(), 0.05);
    assert_eq!(
        readable_step(5.0, StepRounding::Nearest)
            .unwrap()
            .larger()
            .value(),
        10.0
    );
}

#[test]
fn nice_ticks_cover_the_range_with_round_values() {
    let t = nice_ticks(0.0, 1.0, 5).unwrap();
    assert_eq!(t.values, vec![0.0, 0.25, 0.5, 0.75, 1.0]);
    // Step 25 gives exactly the 5 ticks asked for; step 20 would give 6.
    let t = nice_ticks(3.2, 97.0, 5).unwrap();
    assert_eq!(t.step.value(), 25.0);
    assert_eq!(t.values, vec![0.0, 25.0, 50.0, 75.0, 100.0]);
    let reversed = nice_ticks(97.0, 3.2, 5).unwrap();
    assert_eq!(reversed, t);
    for (lo, hi, n) in [
        (-0.37, 0.41, 6),
        (1e9, 1e9 + 7.0, 4),
        (-5e-6, -1e-6, 5),
        (0.0, 1e6, 8),
    ] {
        let t = nice_ticks(lo, hi, n).unwrap();
        assert!(
            t.values[0] <= lo && *t.values.last().unwrap() >= hi,
            "{lo}..{hi}"
        );
        assert!(
            t.values.len().abs_diff(n) <= 2,
            "{lo}..{hi}: {:?}",
            t.values
        );
        assert!(t.values.windows(2).all(|w| w[0] < w[1]));
    }
    let single = nice_ticks(3.0, 3.0, 5).unwrap();
    assert!(single.values.contains(&3.0) && single.values.len() >= 3);
    let zero = nice_ticks(0.0, 0.0, 5).unwrap();
    assert_eq!(zero.values, vec![-1.0, 0.0, 1.0]);
    assert_eq!(nice_ticks(f64::NAN, 1.0, 5), None);
    assert!(
        nice_ticks(0.0, 1.0, 0).is_some(),
        "a target of 0 is clamped to 2"
    );
}

// --- histogram -------------------------------------------------------------------------------

#[test]
fn histogram_by_hand() {
    // Sturges: n = 11, ⌈log2 11⌉ + 1 = 5, range 10 → width 2; the max lands in the closed last
    // bin.
    let values: Vec<f64> = (0..=10).map(f64::from).collect();
    let h = histogram(&values, BinRule::Sturges).unwrap();
    assert_eq!(h.raw_width, 2.0);
    assert_eq!(h.edges, vec![0.0, 2.0, 4.0, 6.0, 8.0, 10.0]);
    assert_eq!(h.counts, vec![2, 2, 2, 2, 3]);
    assert_eq!(h.percents().iter().sum::<f64>(), 100.0);
    let area: f64 = h.densities().iter().map(|d| d * h.width).sum();
    assert!(close(area, 1.0, 1e-15));
    // A fixed width is used as given; edges are multiples of it from ⌊min/w⌋ to ⌈max/w⌉.
    let h = histogram(&[0.25, 1.0, 2.0], BinRule::Width(1.0)).unwrap();
    assert_eq!((h.edges, h.counts), (vec![0.0, 1.0, 2.0], vec![1, 2]));
    // Rule widths give decimal edges exactly: width 0.1 → edges k/10.
    let h = histogram(&[0.31, 0.52, 0.77, 0.9, 1.04], BinRule::Count(7)).unwrap();
    assert_eq!(h.width, 0.1);
    for (k, edge) in (3..).zip(&h.edges) {
        assert_eq!(*edge, format!("{k}e-1").parse::<f64>().unwrap());
    }
    // So does a fixed decimal width, and a value written on an edge starts its bin: with width
    // 0.1, 0.3 and 0.7 are edges (3 × 0.1 in floating point is 0.30000000000000004, which would
    // put 0.3 in the bin below).
    let h = histogram(&[0.1, 0.3, 0.3, 0.7, 1.0], BinRule::Width(0.1)).unwrap();
    for (k, edge) in (1..).zip(&h.edges) {
        assert_eq!(*edge, format!("{k}e-1").parse::<f64>().unwrap());
    }
    assert_eq!(h.counts, vec![1, 0, 2, 0, 0, 0, 1, 0, 1]);
}

#[test]
fn histogram_degenerate_inputs() {
    assert_eq!(
        histogram(&[], BinRule::Sturges),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    // One value, or all equal: one bin a tenth of the magnitude wide (1 for zero).
    for rule in [
        BinRule::Sturges,
        BinRule::Scott,
        BinRule::FreedmanDiaconis,
        BinRule::Count(4),
    ] {
        let h = histogram(&[5.0], rule).unwrap();
        assert_eq!(
            (h.edges.clone(), h.counts.clone()),
            (vec![5.0, 5.5], vec![1]),
            "{rule:?}"
        );
        let z = histogram(&[0.0; 3], rule).unwrap();
        assert_eq!((z.edges, z.counts), (vec![0.0, 1.0], vec![3]), "{rule:?}");
        let neg = histogram(&[-1e6; 2], rule).unwrap();
        assert_eq!(
            (neg.edges, neg.counts),
            (vec![-1e6, -9e5], vec![2]),
            "{rule:?}"
        );
    }
    let on_edge = histogram(&[2.0, 2.0], BinRule::Width(1.0)).unwrap();
    assert_eq!((on_edge.edges, on_edge.counts), (vec![2.0, 3.0], vec![2]));
    // Freedman–Diaconis with zero IQR falls back to Scott's width.
    let flat = [1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 2.0, 9.0];
    let fd = histogram(&flat, BinRule::FreedmanDiaconis).unwrap();
    let scott = histogram(&flat, BinRule::Scott).unwrap();
    assert_eq!(fd, scott);
    assert_eq!(
        histogram(&[1.0, 2.0], BinRule::Count(0)),
        Err(StatError::InvalidBinCount)
    );
    assert_eq!(
        histogram(&[1.0], BinRule::Width(0.0)),
        Err(StatError::InvalidWidth(0.0))
    );
    assert_eq!(
        histogram(&[1.0], BinRule::Width(-1.0)),
        Err(StatError::InvalidWidth(-1.0))
    );
    assert!(histogram(&[1.0], BinRule::Width(f64::NAN)).is_err());
    assert_eq!(
        histogram(&[0.0, 1.0], BinRule::Width(1e-6)),
        Err(StatError::WidthTooFine { width: 1e-6 })
    );
    assert!(matches!(
        histogram(&[1e300, -1e300], BinRule::Width(1e-300)),
        Err(StatError::WidthTooFine { .. })
    ));
    // A huge outlier: the rule width is widened to stay within the bin limit.
    let mut spread: Vec<f64> = (0..100).map(|i| f64::from(i) * 0.01).collect();
    spread.push(1e9);
    let h = histogram(&spread, BinRule::FreedmanDiaconis).unwrap();
    assert!(h.counts.len() <= histogram::MAX_BINS);
    assert_eq!(h.counts.iter().sum::<u64>(), 101);
}

// Reference: the documented cap of 10 000 bins (language reference §9, "At most 10 000
// bins"), by hand. Values 0 and 9999 with about 9999 bins: width 1 gives edges 0..=9999, 9999
// bins, within the cap, so the width stays 1 (it used to be widened to 2 by a test against
// 9998). 0 and 10 000 with width 1 give exactly 10 000 bins, still allowed. 0.5 and 10 000.5
// with width 1 would need edges 0..=10 001, 10 001 bins: widened to the next readable step, 2.
#[test]
fn histogram_bin_cap_is_ten_thousand() {
    let h = histogram(&[0.0, 9999.0], BinRule::Count(9999)).unwrap();
    assert_eq!((h.width, h.counts.len()), (1.0, 9999));
    let h = histogram(&[0.0, 10_000.0], BinRule::Count(10_000)).unwrap();
    assert_eq!((h.width, h.counts.len()), (1.0, histogram::MAX_BINS));
    let h = histogram(&[0.5, 10_000.5], BinRule::Count(10_000)).unwrap();
    assert_eq!((h.width, h.counts.len()), (2.0, 5001));
    assert_eq!(h.counts.iter().sum::<u64>(), 2);
}

// Reference: the bin rule of the language reference §9 (half-open bins, the last closed), by
// hand on the grid 0, 10, …, 100.
#[test]
fn values_on_edges_fall_in_a_bin() {
    let grid: Vec<f64> = (0..=10).map(|k| f64::from(k) * 10.0).collect();
    // On the last edge: the last bin.
    assert_eq!(bin_of(100.0, &grid), Some(9));
    assert_eq!(count_in_bins(&[100.0, 100.0], &grid)[9], 2);
    // On an inner edge: the bin that starts there.
    assert_eq!(bin_of(20.0, &grid), Some(2));
    // Outside: the nearest end bin; no bins without two edges.
    assert_eq!(bin_of(-5.0, &grid), Some(0));
    assert_eq!(bin_of(1.0, &[0.0]), None);
    assert!(count_in_bins(&[1.0], &[0.0]).is_empty());
    // A group whose values all equal the grid's last edge (a ceiling) gets the last bin.
    assert_eq!(bins_covering(&grid, 100.0, 100.0), Some(&grid[9..=10]));
    assert_eq!(count_in_bins(&[100.0; 3], &grid[9..=10]), vec![3]);
    // A group whose largest value is on an inner edge gets the bin starting there.
    assert_eq!(bins_covering(&grid, 5.0, 20.0), Some(&grid[0..=3]));
    assert_eq!(bins_covering(&grid, 20.0, 10.0), None);
    assert_eq!(bins_covering(&[1.0], 1.0, 1.0), None);
}

// Reference: common practice (every value counted once): on a shared grid, each group's slice
// holds all its values, and its counts agree with the counts on the whole grid.
#[test]
fn every_group_value_falls_in_its_slice_of_a_shared_grid() {
    let groups: [&[f64]; 5] = [
        &[0.0, 3.0, 7.5],
        &[10.0, 10.0],
        &[42.0, 60.0, 60.0],
        &[60.0],
        &[0.0, 60.0],
    ];
    let all: Vec<f64> = groups.iter().flat_map(|g| g.iter().copied()).collect();
    let shared = histogram(&all, BinRule::Width(10.0)).unwrap().edges;
    for group in groups {
        let (min, max) = (group[0], group[group.len() - 1]);
        let slice = bins_covering(&shared, min, max).unwrap();
        let counts = count_in_bins(group, slice);
        assert_eq!(counts.iter().sum::<u64>(), group.len() as u64, "{group:?}");
        let first = bin_of(min, &shared).unwrap();
        let whole = count_in_bins(group, &shared);
        assert_eq!(
            &whole[first..first + counts.len()],
            &counts[..],
            "{group:?}"
        );
    }
}

// --- kernel density --------------------------------------------------------------------------

#[test]
fn density_degenerate_inputs() {
    assert_eq!(
        bandwidth(&[1.0], BandwidthRule::Silverman),
        Err(StatError::TooFewValues {
            needed: 2,
            found: 1
        })
    );
    assert_eq!(
        bandwidth(&[2.0; 5], BandwidthRule::Scott),
        Err(StatError::NoSpread)
    );
    assert_eq!(bandwidth(&[1.0], BandwidthRule::Fixed(0.5)), Ok(0.5));
    assert_eq!(
        bandwidth(&[1.0], BandwidthRule::Fixed(0.0)),
        Err(StatError::InvalidWidth(0.0))
    );
    assert_eq!(
        kde(&[], 1.0, &[0.0]),
        Err(StatError::TooFewValues {
            needed: 1,
            found: 0
        })
    );
    // One value with a fixed bandwidth: the standard normal density scaled by h (definition).
    let d = kde(&[0.0], 2.0, &[0.0]).unwrap();
    assert!(close(
        d[0],
        1.0 / (2.0 * (2.0 * std::f64::consts::PI).sqrt()),
        1e-15
    ));
    // Silverman with zero IQR uses the sd alone (Silverman 1986, eq. 3.31 needs a positive
    // spread).
    let flat = [1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 2.0, 9.0];
    let sd = sample_sd(&flat).unwrap();
    let h = bandwidth(&flat, BandwidthRule::Silverman).unwrap();
    assert!(close(h, 0.9 * sd * 10f64.powf(-0.2), 1e-15));
}

#[test]
fn density_curve_integrates_to_one() {
    // A density's area is 1 (definition); the trapezoid rule on a wide grid gets close.
    let values = [1.0, 2.0, 2.5, 4.0, 7.0];
    let grid = DensityGrid {
        points: 2001,
        reach: 8.0,
    };
    let curve = kernel_density(&values, BandwidthRule::Scott, grid).unwrap();
    let step = curve.x[1] - curve.x[0];
    let area: f64 = curve
        .density
        .windows(2)
        .map(|w| (w[0] + w[1]) / 2.0 * step)
        .sum();
    assert!(close(area, 1.0, 1e-9), "area {area}");
    assert_eq!(curve.x.len(), 2001);
    let bad = DensityGrid {
        points: 10,
        reach: -1.0,
    };
    assert!(kernel_density(&values, BandwidthRule::Scott, bad).is_err());
    let few = DensityGrid {
        points: 0,
        reach: 3.0,
    };
    assert_eq!(
        kernel_density(&values, BandwidthRule::Scott, few)
            .unwrap()
            .x
            .len(),
        2
    );
}

// Reference: Silverman (1986) §2.10: the reflected estimate of non-negative data keeps its
// area 1 on [0, ∞) (trapezoid rule), is 0 below zero, and at 0 is twice the plain estimate
// (f̂₀(0) + f̂₀(−0)); values below zero are refused.
#[test]
fn reflected_density_integrates_to_one_on_the_half_line() {
    let values = [0.0, 0.1, 0.2, 0.5, 1.0, 3.0];
    let grid = DensityGrid {
        points: 4001,
        reach: 8.0,
    };
    let curve = kernel_density_bounded(
        &values,
        BandwidthRule::Silverman,
        grid,
        Boundary::ReflectAtZero,
    )
    .unwrap();
    assert_eq!(curve.x[0], 0.0, "the grid starts at the boundary");
    let step = curve.x[1] - curve.x[0];
    let area: f64 = curve
        .density
        .windows(2)
        .map(|w| (w[0] + w[1]) / 2.0 * step)
        .sum();
    assert!(close(area, 1.0, 1e-7), "area {area}");
    let h = curve.bandwidth;
    let plain = kde(&values, h, &[0.0]).unwrap()[0];
    let at = |x: f64| kde_bounded(&values, h, &[x], Boundary::ReflectAtZero).unwrap()[0];
    assert!(close(at(0.0), 2.0 * plain, 1e-15));
    assert_eq!(at(-0.1), 0.0);
    assert_eq!(
        kde_bounded(&[1.0, -0.5], 1.0, &[0.0], Boundary::ReflectAtZero),
        Err(StatError::Negative)
    );
    // Far from zero the reflection adds nothing visible: the plain estimate.
    let far = [100.0, 101.0, 102.0];
    let reflected = kde_bounded(&far, 0.5, &[101.0], Boundary::ReflectAtZero).unwrap();
    assert_eq!(reflected, kde(&far, 0.5, &[101.0]).unwrap());
}

// --- least squares ---------------------------------------------------------------------------

#[test]
fn least_squares_degenerate_inputs() {
    assert_eq!(
        linear_fit(&[1.0, 2.0], &[1.0]),
        Err(StatError::LengthMismatch { left: 2, right: 1 })
    );
    assert_eq!(
        linear_fit(&[3.0, 3.0, 3.0], &[1.0, 2.0, 3.0]),
        Err(StatError::NoSpread)
    );
    assert_eq!(
        linear_fit(&[1.0], &[1.0]),
        Err(StatError::TooFewValues {
            needed: 2,
            found: 1
        })
    );
    // Two points: the line through them, no residual sd, no band.
    let two = linear_fit(&[0.0, 2.0], &[1.0, 5.0]).unwrap();
    assert_eq!(
        (two.slope, two.intercept, two.residual_sd),
        (2.0, 1.0, None)
    );
    assert!(two.mean_band(1.0, 0.95).is_err());
    // Constant y: slope 0, r undefined.
    let flat = linear_fit(&[1.0, 2.0, 3.0], &[4.0, 4.0, 4.0]).unwrap();
    assert_eq!(
        (flat.slope, flat.r, flat.residual_sd),
        (0.0, None, Some(0.0))
    );
    let band = flat.mean_band(2.0, 0.95).unwrap();
    assert_eq!((band.low, band.fit, band.high), (4.0, 4.0, 4.0));
    assert_eq!(flat.mean_band(2.0, 1.5), Err(StatError::InvalidLevel(1.5)));
    // An exact line: y = 3x − 2 (by hand).
    let exact = linear_fit(&[1.0, 2.0, 3.0, 4.0], &[1.0, 4.0, 7.0, 10.0]).unwrap();
    assert_eq!(
        (exact.slope, exact.intercept, exact.r),
        (3.0, -2.0, Some(1.0))
    );
    assert_eq!(exact.predict(10.0), 28.0);
}

// --- bootstrap, generator, jitter ------------------------------------------------------------

#[test]
fn bootstrap_is_deterministic_and_rejects_degenerate_inputs() {
    let values = [2.1, 3.4, 1.9, 5.6, 4.4, 3.3, 2.8];
    let a = bootstrap_mean(&values, 0.95).unwrap();
    let b = bootstrap_mean(&values, 0.95).unwrap();
    assert_eq!(a, b);
    assert!(a.low < a.estimate && a.estimate < a.high);
    let m = bootstrap_median(&values, 0.9).unwrap();
    assert_eq!(m.estimate, 3.3);
    assert_eq!(
        bootstrap_mean(&[1.0], 0.95),
        Err(StatError::TooFewValues {
            needed: 2,
            found: 1
        })
    );
    assert_eq!(
        bootstrap_mean(&values, 1.0),
        Err(StatError::InvalidLevel(1.0))
    );
    let none = BootstrapSettings {
        resamples: 0,
        seed: 1,
    };
    assert!(bootstrap_interval(&values, BootstrapStatistic::Mean, 0.9, none).is_err());
    let flat = bootstrap_median(&[4.0; 6], 0.95).unwrap();
    assert_eq!((flat.low, flat.estimate, flat.high), (4.0, 4.0, 4.0));
    assert_eq!(
        BootstrapSettings::default().resamples,
        bootstrap::DEFAULT_RESAMPLES
    );
}

#[test]
fn generator_edges() {
    let mut rng = random::Xoshiro256StarStar::seed_from(0);
    assert_eq!(rng.below(0), 0);
    assert!((0..1000).all(|_| rng.below(1) == 0));
    assert!((0..1000).all(|_| rng.below(7) < 7));
}

#[test]
fn jitter_is_deterministic_and_in_range() {
    let offsets: Vec<f64> = (0..10_000).map(|i| jitter_offset(42, i)).collect();
    assert!(offsets.iter().all(|o| (-0.5..0.5).contains(o)));
    assert_eq!(
        offsets,
        (0..10_000)
            .map(|i| jitter_offset(42, i))
            .collect::<Vec<_>>()
    );
    assert_ne!(jitter_offset(42, 0), jitter_offset(43, 0));
    // Roughly uniform: the mean offset is near zero (common practice check).
    let mean_offset = offsets.iter().sum::<f64>() / offsets.len() as f64;
    assert!(mean_offset.abs() < 0.02, "{mean_offset}");
}
