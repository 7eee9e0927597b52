//! Analyses over the claim graph: indirect chains between two variables ([`paths`]), pairs the
//! corpus states inconsistently ([`conflicts`]), directed cycles ([`cycles`]) and the weight
//! matrix over a variable list ([`matrix`]).
//!
//! Pure functions over a [`ClaimGraph`]: they return typed results with row indices
//! (`ClaimGraph::rows`) as evidence; fetching the sentences from a store is the caller's job.
//! Every result counts statements in text; none is evidence that a causation is real.

use crate::claim::{Modality, Polarity};
use crate::graph::sign::Sign;
use crate::graph::weight::WeightSpec;
use crate::graph::{ClaimGraph, Relation};
use petgraph::graph::NodeIndex;
use petgraph::visit::EdgeRef;
use serde::Serialize;
use std::collections::{BTreeMap, HashSet};

fn is_denial(g: &ClaimGraph, row: usize) -> bool {
    let r = &g.rows[row];
    r.modality == Modality::Negated || r.polarity == Polarity::None
}

/// A claim that states the relation: not a denial and not a question (hedged and conditional
/// claims state it, weakly).
fn is_statement(g: &ClaimGraph, row: usize) -> bool {
    !is_denial(g, row) && g.rows[row].modality != Modality::Question
}

/// Rows ordered for display: one per document before a second from the same document, corpus
/// order otherwise.
pub fn spread(g: &ClaimGraph, rows: &[usize]) -> Vec<usize> {
    let mut seen: BTreeMap<&str, usize> = BTreeMap::new();
    let mut keyed: Vec<(usize, usize)> = rows
        .iter()
        .map(|&r| {
            let n = seen.entry(g.rows[r].doc.as_str()).or_insert(0);
            *n += 1;
            (*n, r)
        })
        .collect();
    keyed.sort();
    keyed.into_iter().map(|x| x.1).collect()
}

/// One link of a chain.
#[derive(Debug, Clone, Serialize)]
pub struct Hop {
    pub cause: String,
    pub effect: String,
    pub cause_label: String,
    pub effect_label: String,
    pub weight: f64,
    pub documents: usize,
    pub sign: Sign,
    /// Rows that state the hop (no denials, no questions), one per document first.
    #[serde(skip)]
    pub rows: Vec<usize>,
}

/// The rows a hop shows as evidence: those of `rel` that state it (no denials, no questions),
/// one per document first.
pub fn hop_rows(g: &ClaimGraph, rel: &Relation) -> Vec<usize> {
    let support: Vec<usize> = rel
        .rows
        .iter()
        .copied()
        .filter(|&r| is_statement(g, r))
        .collect();
    spread(g, &support)
}

fn hop(g: &ClaimGraph, spec: &WeightSpec, a: NodeIndex, b: NodeIndex, rel: &Relation) -> Hop {
    Hop {
        cause: g.graph[a].key.clone(),
        effect: g.graph[b].key.clone(),
        cause_label: g.graph[a].label.clone(),
        effect_label: g.graph[b].label.clone(),
        weight: spec.weight(g, rel),
        documents: rel.documents(),
        sign: Sign::of(rel),
        rows: hop_rows(g, rel),
    }
}

/// An indirect chain from X to Y.
#[derive(Debug, Clone, Serialize)]
pub struct Chain {
    /// The weakest link: the smallest hop weight (the ranking key).
    pub support: f64,
    /// The product of the hop weights, each divided by the heaviest edge in the graph.
    pub product: f64,
    pub sign: Sign,
    pub hops: Vec<Hop>,
}

