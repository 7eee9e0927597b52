//! Scoring the claim graph against a reference diagram (a DAG the user trusts).
//!
//! The reference is an edge list (CSV, `cause,effect` per row, an optional header) or a
//! Graphviz DOT file (node `label`s are used as names when given). Its names go through the same
//! normalisation and aliases as the claims. Only claim edges between reference variables are
//! scored.
//!
//! At a threshold `t`, the predicted graph has every claim edge of weight ≥ `t` (and > 0). A pair
//! is in the predicted *skeleton* when either direction is predicted; its predicted orientation
//! is the heavier direction, and none when both weigh the same. Then:
//!
//! - **SHD** (structural Hamming distance): reference pairs missing from the skeleton, plus
//!   skeleton pairs missing from the reference, plus shared pairs whose orientation differs
//!   (an unoriented pair counts as differing). A reversal costs 1.
//! - **skeleton** precision, recall, F1 over unordered pairs;
//! - **orientation** precision, recall, F1 over oriented edges;
//! - **orientation accuracy**: among shared pairs, the share oriented as in the reference.
//!
//! The curve repeats this at every distinct positive weight of a scored edge.

use crate::error::InputError;
use crate::graph::{ClaimGraph, WeightSpec};
use crate::variables::{Aliases, Normalizer};
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet};
use std::path::Path;

/// A reference diagram: variable keys with the names it gives them, and directed edges.
#[derive(Debug, Clone, Default)]
pub struct Reference {
    /// key → name as written in the file.
    pub names: BTreeMap<String, String>,
    pub edges: BTreeSet<(String, String)>,
}

fn key_of(
    n: &Normalizer,
    a: &Aliases,
    path: &Path,
    line: usize,
    name: &str,
) -> Result<String, InputError> {
    let k = a.resolve(&n.key(name)).to_string();
    if k.is_empty() {
        return Err(InputError::invalid(
            path,
            line,
            format!("'{name}' has no content words, so it names no variable"),
        ));
    }
    Ok(k)
}

impl Reference {
    fn add(
        &mut self,
        n: &Normalizer,
        a: &Aliases,
        path: &Path,
        line: usize,
        from: &str,
        to: &str,
    ) -> Result<(), InputError> {
        let (x, y) = (
            key_of(n, a, path, line, from)?,
            key_of(n, a, path, line, to)?,
        );
        if x == y {
            return Err(InputError::invalid(
                path,
                line,
                format!("'{from}' → '{to}' joins a variable to itself"),
            ));
        }
        if self.edges.contains(&(y.clone(), x.clone())) {
            return Err(InputError::invalid(
                path,
                line,
                format!("'{from}' and '{to}' are joined in both directions; the reference must be acyclic between two variables"),
            ));
        }
        self.names
            .entry(x.clone())
            .or_insert_with(|| from.trim().to_string());
        self.names
            .entry(y.clone())
            .or_insert_with(|| to.trim().to_string());
        self.edges.insert((x, y));
        Ok(())
    }

    /// Read a reference file: DOT when it ends in `.dot`/`.gv` or starts with `digraph`, else CSV.
    pub fn load(path: &Path, n: &Normalizer, a: &Aliases) -> Result<Reference, InputError> {
        let text = std::fs::read_to_string(path).map_err(|source| InputError::Io {
            path: path.to_path_buf(),
            source,
        })?;
        let ext = path
            .extension()
            .map(|e| e.to_string_lossy().to_ascii_lowercase())
            .unwrap_or_default();
        let head = text.trim_start().to_ascii_lowercase();
        if ext == "dot" || ext == "gv" || head.starts_with("digraph") || head.starts_with("strict")
        {
            Self::parse_dot(path, &text, n, a)
        } else {
            Self::parse_csv(path, &text, n, a)
        }
    }

    /// `cause,effect` rows (more columns are ignored); a first row `source,target`,
    /// `cause,effect` or `from,to` is a header; `#` lines are comments.
    pub fn parse_csv(
        path: &Path,
        text: &str,
        n: &Normalizer,
        a: &Aliases,
    ) -> Result<Reference, InputError> {
        let mut r = Reference::default();
        let mut rd = csv::ReaderBuilder::new()
            .has_headers(false)
            .flexible(true)
            .comment(Some(b'#'))
            .trim(csv::Trim::All)
            .from_reader(text.as_bytes());
        for (i, rec) in rd.records().enumerate() {
            let rec = rec.map_err(|e| {
                let line = e.position().map(|p| p.line() as usize).unwrap_or(i + 1);
                InputError::invalid(path, line, e.to_string())
            })?;
            let line = rec.position().map(|p| p.line() as usize).unwrap_or(i + 1);
            if rec.iter().all(|f| f.is_empty()) {
                continue;
            }
            let (Some(x), Some(y)) = (rec.get(0), rec.get(1)) else {
                return Err(InputError::invalid(
                    path,
                    line,
                    "expected two columns: cause,effect",
                ));
            };
            let hdr = [x.to_ascii_lowercase(), y.to_ascii_lowercase()];
            if i == 0
                && matches!(
                    (hdr[0].as_str(), hdr[1].as_str()),
                    ("source", "target") | ("cause", "effect") | ("from", "to")
                )
            {
                continue;
            }
            r.add(n, a, path, line, x, y)?;
        }
        if r.edges.is_empty() {
            return Err(InputError::invalid(path, 1, "no edges in the reference"));
        }
        Ok(r)
    }

