//! Writing a store: a new segment of claim records and rows, sentences into the search index,
//! and at commit the manifest that switches the store to them.

use super::aggregates;
use super::index::{open_index, Fields};
use super::manifest::{
    load, seg_name, segment_number, write_atomic, FileEntry, Manifest, STORE_VERSION,
};
use super::postings::PostingsBuilder;
use super::result::{FileResult, Spilled, SpilledRecord};
use super::rows::{ClaimRef, ClaimRow, RowsWriter};
use super::vocabulary::Vocabulary;
use crate::claim::Claim;
use crate::corpus::Skipped;
use crate::error::StoreError;
use crate::patterns::{Lexicon, PatternSet};
use crate::variables::Normalizer;
use std::collections::{BTreeMap, BTreeSet};
use std::fs::{self, File};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use tantivy::{doc, IndexWriter, Term};

/// The extension of a segment's compressed claim records.
pub(super) const CLAIMS_EXT: &str = "jsonl.zst";

/// Compress the block of claim records and write it as one zstd frame; returns its length.
fn flush_block(w: &mut impl Write, block: &mut Vec<u8>, dir: &Path) -> Result<u64, StoreError> {
    if block.is_empty() {
        return Ok(0);
    }
    let frame = zstd::bulk::compress(block, CLAIM_LEVEL).map_err(|e| StoreError::io(dir, e))?;
    w.write_all(&frame).map_err(|e| StoreError::io(dir, e))?;
    block.clear();
    Ok(frame.len() as u64)
}

/// Claims are compressed in blocks of about this many bytes of JSON Lines (one zstd frame a
/// block): small enough that fetching one claim decompresses little, large enough that the
/// sentences and keys that recur between neighbouring claims compress well.
/// On the eLife articles' 56 MB of claim records, 64 KiB blocks at level 9 gave 9.20 MB and
/// 128 KiB blocks 8.79 MB; fetching a claim then decompresses at most 128 KiB (about 0.1 ms).
const CLAIM_BLOCK: usize = 128 * 1024;

/// zstd level of the claim blocks. On eLife (zstd's own benchmark, 64 KiB blocks): level 3
/// 10.23 MB at 270 MB/s, level 9 9.20 MB at 53 MB/s (about 1 s of a scan's 60 CPU-seconds),
/// level 15 8.86 MB at 5 MB/s (too slow for a scan).
const CLAIM_LEVEL: i32 = 9;

/// Take the store's lock (`dir/lock`), held until the file is dropped: one writer at a time.
pub(super) fn lock(dir: &Path) -> Result<File, StoreError> {
    let lock_path = dir.join("lock");
    let lock = File::create(&lock_path).map_err(|e| StoreError::io(&lock_path, e))?;
    // Only a lock held elsewhere is "another scan"; a file system that cannot lock is an I/O
    // error with its own reason.
    match lock.try_lock() {
        Ok(()) => Ok(lock),
        Err(std::fs::TryLockError::WouldBlock) => Err(StoreError::Locked { lock: lock_path }),
        Err(std::fs::TryLockError::Error(e)) => Err(StoreError::io(&lock_path, e)),
    }
}

/// A scan's writer: holds the lock, writes a new segment and index entries as files come, and
/// switches the store to them at commit. Claims and rows go to disk as they are added, so its
/// memory is the file entries and the index writer's budget, whatever the corpus size.
pub struct StoreWriter {
    pub(super) dir: PathBuf,
    _lock: File,
    pub(super) old: Manifest,
    segment: u32,
    jsonl: Option<BufWriter<File>>,
    rows_out: Option<RowsWriter>,
    /// Rows written to the new segment so far.
    rows: u64,
    /// Claim records (JSON Lines) of the block not yet compressed, and where it will start in
    /// the claim file.
    block: Vec<u8>,
    /// The new segment's postings (key to rows), written at commit.
    postings: PostingsBuilder,
    offset: u64,
    index_writer: IndexWriter,
    fields: Fields,
    entries: BTreeMap<String, FileEntry>,
    removed: BTreeSet<String>,
    /// Abbreviation definitions and heads per file: the previous generation's, with the files
    /// written here replaced (see `vocabulary`).
    vocabulary: Vocabulary,
    /// Files whose vocabulary this writer has started afresh.
    fresh: BTreeSet<String>,
    /// Keys for the long forms of definitions.
    normalizer: Normalizer,
}

