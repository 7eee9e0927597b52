//! The HTML report: one self-contained page (styles, script and figures inlined, no URL to
//! anything outside it) that people can open offline and pass on.
//!
//! The work is split in two steps so that each can be tested alone: [`collect`] gathers every
//! number and evidence sentence the page shows into a plain [`Report`] value (graph, store and
//! cue families in, data out), and [`render`] turns that value into HTML with maud, which
//! escapes every piece of text it is given. Corpus text therefore reaches the page only as
//! escaped text nodes or attribute values; the inlined script is a constant and reads nothing
//! but the page's own elements.
//!
//! Co-mentions are counted with [`crate::query::comention`], as `pair` and `compare` count them. The
//! page's conflicts are `analysis::conflicts`, as `hearsay conflicts` lists them.

mod graph_svg;
pub mod layout;
mod page;
mod plots;

use crate::claim::{Kind, Modality, Polarity};
use crate::corpus::Skipped;
use crate::error::StoreError;
use crate::graph::export::{self, Selection};
use crate::graph::{ClaimGraph, Relation};
use crate::query::{self, PairReport, TopRelation, VarMatch};
use crate::store::{key_terms, Store};
use petgraph::graph::NodeIndex;
use std::collections::{BTreeMap, BTreeSet, HashMap};

pub use page::render;

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

/// The corpus at a glance.
#[derive(Debug, Clone, Default)]
pub struct Summary {
    pub files: usize,
    pub documents: u64,
    pub sentences: u64,
    /// Claims the store holds.
    pub claims_stored: u64,
    /// Claims in the graph (after filters; a claim whose cause and effect resolve to one
    /// variable is left out).
    pub claims: usize,
    pub variables: usize,
    pub causal_edges: usize,
    pub by_kind: BTreeMap<Kind, usize>,
    pub by_polarity: BTreeMap<Polarity, usize>,
    pub by_modality: BTreeMap<Modality, usize>,
    pub skipped: Vec<Skipped>,
    pub failed: Vec<Skipped>,
    pub hearsay_version: String,
}

/// How an edge's claims sign the effect, drawn with a colour and a line style.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Sign {
    Increase,
    Decrease,
    /// Both increasing and decreasing claims.
    Mixed,
    Unsigned,
    /// Mostly "has no effect" claims.
    NoEffect,
}

impl Sign {
    pub fn of(rel: &Relation) -> Sign {
        let c = &rel.counts;
        let inc = c.polarity(Polarity::Increase);
        let dec = c.polarity(Polarity::Decrease) + c.polarity(Polarity::Prevent);
        match (inc > 0, dec > 0) {
            (true, true) => Sign::Mixed,
            (true, false) => Sign::Increase,
            (false, true) => Sign::Decrease,
            _ if c.polarity(Polarity::None) > c.polarity(Polarity::Unsigned) => Sign::NoEffect,
            _ => Sign::Unsigned,
        }
    }
    pub fn as_str(self) -> &'static str {
        match self {
            Sign::Increase => "increase",
            Sign::Decrease => "decrease",
            Sign::Mixed => "mixed",
            Sign::Unsigned => "unsigned",
            Sign::NoEffect => "no effect",
        }
    }
}

/// One evidence sentence with its place.
#[derive(Debug, Clone)]
pub struct EvidenceLine {
    pub location: String,
    pub polarity: Polarity,
    pub modality: Modality,
    pub cue: String,
    pub sentence: String,
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
    pub summary: Summary,
    pub nodes: Vec<PictureNode>,
    pub edges: Vec<PictureEdge>,
    /// Support of every causal edge in the graph.
    pub support_per_edge: Vec<usize>,
    pub both_ways: Vec<BothWays>,
    /// Cue family → claims.
    pub families: Vec<(String, usize)>,
    pub top: Vec<TopRelation>,
    /// `analysis::conflicts`, as `hearsay conflicts` lists them.
    pub conflicts: Vec<crate::graph::analysis::Conflict>,
    pub co_mentions: Vec<CoMention>,
    pub pair: Option<PairReport>,
    /// With `--compare`: the per-model, per-family summaries of `hearsay compare`.
    pub comparison: Option<Vec<crate::compare::Summary>>,
}

/// A `--pair` variable as `report::lookup` found it.
pub type Looked = (VarMatch, Option<NodeIndex>);

/// What to gather beside the graph.
pub struct Sources<'a> {
    pub store: &'a mut Store,
    /// Cue id → family name.
    pub families: &'a HashMap<String, String>,
    /// The `--pair` variables, already looked up.
    pub pair: Option<(Looked, Looked)>,
}

