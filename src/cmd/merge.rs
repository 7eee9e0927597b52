//! `hearsay merge SHARD...|-`: build a store from `hearsay extract` output (the reduce step).

use super::Global;
use anyhow::{Context, Result};
use clap::Args;
use hearsay::store::{Shards, StoreWriter};
use std::io::BufReader;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Shards are JSON Lines files written by `hearsay extract` (`-` reads standard \
input). The store built is the one `scan` would build from the same documents, claim for claim \
and count for count, when the shards were written with `extract --sentences` (without it the \
search index is empty, so co-mention counts are 0). Give shards in corpus order to keep corpus \
order. The store must be new or empty: merge does not add to a scanned store.\n\nExit status: \
0 on success, 2 on an error (a line that is not an extract record names the shard and line)."
)]
pub struct MergeArgs {
    /// Shard files written by `hearsay extract` (`-` reads standard input).
    #[arg(required = true, value_name = "SHARD")]
    pub shards: Vec<String>,
    /// Memory for the search index writer, in MB.
    #[arg(long, default_value_t = 100, value_name = "MB")]
    pub index_memory: usize,
}

pub fn run(g: &Global, a: &MergeArgs) -> Result<ExitCode> {
    let set = g.pattern_set()?;
    let mut shards = Shards::default();
    for s in &a.shards {
        if s == "-" {
            shards.read("-", std::io::stdin().lock())?;
        } else {
            let f = std::fs::File::open(s).with_context(|| format!("{s}: cannot open"))?;
            shards.read(s, BufReader::with_capacity(1 << 16, f))?;
        }
    }
    if !shards.has_sentences() && !g.quiet {
        g.warn("shards have no sentence records (use `extract --sentences`): co-mention counts will be 0");
    }
    let results = shards.into_results()?;
    let mut writer = StoreWriter::open(&g.store, a.index_memory * 1_000_000, &set.lexicon)
        .with_context(|| format!("cannot open the store {} for writing", g.store.display()))?;
    if !writer.old.files.is_empty() {
        writer.abandon();
        anyhow::bail!(
            "the store {} already holds files; merge into a new store",
            g.store.display()
        );
    }
    let (mut files, mut claims) = (0usize, 0usize);
    for r in results {
        files += 1;
        claims += r.claims.len();
        writer.put(r).context("cannot write to the store")?;
    }
    let m = writer
        .commit(&set, Vec::new(), Vec::new())
        .context("cannot commit the store")?;
    if !g.quiet {
        let (d, s, _) = m.totals();
        eprintln!("hearsay: merged {files} files, {d} documents, {s} sentences, {claims} claims");
    }
    Ok(ExitCode::SUCCESS)
}
