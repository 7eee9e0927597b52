//! What the corpus says to each question: its support profile and the answer it implies, and
//! the "correlation, not causation" view of each pair.

use super::answers::{Asked, Label};
use crate::claim::{Modality, Polarity};
use crate::compare::questions::Family;
use crate::graph::{ClaimGraph, Relation};
use crate::query::{claim_sentences, MentionIndex};
use crate::variables::Aliases;
use petgraph::graph::NodeIndex;
use serde::Serialize;
use std::collections::BTreeSet;

/// What the corpus has to say to the question, and the answer it implies.
#[derive(Debug, Clone, Serialize)]
pub struct Profile {
    #[serde(flatten)]
    pub question: Asked,
    /// Causal claims x → y that state rather than deny it (all but negated).
    pub forward: usize,
    /// The same for y → x.
    pub backward: usize,
    /// Every causal claim x → y, and how many of them are hedged or negated.
    pub forward_claims: usize,
    pub hedged: usize,
    pub negated: usize,
    /// (hedged + negated) / forward_claims; absent without claims.
    pub hedged_or_negated_share: Option<f64>,
    /// Association claims between x and y (either order).
    pub association: usize,
    /// Sentences naming both with no claim between them.
    pub co_mentions: usize,
    /// Non-negated claims x → y of the asked sign (sign family only).
    pub signed: Option<usize>,
    /// The support the implied answer is read from: forward (directed, reversed), forward +
    /// backward (symmetric), signed (sign).
    pub support: usize,
    pub corpus_answer: Label,
    /// Both directions reach the threshold (forward and backward support ≥ threshold).
    pub both_stated: bool,
}

/// The graph and index a comparison reads.
pub struct Corpus<'a> {
    pub graph: &'a ClaimGraph,
    pub aliases: &'a Aliases,
    pub mentions: &'a MentionIndex,
    /// Sentences in the index (for PMI).
    pub sentences: u64,
}

impl Corpus<'_> {
    /// The alias-resolved key of a variable, and its node when the graph has it.
    pub fn node(&self, key: &str) -> (String, Option<NodeIndex>) {
        let k = self.aliases.resolve(key).to_string();
        let n = self.graph.index.get(&k).copied();
        (k, n)
    }

    fn edge(&self, a: Option<NodeIndex>, b: Option<NodeIndex>) -> Option<&Relation> {
        self.graph.edge(a?, b?)
    }
}

fn signed_support(rel: Option<&Relation>, sign: Polarity) -> usize {
    let Some(r) = rel else { return 0 };
    let of = |p: Polarity| {
        r.counts.polarity(p)
            - r.counts
                .by
                .get(&p)
                .and_then(|m| m.get(&Modality::Negated))
                .copied()
                .unwrap_or(0)
    };
    match sign {
        Polarity::Decrease => of(Polarity::Decrease) + of(Polarity::Prevent),
        p => of(p),
    }
}

fn opposite(sign: Polarity) -> Polarity {
    if sign == Polarity::Increase {
        Polarity::Decrease
    } else {
        Polarity::Increase
    }
}

/// The implied answer (documented in docs/compare.md): yes when the family's support reaches
/// `threshold` and, for directed questions, exceeds the support of the competing reading
/// (reverse direction; for sign questions, the opposite sign). Otherwise no: "the corpus does not
/// state it", which is not "the corpus denies it".
pub fn implied(family: Family, support: usize, competing: usize, threshold: usize) -> Label {
    let yes = support >= threshold.max(1) && (family == Family::Symmetric || support > competing);
    if yes {
        Label::Yes
    } else {
        Label::No
    }
}

