//! The manifest: the one file that says what the store holds, which segment files are live, and
//! which input files they came from. It is written last and atomically, so it is the store's
//! commit point.

use crate::corpus::Skipped;
use crate::error::StoreError;
use serde::{Deserialize, Serialize};
use std::collections::BTreeSet;
use std::fs::{self, File};
use std::io::Write;
use std::path::Path;

/// Version of the store layout. Bump on any incompatible change. 2: index terms are stemmed by
/// the variable-key stemmer (they were stemmed by a newer Snowball, which differs on words such
/// as "organism" and "internal", so queries by key missed their sentences). 3: the index keeps a
/// sentence's path, line and start as columns and no stored fields, so a version 2 index has
/// nothing a co-mention query can read. 4: rows are written as claims arrive (postcard records
/// back to back, no count first), a file may have several row ranges (`merge` of a path that
/// recurs), and every sentence carries its file as a term, so replacing a file drops all its
/// sentences (version 3 deleted by the new content's document ids, which kept the sentences of
/// records a changed file no longer has). 5: every segment has postings (`seg-NNNNNN.post`,
/// variable key to rows), which `pair` and `claims --cause/--effect/--var` read instead of every
/// row; claim records are zstd-compressed in blocks (`seg-NNNNNN.jsonl.zst`, a claim's place is
/// its block and its bytes within); a version 4 store has neither. 6: every live segment has
/// aggregate tables (`seg-NNNNNN.<live rows>.agg`: per variable key and per relation), which
/// the aggregate-reading queries read instead of the rows, and every commit writes the store's
/// vocabulary (`vocabulary-NNNNNN.json.zst`: per file, abbreviation definitions and the heads of
/// variable keys), which `variables` and `--roll-up` read; a version 5 store has neither.
/// 7: rows and postings in compressed blocks, and rows no longer name their segment. 8: the
/// search index's document store is zstd-compressed (version 7's was lz4), which a binary made
/// for version 7 cannot open.
pub(super) const STORE_VERSION: u32 = 8;

/// One input file as the store knows it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileEntry {
    pub path: String,
    pub size: u64,
    /// Modification time in nanoseconds since the epoch, for the cheap "unchanged" check.
    pub mtime_ns: u128,
    /// BLAKE3 of the content, for the exact one.
    pub hash: String,
    pub documents: u64,
    pub sentences: u64,
    pub claims: u64,
    /// Which segment holds this file's claims, and which rows of it.
    pub segment: u32,
    pub rows: (u64, u64),
    /// Further row ranges in the same segment, after `rows` (a path whose records `merge` met
    /// in more than one place).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub more_rows: Vec<(u64, u64)>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub warnings: Vec<String>,
}

/// What the store holds.
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
pub struct Manifest {
    pub store_version: u32,
    pub claim_schema: u32,
    pub generation: u64,
    pub hearsay_version: String,
    pub patterns: String,
    /// The pattern set's fingerprint ([`crate::patterns::PatternSet::fingerprint`]) the files
    /// were read with.
    #[serde(default)]
    pub patterns_fingerprint: String,
    pub files: Vec<FileEntry>,
    /// Files the last scan passed over, with reasons.
    pub skipped: Vec<Skipped>,
    /// Files the last scan could not read, with reasons.
    pub failed: Vec<Skipped>,
}

impl FileEntry {
    /// A file about to be read: known metadata, nothing stored yet.
    pub fn new(path: &str) -> FileEntry {
        FileEntry {
            path: path.to_string(),
            size: 0,
            mtime_ns: 0,
            hash: String::new(),
            documents: 0,
            sentences: 0,
            claims: 0,
            segment: 0,
            rows: (0, 0),
            more_rows: Vec::new(),
            warnings: Vec::new(),
        }
    }

    /// The file's row ranges in its segment, in order.
    pub fn row_ranges(&self) -> impl Iterator<Item = (u64, u64)> + '_ {
        std::iter::once(self.rows).chain(self.more_rows.iter().copied())
    }
}

impl Manifest {
    pub fn segments(&self) -> BTreeSet<u32> {
        self.files
            .iter()
            .filter(|f| f.claims > 0)
            .map(|f| f.segment)
            .collect()
    }
    pub fn totals(&self) -> (u64, u64, u64) {
        self.files.iter().fold((0, 0, 0), |(d, s, c), f| {
            (d + f.documents, s + f.sentences, c + f.claims)
        })
    }
}

pub(super) fn seg_name(seg: u32, ext: &str) -> String {
    format!("seg-{seg:06}.{ext}")
}

/// Write `bytes` to `path` atomically: a temporary file, fsync, rename.
pub(super) fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), StoreError> {
    let tmp = path.with_extension("tmp");
    let mut f = File::create(&tmp).map_err(|e| StoreError::io(&tmp, e))?;
    f.write_all(bytes)
        .and_then(|_| f.sync_all())
        .map_err(|e| StoreError::io(&tmp, e))?;
    fs::rename(&tmp, path).map_err(|e| StoreError::io(path, e))?;
    if let Some(parent) = path.parent() {
        if let Ok(d) = File::open(parent) {
            let _ = d.sync_all();
        }
    }
    Ok(())
}

/// The number of a segment file's name (`seg-000012.rows` → 12), or `None` for any other file.
pub(super) fn segment_number(file_name: &str) -> Option<u32> {
    file_name
        .strip_prefix("seg-")
        .and_then(|r| r.split('.').next())
        .and_then(|n| n.parse::<u32>().ok())
}

/// The manifest of the store at `dir`, checked to be of this store version and claim schema.
pub(super) fn load(dir: &Path) -> Result<Manifest, StoreError> {
    let mpath = dir.join("manifest.json");
    if !mpath.exists() {
        return Err(StoreError::Missing(dir.to_path_buf()));
    }
    let text = fs::read_to_string(&mpath).map_err(|e| StoreError::io(&mpath, e))?;
    let manifest: Manifest = serde_json::from_str(&text).map_err(|e| StoreError::Corrupt {
        path: mpath.clone(),
        message: e.to_string(),
    })?;
    if manifest.store_version != STORE_VERSION {
        return Err(StoreError::Version {
            path: dir.to_path_buf(),
            found: manifest.store_version,
            expected: STORE_VERSION,
        });
    }
    // Claim records and rows of another schema cannot be read (rows are postcard, which has
    // no field names): the store must be rebuilt.
    if manifest.claim_schema != crate::claim::SCHEMA_VERSION {
        return Err(StoreError::ClaimSchema {
            path: dir.to_path_buf(),
            found: manifest.claim_schema,
            expected: crate::claim::SCHEMA_VERSION,
        });
    }
    Ok(manifest)
}
