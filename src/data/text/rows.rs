//! Splitting a text file into rows and fields as it streams in, each row with its place.
//!
//! `csv_core` splits the decoded text (RFC 4180 quoting, doubled quotes, `\r`, `\n` or `\r\n`
//! endings, blank lines skipped) from a buffer that holds the row being read and the next
//! chunk, nothing more: a row longer than the row limit stops the reading instead of growing
//! the buffer. Each row keeps its raw text while it is being read, so the byte range of a
//! field is found only when a message needs it ([`Row::field_span`]), by a small scan that
//! follows the same rules.
//!
//! Rows are numbered as a spreadsheet shows the file: the header is row 1 and each line after
//! the previous row is one more row, blank lines included. A line break inside quotes does not
//! start a new row, so lines are counted separately (and, as everywhere, by `\n` only; a file
//! with `\r` endings alone still gets one row number per row).

use csv_core::{ReadRecordResult, Reader, ReaderBuilder};

use crate::diag::{SourceId, Span};

use super::decode::{DecodeError, Decoder};

const QUOTE: u8 = b'"';
const BYTE_ORDER_MARK: &[u8] = b"\xEF\xBB\xBF";

fn is_line_end(byte: u8) -> bool {
    byte == b'\r' || byte == b'\n'
}

/// Why rows stop.
#[derive(Debug)]
pub(super) enum RowError {
    Decode(DecodeError),
    /// A row longer than the limit, on this row and line.
    TooLong {
        file_row: usize,
        line: usize,
    },
}

/// One row of the file, borrowed from the reader until the next row is read.
#[derive(Debug)]
pub(super) struct Row<'r> {
    /// 1-based, header = 1, blank lines counted.
    pub(super) file_row: usize,
    /// 1-based line where the row starts.
    pub(super) line: usize,
    /// The row opens a quoted field that is never closed, so it runs to the end of the file.
    pub(super) unclosed_quote: bool,
    /// The row's text: any blank lines before it, the row, its line ending.
    raw: &'r [u8],
    /// Offset of `raw` in the file's text.
    offset: u64,
    separator: u8,
    fields: &'r [u8],
    ends: &'r [usize],
}

impl<'r> Row<'r> {
    /// Number of fields.
    pub(super) fn len(&self) -> usize {
        self.ends.len()
    }

    /// The bytes of field `i` (quotes removed).
    fn bytes(&self, i: usize) -> Option<&'r [u8]> {
        let end = *self.ends.get(i)?;
        let start = i.checked_sub(1).map_or(0, |p| self.ends[p]);
        self.fields.get(start..end)
    }

    /// The value of field `i` (quotes removed). Fields are cut from checked UTF-8 text at ASCII
    /// bytes, so they are UTF-8 too.
    pub(super) fn field(&self, i: usize) -> Option<&'r str> {
        std::str::from_utf8(self.bytes(i)?).ok()
    }

    /// Whether every field is empty or spaces (`,,,`, ` , ,`).
    pub(super) fn is_blank(&self) -> bool {
        // Most rows start with a visible ASCII character: no need to look further.
        if self
            .bytes(0)
            .and_then(|b| b.first())
            .is_some_and(|&b| b.is_ascii_graphic())
        {
            return false;
        }
        self.blank_from(0)
    }

    /// Whether fields `from..` are all empty or spaces.
    pub(super) fn blank_from(&self, from: usize) -> bool {
        (from..self.len()).all(|i| self.field(i).is_some_and(|f| f.trim().is_empty()))
    }

    /// The row's own text (no blank lines before it, no line ending), as offsets into `raw`.
    fn content(&self) -> (usize, usize) {
        let start = self
            .raw
            .iter()
            .position(|&b| !is_line_end(b))
            .unwrap_or(self.raw.len());
        let scanned = scan_row(self.raw, start, self.separator);
        (start, scanned.end)
    }

    fn span(&self, source: SourceId, start: usize, end: usize) -> Span {
        let at = |i: usize| {
            usize::try_from(self.offset)
                .unwrap_or(usize::MAX)
                .saturating_add(i)
        };
        Span::new(source, at(start), at(end))
    }

    /// The row's bytes in the file's text `source`, without its line ending.
    pub(super) fn span_in(&self, source: SourceId) -> Span {
        let (start, end) = self.content();
        self.span(source, start, end)
    }

    /// The byte range of field `i` in the file's text, quotes included (the whole row should
    /// the scan and the splitter ever disagree).
    pub(super) fn field_span(&self, source: SourceId, i: usize) -> Span {
        let (start, _) = self.content();
        let scanned = scan_row(self.raw, start, self.separator);
        match scanned.fields.get(i) {
            Some(&(s, e)) if scanned.fields.len() == self.len() => self.span(source, s, e),
            _ => self.span_in(source),
        }
    }

    /// The byte range of every field in the file's text (see [`Row::field_span`]).
    pub(super) fn field_spans(&self, source: SourceId) -> Vec<Span> {
        let (start, _) = self.content();
        let scanned = scan_row(self.raw, start, self.separator);
        if scanned.fields.len() == self.len() {
            scanned
                .fields
                .iter()
                .map(|&(s, e)| self.span(source, s, e))
                .collect()
        } else {
            vec![self.span_in(source); self.len()]
        }
    }

    /// The opening quote of the last field (for a quote that never closes).
    pub(super) fn open_quote_span(&self, source: SourceId) -> Span {
        let field = self.field_span(source, self.len().saturating_sub(1));
        Span::new(field.source, field.start, (field.start + 1).min(field.end))
    }
}

