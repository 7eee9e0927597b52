//! Evidence: the sentences behind a relation or a chain, fetched from the store for the rows
//! the graph points at.

use super::load::{relations_graph, Loaded};
use crate::claim::{Modality, Polarity};
use crate::error::StoreError;
use crate::graph::{hop_rows, ClaimGraph, Hop, Relation};
use crate::store::Store;
use serde::Serialize;
use std::collections::{BTreeMap, HashSet};

/// One evidence sentence with its place, as the analyses print it.
#[derive(Debug, Clone, Serialize)]
pub struct EvidenceLine {
    pub location: String,
    pub polarity: Polarity,
    pub modality: Modality,
    /// The cue that fired (shown by the report; the analyses' machine output leaves it out).
    #[serde(skip)]
    pub cue: String,
    pub sentence: String,
}

/// A hop of a chain or cycle with its evidence sentences.
#[derive(Debug, Serialize)]
pub struct HopEvidence<'a> {
    #[serde(flatten)]
    pub hop: &'a Hop,
    pub evidence: Vec<EvidenceLine>,
}

/// (location, sentence) of graph row `r`, read from its full claim record in the store; when the
/// record cannot be read, the row's `doc:line` and the reason.
pub fn evidence_text(g: &ClaimGraph, store: &Store, r: usize) -> (String, String) {
    let row = &g.rows[r];
    match store.claim(row.at) {
        Ok(c) => (c.location(), c.sentence),
        Err(e) => (
            format!("{}:{}", row.doc, row.line),
            format!("(evidence unavailable: {e})"),
        ),
    }
}

/// The first `n` of `rows` (rows of `g`) with their sentences from the store.
fn evidence_lines(g: &ClaimGraph, store: &Store, rows: &[usize], n: usize) -> Vec<EvidenceLine> {
    rows.iter()
        .take(n)
        .map(|&r| {
            let row = &g.rows[r];
            let (location, sentence) = evidence_text(g, store, r);
            EvidenceLine {
                location,
                polarity: row.polarity,
                modality: row.modality,
                cue: row.cue.clone(),
                sentence,
            }
        })
        .collect()
}

fn modality_rank(m: Modality) -> u8 {
    match m {
        Modality::Asserted => 0,
        Modality::Hedged => 1,
        Modality::Negated => 2,
        Modality::Conditional => 3,
        Modality::Question => 4,
    }
}

/// The rows to show as evidence for a relation: plain assertions first, one per document before
/// a second from the same document, at most `n`.
pub fn strongest_rows(g: &ClaimGraph, rel: &Relation, n: usize) -> Vec<usize> {
    let mut rows: Vec<usize> = rel.rows.clone();
    let mut seen_docs: BTreeMap<&str, usize> = BTreeMap::new();
    let mut order: Vec<(usize, u8, usize)> = Vec::new();
    for &r in &rows {
        let d = seen_docs.entry(g.rows[r].doc.as_str()).or_insert(0);
        order.push((*d, modality_rank(g.rows[r].modality), r));
        *d += 1;
    }
    order.sort_by_key(|&(dup, m, r)| (m, dup, r));
    rows = order.into_iter().take(n).map(|x| x.2).collect();
    rows
}

impl Loaded {
    /// The first `n` of `rows` (graph row indices) with their sentences from the store.
    pub fn evidence(&self, rows: &[usize], n: usize) -> Vec<EvidenceLine> {
        evidence_lines(&self.graph, &self.store, rows, n)
    }

    /// The hops of each chain (or cycle) with their first `n` evidence sentences. In a graph
    /// built from aggregates, which has no rows, the rows of the hops' edges are read first
    /// (through the postings), and only when evidence is asked for.
    pub fn chains_evidence<'a>(
        &self,
        chains: &[&'a [Hop]],
        n: usize,
    ) -> Result<Vec<Vec<HopEvidence<'a>>>, StoreError> {
        if !self.from_aggregates {
            return Ok(chains.iter().map(|h| self.hops(h, n)).collect());
        }
        let wanted: HashSet<(String, String)> = if n == 0 {
            HashSet::new()
        } else {
            chains
                .iter()
                .flat_map(|h| h.iter())
                .map(|h| (h.cause.clone(), h.effect.clone()))
                .collect()
        };
        let sub = relations_graph(&self.store, &self.aliases, &wanted)?;
        Ok(chains
            .iter()
            .map(|hops| {
                hops.iter()
                    .map(|h| {
                        let rows = match (sub.index.get(&h.cause), sub.index.get(&h.effect)) {
                            (Some(&a), Some(&b)) => sub
                                .edge(a, b)
                                .map(|rel| hop_rows(&sub, rel))
                                .unwrap_or_default(),
                            _ => Vec::new(),
                        };
                        HopEvidence {
                            hop: h,
                            evidence: evidence_lines(&sub, &self.store, &rows, n),
                        }
                    })
                    .collect()
            })
            .collect())
    }

    /// The strongest `n` rows of a relation (`strongest_rows`: plain assertions first, one per document before a second) with their sentences.
    pub fn strongest_evidence(&self, rel: &Relation, n: usize) -> Vec<EvidenceLine> {
        self.evidence(&strongest_rows(&self.graph, rel, n), n)
    }

    /// The hops of a chain or cycle, each with its first `n` evidence sentences.
    pub fn hops<'a>(&self, hops: &'a [Hop], n: usize) -> Vec<HopEvidence<'a>> {
        hops.iter()
            .map(|h| HopEvidence {
                hop: h,
                evidence: self.evidence(&h.rows, n),
            })
            .collect()
    }
}
