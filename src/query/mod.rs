//! Reports over the claim graph: what the corpus says about a pair, and which relations it states
//! most. Pure functions over a [`ClaimGraph`]; fetching evidence text and co-mention counts from a
//! store is passed in, so the reports are testable without one.

pub mod comention;

use crate::claim::{Kind, Modality, Polarity};
use crate::graph::{ClaimGraph, Relation};
use crate::variables::{Aliases, Normalizer};
use petgraph::graph::NodeIndex;
use serde::Serialize;
use std::collections::BTreeMap;

/// How a queried name was matched to a variable.
#[derive(Debug, Clone, Serialize)]
pub struct VarMatch {
    pub query: String,
    pub key: String,
    pub label: Option<String>,
    pub known: bool,
    /// Known variables whose key contains every word of the query, when it has no exact match.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub suggestions: Vec<String>,
}

/// Find a variable by a name the user typed.
pub fn lookup(
    g: &ClaimGraph,
    normalizer: &Normalizer,
    aliases: &Aliases,
    query: &str,
) -> (VarMatch, Option<NodeIndex>) {
    let key = aliases.resolve(&normalizer.key(query)).to_string();
    let node = g.index.get(&key).copied();
    let mut suggestions = Vec::new();
    if node.is_none() && !key.is_empty() {
        let words: Vec<&str> = key.split(' ').collect();
        let mut cands: Vec<(usize, &str)> = g
            .graph
            .node_weights()
            .filter(|v| {
                let kw: Vec<&str> = v.key.split(' ').collect();
                words.iter().all(|w| kw.contains(w))
            })
            .map(|v| (v.mentions, v.label.as_str()))
            .collect();
        cands.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(b.1)));
        suggestions = cands.into_iter().take(5).map(|c| c.1.to_string()).collect();
    }
    let label = node.map(|n| g.graph[n].label.clone());
    (
        VarMatch {
            query: query.to_string(),
            key,
            label,
            known: node.is_some(),
            suggestions,
        },
        node,
    )
}

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
            documents: r.docs.len(),
            sentences: r.sentences.len(),
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

/// Build the pair report. `comentions` gives the number of sentences naming both variables with
/// no claim between them; `evidence_text` turns a row into (location, sentence).
pub fn pair_report(
    g: &ClaimGraph,
    x: (VarMatch, Option<NodeIndex>),
    y: (VarMatch, Option<NodeIndex>),
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

/// One line of `hearsay top`.
#[derive(Debug, Clone, Serialize)]
pub struct TopRelation {
    pub kind: Kind,
    pub cause: String,
    pub effect: String,
    pub cause_key: String,
    pub effect_key: String,
    pub documents: usize,
    pub claims: usize,
    pub asserted: usize,
    pub hedged: usize,
    pub negated: usize,
    /// The sign most of the non-negated claims give.
    pub sign: Polarity,
    /// Where the relation is first stated.
    pub first: String,
}

fn dominant_sign(rel: &Relation) -> Polarity {
    let mut best = (0usize, Polarity::Unsigned);
    for p in [
        Polarity::Increase,
        Polarity::Decrease,
        Polarity::Prevent,
        Polarity::Unsigned,
        Polarity::None,
    ] {
        let n: usize = rel
            .counts
            .by
            .get(&p)
            .map(|m| {
                m.iter()
                    .filter(|(k, _)| **k != Modality::Negated)
                    .map(|(_, v)| v)
                    .sum()
            })
            .unwrap_or(0);
        if n > best.0 {
            best = (n, p);
        }
    }
    if best.0 == 0 {
        Polarity::None
    } else {
        best.1
    }
}

/// The most-stated relations, ranked by distinct documents, then claims.
pub fn top_relations(g: &ClaimGraph, min_docs: usize, min_claims: usize) -> Vec<TopRelation> {
    let mut out = Vec::new();
    let mut push = |kind: Kind, a: NodeIndex, b: NodeIndex, rel: &Relation| {
        if rel.docs.len() < min_docs || rel.counts.total < min_claims {
            return;
        }
        let first = rel
            .rows
            .first()
            .map(|&r| format!("{}:{}", g.rows[r].doc, g.rows[r].line))
            .unwrap_or_default();
        out.push(TopRelation {
            kind,
            cause: g.graph[a].label.clone(),
            effect: g.graph[b].label.clone(),
            cause_key: g.graph[a].key.clone(),
            effect_key: g.graph[b].key.clone(),
            documents: rel.docs.len(),
            claims: rel.counts.total,
            asserted: rel.counts.modality(Modality::Asserted),
            hedged: rel.counts.modality(Modality::Hedged),
            negated: rel.counts.modality(Modality::Negated),
            sign: dominant_sign(rel),
            first,
        });
    };
    for (a, b, rel) in g.edges() {
        push(Kind::Causal, a, b, rel);
    }
    // An association is filed under its two nodes in index order, which is the order in which
    // the corpus first named them: shown as its first claim states it instead ("cap-dependent
    // translation" as cap, translation).
    for (&(a, b), rel) in &g.associations {
        let first_cause = rel
            .rows
            .first()
            .and_then(|&r| g.index.get(&g.rows[r].cause));
        let (a, b) = if first_cause == Some(&b) {
            (b, a)
        } else {
            (a, b)
        };
        push(Kind::Association, a, b, rel);
    }
    out.sort_by(|x, y| {
        y.documents
            .cmp(&x.documents)
            .then(y.claims.cmp(&x.claims))
            .then_with(|| x.cause_key.cmp(&y.cause_key))
            .then_with(|| x.effect_key.cmp(&y.effect_key))
            .then(x.kind.cmp(&y.kind))
    });
    out
}

/// (location, sentence) of graph row `r`, read from its full claim record in the store; when the
/// record cannot be read, the row's `doc:line` and the reason.
pub fn evidence_text(g: &ClaimGraph, store: &crate::store::Store, r: usize) -> (String, String) {
    let row = &g.rows[r];
    match store.claim(row.at) {
        Ok(c) => (c.location(), c.sentence),
        Err(e) => (
            format!("{}:{}", row.doc, row.line),
            format!("(evidence unavailable: {e})"),
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::claim::{Kind, Modality};
    use crate::graph::tests::row;
    use crate::graph::Filter;
    use crate::variables::Aliases;

    #[test]
    fn an_association_is_shown_as_its_first_claim_states_it() {
        // "translation" is named first (by a causal claim), "cap" later: the association is
        // filed as (translation, cap) but its first claim says cap, translation.
        let rows = vec![
            row(
                "stress",
                "translation",
                Kind::Causal,
                Modality::Asserted,
                "d1",
            ),
            row(
                "cap",
                "translation",
                Kind::Association,
                Modality::Asserted,
                "d2",
            ),
            row(
                "translation",
                "cap",
                Kind::Association,
                Modality::Asserted,
                "d3",
            ),
        ];
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        let top = top_relations(&g, 1, 1);
        let assoc = top.iter().find(|t| t.kind == Kind::Association).unwrap();
        assert_eq!(
            (assoc.cause.as_str(), assoc.effect.as_str()),
            ("cap", "translation")
        );
        assert_eq!((assoc.claims, assoc.documents), (2, 2));
    }
}
