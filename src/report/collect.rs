//! Gathering the report's data, once, through the query face.

use super::data::{BothWays, Options, PictureEdge, PictureNode, Report};
use super::layout;
use crate::claim::Modality;
use crate::compare::Summary as ComparisonSummary;
use crate::error::StoreError;
use crate::graph::{ClaimGraph, Relation, Sign};
use crate::query::{self, Aggregated, ConflictKind, ConflictRank, Loaded};
use std::collections::{BTreeMap, BTreeSet, HashMap, HashSet};

/// What to gather beside the graph.
pub struct Sources<'a> {
    /// Cue id → family name.
    pub families: &'a HashMap<String, String>,
    /// The `--pair` names, looked up in the graph as `pair` looks them up.
    pub pair: Option<(&'a str, &'a str)>,
    /// With `--compare`: the per-model, per-family summaries of `hearsay compare`.
    pub comparison: Option<Vec<ComparisonSummary>>,
    /// The store's aggregates, when `loaded` was built from them ([`query::load_aggregated`]):
    /// the relations whose rows the page shows are then read, and no other row.
    pub aggregated: Option<&'a Aggregated>,
}

/// In a graph built from aggregates, read the rows of what the page shows sentences of or
/// counts rows of: the conflicts shown (ranked from the tables), the pictured edges, the `--pair` relations and
/// the associations among the co-mention variables.
fn hydrate(
    loaded: &mut Loaded,
    shown: &ConflictRank,
    pair: Option<(&str, &str)>,
    opts: &Options,
) -> Result<(), StoreError> {
    let g = &loaded.graph;
    let mut causal = shown.relations();
    let mut assoc = HashSet::new();
    for e in query::heaviest_edges(g, opts.edges).edges {
        causal.insert((e.source, e.target));
    }
    let ordered = |a: &str, b: &str| {
        if a <= b {
            (a.to_string(), b.to_string())
        } else {
            (b.to_string(), a.to_string())
        }
    };
    if let Some((x, y)) = pair {
        let (x, y) = (loaded.lookup(x).0.key, loaded.lookup(y).0.key);
        causal.insert((x.clone(), y.clone()));
        causal.insert((y.clone(), x.clone()));
        assoc.insert(ordered(&x, &y));
    }
    let nodes = query::co_mention_nodes(g, opts.co_mention_vars);
    for (i, &a) in nodes.iter().enumerate() {
        for &b in &nodes[i + 1..] {
            if g.association(a, b).is_some() {
                assoc.insert(ordered(&g.graph[a].key, &g.graph[b].key));
            }
        }
    }
    loaded.hydrate(&causal, &assoc)
}

/// Gather the report's data.
pub fn collect(
    loaded: &mut Loaded,
    src: Sources<'_>,
    opts: &Options,
) -> Result<Report, StoreError> {
    let agg = src.aggregated.filter(|_| loaded.from_aggregates);
    // From the tables: every conflict (which pictured edges are disputed) and those shown
    // (whose rows are read).
    let ranked = agg.map(|agg| {
        (
            query::ranked_conflicts(agg, 1, 0),
            query::ranked_conflicts(agg, 1, opts.rows),
        )
    });
    if let Some((_, shown)) = &ranked {
        hydrate(loaded, shown, src.pair, opts)?;
    }
    let mut top = match agg {
        Some(agg) => query::top_from_aggregates(agg, 1, 1, opts.rows),
        None => query::top_relations(&loaded.graph, 1, 1),
    };
    top.truncate(opts.rows);
    let mut co_mentions = loaded.co_mention_pairs(opts.co_mention_vars)?;
    co_mentions.truncate(opts.rows);
    let pair = match src.pair {
        Some((x, y)) => {
            let (x, y) = (loaded.lookup(x), loaded.lookup(y));
            Some(loaded.pair(x, y, opts.evidence)?)
        }
        None => None,
    };
    let g = &loaded.graph;
    let mut conflicts = query::conflicts(g, 1);
    // A conflict marks the edges it is about: both of them when the two directions are stated.
    let disputed: BTreeSet<(&str, &str)> = match &ranked {
        Some((all, _)) => disputed_edges(all.chosen.iter().map(|c| (c.kind, &c.x, &c.y))),
        None => disputed_edges(conflicts.iter().map(|c| (c.kind, &c.x, &c.y))),
    };
    let (nodes, edges) = picture(loaded, opts, &disputed);
    if let Some((_, shown)) = &ranked {
        // Relations read for the picture or the pair may make conflicts not among those shown.
        conflicts.retain(|c| shown.keeps(c));
    }
    conflicts.truncate(opts.rows);
    Ok(Report {
        title: opts.title.clone(),
        summary: match agg {
            Some(agg) => query::corpus_summary_of(loaded, agg),
            None => query::corpus_summary(loaded),
        },
        nodes,
        edges,
        support_per_edge: g.edges().map(|(_, _, r)| r.support()).collect(),
        both_ways: both_ways(g),
        families: match agg {
            Some(agg) => family_counts_of(
                agg.cues.iter().map(|(c, n)| (c.as_str(), *n as usize)),
                src.families,
            ),
            None => family_counts_of(g.rows.iter().map(|r| (r.cue.as_str(), 1)), src.families),
        },
        top,
        conflicts,
        co_mentions,
        pair,
        comparison: src.comparison,
    })
}

