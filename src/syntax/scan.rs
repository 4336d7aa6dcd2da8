//! A forgiving token scan of a spec text, used only to explain and recover from syntax errors.
//!
//! The scan never fails: every byte of the text belongs to exactly one token or is a space or
//! tab. It agrees with the grammar on the things recovery depends on — strings (one line, `\`
//! escapes), comments, line breaks, `;`, braces and parentheses — and pairs up brackets:
//! a `{` or `}` closes every `(` still open, so an unclosed `(` never swallows a block.
//!
//! Invariant: token boundaries are ASCII characters or the ends of the text, so every
//! token start and end is a `char` boundary.

/// What a token is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TokKind {
    /// `[A-Za-z_][A-Za-z0-9_]*`
    Name,
    /// `-?digits...` with anything number-like or letter-like glued to it (`85mm`, `1e5`).
    Number,
    /// A string; `closed` is false when the line or the file ends first.
    Str {
        closed: bool,
    },
    Comment,
    /// `\n`, `\r\n` or `\r`.
    Newline,
    Semi,
    Comma,
    Colon,
    LBrace,
    RBrace,
    LParen,
    RParen,
    /// One or two of `= ! < >`.
    Op,
    /// Any other single character.
    Other,
}

/// One token with its bracket nesting.
#[derive(Debug, Clone, Copy)]
pub struct Tok {
    pub kind: TokKind,
    pub start: usize,
    pub end: usize,
    /// Number of `{` open before this token.
    pub brace_depth: usize,
    /// Number of `(` open before this token (reset by `{` and `}`).
    pub paren_depth: usize,
    /// For brackets: index of the matching bracket, if there is one.
    pub partner: Option<usize>,
}

/// The tokens of one text.
#[derive(Debug)]
pub struct Scan {
    pub toks: Vec<Tok>,
    /// Index of the first `(` nested deeper than the limit given to [`Scan::new`], if any.
    pub too_deep: Option<usize>,
}

impl Scan {
    /// Scans `text`, noting the first `(` that is nested more than `max_depth` levels deep.
    pub fn new(text: &str, max_depth: usize) -> Scan {
        let mut toks = lex(text);
        let too_deep = pair_brackets(&mut toks, max_depth);
        Scan { toks, too_deep }
    }

    /// Index of the first token that ends after `pos` (the token at or after `pos`).
    pub fn index_at(&self, pos: usize) -> usize {
        self.toks.partition_point(|t| t.end <= pos)
    }

    /// The last token ending at or before `pos` that is not a comment.
    pub fn tok_before(&self, pos: usize) -> Option<(usize, &Tok)> {
        let idx = self.toks.partition_point(|t| t.end <= pos);
        (0..idx)
            .rev()
            .map(|i| (i, &self.toks[i]))
            .find(|(_, t)| t.kind != TokKind::Comment)
    }

    /// A string token that is not closed and covers `pos` (from its quote to the line end).
    pub fn unclosed_string_at(&self, pos: usize) -> Option<&Tok> {
        let idx = self.toks.partition_point(|t| t.end < pos);
        self.toks[idx..]
            .iter()
            .take_while(|t| t.start <= pos)
            .find(|t| t.kind == TokKind::Str { closed: false })
    }

    /// Index of the `{` of the innermost block that is open at `pos`.
    ///
    /// A block is open at `pos` when its `{` is before `pos` and its `}` (if any) is at or after it.
    pub fn open_block_at(&self, pos: usize) -> Option<usize> {
        let idx = self.index_at(pos);
        // A `}` that closes a block still belongs to it: its depth is the block's inside.
        let depth = self
            .toks
            .get(idx)
            .map_or_else(|| self.final_brace_depth(), |t| t.brace_depth);
        if depth == 0 {
            return None;
        }
        // Walk back to the `{` that opened the current depth.
        (0..idx).rev().find(|&i| {
            let t = &self.toks[i];
            t.kind == TokKind::LBrace
                && t.brace_depth + 1 == depth
                && t.partner.is_none_or(|close| self.toks[close].start >= pos)
        })
    }

    fn final_brace_depth(&self) -> usize {
        self.toks.last().map_or(0, |t| match t.kind {
            TokKind::LBrace => t.brace_depth + 1,
            TokKind::RBrace if t.partner.is_some() => t.brace_depth - 1,
            _ => t.brace_depth,
        })
    }

    /// The `(` tokens before `pos` in the statement starting at token `stmt_first` that are never closed.
    pub fn unclosed_parens(&self, stmt_first: usize, pos: usize) -> Vec<usize> {
        self.toks
            .iter()
            .enumerate()
            .skip(stmt_first)
            .take_while(|(_, t)| t.start < pos)
            .filter(|(_, t)| t.kind == TokKind::LParen && t.partner.is_none())
            .map(|(i, _)| i)
            .collect()
    }

