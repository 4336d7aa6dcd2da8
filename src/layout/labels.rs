//! Labels along an axis: how the labels of categories and the n row fit their bands.
//!
//! Category labels try, in order, and take the first arrangement in which no two labels come
//! closer than [`TEXT_GAP_MM`]: one line at 7 pt; wrapped onto two lines; staggered over two
//! rows; the same at 6 pt; upright; and, on an ordered axis only, every k-th label (the others
//! keep their tick). An unordered axis is never thinned (a missing name cannot be guessed), so
//! when nothing fits, the figure is too narrow: the caller reports it.
//!
//! Positions here are relative to the panel's left edge; every panel of a figure shares one
//! arrangement.

use crate::scene::TextStyle;

use super::style::*;
use super::text;

/// How a set of labels is set under its ticks.
#[derive(Debug, Clone, PartialEq)]
pub enum Arrangement {
    /// One row, each label on one or more lines under its tick.
    Rows,
    /// Alternate labels on two rows (one line each).
    Staggered,
    /// Labels turned to read upwards, hanging from their ticks (a label's lines side by side,
    /// the first on the left).
    Upright,
}

/// The labels of a categorical axis, as they will be set.
#[derive(Debug, Clone)]
pub struct CategoryLabels {
    pub style: TextStyle,
    pub arrangement: Arrangement,
    /// Each label's lines (one line unless wrapped).
    pub lines: Vec<Vec<String>>,
    /// Which labels are drawn (all, unless an ordered axis is thinned).
    pub shown: Vec<bool>,
    /// Height they take below the ticks.
    pub height: f64,
}

/// Places `count` bands across `width`: the centre of band `i`.
pub fn band_centre(width: f64, count: usize, i: usize) -> f64 {
    width / count.max(1) as f64 * (i as f64 + 0.5)
}

/// Whether labels centred at `centres` with `widths` keep [`TEXT_GAP_MM`] apart from their
/// neighbours in the same row when alternate labels share a row (`rows` = 1 or 2), and stay
/// within `[lo, hi]`.
pub fn rows_fit(centres: &[f64], widths: &[f64], rows: usize, lo: f64, hi: f64) -> bool {
    let inside = centres
        .iter()
        .zip(widths)
        .all(|(c, w)| c - w / 2.0 >= lo && c + w / 2.0 <= hi);
    let apart = (rows..centres.len()).all(|i| {
        let j = i - rows;
        centres[i] - widths[i] / 2.0 >= centres[j] + widths[j] / 2.0 + TEXT_GAP_MM
    });
    inside && apart
}