/// Where the scan found a row and its fields, as offsets into the text scanned.
#[derive(Debug, Default)]
struct RawRow {
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

/// Splits the row starting at `start` (not a line end) into fields, as `csv_core` does.
fn scan_row(bytes: &[u8], start: usize, delimiter: u8) -> RawRow {
    let mut row = RawRow::default();
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

/// Reads rows one at a time from a text file.
pub(super) struct Rows<'b> {
    decoder: Decoder<'b>,
    csv: Reader,
    separator: u8,
    /// Text read and not yet dropped: the current row and what follows it.
    buf: Vec<u8>,
    /// Offset in the file's text of `buf[0]`.
    base: u64,
    /// Where `csv_core` goes on reading in `buf`.
    pos: usize,
    eof: bool,
    done: bool,
    started: bool,
    fields: Vec<u8>,
    ends: Vec<usize>,
    max_row_bytes: usize,
    /// Row number and last line of the previous row, if any.
    previous: Option<(usize, usize)>,
}

impl<'b> Rows<'b> {
    pub(super) fn new(decoder: Decoder<'b>, separator: u8, max_row_bytes: usize) -> Self {
        Rows {
            decoder,
            csv: ReaderBuilder::new().delimiter(separator).build(),
            separator,
            buf: Vec::new(),
            base: 0,
            pos: 0,
            eof: false,
            done: false,
            started: false,
            fields: vec![0; 1024],
            ends: vec![0; 64],
            max_row_bytes,
            previous: None,
        }
    }

    /// Bytes read from the file so far.
    pub(super) fn bytes_read(&self) -> u64 {
        self.decoder.bytes_read()
    }

    /// Drops the text before `keep`, then reads the next chunk; `keep` moves with the text.
    fn refill(&mut self, keep: &mut usize) -> Result<(), RowError> {
        if *keep > 0 {
            self.buf.drain(..*keep);
            self.base += *keep as u64;
            self.pos -= *keep;
            *keep = 0;
        }
        self.eof = !self.decoder.fill(&mut self.buf).map_err(RowError::Decode)?;
        // The first chunk is made long enough to see a byte-order mark whole.
        while !self.started && !self.eof && self.buf.len() < BYTE_ORDER_MARK.len() {
            self.eof = !self.decoder.fill(&mut self.buf).map_err(RowError::Decode)?;
        }
        if !self.started {
            self.started = true;
            if self.buf.starts_with(BYTE_ORDER_MARK) {
                self.pos = BYTE_ORDER_MARK.len();
                *keep = self.pos;
            }
        }
        Ok(())
    }

