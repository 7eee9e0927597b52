//! Near-duplicate claims: the same claim repeated in (almost) the same sentence, as boilerplate
//! and syndicated copies repeat it. With `--dedupe` such repeats count once.
//!
//! Kept apart from the graph's aggregation because it is the one step before it that needs the
//! sentences themselves, not only the compact rows: [`drop_near_duplicates`] reads them from
//! the store, [`near_duplicates`] compares them.

use crate::claim::{Kind, Modality, Polarity};
use crate::error::StoreError;
use crate::store::{ClaimRow, Store};
use crate::variables::Aliases;
use std::collections::{BTreeSet, HashMap};

/// Jaccard similarity of word 3-shingles at or above which two sentences are near-duplicates.
pub const DEDUPE_THRESHOLD: f64 = 0.8;

/// The normalised words of a sentence: lower-cased runs of letters and digits.
fn norm_words(text: &str) -> Vec<String> {
    text.split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect()
}

/// The word 3-shingles of a sentence (its words, for sentences under three words).
pub fn shingles(text: &str) -> BTreeSet<String> {
    let w = norm_words(text);
    if w.len() < 3 {
        return w.into_iter().collect();
    }
    w.windows(3).map(|x| x.join(" ")).collect()
}

/// Jaccard similarity of two shingle sets (1 for two empty sets).
pub fn jaccard(a: &BTreeSet<String>, b: &BTreeSet<String>) -> f64 {
    if a.is_empty() && b.is_empty() {
        return 1.0;
    }
    let inter = a.intersection(b).count();
    inter as f64 / (a.len() + b.len() - inter) as f64
}

/// Which rows repeat an earlier row: same variables (after aliases), kind, polarity and modality,
/// and a sentence whose normalised text is identical or whose word-3-shingle Jaccard similarity
/// with the earlier one is at least `threshold`. `texts[i]` is row `i`'s sentence. The first row
/// in corpus order is kept; the rest are marked `true`.
///
/// Comparisons are exact (not MinHash estimates): rows are first grouped by claim, then by
/// normalised text, so only the distinct texts of one claim are compared with each other.
pub fn near_duplicates(
    rows: &[ClaimRow],
    texts: &[String],
    aliases: &Aliases,
    threshold: f64,
) -> Vec<bool> {
    type Group<'a> = (&'a str, &'a str, Kind, Polarity, Modality);
    let mut groups: HashMap<Group, Vec<(String, BTreeSet<String>)>> = HashMap::new();
    let mut out = vec![false; rows.len()];
    for (i, r) in rows.iter().enumerate() {
        let text = texts.get(i).map(String::as_str).unwrap_or("");
        let key = (
            aliases.resolve(&r.cause),
            aliases.resolve(&r.effect),
            r.kind,
            r.polarity,
            r.modality,
        );
        let norm = norm_words(text).join(" ");
        let kept = groups.entry(key).or_default();
        if kept.iter().any(|(t, _)| *t == norm) {
            out[i] = true;
            continue;
        }
        let sh = shingles(text);
        if kept.iter().any(|(_, s)| jaccard(s, &sh) >= threshold) {
            out[i] = true;
            continue;
        }
        kept.push((norm, sh));
    }
    out
}

/// Drop the rows that repeat an earlier row ([`near_duplicates`] at [`DEDUPE_THRESHOLD`]),
/// reading each row's sentence from the store; returns how many rows were dropped.
pub fn drop_near_duplicates(
    rows: &mut Vec<ClaimRow>,
    store: &Store,
    aliases: &Aliases,
) -> Result<usize, StoreError> {
    let mut texts = Vec::with_capacity(rows.len());
    for r in rows.iter() {
        texts.push(store.claim(r.at)?.sentence);
    }
    let dup = near_duplicates(rows, &texts, aliases, DEDUPE_THRESHOLD);
    let dropped = dup.iter().filter(|d| **d).count();
    let mut it = dup.into_iter();
    rows.retain(|_| !it.next().unwrap_or(false));
    Ok(dropped)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::graph::tests::row;

    #[test]
    fn near_duplicates_collapse_boilerplate_but_not_other_readings() {
        let mut rows = vec![
            row("a", "b", Kind::Causal, Modality::Asserted, "d1"),
            row("a", "b", Kind::Causal, Modality::Asserted, "d2"),
            row("a", "b", Kind::Causal, Modality::Asserted, "d3"),
            row("a", "b", Kind::Causal, Modality::Negated, "d4"),
            row("a", "b", Kind::Causal, Modality::Asserted, "d5"),
        ];
        rows[4].cause = "x".into();
        let texts: Vec<String> = [
            "Fertiliser runoff causes algae blooms in the lake every summer.",
            "FERTILISER runoff causes algae blooms in the lake, every summer!",
            "Fertiliser runoff causes algae blooms in the lake every single summer.",
            "Fertiliser runoff causes algae blooms in the lake every summer.",
            "Fertiliser runoff causes algae blooms in the lake every summer.",
        ]
        .map(String::from)
        .to_vec();
        let dup = near_duplicates(&rows, &texts, &Aliases::default(), DEDUPE_THRESHOLD);
        // Identical after normalisation; 7 of 10 shingles shared (0.7 < 0.8) is kept; a
        // different modality and a different cause are different claims.
        assert_eq!(dup, vec![false, true, false, false, false]);
        let s1 = shingles(&texts[0]);
        let s3 = shingles(&texts[2]);
        assert!(
            (jaccard(&s1, &s3) - 7.0 / 10.0).abs() < 1e-9,
            "{}",
            jaccard(&s1, &s3)
        );
    }
}
