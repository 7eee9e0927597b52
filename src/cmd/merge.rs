//! `hearsay merge SHARD...|-`: build a store from `hearsay extract` output (the reduce step).

use super::Global;
use anyhow::{Context, Result};
use clap::Args;
use hearsay::store::{Merge, StoreWriter};
use std::io::BufReader;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Shards are JSON Lines files written by `hearsay extract` (`-` reads standard \
input). The store built is the one `scan` would build from the same documents, claim for claim \
and count for count, when the shards were written with `extract --sentences` (without it the \
search index is empty, so co-mention counts are 0). Give shards in corpus order to keep corpus \
order. Records are written to the store as they are read: memory does not grow with the \
shards. The store must be new or empty: merge does not add to a scanned store; on an error \
nothing is committed.\n\nExit status: \
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
    let writer = StoreWriter::open(&g.store, a.index_memory * 1_000_000, &set.lexicon)
        .with_context(|| format!("cannot open the store {} for writing", g.store.display()))?;
    let mut merge = Merge::new(writer)?;
    // Shards stream into the store; on any error nothing is committed.
    let read = (|| -> Result<()> {
        for s in &a.shards {
            if s == "-" {
                merge.read("-", std::io::stdin().lock())?;
            } else {
                let f = std::fs::File::open(s).with_context(|| format!("{s}: cannot open"))?;
                merge.read(s, BufReader::with_capacity(1 << 16, f))?;
            }
        }
        Ok(())
    })();
    if let Err(e) = read {
        merge.abandon();
        return Err(e);
    }
    let (cut, bare) = merge.unclosed();
    if !cut.is_empty() {
        g.warn(&format!(
            "{} file(s) have sentence records but no closing file record, so the extract run \
             stopped part-way through them (first: {}); what the shards hold of them is merged, \
             and their document counts are those their claims name",
            cut.len(),
            cut[0]
        ));
    }
    if bare > 0 {
        g.warn(&format!(
            "{bare} file(s) have no sentence records (use `extract --sentences`): their \
             co-mention counts will be 0"
        ));
    }
    let (files, claims) = (merge.files(), merge.claims);
    let m = merge.commit(&set).context("cannot commit the store")?;
    if !g.quiet {
        let (d, s, _) = m.totals();
        eprintln!("hearsay: merged {files} files, {d} documents, {s} sentences, {claims} claims");
    }
    Ok(ExitCode::SUCCESS)
}