    /// A DOT digraph, parsed by petgraph's DOT reader; a node's `label` is its name when given.
    pub fn parse_dot(
        path: &Path,
        text: &str,
        n: &Normalizer,
        a: &Aliases,
    ) -> Result<Reference, InputError> {
        use petgraph::dot::dot_parser::{DotAttrList, DotNodeWeight, ParseFromDot};
        use petgraph::visit::EdgeRef;
        let g: petgraph::graph::DiGraph<DotNodeWeight, DotAttrList> = ParseFromDot::try_from(text)
            .map_err(|e| InputError::invalid(path, 1, format!("not a DOT graph: {e}")))?;
        let unquote = |s: &str| -> String {
            let t = s.trim();
            let t = t
                .strip_prefix('"')
                .and_then(|x| x.strip_suffix('"'))
                .unwrap_or(t);
            t.replace("\\\"", "\"").replace("\\\\", "\\")
        };
        let name = |i: petgraph::graph::NodeIndex| -> String {
            let node = &g[i];
            for (k, v) in &node.attr {
                if unquote(k) == "label" {
                    return unquote(v);
                }
            }
            unquote(&node.id)
        };
        let mut r = Reference::default();
        for e in g.edge_references() {
            r.add(n, a, path, 1, &name(e.source()), &name(e.target()))?;
        }
        if r.edges.is_empty() {
            return Err(InputError::invalid(path, 1, "no edges in the reference"));
        }
        Ok(r)
    }

    fn skeleton(&self) -> BTreeSet<(String, String)> {
        self.edges.iter().map(|(a, b)| pair(a, b)).collect()
    }
}

fn pair(a: &str, b: &str) -> (String, String) {
    if a <= b {
        (a.to_string(), b.to_string())
    } else {
        (b.to_string(), a.to_string())
    }
}

/// Precision, recall and F1; `None` where a ratio has no denominator.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Prf {
    pub precision: Option<f64>,
    pub recall: Option<f64>,
    pub f1: Option<f64>,
}

impl Prf {
    fn of(tp: usize, predicted: usize, actual: usize) -> Prf {
        let ratio = |a: usize, b: usize| (b > 0).then(|| a as f64 / b as f64);
        let (p, r) = (ratio(tp, predicted), ratio(tp, actual));
        let f1 = match (p, r) {
            (Some(p), Some(r)) if p + r > 0.0 => Some(2.0 * p * r / (p + r)),
            (Some(_), Some(_)) => Some(0.0),
            _ => None,
        };
        Prf {
            precision: p,
            recall: r,
            f1,
        }
    }
}

/// The scores at one threshold.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Scores {
    pub threshold: f64,
    /// Predicted skeleton pairs.
    pub predicted_pairs: usize,
    pub reference_edges: usize,
    pub shd: usize,
    /// Reference pairs the claims miss, pairs the reference lacks, shared pairs misoriented.
    pub missing: usize,
    pub extra: usize,
    pub misoriented: usize,
    pub skeleton: Prf,
    pub orientation: Prf,
    pub orientation_accuracy: Option<f64>,
}

/// The claim edges between reference variables, with their weights.
pub fn candidate_weights(
    g: &ClaimGraph,
    spec: &WeightSpec,
    reference: &Reference,
) -> BTreeMap<(String, String), f64> {
    g.edges()
        .filter(|(a, b, _)| {
            reference.names.contains_key(&g.graph[*a].key)
                && reference.names.contains_key(&g.graph[*b].key)
        })
        .map(|(a, b, r)| {
            (
                (g.graph[a].key.clone(), g.graph[b].key.clone()),
                spec.weight(g, r),
            )
        })
        .collect()
}