/// Indirect chains from `from` to `to` of 2 to `max_hops` edges, over edges whose weight is at
/// least `min_weight` (and above 0, so denied edges never carry a chain).
///
/// Ranking: by the weakest link (a chain is as well supported as its least-stated hop), then
/// fewer hops, then the product of normalised weights, then the variable keys. At most `limit`
/// chains (0: all).
pub fn paths(
    g: &ClaimGraph,
    spec: &WeightSpec,
    from: NodeIndex,
    to: NodeIndex,
    max_hops: usize,
    min_weight: f64,
    limit: usize,
) -> Vec<Chain> {
    let weights: std::collections::HashMap<(NodeIndex, NodeIndex), f64> = g
        .edges()
        .map(|(a, b, r)| ((a, b), spec.weight(g, r)))
        .collect();
    let max_w = weights.values().copied().fold(0.0f64, f64::max);
    let keep = |a: NodeIndex, b: NodeIndex| {
        weights
            .get(&(a, b))
            .is_some_and(|&w| w > 0.0 && w >= min_weight)
    };
    let filtered =
        petgraph::visit::EdgeFiltered::from_fn(&g.graph, |e| keep(e.source(), e.target()));
    let mut out = Vec::new();
    if max_hops < 2 || from == to {
        return out;
    }
    let found = petgraph::algo::all_simple_paths::<Vec<NodeIndex>, _, std::hash::RandomState>(
        &filtered,
        from,
        to,
        1,
        Some(max_hops - 1),
    );
    for nodes in found {
        let mut hops = Vec::new();
        for w in nodes.windows(2) {
            if let Some(rel) = g.edge(w[0], w[1]) {
                hops.push(hop(g, spec, w[0], w[1], rel));
            }
        }
        let support = hops.iter().map(|h| h.weight).fold(f64::INFINITY, f64::min);
        let product = hops
            .iter()
            .map(|h| if max_w > 0.0 { h.weight / max_w } else { 0.0 })
            .product();
        let sign = hops
            .iter()
            .map(|h| h.sign)
            .reduce(Sign::then)
            .unwrap_or(Sign::Unsigned);
        out.push(Chain {
            support,
            product,
            sign,
            hops,
        });
    }
    out.sort_by(|x, y| {
        y.support
            .total_cmp(&x.support)
            .then(x.hops.len().cmp(&y.hops.len()))
            .then(y.product.total_cmp(&x.product))
            .then_with(|| {
                let k = |c: &Chain| c.hops.iter().map(|h| h.effect.clone()).collect::<Vec<_>>();
                k(x).cmp(&k(y))
            })
    });
    if limit > 0 {
        out.truncate(limit);
    }
    out
}

/// What makes a pair inconsistent.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ConflictKind {
    /// X → Y and Y → X are both stated (asserted, hedged or conditional; not denied or asked).
    BothDirections,
    /// X → Y is stated as an increase and as a decrease (or prevention).
    OppositeSigns,
    /// X → Y is stated (asserted, hedged or conditional) and also denied ("does not", "has no
    /// effect on"). Questions are on neither side.
    AssertedAndDenied,
}

impl ConflictKind {
    pub fn as_str(self) -> &'static str {
        match self {
            ConflictKind::BothDirections => "both-directions",
            ConflictKind::OppositeSigns => "opposite-signs",
            ConflictKind::AssertedAndDenied => "asserted-and-denied",
        }
    }
}

/// One side of a conflict.
#[derive(Debug, Clone, Serialize)]
pub struct ConflictSide {
    pub cause: String,
    pub effect: String,
    /// What this side states: "forward", "backward", "increase", "decrease", "stated", "denied".
    pub reading: &'static str,
    pub claims: usize,
    pub documents: usize,
    /// Its rows, one per document first.
    #[serde(skip)]
    pub rows: Vec<usize>,
}

/// A pair the corpus states inconsistently.
#[derive(Debug, Clone, Serialize)]
pub struct Conflict {
    pub kind: ConflictKind,
    /// The pair's variable keys and labels (for both-directions, `x` is the smaller key).
    pub x: String,
    pub y: String,
    pub x_label: String,
    pub y_label: String,
    /// Claims on both sides together (the ranking key).
    pub support: usize,
    /// The side with fewer claims, divided by the side with more: 1 is an even split.
    pub balance: f64,
    pub sides: [ConflictSide; 2],
}

