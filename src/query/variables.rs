//! The variables of a store as a researcher reviews them: each with its surface forms, head and
//! qualifiers and abbreviations, the merges that look likely, and the nearest variables to a
//! name that is none.
//!
//! Everything but the abbreviations is computed from the loaded graph when asked: surface forms
//! from the claim rows, heads by [`crate::variables::heads`], merges by
//! [`crate::variables::merge`]. Abbreviation definitions are those the scan found in every
//! sentence of every document ([`crate::variables::abbrev`]) and stored
//! ([`crate::store::Vocabulary`]).

use super::load::Loaded;
use crate::error::StoreError;
use crate::variables::abbrev::{AbbreviationUse, Abbreviations};
use crate::variables::heads;
use crate::variables::merge::{self, MergeReason, MergeSuggestion, VariableInfo};
use petgraph::Direction;
use serde::Serialize;
use std::collections::{BTreeMap, HashMap, HashSet};

/// One variable, as `hearsay variables` lists it.
#[derive(Debug, Clone, Serialize)]
pub struct VariableRow {
    /// The readable id the graph exports use.
    pub id: String,
    pub label: String,
    pub key: String,
    /// Claims naming the variable.
    pub mentions: usize,
    pub documents: usize,
    /// Distinct causal neighbours (causes and effects).
    pub degree: usize,
    pub head: String,
    pub qualifiers: Vec<String>,
    /// Surface forms with the number of claims that use each, most used first.
    pub forms: Vec<(String, usize)>,
    /// Abbreviations the corpus defines for this variable ("SOC"), or, for a short form, its
    /// long form ("= soil organic carbon"). Ambiguous short forms are marked "?".
    pub abbreviations: Vec<String>,
}

/// How to order the variable list.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SortBy {
    Mentions,
    Documents,
    Degree,
}

/// A variable close to a name that is none, with its counts.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Nearby {
    pub label: String,
    pub key: String,
    pub mentions: usize,
    pub documents: usize,
}

impl Loaded {
    /// Surface forms per variable key (alias-resolved), with their claim counts. Forms that
    /// differ only in case count as one, shown in their most frequent casing.
    pub fn surface_forms(&self) -> HashMap<String, Vec<(String, usize)>> {
        // key → lower-cased form → casing → count
        let mut forms: HashMap<String, BTreeMap<String, BTreeMap<String, usize>>> = HashMap::new();
        for r in &self.graph.rows {
            for (key, text) in [(&r.cause, &r.cause_text), (&r.effect, &r.effect_text)] {
                let key = self.aliases.resolve(key).to_string();
                *forms
                    .entry(key)
                    .or_default()
                    .entry(text.to_lowercase())
                    .or_default()
                    .entry(text.clone())
                    .or_default() += 1;
            }
        }
        forms
            .into_iter()
            .map(|(key, by_lower)| {
                let mut list: Vec<(String, usize)> = by_lower
                    .into_values()
                    .map(|casings| {
                        let total = casings.values().sum();
                        let shown = casings
                            .iter()
                            .max_by(|a, b| a.1.cmp(b.1).then_with(|| b.0.cmp(a.0)))
                            .map(|(s, _)| s.clone())
                            .unwrap_or_default();
                        (shown, total)
                    })
                    .collect();
                list.sort_by(|a, b| b.1.cmp(&a.1).then_with(|| a.0.cmp(&b.0)));
                (key, list)
            })
            .collect()
    }

    /// The abbreviation definitions the scan stored for the corpus's documents, pooled per
    /// corpus, long forms through the aliases in force.
    pub fn abbreviations(&self) -> Result<Abbreviations, StoreError> {
        Ok(self
            .store
            .vocabulary()?
            .abbreviations(|k| self.aliases.resolve(k).to_string()))
    }

