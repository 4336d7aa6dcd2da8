//! Where each comment and blank line of a file goes in the canonical layout.
//!
//! The syntax tree keeps comments beside the nodes (`SpecFile::comments`, with spans); this
//! module attaches each one to a node of a sequence (the items of a file, or the statements of
//! a block):
//! - a comment alone on its line leads the next node (or, with no node after it, stays at the
//!   end of the sequence);
//! - a comment after code on its line trails the node that ends on that line (or, on the line
//!   of a block's `{`, trails the block header);
//! - a comment inside a node that spans several lines (an argument list or a parenthesised
//!   filter written over several lines) moves above that node, in order, since the node is
//!   printed on one line.
//!
//! One blank line is kept wherever the source had one or more between two things; runs of
//! blank lines collapse to one.
//!
//! Invariant: every comment given to [`place`] is placed exactly once.

use crate::diag::Span;
use crate::syntax::ast::Comment;

/// Line starts of a text, to find the line of a byte offset.
pub struct Lines<'t> {
    text: &'t str,
    starts: Vec<usize>,
}

impl<'t> Lines<'t> {
    pub fn new(text: &'t str) -> Self {
        let mut starts = vec![0];
        starts.extend(text.match_indices('\n').map(|(i, _)| i + 1));
        Lines { text, starts }
    }

    /// The 0-based line of a byte offset (a `\n` belongs to the line it ends).
    pub fn line_of(&self, pos: usize) -> usize {
        self.starts.partition_point(|&s| s <= pos).saturating_sub(1)
    }

    /// Whether only blanks, `;` or a byte-order mark come before `pos` on its line.
    fn starts_line(&self, pos: usize) -> bool {
        let start = self.starts[self.line_of(pos)];
        self.text[start..pos]
            .chars()
            .all(|c| c.is_whitespace() || c == ';' || c == '\u{FEFF}')
    }

    /// Whether at least one blank line separates something ending at `end` from something
    /// starting at `start` (only blanks and `;` can lie between them).
    fn blank_between(&self, end: usize, start: usize) -> bool {
        self.line_of(start) >= self.line_of(end) + 2
    }
}

/// A comment on a line of its own in the output.
#[derive(Debug, Clone, PartialEq)]
pub struct CommentLine {
    pub text: String,
    /// A blank line comes before it.
    pub blank_before: bool,
}

/// The comments and blank lines around one node of a sequence.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Around {
    /// Comments on their own lines above the node.
    pub leading: Vec<CommentLine>,
    /// A blank line between the leading comments (or the previous node) and the node.
    pub blank_before: bool,
    /// Comments that were inside the node, printed just above it.
    pub inner: Vec<String>,
    /// The comment after the node on its line.
    pub trailing: Option<String>,
}

impl Around {
    /// Whether the first line of this node's group follows a blank line.
    pub fn starts_after_blank(&self) -> bool {
        self.leading
            .first()
            .map_or(self.blank_before, |c| c.blank_before)
    }
}

/// The placement of a sequence's comments.
#[derive(Debug, Default)]
pub struct Placed<'c> {
    /// One per node, in order.
    pub around: Vec<Around>,
    /// Comments after the last node.
    pub dangling: Vec<CommentLine>,
    /// The comment on the header line of the block holding the sequence.
    pub header: Option<String>,
    /// Comments inside each node, for nodes that hold sequences of their own (blocks).
    pub inside: Vec<Vec<&'c Comment>>,
}

/// A node's own-line comment text: the comment as written, without trailing blanks.
fn comment_text(c: &Comment) -> String {
    c.text.trim_end().to_owned()
}

