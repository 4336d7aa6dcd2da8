//! Reading a git repository through the `git` command: revisions and the files of a commit.
//!
//! Guarantees: nothing here writes to the repository or its work tree. A commit's files are
//! read as blobs (`git ls-tree`, `git cat-file --batch`) and written into a folder the caller
//! owns; paths that would leave that folder are refused.

use std::io::{BufRead, BufReader, Write as _};
use std::path::{Component, Path, PathBuf};
use std::process::{Command, Stdio};

use super::ReviewError;

/// A repository, addressed by its top folder.
#[derive(Debug, Clone)]
pub struct Repo {
    top: PathBuf,
}

fn git_error(what: &str, detail: impl std::fmt::Display) -> ReviewError {
    ReviewError::Git(format!("{what}: {detail}"))
}

/// Runs `git` in `dir` and returns its standard output.
fn run(dir: &Path, args: &[&str]) -> Result<Vec<u8>, ReviewError> {
    let out = Command::new("git")
        .arg("-C")
        .arg(dir)
        .args(args)
        .stdin(Stdio::null())
        .output()
        .map_err(|e| git_error("cannot run git", e))?;
    if !out.status.success() {
        let stderr = String::from_utf8_lossy(&out.stderr);
        return Err(git_error(
            &format!("`git {}` failed", args.join(" ")),
            stderr.trim(),
        ));
    }
    Ok(out.stdout)
}

fn text(bytes: Vec<u8>) -> String {
    String::from_utf8_lossy(&bytes)
        .trim_end_matches('\n')
        .to_owned()
}

impl Repo {
    /// The repository holding `dir`.
    pub fn discover(dir: &Path) -> Result<Repo, ReviewError> {
        let top = text(run(dir, &["rev-parse", "--show-toplevel"])?);
        Ok(Repo {
            top: PathBuf::from(top),
        })
    }

    pub fn top(&self) -> &Path {
        &self.top
    }

    /// The path of `dir` inside the repository (`""` at the top, else ending in `/`).
    pub fn prefix_of(dir: &Path) -> Result<String, ReviewError> {
        Ok(text(run(dir, &["rev-parse", "--show-prefix"])?))
    }

    /// The full commit id a revision names, or `None` when it names no commit.
    pub fn commit(&self, rev: &str) -> Option<String> {
        if rev.starts_with('-') {
            return None;
        }
        let spec = format!("{rev}^{{commit}}");
        run(
            &self.top,
            &[
                "rev-parse",
                "--verify",
                "--quiet",
                "--end-of-options",
                &spec,
            ],
        )
        .ok()
        .map(text)
        .filter(|id| !id.is_empty())
    }

    /// Writes every file of `commit` into `dest` (which must exist). Submodules are skipped;
    /// symbolic links are recreated where the system has them.
    pub fn extract(&self, commit: &str, dest: &Path) -> Result<(), ReviewError> {
        let listing = run(&self.top, &["ls-tree", "-r", "-z", "--full-tree", commit])?;
        let entries = parse_ls_tree(&listing)?;
        let blobs: Vec<&TreeEntry> = entries.iter().filter(|e| e.kind == "blob").collect();
        let contents = self.read_blobs(&blobs)?;
        for (entry, bytes) in blobs.iter().zip(contents) {
            let path = dest.join(safe_relative(&entry.path)?);
            if let Some(parent) = path.parent() {
                std::fs::create_dir_all(parent).map_err(|e| ReviewError::io(parent, e))?;
            }
            write_entry(&path, &entry.mode, &bytes)?;
        }
        Ok(())
    }

    /// The contents of the given blobs, in order, read through one `git cat-file --batch`.
    fn read_blobs(&self, blobs: &[&TreeEntry]) -> Result<Vec<Vec<u8>>, ReviewError> {
        let mut child = Command::new("git")
            .arg("-C")
            .arg(&self.top)
            .args(["cat-file", "--batch"])
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .map_err(|e| git_error("cannot run git", e))?;
        let mut stdin = child
            .stdin
            .take()
            .ok_or_else(|| git_error("git cat-file", "no input pipe"))?;
        let ids: String = blobs.iter().map(|b| format!("{}\n", b.id)).collect();
        // Written from another thread so that neither pipe can fill up and block the other.
        let writer = std::thread::spawn(move || stdin.write_all(ids.as_bytes()));
        let stdout = child
            .stdout
            .take()
            .ok_or_else(|| git_error("git cat-file", "no output pipe"))?;
        let mut reader = BufReader::new(stdout);
        let result = blobs
            .iter()
            .map(|b| read_one_blob(&mut reader, &b.id))
            .collect::<Result<Vec<_>, _>>();
        let written = writer.join();
        let status = child.wait().map_err(|e| git_error("git cat-file", e))?;
        let contents = result?;
        match written {
            Ok(Ok(())) if status.success() => Ok(contents),
            _ => Err(git_error("git cat-file", "did not finish")),
        }
    }
}