/// Chooses how the labels of `count` categories fit a panel `panel_w` wide; `None` when no
/// arrangement fits. `ordered`: the levels have an order, so some labels may be left out.
pub fn fit_categories(labels: &[String], panel_w: f64, ordered: bool) -> Option<CategoryLabels> {
    let n = labels.len().max(1);
    let band = panel_w / n as f64;
    let centres: Vec<f64> = (0..labels.len())
        .map(|i| band_centre(panel_w, n, i))
        .collect();
    // Labels may reach a little beyond the panel's edges, into the gap beside it.
    let (lo, hi) = (-PANEL_GAP_MM / 2.0, panel_w + PANEL_GAP_MM / 2.0);
    let all = vec![true; labels.len()];
    for style in [tick_label(), small_tick_label()] {
        let lh = text::line_height(&style);
        let one_line: Vec<Vec<String>> = labels.iter().map(|l| vec![l.clone()]).collect();
        let widths: Vec<f64> = labels.iter().map(|l| text::width(l, &style)).collect();
        if rows_fit(&centres, &widths, 1, lo, hi) {
            return Some(set(style, Arrangement::Rows, one_line, all, lh));
        }
        let wrapped: Vec<Vec<String>> = labels
            .iter()
            .map(|l| text::wrap(l, &style, band - TEXT_GAP_MM))
            .collect();
        let wrapped_widths: Vec<f64> = wrapped.iter().map(|l| text::widest(l, &style)).collect();
        let most_lines = wrapped.iter().map(Vec::len).max().unwrap_or(1);
        if most_lines <= MAX_LABEL_LINES && rows_fit(&centres, &wrapped_widths, 1, lo, hi) {
            let height = most_lines as f64 * lh;
            return Some(set(style, Arrangement::Rows, wrapped, all, height));
        }
        if rows_fit(&centres, &widths, 2, lo, hi) {
            return Some(set(style, Arrangement::Staggered, one_line, all, 2.0 * lh));
        }
    }
    let style = small_tick_label();
    let lh = text::line_height(&style);
    let one_line: Vec<Vec<String>> = labels.iter().map(|l| vec![l.clone()]).collect();
    let longest = labels
        .iter()
        .map(|l| text::width(l, &style))
        .fold(0.0, f64::max);
    // Upright on two lines when the band holds two, so the labels take half the height.
    if band >= 2.0 * lh + UPRIGHT_GAP_MM {
        let longest_word = labels
            .iter()
            .flat_map(|l| l.split_whitespace())
            .map(|w| text::width(w, &style))
            .fold(0.0, f64::max);
        // The narrowest width at which every label takes at most two lines.
        let two_lines = |w: f64| {
            labels
                .iter()
                .all(|l| text::wrap(l, &style, w).len() <= MAX_LABEL_LINES)
        };
        let (mut lo, mut hi) = ((longest / 2.0).max(longest_word), longest);
        if two_lines(lo) {
            hi = lo;
        }
        while hi - lo > 0.2 {
            let mid = (lo + hi) / 2.0;
            if two_lines(mid) {
                hi = mid;
            } else {
                lo = mid;
            }
        }
        let wrapped: Vec<Vec<String>> = labels.iter().map(|l| text::wrap(l, &style, hi)).collect();
        let height = wrapped
            .iter()
            .map(|l| text::widest(l, &style))
            .fold(0.0, f64::max);
        if height < longest - TEXT_GAP_MM {
            return Some(set(style, Arrangement::Upright, wrapped, all, height));
        }
    }
    if band >= lh + UPRIGHT_GAP_MM {
        return Some(set(style, Arrangement::Upright, one_line, all, longest));
    }
    if !ordered {
        return None;
    }
    // An ordered axis keeps every k-th label, upright, counting from the first.
    let every = ((lh + UPRIGHT_GAP_MM) / band).ceil().max(2.0) as usize;
    let shown = (0..labels.len()).map(|i| i % every == 0).collect();
    Some(set(style, Arrangement::Upright, one_line, shown, longest))
}

fn set(
    style: TextStyle,
    arrangement: Arrangement,
    lines: Vec<Vec<String>>,
    shown: Vec<bool>,
    height: f64,
) -> CategoryLabels {
    CategoryLabels {
        style,
        arrangement,
        lines,
        shown,
        height,
    }
}

/// The n under a panel's categories, as set: one number per category on one line (staggered
/// over two when they crowd) when the colour groups agree; else the groups' numbers joined
/// (`24/23`, in the legend's order) when that fits one line, else one line per colour group.
#[derive(Debug, Clone)]
pub struct NRow {
    pub items: Vec<NItem>,
    /// Lines of numbers: one, two when staggered, or one per colour group.
    pub lines: usize,
    /// Each line is a colour group's (its heading shows the group's colour).
    pub per_group: bool,
    pub height: f64,
}

/// One number of the n row: its centre (relative to the panel) and line.
#[derive(Debug, Clone, PartialEq)]
pub struct NItem {
    pub centre: f64,
    pub text: String,
    pub line: usize,
}

/// Whether every category's colour groups have the same n.
pub fn groups_agree(n_by_x: &[Vec<usize>]) -> bool {
    n_by_x.iter().all(|c| c.windows(2).all(|w| w[0] == w[1]))
}

