//! The claim graph: claims aggregated per variable and per ordered pair, and what is computed
//! from the graph alone.
//!
//! Nodes are variables (alias-resolved keys); a directed edge cause → effect aggregates every
//! causal claim between them: counts by polarity and modality, distinct documents and sentences,
//! and the first and last claim in corpus order. Association claims are counted per unordered pair
//! and never become causal edges. The graph is built from compact [`ClaimRow`]s, so it can be
//! rebuilt from a store in milliseconds; full claim records are fetched only as evidence.
//!
//! Everything here is a pure function of the rows and the graph, which keeps each piece testable
//! on a handful of rows; the one exception, [`drop_near_duplicates`], reads the rows' sentences
//! from the store before the graph is built. The public face:
//!
//! - [`ClaimGraph`] (built with [`ClaimGraph::build`] under a [`Filter`]) and its parts
//!   [`Variable`], [`Relation`], [`Counts`];
//! - edge weights: [`WeightSpec`] and its [`Unit`];
//! - edge signs: [`Sign`] and its one rule, [`Sign::of`], which every output uses;
//! - the analyses: [`paths`], [`conflicts`], [`cycles`], [`matrix`] and their result types;
//! - [`near_duplicates`] and [`drop_near_duplicates`] for `--dedupe`;
//! - [`export`]: the file formats for network tools, read as `graph::export::write_json` and the
//!   like (a module, so that the writers keep their short names).
//!
//! Architecture invariant: the graph never prints and never imports the query, report or
//! compare layers above it.

mod analysis;
mod dedupe;
pub mod export;
mod sign;
mod weight;

pub use analysis::{
    conflicts, cycles, hop_rows, matrix, paths, Cell, Chain, Conflict, ConflictKind, ConflictSide,
    Cycle, Hop,
};
pub use dedupe::{drop_near_duplicates, near_duplicates, DEDUPE_THRESHOLD};
pub use sign::Sign;
pub use weight::{Unit, WeightSpec};

use crate::claim::{Kind, Modality, Polarity};
use crate::store::ClaimRow;
use crate::variables::Aliases;
use petgraph::graph::{DiGraph, NodeIndex};
use petgraph::visit::EdgeRef;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet, HashMap};

/// Which claims to aggregate.
#[derive(Debug, Clone, Default)]
pub struct Filter {
    pub kind: Option<Kind>,
    pub polarity: Option<Polarity>,
    pub modality: Option<Modality>,
    /// Only claims whose confidence is at least this.
    pub min_confidence: Option<f32>,
}

impl Filter {
    /// Whether the filter accepts every claim.
    pub fn is_empty(&self) -> bool {
        self.kind.is_none()
            && self.polarity.is_none()
            && self.modality.is_none()
            && self.min_confidence.is_none()
    }

    pub fn accepts(&self, r: &ClaimRow) -> bool {
        self.accepts_parts(r.kind, r.polarity, r.modality, r.confidence)
    }

    /// The same test on a claim as extracted (`extract --min-confidence` and the like).
    pub fn accepts_claim(&self, c: &crate::claim::Claim) -> bool {
        self.accepts_parts(c.kind, c.polarity, c.modality, c.confidence as f32)
    }

    fn accepts_parts(&self, kind: Kind, polarity: Polarity, modality: Modality, p: f32) -> bool {
        self.min_confidence.is_none_or(|m| p >= m)
            && self.kind.is_none_or(|k| k == kind)
            && self.polarity.is_none_or(|x| x == polarity)
            && self.modality.is_none_or(|m| m == modality)
    }
}

/// Counts of claims by polarity and modality.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize)]
pub struct Counts {
    /// polarity → modality → count.
    pub by: BTreeMap<Polarity, BTreeMap<Modality, usize>>,
    pub total: usize,
}

