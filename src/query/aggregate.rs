//! Whole-graph counts from the store's aggregate tables instead of its rows: per variable and per
//! relation, under the aliases in force.
//!
//! Each segment's aggregates are keyed by raw keys. A raw key that is the only key of its
//! variable (no other stored key resolves to the same variable) is renamed and its counts
//! summed across segments: distinct documents add up because a document lives in one segment.
//! Where aliases merge two or more stored keys into one variable, distinct documents and
//! sentences of the merged variable are not sums, so the rows naming those keys are read through
//! the postings and aggregated here; every relation touching such a variable comes from those
//! rows, every other one from the tables. The answer is the one [`crate::graph::ClaimGraph`]
//! gives from every row with no filter.

use crate::claim::{Kind, Modality, Polarity};
use crate::error::StoreError;
use crate::graph::WeightSpec;
use crate::graph::{ClaimGraph, Counts, Relation, Totals, Variable};
use crate::store::{weight_class, Aggregator, Grid, Profile, RelationAggregate, Store, TableScope};
use crate::variables::Aliases;
use rustc_hash::{FxHashMap, FxHashSet};
use std::collections::BTreeMap;

/// One variable's counts.
#[derive(Debug, Clone, Default)]
pub struct AggVariable {
    pub key: String,
    /// Its most frequent surface form (lower-cased; the smaller form on a tie), as the claim
    /// graph labels it.
    pub label: String,
    pub mentions: u64,
    pub docs: u64,
    /// Ordinal of its first claim in corpus order, and whether that claim names it as effect.
    pub first: u64,
    pub first_as_effect: bool,
}

/// One relation's counts: a causal edge `a` → `b`, or an association between `a` and `b`
/// (smaller key first).
#[derive(Debug, Clone)]
pub struct AggRelation {
    pub kind: Kind,
    pub a: String,
    pub b: String,
    /// Claims by polarity × modality (`store::Grid`), and their sum; [`AggRelation::counts`]
    /// gives them as the graph's `Counts`.
    pub grid: Grid,
    pub total: usize,
    pub docs: usize,
    pub sentences: usize,
    /// Units by weight profile (see `store::RelationAggregate`), sorted by profile.
    pub doc_profiles: Vec<(Profile, u32)>,
    pub sentence_profiles: Vec<(Profile, u32)>,
    /// Claims by weight class.
    pub classes: [u64; 5],
    /// The first claim in corpus order: its ordinal, document, line, and the variable it names
    /// as cause.
    pub first: u64,
    pub first_doc: String,
    pub first_line: u32,
    pub first_cause: String,
}

/// Every variable and relation of a store, from its aggregates.
#[derive(Debug, Default)]
pub struct Aggregated {
    pub vars: FxHashMap<String, AggVariable>,
    pub relations: Vec<AggRelation>,
    /// Claims by cue id.
    pub cues: BTreeMap<String, u64>,
    /// Rows read because aliases merge stored keys (0 when none do).
    pub rows_read: usize,
}

impl Aggregated {
    pub fn label(&self, key: &str) -> String {
        self.vars
            .get(key)
            .map(|v| v.label.clone())
            .unwrap_or_default()
    }
}

impl AggRelation {
    /// The relation's weight under `spec` ([`WeightSpec::weight`] on its rows).
    pub fn weight(&self, spec: &WeightSpec) -> f64 {
        spec.weight_of_profiles(&self.doc_profiles, &self.sentence_profiles, self.classes)
    }
}

impl AggRelation {
    pub fn counts(&self) -> Counts {
        counts_of(&self.grid)
    }

    fn totals(&self) -> Totals {
        Totals {
            docs: self.docs,
            sentences: self.sentences,
            doc_profiles: self.doc_profiles.clone(),
            sentence_profiles: self.sentence_profiles.clone(),
            classes: self.classes,
        }
    }
}

