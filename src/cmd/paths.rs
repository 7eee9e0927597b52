//! `hearsay paths X Y`: indirect chains of stated edges from X to Y.

use super::args::WeightArgs;
use super::output::{count, find_var, print_evidence};
use super::{escape, write_rows, ClaimFilter, Format, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::graph::{self, Chain, Sign};
use hearsay::query::HopEvidence;
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "A chain is X → A → ... → Y over edges whose weight is above 0 (and at \
least --min-weight); the direct edge X → Y is not a chain (see `hearsay pair`). Chains are ranked \
by their weakest link (the smallest hop weight), then by fewer hops, then by the product of the \
hop weights divided by the heaviest edge. The chain's sign multiplies the hop signs: increase \
then decrease is decrease, and one unsigned hop makes the chain unsigned. A hop's sign is the \
majority of its non-negated signed claims.\n\nA chain joins statements from different texts; it \
is not evidence that X affects Y.\n\nWithout a claim filter or --dedupe, the weights come from the store's aggregate tables \
(docs/store.md) and only the evidence rows printed are read; with one, every claim row is read."
)]
pub struct PathsArgs {
    /// The start variable.
    pub x: String,
    /// The end variable.
    pub y: String,
    /// Longest chain, in edges.
    #[arg(long, default_value_t = 3, value_name = "N")]
    pub max_hops: usize,
    /// Only edges of at least this weight.
    #[arg(
        long,
        default_value_t = 0.0,
        value_name = "W",
        allow_negative_numbers = true
    )]
    pub min_weight: f64,
    /// Show at most N chains (0: all).
    #[arg(long, default_value_t = 20, value_name = "N")]
    pub limit: usize,
    /// Evidence sentences per hop.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub evidence: usize,
    #[command(flatten)]
    pub weight: WeightArgs,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

#[derive(Serialize)]
struct ChainOut<'a> {
    rank: usize,
    support: f64,
    product: f64,
    sign: Sign,
    hops: Vec<HopEvidence<'a>>,
}

pub fn run(g: &Global, a: &PathsArgs) -> Result<ExitCode> {
    let loaded = a.weight.load_counts(g, &a.filter, false)?;
    let (x, y) = (find_var(&loaded, &a.x)?, find_var(&loaded, &a.y)?);
    let spec = a.weight.spec();
    let chains: Vec<Chain> = graph::paths(
        &loaded.graph,
        &spec,
        x,
        y,
        a.max_hops,
        a.min_weight,
        a.limit,
    );
    let hops: Vec<&[_]> = chains.iter().map(|c| c.hops.as_slice()).collect();
    let evidence = loaded
        .chains_evidence(&hops, a.evidence)
        .context("cannot read the evidence of the chains")?;
    let outs: Vec<ChainOut> = chains
        .iter()
        .zip(evidence)
        .enumerate()
        .map(|(i, (c, hops))| ChainOut {
            rank: i + 1,
            support: c.support,
            product: c.product,
            sign: c.sign,
            hops,
        })
        .collect();
    let mut out = std::io::stdout().lock();
    match g.format() {
        // JSON Lines has no columns: the cells and headers are for CSV and tables only.
        Format::Json => write_rows(&mut out, Format::Json, &outs, |_| Vec::new(), &[])?,
        Format::Csv => {
            let mut w = super::output::csv_writer(&mut out);
            w.write_record([
                "rank", "support", "sign", "hop", "cause", "effect", "weight", "hop_sign",
                "evidence",
            ])?;
            for c in &outs {
                for (i, h) in c.hops.iter().enumerate() {
                    w.write_record([
                        c.rank.to_string(),
                        c.support.to_string(),
                        c.sign.as_str().to_string(),
                        (i + 1).to_string(),
                        h.hop.cause_label.clone(),
                        h.hop.effect_label.clone(),
                        h.hop.weight.to_string(),
                        h.hop.sign.as_str().to_string(),
                        h.evidence
                            .first()
                            .map(|e| format!("{}: {}", e.location, e.sentence))
                            .unwrap_or_default(),
                    ])?;
                }
            }
            w.flush()?;
        }
        Format::Table => {
            let (xl, yl) = (&loaded.graph.graph[x].label, &loaded.graph.graph[y].label);
            if outs.is_empty() {
                writeln!(
                    out,
                    "no chain of 2 to {} stated edges from \"{}\" to \"{}\"",
                    a.max_hops,
                    escape(xl),
                    escape(yl)
                )?;
            }
            for c in &outs {
                writeln!(
                    out,
                    "#{}  {}  weakest link {}  chain sign {}",
                    c.rank,
                    count(c.hops.len(), "hop"),
                    c.support,
                    c.sign.as_str()
                )?;
                for h in &c.hops {
                    writeln!(
                        out,
                        "  {} → {}   weight {}, {}, {}",
                        escape(&h.hop.cause_label),
                        escape(&h.hop.effect_label),
                        h.hop.weight,
                        count(h.hop.documents, "document"),
                        h.hop.sign.as_str()
                    )?;
                    print_evidence(&mut out, "      ", &h.evidence)?;
                }
            }
            writeln!(out, "{}", spec.describe())?;
        }
    }
    Ok(ExitCode::SUCCESS)
}