    /// Whether token `i` ends a statement inside a block (or a line at the top level).
    fn is_separator(&self, i: usize) -> bool {
        let t = &self.toks[i];
        match t.kind {
            TokKind::Newline | TokKind::Semi => t.paren_depth == 0,
            TokKind::LBrace | TokKind::RBrace => true,
            _ => false,
        }
    }

    /// The statement around `pos`: indices `[first, end)` of its tokens (comments included),
    /// bounded by separators (line breaks and `;` outside parentheses, braces).
    pub fn statement_around(&self, pos: usize) -> (usize, usize) {
        let idx = self.index_at(pos).min(self.toks.len());
        let first = (0..idx)
            .rev()
            .find(|&i| self.is_separator(i))
            .map_or(0, |i| i + 1);
        let end = (idx..self.toks.len())
            .find(|&i| self.is_separator(i))
            .unwrap_or(self.toks.len());
        (first, end)
    }

    /// Byte range covered by tokens `[first, end)`; empty at `fallback` when there are none.
    pub fn byte_range(&self, first: usize, end: usize, fallback: usize) -> (usize, usize) {
        if first >= end {
            return (fallback, fallback);
        }
        (self.toks[first].start, self.toks[end - 1].end)
    }

    /// The first token of the line that token `i` is on.
    pub fn line_first(&self, i: usize) -> usize {
        (0..i)
            .rev()
            .find(|&j| self.toks[j].kind == TokKind::Newline)
            .map_or(0, |j| j + 1)
    }

    /// The line break ending the line that token `i` is on (or `toks.len()`).
    pub fn line_end(&self, i: usize) -> usize {
        (i..self.toks.len())
            .find(|&j| self.toks[j].kind == TokKind::Newline)
            .unwrap_or(self.toks.len())
    }

    /// Start of the header of the block opened by the `{` at token `open`: the first token
    /// after the previous line break, `;` or `}` on the way back.
    pub fn header_first(&self, open: usize) -> usize {
        (0..open)
            .rev()
            .find(|&j| {
                matches!(
                    self.toks[j].kind,
                    TokKind::Newline | TokKind::Semi | TokKind::RBrace | TokKind::LBrace
                )
            })
            .map_or(0, |j| j + 1)
    }

    /// Whether tokens `[first, end)` (comments ignored) read `NAME NAME` or `NAME NAME "path"`,
    /// the shape of a block header before its `{`.
    pub fn looks_like_header(&self, first: usize, end: usize) -> bool {
        let kinds: Vec<TokKind> = self.toks[first.min(end)..end]
            .iter()
            .map(|t| t.kind)
            .filter(|k| *k != TokKind::Comment)
            .collect();
        matches!(
            kinds.as_slice(),
            [TokKind::Name, TokKind::Name] | [TokKind::Name, TokKind::Name, TokKind::Str { .. }]
        )
    }
}

fn lex(text: &str) -> Vec<Tok> {
    let bytes = text.as_bytes();
    let mut toks = Vec::new();
    let mut i = 0;
    while i < bytes.len() {
        let (kind, end) = match bytes[i] {
            b' ' | b'\t' => {
                i += 1;
                continue;
            }
            b'\n' => (TokKind::Newline, i + 1),
            b'\r' => (
                TokKind::Newline,
                if bytes.get(i + 1) == Some(&b'\n') {
                    i + 2
                } else {
                    i + 1
                },
            ),
            b'#' => (TokKind::Comment, line_end(bytes, i)),
            b'"' => string_end(bytes, i),
            b';' => (TokKind::Semi, i + 1),
            b',' => (TokKind::Comma, i + 1),
            b':' => (TokKind::Colon, i + 1),
            b'{' => (TokKind::LBrace, i + 1),
            b'}' => (TokKind::RBrace, i + 1),
            b'(' => (TokKind::LParen, i + 1),
            b')' => (TokKind::RParen, i + 1),
            b'=' | b'!' | b'<' | b'>' => {
                let two = bytes.get(i + 1).is_some_and(|b| b"=!<>".contains(b));
                (TokKind::Op, i + if two { 2 } else { 1 })
            }
            b if b.is_ascii_alphabetic() || b == b'_' => {
                (TokKind::Name, run_end(bytes, i, is_name_byte))
            }
            b if b.is_ascii_digit() => (TokKind::Number, number_end(bytes, i)),
            b'-' if bytes.get(i + 1).is_some_and(u8::is_ascii_digit) => {
                (TokKind::Number, number_end(bytes, i + 1))
            }
            _ => (TokKind::Other, i + char_len(text, i)),
        };
        toks.push(Tok {
            kind,
            start: i,
            end,
            brace_depth: 0,
            paren_depth: 0,
            partner: None,
        });
        i = end;
    }
    toks
}

fn is_name_byte(b: u8) -> bool {
    b.is_ascii_alphanumeric() || b == b'_'
}

fn run_end(bytes: &[u8], from: usize, keep: fn(u8) -> bool) -> usize {
    bytes[from..]
        .iter()
        .position(|&b| !keep(b))
        .map_or(bytes.len(), |n| from + n)
}

