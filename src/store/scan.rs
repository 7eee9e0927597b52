//! The incremental scan: which input files changed since the store last saw them, reading those
//! through the pipeline, and writing what they came to.
//!
//! Each file is checked by size and modification time, then by content hash, against the
//! manifest; unchanged files keep their stored claims. Files to read wait in batches so that
//! they are read in parallel; a stream (standard input, a JSON Lines dump, a large file) is read
//! alone, its documents in parallel batches, and its results move to disk past the memory given.
//! Files the store knows that are gone are dropped. The scan never prints: what a command line
//! shows (progress, warnings) it learns through [`ScanEvents`], the way a searcher hands matches
//! to a sink.

use super::manifest::{FileEntry, Manifest};
use super::result::FileResult;
use super::rows::doc_id;
use super::writer::StoreWriter;
use crate::corpus::{self, Document, Input, ReadOptions, Skipped};
use crate::error::{ScanError, StoreError};
use crate::extract::{document_claims, document_sentences, Extractor};
use crate::patterns::PatternSet;
use rayon::prelude::*;
use std::collections::BTreeSet;
use std::path::Path;
use std::time::UNIX_EPOCH;

/// What a scan tells its caller as it goes. Every method has a default that does nothing.
/// Calls come from the scan's worker threads too, hence `Sync`.
pub trait ScanEvents: Sync {
    /// The store was read with other patterns or another hearsay version (`old` is its
    /// manifest): every file is read again, changed or not.
    fn rereading_all(&self, _old: &Manifest) {}
    /// How far into a stream the scan is: documents and bytes of text read so far.
    fn stream(&self, _label: &str, _documents: u64, _bytes: u64) {}
    /// Something a reader noticed about a file it read (the message names the file).
    fn warn(&self, _message: &str) {}
    /// A file that could not be read; the scan goes on without it.
    fn failed(&self, _file: &Skipped) {}
    /// One more input done: read, unchanged or failed.
    fn file_done(&self) {}
    /// Every input is done.
    fn read_done(&self) {}
    /// A file the walk passed over. Told just before a commit, once for each such file; a scan
    /// that changes nothing commits nothing and tells none.
    fn skipped(&self, _file: &Skipped) {}
}

/// How to scan.
pub struct ScanOptions<'a> {
    /// The paths the inputs came from: files the store knows under a folder among them that the
    /// walk no longer yields are dropped.
    pub paths: &'a [String],
    /// How to read every input.
    pub read: ReadOptions,
    /// Results of one stream held in memory before they wait on disk, in bytes.
    pub file_memory: usize,
}

/// What a scan did.
#[derive(Debug)]
pub struct ScanReport {
    /// Files read (new or changed).
    pub read: usize,
    /// Files whose stored claims were kept.
    pub unchanged: usize,
    /// Files dropped because they are gone.
    pub removed: usize,
    /// Files that could not be read.
    pub failed: Vec<Skipped>,
    /// The store's manifest after the scan (the previous one when nothing changed).
    pub manifest: Manifest,
}

/// What one file came to.
enum Outcome {
    Unchanged(FileEntry),
    Changed(Box<FileResult>),
    Failed(Skipped),
}

/// A file whose content is new or changed: what reading it needs.
struct ToRead {
    size: u64,
    mtime: u128,
    /// The content hash; `None` for standard input, which is hashed as it is read (it can be
    /// read only once), and compared with `known` then.
    hash: Option<String>,
    known: Option<FileEntry>,
    /// Read as a stream ([`corpus::streams`]): alone, in parallel batches of documents.
    stream: bool,
}

/// What the cheap checks found for one file.
enum Checked {
    Done(Outcome),
    Read(ToRead),
}

/// Files whose reading may wait for others, so that they are read in parallel: at most this
/// many, and at most `READ_BATCH_BYTES` of them on disk (their results are held until the
/// batch is read). Inputs read as streams are read one at a time, each in parallel batches.
const READ_BATCH: usize = 64;
const READ_BATCH_BYTES: u64 = 64 << 20;