/// Gather the report's data.
pub fn collect(g: &ClaimGraph, src: Sources<'_>, opts: &Options) -> Result<Report, StoreError> {
    let store = src.store;
    let conflicts = crate::graph::analysis::conflicts(g, 1);
    // A conflict marks the edges it is about: both of them when the two directions are stated.
    let disputed: BTreeSet<(&str, &str)> = conflicts
        .iter()
        .flat_map(|c| {
            let (x, y) = (c.x.as_str(), c.y.as_str());
            let both = c.kind == crate::graph::analysis::ConflictKind::BothDirections;
            std::iter::once((x, y)).chain(both.then_some((y, x)))
        })
        .collect();
    let (nodes, edges) = picture(g, store, opts, &disputed);
    let mut top = query::top_relations(g, 1, 1);
    top.truncate(opts.rows);
    let mut co_mentions = co_mention_pairs(g, store, opts.co_mention_vars)?;
    co_mentions.truncate(opts.rows);
    let pair = match src.pair {
        Some((x, y)) => {
            let n = crate::query::comention::pair_co_mentions(
                store,
                g,
                (&x.0.key, x.1),
                (&y.0.key, y.1),
            )?;
            Some(query::pair_report(g, x, y, n, opts.evidence, |r| {
                query::evidence_text(g, store, r)
            }))
        }
        None => None,
    };
    let mut conflicts = conflicts;
    conflicts.truncate(opts.rows);
    Ok(Report {
        title: opts.title.clone(),
        summary: summary(g, store),
        nodes,
        edges,
        support_per_edge: g.edges().map(|(_, _, r)| r.support()).collect(),
        both_ways: both_ways(g),
        families: family_counts(g, src.families),
        top,
        conflicts,
        co_mentions,
        pair,
        comparison: None,
    })
}

fn summary(g: &ClaimGraph, store: &Store) -> Summary {
    let m = &store.manifest;
    let (documents, sentences, claims_stored) = m.totals();
    let mut s = Summary {
        files: m.files.len(),
        documents,
        sentences,
        claims_stored,
        claims: g.rows.len(),
        variables: g.graph.node_count(),
        causal_edges: g.graph.edge_count(),
        skipped: m.skipped.clone(),
        failed: m.failed.clone(),
        hearsay_version: m.hearsay_version.clone(),
        ..Summary::default()
    };
    for r in &g.rows {
        *s.by_kind.entry(r.kind).or_default() += 1;
        *s.by_polarity.entry(r.polarity).or_default() += 1;
        *s.by_modality.entry(r.modality).or_default() += 1;
    }
    s
}

fn evidence(g: &ClaimGraph, store: &Store, rel: &Relation, n: usize) -> Vec<EvidenceLine> {
    query::strongest_rows(g, rel, n)
        .into_iter()
        .map(|r| {
            let (location, sentence) = query::evidence_text(g, store, r);
            let row = &g.rows[r];
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

fn hedged_heavy(rel: &Relation) -> bool {
    let c = &rel.counts;
    let soft = c.modality(Modality::Hedged)
        + c.modality(Modality::Conditional)
        + c.modality(Modality::Question);
    2 * soft >= c.total && c.total > 0
}

/// The heaviest edges, their nodes and a layout.
fn picture(
    g: &ClaimGraph,
    store: &Store,
    opts: &Options,
    disputed: &BTreeSet<(&str, &str)>,
) -> (Vec<PictureNode>, Vec<PictureEdge>) {
    let sel = export::select(
        g,
        &Selection {
            top: opts.edges,
            ..Selection::default()
        },
    );
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
            documents: rel.docs.len(),
            weight: e.weight,
            modality,
            polarity,
            sign: Sign::of(rel),
            hedged_heavy: hedged_heavy(rel),
            disputed: disputed.contains(&(e.source.as_str(), e.target.as_str())),
            reciprocal: pairs.contains(&(e.target.as_str(), e.source.as_str())),
            evidence: evidence(g, store, rel, opts.evidence),
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

/// Claims per cue family (cues unknown to the pattern set count under "other").
fn family_counts(g: &ClaimGraph, families: &HashMap<String, String>) -> Vec<(String, usize)> {
    let mut m: BTreeMap<&str, usize> = BTreeMap::new();
    for r in &g.rows {
        let f = families.get(&r.cue).map(String::as_str).unwrap_or("other");
        *m.entry(f).or_default() += 1;
    }
    let mut v: Vec<(String, usize)> = m.into_iter().map(|(k, n)| (k.to_string(), n)).collect();
    v.sort_by(|x, y| y.1.cmp(&x.1).then_with(|| x.0.cmp(&y.0)));
    v
}

/// True when every index term of one key is a term of the other, so that every sentence naming
/// the longer one names the shorter one too.
fn nested(a: &str, b: &str) -> bool {
    let (ta, tb) = (key_terms(a), key_terms(b));
    ta.iter().all(|t| tb.contains(t)) || tb.iter().all(|t| ta.contains(t))
}

/// The most-mentioned `vars` variables, paired up: pairs named together in sentences without a
/// claim between them and with no causal claim either way, most co-mentioned first.
pub fn co_mention_pairs(
    g: &ClaimGraph,
    store: &mut Store,
    vars: usize,
) -> Result<Vec<CoMention>, StoreError> {
    let mut nodes: Vec<NodeIndex> = g.graph.node_indices().collect();
    nodes.sort_by(|&x, &y| {
        g.graph[y]
            .mentions
            .cmp(&g.graph[x].mentions)
            .then_with(|| g.graph[x].key.cmp(&g.graph[y].key))
    });
    nodes.truncate(vars);
    let mut sets = Vec::with_capacity(nodes.len());
    for &n in &nodes {
        let terms = key_terms(&g.graph[n].key);
        sets.push(if terms.is_empty() {
            BTreeSet::new()
        } else {
            store.sentence_ids_with(&[&terms])?
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
            let sentences = crate::query::comention::unclaimed(
                g,
                Some(a),
                Some(b),
                sets[i]
                    .intersection(&sets[j])
                    .map(|(d, s)| (d.as_str(), *s)),
            );
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

#[cfg(test)]
mod tests {
    use super::*;
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
        assert!(nested("cell", "cell death") && !nested("cell", "death rate"));
    }
}