    /// Every variable of the graph, with its forms, head, qualifiers and abbreviations; those
    /// whose label, key or a surface form contains `filter` (case-insensitive) when given;
    /// sorted by `sort` (most first), then by label.
    pub fn variable_rows(
        &self,
        abbreviations: &Abbreviations,
        filter: Option<&str>,
        sort: SortBy,
    ) -> Vec<VariableRow> {
        let g = &self.graph;
        let slugs = crate::graph::export::node_slugs(g);
        let forms = self.surface_forms();
        let abbr = self.abbreviation_notes(abbreviations);
        let needle = filter.map(str::to_lowercase);
        let mut rows: Vec<VariableRow> = Vec::new();
        for n in g.graph.node_indices() {
            let v = &g.graph[n];
            let f: Vec<(String, usize)> = forms.get(&v.key).cloned().unwrap_or_default();
            if let Some(needle) = &needle {
                let hit = v.label.to_lowercase().contains(needle)
                    || v.key.contains(needle.as_str())
                    || f.iter().any(|(s, _)| s.to_lowercase().contains(needle));
                if !hit {
                    continue;
                }
            }
            let mut neighbours: HashSet<_> =
                g.graph.neighbors_directed(n, Direction::Outgoing).collect();
            neighbours.extend(g.graph.neighbors_directed(n, Direction::Incoming));
            neighbours.remove(&n);
            let split = heads::split(&v.label);
            rows.push(VariableRow {
                id: slugs[n.index()].clone(),
                label: v.label.clone(),
                key: v.key.clone(),
                mentions: v.mentions,
                documents: v.docs,
                degree: neighbours.len(),
                head: split.head,
                qualifiers: split.qualifiers,
                forms: f,
                abbreviations: abbr.get(&v.key).cloned().unwrap_or_default(),
            });
        }
        let by = |r: &VariableRow| match sort {
            SortBy::Mentions => r.mentions,
            SortBy::Documents => r.documents,
            SortBy::Degree => r.degree,
        };
        rows.sort_by(|a, b| {
            by(b)
                .cmp(&by(a))
                .then_with(|| a.label.cmp(&b.label))
                .then_with(|| a.key.cmp(&b.key))
        });
        rows
    }

    /// Key → notes on abbreviations ("SOC" on the long form's variable, "= soil organic
    /// carbon" on the short form's; "?" marks a short form defined several ways).
    fn abbreviation_notes(&self, abbreviations: &Abbreviations) -> HashMap<String, Vec<String>> {
        let mut notes: HashMap<String, Vec<String>> = HashMap::new();
        let key = |s: &str| self.aliases.resolve(&self.normalizer.key(s)).to_string();
        for u in abbreviations.uses() {
            let mark = if u.is_unambiguous() { "" } else { "?" };
            for (long, _) in &u.longs {
                let (lk, sk) = (key(long), key(&u.short));
                if self.graph.index.contains_key(&lk) {
                    notes
                        .entry(lk)
                        .or_default()
                        .push(format!("{}{mark}", u.short));
                }
                if self.graph.index.contains_key(&sk) {
                    notes.entry(sk).or_default().push(format!("= {long}{mark}"));
                }
            }
        }
        for v in notes.values_mut() {
            v.sort();
            v.dedup();
        }
        notes
    }

    /// Merge suggestions over every variable of the graph ([`merge::suggest`]).
    pub fn merge_suggestions(&self, abbreviations: &Abbreviations) -> Vec<MergeSuggestion> {
        let vars: Vec<VariableInfo> = self
            .graph
            .graph
            .node_weights()
            .map(|v| VariableInfo {
                key: v.key.clone(),
                label: v.label.clone(),
                claims: v.mentions,
            })
            .collect();
        merge::suggest(&vars, abbreviations, &self.normalizer)
    }