impl StoreWriter {
    /// Open or create the store at `dir` for writing, taking its lock. The sentence index leaves
    /// out the words that no key of `lexicon` contains.
    pub fn open(
        dir: &Path,
        heap_bytes: usize,
        lexicon: &Lexicon,
    ) -> Result<StoreWriter, StoreError> {
        let unindexed: Vec<String> = crate::variables::dropped_words(lexicon).collect();
        fs::create_dir_all(dir).map_err(|e| StoreError::io(dir, e))?;
        let lock = lock(dir)?;
        let old = match load(dir) {
            Ok(m) => m,
            Err(StoreError::Missing(_)) => Manifest::default(),
            Err(e) => return Err(e),
        };
        let index = open_index(dir, true, &unindexed)?;
        // Indexing costs about half what extraction does (eLife: 2.5 against 4.9 CPU-seconds),
        // so one indexing thread per three workers keeps up; one a core (tantivy's default)
        // only competed with extraction: 10% more CPU, 20 MB more memory, twice the segments.
        let threads = rayon::current_num_threads().div_ceil(3).clamp(1, 8);
        let index_writer: IndexWriter =
            index.writer_with_num_threads(threads, heap_bytes.max(15_000_000))?;
        let fields = Fields::of(&index);
        // A new segment number above every one on disk (live or left by a killed scan).
        let mut segment = old.segments().iter().max().copied().unwrap_or(0) + 1;
        if let Ok(rd) = fs::read_dir(dir) {
            for e in rd.flatten() {
                let name = e.file_name().to_string_lossy().into_owned();
                if let Some(n) = segment_number(&name) {
                    segment = segment.max(n + 1);
                }
            }
        }
        let vocabulary = match Vocabulary::load(dir, &old) {
            Ok(v) => v,
            // Deleted by hand: the files read again get theirs back, rather than the store
            // refusing every scan.
            Err(StoreError::Io { source, .. }) if source.kind() == std::io::ErrorKind::NotFound => {
                Vocabulary::default()
            }
            Err(e) => return Err(e),
        };
        let entries = old
            .files
            .iter()
            .map(|f| (f.path.clone(), f.clone()))
            .collect();
        Ok(StoreWriter {
            dir: dir.to_path_buf(),
            _lock: lock,
            old,
            segment,
            jsonl: None,
            rows_out: None,
            rows: 0,
            block: Vec::new(),
            postings: PostingsBuilder::default(),
            offset: 0,
            index_writer,
            fields,
            entries,
            removed: BTreeSet::new(),
            vocabulary,
            fresh: BTreeSet::new(),
            normalizer: Normalizer::new(lexicon),
        })
    }

    /// The entry the store has for a path.
    pub fn known(&self, path: &str) -> Option<&FileEntry> {
        self.entries.get(path)
    }

    /// Keep a file's entry with new metadata (its content was unchanged).
    pub fn touch(&mut self, entry: FileEntry) {
        self.entries.insert(entry.path.clone(), entry);
    }

    /// Forget a file that is gone.
    pub fn remove(&mut self, path: &str) -> Result<(), StoreError> {
        self.entries.remove(path);
        self.vocabulary.forget(path);
        self.fresh.remove(path);
        self.removed.insert(path.to_string());
        self.index_writer
            .delete_term(Term::from_field_text(self.fields.file, path));
        Ok(())
    }