/// Scan `inputs` (found by the walk, which passed over `skipped`) into `writer`'s store and
/// commit it, unless nothing changed: then the store is left exactly as it was. The extractor
/// is built by `extractor` when the first file needs reading, as it is most of the cost of a
/// re-scan that finds nothing changed; if it cannot be built, nothing is committed. On any
/// error the store stays as it was.
pub fn scan<E: From<ScanError>>(
    mut writer: StoreWriter,
    patterns: &PatternSet,
    inputs: &[Input],
    skipped: &[Skipped],
    options: &ScanOptions<'_>,
    events: &impl ScanEvents,
    extractor: impl FnOnce() -> Result<Extractor, E>,
) -> Result<ScanReport, E> {
    // Claims read with other patterns (or another hearsay) must not be counted beside new ones:
    // then every file is read again, changed or not.
    let old = &writer.old;
    let reread_all = !old.files.is_empty() && old.patterns_fingerprint != patterns.fingerprint;
    if reread_all {
        events.rereading_all(old);
    }
    let mut run = Run {
        writer: &mut writer,
        events,
        read: &options.read,
        hold_bytes: options.file_memory,
        extractor: None,
        build: Some(extractor),
        report: Tally::default(),
    };
    run.read_all(inputs, reread_all)?;
    events.read_done();
    let Tally {
        read,
        unchanged,
        failed,
    } = run.report;
    let gone = gone(&writer, inputs, &failed, options.paths);
    for p in &gone {
        writer.remove(p).map_err(ScanError::from)?;
    }
    let mut report = ScanReport {
        read,
        unchanged,
        removed: gone.len(),
        failed,
        manifest: Manifest::default(),
    };
    if read == 0 && gone.is_empty() && report.failed.is_empty() && writer.old.generation > 0 {
        // Nothing changed: leave the store exactly as it is.
        report.manifest = writer.old.clone();
        writer.abandon();
        return Ok(report);
    }
    for s in skipped {
        events.skipped(s);
    }
    report.manifest = writer
        .commit(patterns, skipped.to_vec(), report.failed.clone())
        .map_err(ScanError::Commit)?;
    Ok(report)
}

/// Files the store knows that are gone: files that no longer exist, and files under a scanned
/// folder that the walk no longer yields (deleted, or now ignored). Files that failed are kept.
fn gone(
    writer: &StoreWriter,
    inputs: &[Input],
    failed: &[Skipped],
    paths: &[String],
) -> Vec<String> {
    let seen: BTreeSet<&str> = inputs.iter().map(|i| i.label.as_str()).collect();
    let failed_paths: BTreeSet<&str> = failed.iter().map(|s| s.path.as_str()).collect();
    let roots: Vec<String> = paths
        .iter()
        .filter(|p| Path::new(p).is_dir())
        .map(|p| format!("{}/", p.trim_end_matches('/')))
        .collect();
    writer
        .old
        .files
        .iter()
        .map(|f| f.path.clone())
        .filter(|p| p != "-" && !seen.contains(p.as_str()) && !failed_paths.contains(p.as_str()))
        .filter(|p| !Path::new(p).exists() || roots.iter().any(|r| p.starts_with(r.as_str())))
        .collect()
}

/// What the files came to so far.
#[derive(Default)]
struct Tally {
    read: usize,
    unchanged: usize,
    failed: Vec<Skipped>,
}

/// One scan's reading: where outcomes go, and the extractor once it is built.
struct Run<'a, V, B> {
    writer: &'a mut StoreWriter,
    events: &'a V,
    read: &'a ReadOptions,
    /// Results of one stream held in memory before they are moved to disk, in bytes.
    hold_bytes: usize,
    extractor: Option<Extractor>,
    /// Builds the extractor; taken when the first file needs reading.
    build: Option<B>,
    report: Tally,
}