/// End of a number-like token: digits, `.digits`, an exponent and any letters glued on.
fn number_end(bytes: &[u8], from: usize) -> usize {
    let digit = |b: u8| b.is_ascii_digit();
    let mut i = run_end(bytes, from, digit);
    if bytes.get(i) == Some(&b'.') && bytes.get(i + 1).is_some_and(u8::is_ascii_digit) {
        i = run_end(bytes, i + 1, digit);
    }
    if bytes.get(i) == Some(&b'e') {
        let mut j = i + 1;
        if matches!(bytes.get(j), Some(b'+' | b'-')) {
            j += 1;
        }
        if bytes.get(j).is_some_and(u8::is_ascii_digit) {
            i = run_end(bytes, j, digit);
        }
    }
    run_end(bytes, i, is_name_byte)
}

fn line_end(bytes: &[u8], from: usize) -> usize {
    bytes[from..]
        .iter()
        .position(|&b| b == b'\n' || b == b'\r')
        .map_or(bytes.len(), |n| from + n)
}

/// A string from its opening quote: closed at the next unescaped `"`, or unclosed at the line end.
fn string_end(bytes: &[u8], open: usize) -> (TokKind, usize) {
    let mut j = open + 1;
    while j < bytes.len() {
        match bytes[j] {
            b'"' => return (TokKind::Str { closed: true }, j + 1),
            b'\n' | b'\r' => break,
            // `\` escapes the next byte unless that byte ends the line; the rest of a
            // multi-byte character is never `"`, `\` or a line break, so stepping by bytes is safe.
            b'\\' if !matches!(bytes.get(j + 1), None | Some(b'\n' | b'\r')) => j += 2,
            _ => j += 1,
        }
    }
    (TokKind::Str { closed: false }, j.min(bytes.len()))
}

fn char_len(text: &str, i: usize) -> usize {
    text[i..].chars().next().map_or(1, char::len_utf8)
}

/// Records depths and partners; returns the first `(` nested deeper than `max_depth`.
fn pair_brackets(toks: &mut [Tok], max_depth: usize) -> Option<usize> {
    let mut braces: Vec<usize> = Vec::new();
    let mut parens: Vec<usize> = Vec::new();
    let mut too_deep = None;
    for i in 0..toks.len() {
        toks[i].brace_depth = braces.len();
        toks[i].paren_depth = parens.len();
        match toks[i].kind {
            TokKind::LBrace => {
                parens.clear();
                braces.push(i);
            }
            TokKind::RBrace => {
                parens.clear();
                if let Some(open) = braces.pop() {
                    toks[open].partner = Some(i);
                    toks[i].partner = Some(open);
                }
            }
            TokKind::LParen => {
                parens.push(i);
                if parens.len() > max_depth && too_deep.is_none() {
                    too_deep = Some(i);
                }
            }
            TokKind::RParen => {
                if let Some(open) = parens.pop() {
                    toks[open].partner = Some(i);
                    toks[i].partner = Some(open);
                }
            }
            _ => {}
        }
    }
    too_deep
}

#[cfg(test)]
mod tests {
    use super::*;

    fn kinds(text: &str) -> Vec<TokKind> {
        Scan::new(text, 64).toks.iter().map(|t| t.kind).collect()
    }

    #[test]
    fn strings_end_at_the_line_and_respect_escapes() {
        use TokKind::*;
        assert_eq!(kinds(r#""a\"b" x"#), vec![Str { closed: true }, Name]);
        assert_eq!(
            kinds("\"abc\nx"),
            vec![Str { closed: false }, Newline, Name]
        );
        assert_eq!(
            kinds("\"abc\\\nx"),
            vec![Str { closed: false }, Newline, Name]
        );
        assert_eq!(kinds("\"é\\é\""), vec![Str { closed: true }]);
    }

    #[test]
    fn numbers_keep_glued_units() {
        use TokKind::*;
        assert_eq!(
            kinds("85mm -1.5e3 85 mm"),
            vec![Number, Number, Number, Name]
        );
        assert_eq!(kinds("a-b"), vec![Name, Other, Name]);
    }

    #[test]
    fn braces_close_open_parens() {
        let scan = Scan::new("a { b(c }", 64);
        let open_paren = &scan.toks[3];
        assert_eq!(open_paren.kind, TokKind::LParen);
        assert_eq!(open_paren.partner, None);
        assert_eq!(scan.toks[1].partner, Some(5));
    }

    #[test]
    fn reports_the_first_paren_past_the_limit() {
        let scan = Scan::new("((((", 3);
        assert_eq!(scan.too_deep, Some(3));
    }

    #[test]
    fn finds_the_open_block() {
        let text = "figure a {\n x b\n}\nfigure c {\n y";
        let scan = Scan::new(text, 64);
        let at_x = text.find('x').unwrap();
        assert_eq!(scan.open_block_at(at_x), Some(2));
        assert_eq!(scan.open_block_at(text.find("figure c").unwrap()), None);
        assert_eq!(scan.open_block_at(text.len()), Some(11));
    }
}