    /// Start a file afresh: its old claims and sentences are dropped, and what
    /// [`Self::append_claims`] adds next belongs to it. `entry` carries the file's metadata and
    /// counts.
    pub fn begin(&mut self, mut entry: FileEntry) {
        self.index_writer
            .delete_term(Term::from_field_text(self.fields.file, &entry.path));
        entry.claims = 0;
        entry.segment = 0;
        entry.rows = (self.rows, self.rows);
        entry.more_rows.clear();
        self.removed.remove(&entry.path);
        self.start_vocabulary(&entry.path);
        self.entries.insert(entry.path.clone(), entry);
    }

    /// The first time this writer writes anything of `path`, its stored vocabulary goes: what
    /// follows replaces it whole.
    fn start_vocabulary(&mut self, path: &str) {
        if !self.fresh.contains(path) {
            self.vocabulary.forget(path);
            self.fresh.insert(path.to_string());
        }
    }

    /// The entry of a file begun in this writer, to update its counts.
    pub fn entry_mut(&mut self, path: &str) -> Option<&mut FileEntry> {
        self.entries.get_mut(path)
    }

    /// Add claims to a file (begun with [`Self::begin`], or new: then it gets an entry with no
    /// metadata). Claims added to a file after another file's keep their order in a second row
    /// range.
    pub fn append_claims(&mut self, path: &str, claims: &[Claim]) -> Result<(), StoreError> {
        if claims.is_empty() {
            return Ok(());
        }
        if !self.entries.contains_key(path) {
            self.begin(FileEntry::new(path));
        }
        self.start_vocabulary(path);
        self.vocabulary.focus(path)?;
        self.vocabulary.add_claims(path, claims);
        if self.jsonl.is_none() {
            let p = self.dir.join(seg_name(self.segment, CLAIMS_EXT));
            self.jsonl = Some(BufWriter::new(
                File::create(&p).map_err(|e| StoreError::io(&p, e))?,
            ));
            let p = self.dir.join(seg_name(self.segment, "rows"));
            self.rows_out = Some(RowsWriter::create(&p)?);
        }
        let first = self.rows;
        let (Some(w), Some(rw)) = (self.jsonl.as_mut(), self.rows_out.as_mut()) else {
            return Ok(());
        };
        for c in claims {
            let within = self.block.len();
            serde_json::to_writer(&mut self.block, c).map_err(|e| StoreError::Corrupt {
                path: self.dir.clone(),
                message: e.to_string(),
            })?;
            let at = ClaimRef {
                segment: self.segment,
                offset: self.offset,
                within: within as u32,
                len: (self.block.len() - within) as u32,
            };
            self.block.push(b'\n');
            if self.block.len() >= CLAIM_BLOCK {
                self.offset += flush_block(w, &mut self.block, &self.dir)?;
            }
            let Ok(number) = u32::try_from(self.rows) else {
                return Err(StoreError::Corrupt {
                    path: self.dir.clone(),
                    message: "a segment holds at most 2^32 rows".into(),
                });
            };
            rw.push(&ClaimRow::from_claim(c, at))?;
            self.postings.add(&c.cause.key, &c.effect.key, number);
            self.rows += 1;
        }
        let (segment, rows) = (self.segment, self.rows);
        if let Some(entry) = self.entries.get_mut(path) {
            entry.segment = segment;
            entry.claims += claims.len() as u64;
            match entry.more_rows.last_mut() {
                Some(r) if r.1 == first => r.1 = rows,
                Some(_) => entry.more_rows.push((first, rows)),
                None if entry.rows.1 == first => entry.rows.1 = rows,
                None => entry.more_rows.push((first, rows)),
            }
        }
        Ok(())
    }

    /// Add one sentence of `file` to the search index (`id`: its document id).
    pub fn add_sentence(
        &mut self,
        file: &str,
        id: &str,
        line: u64,
        start: u64,
        text: &str,
    ) -> Result<(), StoreError> {
        self.start_vocabulary(file);
        self.vocabulary.focus(file)?;
        self.vocabulary
            .add_sentence(file, id, text, &self.normalizer);
        let f = self.fields;
        self.index_writer.add_document(
            doc!(f.path => id, f.file => file, f.text => text, f.line => line, f.start => start),
        )?;
        Ok(())
    }