impl<V, B, E> Run<'_, V, B>
where
    V: ScanEvents,
    B: FnOnce() -> Result<Extractor, E>,
    E: From<ScanError>,
{
    /// Check every input, and read those that changed, in input order.
    fn read_all(&mut self, inputs: &[Input], reread_all: bool) -> Result<(), E> {
        // Files to read wait here across chunks, so that a re-scan that changed one file in a
        // hundred still reads them in parallel; at most `READ_BATCH` wait.
        let mut pending: Vec<(&Input, ToRead)> = Vec::new();
        let mut pending_bytes = 0u64;
        for chunk in inputs.chunks(64) {
            let known: Vec<Option<FileEntry>> = chunk
                .iter()
                .map(|i| self.writer.known(&i.label).filter(|_| !reread_all).cloned())
                .collect();
            let checked: Vec<Checked> = chunk
                .par_iter()
                .zip(known.par_iter())
                .map(|(i, k)| check(i, k.as_ref(), self.read))
                .collect();
            for (i, c) in chunk.iter().zip(checked) {
                match c {
                    Checked::Done(o) => self.record(o)?,
                    Checked::Read(r) if r.stream => {
                        // Alone: its batches are read in parallel, and only one stream's
                        // results are held at a time.
                        pending_bytes = 0;
                        self.read_batch(&mut pending)?;
                        self.read_batch(&mut vec![(i, r)])?;
                    }
                    Checked::Read(r) => {
                        pending_bytes += r.size;
                        pending.push((i, r));
                        if pending.len() >= READ_BATCH || pending_bytes >= READ_BATCH_BYTES {
                            pending_bytes = 0;
                            self.read_batch(&mut pending)?;
                        }
                    }
                }
            }
        }
        self.read_batch(&mut pending)
    }

    /// Where the outcome of each file goes: the store, the tally, the events.
    fn record(&mut self, o: Outcome) -> Result<(), E> {
        match o {
            Outcome::Unchanged(e) => {
                self.report.unchanged += 1;
                self.writer.touch(e);
            }
            Outcome::Changed(r) => {
                self.report.read += 1;
                if let Some(e) = &r.entry {
                    for w in &e.warnings {
                        self.events.warn(w);
                    }
                }
                self.writer.put(*r).map_err(ScanError::Write)?;
            }
            Outcome::Failed(s) => {
                self.events.failed(&s);
                self.report.failed.push(s);
            }
        }
        self.events.file_done();
        Ok(())
    }

    /// Read the pending files in parallel, in their order, building the extractor first if
    /// this is the first batch, and record what they came to.
    fn read_batch(&mut self, pending: &mut Vec<(&Input, ToRead)>) -> Result<(), E> {
        if pending.is_empty() {
            return Ok(());
        }
        if self.extractor.is_none() {
            // Built here, outside the workers, so that it compiles on every core.
            if let Some(build) = self.build.take() {
                self.extractor = Some(build()?);
            }
        }
        let Some(ex) = &self.extractor else {
            return Ok(());
        };
        let file = FileRead {
            ex,
            opts: self.read,
            hold_dir: &self.writer.dir,
            hold_bytes: self.hold_bytes,
            events: self.events,
        };
        let outcomes: Vec<Outcome> = std::mem::take(pending)
            .into_par_iter()
            .map(|(i, r)| file.read(i, r))
            .collect();
        for o in outcomes {
            self.record(o)?;
        }
        Ok(())
    }
}

fn mtime_ns(m: &std::fs::Metadata) -> u128 {
    m.modified()
        .ok()
        .and_then(|t| t.duration_since(UNIX_EPOCH).ok())
        .map(|d| d.as_nanos())
        .unwrap_or(0)
}

/// Size, time and content hash against what the store knows: unchanged files stop here.
fn check(input: &Input, known: Option<&FileEntry>, opts: &ReadOptions) -> Checked {
    let fail = |reason: String| {
        Checked::Done(Outcome::Failed(Skipped {
            path: input.label.clone(),
            reason,
        }))
    };
    if input.is_stdin() {
        return Checked::Read(ToRead {
            size: 0,
            mtime: 0,
            hash: None,
            known: known.cloned(),
            stream: true,
        });
    }
    let (size, mtime) = match std::fs::metadata(&input.path) {
        Ok(m) => (m.len(), mtime_ns(&m)),
        Err(e) => return fail(format!("cannot read: {e}")),
    };
    if let Some(k) = known {
        if k.size == size && k.mtime_ns == mtime && mtime != 0 {
            return Checked::Done(Outcome::Unchanged(k.clone()));
        }
    }
    // Files are hashed by streaming them, and read again only when the content changed, so
    // no file is held whole for the hash.
    let hash = match std::fs::File::open(&input.path)
        .and_then(|f| blake3::Hasher::new().update_reader(f).map(|h| h.finalize()))
    {
        Ok(h) => h.to_hex().to_string(),
        Err(e) => return fail(format!("cannot read: {e}")),
    };
    if let Some(k) = known {
        if k.hash == hash {
            return Checked::Done(Outcome::Unchanged(FileEntry {
                size,
                mtime_ns: mtime,
                ..k.clone()
            }));
        }
    }
    Checked::Read(ToRead {
        size,
        mtime,
        hash: Some(hash),
        known: None,
        stream: corpus::streams(input, opts),
    })
}