    /// The variables nearest to a name that is none, at most `n`: those spelt within a few
    /// edits of it first, then those containing all its words, then those sharing most of its
    /// words; more claims first within each.
    pub fn nearest_variables(&self, name: &str, n: usize) -> Vec<Nearby> {
        let (m, _) = self.lookup(name);
        let words: HashSet<&str> = m.key.split(' ').filter(|w| !w.is_empty()).collect();
        let by_label: HashMap<&str, petgraph::graph::NodeIndex> = self
            .graph
            .graph
            .node_indices()
            .map(|i| (self.graph.graph[i].label.as_str(), i))
            .collect();
        let mut picked: Vec<petgraph::graph::NodeIndex> = Vec::new();
        let push = |i: petgraph::graph::NodeIndex, picked: &mut Vec<_>| {
            if !picked.contains(&i) {
                picked.push(i);
            }
        };
        let mentions =
            |i: &petgraph::graph::NodeIndex| std::cmp::Reverse(self.graph.graph[*i].mentions);
        let mut near: Vec<_> = self
            .near_spellings(&m.key)
            .iter()
            .filter_map(|l| by_label.get(l.as_str()).copied())
            .collect();
        near.sort_by_key(mentions);
        let mut containing: Vec<_> = m
            .suggestions
            .iter()
            .filter_map(|l| by_label.get(l.as_str()).copied())
            .collect();
        containing.sort_by_key(mentions);
        let mut sharing: Vec<(
            std::cmp::Reverse<u64>,
            std::cmp::Reverse<usize>,
            petgraph::graph::NodeIndex,
        )> = Vec::new();
        if !words.is_empty() {
            for i in self.graph.graph.node_indices() {
                let v = &self.graph.graph[i];
                let kw: HashSet<&str> = v.key.split(' ').collect();
                let shared = kw.intersection(&words).count();
                if shared > 0 {
                    let jaccard = shared as f64 / kw.union(&words).count() as f64;
                    // Ordered by overlap in thousandths, so the sort key is an integer.
                    sharing.push((
                        std::cmp::Reverse((jaccard * 1000.0) as u64),
                        std::cmp::Reverse(v.mentions),
                        i,
                    ));
                }
            }
            sharing.sort();
        }
        for i in near
            .into_iter()
            .chain(containing)
            .chain(sharing.into_iter().map(|s| s.2))
        {
            push(i, &mut picked);
        }
        picked
            .into_iter()
            .take(n)
            .map(|i| {
                let v = &self.graph.graph[i];
                Nearby {
                    label: v.label.clone(),
                    key: v.key.clone(),
                    mentions: v.mentions,
                    documents: v.docs,
                }
            })
            .collect()
    }
}

/// An alias file for `--aliases` from merge suggestions: one `surface form<TAB>variable name`
/// line a merge, under a comment giving its reason and evidence. Merges by abbreviation,
/// spelling, hyphen and plural are written as lines in force; merges by head and near
/// duplicates lose information (a qualifier, a word), so they are written commented out, for
/// the user to accept by removing the `# `.
pub fn alias_file(suggestions: &[MergeSuggestion]) -> String {
    let mut out = String::from(
        "# Aliases suggested by `hearsay variables --write-aliases`: surface form<TAB>variable name.\n\
         # Delete the lines you do not accept; uncomment (remove \"# \") the ones you do.\n\
         # Pass the file back with --aliases FILE. Suggestions come from the text, not from a\n\
         # reviewer: check each before use.\n",
    );
    for s in suggestions {
        let clean = |t: &str| t.replace(['\t', '\n', '\r'], " ");
        let active = matches!(
            s.reason,
            MergeReason::Abbreviation
                | MergeReason::Spelling
                | MergeReason::Hyphen
                | MergeReason::Plural
        );
        let unit = if s.reason == MergeReason::Abbreviation {
            "defining documents"
        } else {
            "claims"
        };
        out.push_str(&format!(
            "\n# {}: {} {unit}\n",
            s.reason.as_str(),
            s.evidence
        ));
        out.push_str(&format!(
            "{}{}\t{}\n",
            if active { "" } else { "# " },
            clean(&s.from_label),
            clean(&s.into_label)
        ));
    }
    out
}

/// The corpus's short forms with their long forms, for listing; ambiguous ones included.
pub fn abbreviation_list(abbreviations: &Abbreviations) -> Vec<AbbreviationUse> {
    abbreviations.uses().collect()
}
