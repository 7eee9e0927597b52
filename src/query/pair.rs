//! `pair`: everything the corpus says about two variables, and the plan that answers it fast.
//!
//! [`pair_report`] is a pure function of a graph. [`PairQuery`] is the latency-sensitive path
//! of `hearsay pair`: it keeps the store's postings directories in memory and reads only the
//! rows that name both X and Y (the two keys' postings intersected), with the two labels from
//! the aggregate tables' keys (read once): every count, co-mention and evidence row of the
//! report depends on the relations between X and Y alone, and a label on every claim naming the
//! variable, which the tables count. With aliases or a claim filter (the tables hold raw keys
//! and every claim) it reads the rows that name X or Y (after aliases) instead, and builds the
//! graph from them, which gives the same report as the whole graph. Only when a name is unknown
//! (the report then suggests known variables containing its words) is the whole graph built.

use super::aggregate::label_of;
use super::comention::pair_co_mentions;
use super::evidence::{evidence_text, strongest_rows};
use super::load::Loaded;
use super::lookup::{lookup, Looked, VarMatch};
use crate::claim::{Modality, Polarity};
use crate::error::StoreError;
use crate::graph::{ClaimGraph, Filter, Relation};
use crate::store::{KeyAggregate, PostingIndex, Store};
use crate::variables::rollup::Level;
use crate::variables::{Aliases, Normalizer};
use serde::Serialize;
use std::collections::BTreeMap;

/// Counts for one direction of a pair.
#[derive(Debug, Clone, Default, Serialize)]
pub struct DirectionSummary {
    pub claims: usize,
    pub documents: usize,
    pub sentences: usize,
    pub asserted: usize,
    pub hedged: usize,
    pub negated: usize,
    pub question: usize,
    pub conditional: usize,
    /// polarity → modality → count.
    pub by_polarity: BTreeMap<Polarity, BTreeMap<Modality, usize>>,
}

impl DirectionSummary {
    pub fn of(rel: Option<&Relation>) -> Self {
        let Some(r) = rel else { return Self::default() };
        let c = &r.counts;
        DirectionSummary {
            claims: c.total,
            documents: r.documents(),
            sentences: r.sentence_count(),
            asserted: c.modality(Modality::Asserted),
            hedged: c.modality(Modality::Hedged),
            negated: c.modality(Modality::Negated),
            question: c.modality(Modality::Question),
            conditional: c.modality(Modality::Conditional),
            by_polarity: c.by.clone(),
        }
    }
    /// Claims that state the relation rather than deny it.
    pub fn support(&self) -> usize {
        self.claims - self.negated
    }
}

/// One evidence sentence.
#[derive(Debug, Clone, Serialize)]
pub struct Evidence {
    /// "forward" (x → y), "backward" (y → x) or "association".
    pub relation: &'static str,
    pub location: String,
    pub polarity: Polarity,
    pub modality: Modality,
    pub cue: String,
    pub sentence: String,
}

/// Everything the corpus says about a pair of variables.
#[derive(Debug, Clone, Serialize)]
pub struct PairReport {
    /// The level the variables were counted at (`--roll-up`); absent at the variable level.
    #[serde(skip_serializing_if = "Level::is_variable")]
    pub level: Level,
    pub x: VarMatch,
    pub y: VarMatch,
    /// Causal claims x → y.
    pub forward: DirectionSummary,
    /// Causal claims y → x.
    pub backward: DirectionSummary,
    /// Association claims between x and y, in either order.
    pub association: DirectionSummary,
    /// Sentences naming both with no claim between them.
    pub co_mentions: usize,
    /// support(x → y) / (support(x → y) + support(y → x)); absent when neither is stated.
    pub direction_ratio: Option<f64>,
    pub evidence: Vec<Evidence>,
}