/// One object of `git cat-file --batch` output: `<id> <type> <size>\n<bytes>\n`.
fn read_one_blob(reader: &mut impl BufRead, id: &str) -> Result<Vec<u8>, ReviewError> {
    let mut header = String::new();
    reader
        .read_line(&mut header)
        .map_err(|e| git_error("git cat-file", e))?;
    let mut fields = header.split_whitespace();
    let (Some(got), Some("blob"), Some(size)) = (fields.next(), fields.next(), fields.next())
    else {
        return Err(git_error(
            "git cat-file",
            format!("cannot read object {id}"),
        ));
    };
    let size: usize = size
        .parse()
        .map_err(|_| git_error("git cat-file", format!("bad size for {got}")))?;
    let mut bytes = vec![0; size];
    reader
        .read_exact(&mut bytes)
        .map_err(|e| git_error("git cat-file", e))?;
    let mut newline = [0u8; 1];
    reader
        .read_exact(&mut newline)
        .map_err(|e| git_error("git cat-file", e))?;
    Ok(bytes)
}

/// One line of `git ls-tree -r -z`: `<mode> <type> <id>\t<path>`.
#[derive(Debug, PartialEq)]
struct TreeEntry {
    mode: String,
    kind: String,
    id: String,
    path: String,
}

fn parse_ls_tree(listing: &[u8]) -> Result<Vec<TreeEntry>, ReviewError> {
    listing
        .split(|&b| b == 0)
        .filter(|record| !record.is_empty())
        .map(|record| {
            let record = std::str::from_utf8(record)
                .map_err(|_| git_error("git ls-tree", "a path is not UTF-8"))?;
            let (meta, path) = record
                .split_once('\t')
                .ok_or_else(|| git_error("git ls-tree", "unexpected output"))?;
            let mut fields = meta.split(' ');
            match (fields.next(), fields.next(), fields.next()) {
                (Some(mode), Some(kind), Some(id)) => Ok(TreeEntry {
                    mode: mode.to_owned(),
                    kind: kind.to_owned(),
                    id: id.to_owned(),
                    path: path.to_owned(),
                }),
                _ => Err(git_error("git ls-tree", "unexpected output")),
            }
        })
        .collect()
}

/// A repository path as a relative path that stays inside the destination folder.
fn safe_relative(path: &str) -> Result<PathBuf, ReviewError> {
    let p = Path::new(path);
    if p.components().all(|c| matches!(c, Component::Normal(_))) {
        Ok(p.to_path_buf())
    } else {
        Err(git_error(
            "git ls-tree",
            format!("refusing the path `{path}`"),
        ))
    }
}

fn write_entry(path: &Path, mode: &str, bytes: &[u8]) -> Result<(), ReviewError> {
    if mode == "120000" {
        #[cfg(unix)]
        {
            let target = String::from_utf8_lossy(bytes).into_owned();
            return std::os::unix::fs::symlink(target, path).map_err(|e| ReviewError::io(path, e));
        }
    }
    std::fs::write(path, bytes).map_err(|e| ReviewError::io(path, e))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ls_tree_records_are_read() {
        let out = b"100644 blob 0123abcd\tdata/a b.csv\x00160000 commit 89ef\tsub\x00";
        let entries = parse_ls_tree(out).unwrap();
        assert_eq!(entries.len(), 2);
        assert_eq!(entries[0].path, "data/a b.csv");
        assert_eq!(entries[1].kind, "commit");
    }

    #[test]
    fn paths_leaving_the_folder_are_refused() {
        assert!(safe_relative("a/b.figura").is_ok());
        assert!(safe_relative("../x").is_err());
        assert!(safe_relative("/etc/passwd").is_err());
    }

    #[test]
    fn batch_output_is_split_into_blobs() {
        let mut input: &[u8] = b"aa blob 3\nabc\nbb blob 0\n\n";
        assert_eq!(read_one_blob(&mut input, "aa").unwrap(), b"abc");
        assert_eq!(read_one_blob(&mut input, "bb").unwrap(), b"");
    }
}