/// The claim graph of the aggregates: the nodes, edges and associations (with their counts,
/// documents, sentences and weights) of [`ClaimGraph::build`] on every row with no filter, in
/// the same node order (first claim in corpus order, its cause before its effect), but without
/// rows: each relation's [`Relation::totals`] stands in for them.
pub fn graph_from_aggregates(agg: &Aggregated) -> ClaimGraph {
    let mut g = ClaimGraph::default();
    let mut vars: Vec<&AggVariable> = agg.vars.values().collect();
    vars.sort_by_key(|v| (v.first, v.first_as_effect));
    for v in vars {
        let n = g.graph.add_node(Variable {
            key: v.key.clone(),
            label: v.label.clone(),
            mentions: v.mentions as usize,
            docs: v.docs as usize,
        });
        g.index.insert(v.key.clone(), n);
    }
    let mut edges = Vec::new();
    for r in &agg.relations {
        let (Some(&a), Some(&b)) = (g.index.get(&r.a), g.index.get(&r.b)) else {
            continue;
        };
        let rel = Relation {
            counts: r.counts(),
            totals: Some(Box::new(r.totals())),
            ..Relation::default()
        };
        match r.kind {
            Kind::Causal => edges.push(((a, b), rel)),
            Kind::Association => {
                g.associations.insert((a.min(b), a.max(b)), rel);
            }
        }
    }
    edges.sort_by_key(|(ab, _)| *ab);
    for ((a, b), rel) in edges {
        g.graph.add_edge(a, b, rel);
    }
    g
}

/// Sum two sorted profile histograms.
fn add_profiles(into: &mut Vec<(Profile, u32)>, more: &[(Profile, u32)]) {
    let mut m: BTreeMap<Profile, u32> = into.drain(..).collect();
    for (p, n) in more {
        *m.entry(*p).or_default() += n;
    }
    *into = m.into_iter().collect();
}

fn classes_of(g: &Grid) -> [u64; 5] {
    let mut c = [0u64; 5];
    for (pi, p) in Polarity::ALL.iter().enumerate() {
        for (mi, m) in Modality::ALL.iter().enumerate() {
            c[weight_class(*p, *m)] += g[pi][mi] as u64;
        }
    }
    c
}

/// The row number in a stored ordinal (its file's place above it).
const ROW: u64 = 0xffff_ffff;

fn scope_name(scope: TableScope) -> String {
    match scope {
        TableScope::Segment(seg) => format!("segment {seg}"),
        TableScope::Store => "the store's summed table".to_string(),
    }
}

fn counts_of(g: &Grid) -> Counts {
    let mut c = Counts::default();
    for (pi, p) in Polarity::ALL.iter().enumerate() {
        for (mi, m) in Modality::ALL.iter().enumerate() {
            let n = g[pi][mi] as usize;
            if n > 0 {
                *c.by.entry(*p).or_default().entry(*m).or_default() += n;
                c.total += n;
            }
        }
    }
    c
}

/// Relations summed under their variables (`a`, `b`: variable keys borrowed from the tables).
#[derive(Default)]
struct Acc<'a> {
    index: FxHashMap<(Kind, &'a str, &'a str), usize>,
    rels: Vec<AggRelation>,
}

