//! `hearsay scan PATH...`: read files into the claim store, re-reading only what changed.

use super::progress::Progress;
use super::{check_paths, escape, Format, Global, Table};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::corpus::{self, Input, Skipped};
use hearsay::extract::{document_claims, document_sentences, Extractor};
use hearsay::patterns::PatternSet;
use hearsay::store::doc_id;
use hearsay::store::{FileEntry, FileResult, StoreWriter};
use rayon::prelude::*;
use serde::Serialize;
use std::collections::BTreeSet;
use std::path::Path;
use std::process::ExitCode;
use std::time::{Instant, UNIX_EPOCH};

#[derive(Args, Debug)]
#[command(
    after_help = "A scan writes the store atomically: if it is interrupted (Ctrl-C, kill -9), the \
previous complete store stays in force. Files are re-read only when their size, time or content \
changed; claims of deleted files are dropped.\n\nExit status: 0 on success, also when single files \
could not be read (they are listed as warnings and in the summary); 1 under --strict when any file \
failed; 2 on an error that stopped the scan."
)]
pub struct ScanArgs {
    /// Files and folders to read (folders recursively; `-` reads standard input).
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// Exit with status 1 when any file could not be read.
    #[arg(long)]
    pub strict: bool,
    /// Memory for the search index writer, in MB.
    #[arg(long, default_value_t = 100, value_name = "MB")]
    pub index_memory: usize,
    /// Memory for the results of one large input (a JSON Lines dump, standard input) before
    /// they wait on disk in the store's folder until the input is read to its end, in MB.
    #[arg(long, default_value_t = 64, value_name = "MB")]
    pub file_memory: usize,
}

/// What one file came to.
enum Outcome {
    Unchanged(FileEntry),
    Changed(Box<FileResult>),
    Failed(Skipped),
}

#[derive(Serialize, Default)]
struct Summary {
    store: String,
    files_seen: usize,
    files_read: usize,
    files_unchanged: usize,
    files_removed: usize,
    files_skipped: usize,
    files_failed: usize,
    documents: u64,
    sentences: u64,
    claims: u64,
    seconds: f64,
    skipped: Vec<Skipped>,
    failed: Vec<Skipped>,
}

fn mtime_ns(m: &std::fs::Metadata) -> u128 {
    m.modified()
        .ok()
        .and_then(|t| t.duration_since(UNIX_EPOCH).ok())
        .map(|d| d.as_nanos())
        .unwrap_or(0)
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

/// Where the outcome of each file goes: the store, the summary, the warnings.
struct Log<'a> {
    g: &'a Global,
    progress: &'a Progress,
    summary: &'a mut Summary,
    failed: &'a mut Vec<Skipped>,
}

impl Log<'_> {
    fn record(&mut self, o: Outcome, writer: &mut StoreWriter) -> Result<()> {
        match o {
            Outcome::Unchanged(e) => {
                self.summary.files_unchanged += 1;
                writer.touch(e);
            }
            Outcome::Changed(r) => {
                self.summary.files_read += 1;
                if let Some(e) = &r.entry {
                    for w in &e.warnings {
                        self.progress.warn(self.g, w);
                    }
                }
                writer.put(*r).context("cannot write to the store")?;
            }
            Outcome::Failed(s) => {
                self.progress
                    .warn(self.g, &format!("{}: {}", s.path, s.reason));
                self.failed.push(s);
            }
        }
        self.progress.file_done();
        Ok(())
    }
}

/// Where reading puts the results of a large input while it is read, and where it says how far
/// into the input it is.
#[derive(Clone, Copy)]
struct Hold<'a> {
    dir: &'a Path,
    bytes: usize,
    progress: &'a Progress,
}

/// Read the pending files in parallel, in their order, building the extractor first if this
/// is the first batch. If it cannot be built, nothing of this scan is committed: the store
/// stays as it was.
fn read_batch(
    g: &Global,
    set: &PatternSet,
    ex: &mut Option<Extractor>,
    opts: &corpus::ReadOptions,
    hold: Hold<'_>,
    pending: &mut Vec<(&Input, ToRead)>,
) -> Result<Vec<Outcome>> {
    if pending.is_empty() {
        return Ok(Vec::new());
    }
    // Built here, outside the workers, so that it compiles on every core.
    let built: &Extractor = match ex {
        Some(e) => e,
        None => ex.insert(g.extractor_for(set)?),
    };
    Ok(std::mem::take(pending)
        .into_par_iter()
        .map(|(i, r)| read(built, opts, hold, i, r))
        .collect())
}

