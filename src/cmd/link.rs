//! `hearsay link PART...`: join part stores into one without reading their claims (the reduce
//! step when every partition of a cluster job scans its own files).

use super::Global;
use anyhow::{Context, Result};
use clap::Args;
use std::path::PathBuf;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Each PART is a store written by `hearsay --store PART scan FILE...` \
(one a partition of a cluster job); the store given by --store (new or empty) gets them all. \
Claim segments and index segments are hard-linked into it (copied when a part is on another \
file system), under new segment numbers, and the manifests and vocabularies are joined: no \
claim is read again, so linking costs a few file operations a part. The result answers every \
query as one scan of the same files would, and a later `scan` of those files updates it as \
usual.\n\nThe parts must be stores of this hearsay's store version, scanned with the same \
--patterns by the same hearsay version, and hold different files; a part that is not a store, \
is locked by a running scan, or is at odds with another part is refused with an error naming \
it. A part is never changed. The output's lock is held throughout; on an error nothing is \
committed and what was written is removed.\n\nExit status: 0 on success, 2 on an error."
)]
pub struct LinkArgs {
    /// Part stores to join, each written by `scan`.
    #[arg(required = true, value_name = "PART")]
    pub parts: Vec<PathBuf>,
}

pub fn run(g: &Global, a: &LinkArgs) -> Result<ExitCode> {
    let report = hearsay::store::link(&g.store, &a.parts)
        .with_context(|| format!("cannot link the parts into {}", g.store.display()))?;
    if !g.quiet {
        let (d, s, c) = report.manifest.totals();
        eprintln!(
            "hearsay: linked {} parts into {}: {} files, {d} documents, {s} sentences, {c} \
             claims in {} segments ({} files hard-linked, {} copied)",
            a.parts.len(),
            g.store.display(),
            report.manifest.files.len(),
            report.segments,
            report.linked,
            report.copied
        );
    }
    Ok(ExitCode::SUCCESS)
}
