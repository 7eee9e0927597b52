//! `top`: the most-stated relations, causal and association.

use super::aggregate::{AggRelation, Aggregated};
use crate::claim::{Kind, Modality};
use crate::graph::{ClaimGraph, Relation, Sign};
use petgraph::graph::NodeIndex;
use serde::Serialize;

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
    pub conditional: usize,
    pub question: usize,
    /// The edge's sign, by the one rule every output uses ([`Sign::of`]).
    pub sign: Sign,
    /// Where the relation is first stated.
    pub first: String,
}

/// The most-stated relations, ranked by distinct documents, then claims.
pub fn top_relations(g: &ClaimGraph, min_docs: usize, min_claims: usize) -> Vec<TopRelation> {
    let mut out = Vec::new();
    let mut push = |kind: Kind, a: NodeIndex, b: NodeIndex, rel: &Relation| {
        if rel.documents() < min_docs || rel.counts.total < min_claims {
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
            documents: rel.documents(),
            claims: rel.counts.total,
            asserted: rel.counts.modality(Modality::Asserted),
            hedged: rel.counts.modality(Modality::Hedged),
            negated: rel.counts.modality(Modality::Negated),
            conditional: rel.counts.modality(Modality::Conditional),
            question: rel.counts.modality(Modality::Question),
            sign: Sign::of(rel),
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
    rank(&mut out);
    out
}

/// Ranked by distinct documents, then claims, then the keys and the kind: a total order, so no
/// two relations tie.
fn rank(out: &mut [TopRelation]) {
    out.sort_by(|x, y| {
        y.documents
            .cmp(&x.documents)
            .then(y.claims.cmp(&x.claims))
            .then_with(|| x.cause_key.cmp(&y.cause_key))
            .then_with(|| x.effect_key.cmp(&y.effect_key))
            .then(x.kind.cmp(&y.kind))
    });
}

/// [`top_relations`] from a store's aggregates, the first `limit` (0: all): the same lines as
/// from the graph of every row with no filter. Only the lines kept are built.
pub fn top_from_aggregates(
    agg: &Aggregated,
    min_docs: usize,
    min_claims: usize,
    limit: usize,
) -> Vec<TopRelation> {
    // An association is shown as its first claim states it (see `top_relations`).
    fn ends(rel: &AggRelation) -> (&str, &str) {
        if rel.kind == Kind::Association && rel.first_cause == rel.b {
            (&rel.b, &rel.a)
        } else {
            (&rel.a, &rel.b)
        }
    }
    let mut kept: Vec<(&AggRelation, &str, &str)> = agg
        .relations
        .iter()
        .filter(|r| r.docs >= min_docs && r.total >= min_claims)
        .map(|r| {
            let (a, b) = ends(r);
            (r, a, b)
        })
        .collect();
    // The order of `rank`.
    kept.sort_unstable_by(|x, y| {
        y.0.docs
            .cmp(&x.0.docs)
            .then(y.0.total.cmp(&x.0.total))
            .then_with(|| x.1.cmp(y.1))
            .then_with(|| x.2.cmp(y.2))
            .then(x.0.kind.cmp(&y.0.kind))
    });
    if limit > 0 {
        kept.truncate(limit);
    }
    kept.into_iter()
        .map(|(rel, a, b)| {
            let c = &rel.counts();
            TopRelation {
                kind: rel.kind,
                cause: agg.label(a),
                effect: agg.label(b),
                cause_key: a.to_string(),
                effect_key: b.to_string(),
                documents: rel.docs,
                claims: c.total,
                asserted: c.modality(Modality::Asserted),
                hedged: c.modality(Modality::Hedged),
                negated: c.modality(Modality::Negated),
                conditional: c.modality(Modality::Conditional),
                question: c.modality(Modality::Question),
                sign: Sign::of_counts(c),
                first: format!("{}:{}", rel.first_doc, rel.first_line),
            }
        })
        .collect()
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