/// The edges conflicts are about: both of them when the two directions are stated.
fn disputed_edges<'a>(
    conflicts: impl Iterator<Item = (ConflictKind, &'a String, &'a String)>,
) -> BTreeSet<(&'a str, &'a str)> {
    conflicts
        .flat_map(|(kind, x, y)| {
            let (x, y) = (x.as_str(), y.as_str());
            let both = kind == ConflictKind::BothDirections;
            std::iter::once((x, y)).chain(both.then_some((y, x)))
        })
        .collect()
}

fn hedged_heavy(rel: &Relation) -> bool {
    let c = &rel.counts;
    let soft = c.modality(Modality::Hedged)
        + c.modality(Modality::Conditional)
        + c.modality(Modality::Question);
    2 * soft >= c.total && c.total > 0
}

/// The heaviest edges, their nodes and a layout.
fn picture(
    loaded: &Loaded,
    opts: &Options,
    disputed: &BTreeSet<(&str, &str)>,
) -> (Vec<PictureNode>, Vec<PictureEdge>) {
    let g = &loaded.graph;
    let sel = query::heaviest_edges(g, opts.edges);
    let slot: HashMap<&str, usize> = sel
        .nodes
        .iter()
        .enumerate()
        .map(|(i, n)| (n.id.as_str(), i))
        .collect();
    let pairs: BTreeSet<(&str, &str)> = sel
        .edges
        .iter()
        .map(|e| (e.source.as_str(), e.target.as_str()))
        .collect();
    let mut edges = Vec::new();
    for e in &sel.edges {
        let (Some(&a), Some(&b)) = (g.index.get(&e.source), g.index.get(&e.target)) else {
            continue;
        };
        let Some(rel) = g.edge(a, b) else { continue };
        let mut modality = BTreeMap::new();
        let mut polarity = BTreeMap::new();
        for (p, ms) in &rel.counts.by {
            for (m, n) in ms {
                *modality.entry(*m).or_default() += n;
                *polarity.entry(*p).or_default() += n;
            }
        }
        edges.push(PictureEdge {
            source: slot[e.source.as_str()],
            target: slot[e.target.as_str()],
            claims: rel.counts.total,
            support: rel.support(),
            documents: rel.documents(),
            weight: e.weight,
            modality,
            polarity,
            sign: Sign::of(rel),
            hedged_heavy: hedged_heavy(rel),
            disputed: disputed.contains(&(e.source.as_str(), e.target.as_str())),
            reciprocal: pairs.contains(&(e.target.as_str(), e.source.as_str())),
            evidence: loaded.strongest_evidence(rel, opts.evidence),
        });
    }
    let links: Vec<(usize, usize)> = edges.iter().map(|e| (e.source, e.target)).collect();
    let points = layout::force_directed(sel.nodes.len(), &links);
    let nodes = sel
        .nodes
        .into_iter()
        .zip(points)
        .map(|(n, at)| PictureNode {
            key: n.id,
            label: n.label,
            mentions: n.mentions,
            documents: n.documents,
            at,
        })
        .collect();
    (nodes, edges)
}

/// Pairs stated in both directions.
fn both_ways(g: &ClaimGraph) -> Vec<BothWays> {
    let mut out = Vec::new();
    for (a, b, rel) in g.edges() {
        if a >= b {
            continue;
        }
        let Some(back) = g.edge(b, a) else { continue };
        let (f, r) = (rel.support(), back.support());
        if f + r == 0 {
            continue;
        }
        let (major, share) = if f >= r {
            ((a, b), f as f64 / (f + r) as f64)
        } else {
            ((b, a), r as f64 / (f + r) as f64)
        };
        out.push(BothWays {
            major: (
                g.graph[major.0].label.clone(),
                g.graph[major.1].label.clone(),
            ),
            total_support: f + r,
            major_share: share,
        });
    }
    out
}

/// Claims per cue family (cues unknown to the pattern set count under "other"), from claims
/// per cue.
fn family_counts_of<'a>(
    cues: impl Iterator<Item = (&'a str, usize)>,
    families: &'a HashMap<String, String>,
) -> Vec<(String, usize)> {
    let mut m: BTreeMap<&str, usize> = BTreeMap::new();
    for (cue, n) in cues {
        let f = families.get(cue).map(String::as_str).unwrap_or("other");
        *m.entry(f).or_default() += n;
    }
    let mut v: Vec<(String, usize)> = m.into_iter().map(|(k, n)| (k.to_string(), n)).collect();
    v.sort_by(|x, y| y.1.cmp(&x.1).then_with(|| x.0.cmp(&y.0)));
    v
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::claim::Polarity;
    use crate::graph::Filter;
    use crate::store::test_row as row;
    use crate::variables::Aliases;

    #[test]
    fn sign_and_hedging_of_an_edge() {
        use Modality::*;
        use Polarity::*;
        let rows = vec![
            row("a", "b", Increase, Hedged, "d1"),
            row("a", "b", Unsigned, Asserted, "d2"),
            row("c", "d", None, Asserted, "d1"),
            row("c", "d", Prevent, Conditional, "d1"),
            row("c", "d", Decrease, Hedged, "d1"),
        ];
        let g = ClaimGraph::build(rows, &Aliases::default(), &Filter::default());
        let ab = g.edge(g.index["a"], g.index["b"]).unwrap();
        let cd = g.edge(g.index["c"], g.index["d"]).unwrap();
        assert_eq!((Sign::of(ab), hedged_heavy(ab)), (Sign::Increase, true));
        assert_eq!((Sign::of(cd), hedged_heavy(cd)), (Sign::Decrease, true));
    }
}
