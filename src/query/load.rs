//! A store opened for queries: its graph built once, with what looking up a name needs.

use super::aggregate::{aggregate, graph_from_aggregates, Aggregated};
use crate::claim::Kind;
use crate::error::StoreError;
use crate::graph::{drop_near_duplicates, ClaimGraph, Filter};
use crate::store::Store;
use crate::variables::{Aliases, Normalizer};
use std::collections::{HashMap, HashSet};

/// A store with its graph, ready for queries.
pub struct Loaded {
    pub store: Store,
    pub normalizer: Normalizer,
    pub aliases: Aliases,
    pub graph: ClaimGraph,
    /// Rows dropped as near-duplicates (0 unless built with dedupe).
    pub duplicates_removed: usize,
    /// Whether the graph was built from the store's aggregate tables ([`load_aggregated`]):
    /// its relations then have totals and no rows.
    pub from_aggregates: bool,
}

/// Build the graph of every stored row the filter accepts, resolving keys through `aliases`.
/// With `dedupe`, near-duplicate sentences of the same claim count once
/// ([`crate::graph::near_duplicates`]), and [`Loaded::duplicates_removed`] says how many rows
/// that dropped.
pub fn load(
    store: Store,
    normalizer: Normalizer,
    aliases: Aliases,
    filter: &Filter,
    dedupe: bool,
) -> Result<Loaded, StoreError> {
    let mut rows = store.rows()?;
    let duplicates_removed = if dedupe {
        drop_near_duplicates(&mut rows, &store, &aliases)?
    } else {
        0
    };
    let graph = ClaimGraph::build(rows, &aliases, filter);
    Ok(Loaded {
        store,
        normalizer,
        aliases,
        graph,
        duplicates_removed,
        from_aggregates: false,
    })
}

/// The graph of the stored rows that name one of `keys` (alias-resolved keys) as cause or
/// effect and that the filter accepts, read through the store's postings: the rows of any
/// other variable are never read. Its rows are exactly the rows of the whole graph
/// ([`load`] without dedupe) that name one of `keys`, in the same order, so a query that only
/// looks at those rows answers as it would from the whole graph. Variables other than `keys`
/// appear only as the other end of those rows, with their counts over those rows alone.
pub fn load_naming(
    store: Store,
    normalizer: Normalizer,
    aliases: Aliases,
    filter: &Filter,
    keys: &[String],
) -> Result<Loaded, StoreError> {
    let postings = store.postings()?;
    let rows = store.rows_naming(&postings, |k| {
        let k = aliases.resolve(k);
        keys.iter().any(|w| w == k)
    })?;
    let graph = ClaimGraph::build(rows, &aliases, filter);
    Ok(Loaded {
        store,
        normalizer,
        aliases,
        graph,
        duplicates_removed: 0,
        from_aggregates: false,
    })
}

/// The graph of the causal relations `wanted` (pairs of alias-resolved keys, cause first) and
/// nothing else, read through the postings: each relation with every one of its rows, in
/// corpus order, as in the whole graph without a filter. Only the rows naming their ends are
/// read. Variables carry the counts of these rows alone.
pub fn relations_graph(
    store: &Store,
    aliases: &Aliases,
    wanted: &HashSet<(String, String)>,
) -> Result<ClaimGraph, StoreError> {
    relations_graph_with(store, aliases, wanted, &HashSet::new())
}

