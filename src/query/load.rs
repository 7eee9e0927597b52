//! A store opened for queries: its graph built once, with what looking up a name needs.

use crate::error::StoreError;
use crate::graph::{drop_near_duplicates, ClaimGraph, Filter};
use crate::store::Store;
use crate::variables::{Aliases, Normalizer};

/// A store with its graph, ready for queries.
pub struct Loaded {
    pub store: Store,
    pub normalizer: Normalizer,
    pub aliases: Aliases,
    pub graph: ClaimGraph,
    /// Rows dropped as near-duplicates (0 unless built with dedupe).
    pub duplicates_removed: usize,
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
    })
}
