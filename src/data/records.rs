//! Splitting a data file's text into rows and fields, each with its place in the file.
//!
//! The `csv` crate reads the values (quotes removed, doubled quotes undone), leniently and with
//! any number of fields per row, so the caller can report rows of the wrong width itself. The
//! crate gives only where a row starts, so the byte range of every field is found by a small
//! scan of the raw row that follows the same rules (RFC 4180 quoting, doubled quotes, `\r`,
//! `\n` or `\r\n` endings, blank lines skipped). Should the two ever disagree on a row's field
//! count, every field of that row is given the row's span: a wider label, never a wrong one.
//!
//! Rows are numbered as a spreadsheet shows the file: the header is row 1 and each line after
//! the previous row is one more row, blank lines included. A line break inside quotes does not
//! start a new row, so lines are counted separately (and, as everywhere, by `\n` only; a file
//! with `\r` endings alone still gets one row number per row).

use std::borrow::Cow;

use crate::diag::{SourceId, Span};

const QUOTE: u8 = b'"';

fn is_line_end(byte: u8) -> bool {
    byte == b'\r' || byte == b'\n'
}

/// One row of the file, borrowed from the reader until the next row is read.
#[derive(Debug)]
pub(super) struct Row<'r> {
    /// 1-based, header = 1, blank lines counted.
    pub(super) file_row: usize,
    /// 1-based line where the row starts.
    pub(super) line: usize,
    /// The row's bytes without its line ending.
    pub(super) span: Span,
    /// The row opens a quoted field that is never closed, so it runs to the end of the file.
    pub(super) unclosed_quote: bool,
    record: &'r csv::ByteRecord,
    field_spans: &'r [Span],
}

impl<'r> Row<'r> {
    /// Number of fields.
    pub(super) fn len(&self) -> usize {
        self.record.len()
    }

    /// The value of field `i` (quotes removed).
    pub(super) fn field(&self, i: usize) -> Option<Cow<'r, str>> {
        // Fields are cut from valid UTF-8 text at ASCII bytes, so the lossy path never runs.
        self.record.get(i).map(String::from_utf8_lossy)
    }

    /// The byte range of field `i` in the file, quotes included.
    pub(super) fn field_span(&self, i: usize) -> Span {
        self.field_spans.get(i).copied().unwrap_or(self.span)
    }
}

/// Where the raw scan found a row and its fields, as offsets into the text given to `csv`.
#[derive(Debug, Default)]
struct RawRow {
    start: usize,
    end: usize,
    fields: Vec<(usize, usize)>,
    unclosed_quote: bool,
}

#[derive(Clone, Copy, PartialEq, Eq)]
enum ScanState {
    FieldStart,
    Unquoted,
    Quoted,
    AfterQuote,
}

/// Finds the row that `csv` starts at `from`: skips blank lines, then splits fields.
fn scan_row(bytes: &[u8], from: usize, delimiter: u8) -> RawRow {
    let start = from
        + bytes[from.min(bytes.len())..]
            .iter()
            .take_while(|&&b| is_line_end(b))
            .count();
    let mut row = RawRow {
        start,
        ..RawRow::default()
    };
    let mut state = ScanState::FieldStart;
    let mut field_start = start;
    let mut at = start;
    loop {
        let Some(&byte) = bytes.get(at) else {
            row.unclosed_quote = state == ScanState::Quoted;
            break;
        };
        match state {
            ScanState::Quoted => {
                if byte == QUOTE {
                    if bytes.get(at + 1) == Some(&QUOTE) {
                        at += 1;
                    } else {
                        state = ScanState::AfterQuote;
                    }
                }
            }
            _ if byte == delimiter => {
                row.fields.push((field_start, at));
                field_start = at + 1;
                state = ScanState::FieldStart;
            }
            _ if is_line_end(byte) => break,
            ScanState::FieldStart if byte == QUOTE => state = ScanState::Quoted,
            ScanState::FieldStart => state = ScanState::Unquoted,
            ScanState::Unquoted | ScanState::AfterQuote => {}
        }
        at += 1;
    }
    let end = at.min(bytes.len());
    row.fields.push((field_start, end));
    row.end = end;
    row
}

