//! `hearsay top`: the most-stated relations.

use super::{write_rows, ClaimFilter, Global};
use anyhow::{Context, Result};
use clap::Args;
use hearsay::query::{self, TopRelation};
use std::process::ExitCode;

#[derive(Args, Debug)]
#[command(
    after_help = "Relations are ranked by the number of distinct documents that state them, \
then by the number of claims. Causal relations are directed (cause → effect); association \
relations are listed once per pair. Filters apply to claims before they are counted.\n\n\
Columns: claims = asserted + hedged + negated + conditional + question. sign is the edge's sign \
by the rule every command uses (docs/graph.md): the majority of the non-negated signed claims \
(increase against decrease and prevent), mixed on a tie; with no signed claim, \"no effect\" when \
\"has no effect\" claims outnumber unsigned ones, else unsigned.\n\nExit status: 0 (also when no \
relation passes the filters), 2 on an error.\n\nWithout a filter the counts come from \
the store's aggregate tables (docs/store.md); a filter reads every claim row instead.\n\nThese are counts of statements in text, not \
evidence that the causation is real."
)]
pub struct TopArgs {
    /// How many relations to show (0 for all).
    #[arg(long, short = 'n', default_value_t = 20)]
    pub limit: usize,
    /// Only relations stated in at least this many documents.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_docs: usize,
    /// Only relations with at least this many claims.
    #[arg(long, default_value_t = 1, value_name = "N")]
    pub min_claims: usize,
    #[command(flatten)]
    pub filter: ClaimFilter,
}

const HEADERS: &[&str] = &[
    "kind",
    "cause",
    "effect",
    "documents",
    "claims",
    "asserted",
    "hedged",
    "negated",
    "conditional",
    "question",
    "sign",
    "first",
];

pub fn run(g: &Global, a: &TopArgs) -> Result<ExitCode> {
    let filter = a.filter.to_filter();
    let mut rows = if filter.is_empty() {
        // No filter: the store's aggregate tables answer without reading the claim rows.
        let (store, _, aliases) = g.query_parts()?;
        let agg =
            query::aggregate(&store, &aliases).context("cannot read the store's aggregates")?;
        query::top_from_aggregates(&agg, a.min_docs, a.min_claims, a.limit)
    } else {
        let loaded = g.graph(&filter)?;
        query::top_relations(&loaded.graph, a.min_docs, a.min_claims)
    };
    if a.limit > 0 {
        rows.truncate(a.limit);
    }
    let mut out = std::io::stdout().lock();
    write_rows(&mut out, g.format(), &rows, cells, HEADERS)?;
    Ok(ExitCode::SUCCESS)
}

fn cells(r: &TopRelation) -> Vec<String> {
    vec![
        r.kind.to_string(),
        r.cause.clone(),
        r.effect.clone(),
        r.documents.to_string(),
        r.claims.to_string(),
        r.asserted.to_string(),
        r.hedged.to_string(),
        r.negated.to_string(),
        r.conditional.to_string(),
        r.question.to_string(),
        r.sign.to_string(),
        r.first.clone(),
    ]
}