/// Size, time and content hash against what the store knows: unchanged files stop here.
fn check(input: &Input, known: Option<&FileEntry>, opts: &corpus::ReadOptions) -> Checked {
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

/// Read a new or changed file through the pipeline.
fn read(
    ex: &Extractor,
    opts: &corpus::ReadOptions,
    hold: Hold<'_>,
    input: &Input,
    r: ToRead,
) -> Outcome {
    let mut warnings = Vec::new();
    let mut result = FileResult::default();
    let (mut documents, mut text_bytes) = (0u64, 0u64);
    // Each document is taken through the pipeline as soon as it is read, so a JSON Lines dump
    // costs the memory of one record plus its results.
    let take = |d: &corpus::Document, result: &mut FileResult| {
        result.add_claims(document_claims(ex, d));
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
    };
    let mut hash = r.hash;
    let done = if r.stream {
        // A stream (standard input, a JSON Lines dump, a large file): batches of its documents
        // in parallel, their results joined in order, and moved to disk past `hold.bytes`.
        let each = |batch: Vec<corpus::Document>| {
            for d in &batch {
                documents += 1;
                text_bytes += d.text.len() as u64;
            }
            let parts: Vec<FileResult> = batch
                .par_iter()
                .map(|d| {
                    let mut part = FileResult::default();
                    take(d, &mut part);
                    part
                })
                .collect();
            for p in parts {
                result.append(p);
            }
            hold.progress.stream(&input.label, documents, text_bytes);
            if result.held_bytes() > hold.bytes {
                result.spill(hold.dir)?;
            }
            Ok::<(), hearsay::error::StoreError>(())
        };
        let read = if hash.is_none() {
            corpus::read_batched_hashed(input, opts, each).map(|(w, r)| {
                (
                    w,
                    r.map(|h| {
                        hash = Some(h.to_hex().to_string());
                    }),
                )
            })
        } else {
            corpus::read_batched(input, opts, each)
        };
        match read {
            Ok((w, r)) => {
                warnings = w;
                r.map_err(|e| e.to_string())
            }
            Err(e) => Err(format!("cannot hold its results: {e}")),
        }
    } else {
        corpus::read_input(input, opts, &mut warnings, &mut |d| {
            documents += 1;
            text_bytes += d.text.len() as u64;
            take(&d, &mut result);
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

pub fn run(g: &Global, a: &ScanArgs) -> Result<ExitCode> {
    let started = Instant::now();
    check_paths(&a.paths)?;
    let set = g.pattern_set()?;
    let opts = g.read.options();
    let mut writer = StoreWriter::open(&g.store, a.index_memory * 1_000_000, &set.lexicon)
        .with_context(|| format!("cannot open the store {} for writing", g.store.display()))?;
    if let Some(al) = &g.aliases {
        hearsay::patterns::load_aliases(al)
            .with_context(|| format!("cannot load aliases {}", al.display()))?;
        std::fs::copy(al, g.store.join("aliases.tsv"))
            .with_context(|| format!("cannot copy {} into the store", al.display()))?;
    }
    let (inputs, skipped) = corpus::discover(&a.paths);
    let mut summary = Summary {
        store: g.store.display().to_string(),
        files_seen: inputs.len(),
        ..Summary::default()
    };
    let progress = Progress::new(g, "scanning", inputs.len());
    let mut failed = Vec::new();
    // Files to read wait here across chunks, so that a re-scan that changed one file in a
    // hundred still reads them in parallel; at most `READ_BATCH` wait.
    let mut pending: Vec<(&Input, ToRead)> = Vec::new();
    let mut pending_bytes = 0u64;
    let hold = Hold {
        dir: &g.store,
        bytes: a.file_memory.max(1) * 1_000_000,
        progress: &progress,
    };
    // The extractor (cues compiled, tagger loaded) is built when the first file needs reading:
    // it is most of the cost of a re-scan that finds nothing changed.
    let mut ex: Option<Extractor> = None;
    let mut log = Log {
        g,
        progress: &progress,
        summary: &mut summary,
        failed: &mut failed,
    };
    // Claims read with other patterns (or another hearsay) must not be counted beside new ones:
    // then every file is read again, changed or not.
    let old = &writer.old;
    let reread_all = !old.files.is_empty() && old.patterns_fingerprint != set.fingerprint;
    if reread_all {
        g.warn(&format!(
            "the store was read with other patterns or another hearsay version (patterns {}, \
             hearsay {}); re-reading every file",
            old.patterns, old.hearsay_version
        ));
    }
    for chunk in inputs.chunks(64) {
        let known: Vec<Option<FileEntry>> = chunk
            .iter()
            .map(|i| writer.known(&i.label).filter(|_| !reread_all).cloned())
            .collect();
        let checked: Vec<Checked> = chunk
            .par_iter()
            .zip(known.par_iter())
            .map(|(i, k)| check(i, k.as_ref(), &opts))
            .collect();
        for (i, c) in chunk.iter().zip(checked) {
            match c {
                Checked::Done(o) => log.record(o, &mut writer)?,
                Checked::Read(r) if r.stream => {
                    // Alone: its batches are read in parallel, and only one stream's results
                    // are held at a time.
                    let mut one = vec![(i, r)];
                    pending_bytes = 0;
                    for p in [&mut pending, &mut one] {
                        for o in read_batch(g, &set, &mut ex, &opts, hold, p)? {
                            log.record(o, &mut writer)?;
                        }
                    }
                }
                Checked::Read(r) => {
                    pending_bytes += r.size;
                    pending.push((i, r));
                    if pending.len() >= READ_BATCH || pending_bytes >= READ_BATCH_BYTES {
                        pending_bytes = 0;
                        for o in read_batch(g, &set, &mut ex, &opts, hold, &mut pending)? {
                            log.record(o, &mut writer)?;
                        }
                    }
                }
            }
        }
    }
    for o in read_batch(g, &set, &mut ex, &opts, hold, &mut pending)? {
        log.record(o, &mut writer)?;
    }
    progress.finish();
    // Drop what is gone: files that no longer exist, and files under a scanned folder that the
    // walk no longer yields (deleted, or now ignored).
    let seen: BTreeSet<&str> = inputs.iter().map(|i| i.label.as_str()).collect();
    let failed_paths: BTreeSet<&str> = failed.iter().map(|s| s.path.as_str()).collect();
    let roots: Vec<String> = a
        .paths
        .iter()
        .filter(|p| Path::new(p).is_dir())
        .map(|p| format!("{}/", p.trim_end_matches('/')))
        .collect();
    let gone: Vec<String> = writer
        .old
        .files
        .iter()
        .map(|f| f.path.clone())
        .filter(|p| p != "-" && !seen.contains(p.as_str()) && !failed_paths.contains(p.as_str()))
        .filter(|p| !Path::new(p).exists() || roots.iter().any(|r| p.starts_with(r.as_str())))
        .collect();
    for p in &gone {
        writer.remove(p)?;
    }
    summary.files_removed = gone.len();
    if summary.files_read == 0 && gone.is_empty() && failed.is_empty() && writer.old.generation > 0
    {
        // Nothing changed: leave the store exactly as it is.
        let m = writer.old.clone();
        writer.abandon();
        return finish(g, a, summary, &m, skipped, failed, started);
    }
    for s in &skipped {
        if !g.quiet && (a.paths.iter().any(|p| p == &s.path) || s.reason != corpus::UNKNOWN_FORMAT)
        {
            g.warn(&format!("{}: {}", s.path, s.reason));
        }
    }
    let manifest = writer
        .commit(&set, skipped.clone(), failed.clone())
        .context("cannot commit the store")?;
    finish(g, a, summary, &manifest, skipped, failed, started)
}

fn finish(
    g: &Global,
    a: &ScanArgs,
    mut s: Summary,
    m: &hearsay::store::Manifest,
    skipped: Vec<Skipped>,
    failed: Vec<Skipped>,
    started: Instant,
) -> Result<ExitCode> {
    let (d, sn, c) = m.totals();
    s.documents = d;
    s.sentences = sn;
    s.claims = c;
    s.files_skipped = skipped.len();
    s.files_failed = failed.len();
    s.skipped = skipped;
    s.failed = failed;
    s.seconds = (started.elapsed().as_secs_f64() * 1000.0).round() / 1000.0;
    let mut out = std::io::stdout().lock();
    match g.format() {
        Format::Json => {
            serde_json::to_writer(&mut out, &s)?;
            std::io::Write::write_all(&mut out, b"\n")?;
        }
        Format::Table | Format::Csv => {
            let mut t = Table::new(&[
                "store",
                "files",
                "read",
                "unchanged",
                "removed",
                "skipped",
                "failed",
                "documents",
                "sentences",
                "claims",
                "seconds",
            ]);
            t.row(vec![
                s.store.clone(),
                s.files_seen.to_string(),
                s.files_read.to_string(),
                s.files_unchanged.to_string(),
                s.files_removed.to_string(),
                s.files_skipped.to_string(),
                s.files_failed.to_string(),
                s.documents.to_string(),
                s.sentences.to_string(),
                s.claims.to_string(),
                format!("{:.2}", s.seconds),
            ]);
            t.print(&mut out)?;
            for f in &s.failed {
                std::io::Write::write_all(
                    &mut out,
                    format!("failed: {}: {}\n", escape(&f.path), escape(&f.reason)).as_bytes(),
                )?;
            }
        }
    }
    Ok(if a.strict && s.files_failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}
