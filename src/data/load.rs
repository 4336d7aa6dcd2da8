//! Getting a data file's bytes and text: the only I/O of the data stage.
//!
//! Files are opened read-only and never written, through [`crate::files`]: only a regular
//! file is read (a folder, a named pipe, a device such as `/dev/zero` is refused at once, never
//! waited on), and a file larger than [`ReadLimits::max_file_bytes`] is refused from its size
//! before any byte is read (and again while reading, should it grow). The text must be UTF-8
//! without NUL bytes or other characters that text cannot hold
//! ([`crate::syntax::is_text_char`]: they could not be written into an SVG); anything else is
//! one error naming the line and byte offset of the first bad character.

use std::io;
use std::path::Path;

use crate::diag::{Code, Diagnostic};
use crate::files::{self, FileKind, ReadError};
use crate::syntax::is_text_char;

use super::report::{file_label, quoted};
use super::spec::TableSpec;

/// Largest data file read by default: 1 GiB.
pub const MAX_FILE_BYTES: u64 = 1 << 30;

/// Most data errors shown in full per file; the rest are summed up in one more diagnostic.
pub const MAX_DIAGNOSTICS: usize = 20;

/// Resource limits for reading one data file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ReadLimits {
    /// Files larger than this many bytes are refused (D0002).
    pub max_file_bytes: u64,
    /// Errors shown in full per file before the summary (D0016).
    pub max_diagnostics: usize,
}

impl Default for ReadLimits {
    fn default() -> Self {
        ReadLimits {
            max_file_bytes: MAX_FILE_BYTES,
            max_diagnostics: MAX_DIAGNOSTICS,
        }
    }
}

/// Reads the whole file, refusing it when it is missing, not a regular file (a folder, a
/// pipe, a device), unreadable or too large — from its size, before any byte is read.
pub(super) fn read_bytes(spec: &TableSpec, limits: &ReadLimits) -> Result<Vec<u8>, Diagnostic> {
    files::read_regular(&spec.path, limits.max_file_bytes).map_err(|e| match e {
        ReadError::NotFound => unreadable(spec, &io::ErrorKind::NotFound.into()),
        ReadError::NotRegular(FileKind::Folder) => file_error(
            spec,
            Code::Unreadable,
            format!(
                "data file {} is a folder, not a file",
                quoted_path(&spec.path)
            ),
            "point the data block at a CSV or TSV file",
        ),
        ReadError::NotRegular(kind) => file_error(
            spec,
            Code::Unreadable,
            format!(
                "data file {} is {}, not a regular file",
                quoted_path(&spec.path),
                kind.describe()
            ),
            "point the data block at a CSV or TSV file; only regular files are read",
        ),
        ReadError::TooLarge { size, .. } => too_large(spec, limits, size),
        ReadError::Io(e) => unreadable(spec, &e),
    })
}

/// Refuses a byte buffer over the size limit.
pub(super) fn check_size(
    spec: &TableSpec,
    limits: &ReadLimits,
    n_bytes: usize,
) -> Result<(), Diagnostic> {
    let n_bytes = u64::try_from(n_bytes).unwrap_or(u64::MAX);
    if n_bytes > limits.max_file_bytes {
        return Err(too_large(spec, limits, None));
    }
    Ok(())
}

/// The file's text, when it is UTF-8 with no NUL byte.
pub(super) fn decode(spec: &TableSpec, bytes: Vec<u8>) -> Result<String, Diagnostic> {
    let text = String::from_utf8(bytes).map_err(|e| {
        let bad_at = e.utf8_error().valid_up_to();
        not_utf8(spec, e.as_bytes(), bad_at)
    })?;
    if let Some(nul_at) = text.bytes().position(|b| b == 0) {
        let line = line_of(text.as_bytes(), nul_at);
        return Err(file_error(
            spec,
            Code::NulByte,
            format!(
                "data file {} holds a NUL byte at line {line}, byte offset {nul_at}",
                file_label(&spec.path)
            ),
            "it looks like UTF-16 text or a file that is not text; save it as CSV in UTF-8",
        ));
    }
    if let Some((at, c)) = text.char_indices().find(|&(_, c)| !is_text_char(c)) {
        let line = line_of(text.as_bytes(), at);
        return Err(file_error(
            spec,
            Code::NotTextChar,
            format!(
                "data file {} holds the character U+{:04X} at line {line}, byte offset {at}, \
                 which text cannot hold",
                file_label(&spec.path),
                c as u32
            ),
            "remove it: control characters cannot be drawn or written into an SVG file; \
             a file that holds many was probably not saved as plain CSV",
        ));
    }
    Ok(text)
}

