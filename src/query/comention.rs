//! Co-mentions: sentences that name two variables with no claim between them.
//!
//! A variable "is named" in a sentence when the store's sentence index finds every word of its key
//! there. `pair` asks the index once for one pair; `compare` asks for many pairs at once, so
//! [`MentionIndex`] queries the index once per variable and intersects the sorted sentence lists
//! per pair, instead of one index query per pair. Both count the same thing through
//! [`unclaimed`]: the sentences naming both, less those that carry a claim (causal in either
//! direction, or an association) between the two.

use crate::error::StoreError;
use crate::graph::ClaimGraph;
use crate::store::{key_terms, Store};
use petgraph::graph::NodeIndex;
use std::collections::{BTreeSet, HashMap, HashSet};

/// The (document, sentence start) of every sentence that carries a claim between `x` and `y`.
pub fn claimed_sentences(
    g: &ClaimGraph,
    x: Option<NodeIndex>,
    y: Option<NodeIndex>,
) -> HashSet<(&str, u64)> {
    let mut claimed = HashSet::new();
    if let (Some(xn), Some(yn)) = (x, y) {
        for rel in [g.edge(xn, yn), g.edge(yn, xn), g.association(xn, yn)]
            .into_iter()
            .flatten()
        {
            for &r in &rel.rows {
                claimed.insert((g.rows[r].doc.as_str(), g.rows[r].sentence));
            }
        }
    }
    claimed
}

/// How many of the sentences `both` (naming both variables) carry no claim between them.
pub fn unclaimed<'a>(
    g: &ClaimGraph,
    x: Option<NodeIndex>,
    y: Option<NodeIndex>,
    both: impl IntoIterator<Item = (&'a str, u64)>,
) -> usize {
    let claimed = claimed_sentences(g, x, y);
    both.into_iter().filter(|s| !claimed.contains(s)).count()
}

/// Co-mentions of one pair of keys, with one index query (what `hearsay pair` prints).
pub fn pair_co_mentions(
    store: &mut Store,
    g: &ClaimGraph,
    (x_key, x): (&str, Option<NodeIndex>),
    (y_key, y): (&str, Option<NodeIndex>),
) -> Result<usize, StoreError> {
    let (xt, yt) = (key_terms(x_key), key_terms(y_key));
    if xt.is_empty() || yt.is_empty() || x_key == y_key {
        return Ok(0);
    }
    // Tens of thousands of sentences may name both; only the few claimed ones need their
    // document, so the index counts by path ordinal (what `unclaimed` counts).
    let both = store.sentence_positions_with(&[&xt, &yt])?;
    store.count_sentences_except(&both, &claimed_sentences(g, x, y))
}

/// The sentences naming each of a set of variables, fetched once per variable.
#[derive(Debug, Default)]
pub struct MentionIndex {
    /// Document ids, indexed by the numbers in the sentence lists.
    docs: Vec<String>,
    /// key → sorted (document number, sentence start).
    sentences: HashMap<String, Vec<(u32, u64)>>,
}

impl MentionIndex {
    /// Query the index once for every distinct key.
    pub fn build<'k>(
        store: &mut Store,
        keys: impl IntoIterator<Item = &'k str>,
    ) -> Result<MentionIndex, StoreError> {
        let mut m = MentionIndex::default();
        let mut ids: HashMap<String, u32> = HashMap::new();
        for key in keys {
            if m.sentences.contains_key(key) {
                continue;
            }
            let terms = key_terms(key);
            let mut list: Vec<(u32, u64)> = Vec::new();
            if !terms.is_empty() {
                for (doc, start) in store.sentence_ids_with(&[&terms])? {
                    let next = ids.len() as u32;
                    let d = *ids.entry(doc).or_insert_with_key(|k| {
                        m.docs.push(k.clone());
                        next
                    });
                    list.push((d, start));
                }
                list.sort_unstable();
            }
            m.sentences.insert(key.to_string(), list);
        }
        Ok(m)
    }

    /// Sentences naming the variable with this key (0 for a key not built).
    pub fn count(&self, key: &str) -> usize {
        self.sentences.get(key).map_or(0, Vec::len)
    }

    /// Sentences naming both keys, as (document, sentence start); empty when the keys are equal.
    pub fn both(&self, x: &str, y: &str) -> Vec<(&str, u64)> {
        let (Some(a), Some(b)) = (self.sentences.get(x), self.sentences.get(y)) else {
            return Vec::new();
        };
        if x == y {
            return Vec::new();
        }
        let (mut i, mut j, mut out) = (0, 0, Vec::new());
        while i < a.len() && j < b.len() {
            match a[i].cmp(&b[j]) {
                std::cmp::Ordering::Less => i += 1,
                std::cmp::Ordering::Greater => j += 1,
                std::cmp::Ordering::Equal => {
                    out.push((self.docs[a[i].0 as usize].as_str(), a[i].1));
                    i += 1;
                    j += 1;
                }
            }
        }
        out
    }

    /// Co-mentions of a pair: sentences naming both with no claim between them.
    pub fn co_mentions(
        &self,
        g: &ClaimGraph,
        (x_key, x): (&str, Option<NodeIndex>),
        (y_key, y): (&str, Option<NodeIndex>),
    ) -> usize {
        unclaimed(g, x, y, self.both(x_key, y_key))
    }
}

