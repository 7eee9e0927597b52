//! `hearsay cycles`: directed cycles among well-stated edges.

use super::args::WeightArgs;
use super::output::{count, print_evidence};
use super::{escape, write_rows, ClaimFilter, Format, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::graph::{self, Sign};
use hearsay::query::HopEvidence;
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "A cycle is A → B → ... → A over edges of at least --min-weight, each \
reported once, ranked by its weakest link. Feedback stated in text, not evidence of feedback.\n\nWithout a claim filter or --dedupe, the weights come from the store's aggregate tables \
(docs/store.md) and only the evidence rows printed are read; with one, every claim row is read."
)]
pub struct CyclesArgs {
    /// Only edges of at least this weight.
    #[arg(
        long,
        default_value_t = 2.0,
        value_name = "W",
        allow_negative_numbers = true
    )]
    pub min_weight: f64,
    /// Longest cycle, in edges.
    #[arg(long, default_value_t = 4, value_name = "N")]
    pub max_len: usize,
    /// Stop after finding N cycles (0: no limit).
    #[arg(long, default_value_t = 1000, value_name = "N")]
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
struct CycleOut<'a> {
    support: f64,
    sign: Sign,
    hops: Vec<HopEvidence<'a>>,
}

pub fn run(g: &Global, a: &CyclesArgs) -> Result<ExitCode> {
    let loaded = a.weight.load_counts(g, &a.filter, false)?;
    let spec = a.weight.spec();
    let cycles = graph::cycles(&loaded.graph, &spec, a.min_weight, a.max_len, a.limit);
    let hops: Vec<&[_]> = cycles.iter().map(|c| c.hops.as_slice()).collect();
    let evidence = loaded
        .chains_evidence(&hops, a.evidence)
        .context("cannot read the evidence of the cycles")?;
    let outs: Vec<CycleOut> = cycles
        .iter()
        .zip(evidence)
        .map(|(c, hops)| CycleOut {
            support: c.support,
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
            w.write_record(["cycle", "support", "sign", "length", "variables"])?;
            for (i, c) in outs.iter().enumerate() {
                let names: Vec<&str> = c.hops.iter().map(|h| h.hop.cause_label.as_str()).collect();
                w.write_record([
                    (i + 1).to_string(),
                    c.support.to_string(),
                    c.sign.as_str().to_string(),
                    c.hops.len().to_string(),
                    names.join(" -> "),
                ])?;
            }
            w.flush()?;
        }
        Format::Table => {
            if outs.is_empty() {
                writeln!(
                    out,
                    "no directed cycle of at most {} of weight >= {}",
                    count(a.max_len, "edge"),
                    a.min_weight
                )?;
            }
            for (i, c) in outs.iter().enumerate() {
                writeln!(
                    out,
                    "#{}  {}  weakest link {}  sign {}",
                    i + 1,
                    count(c.hops.len(), "edge"),
                    c.support,
                    c.sign.as_str()
                )?;
                for h in &c.hops {
                    writeln!(
                        out,
                        "  {} → {}   weight {}, {}",
                        escape(&h.hop.cause_label),
                        escape(&h.hop.effect_label),
                        h.hop.weight,
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