/// Places `comments` (in source order) around the nodes with `spans` (in source order).
/// `header_line` is the line of the enclosing block's `{`, if any.
pub fn place<'c>(
    lines: &Lines,
    spans: &[Span],
    comments: &[&'c Comment],
    header_line: Option<usize>,
) -> Placed<'c> {
    let mut placed = Placed {
        around: vec![Around::default(); spans.len()],
        inside: vec![Vec::new(); spans.len()],
        ..Placed::default()
    };
    let mut pending: Vec<CommentLine> = Vec::new();
    // The end of the last thing placed, and the node it belonged to (when it was a node).
    let mut prev_end: Option<usize> = None;
    let mut last_node: Option<usize> = None;
    let mut next_node = 0;
    let mut comments = comments.iter().copied().peekable();
    loop {
        let comment_first = match (comments.peek(), spans.get(next_node)) {
            (Some(c), Some(s)) => c.span.start < s.start,
            (Some(_), None) => true,
            (None, Some(_)) => false,
            (None, None) => break,
        };
        if !comment_first {
            let span = spans[next_node];
            // Comments inside this node.
            while let Some(c) = comments.next_if(|c| c.span.start < span.end) {
                placed.inside[next_node].push(c);
            }
            let around = &mut placed.around[next_node];
            around.leading = std::mem::take(&mut pending);
            around.blank_before = prev_end.is_some_and(|e| lines.blank_between(e, span.start));
            prev_end = Some(span.end);
            last_node = Some(next_node);
            next_node += 1;
            continue;
        }
        let Some(c) = comments.next() else { break };
        let line = lines.line_of(c.span.start);
        let text = comment_text(c);
        if !lines.starts_line(c.span.start) {
            let trails_node = last_node
                .filter(|_| prev_end.is_some_and(|e| lines.line_of(e) == line))
                .filter(|&n| placed.around[n].trailing.is_none());
            if let Some(n) = trails_node {
                placed.around[n].trailing = Some(text);
                prev_end = Some(c.span.end);
                continue;
            }
            if header_line == Some(line) && prev_end.is_none() && placed.header.is_none() {
                placed.header = Some(text);
                continue;
            }
        }
        pending.push(CommentLine {
            text,
            blank_before: prev_end.is_some_and(|e| lines.blank_between(e, c.span.start)),
        });
        prev_end = Some(c.span.end);
        last_node = None;
    }
    placed.dangling = pending;
    placed
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diag::SourceId;

    fn comment(text: &str, at: &str) -> Comment {
        let start = text.find(at).unwrap();
        let end = start + text[start..].find('\n').unwrap_or(text.len() - start);
        Comment {
            text: text[start..end].to_owned(),
            span: Span::new(SourceId(0), start, end),
        }
    }

    fn span(text: &str, at: &str, len: usize) -> Span {
        let start = text.find(at).unwrap();
        Span::new(SourceId(0), start, start + len)
    }

    #[test]
    fn comments_lead_trail_and_dangle() {
        let text = "# one\n\n# two\nx a  # three\n\n\ny b\n# four\n";
        let spans = [span(text, "x a", 3), span(text, "y b", 3)];
        let cs = [
            comment(text, "# one"),
            comment(text, "# two"),
            comment(text, "# three"),
            comment(text, "# four"),
        ];
        let refs: Vec<&Comment> = cs.iter().collect();
        let placed = place(&Lines::new(text), &spans, &refs, None);
        assert_eq!(
            placed.around[0].leading,
            vec![
                CommentLine {
                    text: "# one".into(),
                    blank_before: false
                },
                CommentLine {
                    text: "# two".into(),
                    blank_before: true
                },
            ]
        );
        assert!(!placed.around[0].blank_before);
        assert_eq!(placed.around[0].trailing.as_deref(), Some("# three"));
        assert!(placed.around[1].blank_before);
        assert_eq!(placed.dangling.len(), 1);
        assert!(!placed.dangling[0].blank_before);
    }

    #[test]
    fn header_and_inside_comments() {
        let text = "{  # head\n  levels(\"a\",  # inside\n  )\n}";
        let spans = [Span::new(
            SourceId(0),
            text.find("levels").unwrap(),
            text.find(")").unwrap() + 1,
        )];
        let cs = [comment(text, "# head"), comment(text, "# inside")];
        let refs: Vec<&Comment> = cs.iter().collect();
        let placed = place(&Lines::new(text), &spans, &refs, Some(0));
        assert_eq!(placed.header.as_deref(), Some("# head"));
        assert_eq!(placed.inside[0].len(), 1);
        assert!(placed.dangling.is_empty());
    }
}
