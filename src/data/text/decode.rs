//! Bytes of a text file → checked UTF-8, one chunk at a time.
//!
//! UTF-8 files are checked in place (a character cut by a chunk boundary waits for the next
//! chunk); files in another encoding are decoded with `encoding_rs`, without replacement, so a
//! byte sequence the encoding does not define is an error rather than a silent `�`. Decoded
//! text never holds a NUL byte. Offsets count bytes of the decoded text from its start; the
//! offset of a bad byte in the file itself is given by [`DecodeError::NotText`].

use std::io::{self, Read};

use encoding_rs::{DecoderResult, Encoding};

/// Bytes read from the file per chunk.
pub(super) const CHUNK: usize = 256 << 10;

/// Why the text stops.
#[derive(Debug)]
pub(super) enum DecodeError {
    Io(io::Error),
    /// Bytes that are not text in the file's encoding, at this offset of the file.
    NotText {
        file_offset: u64,
    },
    /// A NUL character.
    Nul,
    /// A character text cannot hold (a control character, U+FFFE, U+FFFF:
    /// [`crate::syntax::is_text_char`]), the first one.
    NotTextChar(char),
}

enum Kind {
    /// UTF-8: checked, not copied; `pending` holds the start of a character cut by the chunk.
    Utf8 { pending: Vec<u8> },
    /// Any other encoding: `raw[raw_start..]` is read but not yet decoded.
    Other {
        decoder: encoding_rs::Decoder,
        raw: Vec<u8>,
        raw_start: usize,
    },
}

/// The file being read, and how much of it.
struct Source<'b> {
    reader: Box<dyn Read + 'b>,
    /// Bytes read so far.
    read: u64,
    eof: bool,
}

impl Source<'_> {
    /// Reads one chunk into the room after `out.len()`; the count read (0 at the end).
    fn read_into(&mut self, out: &mut Vec<u8>) -> Result<usize, DecodeError> {
        let at = out.len();
        out.resize(at + CHUNK, 0);
        let n = loop {
            match self.reader.read(&mut out[at..]) {
                Ok(n) => break n,
                Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
                Err(e) => {
                    out.truncate(at);
                    return Err(DecodeError::Io(e));
                }
            }
        };
        out.truncate(at + n);
        self.read += n as u64;
        self.eof = n == 0;
        Ok(n)
    }
}

/// A text file's bytes, decoded into UTF-8 chunk by chunk.
pub(super) struct Decoder<'b> {
    source: Source<'b>,
    kind: Kind,
}

impl<'b> Decoder<'b> {
    pub(super) fn new(reader: Box<dyn Read + 'b>, encoding: &'static Encoding) -> Self {
        let kind = if encoding == encoding_rs::UTF_8 {
            Kind::Utf8 {
                pending: Vec::new(),
            }
        } else {
            Kind::Other {
                decoder: encoding.new_decoder_without_bom_handling(),
                raw: Vec::new(),
                raw_start: 0,
            }
        };
        Decoder {
            source: Source {
                reader,
                read: 0,
                eof: false,
            },
            kind,
        }
    }

    /// Bytes read from the file so far.
    pub(super) fn bytes_read(&self) -> u64 {
        self.source.read
    }

    /// Appends the next chunk of text to `out`; `Ok(false)` when the file has no more.
    pub(super) fn fill(&mut self, out: &mut Vec<u8>) -> Result<bool, DecodeError> {
        let start = out.len();
        loop {
            let more = match &mut self.kind {
                Kind::Utf8 { pending } => fill_utf8(&mut self.source, pending, out)?,
                Kind::Other {
                    decoder,
                    raw,
                    raw_start,
                } => fill_other(&mut self.source, decoder, raw, raw_start, out)?,
            };
            if out.len() > start || !more {
                break;
            }
        }
        if memchr::memchr(0, &out[start..]).is_some() {
            return Err(DecodeError::Nul);
        }
        if let Some(c) = first_not_text_char(&out[start..]) {
            return Err(DecodeError::NotTextChar(c));
        }
        Ok(out.len() > start)
    }
}

/// The first character of checked UTF-8 `text` that text cannot hold. Only the bytes that
/// can start one (a control byte, or the lead bytes of U+FFFE and U+FFFF) are looked at
/// closely, so plain text costs one pass over its bytes.
fn first_not_text_char(text: &[u8]) -> Option<char> {
    let suspect = |b: &u8| (*b < 0x20 && !matches!(b, b'\t' | b'\n' | b'\r')) || *b == 0xEF;
    let at = text.iter().position(suspect)?;
    // Back to a character boundary is not needed: the suspect bytes start characters.
    std::str::from_utf8(&text[at..])
        .unwrap_or_else(|e| std::str::from_utf8(&text[at..at + e.valid_up_to()]).unwrap_or(""))
        .chars()
        .find(|&c| !crate::syntax::is_text_char(c))
}

/// Reads one chunk of a UTF-8 file into `out` and checks it; `Ok(false)` at the end.
fn fill_utf8(
    source: &mut Source,
    pending: &mut Vec<u8>,
    out: &mut Vec<u8>,
) -> Result<bool, DecodeError> {
    let start = out.len();
    // The file offset of out[start]: what was read, less the cut character carried over.
    let file_offset = source.read - pending.len() as u64;
    out.append(pending);
    let n = source.read_into(out)?;
    if let Err(e) = std::str::from_utf8(&out[start..]) {
        let valid = start + e.valid_up_to();
        if e.error_len().is_some() || source.eof {
            return Err(DecodeError::NotText {
                file_offset: file_offset + e.valid_up_to() as u64,
            });
        }
        pending.extend_from_slice(&out[valid..]);
        out.truncate(valid);
    }
    Ok(n > 0)
}