/// [`relations_graph`] with association pairs too (`associations`: smaller key first).
pub fn relations_graph_with(
    store: &Store,
    aliases: &Aliases,
    causal: &HashSet<(String, String)>,
    associations: &HashSet<(String, String)>,
) -> Result<ClaimGraph, StoreError> {
    // Each end a group of raw keys; only rows naming both ends of a wanted relation are read.
    let mut ends: HashMap<&str, usize> = HashMap::new();
    let mut pairs = Vec::new();
    for (a, b) in causal.iter().chain(associations) {
        let mut ids = [0usize; 2];
        for (id, k) in ids.iter_mut().zip([a.as_str(), b.as_str()]) {
            let n = ends.len();
            *id = *ends.entry(k).or_insert(n);
        }
        pairs.push((ids[0], ids[1]));
    }
    let mut rows = Vec::new();
    if !ends.is_empty() {
        let postings = store.postings()?;
        rows = store.rows_naming_pairs(
            &postings,
            ends.len(),
            |k| ends.get(aliases.resolve(k)).copied(),
            &pairs,
        )?;
        rows.retain(|r| {
            let (c, e) = (aliases.resolve(&r.cause), aliases.resolve(&r.effect));
            match r.kind {
                Kind::Causal => causal.contains(&(c.to_string(), e.to_string())),
                Kind::Association => {
                    let (a, b) = if c <= e { (c, e) } else { (e, c) };
                    associations.contains(&(a.to_string(), b.to_string()))
                }
            }
        });
    }
    Ok(ClaimGraph::build(rows, aliases, &Filter::default()))
}

impl Loaded {
    /// In a graph built from aggregates, give the relations `causal` (cause first) and
    /// `associations` (smaller key first) their rows, read through the postings, so that the
    /// analyses and evidence that read rows work on them as on the whole graph. Other
    /// relations keep no rows. A graph built from rows is left as it is.
    pub fn hydrate(
        &mut self,
        causal: &HashSet<(String, String)>,
        associations: &HashSet<(String, String)>,
    ) -> Result<(), StoreError> {
        if !self.from_aggregates {
            return Ok(());
        }
        let sub = relations_graph_with(&self.store, &self.aliases, causal, associations)?;
        let offset = self.graph.rows.len();
        let g = &mut self.graph;
        let node =
            |g: &ClaimGraph, n: petgraph::graph::NodeIndex| g.index.get(&sub.graph[n].key).copied();
        for (a, b, rel) in sub.edges() {
            let (Some(x), Some(y)) = (node(g, a), node(g, b)) else {
                continue;
            };
            if let Some(e) = g.graph.find_edge(x, y) {
                g.graph[e].rows = rel.rows.iter().map(|r| r + offset).collect();
            }
        }
        for (&(a, b), rel) in &sub.associations {
            let (Some(x), Some(y)) = (node(g, a), node(g, b)) else {
                continue;
            };
            if let Some(r) = g.associations.get_mut(&(x.min(y), x.max(y))) {
                r.rows = rel.rows.iter().map(|r| r + offset).collect();
            }
        }
        g.rows.extend(sub.rows);
        Ok(())
    }
}

/// [`relations_graph`] as a loaded store, with the labels, mentions and documents of the
/// whole graph's variables taken from `agg`.
pub fn load_relations(
    store: Store,
    normalizer: Normalizer,
    aliases: Aliases,
    agg: &Aggregated,
    wanted: &HashSet<(String, String)>,
) -> Result<Loaded, StoreError> {
    let mut graph = relations_graph(&store, &aliases, wanted)?;
    for n in graph.graph.node_indices() {
        if let Some(v) = agg.vars.get(&graph.graph[n].key) {
            graph.graph[n].label = v.label.clone();
            graph.graph[n].mentions = v.mentions as usize;
            graph.graph[n].docs = v.docs as usize;
        }
    }
    Ok(Loaded {
        store,
        normalizer,
        aliases,
        graph,
        duplicates_removed: 0,
        from_aggregates: false,
    })
}

/// The whole graph without a filter, built from the store's aggregate tables
/// ([`graph_from_aggregates`]): no claim row is read, except those of variables the aliases
/// merge from several stored keys.
pub fn load_aggregated(
    store: Store,
    normalizer: Normalizer,
    aliases: Aliases,
) -> Result<(Loaded, Aggregated), StoreError> {
    let agg = aggregate(&store, &aliases)?;
    let graph = graph_from_aggregates(&agg);
    Ok((
        Loaded {
            store,
            normalizer,
            aliases,
            graph,
            duplicates_removed: 0,
            from_aggregates: true,
        },
        agg,
    ))
}