/// Counts lines forward through the text as rows are read (offsets only grow).
#[derive(Debug)]
struct LineCounter {
    offset: usize,
    line: usize,
}

impl LineCounter {
    fn line_at(&mut self, bytes: &[u8], offset: usize) -> usize {
        if offset > self.offset {
            let upto = offset.min(bytes.len());
            let from = self.offset.min(upto);
            self.line += bytes[from..upto].iter().filter(|&&b| b == b'\n').count();
            self.offset = upto;
        }
        self.line
    }
}

/// Reads rows one at a time from a data file's text.
pub(super) struct Rows<'t> {
    reader: csv::Reader<&'t [u8]>,
    record: csv::ByteRecord,
    body: &'t [u8],
    /// Offset of `body` in the file text (the length of a skipped byte-order mark).
    body_offset: usize,
    source: SourceId,
    delimiter: u8,
    /// Row number and last line of the previous row, if any.
    previous: Option<(usize, usize)>,
    lines: LineCounter,
    field_spans: Vec<Span>,
}

impl<'t> Rows<'t> {
    /// `body` is the file text after any byte-order mark, which is `body_offset` bytes long.
    pub(super) fn new(body: &'t str, body_offset: usize, source: SourceId, delimiter: u8) -> Self {
        let reader = csv::ReaderBuilder::new()
            .has_headers(false)
            .flexible(true)
            .delimiter(delimiter)
            .from_reader(body.as_bytes());
        Rows {
            reader,
            record: csv::ByteRecord::new(),
            body: body.as_bytes(),
            body_offset,
            source,
            delimiter,
            previous: None,
            lines: LineCounter { offset: 0, line: 1 },
            field_spans: Vec::new(),
        }
    }

    fn span(&self, start: usize, end: usize) -> Span {
        Span::new(
            self.source,
            self.body_offset + start,
            self.body_offset + end,
        )
    }

    /// The next row, `Ok(None)` at the end of the file. After an error, stop reading.
    pub(super) fn next_row(&mut self) -> Result<Option<Row<'_>>, csv::Error> {
        if !self.reader.read_byte_record(&mut self.record)? {
            return Ok(None);
        }
        let from = self
            .record
            .position()
            .map_or(0, |p| usize::try_from(p.byte()).unwrap_or(usize::MAX));
        let raw = scan_row(self.body, from, self.delimiter);
        let span = self.span(raw.start, raw.end);
        self.field_spans.clear();
        if raw.fields.len() == self.record.len() {
            let (source, offset) = (self.source, self.body_offset);
            self.field_spans.extend(
                raw.fields
                    .iter()
                    .map(|&(s, e)| Span::new(source, offset + s, offset + e)),
            );
        }
        let line = self.lines.line_at(self.body, raw.start);
        let end_line = self.lines.line_at(self.body, raw.end);
        let file_row = match self.previous {
            None => 1,
            Some((row, last_line)) => row + line.saturating_sub(last_line).max(1),
        };
        self.previous = Some((file_row, end_line));
        Ok(Some(Row {
            file_row,
            line,
            span,
            unclosed_quote: raw.unclosed_quote,
            record: &self.record,
            field_spans: &self.field_spans,
        }))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fields(text: &str, from: usize) -> Vec<&str> {
        let row = scan_row(text.as_bytes(), from, b',');
        row.fields.iter().map(|&(s, e)| &text[s..e]).collect()
    }

    #[test]
    fn raw_fields_keep_their_quotes() {
        assert_eq!(fields("a,\"b,c\",d\n", 0), ["a", "\"b,c\"", "d"]);
        assert_eq!(fields("\"x\"\"y\",\"\"\r\nz", 0), ["\"x\"\"y\"", "\"\""]);
        assert_eq!(fields("\n\r\n1,2", 0), ["1", "2"]);
        assert_eq!(fields("\"a\nb\",c\nnext", 0), ["\"a\nb\"", "c"]);
        assert_eq!(fields("a,b,", 0), ["a", "b", ""]);
    }

    #[test]
    fn an_unclosed_quote_runs_to_the_end() {
        let row = scan_row(b"a,\"b\nc,d\n", 0, b',');
        assert!(row.unclosed_quote);
        assert_eq!(row.end, 9);
    }
}