/// What reading one file needs: the extractor, and where a large input's results wait while
/// it is read.
struct FileRead<'a, V> {
    ex: &'a Extractor,
    opts: &'a ReadOptions,
    hold_dir: &'a Path,
    hold_bytes: usize,
    events: &'a V,
}

impl<V: ScanEvents> FileRead<'_, V> {
    /// Take one document through the pipeline into `result`: its claims, and its sentences for
    /// the index.
    fn take(&self, d: &Document, result: &mut FileResult) {
        result.add_claims(document_claims(self.ex, d));
        let id = doc_id(&d.path, d.record.as_deref());
        // Index text only (not stored): whitespace need not be collapsed.
        for s in document_sentences(d) {
            result.add_sentence(
                id.clone(),
                s.line as u64,
                s.start as u64,
                s.text.to_string(),
            );
        }
    }

    /// Read a new or changed file through the pipeline.
    fn read(&self, input: &Input, r: ToRead) -> Outcome {
        let mut warnings = Vec::new();
        let mut result = FileResult::default();
        let (mut documents, mut text_bytes) = (0u64, 0u64);
        let mut hash = r.hash;
        // Each document is taken through the pipeline as soon as it is read, so a JSON Lines
        // dump costs the memory of one record plus its results.
        let done = if r.stream {
            self.read_stream(input, &mut hash, &mut warnings, &mut result)
                .map(|(d, b)| {
                    documents = d;
                    text_bytes = b;
                })
        } else {
            corpus::read_input(input, self.opts, &mut warnings, &mut |d| {
                documents += 1;
                text_bytes += d.text.len() as u64;
                self.take(&d, &mut result);
            })
            .map_err(|e| e.to_string())
        };
        if let Err(reason) = done {
            return Outcome::Failed(Skipped {
                path: input.label.clone(),
                reason,
            });
        }
        let hash = hash.unwrap_or_default();
        if let Some(k) = r.known.filter(|k| k.hash == hash) {
            // Standard input with the content the store has: what was read is dropped.
            return Outcome::Unchanged(k);
        }
        result.entry = Some(FileEntry {
            size: if input.is_stdin() { text_bytes } else { r.size },
            mtime_ns: r.mtime,
            hash,
            documents,
            sentences: result.sentence_count(),
            warnings,
            ..FileEntry::new(&input.label)
        });
        Outcome::Changed(Box::new(result))
    }

    /// Read a stream (standard input, a JSON Lines dump, a large file): batches of its
    /// documents in parallel, their results joined in order, and moved to disk past
    /// `hold_bytes`. Hashes the input on the way when `hash` is not known yet. Returns the
    /// documents and bytes of text read, or why the file failed.
    fn read_stream(
        &self,
        input: &Input,
        hash: &mut Option<String>,
        warnings: &mut Vec<String>,
        result: &mut FileResult,
    ) -> Result<(u64, u64), String> {
        let (mut documents, mut text_bytes) = (0u64, 0u64);
        let each = |batch: Vec<Document>| {
            for d in &batch {
                documents += 1;
                text_bytes += d.text.len() as u64;
            }
            let parts: Vec<FileResult> = batch
                .par_iter()
                .map(|d| {
                    let mut part = FileResult::default();
                    self.take(d, &mut part);
                    part
                })
                .collect();
            for p in parts {
                result.append(p);
            }
            self.events.stream(&input.label, documents, text_bytes);
            if result.held_bytes() > self.hold_bytes {
                result.spill(self.hold_dir)?;
            }
            Ok::<(), StoreError>(())
        };
        let read = if hash.is_none() {
            corpus::read_batched_hashed(input, self.opts, each).map(|(w, r)| {
                (
                    w,
                    r.map(|h| {
                        *hash = Some(h.to_hex().to_string());
                    }),
                )
            })
        } else {
            corpus::read_batched(input, self.opts, each)
        };
        match read {
            Ok((w, r)) => {
                *warnings = w;
                r.map_err(|e| e.to_string())?;
                Ok((documents, text_bytes))
            }
            Err(e) => Err(format!("cannot hold its results: {e}")),
        }
    }
}
