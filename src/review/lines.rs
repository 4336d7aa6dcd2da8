//! A line diff of two texts (longest common subsequence), grouped into hunks with context.
//!
//! Lines common to both ends are set aside first, so the quadratic table covers only the part
//! that changed; when even that part is larger than [`MAX_CELLS`], it is shown as removed and
//! added as a whole rather than aligned.

/// The largest table (old lines × new lines of the changed middle) aligned line by line.
pub const MAX_CELLS: usize = 4_000_000;

/// One line of a diff.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Op<'a> {
    Same(&'a str),
    Removed(&'a str),
    Added(&'a str),
}

impl Op<'_> {
    fn is_same(&self) -> bool {
        matches!(self, Op::Same(_))
    }
}

/// Every line of both texts, in order, as kept, removed or added.
pub fn diff<'a>(old: &'a str, new: &'a str) -> Vec<Op<'a>> {
    let a: Vec<&str> = old.lines().collect();
    let b: Vec<&str> = new.lines().collect();
    let prefix = a.iter().zip(&b).take_while(|(x, y)| x == y).count();
    let suffix = a[prefix..]
        .iter()
        .rev()
        .zip(b[prefix..].iter().rev())
        .take_while(|(x, y)| x == y)
        .count();
    let mut ops: Vec<Op> = a[..prefix].iter().map(|l| Op::Same(l)).collect();
    ops.extend(middle(
        &a[prefix..a.len() - suffix],
        &b[prefix..b.len() - suffix],
    ));
    ops.extend(a[a.len() - suffix..].iter().map(|l| Op::Same(l)));
    ops
}

/// The alignment of two runs of lines that share no first or last line.
fn middle<'a>(a: &[&'a str], b: &[&'a str]) -> Vec<Op<'a>> {
    let (n, m) = (a.len(), b.len());
    if n.saturating_mul(m) > MAX_CELLS {
        let mut ops: Vec<Op> = a.iter().map(|l| Op::Removed(l)).collect();
        ops.extend(b.iter().map(|l| Op::Added(l)));
        return ops;
    }
    // lcs[i][j]: the longest common subsequence of a[i..] and b[j..].
    let width = m + 1;
    let mut lcs = vec![0u32; (n + 1) * width];
    for i in (0..n).rev() {
        for j in (0..m).rev() {
            lcs[i * width + j] = if a[i] == b[j] {
                lcs[(i + 1) * width + j + 1] + 1
            } else {
                lcs[(i + 1) * width + j].max(lcs[i * width + j + 1])
            };
        }
    }
    let (mut i, mut j) = (0, 0);
    let mut ops = Vec::with_capacity(n + m);
    while i < n || j < m {
        if i < n && j < m && a[i] == b[j] {
            ops.push(Op::Same(a[i]));
            i += 1;
            j += 1;
        } else if i < n && (j == m || lcs[(i + 1) * width + j] >= lcs[i * width + j + 1]) {
            // On a tie the old line goes first, so a replaced line reads `-` then `+`.
            ops.push(Op::Removed(a[i]));
            i += 1;
        } else {
            ops.push(Op::Added(b[j]));
            j += 1;
        }
    }
    ops
}

/// A run of diff lines with its line numbers: where it starts in the old and new text
/// (1-based).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Hunk<'a> {
    pub old_start: usize,
    pub new_start: usize,
    pub ops: Vec<Op<'a>>,
}

/// The changed lines with `context` unchanged lines around each; nearby changes share a hunk.
pub fn hunks<'a>(ops: &[Op<'a>], context: usize) -> Vec<Hunk<'a>> {
    let changed: Vec<usize> = (0..ops.len()).filter(|&i| !ops[i].is_same()).collect();
    let mut ranges: Vec<(usize, usize)> = Vec::new();
    for &i in &changed {
        let start = i.saturating_sub(context);
        let end = (i + context + 1).min(ops.len());
        match ranges.last_mut() {
            Some(last) if start <= last.1 => last.1 = end,
            _ => ranges.push((start, end)),
        }
    }
    ranges
        .into_iter()
        .map(|(start, end)| {
            let before = &ops[..start];
            let old_start = 1 + before.iter().filter(|o| !matches!(o, Op::Added(_))).count();
            let new_start = 1 + before
                .iter()
                .filter(|o| !matches!(o, Op::Removed(_)))
                .count();
            Hunk {
                old_start,
                new_start,
                ops: ops[start..end].to_vec(),
            }
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
        let ops = diff(old, new);
        assert_eq!(ops.iter().filter(|o| o.is_same()).count(), 6);
        let hs = hunks(&ops, 1);
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
        // The classic example of Myers (1986): ABCABBA → CBABAC keeps 4 lines.
        let old = "A\nB\nC\nA\nB\nB\nA";
        let new = "C\nB\nA\nB\nA\nC";
        let ops = diff(old, new);
        assert_eq!(ops.iter().filter(|o| o.is_same()).count(), 4);
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
        assert!(hunks(&diff("x\ny\n", "x\ny\n"), 3).is_empty());
    }
}
