//! A line diff of two texts (`similar`'s Myers diff), grouped into hunks with context.
//!
//! The diff gives up aligning after [`DEADLINE`] (then what is left is shown as removed and
//! added as a whole), so a huge changed data file cannot stall a review.

use std::time::{Duration, Instant};

use similar::{capture_diff_slices_deadline, group_diff_ops, Algorithm, DiffTag};

/// How long the alignment of one file may take.
pub const DEADLINE: Duration = Duration::from_secs(2);

/// One line of a diff, without its line break.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Op<'a> {
    Same(&'a str),
    Removed(&'a str),
    Added(&'a str),
}

/// A run of diff lines with its line numbers: where it starts in the old and new text
/// (1-based).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Hunk<'a> {
    pub old_start: usize,
    pub new_start: usize,
    pub ops: Vec<Op<'a>>,
}

/// The changed lines of `old` → `new` with `context` unchanged lines around each; nearby
/// changes share a hunk. A replaced line reads as removed, then added.
pub fn hunks<'a>(old: &'a str, new: &'a str, context: usize) -> Vec<Hunk<'a>> {
    let a: Vec<&str> = old.lines().collect();
    let b: Vec<&str> = new.lines().collect();
    let deadline = Instant::now() + DEADLINE;
    let ops = capture_diff_slices_deadline(Algorithm::Myers, &a, &b, Some(deadline));
    group_diff_ops(ops, context)
        .iter()
        .filter_map(|group| {
            let first = group.first()?;
            let mut lines = Vec::new();
            for op in group {
                let (tag, old_range, new_range) = op.as_tag_tuple();
                match tag {
                    DiffTag::Equal => lines.extend(a[old_range].iter().map(|l| Op::Same(l))),
                    DiffTag::Delete => lines.extend(a[old_range].iter().map(|l| Op::Removed(l))),
                    DiffTag::Insert => lines.extend(b[new_range].iter().map(|l| Op::Added(l))),
                    DiffTag::Replace => {
                        lines.extend(a[old_range].iter().map(|l| Op::Removed(l)));
                        lines.extend(b[new_range].iter().map(|l| Op::Added(l)));
                    }
                }
            }
            Some(Hunk {
                old_start: first.old_range().start + 1,
                new_start: first.new_range().start + 1,
                ops: lines,
            })
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn one_changed_line_among_many() {
        let old = "a\nb\nc\nd\ne\nf\ng\n";
        let new = "a\nb\nc\nD\ne\nf\ng\nh\n";
        let hs = hunks(old, new, 1);
        assert_eq!(hs.len(), 2);
        assert_eq!(
            hs[0].ops,
            vec![
                Op::Same("c"),
                Op::Removed("d"),
                Op::Added("D"),
                Op::Same("e")
            ]
        );
        assert_eq!((hs[0].old_start, hs[0].new_start), (3, 3));
        assert_eq!(hs[1].ops, vec![Op::Same("g"), Op::Added("h")]);
        assert_eq!((hs[1].old_start, hs[1].new_start), (7, 7));
    }

    #[test]
    fn alignment_keeps_the_longest_common_run() {
        // The example of Myers (1986): ABCABBA → CBABAC keeps 4 lines.
        let old = "A\nB\nC\nA\nB\nB\nA";
        let new = "C\nB\nA\nB\nA\nC";
        let ops: Vec<Op> = hunks(old, new, 10)
            .into_iter()
            .flat_map(|h| h.ops)
            .collect();
        assert_eq!(ops.iter().filter(|o| matches!(o, Op::Same(_))).count(), 4);
        let rebuilt_new: Vec<&str> = ops
            .iter()
            .filter_map(|o| match o {
                Op::Same(l) | Op::Added(l) => Some(*l),
                Op::Removed(_) => None,
            })
            .collect();
        assert_eq!(rebuilt_new.join("\n"), new);
    }

    #[test]
    fn equal_texts_have_no_hunks() {
        assert!(hunks("x\ny\n", "x\ny\n", 3).is_empty());
    }
}