impl Counts {
    pub fn add(&mut self, p: Polarity, m: Modality) {
        *self.by.entry(p).or_default().entry(m).or_default() += 1;
        self.total += 1;
    }
    pub fn modality(&self, m: Modality) -> usize {
        self.by
            .values()
            .map(|x| x.get(&m).copied().unwrap_or(0))
            .sum()
    }
    pub fn polarity(&self, p: Polarity) -> usize {
        self.by.get(&p).map(|x| x.values().sum()).unwrap_or(0)
    }
    /// Claims of polarity `p` that are not negated (they state the sign rather than deny it).
    pub fn stated(&self, p: Polarity) -> usize {
        self.by
            .get(&p)
            .map(|x| {
                x.iter()
                    .filter(|(m, _)| **m != Modality::Negated)
                    .map(|(_, n)| n)
                    .sum()
            })
            .unwrap_or(0)
    }
}

/// A variable.
#[derive(Debug, Clone, Default)]
pub struct Variable {
    pub key: String,
    pub label: String,
    pub mentions: usize,
    pub docs: usize,
}

/// Everything known about claims between one ordered pair (or one unordered pair, for associations).
#[derive(Debug, Clone, Default)]
pub struct Relation {
    pub counts: Counts,
    pub docs: BTreeSet<u32>,
    pub sentences: BTreeSet<(u32, u64)>,
    /// Row indices, in corpus order.
    pub rows: Vec<usize>,
    /// In a graph built from the store's aggregate tables, what stands in for the rows:
    /// `docs`, `sentences` and `rows` are then empty.
    pub totals: Option<Box<Totals>>,
}

/// A relation's counts that its rows would give, for a graph built without rows.
#[derive(Debug, Clone, Default)]
pub struct Totals {
    pub docs: usize,
    pub sentences: usize,
    /// Documents and sentences by weight profile (claims by weight class: asserted, hedged,
    /// conditional, question, negated or "no effect"), and claims by weight class.
    pub doc_profiles: Vec<([u32; 5], u32)>,
    pub sentence_profiles: Vec<([u32; 5], u32)>,
    pub classes: [u64; 5],
}

impl Relation {
    fn add(&mut self, row: usize, r: &ClaimRow, doc: u32) {
        self.counts.add(r.polarity, r.modality);
        self.docs.insert(doc);
        self.sentences.insert((doc, r.sentence));
        self.rows.push(row);
    }
    /// Distinct documents that state the relation.
    pub fn documents(&self) -> usize {
        self.totals.as_ref().map_or(self.docs.len(), |t| t.docs)
    }
    /// Distinct sentences that state the relation.
    pub fn sentence_count(&self) -> usize {
        self.totals
            .as_ref()
            .map_or(self.sentences.len(), |t| t.sentences)
    }
    /// Claims that support the relation: all but the negated ones.
    pub fn support(&self) -> usize {
        self.counts.total - self.counts.modality(Modality::Negated)
    }
}

/// The aggregated claim graph.
#[derive(Debug, Default)]
pub struct ClaimGraph {
    pub graph: DiGraph<Variable, Relation>,
    pub index: HashMap<String, NodeIndex>,
    /// Association claims per unordered pair (smaller node index first).
    pub associations: HashMap<(NodeIndex, NodeIndex), Relation>,
    pub rows: Vec<ClaimRow>,
    /// Document ids, indexed by the numbers in [`Relation::docs`].
    pub docs: Vec<String>,
}

