//! Getting a data file's bytes: the only I/O of the data stage.
//!
//! Files are opened read-only and never written. A file larger than
//! [`ReadLimits::max_file_bytes`] is refused from its size before any byte is read (and again
//! while reading, should it grow or report no size). The readers of each format read from the
//! [`Input`] opened here, and read it a second time only to quote lines in diagnostics.

use std::fs::File;
use std::io::{self, Cursor, Read};
use std::path::Path;

use crate::diag::{Code, Diagnostic};
use crate::files::{self, FileKind, ReadError};

use super::report::{file_label, quoted};
use super::spec::TableSpec;

/// Largest data file read by default: 1 GiB.
pub const MAX_FILE_BYTES: u64 = 1 << 30;

/// Most data errors shown in full per file; the rest are summed up in one more diagnostic.
pub const MAX_DIAGNOSTICS: usize = 20;

/// Most data rows read from one file (D0023).
pub const MAX_ROWS: usize = 100_000_000;

/// Longest row of a text file, in bytes (D0021); a longer one is not read into memory.
pub const MAX_ROW_BYTES: usize = 16 << 20;

/// Most distinct values of a nominal variable without `levels(...)` (D0022).
pub const MAX_LEVELS: usize = 10_000;

/// Most bytes the parts of a workbook may unpack to, in all (D0024).
pub const MAX_UNPACKED_BYTES: u64 = 2 << 30;

/// Resource limits for reading one data file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ReadLimits {
    /// Files larger than this many bytes are refused (D0002).
    pub max_file_bytes: u64,
    /// Errors shown in full per file before the summary (D0016).
    pub max_diagnostics: usize,
    /// Data rows read before the file is refused (D0023).
    pub max_rows: usize,
    /// Bytes one row of a text file may hold (D0021).
    pub max_row_bytes: usize,
    /// Distinct values of a categorical column without declared levels (D0022).
    pub max_levels: usize,
    /// Bytes the parts of a workbook may unpack to, as its zip directory declares them (D0024).
    pub max_unpacked_bytes: u64,
}

impl Default for ReadLimits {
    fn default() -> Self {
        ReadLimits {
            max_file_bytes: MAX_FILE_BYTES,
            max_diagnostics: MAX_DIAGNOSTICS,
            max_rows: MAX_ROWS,
            max_row_bytes: MAX_ROW_BYTES,
            max_levels: MAX_LEVELS,
            max_unpacked_bytes: MAX_UNPACKED_BYTES,
        }
    }
}

/// Where a table's bytes come from: the file the spec names, or bytes already in memory.
#[derive(Debug, Clone, Copy)]
pub(super) enum Input<'b> {
    File,
    Memory(&'b [u8]),
}

/// An opened input, read from its start.
pub(super) enum Opened<'b> {
    File(File),
    Memory(&'b [u8]),
}

impl<'b> Input<'b> {
    /// Opens the input, refusing a file that is missing, a folder, unreadable or too large.
    pub(super) fn open(
        self,
        spec: &TableSpec,
        limits: &ReadLimits,
    ) -> Result<Opened<'b>, Diagnostic> {
        match self {
            Input::File => open_file(spec, limits),
            Input::Memory(bytes) => {
                check_size(spec, limits, bytes.len())?;
                Ok(Opened::Memory(bytes))
            }
        }
    }

    /// Every byte of the input (for quoting lines in diagnostics), within the size limit.
    pub(super) fn read_all(
        self,
        spec: &TableSpec,
        limits: &ReadLimits,
    ) -> Result<Vec<u8>, Diagnostic> {
        let mut bytes = Vec::new();
        self.open(spec, limits)?
            .reader(limits)
            .read_to_end(&mut bytes)
            .map_err(|e| unreadable(spec, &e))?;
        check_size(spec, limits, bytes.len())?;
        Ok(bytes)
    }
}

impl<'b> Opened<'b> {
    /// A reader of the bytes that stops one byte past the size limit, so a file that grows
    /// while it is read is caught by [`check_size`] on the count read.
    pub(super) fn reader(self, limits: &ReadLimits) -> Box<dyn Read + 'b> {
        let most = limits.max_file_bytes.saturating_add(1);
        match self {
            Opened::File(file) => Box::new(file.take(most)),
            Opened::Memory(bytes) => Box::new(Cursor::new(bytes).take(most)),
        }
    }
}

/// Opens the file read-only through [`crate::files`], refusing it when it is missing, not a
/// regular file (a folder, a pipe, a device: refused at once, never waited on), unreadable or
/// too large — from its size, before any byte is read.
fn open_file<'b>(spec: &TableSpec, limits: &ReadLimits) -> Result<Opened<'b>, Diagnostic> {
    let path = spec.path.as_path();
    let (file, metadata) = files::open_regular(path).map_err(|e| match e {
        ReadError::NotFound => unreadable(spec, &io::ErrorKind::NotFound.into()),
        ReadError::NotRegular(FileKind::Folder) => file_error(
            spec,
            Code::Unreadable,
            format!("data file {} is a folder, not a file", quoted_path(path)),
            "point the data block at a CSV or TSV file",
        ),
        ReadError::NotRegular(kind) => file_error(
            spec,
            Code::Unreadable,
            format!(
                "data file {} is {}, not a regular file",
                quoted_path(path),
                kind.describe()
            ),
            "point the data block at a CSV or TSV file; only regular files are read",
        ),
        ReadError::TooLarge { size, .. } => too_large(spec, limits, size),
        ReadError::Io(e) => unreadable(spec, &e),
    })?;
    if metadata.len() > limits.max_file_bytes {
        return Err(too_large(spec, limits, Some(metadata.len())));
    }
    Ok(Opened::File(file))
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

/// 1-based line of a byte offset.
pub(super) fn line_of(bytes: &[u8], offset: usize) -> usize {
    1 + bytes[..offset.min(bytes.len())]
        .iter()
        .filter(|&&b| b == b'\n')
        .count()
}

fn quoted_path(path: &Path) -> String {
    quoted(&path.display().to_string())
}

/// An error about the file as a whole, labelled at the path in the spec.
pub(super) fn file_error(
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

pub(super) fn unreadable(spec: &TableSpec, error: &io::Error) -> Diagnostic {
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