impl<'a> Acc<'a> {
    /// Add one relation aggregate whose ends are the variables `a` and `b` (`first_cause`: the
    /// variable its first claim names as cause; `first`: that claim's ordinal).
    fn add(
        &mut self,
        kind: Kind,
        a: &'a str,
        b: &'a str,
        r: &RelationAggregate,
        first: u64,
        first_cause: &str,
    ) {
        let (a, b) = match kind {
            Kind::Association if b < a => (b, a),
            _ => (a, b),
        };
        let total: usize = r.counts.iter().flatten().map(|&n| n as usize).sum();
        match self.index.get(&(kind, a, b)) {
            Some(&i) => {
                let x = &mut self.rels[i];
                for (row, more) in x.grid.iter_mut().zip(&r.counts) {
                    for (n, m) in row.iter_mut().zip(more) {
                        *n += m;
                    }
                }
                x.total += total;
                for (c, n) in x.classes.iter_mut().zip(classes_of(&r.counts)) {
                    *c += n;
                }
                add_profiles(&mut x.doc_profiles, &r.doc_profiles);
                add_profiles(&mut x.sentence_profiles, &r.sentence_profiles);
                x.docs += r.docs as usize;
                x.sentences += r.sentences as usize;
                if first < x.first {
                    x.first = first;
                    x.first_doc = r.first_doc.clone();
                    x.first_line = r.first_line;
                    x.first_cause = first_cause.to_string();
                }
            }
            None => {
                self.index.insert((kind, a, b), self.rels.len());
                self.rels.push(AggRelation {
                    kind,
                    a: a.to_string(),
                    b: b.to_string(),
                    grid: r.counts,
                    total,
                    classes: classes_of(&r.counts),
                    doc_profiles: r.doc_profiles.clone(),
                    sentence_profiles: r.sentence_profiles.clone(),
                    docs: r.docs as usize,
                    sentences: r.sentences as usize,
                    first,
                    first_doc: r.first_doc.clone(),
                    first_line: r.first_line,
                    first_cause: first_cause.to_string(),
                });
            }
        }
    }
}

/// A variable being summed: its tables' surface forms are kept by reference until the end.
struct VarAcc<'a> {
    forms: Vec<&'a [(String, u32)]>,
    mentions: u64,
    docs: u64,
    first: u64,
    first_as_effect: bool,
}

fn add_var<'a>(
    vars: &mut FxHashMap<&'a str, VarAcc<'a>>,
    key: &'a str,
    k: &'a crate::store::KeyAggregate,
    first: u64,
) {
    let v = vars.entry(key).or_insert_with(|| VarAcc {
        forms: Vec::new(),
        mentions: 0,
        docs: 0,
        first,
        first_as_effect: k.first_as_effect,
    });
    v.forms.push(&k.forms);
    v.mentions += k.mentions;
    v.docs += k.docs;
    if first < v.first {
        v.first = first;
        v.first_as_effect = k.first_as_effect;
    }
}

/// The most frequent surface form (the smaller form on a tie), as the claim graph labels a
/// variable.
pub(super) fn label_of(forms: &[&[(String, u32)]]) -> String {
    let best = |it: &mut dyn Iterator<Item = (&str, u64)>| {
        it.fold(None::<(&str, u64)>, |best, (f, n)| match best {
            Some((bf, bn)) if bn > n || (bn == n && bf <= f) => Some((bf, bn)),
            _ => Some((f, n)),
        })
        .map(|(f, _)| f.to_string())
        .unwrap_or_default()
    };
    match forms {
        [one] => best(&mut one.iter().map(|(f, n)| (f.as_str(), *n as u64))),
        _ => {
            let mut m: FxHashMap<&str, u64> = FxHashMap::default();
            for list in forms {
                for (f, n) in list.iter() {
                    *m.entry(f.as_str()).or_default() += *n as u64;
                }
            }
            best(&mut m.into_iter())
        }
    }
}

