//! The few lines of a source text that one diagnostic shows, cut to a readable width.
//!
//! Labels may sit anywhere in a text of any size: on line 90 000, past character 65 535 of a
//! line, or across a cell a million characters long. An [`Excerpt`] copies only the lines
//! around the labels (one line of context on each side, as the renderer asks for), cuts a line
//! longer than [`MAX_LINE_CHARS`] characters to windows around the labels' ends (`…` stands
//! for what is left out), and shows control characters as visible symbols. It implements
//! miette's [`SourceCode`] with the original line numbers and columns.
//!
//! Guarantees: what is printed for one diagnostic is bounded whatever the text (at most
//! [`MAX_LABELS`] labels, each line at most a few windows wide); building an excerpt takes
//! time proportional to the lines shown, not to the text (lines are found through the source's
//! line index); no byte of the source can move the terminal's cursor or change its colours;
//! every label's span lies inside the excerpt, so the renderer never sees an offset it cannot
//! place.

use std::collections::{BTreeMap, BTreeSet};
use std::ops::Range;

use miette::{MietteError, MietteSpanContents, SourceCode, SourceSpan, SpanContents};

use crate::diag::SourceFile;

/// Lines up to this many characters are shown whole.
pub const MAX_LINE_CHARS: usize = 160;

/// Characters shown on each side of a label's end in a line that is cut.
const WINDOW_CHARS: usize = 40;

/// Labels shown in the picture of one diagnostic; the rest are counted in a note.
pub const MAX_LABELS: usize = 16;

/// A label running over more lines than this is shown up to the end of its first line.
const MAX_LABEL_LINES: usize = 8;

/// Lines of context the renderer shows above and below a label.
pub const CONTEXT_LINES: usize = 1;

/// Stands for text left out of a cut line.
const ELLIPSIS: char = '…';

/// Lines of one source around some spans, ready for miette.
pub struct Excerpt {
    name: String,
    text: String,
    /// Stretches of consecutive original lines, in order; `text` is their concatenation.
    runs: Vec<Run>,
    /// The original 0-based character column of each mapped span start, by excerpt offset.
    columns: BTreeMap<usize, usize>,
}

/// Consecutive original lines, stored at `range` of the excerpt's text.
struct Run {
    range: Range<usize>,
    /// 0-based original line number of the run's first line.
    first_line: usize,
}

impl Excerpt {
    /// The excerpt of `file` that shows `spans` (byte ranges of its text), and each span
    /// mapped into the excerpt's text.
    pub fn new(
        name: String,
        file: &SourceFile,
        spans: &[Range<usize>],
    ) -> (Excerpt, Vec<Range<usize>>) {
        let spans: Vec<Range<usize>> = spans.iter().map(|s| clamp(file, s.clone())).collect();
        let shown = shown_lines(file, &spans);
        let endpoints: BTreeSet<usize> = spans.iter().flat_map(|s| [s.start, s.end]).collect();
        let mut builder = Builder {
            file,
            text: String::new(),
            runs: Vec::new(),
            mapped: BTreeMap::new(),
            run_is_empty: true,
            columns: endpoints.iter().map(|&o| column_of(file, o)).collect(),
        };
        let mut previous: Option<usize> = None;
        for &line in &shown {
            if previous.is_none_or(|p| p + 1 != line) {
                builder.start_run(line);
            }
            builder.line(line, &endpoints);
            previous = Some(line);
        }
        builder.end_run();
        let mapped: Vec<Range<usize>> = spans
            .iter()
            .map(|s| {
                let start = builder.mapped.get(&s.start).copied().unwrap_or(0);
                let end = builder
                    .mapped
                    .get(&s.end)
                    .copied()
                    .unwrap_or(start)
                    .max(start);
                start..end
            })
            .collect();
        let columns = spans
            .iter()
            .zip(&mapped)
            .map(|(s, m)| (m.start, column_of(file, s.start)))
            .collect();
        let excerpt = Excerpt {
            name,
            text: builder.text,
            runs: builder.runs,
            columns,
        };
        (excerpt, mapped)
    }

    #[cfg(test)]
    fn text(&self) -> &str {
        &self.text
    }
}

/// The span inside the text, on character boundaries, start before end, and not running over
/// more than [`MAX_LABEL_LINES`] lines.
fn clamp(file: &SourceFile, span: Range<usize>) -> Range<usize> {
    let text = file.text.as_str();
    let floor = |mut at: usize| {
        at = at.min(text.len());
        while !text.is_char_boundary(at) {
            at -= 1;
        }
        at
    };
    let end = floor(span.end);
    let start = floor(span.start).min(end);
    let first = file.line_index(start);
    if last_line(file, start..end) > first + MAX_LABEL_LINES {
        return start..file.line_range(first).end.max(start);
    }
    start..end
}

/// The line of the last character a span covers (its start line when it is empty).
fn last_line(file: &SourceFile, span: Range<usize>) -> usize {
    if span.end > span.start {
        file.line_index(span.end - 1)
    } else {
        file.line_index(span.start)
    }
}

