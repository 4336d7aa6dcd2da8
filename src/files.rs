//! Opening input files without surprises: regular files only, their size known before a
//! byte is read.
//!
//! Every file Figura reads as input — spec files, data files, `figura.toml`, the outputs and
//! manifests it compares with — is opened here. A path may name anything: a folder, a named
//! pipe (FIFO) that blocks a reader until someone writes to it, a device such as `/dev/zero`
//! that never ends, or a link to one of these. [`open_regular`] opens without blocking (on
//! Unix, with `O_NONBLOCK`, which a regular file ignores), then asks the open file what it
//! is, so a file swapped between a check and the open cannot slip through; anything but a
//! regular file is refused with its kind named. [`read_regular`] also refuses a file larger
//! than a limit from its size, before reading, and stops reading one byte past the limit
//! should the file grow.
//!
//! Invariant: files are opened for reading only. A leaf module: it knows no stage.

use std::fmt;
use std::fs::{File, Metadata, OpenOptions};
use std::io::{self, Read};
use std::path::Path;

/// Why an input file was not read.
#[derive(Debug)]
pub enum ReadError {
    /// Nothing exists at the path.
    NotFound,
    /// Something exists, but it is not a regular file.
    NotRegular(FileKind),
    /// The file is larger than the limit (`size` is `None` when found while reading).
    TooLarge { size: Option<u64>, limit: u64 },
    /// Any other failure of the system (permissions, a broken disk, ...).
    Io(io::Error),
}

/// What a path names when it is not a regular file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FileKind {
    Folder,
    /// A named pipe (FIFO).
    Pipe,
    /// A device such as `/dev/zero` or a terminal.
    Device,
    Socket,
    /// Anything else that is not a regular file.
    Other,
}

impl FileKind {
    /// The kind of what `metadata` describes (a regular file is [`FileKind::Other`]).
    pub fn of(metadata: &Metadata) -> FileKind {
        let kind = metadata.file_type();
        if kind.is_dir() {
            return FileKind::Folder;
        }
        #[cfg(unix)]
        {
            use std::os::unix::fs::FileTypeExt;
            if kind.is_fifo() {
                return FileKind::Pipe;
            }
            if kind.is_char_device() || kind.is_block_device() {
                return FileKind::Device;
            }
            if kind.is_socket() {
                return FileKind::Socket;
            }
        }
        FileKind::Other
    }

    /// The kind in words, with an article: "a folder", "a named pipe (FIFO)", ...
    pub fn describe(self) -> &'static str {
        match self {
            FileKind::Folder => "a folder",
            FileKind::Pipe => "a named pipe (FIFO)",
            FileKind::Device => "a device",
            FileKind::Socket => "a socket",
            FileKind::Other => "not a regular file",
        }
    }
}

impl fmt::Display for ReadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ReadError::NotFound => write!(f, "no such file"),
            ReadError::NotRegular(FileKind::Other) => write!(f, "not a regular file"),
            ReadError::NotRegular(kind) => write!(f, "{}, not a regular file", kind.describe()),
            ReadError::TooLarge {
                size: Some(size),
                limit,
            } => write!(f, "{size} bytes, more than the limit of {limit} bytes"),
            ReadError::TooLarge { size: None, limit } => {
                write!(f, "more than the limit of {limit} bytes")
            }
            ReadError::Io(e) => write!(f, "{e}"),
        }
    }
}

impl From<io::Error> for ReadError {
    fn from(e: io::Error) -> Self {
        if e.kind() == io::ErrorKind::NotFound {
            ReadError::NotFound
        } else {
            ReadError::Io(e)
        }
    }
}

/// Opens `path` for reading when it is a regular file (links followed), without ever
/// blocking; returns the open file and what it says about itself.
pub fn open_regular(path: &Path) -> Result<(File, Metadata), ReadError> {
    let mut options = OpenOptions::new();
    options.read(true);
    #[cfg(unix)]
    {
        use std::os::unix::fs::OpenOptionsExt;
        options.custom_flags(libc::O_NONBLOCK);
    }
    let file = options.open(path)?;
    let metadata = file.metadata()?;
    if !metadata.is_file() {
        return Err(ReadError::NotRegular(FileKind::of(&metadata)));
    }
    Ok((file, metadata))
}

/// The bytes of the regular file at `path`, refused when it is larger than `limit` bytes
/// (from its size before reading, and again while reading).
pub fn read_regular(path: &Path, limit: u64) -> Result<Vec<u8>, ReadError> {
    let (file, metadata) = open_regular(path)?;
    if metadata.len() > limit {
        return Err(ReadError::TooLarge {
            size: Some(metadata.len()),
            limit,
        });
    }
    let mut bytes = Vec::with_capacity(usize::try_from(metadata.len()).unwrap_or(0));
    file.take(limit.saturating_add(1)).read_to_end(&mut bytes)?;
    if bytes.len() as u64 > limit {
        return Err(ReadError::TooLarge { size: None, limit });
    }
    Ok(bytes)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_regular_file_is_read_and_a_folder_is_refused() {
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("a.csv");
        std::fs::write(&file, "x\n1\n").unwrap();
        assert_eq!(read_regular(&file, 100).unwrap(), b"x\n1\n");
        assert!(matches!(
            read_regular(&file, 3),
            Err(ReadError::TooLarge {
                size: Some(4),
                limit: 3
            })
        ));
        assert!(matches!(
            read_regular(dir.path(), 100),
            Err(ReadError::NotRegular(FileKind::Folder))
        ));
        assert!(matches!(
            read_regular(&dir.path().join("nothing"), 100),
            Err(ReadError::NotFound)
        ));
    }

    #[cfg(unix)]
    #[test]
    fn devices_and_pipes_are_refused_without_blocking() {
        let dir = tempfile::tempdir().unwrap();
        let fifo = dir.path().join("pipe.csv");
        let made = std::process::Command::new("mkfifo").arg(&fifo).status();
        assert!(made.is_ok_and(|s| s.success()), "mkfifo is needed");
        assert!(matches!(
            read_regular(&fifo, 100),
            Err(ReadError::NotRegular(FileKind::Pipe))
        ));
        assert!(matches!(
            read_regular(Path::new("/dev/zero"), 100),
            Err(ReadError::NotRegular(FileKind::Device))
        ));
        let link = dir.path().join("zero.csv");
        std::os::unix::fs::symlink("/dev/zero", &link).unwrap();
        assert!(matches!(
            read_regular(&link, 100),
            Err(ReadError::NotRegular(FileKind::Device))
        ));
    }
}
