//! Conflicts ranked from the aggregate tables, so that only the rows of the conflicts a command
//! prints are read.
//!
//! [`crate::graph::conflicts`] ranks by the claims on both sides, then by how even the split
//! is, then by the keys and the kind: all of it counts of claims by polarity and modality,
//! which the tables hold. Only a side's distinct documents and its evidence need rows. So the
//! ranking is done here from counts, the first N are kept, and the caller reads the rows of
//! their relations and runs the graph's analysis on those alone ([`ConflictRank::keeps`]).

use super::aggregate::Aggregated;
use crate::claim::{Kind, Modality, Polarity};
use crate::graph::{Conflict, ConflictKind};
use crate::store::Grid;
use std::collections::{HashMap, HashSet};

/// One conflict as the counts rank it.
#[derive(Debug, Clone, PartialEq)]
pub struct RankedConflict {
    pub kind: ConflictKind,
    /// As [`Conflict::x`] and [`Conflict::y`].
    pub x: String,
    pub y: String,
    pub support: usize,
    pub balance: f64,
}

/// The conflicts chosen from the counts: the causal relations whose rows they need, and which
/// conflicts of a graph built from those rows are among them.
#[derive(Debug, Default)]
pub struct ConflictRank {
    pub chosen: Vec<RankedConflict>,
    ids: HashSet<(ConflictKind, String, String)>,
}

/// Claims by polarity and modality of a grid, as the conflict sides count them: stated
/// (neither denied nor asked) with an increase, with a decrease or prevention, with any sign,
/// and denied (negated, or "no effect").
fn sides(g: &Grid) -> (usize, usize, usize, usize) {
    let (mut inc, mut dec, mut stated, mut denied) = (0, 0, 0, 0);
    for (pi, p) in Polarity::ALL.iter().enumerate() {
        for (mi, m) in Modality::ALL.iter().enumerate() {
            let n = g[pi][mi] as usize;
            if *m == Modality::Negated || *p == Polarity::None {
                denied += n;
            } else if *m != Modality::Question {
                stated += n;
                match p {
                    Polarity::Increase => inc += n,
                    Polarity::Decrease | Polarity::Prevent => dec += n,
                    _ => {}
                }
            }
        }
    }
    (inc, dec, stated, denied)
}

/// Every conflict of the whole graph with at least `min_claims` claims a side, in the order of
/// [`crate::graph::conflicts`], the first `limit` of them (0: all).
pub fn ranked_conflicts(agg: &Aggregated, min_claims: usize, limit: usize) -> ConflictRank {
    let min = min_claims.max(1);
    let mut out = Vec::new();
    let mut push = |kind, x: &str, y: &str, s1: usize, s2: usize| {
        if s1 < min || s2 < min {
            return;
        }
        let (lo, hi) = (s1.min(s2), s1.max(s2));
        out.push(RankedConflict {
            kind,
            x: x.to_string(),
            y: y.to_string(),
            support: s1 + s2,
            balance: lo as f64 / hi as f64,
        });
    };
    let mut stated_of: HashMap<(&str, &str), usize> = HashMap::new();
    for r in agg.relations.iter().filter(|r| r.kind == Kind::Causal) {
        let (inc, dec, stated, denied) = sides(&r.grid);
        push(ConflictKind::OppositeSigns, &r.a, &r.b, inc, dec);
        push(ConflictKind::AssertedAndDenied, &r.a, &r.b, stated, denied);
        stated_of.insert((r.a.as_str(), r.b.as_str()), stated);
    }
    for (&(a, b), &s) in &stated_of {
        if a < b {
            if let Some(&t) = stated_of.get(&(b, a)) {
                push(ConflictKind::BothDirections, a, b, s, t);
            }
        }
    }
    out.sort_by(|x, y| {
        y.support
            .cmp(&x.support)
            .then(y.balance.total_cmp(&x.balance))
            .then_with(|| (&x.x, &x.y, x.kind).cmp(&(&y.x, &y.y, y.kind)))
    });
    if limit > 0 {
        out.truncate(limit);
    }
    let ids = out
        .iter()
        .map(|c| (c.kind, c.x.clone(), c.y.clone()))
        .collect();
    ConflictRank { chosen: out, ids }
}

impl ConflictRank {
    /// The causal relations (cause, effect) whose rows the chosen conflicts need: both
    /// directions of a both-directions conflict.
    pub fn relations(&self) -> HashSet<(String, String)> {
        let mut out = HashSet::new();
        for c in &self.chosen {
            out.insert((c.x.clone(), c.y.clone()));
            if c.kind == ConflictKind::BothDirections {
                out.insert((c.y.clone(), c.x.clone()));
            }
        }
        out
    }

    /// Whether a conflict of a graph holding the chosen relations is one of those chosen (a
    /// relation read for one conflict may make another that ranks lower).
    pub fn keeps(&self, c: &Conflict) -> bool {
        self.ids.contains(&(c.kind, c.x.clone(), c.y.clone()))
    }
}
