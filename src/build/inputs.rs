//! What a figure depends on, summed up in one content hash (BLAKE3).
//!
//! A figure's inputs are: the text of its own `figure` block; the rest of its spec file except
//! the other figures' blocks (its data blocks and include lines); the full text of every file
//! it sees through includes, transitively; the bytes of its data file; the project defaults;
//! and the tool's version. A change in one figure's block therefore rebuilds that figure only,
//! while a change in a data block or an included file rebuilds every figure of the file.
//!
//! The spec part and the data file's hash are kept apart too ([`FigureHashes`]): every output
//! file records them as its provenance.
//!
//! Files are hashed through [`crate::files`]: regular files only, a data file's size checked
//! against the data stage's limit before any byte is read.
//!
//! Guarantees: the hash is a pure function of those inputs (no paths, times or spans enter it,
//! so moving a block within its file or renaming the spec file changes nothing); fields are
//! length-prefixed, so no two different inputs run together into the same byte stream.

use std::collections::BTreeMap;
use std::io::Read as _;
use std::path::{Path, PathBuf};

use crate::check::{FigureDefaults, FigurePlan, SpecUnit};
use crate::data;
use crate::diag::{SourceId, SourceMap};
use crate::files;
use crate::syntax::ast::{Block, Item};

/// Where each buildable figure's block is: figure name → (unit index, block).
/// When two blocks share a name the first one wins (the checker rejects the second).
pub fn figure_blocks(units: &[SpecUnit]) -> BTreeMap<&str, (usize, &Block)> {
    let mut out = BTreeMap::new();
    for (idx, unit) in units.iter().enumerate() {
        if !unit.build_figures {
            continue;
        }
        for block in figure_blocks_of(unit) {
            out.entry(block.name.name.as_str()).or_insert((idx, block));
        }
    }
    out
}

/// The `figure` blocks of one file, in order.
pub fn figure_blocks_of(unit: &SpecUnit) -> impl Iterator<Item = &Block> {
    unit.ast.items.iter().filter_map(|item| match item {
        Item::Block(b) if b.kind.name == "figure" => Some(b),
        _ => None,
    })
}

/// A figure's hashes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct FigureHashes {
    /// Everything the figure depends on: decides whether it is rebuilt.
    pub inputs: blake3::Hash,
    /// The spec text it depends on: its block, the rest of its file except other figures'
    /// blocks, and every file it sees through includes.
    pub spec: blake3::Hash,
    /// The bytes of its data file (`None` when it cannot be read).
    pub data: Option<blake3::Hash>,
}

/// Computes figures' input hashes; data files are hashed once each.
pub struct InputHasher<'a> {
    units: &'a [SpecUnit],
    unit_sources: &'a [SourceId],
    sources: &'a SourceMap,
    /// Text of the settings every figure shares: tool version and project defaults.
    shared: String,
    data: BTreeMap<PathBuf, Option<blake3::Hash>>,
}

impl<'a> InputHasher<'a> {
    pub fn new(
        units: &'a [SpecUnit],
        unit_sources: &'a [SourceId],
        sources: &'a SourceMap,
        tool_version: &str,
        defaults: &FigureDefaults,
    ) -> Self {
        let f = defaults.formats;
        let shared = format!(
            "tool={tool_version};formats=svg:{},png:{},pdf:{},tiff:{},text:{:?};dpi={}",
            f.svg, f.png, f.pdf, f.tiff, f.text, defaults.dpi
        );
        InputHasher {
            units,
            unit_sources,
            sources,
            shared,
            data: BTreeMap::new(),
        }
    }

    /// The hashes of a figure written in block `block` of unit `unit`, reading `data_path`.
    pub fn figure(&mut self, unit: usize, block: &Block, data_path: &Path) -> FigureHashes {
        let mut spec = blake3::Hasher::new();
        field(&mut spec, "figure", self.text(block.span).as_bytes());
        self.context(&mut spec, unit);
        for &seen in &self.units[unit].sees {
            let id = self.unit_sources[seen];
            field(&mut spec, "include", self.sources.text(id).as_bytes());
        }
        let spec = spec.finalize();
        let data = self.data_hash(data_path);
        let mut h = blake3::Hasher::new();
        field(&mut h, "figura-inputs", b"2");
        field(&mut h, "shared", self.shared.as_bytes());
        field(&mut h, "spec", spec.as_bytes());
        match data {
            Some(d) => field(&mut h, "data", d.as_bytes()),
            None => field(&mut h, "data-unreadable", b""),
        }
        FigureHashes {
            inputs: h.finalize(),
            spec,
            data,
        }
    }

    /// The hashes of a checked figure (its block is found by name).
    pub fn plan(
        &mut self,
        blocks: &BTreeMap<&str, (usize, &Block)>,
        plan: &FigurePlan,
        data_path: &Path,
    ) -> Option<FigureHashes> {
        let &(unit, block) = blocks.get(plan.name.as_str())?;
        Some(self.figure(unit, block, data_path))
    }

    /// Everything of the figure's own file except figure blocks: data blocks and includes.
    fn context(&self, h: &mut blake3::Hasher, unit: usize) {
        for item in &self.units[unit].ast.items {
            let span = match item {
                Item::Include(inc) => inc.span,
                Item::Block(b) if b.kind.name != "figure" => b.span,
                Item::Block(_) => continue,
            };
            field(h, "item", self.text(span).as_bytes());
        }
    }

    fn text(&self, span: crate::diag::Span) -> &str {
        self.sources.slice(span)
    }

    /// The hash of a data file's bytes; `None` when it cannot be read.
    fn data_hash(&mut self, path: &Path) -> Option<blake3::Hash> {
        if let Some(known) = self.data.get(path) {
            return *known;
        }
        // A file over the data stage's limit is not hashed: reading it reports the error.
        let hash = hash_file_within(path, data::MAX_FILE_BYTES);
        self.data.insert(path.to_path_buf(), hash);
        hash
    }
}

/// The BLAKE3 hash of a regular file's bytes; `None` when it cannot be read or is not a
/// regular file (a pipe or a device is never read, so hashing cannot hang).
pub fn hash_file(path: &Path) -> Option<blake3::Hash> {
    hash_file_within(path, u64::MAX)
}

/// Like [`hash_file`], and `None` for a file larger than `limit` bytes, known from its size
/// before any byte is read.
pub fn hash_file_within(path: &Path, limit: u64) -> Option<blake3::Hash> {
    let (file, metadata) = files::open_regular(path).ok()?;
    if metadata.len() > limit {
        return None;
    }
    let mut h = blake3::Hasher::new();
    h.update_reader(file.take(limit.saturating_add(1))).ok()?;
    Some(h.finalize())
}

fn field(h: &mut blake3::Hasher, tag: &str, bytes: &[u8]) {
    h.update(tag.as_bytes());
    h.update(&[0]);
    h.update(&(bytes.len() as u64).to_le_bytes());
    h.update(bytes);
}