fn line_of(bytes: &[u8], offset: usize) -> usize {
    1 + bytes[..offset.min(bytes.len())]
        .iter()
        .filter(|&&b| b == b'\n')
        .count()
}

fn quoted_path(path: &Path) -> String {
    quoted(&path.display().to_string())
}

/// An error about the file as a whole, labelled at the path in the spec.
fn file_error(
    spec: &TableSpec,
    code: Code,
    message: String,
    help: impl Into<String>,
) -> Diagnostic {
    Diagnostic::new(code, message)
        .with_label(spec.path_span, "data file")
        .with_help(help)
        .with_file(&spec.path)
}

fn unreadable(spec: &TableSpec, error: &io::Error) -> Diagnostic {
    let path = quoted_path(&spec.path);
    match error.kind() {
        io::ErrorKind::NotFound => file_error(
            spec,
            Code::Unreadable,
            format!("data file {path} does not exist"),
            not_found_help(&spec.path),
        ),
        io::ErrorKind::PermissionDenied => file_error(
            spec,
            Code::Unreadable,
            format!("data file {path} cannot be read: permission denied"),
            "give yourself permission to read the file",
        ),
        _ => file_error(
            spec,
            Code::Unreadable,
            format!("data file {path} cannot be read: {error}"),
            "check that the path names a readable file",
        ),
    }
}

/// A close file name in the same folder, or a reminder of how paths are resolved.
fn not_found_help(path: &Path) -> String {
    let relative = "paths in a data block are relative to the spec file";
    let (Some(folder), Some(wanted)) = (path.parent(), path.file_name().and_then(|n| n.to_str()))
    else {
        return relative.to_owned();
    };
    let Ok(entries) = std::fs::read_dir(folder) else {
        return format!(
            "the folder {} does not exist either; {relative}",
            quoted_path(folder)
        );
    };
    let mut names: Vec<String> = entries
        .filter_map(|entry| entry.ok()?.file_name().into_string().ok())
        .collect();
    names.sort();
    match crate::diag::did_you_mean(wanted, names.iter().map(String::as_str)) {
        Some(close) => format!("did you mean {}? {relative}", quoted(close)),
        None => relative.to_owned(),
    }
}

fn too_large(spec: &TableSpec, limits: &ReadLimits, size: Option<u64>) -> Diagnostic {
    let size = size.map_or_else(String::new, |n| format!(" ({n} bytes)"));
    file_error(
        spec,
        Code::TooLarge,
        format!(
            "data file {} is larger than the limit of {} bytes{size}",
            file_label(&spec.path),
            limits.max_file_bytes
        ),
        "a figure needs far less data; read a summary or a sample of the file",
    )
}

fn not_utf8(spec: &TableSpec, bytes: &[u8], bad_at: usize) -> Diagnostic {
    let bad_byte = bytes.get(bad_at).copied().unwrap_or(0);
    let line = line_of(bytes, bad_at);
    let help = if bytes.starts_with(&[0xFF, 0xFE]) || bytes.starts_with(&[0xFE, 0xFF]) {
        "the file is UTF-16 text; save it as CSV in UTF-8".to_owned()
    } else if bytes.starts_with(b"PK\x03\x04") {
        "this looks like a spreadsheet workbook, not a CSV file; export the sheet as CSV in UTF-8"
            .to_owned()
    } else {
        format!(
            "save the file as CSV in UTF-8 (the bytes near it are {})",
            quoted(&String::from_utf8_lossy(context(bytes, bad_at)))
        )
    };
    file_error(
        spec,
        Code::NotUtf8,
        format!(
            "data file {} is not UTF-8 text: byte 0x{bad_byte:02X} at line {line}, \
             byte offset {bad_at}",
            file_label(&spec.path)
        ),
        help,
    )
}

/// Up to 20 bytes on each side of `at`, within its line.
fn context(bytes: &[u8], at: usize) -> &[u8] {
    let at = at.min(bytes.len());
    let line_start = bytes[..at]
        .iter()
        .rposition(|&b| b == b'\n')
        .map_or(0, |i| i + 1);
    let line_end = bytes[at..]
        .iter()
        .position(|&b| b == b'\n')
        .map_or(bytes.len(), |i| at + i);
    let start = line_start.max(at.saturating_sub(20));
    let end = line_end.min(at.saturating_add(20));
    &bytes[start..end.max(start)]
}