fn side(
    g: &ClaimGraph,
    a: NodeIndex,
    b: NodeIndex,
    reading: &'static str,
    rows: Vec<usize>,
) -> ConflictSide {
    let docs: HashSet<&str> = rows.iter().map(|&r| g.rows[r].doc.as_str()).collect();
    ConflictSide {
        cause: g.graph[a].key.clone(),
        effect: g.graph[b].key.clone(),
        reading,
        claims: rows.len(),
        documents: docs.len(),
        rows: spread(g, &rows),
    }
}

/// Every conflict with at least `min_claims` claims on each side, ranked by total claims, then
/// by balance, then by the keys.
pub fn conflicts(g: &ClaimGraph, min_claims: usize) -> Vec<Conflict> {
    let min = min_claims.max(1);
    let mut out = Vec::new();
    let mut push = |kind, a: NodeIndex, b: NodeIndex, s1: ConflictSide, s2: ConflictSide| {
        if s1.claims < min || s2.claims < min {
            return;
        }
        let (lo, hi) = (s1.claims.min(s2.claims), s1.claims.max(s2.claims));
        out.push(Conflict {
            kind,
            x: g.graph[a].key.clone(),
            y: g.graph[b].key.clone(),
            x_label: g.graph[a].label.clone(),
            y_label: g.graph[b].label.clone(),
            support: s1.claims + s2.claims,
            balance: lo as f64 / hi as f64,
            sides: [s1, s2],
        });
    };
    for (a, b, rel) in g.edges() {
        let stated: Vec<usize> = rel
            .rows
            .iter()
            .copied()
            .filter(|&r| is_statement(g, r))
            .collect();
        let denied: Vec<usize> = rel
            .rows
            .iter()
            .copied()
            .filter(|&r| is_denial(g, r))
            .collect();
        let of = |p: &[Polarity]| -> Vec<usize> {
            stated
                .iter()
                .copied()
                .filter(|&r| p.contains(&g.rows[r].polarity))
                .collect()
        };
        let inc = of(&[Polarity::Increase]);
        let dec = of(&[Polarity::Decrease, Polarity::Prevent]);
        push(
            ConflictKind::OppositeSigns,
            a,
            b,
            side(g, a, b, "increase", inc),
            side(g, a, b, "decrease", dec),
        );
        push(
            ConflictKind::AssertedAndDenied,
            a,
            b,
            side(g, a, b, "stated", stated.clone()),
            side(g, a, b, "denied", denied),
        );
        if g.graph[a].key < g.graph[b].key {
            if let Some(back) = g.edge(b, a) {
                let back_stated: Vec<usize> = back
                    .rows
                    .iter()
                    .copied()
                    .filter(|&r| is_statement(g, r))
                    .collect();
                push(
                    ConflictKind::BothDirections,
                    a,
                    b,
                    side(g, a, b, "forward", stated),
                    side(g, b, a, "backward", back_stated),
                );
            }
        }
    }
    out.sort_by(|x, y| {
        y.support
            .cmp(&x.support)
            .then(y.balance.total_cmp(&x.balance))
            .then_with(|| (&x.x, &x.y, x.kind).cmp(&(&y.x, &y.y, y.kind)))
    });
    out
}

/// A directed cycle.
#[derive(Debug, Clone, Serialize)]
pub struct Cycle {
    /// The weakest link (the ranking key).
    pub support: f64,
    pub sign: Sign,
    pub hops: Vec<Hop>,
}