/// Score predicted edge weights against the reference at `threshold`.
pub fn score_at(
    weights: &BTreeMap<(String, String), f64>,
    reference: &Reference,
    threshold: f64,
) -> Scores {
    let kept: BTreeMap<&(String, String), f64> = weights
        .iter()
        .filter(|(_, &w)| w > 0.0 && w >= threshold)
        .map(|(k, &w)| (k, w))
        .collect();
    // Skeleton pair → predicted orientation (None: both directions weigh the same).
    let mut skel: BTreeMap<(String, String), Option<(String, String)>> = BTreeMap::new();
    for ((a, b), &w) in &kept {
        let back = kept.get(&(b.clone(), a.clone())).copied().unwrap_or(0.0);
        let orient = match w.total_cmp(&back) {
            std::cmp::Ordering::Greater => Some((a.clone(), b.clone())),
            std::cmp::Ordering::Less => Some((b.clone(), a.clone())),
            std::cmp::Ordering::Equal => None,
        };
        skel.insert(pair(a, b), orient);
    }
    let ref_skel = reference.skeleton();
    let shared: Vec<&(String, String)> = skel.keys().filter(|p| ref_skel.contains(*p)).collect();
    let missing = ref_skel.iter().filter(|p| !skel.contains_key(*p)).count();
    let extra = skel.len() - shared.len();
    let well_oriented = shared
        .iter()
        .filter(|p| {
            skel.get(**p)
                .and_then(|o| o.as_ref())
                .is_some_and(|o| reference.edges.contains(o))
        })
        .count();
    let misoriented = shared.len() - well_oriented;
    let oriented: BTreeSet<&(String, String)> = skel.values().flatten().collect();
    let orient_tp = oriented
        .iter()
        .filter(|e| reference.edges.contains(**e))
        .count();
    Scores {
        threshold,
        predicted_pairs: skel.len(),
        reference_edges: reference.edges.len(),
        shd: missing + extra + misoriented,
        missing,
        extra,
        misoriented,
        skeleton: Prf::of(shared.len(), skel.len(), ref_skel.len()),
        orientation: Prf::of(orient_tp, oriented.len(), reference.edges.len()),
        orientation_accuracy: (!shared.is_empty())
            .then(|| well_oriented as f64 / shared.len() as f64),
    }
}

/// The scores at every distinct positive candidate weight, in increasing order.
pub fn curve(weights: &BTreeMap<(String, String), f64>, reference: &Reference) -> Vec<Scores> {
    let mut ts: Vec<f64> = weights.values().copied().filter(|w| *w > 0.0).collect();
    ts.sort_by(f64::total_cmp);
    ts.dedup();
    ts.into_iter()
        .map(|t| score_at(weights, reference, t))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn norm() -> Normalizer {
        Normalizer::new(&PatternSet::builtin().unwrap().lexicon)
    }

    #[test]
    fn worked_example() {
        let n = norm();
        let a = Aliases::default();
        let p = Path::new("ref.csv");
        let r = Reference::parse_csv(
            p,
            "cause,effect\nrain,wind\nwind,flood\nflood,crop\n",
            &n,
            &a,
        )
        .unwrap();
        let w: BTreeMap<(String, String), f64> = [
            (("rain", "wind"), 3.0),  // right
            (("flood", "wind"), 2.0), // reversed
            (("rain", "crop"), 1.0),  // extra
            (("flood", "crop"), 0.5), // right, below threshold 1
        ]
        .into_iter()
        .map(|((x, y), w)| ((x.to_string(), y.to_string()), w))
        .collect();
        let s = score_at(&w, &r, 1.0);
        assert_eq!((s.missing, s.extra, s.misoriented, s.shd), (1, 1, 1, 3));
        assert_eq!(s.skeleton.precision, Some(2.0 / 3.0));
        assert_eq!(s.skeleton.recall, Some(2.0 / 3.0));
        assert_eq!(s.orientation.precision, Some(1.0 / 3.0));
        assert_eq!(s.orientation_accuracy, Some(0.5));
        let c = curve(&w, &r);
        assert_eq!(c.len(), 4);
        assert_eq!(c[0].shd, 2); // threshold 0.5: flood → crop found
        assert_eq!(c[3].predicted_pairs, 1);
    }

    #[test]
    fn reference_errors_name_the_line() {
        let n = norm();
        let a = Aliases::default();
        let p = Path::new("ref.csv");
        let e = Reference::parse_csv(p, "rain,wind\nwind,rain\n", &n, &a).unwrap_err();
        assert!(e.to_string().starts_with("ref.csv:2:"), "{e}");
        let e = Reference::parse_csv(p, "rain,wind\nthe,wind\n", &n, &a).unwrap_err();
        assert!(e.to_string().starts_with("ref.csv:2:"), "{e}");
        let d = Reference::parse_dot(
            Path::new("r.dot"),
            "digraph { s [label=\"smoking\"]; s -> \"lung cancer\" }",
            &n,
            &a,
        )
        .unwrap();
        assert!(d.edges.contains(&(n.key("smoking"), n.key("lung cancer"))));
        assert!(Reference::parse_dot(Path::new("r.dot"), "digraph {", &n, &a).is_err());
    }
}