impl ClaimGraph {
    /// Build the graph from rows, resolving keys through `aliases` and keeping rows the filter accepts.
    pub fn build(rows: Vec<ClaimRow>, aliases: &Aliases, filter: &Filter) -> ClaimGraph {
        let mut g = ClaimGraph::default();
        let mut doc_ids: HashMap<String, u32> = HashMap::new();
        let mut labels: HashMap<NodeIndex, HashMap<String, usize>> = HashMap::new();
        let mut var_docs: HashMap<NodeIndex, BTreeSet<u32>> = HashMap::new();
        let mut edges: HashMap<(NodeIndex, NodeIndex), Relation> = HashMap::new();
        for mut r in rows.into_iter().filter(|r| filter.accepts(r)) {
            r.cause = aliases.resolve(&r.cause).to_string();
            r.effect = aliases.resolve(&r.effect).to_string();
            if r.cause == r.effect {
                continue;
            }
            let next = doc_ids.len() as u32;
            let doc = *doc_ids.entry(r.doc.clone()).or_insert_with(|| {
                g.docs.push(r.doc.clone());
                next
            });
            let a = g.node(&r.cause);
            let b = g.node(&r.effect);
            for (n, text) in [(a, &r.cause_text), (b, &r.effect_text)] {
                *labels
                    .entry(n)
                    .or_default()
                    .entry(text.to_lowercase())
                    .or_default() += 1;
                g.graph[n].mentions += 1;
                var_docs.entry(n).or_default().insert(doc);
            }
            let row = g.rows.len();
            match r.kind {
                Kind::Causal => edges.entry((a, b)).or_default().add(row, &r, doc),
                Kind::Association => g
                    .associations
                    .entry((a.min(b), a.max(b)))
                    .or_default()
                    .add(row, &r, doc),
            }
            g.rows.push(r);
        }
        for (n, forms) in labels {
            let mut forms: Vec<(String, usize)> = forms.into_iter().collect();
            forms.sort_by(|x, y| y.1.cmp(&x.1).then_with(|| x.0.cmp(&y.0)));
            g.graph[n].label = forms.into_iter().next().map(|f| f.0).unwrap_or_default();
        }
        for (n, d) in var_docs {
            g.graph[n].docs = d.len();
        }
        let mut edges: Vec<_> = edges.into_iter().collect();
        edges.sort_by_key(|((a, b), _)| (*a, *b));
        for ((a, b), rel) in edges {
            g.graph.add_edge(a, b, rel);
        }
        g
    }

    fn node(&mut self, key: &str) -> NodeIndex {
        if let Some(&n) = self.index.get(key) {
            return n;
        }
        let n = self.graph.add_node(Variable {
            key: key.to_string(),
            ..Variable::default()
        });
        self.index.insert(key.to_string(), n);
        n
    }

    /// The causal relation from `a` to `b`, if any.
    pub fn edge(&self, a: NodeIndex, b: NodeIndex) -> Option<&Relation> {
        self.graph.find_edge(a, b).map(|e| &self.graph[e])
    }

    /// The association counts of an unordered pair.
    pub fn association(&self, a: NodeIndex, b: NodeIndex) -> Option<&Relation> {
        self.associations.get(&(a.min(b), a.max(b)))
    }

    /// Every causal edge as (cause, effect, relation).
    pub fn edges(&self) -> impl Iterator<Item = (NodeIndex, NodeIndex, &Relation)> {
        self.graph
            .edge_references()
            .map(|e| (e.source(), e.target(), e.weight()))
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    pub(crate) fn row(c: &str, e: &str, kind: Kind, m: Modality, doc: &str) -> ClaimRow {
        ClaimRow {
            kind,
            cue: "x".into(),
            confidence: 0.5,
            ..crate::store::test_row(c, e, Polarity::Increase, m, doc)
        }
    }

    #[test]
    fn aggregates_by_direction_and_keeps_associations_apart() {
        let rows = vec![
            row("a", "b", Kind::Causal, Modality::Asserted, "d1"),
            row("a", "b", Kind::Causal, Modality::Hedged, "d2"),
            row("a", "b", Kind::Causal, Modality::Negated, "d2"),
            row("b", "a", Kind::Causal, Modality::Asserted, "d3"),
            row("a", "c", Kind::Association, Modality::Asserted, "d1"),
        ];
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        let (a, b, c) = (g.index["a"], g.index["b"], g.index["c"]);
        let ab = g.edge(a, b).unwrap();
        assert_eq!((ab.counts.total, ab.docs.len(), ab.support()), (3, 2, 2));
        assert_eq!(g.edge(b, a).unwrap().counts.total, 1);
        assert!(g.edge(a, c).is_none());
        assert_eq!(g.association(c, a).unwrap().counts.total, 1);
        assert_eq!(g.graph[a].mentions, 5);
        assert_eq!(g.graph[a].docs, 3);
    }
}