/// Every line a span touches, with [`CONTEXT_LINES`] on each side.
fn shown_lines(file: &SourceFile, spans: &[Range<usize>]) -> BTreeSet<usize> {
    let last = file.line_count() - 1;
    let mut lines = BTreeSet::new();
    for span in spans {
        let first = file.line_index(span.start).saturating_sub(CONTEXT_LINES);
        let end = (last_line(file, span.clone()).max(file.line_index(span.end)) + CONTEXT_LINES)
            .min(last);
        lines.extend(first..=end);
    }
    lines
}

/// 0-based column, in characters, of a byte offset in its line.
fn column_of(file: &SourceFile, offset: usize) -> usize {
    let line_start = file.line_starts()[file.line_index(offset)];
    file.text[line_start..offset].chars().count()
}

struct Builder<'f> {
    file: &'f SourceFile,
    text: String,
    runs: Vec<Run>,
    /// Original byte offset → excerpt offset, for every span end met so far.
    mapped: BTreeMap<usize, usize>,
    /// No line of the current run has been written yet.
    run_is_empty: bool,
    /// The character columns of every span end, sorted.
    columns: BTreeSet<usize>,
}

impl Builder<'_> {
    fn start_run(&mut self, first_line: usize) {
        self.end_run();
        if !self.runs.is_empty() {
            self.text.push('\n');
        }
        self.runs.push(Run {
            range: self.text.len()..self.text.len(),
            first_line,
        });
        self.run_is_empty = true;
    }

    fn end_run(&mut self) {
        let len = self.text.len();
        if let Some(run) = self.runs.last_mut() {
            run.range.end = len;
        }
    }

    /// Appends line `index` (cut when long) and maps the span ends that lie on it: those from
    /// its start up to the next line's start (an offset inside the line break is shown at
    /// the line's end; the end of the text belongs to the last line).
    fn line(&mut self, index: usize, endpoints: &BTreeSet<usize>) {
        if !self.run_is_empty {
            self.text.push('\n');
        }
        self.run_is_empty = false;
        let range = self.file.line_range(index);
        let on_line: Vec<usize> = match self.file.line_starts().get(index + 1) {
            Some(&next) => endpoints.range(range.start..next).copied().collect(),
            None => endpoints.range(range.start..).copied().collect(),
        };
        let anchors: Vec<usize> = if on_line.is_empty() {
            // A line of context is cut at the same columns as the labelled lines.
            self.columns
                .iter()
                .map(|&c| forward(&self.file.text, range.start, c, range.end))
                .collect()
        } else {
            on_line.iter().map(|&o| o.min(range.end)).collect()
        };
        for window in windows(&self.file.text, range.clone(), &anchors) {
            if window.start > range.start && !self.text.ends_with(ELLIPSIS) {
                self.text.push(ELLIPSIS);
            }
            self.push_shown(window.clone(), &on_line);
            if window.end < range.end {
                self.text.push(ELLIPSIS);
            }
        }
        for &end in on_line.iter().filter(|&&o| o >= range.end) {
            self.mapped.insert(end, self.text.len());
        }
    }

    /// Appends `range` of the source, each character made visible, mapping span ends in it.
    fn push_shown(&mut self, range: Range<usize>, on_line: &[usize]) {
        let text = &self.file.text[range.clone()];
        for (i, c) in text.char_indices() {
            let at = range.start + i;
            if on_line.binary_search(&at).is_ok() {
                self.mapped.insert(at, self.text.len());
            }
            self.text.push(visible(c));
        }
    }
}

/// The parts of the line `range` to show: the whole line when it is short, else windows of
/// [`WINDOW_CHARS`] around each offset in `anchors` (sorted, inside the line; merged where
/// they meet), or the line's start when there is none.
fn windows(text: &str, range: Range<usize>, anchors: &[usize]) -> Vec<Range<usize>> {
    let line = &text[range.clone()];
    if line.len() <= MAX_LINE_CHARS || line.chars().nth(MAX_LINE_CHARS).is_none() {
        return vec![range];
    }
    if anchors.is_empty() {
        let start_of_line = range.start..forward(text, range.start, MAX_LINE_CHARS, range.end);
        return vec![start_of_line];
    }
    let mut out: Vec<Range<usize>> = Vec::new();
    for &anchor in anchors {
        let window = back(text, anchor, WINDOW_CHARS, range.start)
            ..forward(text, anchor, WINDOW_CHARS, range.end);
        match out.last_mut() {
            Some(last) if window.start <= last.end => last.end = last.end.max(window.end),
            _ => out.push(window),
        }
    }
    out
}

/// The offset `n` characters after `at`, at most `limit`.
fn forward(text: &str, at: usize, n: usize, limit: usize) -> usize {
    text[at..limit]
        .char_indices()
        .nth(n)
        .map_or(limit, |(i, _)| at + i)
}

