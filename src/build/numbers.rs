//! The manuscript numbers files of an output folder (see [`crate::numbers`]): when they are up
//! to date, and their bytes.
//!
//! The files of a folder depend on the formats asked for and on every figure built into the
//! folder: its name, its input hash and whether it was made (a failing figure has no
//! numbers). That is hashed like a figure's inputs and recorded in the manifest with the hash
//! of each file, so a no-op build reads no data for them and `build --check` needs no
//! computation: the files are up to date when the hash matches and every file is present
//! with its recorded bytes.

use std::collections::BTreeMap;
use std::path::Path;

use crate::numbers::{self, FigureNumbers, NumbersFormat};

use super::manifest::{outputs_freshness, Freshness, NumbersEntry};

/// A figure of the folder, as its numbers files see it.
pub struct Member<'a> {
    pub name: &'a str,
    /// Its input hash.
    pub inputs: &'a str,
    /// Whether it was made (its numbers are in the files).
    pub made: bool,
}

/// The hash of what a folder's numbers files are made from.
pub fn inputs_hash(formats: &[NumbersFormat], members: &[Member]) -> String {
    let mut sorted: Vec<&Member> = members.iter().collect();
    sorted.sort_by_key(|m| m.name);
    let mut h = blake3::Hasher::new();
    h.update(b"figura-numbers\0");
    for f in formats {
        h.update(f.word().as_bytes());
        h.update(b"\0");
    }
    for m in sorted {
        for field in [m.name, m.inputs, if m.made { "made" } else { "failed" }] {
            h.update(&(field.len() as u64).to_le_bytes());
            h.update(field.as_bytes());
        }
    }
    h.finalize().to_hex().to_string()
}

/// How the numbers files of `dir` compare with `inputs`.
pub fn freshness(
    dir: &Path,
    recorded: Option<&NumbersEntry>,
    formats: &[NumbersFormat],
    inputs: &str,
) -> Freshness {
    let Some(entry) = recorded else {
        return Freshness::Missing;
    };
    let wanted: Vec<&str> = formats.iter().map(|f| f.file_name()).collect();
    let have: Vec<&str> = entry.outputs.keys().map(String::as_str).collect();
    let mut wanted_sorted = wanted.clone();
    wanted_sorted.sort_unstable();
    if entry.inputs != inputs || have != wanted_sorted {
        return Freshness::Stale;
    }
    outputs_freshness(dir, &entry.outputs)
}

/// The files of the given formats for `figures`: (file name, bytes).
pub fn files(formats: &[NumbersFormat], figures: &[FigureNumbers]) -> Vec<(String, Vec<u8>)> {
    let addressed = numbers::address(figures);
    formats
        .iter()
        .map(|f| (f.file_name().to_string(), f.render(&addressed).into_bytes()))
        .collect()
}

/// The manifest entry of files just made.
pub fn entry(inputs: String, files: &[(String, Vec<u8>)]) -> NumbersEntry {
    let outputs: BTreeMap<String, String> = files
        .iter()
        .map(|(name, bytes)| (name.clone(), blake3::hash(bytes).to_hex().to_string()))
        .collect();
    NumbersEntry { inputs, outputs }
}
