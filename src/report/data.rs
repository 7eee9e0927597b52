//! The report's data: every number and sentence the page shows, as plain values.

use super::layout;
use crate::claim::{Modality, Polarity};
use crate::compare::Summary as ComparisonSummary;
use crate::graph::Sign;
use crate::query::{CoMention, Conflict, CorpusSummary, EvidenceLine, PairReport, TopRelation};
use std::collections::BTreeMap;

/// How much the page shows.
#[derive(Debug, Clone)]
pub struct Options {
    pub title: String,
    /// Causal edges in the graph picture (the heaviest by the export weight).
    pub edges: usize,
    /// Evidence sentences per edge and per pair direction.
    pub evidence: usize,
    /// Rows per table.
    pub rows: usize,
    /// How many of the most-mentioned variables the co-mention table pairs up.
    pub co_mention_vars: usize,
}

impl Default for Options {
    fn default() -> Self {
        Options {
            title: "Claim report".into(),
            edges: 40,
            evidence: 3,
            rows: 50,
            co_mention_vars: 25,
        }
    }
}

/// A variable in the picture, at its laid-out place.
#[derive(Debug, Clone)]
pub struct PictureNode {
    pub key: String,
    pub label: String,
    pub mentions: usize,
    pub documents: usize,
    pub at: layout::Point,
}

/// A causal edge in the picture.
#[derive(Debug, Clone)]
pub struct PictureEdge {
    pub source: usize,
    pub target: usize,
    pub claims: usize,
    pub support: usize,
    pub documents: usize,
    pub weight: f64,
    pub modality: BTreeMap<Modality, usize>,
    pub polarity: BTreeMap<Polarity, usize>,
    pub sign: Sign,
    /// At least half the claims are hedged, conditional or questions.
    pub hedged_heavy: bool,
    /// The edge is in the conflicts table.
    pub disputed: bool,
    /// The reverse edge is in the picture too (the two are drawn bowed apart).
    pub reciprocal: bool,
    pub evidence: Vec<EvidenceLine>,
}

/// A pair stated in both directions, for the direction-ratio plot.
#[derive(Debug, Clone)]
pub struct BothWays {
    /// The direction with more support first.
    pub major: (String, String),
    pub total_support: usize,
    /// Share of support that goes the major way, in [0.5, 1].
    pub major_share: f64,
}

/// Everything the page shows.
#[derive(Debug, Clone, Default)]
pub struct Report {
    pub title: String,
    pub summary: CorpusSummary,
    pub nodes: Vec<PictureNode>,
    pub edges: Vec<PictureEdge>,
    /// Support of every causal edge in the graph.
    pub support_per_edge: Vec<usize>,
    pub both_ways: Vec<BothWays>,
    /// Cue family → claims.
    pub families: Vec<(String, usize)>,
    pub top: Vec<TopRelation>,
    /// The conflicts, as `hearsay conflicts` lists them.
    pub conflicts: Vec<Conflict>,
    pub co_mentions: Vec<CoMention>,
    pub pair: Option<PairReport>,
    /// With `--compare`: the per-model, per-family summaries of `hearsay compare`.
    pub comparison: Option<Vec<ComparisonSummary>>,
}