/// Every variable and relation of the store under `aliases`, from its aggregates (and the rows
/// of keys the aliases merge).
pub fn aggregate(store: &Store, aliases: &Aliases) -> Result<Aggregated, StoreError> {
    let segs = store.aggregates()?;
    let ordinal = store.ordinals();
    let mismatch = |scope: TableScope, row: u64| StoreError::Corrupt {
        path: store.dir.clone(),
        message: format!(
            "the aggregates of {} name row {}, which no file of the manifest owns",
            scope_name(scope),
            row & ROW
        ),
    };
    // How many stored keys each variable has.
    let mut raw: FxHashSet<&str> = FxHashSet::default();
    for (_, s) in &segs {
        raw.extend(s.keys.iter().map(|k| k.key.as_str()));
    }
    let mut class: FxHashMap<&str, u32> = FxHashMap::default();
    for k in &raw {
        *class.entry(aliases.resolve(k)).or_default() += 1;
    }
    let merged: FxHashSet<&str> = class
        .iter()
        .filter(|(_, n)| **n > 1)
        .map(|(k, _)| *k)
        .collect();

    let mut out = Aggregated::default();
    for (_, s) in &segs {
        for (cue, n) in &s.cues {
            *out.cues.entry(cue.clone()).or_default() += n;
        }
    }
    // The variables the aliases merge from several stored keys: counted from their rows.
    let mut part = None;
    if !merged.is_empty() {
        let postings = store.postings()?;
        let rows = store.rows_naming_at(&postings, |k| merged.contains(aliases.resolve(k)))?;
        out.rows_read = rows.len();
        let mut agg = Aggregator::default();
        for (ord, r) in &rows {
            let (c, e) = (aliases.resolve(&r.cause), aliases.resolve(&r.effect));
            if c == e && r.cause != r.effect {
                // Counted under its cue in the tables, but the graph leaves it out.
                if let Some(n) = out.cues.get_mut(&r.cue) {
                    *n = n.saturating_sub(1);
                }
            }
            agg.add(r, c, e, *ord);
        }
        out.cues.retain(|_, n| *n > 0);
        part = Some(agg.finish());
    }

    let mut vars: FxHashMap<&str, VarAcc> = FxHashMap::default();
    let mut acc = Acc::default();
    let relations: usize = segs
        .iter()
        .map(|(_, s)| s.edges.len() + s.pairs.len())
        .sum();
    acc.rels.reserve(relations);
    acc.index.reserve(relations);
    vars.reserve(raw.len());
    for (seg, s) in &segs {
        let res: Vec<&str> = s.keys.iter().map(|k| aliases.resolve(&k.key)).collect();
        for (k, r) in s.keys.iter().zip(&res) {
            if !merged.contains(r) {
                let first = ordinal(*seg, k.first).ok_or_else(|| mismatch(*seg, k.first))?;
                add_var(&mut vars, r, k, first);
            }
        }
        for (kind, list) in [(Kind::Causal, &s.edges), (Kind::Association, &s.pairs)] {
            for e in list {
                let (Some(&ra), Some(&rb)) = (res.get(e.a as usize), res.get(e.b as usize)) else {
                    return Err(StoreError::Corrupt {
                        path: store.dir.clone(),
                        message: format!(
                            "the aggregates of {} name a key they lack",
                            scope_name(*seg)
                        ),
                    });
                };
                if merged.contains(ra) || merged.contains(rb) || ra == rb {
                    continue;
                }
                let first = ordinal(*seg, e.first).ok_or_else(|| mismatch(*seg, e.first))?;
                let cause = if e.forward { ra } else { rb };
                acc.add(kind, ra, rb, e, first, cause);
            }
        }
    }
    if let Some(s) = &part {
        for k in &s.keys {
            if merged.contains(k.key.as_str()) {
                add_var(&mut vars, &k.key, k, k.first);
            }
        }
        for (kind, list) in [(Kind::Causal, &s.edges), (Kind::Association, &s.pairs)] {
            for e in list {
                let (a, b) = (&s.keys[e.a as usize].key, &s.keys[e.b as usize].key);
                let cause = if e.forward { a } else { b };
                acc.add(kind, a, b, e, e.first, cause);
            }
        }
    }
    out.vars = vars
        .into_iter()
        .map(|(key, v)| {
            (
                key.to_string(),
                AggVariable {
                    key: key.to_string(),
                    label: label_of(&v.forms),
                    mentions: v.mentions,
                    docs: v.docs,
                    first: v.first,
                    first_as_effect: v.first_as_effect,
                },
            )
        })
        .collect();
    out.relations = acc.rels;
    Ok(out)
}