/// Sets the n row of one panel `panel_w` wide; `None` when the numbers crowd even staggered
/// (or, one line per group, when a group's numbers crowd). Colour groups whose n differ get a
/// line each, or with `compact` their numbers joined under each category when that fits.
pub fn fit_n_row(n_by_x: &[Vec<usize>], panel_w: f64, compact: bool) -> Option<NRow> {
    let style = n_label();
    let lh = text::line_height(&style);
    let n = n_by_x.len();
    let (lo, hi) = (-PANEL_GAP_MM / 2.0, panel_w + PANEL_GAP_MM / 2.0);
    let centres: Vec<f64> = (0..n).map(|x| band_centre(panel_w, n, x)).collect();
    let fits = |texts: &[String], rows: usize| {
        let widths: Vec<f64> = texts.iter().map(|t| text::width(t, &style)).collect();
        rows_fit(&centres, &widths, rows, lo, hi)
    };
    if groups_agree(n_by_x) {
        let texts: Vec<String> = n_by_x
            .iter()
            .map(|c| c.first().copied().unwrap_or(0).to_string())
            .collect();
        let rows = (1..=2).find(|&rows| fits(&texts, rows))?;
        let items = texts
            .into_iter()
            .enumerate()
            .map(|(x, text)| NItem {
                centre: centres[x],
                text,
                line: x % rows,
            })
            .collect();
        return Some(NRow {
            items,
            lines: rows,
            per_group: false,
            height: rows as f64 * lh,
        });
    }
    // The groups' numbers joined under each category ("24/23"), in the legend's order, when
    // asked and they fit one row; else a line per group, headed by the group's colour.
    let joined: Vec<String> = n_by_x
        .iter()
        .map(|c| c.iter().map(usize::to_string).collect::<Vec<_>>().join("/"))
        .collect();
    if compact && fits(&joined, 1) {
        let items = joined
            .into_iter()
            .enumerate()
            .map(|(x, text)| NItem {
                centre: centres[x],
                text,
                line: 0,
            })
            .collect();
        return Some(NRow {
            items,
            lines: 1,
            per_group: false,
            height: lh,
        });
    }
    let groups = n_by_x.first().map_or(0, Vec::len);
    let mut items = Vec::new();
    for g in 0..groups {
        let texts: Vec<String> = n_by_x.iter().map(|c| c[g].to_string()).collect();
        if !fits(&texts, 1) {
            return None;
        }
        items.extend(texts.into_iter().enumerate().map(|(x, text)| NItem {
            centre: centres[x],
            text,
            line: g,
        }));
    }
    Some(NRow {
        items,
        lines: groups,
        per_group: true,
        height: groups as f64 * lh,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(list: &[&str]) -> Vec<String> {
        list.iter().map(|s| s.to_string()).collect()
    }

    #[test]
    fn short_labels_stay_on_one_line() {
        let c = fit_categories(&names(&["Paper", "Screen"]), 60.0, false).unwrap();
        assert_eq!(c.arrangement, Arrangement::Rows);
        assert!(c.lines.iter().all(|l| l.len() == 1));
        assert_eq!(c.style.size_pt, 7.0);
    }

    #[test]
    fn long_labels_wrap_then_stagger_then_turn() {
        let long = names(&[
            "Very dissatisfied",
            "Dissatisfied",
            "Neither satisfied nor dissatisfied",
            "Satisfied",
            "Very satisfied",
        ]);
        let wrapped = fit_categories(&long, 120.0, true).unwrap();
        assert_eq!(wrapped.arrangement, Arrangement::Rows);
        assert!(wrapped.lines.iter().any(|l| l.len() == 2));
        let narrow = fit_categories(&long, 30.0, true).unwrap();
        assert_eq!(narrow.arrangement, Arrangement::Upright);
    }

    #[test]
    fn crowded_unordered_labels_are_refused_and_ordered_ones_thinned() {
        let many: Vec<String> = (1..=60).map(|i| format!("level {i}")).collect();
        assert!(fit_categories(&many, 40.0, false).is_none());
        let thinned = fit_categories(&many, 40.0, true).unwrap();
        assert!(thinned.shown.iter().filter(|s| **s).count() < 60);
        assert!(thinned.shown[0]);
    }

    #[test]
    fn wide_numbers_stagger() {
        let row = fit_n_row(&vec![vec![2046]; 10], 40.0, false).unwrap();
        assert_eq!(row.lines, 2);
        assert!(fit_n_row(&vec![vec![2046]; 40], 40.0, false).is_none());
    }

    #[test]
    fn groups_that_differ_are_joined_or_get_a_line_each() {
        let n = [vec![24, 23], vec![24, 24]];
        let joined = fit_n_row(&n, 60.0, true).unwrap();
        assert!(!joined.per_group);
        assert_eq!(joined.items[0].text, "24/23");
        assert!(fit_n_row(&n, 60.0, false).unwrap().per_group);
        let n = vec![vec![2046, 2047, 2048]; 6];
        let row = fit_n_row(&n, 60.0, true).unwrap();
        assert!(row.per_group);
        assert_eq!(row.lines, 3);
        assert_eq!(row.items.len(), 18);
        let same = fit_n_row(&[vec![24, 24], vec![23, 23]], 60.0, false).unwrap();
        assert!(!same.per_group && same.items.len() == 2);
    }
}
