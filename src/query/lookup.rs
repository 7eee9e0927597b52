//! Names the user types, matched to the graph's variables through the same normalisation and
//! aliases as the claims.

use super::load::Loaded;
use crate::error::InputError;
use crate::graph::ClaimGraph;
use crate::variables::{Aliases, Normalizer};
use petgraph::graph::NodeIndex;
use serde::Serialize;
use std::path::Path;

/// How a queried name was matched to a variable.
#[derive(Debug, Clone, Serialize)]
pub struct VarMatch {
    pub query: String,
    pub key: String,
    pub label: Option<String>,
    pub known: bool,
    /// Known variables whose key contains every word of the query, when it has no exact match.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub suggestions: Vec<String>,
}

/// A name as [`lookup`] matched it, with its node when the graph has the variable.
pub type Looked = (VarMatch, Option<NodeIndex>);

/// Find a variable by a name the user typed.
pub fn lookup(g: &ClaimGraph, normalizer: &Normalizer, aliases: &Aliases, query: &str) -> Looked {
    let key = aliases.query_key(normalizer, query);
    let node = g.index.get(&key).copied();
    let mut suggestions = Vec::new();
    if node.is_none() && !key.is_empty() {
        let words: Vec<&str> = key.split(' ').collect();
        let mut cands: Vec<(usize, &str)> = g
            .graph
            .node_weights()
            .filter(|v| {
                let kw: Vec<&str> = v.key.split(' ').collect();
                words.iter().all(|w| kw.contains(w))
            })
            .map(|v| (v.mentions, v.label.as_str()))
            .collect();
        cands.sort_by(|a, b| b.0.cmp(&a.0).then(a.1.cmp(b.1)));
        suggestions = cands.into_iter().take(5).map(|c| c.1.to_string()).collect();
    }
    let label = node.map(|n| g.graph[n].label.clone());
    (
        VarMatch {
            query: query.to_string(),
            key,
            label,
            known: node.is_some(),
            suggestions,
        },
        node,
    )
}

impl Loaded {
    /// Find a variable by a name the user typed, in this graph.
    pub fn lookup(&self, query: &str) -> Looked {
        lookup(&self.graph, &self.normalizer, &self.aliases, query)
    }

    /// Labels of the variables whose key is closest to `key` in edit distance, if within one
    /// edit in five characters (at least one): at most five, nearest first, then by name. For a
    /// miss that shares no word with any variable ("fish stoks" → "fish stocks").
    pub fn near_spellings(&self, key: &str) -> Vec<String> {
        let limit = (key.chars().count() / 5).max(1);
        let mut near: Vec<(usize, &str)> = self
            .graph
            .graph
            .node_weights()
            .map(|v| (edit_distance(key, &v.key), v.label.as_str()))
            .filter(|&(d, _)| d <= limit)
            .collect();
        near.sort();
        near.into_iter()
            .take(5)
            .map(|(_, l)| l.to_string())
            .collect()
    }

    /// The variables of a variable list (`text`, read from `path`: one name a line, `#`
    /// comments and blank lines skipped) as (name, key), keys through the aliases, each key
    /// once. A name without content words is an error; an empty list is not (the caller
    /// decides what an empty list means).
    pub fn variable_list(
        &self,
        path: &Path,
        text: &str,
    ) -> Result<Vec<(String, String)>, InputError> {
        let mut out: Vec<(String, String)> = Vec::new();
        for (i, l) in text.lines().enumerate() {
            let l = l.trim();
            if l.is_empty() || l.starts_with('#') {
                continue;
            }
            let key = self.aliases.resolve(&self.normalizer.key(l)).to_string();
            if key.is_empty() {
                return Err(InputError::invalid(
                    path,
                    i + 1,
                    format!("'{l}' has no content words, so it names no variable"),
                ));
            }
            if !out.iter().any(|(_, k)| *k == key) {
                out.push((l.to_string(), key));
            }
        }
        Ok(out)
    }
}

/// Levenshtein distance over characters.
fn edit_distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1; b.len() + 1];
        for (j, &cb) in b.iter().enumerate() {
            cur[j + 1] = (prev[j] + usize::from(ca != cb))
                .min(prev[j + 1] + 1)
                .min(cur[j] + 1);
        }
        prev = cur;
    }
    prev[b.len()]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edit_distance_counts_single_edits() {
        assert_eq!(edit_distance("fish stok", "fish stock"), 1);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("alga bloom", "alga bloom"), 0);
    }
}