/// The support profile of every question (the order of `asked` is kept).
pub fn profiles(c: &Corpus, asked: &[Asked], threshold: usize) -> Vec<Profile> {
    asked
        .iter()
        .map(|q| {
            let (xk, xn) = c.node(&q.x_key);
            let (yk, yn) = c.node(&q.y_key);
            let fwd = c.edge(xn, yn);
            let (forward, backward) = (
                fwd.map_or(0, Relation::support),
                c.edge(yn, xn).map_or(0, Relation::support),
            );
            let counts = fwd.map(|r| &r.counts);
            let forward_claims = counts.map_or(0, |c| c.total);
            let hedged = counts.map_or(0, |c| c.modality(Modality::Hedged));
            let negated = counts.map_or(0, |c| c.modality(Modality::Negated));
            let association = match (xn, yn) {
                (Some(a), Some(b)) => c.graph.association(a, b).map_or(0, |r| r.counts.total),
                _ => 0,
            };
            let signed = q.sign.map(|s| signed_support(fwd, s));
            let (support, competing) = match (q.family, q.sign) {
                (Family::Symmetric, _) => (forward + backward, 0),
                (Family::Sign, Some(s)) => (signed.unwrap_or(0), signed_support(fwd, opposite(s))),
                _ => (forward, backward),
            };
            Profile {
                question: q.clone(),
                forward,
                backward,
                forward_claims,
                hedged,
                negated,
                hedged_or_negated_share: (forward_claims > 0)
                    .then(|| (hedged + negated) as f64 / forward_claims as f64),
                association,
                co_mentions: c.mentions.co_mentions(c.graph, (&xk, xn), (&yk, yn)),
                signed,
                support,
                corpus_answer: implied(q.family, support, competing, threshold),
                both_stated: forward >= threshold.max(1) && backward >= threshold.max(1),
            }
        })
        .collect()
}

/// The "correlation, not causation" view of one unordered pair.
#[derive(Debug, Clone, Serialize)]
pub struct PairView {
    pub x: String,
    pub y: String,
    pub sentences_x: usize,
    pub sentences_y: usize,
    pub sentences_both: usize,
    /// log2(N · both / (x · y)), N the sentences in the corpus; absent when both is 0.
    pub pmi: Option<f64>,
    /// Sentences with a causal claim between x and y (either direction, any modality).
    pub causal_sentences: usize,
    /// Sentences with only an association claim between them.
    pub association_sentences: usize,
    pub co_mentions: usize,
    /// causal / (causal + association + co-mentions).
    pub causal_rate: Option<f64>,
}

/// The "correlation, not causation" view of every unordered pair among the questions.
pub fn pair_views(c: &Corpus, asked: &[Asked]) -> Vec<PairView> {
    let mut seen: BTreeSet<(&str, &str)> = BTreeSet::new();
    let mut out = Vec::new();
    for q in asked {
        let (a, b) = if q.x_key < q.y_key {
            (&q.x_key, &q.y_key)
        } else {
            (&q.y_key, &q.x_key)
        };
        if !seen.insert((a, b)) {
            continue;
        }
        let (xk, xn) = c.node(&q.x_key);
        let (yk, yn) = c.node(&q.y_key);
        let both = c.mentions.both(&xk, &yk).len();
        let (causal, association) = match (xn, yn) {
            (Some(x), Some(y)) => claim_sentences(c.graph, x, y),
            _ => (0, 0),
        };
        let co_mentions = c.mentions.co_mentions(c.graph, (&xk, xn), (&yk, yn));
        let (sx, sy) = (c.mentions.count(&xk), c.mentions.count(&yk));
        let pmi = (both > 0 && c.sentences > 0)
            .then(|| ((c.sentences as f64 * both as f64) / (sx as f64 * sy as f64)).log2());
        let total = causal + association + co_mentions;
        out.push(PairView {
            x: q.x.clone(),
            y: q.y.clone(),
            sentences_x: sx,
            sentences_y: sy,
            sentences_both: both,
            pmi,
            causal_sentences: causal,
            association_sentences: association,
            co_mentions,
            causal_rate: (total > 0).then(|| causal as f64 / total as f64),
        });
    }
    out
}