/// Build the pair report. `comentions` gives the number of sentences naming both variables with
/// no claim between them; `evidence_text` turns a row into (location, sentence).
pub fn pair_report(
    g: &ClaimGraph,
    x: Looked,
    y: Looked,
    co_mentions: usize,
    per_relation: usize,
    mut evidence_text: impl FnMut(usize) -> (String, String),
) -> PairReport {
    let (xm, xn) = x;
    let (ym, yn) = y;
    let (fwd, bwd, assoc) = match (xn, yn) {
        (Some(a), Some(b)) => (g.edge(a, b), g.edge(b, a), g.association(a, b)),
        _ => (None, None, None),
    };
    let forward = DirectionSummary::of(fwd);
    let backward = DirectionSummary::of(bwd);
    let association = DirectionSummary::of(assoc);
    let (f, b) = (forward.support(), backward.support());
    let direction_ratio = if f + b > 0 {
        Some(f as f64 / (f + b) as f64)
    } else {
        None
    };
    let mut evidence = Vec::new();
    for (name, rel) in [("forward", fwd), ("backward", bwd), ("association", assoc)] {
        if let Some(rel) = rel {
            for r in strongest_rows(g, rel, per_relation) {
                let (location, sentence) = evidence_text(r);
                let row = &g.rows[r];
                evidence.push(Evidence {
                    relation: name,
                    location,
                    polarity: row.polarity,
                    modality: row.modality,
                    cue: row.cue.clone(),
                    sentence,
                });
            }
        }
    }
    PairReport {
        level: Level::Variable,
        x: xm,
        y: ym,
        forward,
        backward,
        association,
        co_mentions,
        direction_ratio,
        evidence,
    }
}

impl Loaded {
    /// The pair report of two looked-up variables with `co_mentions` given, evidence text
    /// fetched from the store.
    pub fn pair_report(
        &self,
        x: Looked,
        y: Looked,
        co_mentions: usize,
        evidence: usize,
    ) -> PairReport {
        let (store, graph) = (&self.store, &self.graph);
        let mut rep = pair_report(graph, x, y, co_mentions, evidence, |r| {
            evidence_text(graph, store, r)
        });
        rep.level = self.aliases.level();
        rep
    }

    /// The pair report of two looked-up variables, co-mentions counted with the sentence index.
    pub fn pair(
        &mut self,
        x: Looked,
        y: Looked,
        evidence: usize,
    ) -> Result<PairReport, StoreError> {
        let n = pair_co_mentions(
            &mut self.store,
            &self.graph,
            (&x.0.key, x.1),
            (&y.0.key, y.1),
        )?;
        Ok(self.pair_report(x, y, n, evidence))
    }
}

/// What every `pair` query needs, loaded once: the store (its search index opens on first use),
/// the normaliser and aliases, the postings' directories, and (on the first query that can use
/// them) the aggregate tables' keys.
pub struct PairQuery {
    store: Store,
    normalizer: Normalizer,
    aliases: Aliases,
    postings: PostingIndex,
    /// The `keys` table of each aggregate table the store's queries read (each sorted by key).
    keys: Option<Vec<Vec<KeyAggregate>>>,
}

/// The graph that answers one pair, with the two names looked up in it.
pub struct PairGraph {
    graph: ClaimGraph,
    x: Looked,
    y: Looked,
}

impl PairQuery {
    /// Read the store's postings directories once, for any number of queries.
    pub fn open(
        store: Store,
        normalizer: Normalizer,
        aliases: Aliases,
    ) -> Result<PairQuery, StoreError> {
        let postings = store.postings()?;
        Ok(PairQuery {
            store,
            normalizer,
            aliases,
            postings,
            keys: None,
        })
    }

    /// The label of the stored key `key` from the aggregate tables (the most frequent surface
    /// form over every live claim naming it, as the graph labels it); `None` when no live claim
    /// names it.
    fn table_label(&mut self, key: &str) -> Result<Option<String>, StoreError> {
        let tables = match &self.keys {
            Some(t) => t,
            None => self.keys.insert(self.store.aggregate_keys()?),
        };
        let forms: Vec<&[(String, u32)]> = tables
            .iter()
            .filter_map(|t| {
                let i = t.binary_search_by(|k| k.key.as_str().cmp(key)).ok()?;
                Some(t[i].forms.as_slice())
            })
            .collect();
        Ok((!forms.is_empty()).then(|| label_of(&forms)))
    }