/// Decodes what is read of a file in another encoding into `out`; `Ok(false)` at the end.
fn fill_other(
    source: &mut Source,
    decoder: &mut encoding_rs::Decoder,
    raw: &mut Vec<u8>,
    raw_start: &mut usize,
    out: &mut Vec<u8>,
) -> Result<bool, DecodeError> {
    if *raw_start == raw.len() && !source.eof {
        raw.clear();
        *raw_start = 0;
        source.read_into(raw)?;
    }
    let src = &raw[*raw_start..];
    let room = decoder
        .max_utf8_buffer_length_without_replacement(src.len())
        .unwrap_or(CHUNK * 4)
        .max(16);
    let at = out.len();
    out.resize(at + room, 0);
    let (result, read, written) =
        decoder.decode_to_utf8_without_replacement(src, &mut out[at..], source.eof);
    out.truncate(at + written);
    *raw_start += read;
    match result {
        DecoderResult::Malformed(bad, extra) => {
            let unread = (raw.len() - *raw_start) as u64;
            let back = u64::from(bad) + u64::from(extra);
            Err(DecodeError::NotText {
                file_offset: (source.read - unread).saturating_sub(back),
            })
        }
        DecoderResult::InputEmpty => Ok(!source.eof),
        DecoderResult::OutputFull => Ok(true),
    }
}

/// The whole of `bytes` decoded, or `None` when it is not text in `encoding` or holds a NUL
/// (for quoting a file's lines in diagnostics; the same bytes decode to the same text as the
/// chunks above).
pub(super) fn decode_whole(bytes: Vec<u8>, encoding: &'static Encoding) -> Option<String> {
    let text = if encoding == encoding_rs::UTF_8 {
        String::from_utf8(bytes).ok()?
    } else {
        encoding
            .decode_without_bom_handling_and_without_replacement(&bytes)?
            .into_owned()
    };
    (!text.contains('\0')).then_some(text)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reads everything through a reader that gives at most `step` bytes per call.
    fn decode(
        bytes: &[u8],
        encoding: &'static Encoding,
        step: usize,
    ) -> Result<Vec<u8>, DecodeError> {
        struct Trickle<'a>(&'a [u8], usize);
        impl Read for Trickle<'_> {
            fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
                let n = self.0.len().min(self.1).min(buf.len());
                buf[..n].copy_from_slice(&self.0[..n]);
                self.0 = &self.0[n..];
                Ok(n)
            }
        }
        let mut decoder = Decoder::new(Box::new(Trickle(bytes, step)), encoding);
        let mut out = Vec::new();
        while decoder.fill(&mut out)? {}
        Ok(out)
    }

    #[test]
    fn characters_cut_by_a_chunk_are_joined() {
        let text = "größe,Δt\n1,2\n";
        for step in 1..5 {
            let out = decode(text.as_bytes(), encoding_rs::UTF_8, step).expect("UTF-8");
            assert_eq!(out, text.as_bytes());
        }
    }

    #[test]
    fn bad_bytes_and_nul_are_found_where_they_are() {
        for step in [1, 3, 100] {
            let bad = decode(b"ab\ncd\xE9f\n", encoding_rs::UTF_8, step);
            assert!(
                matches!(bad, Err(DecodeError::NotText { file_offset: 5 })),
                "{bad:?}"
            );
            let cut = decode(b"abc\xE2\x82", encoding_rs::UTF_8, step);
            assert!(
                matches!(cut, Err(DecodeError::NotText { file_offset: 3 })),
                "{cut:?}"
            );
            let nul = decode(b"abc\0", encoding_rs::UTF_8, step);
            assert!(matches!(nul, Err(DecodeError::Nul)), "{nul:?}");
        }
    }

    #[test]
    fn windows_1252_is_decoded() {
        // 0xE9 is é and 0x80 is € in windows-1252 (WHATWG Encoding Standard index).
        let out = decode(b"caf\xE9,\x80\n", encoding_rs::WINDOWS_1252, 2).expect("decodes");
        assert_eq!(String::from_utf8(out).expect("UTF-8"), "café,€\n");
        assert_eq!(
            decode_whole(b"caf\xE9".to_vec(), encoding_rs::WINDOWS_1252).as_deref(),
            Some("café")
        );
    }

    #[test]
    fn multi_byte_encodings_report_bad_sequences() {
        // In Shift_JIS, 0x82 0xA0 is あ; 0x82 followed by 0x20 is not a character.
        let good = decode(b"\x82\xA0,1\n", encoding_rs::SHIFT_JIS, 1).expect("decodes");
        assert_eq!(String::from_utf8(good).expect("UTF-8"), "あ,1\n");
        let bad = decode(b"ab\x82 c", encoding_rs::SHIFT_JIS, 100);
        assert!(
            matches!(bad, Err(DecodeError::NotText { file_offset: 2 })),
            "{bad:?}"
        );
    }
}