    /// The next row, `Ok(None)` at the end of the file. After an error, stop reading.
    pub(super) fn next_row(&mut self) -> Result<Option<Row<'_>>, RowError> {
        if self.done {
            return Ok(None);
        }
        let mut start = self.pos;
        let line_before = self.csv.line();
        let (mut n_out, mut n_ends) = (0, 0);
        loop {
            if self.pos == self.buf.len() && !self.eof {
                self.refill(&mut start)?;
                continue;
            }
            let (result, n_in, out, ends) = self.csv.read_record(
                &self.buf[self.pos..],
                &mut self.fields[n_out..],
                &mut self.ends[n_ends..],
            );
            self.pos += n_in;
            n_out += out;
            n_ends += ends;
            match result {
                ReadRecordResult::Record => break,
                ReadRecordResult::End => {
                    self.done = true;
                    return Ok(None);
                }
                // At the end of the text `csv_core` says Record or End; never loop on it.
                ReadRecordResult::InputEmpty if self.eof && self.pos == self.buf.len() => {
                    self.done = true;
                    return Ok(None);
                }
                ReadRecordResult::InputEmpty => {}
                ReadRecordResult::OutputFull => {
                    let grown = (self.fields.len() * 2).min(self.max_row_bytes.max(1));
                    self.fields.resize(grown.max(self.fields.len() + 1), 0);
                }
                ReadRecordResult::OutputEndsFull => {
                    let grown = self.ends.len() * 2;
                    self.ends.resize(grown, 0);
                }
            }
            if self.pos - start > self.max_row_bytes {
                return Err(self.too_long(start, line_before));
            }
        }
        let raw = &self.buf[start..self.pos];
        let (line, end_line) = lines_of(raw, line_before, self.csv.line());
        let file_row = match self.previous {
            None => 1,
            Some((row, last_line)) => row + line.saturating_sub(last_line).max(1),
        };
        self.previous = Some((file_row, end_line));
        let at_end = self.eof && self.pos == self.buf.len();
        let unclosed_quote = at_end && {
            let content = raw
                .iter()
                .position(|&b| !is_line_end(b))
                .unwrap_or(raw.len());
            scan_row(raw, content, self.separator).unclosed_quote
        };
        Ok(Some(Row {
            file_row,
            line,
            unclosed_quote,
            raw,
            offset: self.base + start as u64,
            separator: self.separator,
            fields: &self.fields[..n_out],
            ends: &self.ends[..n_ends],
        }))
    }

    fn too_long(&mut self, start: usize, line_before: u64) -> RowError {
        self.done = true;
        let raw = &self.buf[start..self.pos];
        let blank: usize = raw.iter().take_while(|&&b| is_line_end(b)).count();
        let line = to_usize(line_before) + raw[..blank].iter().filter(|&&b| b == b'\n').count();
        let file_row = match self.previous {
            None => 1,
            Some((row, last_line)) => row + line.saturating_sub(last_line).max(1),
        };
        RowError::TooLong { file_row, line }
    }
}

fn to_usize(n: u64) -> usize {
    usize::try_from(n).unwrap_or(usize::MAX)
}

/// The first and last line of a row, from the line count before and after reading it: the
/// blank lines before it and the line ending after it are not part of the row.
fn lines_of(raw: &[u8], before: u64, after: u64) -> (usize, usize) {
    let newlines = |bytes: &[u8]| bytes.iter().filter(|&&b| b == b'\n').count();
    let lead = raw.iter().take_while(|&&b| is_line_end(b)).count();
    let trail = raw[lead..]
        .iter()
        .rev()
        .take_while(|&&b| is_line_end(b))
        .count();
    let first = to_usize(before) + newlines(&raw[..lead]);
    let last = to_usize(after).saturating_sub(newlines(&raw[raw.len() - trail..]));
    (first, last.max(first))
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
        assert_eq!(fields("\"a\nb\",c\nnext", 0), ["\"a\nb\"", "c"]);
        assert_eq!(fields("a,b,", 0), ["a", "b", ""]);
    }

    #[test]
    fn an_unclosed_quote_runs_to_the_end() {
        let row = scan_row(b"a,\"b\nc,d\n", 0, b',');
        assert!(row.unclosed_quote);
        assert_eq!(row.end, 9);
    }

    /// Every row's fields, row and line, read in chunks of `step` bytes.
    fn rows(text: &str, step: usize) -> Vec<(Vec<String>, usize, usize)> {
        struct Trickle<'a>(&'a [u8], usize);
        impl std::io::Read for Trickle<'_> {
            fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
                let n = self.0.len().min(self.1).min(buf.len());
                buf[..n].copy_from_slice(&self.0[..n]);
                self.0 = &self.0[n..];
                Ok(n)
            }
        }
        let decoder = Decoder::new(Box::new(Trickle(text.as_bytes(), step)), encoding_rs::UTF_8);
        let mut rows = Rows::new(decoder, b',', 1 << 20);
        let mut out = Vec::new();
        while let Some(row) = rows.next_row().expect("text") {
            let fields = (0..row.len())
                .map(|i| row.field(i).unwrap_or_default().to_owned())
                .collect();
            out.push((fields, row.file_row, row.line));
        }
        out
    }

    #[test]
    fn rows_and_lines_are_counted_across_chunks() {
        let text = "\u{feff}a,b\r\n\r\n1,\"x\ny\"\n\n2,3";
        for step in [1, 2, 5, 1000] {
            let got = rows(text, step);
            assert_eq!(
                got,
                [
                    (vec!["a".into(), "b".into()], 1, 1),
                    (vec!["1".into(), "x\ny".into()], 3, 3),
                    (vec!["2".into(), "3".into()], 5, 6),
                ],
                "step {step}"
            );
        }
    }
}