    /// The fast plan: the graph of the rows that name both `x` and `y` (the postings of the two
    /// keys intersected), the two variables' labels from the aggregate tables. Only without
    /// aliases (a stored key is then its own variable, so a key's table entry is the variable's)
    /// and without a claim filter (the tables count every claim); `None` when it does not apply
    /// or a name is no variable (the caller then reads the rows of either name).
    fn pair_graph(&mut self, x: &str, y: &str) -> Result<Option<PairGraph>, StoreError> {
        let (kx, ky) = (
            self.aliases.query_key(&self.normalizer, x),
            self.aliases.query_key(&self.normalizer, y),
        );
        if !self.aliases.is_empty() || kx.is_empty() || ky.is_empty() || kx == ky {
            return Ok(None);
        }
        let (Some(lx), Some(ly)) = (self.table_label(&kx)?, self.table_label(&ky)?) else {
            return Ok(None);
        };
        let group = |k: &str| {
            if k == kx {
                Some(0)
            } else if k == ky {
                Some(1)
            } else {
                None
            }
        };
        let rows = self
            .store
            .rows_naming_pairs(&self.postings, 2, group, &[(0, 1)])?;
        let graph = ClaimGraph::build(rows, &self.aliases, &Filter::default());
        // Every row of this graph names both, so either both variables are nodes or (no claim
        // between them) neither is; their labels are the whole store's.
        let known = |query: &str, key: String, label: String| -> Looked {
            let node = graph.index.get(&key).copied();
            (
                VarMatch {
                    query: query.to_string(),
                    key,
                    label: Some(label),
                    known: true,
                    suggestions: Vec::new(),
                },
                node,
            )
        };
        let (x, y) = (known(x, kx, lx), known(y, ky, ly));
        Ok(Some(PairGraph { graph, x, y }))
    }

    /// The graph that answers the pair: without aliases and claim filter, that of the rows
    /// naming both `x` and `y`; else that of the rows that name `x` or `y` (after aliases) and
    /// the filter accepts; the whole graph when `whole_graph` is set or a name is unknown.
    pub fn graph(
        &mut self,
        x: &str,
        y: &str,
        filter: &Filter,
        whole_graph: bool,
    ) -> Result<PairGraph, StoreError> {
        if !whole_graph && filter.is_empty() {
            if let Some(pg) = self.pair_graph(x, y)? {
                return Ok(pg);
            }
        }
        let key = |q: &str| self.aliases.query_key(&self.normalizer, q);
        let (kx, ky) = (key(x), key(y));
        let aliases = &self.aliases;
        let rows = self.store.rows_naming(&self.postings, |k| {
            let k = aliases.resolve(k);
            k == kx || k == ky
        })?;
        let mut graph = ClaimGraph::build(rows, aliases, filter);
        let look = |graph: &ClaimGraph, q: &str| lookup(graph, &self.normalizer, aliases, q);
        let (mut lx, mut ly) = (look(&graph, x), look(&graph, y));
        let unknown = |v: &Looked| v.1.is_none() && !v.0.key.is_empty();
        if whole_graph || unknown(&lx) || unknown(&ly) {
            let rows = self.store.rows()?;
            graph = ClaimGraph::build(rows, aliases, filter);
            (lx, ly) = (look(&graph, x), look(&graph, y));
        }
        Ok(PairGraph {
            graph,
            x: lx,
            y: ly,
        })
    }

    /// The report over a pair's graph: co-mentions from the sentence index, `evidence`
    /// sentences per relation from the store.
    pub fn report(&mut self, pg: PairGraph, evidence: usize) -> Result<PairReport, StoreError> {
        let PairGraph { graph, x, y } = pg;
        let co_mentions =
            pair_co_mentions(&mut self.store, &graph, (&x.0.key, x.1), (&y.0.key, y.1))?;
        let store = &self.store;
        let mut rep = pair_report(&graph, x, y, co_mentions, evidence, |r| {
            evidence_text(&graph, store, r)
        });
        rep.level = self.aliases.level();
        Ok(rep)
    }
}