/// Elementary directed cycles of at most `max_len` edges among edges of weight at least
/// `min_weight` (and above 0), each reported once (starting from its smallest key), ranked by
/// the weakest link. At most `limit` cycles are searched for (0: no limit).
pub fn cycles(
    g: &ClaimGraph,
    spec: &WeightSpec,
    min_weight: f64,
    max_len: usize,
    limit: usize,
) -> Vec<Cycle> {
    let mut adj: BTreeMap<NodeIndex, Vec<NodeIndex>> = BTreeMap::new();
    for (a, b, r) in g.edges() {
        let w = spec.weight(g, r);
        if w > 0.0 && w >= min_weight {
            adj.entry(a).or_default().push(b);
        }
    }
    // Order nodes by key so that "smallest node" is stable across runs.
    let rank = |n: NodeIndex| g.graph[n].key.as_str();
    let mut found: Vec<Vec<NodeIndex>> = Vec::new();
    let mut starts: Vec<NodeIndex> = adj.keys().copied().collect();
    starts.sort_by_key(|&n| rank(n));
    'outer: for &s in &starts {
        // Depth-first search for paths back to s through nodes ranked above s.
        let mut stack: Vec<(NodeIndex, usize)> = vec![(s, 0)];
        let mut path: Vec<NodeIndex> = vec![s];
        while let Some(&(n, i)) = stack.last() {
            let next = adj.get(&n).and_then(|v| v.get(i)).copied();
            let Some(m) = next else {
                stack.pop();
                path.pop();
                continue;
            };
            if let Some(top) = stack.last_mut() {
                top.1 += 1;
            }
            if m == s {
                found.push(path.clone());
                if limit > 0 && found.len() >= limit {
                    break 'outer;
                }
            } else if rank(m) > rank(s) && !path.contains(&m) && path.len() < max_len {
                stack.push((m, 0));
                path.push(m);
            }
        }
    }
    let mut out: Vec<Cycle> = found
        .into_iter()
        .map(|nodes| {
            let hops: Vec<Hop> = (0..nodes.len())
                .filter_map(|i| {
                    let (a, b) = (nodes[i], nodes[(i + 1) % nodes.len()]);
                    g.edge(a, b).map(|r| hop(g, spec, a, b, r))
                })
                .collect();
            Cycle {
                support: hops.iter().map(|h| h.weight).fold(f64::INFINITY, f64::min),
                sign: hops
                    .iter()
                    .map(|h| h.sign)
                    .reduce(Sign::then)
                    .unwrap_or(Sign::Unsigned),
                hops,
            }
        })
        .collect();
    out.sort_by(|x, y| {
        y.support
            .total_cmp(&x.support)
            .then(x.hops.len().cmp(&y.hops.len()))
            .then_with(|| {
                let k = |c: &Cycle| c.hops.iter().map(|h| h.cause.clone()).collect::<Vec<_>>();
                k(x).cmp(&k(y))
            })
    });
    out
}

/// What a matrix cell holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Cell {
    #[default]
    Weight,
    Documents,
    Mentions,
}