    /// Replace one file's claims and sentences: what it spilled first, then what it holds.
    pub fn put(&mut self, result: FileResult) -> Result<(), StoreError> {
        let Some(entry) = result.entry else {
            return Ok(());
        };
        let path = entry.path.clone();
        self.begin(entry);
        if let Some(sp) = result.spilled {
            self.put_spilled(&path, sp)?;
        }
        self.append_claims(&path, &result.claims)?;
        for (id, line, start, text) in &result.sentences {
            self.add_sentence(&path, id, *line, *start, text)?;
        }
        Ok(())
    }

    /// Read a spill file back into the store, in the order it was written.
    fn put_spilled(&mut self, path: &str, sp: Spilled) -> Result<(), StoreError> {
        sp.replay(|record| match record {
            SpilledRecord::Claims(claims) => self.append_claims(path, claims),
            SpilledRecord::Sentence(id, line, start, text) => {
                self.add_sentence(path, id, line, start, text)
            }
        })
    }

    /// Make everything durable and switch the store to the new manifest. Returns it.
    pub fn commit(
        mut self,
        patterns: &PatternSet,
        skipped: Vec<Skipped>,
        failed: Vec<Skipped>,
    ) -> Result<Manifest, StoreError> {
        if let Some(w) = self.jsonl.as_mut() {
            flush_block(w, &mut self.block, &self.dir)?;
        }
        let rows = self.rows_out.take().map(RowsWriter::finish).transpose()?;
        let jsonl = self
            .jsonl
            .take()
            .map(|w| {
                w.into_inner()
                    .map_err(|e| StoreError::io(&self.dir, e.into_error()))
            })
            .transpose()?;
        for f in [jsonl, rows].into_iter().flatten() {
            f.sync_all().map_err(|e| StoreError::io(&self.dir, e))?;
        }
        if !self.postings.is_empty() {
            let p = self.dir.join(seg_name(self.segment, "post"));
            let f = self.postings.write(&p)?;
            f.sync_all().map_err(|e| StoreError::io(&p, e))?;
        }
        let generation = self.old.generation + 1;
        let mut prepared = self.index_writer.prepare_commit()?;
        prepared.set_payload(&generation.to_string());
        prepared.commit()?;
        self.vocabulary.write(&self.dir, generation)?;
        let manifest = Manifest {
            store_version: STORE_VERSION,
            claim_schema: crate::claim::SCHEMA_VERSION,
            generation,
            hearsay_version: env!("CARGO_PKG_VERSION").to_string(),
            patterns: patterns.origin.clone(),
            patterns_fingerprint: patterns.fingerprint.clone(),
            files: self.entries.into_values().collect(),
            skipped,
            failed,
        };
        super::compact::compact(&self.dir, &manifest)?;
        let json = serde_json::to_vec_pretty(&manifest).map_err(|e| StoreError::Corrupt {
            path: self.dir.clone(),
            message: e.to_string(),
        })?;
        write_atomic(&self.dir.join("manifest.json"), &json)?;
        Vocabulary::remove_others(&self.dir, generation);
        super::compact::remove_stale(&self.dir, &manifest);
        // Segments nothing refers to any more (and leftovers of killed scans) can go.
        let live = manifest.segments();
        if let Ok(rd) = fs::read_dir(&self.dir) {
            for e in rd.flatten() {
                let name = e.file_name().to_string_lossy().into_owned();
                if let Some(n) = segment_number(&name) {
                    let stale_aggregates = aggregates::is_aggregate_file(&name)
                        && name != aggregates::file_name(&manifest, n);
                    if !live.contains(&n) || stale_aggregates {
                        let _ = fs::remove_file(e.path());
                    }
                }
            }
        }
        Ok(manifest)
    }

    /// Discard a failed scan: nothing is committed, the previous store stays.
    pub fn abandon(mut self) {
        let _ = self.index_writer.rollback();
    }
}
