//! The corpus at a glance, and the heaviest part of its graph: what a summary page opens with.

use super::aggregate::Aggregated;
use super::load::Loaded;
use crate::claim::{Kind, Modality, Polarity};
use crate::corpus::Skipped;
use crate::graph::export::{self, Export, Selection};
use crate::graph::ClaimGraph;
use std::collections::BTreeMap;

/// The corpus at a glance.
#[derive(Debug, Clone, Default)]
pub struct CorpusSummary {
    pub files: usize,
    pub documents: u64,
    pub sentences: u64,
    /// Claims the store holds.
    pub claims_stored: u64,
    /// Claims in the graph (after filters; a claim whose cause and effect resolve to one
    /// variable is left out).
    pub claims: usize,
    pub variables: usize,
    pub causal_edges: usize,
    pub by_kind: BTreeMap<Kind, usize>,
    pub by_polarity: BTreeMap<Polarity, usize>,
    pub by_modality: BTreeMap<Modality, usize>,
    pub skipped: Vec<Skipped>,
    pub failed: Vec<Skipped>,
    pub hearsay_version: String,
}

/// The corpus at a glance: the store's totals and the graph's claims by kind, polarity and
/// modality.
pub fn corpus_summary(loaded: &Loaded) -> CorpusSummary {
    let (g, store) = (&loaded.graph, &loaded.store);
    let m = &store.manifest;
    let (documents, sentences, claims_stored) = m.totals();
    let mut s = CorpusSummary {
        files: m.files.len(),
        documents,
        sentences,
        claims_stored,
        claims: g.rows.len(),
        variables: g.graph.node_count(),
        causal_edges: g.graph.edge_count(),
        skipped: m.skipped.clone(),
        failed: m.failed.clone(),
        hearsay_version: m.hearsay_version.clone(),
        ..CorpusSummary::default()
    };
    for r in &g.rows {
        *s.by_kind.entry(r.kind).or_default() += 1;
        *s.by_polarity.entry(r.polarity).or_default() += 1;
        *s.by_modality.entry(r.modality).or_default() += 1;
    }
    s
}

/// [`corpus_summary`] of a graph built from aggregates: the claims by kind, polarity and
/// modality are summed from the relations' counts.
pub fn corpus_summary_of(loaded: &Loaded, agg: &Aggregated) -> CorpusSummary {
    let mut s = corpus_summary(loaded);
    // The graph's rows are only those read for evidence.
    s.claims = 0;
    s.by_kind.clear();
    s.by_polarity.clear();
    s.by_modality.clear();
    for r in &agg.relations {
        s.claims += r.total;
        if r.total > 0 {
            *s.by_kind.entry(r.kind).or_default() += r.total;
        }
        for (p, ms) in &r.counts().by {
            for (m, n) in ms {
                if *n > 0 {
                    *s.by_polarity.entry(*p).or_default() += n;
                    *s.by_modality.entry(*m).or_default() += n;
                }
            }
        }
    }
    s
}

/// The `n` heaviest causal edges under the default weight, with their variables: what
/// `hearsay graph --top N` exports.
pub fn heaviest_edges(g: &ClaimGraph, n: usize) -> Export {
    export::select(
        g,
        &Selection {
            top: n,
            ..Selection::default()
        },
    )
}
