//! `hearsay extract PATH...|-`: claims as JSON Lines on stdout, no store. The map step for
//! pipelines and clusters: its output is what `merge` (and any reducer) consumes.

use super::{check_paths, ClaimFilter, Global};
use anyhow::Result;
use clap::Args;
use hearsay::claims::collapse;
use hearsay::corpus::{self, Input};
use hearsay::graph::doc_id;
use hearsay::pipeline;
use hearsay::store::{FileRecord, SentenceRecord};
use rayon::prelude::*;
use std::io::Write;
use std::process::ExitCode;
use std::time::Instant;

#[derive(Args, Debug)]
#[command(
    after_help = "Each output line is one claim record (see the README's \"Output schema\"). \
Files are processed in parallel and printed in input order. A file that cannot be read is \
reported on stderr and skipped.\n\nExit status: 0 on success (unreadable files are warnings); \
1 under --strict when any file failed; 2 on an error."
)]
pub struct ExtractArgs {
    /// Files and folders to read (`-` reads standard input).
    #[arg(required = true, value_name = "PATH")]
    pub paths: Vec<String>,
    /// Exit with status 1 when any file could not be read.
    #[arg(long)]
    pub strict: bool,
    /// Also print every sentence (`{"sentence_of": doc, "line", "start", "text"}`) and, after
    /// each file's records, a file record (`{"file", "documents", "sentences", "bytes"}`), so
    /// that `hearsay merge` can rebuild the search index and co-mention counts.
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
    let opts = g.read.options();
    let filter = a.filter.to_filter();
    let (inputs, skipped) = corpus::discover(&a.paths);
    for s in &skipped {
        if a.paths.iter().any(|p| p == &s.path) {
            g.warn(&format!("{}: {}", s.path, s.reason));
        }
    }
    let mut out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
    let (mut claims, mut failed, mut bytes) = (0usize, 0usize, 0usize);
    // A window of 16 files per thread keeps every thread busy past files of uneven size
    // (32 was no faster on eLife and held 2.5 MB more at -j2); results wait only for their
    // window, so memory stays bounded.
    let chunk = rayon::current_num_threads() * 16;
    for group in inputs.chunks(chunk.max(1)) {
        let results: Vec<Extracted> = group
            .par_iter()
            .map(|i| one(&ex, &opts, i, a.sentences, &filter))
            .collect();
        for (input, (r, warnings)) in group.iter().zip(results) {
            for w in warnings {
                g.warn(&w);
            }
            match r {
                Ok((text, n, b)) => {
                    out.write_all(text.as_bytes())?;
                    claims += n;
                    bytes += b;
                }
                Err(e) => {
                    failed += 1;
                    g.warn(&format!("{}: {e}", input.label));
                }
            }
        }
    }
    out.flush()?;
    if !g.quiet {
        let secs = started.elapsed().as_secs_f64();
        eprintln!(
            "hearsay: {} files, {:.1} MB, {} claims, {} failed, {} skipped, {:.2} s",
            inputs.len() - failed,
            bytes as f64 / 1e6,
            claims,
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

type Extracted = (Result<(String, usize, usize), String>, Vec<String>);

fn one(
    ex: &hearsay::claims::Extractor,
    opts: &corpus::ReadOptions,
    input: &Input,
    with_sentences: bool,
    filter: &hearsay::graph::Filter,
) -> Extracted {
    let mut warnings = Vec::new();
    let r = (|| {
        let mut text = String::new();
        let (mut n, mut b, mut docs, mut sents) = (0, 0, 0u64, 0u64);
        let mut failed = None;
        let mut push = |text: &mut String, r: serde_json::Result<String>| match r {
            Ok(j) => {
                text.push_str(&j);
                text.push('\n');
            }
            Err(e) => failed = Some(e.to_string()),
        };
        corpus::read_input(input, opts, &mut warnings, &mut |d| {
            b += d.text.len();
            docs += 1;
            for c in pipeline::document_claims(ex, &d) {
                if !filter.accepts_claim(&c) {
                    continue;
                }
                push(&mut text, serde_json::to_string(&c));
                n += 1;
            }
            if with_sentences {
                let id = doc_id(&d.path, d.record.as_deref());
                for s in pipeline::document_sentences(&d) {
                    sents += 1;
                    let rec = SentenceRecord {
                        sentence_of: id.clone(),
                        line: s.line as u64,
                        start: s.start as u64,
                        text: collapse(s.text),
                    };
                    push(&mut text, serde_json::to_string(&rec));
                }
            }
        })
        .map_err(|e| e.to_string())?;
        if with_sentences {
            let rec = FileRecord {
                file: input.label.clone(),
                documents: docs,
                sentences: sents,
                bytes: b as u64,
            };
            push(&mut text, serde_json::to_string(&rec));
        }
        if let Some(e) = failed {
            return Err(e);
        }
        Ok((text, n, b))
    })();
    (r, warnings)
}
