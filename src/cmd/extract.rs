//! `hearsay extract PATH...|-`: claims as JSON Lines on stdout, no store. The map step for
//! pipelines and clusters: its output is what `merge` (and any reducer) consumes.

use super::output::count;
use super::progress::Progress;
use super::{check_paths, ClaimFilter, Global, ReadArgs};
use anyhow::Result;
use clap::Args;
use hearsay::corpus::{self, Input};
use hearsay::extract::{collapse, document_claims, document_sentences};
use hearsay::store::doc_id;
use hearsay::store::{FileRecord, FileStart, SentenceRecord};
use rayon::prelude::*;
use std::io::Write;
use std::process::ExitCode;
use std::time::Instant;

#[derive(Args, Debug)]
#[command(
    after_help = "Each output line is one claim record (see the README's \"Output schema\"). \
Files are processed in parallel and printed in input order. Standard input, JSON Lines files \
and files of 8 MB or more are read as streams: their documents are extracted in parallel \
batches of about 1 MB of text and printed as each batch is done, so one huge dump uses every \
thread in bounded memory. A file that cannot be read is reported on stderr and skipped (a \
stream that fails part-way keeps the records already printed and gets no file record).\n\nExit status: 0 on success (unreadable files are warnings); \
1 under --strict when any file failed; 2 on an error."
)]
pub struct ExtractArgs {
    /// Files and folders to read (`-` reads standard input).
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// Exit with status 1 when any file could not be read.
    #[arg(long)]
    pub strict: bool,
    #[command(flatten, next_help_heading = "Reading files")]
    pub read: ReadArgs,
    /// Also print every sentence (`{"sentence_of": doc, "line", "start", "text"}`), opened by a
    /// `{"begin_file": path}` record and closed by a file record (`{"file", "documents",
    /// "sentences", "bytes"}`) per input file, so that `hearsay merge` can rebuild the search
    /// index and co-mention counts.
    #[arg(long)]
    pub sentences: bool,
    /// Print only the claims that pass these filters (sentence and file records are kept).
    #[command(flatten)]
    pub filter: ClaimFilter,
}

pub fn run(g: &Global, a: &ExtractArgs) -> Result<ExitCode> {
    let started = Instant::now();
    check_paths(&a.paths)?;
    let ex = g.extractor()?;
    let opts = a.read.options(&g.read);
    let filter = a.filter.to_filter();
    let (inputs, skipped) = corpus::discover(&a.paths);
    for s in &skipped {
        if a.paths.iter().any(|p| p == &s.path) {
            g.warn(&format!("{}: {}", s.path, s.reason));
        }
    }
    let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
    let (mut claims, mut failed, mut bytes) = (0usize, 0usize, 0usize);
    let job = Job {
        ex: &ex,
        opts: &opts,
        sentences: a.sentences,
        filter: &filter,
    };
    // A window of 16 files per thread keeps every thread busy past files of uneven size
    // (32 was no faster on eLife and held 2.5 MB more at -j2); results wait only for their
    // window, so memory stays bounded. Inputs that stream (standard input, JSON Lines, large
    // files) are read alone, in batches of documents extracted in parallel.
    let chunk = (rayon::current_num_threads() * 16).max(1);
    let progress = Progress::new(g, "extracting", inputs.len());
    let mut rest = inputs.as_slice();
    while !rest.is_empty() {
        let whole = rest
            .iter()
            .take(chunk)
            .take_while(|i| !corpus::streams(i, &opts))
            .count();
        if whole == 0 {
            let input = &rest[0];
            rest = &rest[1..];
            match job.stream(input, &mut out, &progress, |w| progress.warn(g, w))? {
                Ok((n, b)) => {
                    claims += n;
                    bytes += b;
                }
                Err(e) => {
                    failed += 1;
                    progress.warn(g, &format!("{}: {e}", input.label));
                }
            }
            progress.file_done();
            continue;
        }
        let (group, tail) = rest.split_at(whole);
        rest = tail;
        let results: Vec<Extracted> = group.par_iter().map(|i| job.whole(i)).collect();
        for (input, (r, warnings)) in group.iter().zip(results) {
            for w in warnings {
                progress.warn(g, &w);
            }
            match r {
                Ok((text, n, b)) => {
                    out.write_all(&text)?;
                    claims += n;
                    bytes += b;
                }
                Err(e) => {
                    failed += 1;
                    progress.warn(g, &format!("{}: {e}", input.label));
                }
            }
            progress.file_done();
        }
    }
    out.flush()?;
    progress.finish();
    if !g.quiet {
        let secs = started.elapsed().as_secs_f64();
        eprintln!(
            "hearsay: {}, {:.1} MB, {}, {} failed, {} skipped, {:.2} s",
            count(inputs.len() - failed, "file"),
            bytes as f64 / 1e6,
            count(claims, "claim"),
            failed,
            skipped.len(),
            secs
        );
    }
    Ok(if a.strict && failed > 0 {
        ExitCode::from(1)
    } else {
        ExitCode::SUCCESS
    })
}