/// The matrix over `keys`: `m[i][j]` is the cell value of the edge `keys[i] → keys[j]` (0 when the
/// corpus states none; the diagonal is 0).
pub fn matrix(g: &ClaimGraph, spec: &WeightSpec, keys: &[String], cell: Cell) -> Vec<Vec<f64>> {
    keys.iter()
        .map(|a| {
            keys.iter()
                .map(|b| {
                    let rel = match (g.index.get(a), g.index.get(b)) {
                        (Some(&x), Some(&y)) if x != y => g.edge(x, y),
                        _ => None,
                    };
                    rel.map(|r| match cell {
                        Cell::Weight => spec.weight(g, r),
                        Cell::Documents => r.documents() as f64,
                        Cell::Mentions => r.counts.total as f64,
                    })
                    .unwrap_or(0.0)
                })
                .collect()
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::graph::Filter;
    use crate::store::test_row as row;
    use crate::variables::Aliases;

    fn graph() -> ClaimGraph {
        use Modality::*;
        use Polarity::*;
        let rows = vec![
            row("a", "b", Increase, Asserted, "d1"),
            row("a", "b", Increase, Asserted, "d2"),
            row("b", "c", Decrease, Asserted, "d1"),
            row("b", "c", Decrease, Asserted, "d3"),
            row("b", "c", Decrease, Asserted, "d4"),
            row("a", "d", Unsigned, Asserted, "d1"),
            row("d", "c", Increase, Asserted, "d5"),
            row("d", "c", Increase, Asserted, "d6"),
            row("d", "c", Increase, Asserted, "d7"),
            row("a", "c", Increase, Asserted, "d9"),
            row("c", "a", Increase, Hedged, "d8"),
            row("c", "a", Increase, Negated, "d9"),
            row("b", "c", Increase, Asserted, "d5"),
        ];
        ClaimGraph::build(rows, &Aliases::default(), &Filter::default())
    }

    #[test]
    fn chains_rank_by_weakest_link_and_multiply_signs() {
        let g = graph();
        let s = WeightSpec::default();
        let (a, c) = (g.index["a"], g.index["c"]);
        let chains = paths(&g, &s, a, c, 3, 0.0, 0);
        // a→b (2) → c (3 decrease + 1 increase = 4 docs): weakest 2, sign + then - = decrease.
        // a→d (1) → c (3): weakest 1, unsigned first link makes the chain unsigned.
        assert_eq!(chains.len(), 2);
        assert_eq!(chains[0].support, 2.0);
        assert_eq!(chains[0].sign, Sign::Decrease);
        assert_eq!(chains[1].support, 1.0);
        assert_eq!(chains[1].sign, Sign::Unsigned);
        assert_eq!(chains[0].hops[0].rows.len(), 2);
        assert!(paths(&g, &s, a, c, 3, 1.5, 0).len() == 1);
        assert!(paths(&g, &s, a, c, 1, 0.0, 0).is_empty());
    }

    #[test]
    fn conflicts_of_each_kind() {
        let g = graph();
        let cs = conflicts(&g, 1);
        let kinds: Vec<(ConflictKind, &str, &str)> = cs
            .iter()
            .map(|c| (c.kind, c.x.as_str(), c.y.as_str()))
            .collect();
        assert!(kinds.contains(&(ConflictKind::OppositeSigns, "b", "c")));
        assert!(kinds.contains(&(ConflictKind::AssertedAndDenied, "c", "a")));
        assert!(kinds.contains(&(ConflictKind::BothDirections, "a", "c")));
        assert_eq!(cs[0].support, 4, "{cs:?}");
        let both = cs
            .iter()
            .find(|c| c.kind == ConflictKind::BothDirections)
            .unwrap();
        assert_eq!((both.sides[0].claims, both.sides[1].claims), (1, 1));
    }

    #[test]
    fn cycles_found_once_above_threshold() {
        let g = graph();
        let s = WeightSpec::default();
        // a→c (1) and c→a (hedged 0.5 in d8, d9 denies: 0.5 - 1 = -0.5) is not a cycle;
        // the lenient rule ignores denials.
        assert!(cycles(&g, &s, 0.1, 4, 0).is_empty());
        let lenient = WeightSpec {
            negated: 0.0,
            ..WeightSpec::default()
        };
        let cy = cycles(&g, &lenient, 0.1, 4, 0);
        assert_eq!(cy.len(), 3, "{cy:?}"); // a→c→a, a→b→c→a, a→d→c→a
        assert!(cy.iter().all(|c| c.hops[0].cause == "a"));
        assert!(cycles(&g, &lenient, 0.1, 2, 0).len() == 1);
    }

    #[test]
    fn matrix_rows_are_causes() {
        let g = graph();
        let keys: Vec<String> = ["a", "b", "c", "zzz"].map(String::from).to_vec();
        let m = matrix(&g, &WeightSpec::default(), &keys, Cell::Documents);
        assert_eq!(m[0][1], 2.0);
        assert_eq!(m[1][0], 0.0);
        assert_eq!(m[1][2], 4.0);
        assert_eq!(m[3], vec![0.0; 4]);
    }
}