/// Distinct sentences of the claims between `x` and `y`: (causal either way, association only).
pub fn claim_sentences(g: &ClaimGraph, x: NodeIndex, y: NodeIndex) -> (usize, usize) {
    let mut causal: BTreeSet<(&str, u64)> = BTreeSet::new();
    for rel in [g.edge(x, y), g.edge(y, x)].into_iter().flatten() {
        for &r in &rel.rows {
            causal.insert((g.rows[r].doc.as_str(), g.rows[r].sentence));
        }
    }
    let mut assoc: BTreeSet<(&str, u64)> = BTreeSet::new();
    if let Some(rel) = g.association(x, y) {
        for &r in &rel.rows {
            let s = (g.rows[r].doc.as_str(), g.rows[r].sentence);
            if !causal.contains(&s) {
                assoc.insert(s);
            }
        }
    }
    (causal.len(), assoc.len())
}

/// A pair of variables named together in sentences but never in a causal claim.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct CoMention {
    pub a: String,
    pub b: String,
    /// Sentences naming both with no claim between them.
    pub sentences: usize,
    /// Association claims between them.
    pub associations: usize,
}

/// True when every index term of one key is a term of the other, so that every sentence naming
/// the longer one names the shorter one too.
fn nested(a: &str, b: &str) -> bool {
    let (ta, tb) = (key_terms(a), key_terms(b));
    ta.iter().all(|t| tb.contains(t)) || tb.iter().all(|t| ta.contains(t))
}

/// The `vars` most-mentioned variables (ties by key), whose pairs [`co_mention_pairs`] counts.
pub fn co_mention_nodes(g: &ClaimGraph, vars: usize) -> Vec<NodeIndex> {
    let mut nodes: Vec<NodeIndex> = g.graph.node_indices().collect();
    nodes.sort_by(|&x, &y| {
        g.graph[y]
            .mentions
            .cmp(&g.graph[x].mentions)
            .then_with(|| g.graph[x].key.cmp(&g.graph[y].key))
    });
    nodes.truncate(vars);
    nodes
}

/// The most-mentioned `vars` variables, paired up: pairs named together in sentences without a
/// claim between them and with no causal claim either way, most co-mentioned first.
pub fn co_mention_pairs(
    g: &ClaimGraph,
    store: &mut Store,
    vars: usize,
) -> Result<Vec<CoMention>, StoreError> {
    let nodes = co_mention_nodes(g, vars);
    // Sentence positions in the index, not ids: a frequent variable names a share of every
    // sentence of the corpus, and only the few sentences two of them share need their ids.
    let mut sets = Vec::with_capacity(nodes.len());
    for &n in &nodes {
        let terms = key_terms(&g.graph[n].key);
        sets.push(if terms.is_empty() {
            Vec::new()
        } else {
            store.sentence_positions_with(&[&terms])?
        });
    }
    let mut out = Vec::new();
    for i in 0..nodes.len() {
        for j in (i + 1)..nodes.len() {
            let (a, b) = (nodes[i], nodes[j]);
            if g.edge(a, b).is_some()
                || g.edge(b, a).is_some()
                || nested(&g.graph[a].key, &g.graph[b].key)
            {
                continue;
            }
            let sentences = store.count_sentences_except(
                &intersection(&sets[i], &sets[j]),
                &claimed_sentences(g, Some(a), Some(b)),
            )?;
            if sentences > 0 {
                out.push(CoMention {
                    a: g.graph[a].label.clone(),
                    b: g.graph[b].label.clone(),
                    sentences,
                    associations: g.association(a, b).map(|r| r.counts.total).unwrap_or(0),
                });
            }
        }
    }
    out.sort_by(|x, y| {
        y.sentences
            .cmp(&x.sentences)
            .then_with(|| (&x.a, &x.b).cmp(&(&y.a, &y.b)))
    });
    Ok(out)
}

/// The elements two sorted lists share.
fn intersection(a: &[u64], b: &[u64]) -> Vec<u64> {
    let (mut i, mut j, mut out) = (0, 0, Vec::new());
    while i < a.len() && j < b.len() {
        match a[i].cmp(&b[j]) {
            std::cmp::Ordering::Less => i += 1,
            std::cmp::Ordering::Greater => j += 1,
            std::cmp::Ordering::Equal => {
                out.push(a[i]);
                i += 1;
                j += 1;
            }
        }
    }
    out
}

impl super::load::Loaded {
    /// [`co_mention_pairs`] of this store's graph.
    pub fn co_mention_pairs(&mut self, vars: usize) -> Result<Vec<CoMention>, StoreError> {
        co_mention_pairs(&self.graph, &mut self.store, vars)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn nested_keys_name_each_other() {
        assert!(nested("cell", "cell death") && !nested("cell", "death rate"));
    }
}
