//! `hearsay graph`: export the claim graph for network tools.

use super::{ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::{Args, ValueEnum};
use hearsay::export::{self, Selection};
use std::io::Write;
use std::process::ExitCode;

#[derive(ValueEnum, Debug, Clone, Copy)]
pub enum To {
    Graphml,
    Json,
}

#[derive(Args, Debug)]
#[command(
    after_help = "Exports causal edges (cause → effect) with their counts. The weight is \
distinct documents, each counted with the mean value of its claims: asserted 1, hedged and \
conditional 0.5, question 0, negated or \"no effect\" -1. json is node-link JSON for \
networkx.node_link_graph(data, edges=\"edges\")."
)]
pub struct GraphArgs {
    /// Export format.
    #[arg(long, value_enum, default_value = "graphml")]
    pub to: To,
    /// Write to FILE instead of stdout.
    #[arg(long, short = 'o', value_name = "FILE")]
    pub output: Option<std::path::PathBuf>,
    /// Only edges stated in at least N documents.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_docs: usize,
    /// Only edges with at least N claims.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_claims: usize,
    /// Only the N heaviest edges (0: all).
    #[arg(long, default_value_t = 0, value_name = "N")]
    pub top: usize,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

pub fn run(g: &Global, a: &GraphArgs) -> Result<ExitCode> {
    let loaded = g.graph(&a.filter.to_filter())?;
    let sel = Selection {
        min_docs: a.min_docs,
        min_claims: a.min_claims,
        top: a.top,
    };
    let e = export::select(&loaded.graph, &sel);
    let mut buf: Vec<u8> = Vec::new();
    match a.to {
        To::Json => export::write_json(&mut buf, &e)?,
        To::Graphml => export::write_graphml(&mut buf, &e).map_err(|x| anyhow::anyhow!(x))?,
    }
    match &a.output {
        Some(p) => {
            std::fs::write(p, &buf).with_context(|| format!("cannot write {}", p.display()))?
        }
        None => std::io::stdout().lock().write_all(&buf)?,
    }
    Ok(ExitCode::SUCCESS)
}