/// The offset `n` characters before `at`, at least `limit`.
fn back(text: &str, at: usize, n: usize, limit: usize) -> usize {
    text[limit..at]
        .char_indices()
        .rev()
        .nth(n.saturating_sub(1))
        .map_or(limit, |(i, _)| limit + i)
}

/// A character as it is shown: control characters (which could move a terminal's cursor or
/// change its colours) and bidirectional overrides (which could reorder what is shown) as
/// visible symbols; tabs stay (the renderer expands them).
pub fn visible(c: char) -> char {
    match c {
        '\t' => c,
        '\u{0}'..='\u{1f}' => char::from_u32(0x2400 + c as u32).unwrap_or('\u{fffd}'),
        '\u{7f}' => '\u{2421}',
        '\u{80}'..='\u{9f}'
        | '\u{202a}'..='\u{202e}'
        | '\u{2066}'..='\u{2069}'
        | '\u{fffe}'
        | '\u{ffff}' => '\u{fffd}',
        _ => c,
    }
}

/// A text with every character made [`visible`], except line breaks.
pub fn visible_text(text: &str) -> String {
    text.chars()
        .map(|c| if c == '\n' { c } else { visible(c) })
        .collect()
}

impl SourceCode for Excerpt {
    fn read_span<'a>(
        &'a self,
        span: &SourceSpan,
        context_lines_before: usize,
        context_lines_after: usize,
    ) -> Result<Box<dyn SpanContents<'a> + 'a>, MietteError> {
        let (start, end) = (span.offset(), span.offset() + span.len());
        // A span never reaches across two runs: the lines between them are not here.
        let run = self
            .runs
            .iter()
            .find(|r| r.range.start <= start && end <= r.range.end)
            .ok_or(MietteError::OutOfBounds)?;
        let local = SourceSpan::new((start - run.range.start).into(), span.len());
        let inner = self.text[run.range.clone()].read_span(
            &local,
            context_lines_before,
            context_lines_after,
        )?;
        let data = inner.data();
        let line_count = data.iter().filter(|&&b| b == b'\n').count() + 1;
        let column = match self.columns.get(&start) {
            Some(&c) if context_lines_before == 0 => c,
            _ => inner.column(),
        };
        let at = SourceSpan::new(
            (inner.span().offset() + run.range.start).into(),
            inner.span().len(),
        );
        Ok(Box::new(MietteSpanContents::new_named(
            self.name.clone(),
            data,
            at,
            run.first_line + inner.line(),
            column,
            line_count,
        )))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::diag::SourceMap;

    fn excerpt(text: &str, spans: &[(usize, usize)]) -> (String, Vec<Range<usize>>) {
        let mut map = SourceMap::new();
        let id = map.add("a.figura", text);
        let spans: Vec<Range<usize>> = spans.iter().map(|&(a, b)| a..b).collect();
        let (e, mapped) = Excerpt::new("a.figura".into(), map.get(id), &spans);
        (e.text().to_owned(), mapped)
    }

    #[test]
    fn short_lines_are_copied_with_one_line_of_context() {
        let text = "one\ntwo\nthree\nfour\nfive\n";
        let (shown, mapped) = excerpt(text, &[(8, 13)]);
        assert_eq!(shown, "two\nthree\nfour");
        assert_eq!(&shown[mapped[0].clone()], "three");
    }

    #[test]
    fn long_lines_are_cut_around_the_labels() {
        let text = format!("{}BAD{}", "x".repeat(70_000), "y".repeat(70_000));
        let (shown, mapped) = excerpt(&text, &[(70_000, 70_003)]);
        assert!(shown.chars().count() < 2 * WINDOW_CHARS + 10, "{shown}");
        assert!(shown.starts_with(ELLIPSIS) && shown.ends_with(ELLIPSIS));
        assert_eq!(&shown[mapped[0].clone()], "BAD");
    }

    #[test]
    fn distant_lines_make_separate_runs() {
        let text: String = (0..100).map(|i| format!("line {i}\n")).collect();
        let at = |i: usize| text.find(&format!("line {i}\n")).unwrap();
        let (shown, mapped) = excerpt(&text, &[(at(10), at(10) + 7), (at(80), at(80) + 7)]);
        assert_eq!(shown, "line 9\nline 10\nline 11\nline 79\nline 80\nline 81");
        assert_eq!(&shown[mapped[1].clone()], "line 80");
    }

    #[test]
    fn control_characters_are_shown_as_symbols() {
        let (shown, mapped) = excerpt("a\u{1b}[2Jb \u{202e}c", &[(1, 2)]);
        assert_eq!(shown, "a\u{241b}[2Jb \u{fffd}c");
        assert_eq!(&shown[mapped[0].clone()], "\u{241b}");
    }

    #[test]
    fn spans_past_the_end_or_inside_a_character_are_clamped() {
        let (shown, mapped) = excerpt("é\n", &[(1, 99)]);
        assert_eq!(shown, "é\n");
        assert_eq!(mapped[0], 0..shown.len());
    }
}