type Extracted = (Result<(Vec<u8>, usize, usize), String>, Vec<String>);

/// What every input is extracted with.
struct Job<'a> {
    ex: &'a hearsay::extract::Extractor,
    opts: &'a corpus::ReadOptions,
    sentences: bool,
    filter: &'a hearsay::graph::Filter,
}

/// The records of one document, and what they count.
#[derive(Default)]
struct DocOut {
    /// JSON Lines, written in place (serde_json writes UTF-8).
    text: Vec<u8>,
    claims: usize,
    sentences: u64,
    bytes: usize,
    failed: Option<String>,
}

impl DocOut {
    /// Append one record as a JSON line, or remember why it could not be written (and drop
    /// what was written of it). Serialised straight into the buffer: a string per record grew
    /// by doubling and was copied again.
    fn push(&mut self, rec: &impl serde::Serialize) {
        let len = self.text.len();
        match serde_json::to_writer(&mut self.text, rec) {
            Ok(()) => self.text.push(b'\n'),
            Err(e) => {
                self.text.truncate(len);
                self.failed = Some(e.to_string());
            }
        }
    }
}

impl Job<'_> {
    /// Append one document's claim records (and sentence records) to `o`.
    fn document(&self, d: &corpus::Document, o: &mut DocOut) {
        o.bytes += d.text.len();
        for c in document_claims(self.ex, d) {
            if !self.filter.accepts_claim(&c) {
                continue;
            }
            o.push(&c);
            o.claims += 1;
        }
        if self.sentences {
            let id = doc_id(&d.path, d.record.as_deref());
            for s in document_sentences(d) {
                o.sentences += 1;
                let rec = SentenceRecord {
                    sentence_of: id.clone(),
                    line: s.line as u64,
                    start: s.start as u64,
                    text: collapse(s.text),
                };
                o.push(&rec);
            }
        }
    }

    /// The record that opens an input's sentence records under `--sentences`.
    fn file_start(&self, input: &Input, o: &mut DocOut) {
        if self.sentences {
            o.push(&FileStart {
                begin_file: input.label.clone(),
            });
        }
    }

    /// The file record that closes an input's records under `--sentences`.
    fn file_record(&self, input: &Input, documents: u64, o: &mut DocOut) {
        if self.sentences {
            let rec = FileRecord {
                file: input.label.clone(),
                documents,
                sentences: o.sentences,
                bytes: o.bytes as u64,
            };
            o.push(&rec);
        }
    }

    /// Extract a whole input on this thread; its records are returned, to be printed in order.
    fn whole(&self, input: &Input) -> Extracted {
        let mut warnings = Vec::new();
        let mut o = DocOut::default();
        self.file_start(input, &mut o);
        let mut docs = 0u64;
        let r = corpus::read_input(input, self.opts, &mut warnings, &mut |d| {
            docs += 1;
            self.document(&d, &mut o);
        });
        let r = r.map_err(|e| e.to_string()).and_then(|()| {
            self.file_record(input, docs, &mut o);
            match o.failed.take() {
                Some(e) => Err(e),
                None => Ok((std::mem::take(&mut o.text), o.claims, o.bytes)),
            }
        });
        (r, warnings)
    }

    /// Extract a streamed input: batches of its documents in parallel, printed as each batch
    /// is done. An input that fails part-way keeps the records already printed and gets no file
    /// record, so `merge` sees it as incomplete. The outer error is a failure to print.
    fn stream(
        &self,
        input: &Input,
        out: &mut impl Write,
        progress: &Progress,
        warn: impl Fn(&str),
    ) -> Result<Result<(usize, usize), String>> {
        let (mut claims, mut bytes, mut docs, mut sentences) = (0, 0, 0u64, 0u64);
        let mut failed = None;
        let mut start = DocOut::default();
        self.file_start(input, &mut start);
        let (warnings, r) = corpus::read_batched(input, self.opts, |batch| {
            if docs == 0 {
                out.write_all(&start.text)?;
            }
            docs += batch.len() as u64;
            let outs: Vec<DocOut> = batch
                .par_iter()
                .map(|d| {
                    let mut o = DocOut::default();
                    self.document(d, &mut o);
                    o
                })
                .collect();
            for o in outs {
                out.write_all(&o.text)?;
                claims += o.claims;
                bytes += o.bytes;
                sentences += o.sentences;
                failed = failed.take().or(o.failed);
            }
            progress.stream(&input.label, docs, bytes as u64);
            anyhow::Ok(())
        })?;
        for w in &warnings {
            warn(w);
        }
        if let Err(e) = r {
            return Ok(Err(if docs > 0 {
                format!("{e} (the records of its first {docs} documents were printed)")
            } else {
                e.to_string()
            }));
        }
        if let Some(e) = failed {
            return Ok(Err(e));
        }
        let mut o = DocOut {
            sentences,
            bytes,
            ..DocOut::default()
        };
        if docs == 0 {
            o.text = start.text;
        }
        self.file_record(input, docs, &mut o);
        out.write_all(&o.text)?;
        Ok(Ok((claims, bytes)))
    }
}
