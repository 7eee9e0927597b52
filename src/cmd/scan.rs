//! `hearsay scan PATH...`: read files into the claim store, re-reading only what changed.

use super::progress::Progress;
use super::{check_paths, escape, Format, Global, ReadArgs, Table};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::corpus::{self, Skipped};
use hearsay::store::{self, Manifest, ScanEvents, ScanOptions, ScanReport, StoreWriter};
use serde::Serialize;
use std::process::ExitCode;
use std::time::Instant;

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
    #[command(flatten, next_help_heading = "Reading files")]
    pub read: ReadArgs,
}

/// The scan's summary as printed (`--format json` prints it whole).
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

/// What the scan tells, shown on stderr: progress on the bar, warnings beside it.
struct Shown<'a> {
    g: &'a Global,
    a: &'a ScanArgs,
    progress: Progress,
}

impl ScanEvents for Shown<'_> {
    fn rereading_all(&self, old: &Manifest) {
        self.g.warn(&format!(
            "the store was read with other patterns or another hearsay version (patterns {}, \
             hearsay {}); re-reading every file",
            old.patterns, old.hearsay_version
        ));
    }

    fn stream(&self, label: &str, documents: u64, bytes: u64) {
        self.progress.stream(label, documents, bytes);
    }

    fn warn(&self, message: &str) {
        self.progress.warn(self.g, message);
    }

    fn failed(&self, file: &Skipped) {
        self.progress
            .warn(self.g, &format!("{}: {}", file.path, file.reason));
    }

    fn file_done(&self) {
        self.progress.file_done();
    }

    fn read_done(&self) {
        self.progress.finish();
    }

    /// Files of unknown formats in a walked folder are passed over silently; anything else
    /// passed over, or named on the command line, is warned about.
    fn skipped(&self, s: &Skipped) {
        let named = self.a.paths.iter().any(|p| p == &s.path);
        if !self.g.quiet && (named || s.reason != corpus::UNKNOWN_FORMAT) {
            self.g.warn(&format!("{}: {}", s.path, s.reason));
        }
    }
}

pub fn run(g: &Global, a: &ScanArgs) -> Result<ExitCode> {
    let started = Instant::now();
    check_paths(&a.paths)?;
    let set = g.pattern_set()?;
    let writer = StoreWriter::open(&g.store, a.index_memory * 1_000_000, &set.lexicon)
        .with_context(|| format!("cannot open the store {} for writing", g.store.display()))?;
    if let Some(al) = &g.aliases {
        hearsay::patterns::load_aliases(al)
            .with_context(|| format!("cannot load aliases {}", al.display()))?;
        std::fs::copy(al, g.store.join("aliases.tsv"))
            .with_context(|| format!("cannot copy {} into the store", al.display()))?;
    }
    let (inputs, skipped) = corpus::discover(&a.paths);
    let shown = Shown {
        g,
        a,
        progress: Progress::new(g, "scanning", inputs.len()),
    };
    let options = ScanOptions {
        paths: &a.paths,
        read: a.read.options(&g.read),
        file_memory: a.file_memory.max(1) * 1_000_000,
    };
    let report = store::scan(writer, &set, &inputs, &skipped, &options, &shown, || {
        g.extractor_for(&set)
    })?;
    let summary = Summary {
        store: g.store.display().to_string(),
        files_seen: inputs.len(),
        ..Summary::default()
    };
    finish(g, a, summary, report, skipped, started)
}

fn finish(
    g: &Global,
    a: &ScanArgs,
    mut s: Summary,
    report: ScanReport,
    skipped: Vec<Skipped>,
    started: Instant,
) -> Result<ExitCode> {
    let failed = report.failed;
    s.files_read = report.read;
    s.files_unchanged = report.unchanged;
    s.files_removed = report.removed;
    let (d, sn, c) = report.manifest.totals();
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
