//! `hearsay conflicts`: pairs the corpus states inconsistently, with the evidence on each side.

use super::output::{count, print_evidence};
use super::{escape, write_rows, ClaimFilter, Format, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::graph::{self, Conflict};
use hearsay::query::{self, EvidenceLine};
use serde::Serialize;
use std::io::Write;
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Three kinds: both-directions (X → Y and Y → X are both stated), \
opposite-signs (X → Y stated as an increase and as a decrease or prevention), \
asserted-and-denied (X → Y stated, and denied with \"not\" or \"has no effect on\"). Ranked by the \
claims on both sides together, then by how even the split is.\n\nA conflict is between \
statements in text; it says nothing about which is right.\n\nWithout a filter or --dedupe, the \
store's aggregate tables rank the conflicts and only the claim rows of those shown are read; a \
filter or --dedupe reads every claim row."
)]
pub struct ConflictsArgs {
    /// Only conflicts with at least N claims on each side.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_claims: usize,
    /// Show at most N conflicts (0: all).
    #[arg(long, default_value_t = 50, value_name = "N")]
    pub limit: usize,
    /// Evidence sentences per side.
    #[arg(long, default_value_t = 2, value_name = "N")]
    pub evidence: usize,
    /// Count near-duplicate sentences of the same claim once.
    #[arg(long)]
    pub dedupe: bool,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

#[derive(Serialize)]
struct ConflictOut<'a> {
    #[serde(flatten)]
    conflict: &'a Conflict,
    evidence: [Vec<EvidenceLine>; 2],
}

pub fn run(g: &Global, a: &ConflictsArgs) -> Result<ExitCode> {
    let filter = a.filter.to_filter();
    let (loaded, rank) = if filter.is_empty() && !a.dedupe {
        // The aggregate tables rank the conflicts; only the rows of those shown are read.
        let (store, normalizer, aliases) = g.query_parts()?;
        let agg =
            query::aggregate(&store, &aliases).context("cannot read the store's aggregates")?;
        let rank = query::ranked_conflicts(&agg, a.min_claims, a.limit);
        let loaded = query::load_relations(store, normalizer, aliases, &agg, &rank.relations())
            .context("cannot read the store's claims")?;
        (loaded, Some(rank))
    } else {
        (g.load(&filter, a.dedupe)?, None)
    };
    let mut cs = graph::conflicts(&loaded.graph, a.min_claims);
    if let Some(rank) = &rank {
        cs.retain(|c| rank.keeps(c));
    }
    if a.limit > 0 {
        cs.truncate(a.limit);
    }
    let outs: Vec<ConflictOut> = cs
        .iter()
        .map(|c| ConflictOut {
            conflict: c,
            evidence: [
                loaded.evidence(&c.sides[0].rows, a.evidence),
                loaded.evidence(&c.sides[1].rows, a.evidence),
            ],
        })
        .collect();
    let mut out = std::io::stdout().lock();
    match g.format() {
        // JSON Lines has no columns: the cells and headers are for CSV and tables only.
        Format::Json => write_rows(&mut out, Format::Json, &outs, |_| Vec::new(), &[])?,
        Format::Csv => {
            let mut w = super::output::csv_writer(&mut out);
            w.write_record([
                "kind", "x", "y", "support", "side1", "claims1", "docs1", "side2", "claims2",
                "docs2",
            ])?;
            for c in &cs {
                let [s1, s2] = &c.sides;
                w.write_record([
                    c.kind.as_str().to_string(),
                    c.x_label.clone(),
                    c.y_label.clone(),
                    c.support.to_string(),
                    s1.reading.to_string(),
                    s1.claims.to_string(),
                    s1.documents.to_string(),
                    s2.reading.to_string(),
                    s2.claims.to_string(),
                    s2.documents.to_string(),
                ])?;
            }
            w.flush()?;
        }
        Format::Table => {
            if outs.is_empty() {
                writeln!(out, "no conflicting statements")?;
            }
            for (i, c) in outs.iter().enumerate() {
                let k = c.conflict;
                writeln!(
                    out,
                    "#{}  {}  {} / {}  ({})",
                    i + 1,
                    k.kind.as_str(),
                    escape(&k.x_label),
                    escape(&k.y_label),
                    count(k.support, "claim")
                )?;
                for (s, ev) in k.sides.iter().zip(c.evidence.iter()) {
                    let label = |key: &str| {
                        loaded
                            .graph
                            .index
                            .get(key)
                            .map(|&n| loaded.graph.graph[n].label.clone())
                            .unwrap_or_else(|| key.to_string())
                    };
                    writeln!(
                        out,
                        "  {:<9} {} → {}: {} in {}",
                        s.reading,
                        escape(&label(&s.cause)),
                        escape(&label(&s.effect)),
                        count(s.claims, "claim"),
                        count(s.documents, "document")
                    )?;
                    print_evidence(&mut out, "      ", ev)?;
                }
            }
        }
    }
    Ok(ExitCode::SUCCESS)
}
