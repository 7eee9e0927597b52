//! Merge suggestions and readable node ids: which variables are probably one concept, and what
//! a variable is called in files that other tools read.
//!
//! Keys already join inflections ("sea levels" / "sea level"); what they miss is the subject of
//! this module. Each suggestion names the variable to fold (`from`) and the one to keep (`into`),
//! the reason, and an evidence count a reviewer can weigh:
//! - **abbreviation**: the corpus defines one as the short form of the other ("soil organic
//!   carbon (SOC)"); evidence is the number of documents that define it so. Short forms defined
//!   two ways are never suggested (see [`super::abbrev::Abbreviations`]), nor long forms whose key
//!   loses one of their one-letter words ("protein kinase A" keys as "protein kinase"), nor a
//!   one-word long form defined in a single document (the letters of "PTEN" are all found in
//!   "protein", so one "protein (PTEN)" would fold PTEN into every protein);
//! - **spelling**: the labels are equal once British spellings are folded to American ones
//!   ("fertilised" / "fertilized", "colour" / "color", "centre" / "center", "haem" / "hem");
//! - **hyphen**: the labels are equal once spaces and hyphens are removed ("ground water" /
//!   "ground-water" / "groundwater");
//! - **plural**: the labels are equal once a plural that the stemmer leaves apart is made
//!   singular ("mice" / "mouse", "bacteria" / "bacterium", "analyses" / "analysis", "RNAs" / "RNA");
//! - **same head**: one is the other with qualifiers ("nitrogen runoff from fertilised fields" →
//!   "nitrogen runoff", see [`super::heads`]);
//! - **near duplicate**: their key words overlap by at least [`NEAR_DUPLICATE_JACCARD`].
//!
//! For every reason but abbreviations the evidence is the number of claims that would move (the
//! `from` variable's claims). The variable kept is the one with more claims (then the shorter
//! key), except for "same head", where the head is kept.
//!
//! Suggestions are only suggestions: a user writes the ones they accept into an alias file.

use super::abbrev::Abbreviations;
use super::heads;
use super::Normalizer;
use serde::Serialize;
use std::collections::{BTreeMap, BTreeSet, HashMap};

/// Two variables whose key words overlap at least this much (Jaccard) are near duplicates.
pub const NEAR_DUPLICATE_JACCARD: f64 = 0.6;

/// Key words shared by more variables than this are not used to find near duplicates: they
/// are too common to say anything ("level", "cell").
const NEAR_DUPLICATE_MAX_POSTING: usize = 200;

/// What merge suggestions need to know of one variable.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct VariableInfo {
    pub key: String,
    /// The most frequent surface form.
    pub label: String,
    /// Claims that name the variable (as cause or effect).
    pub claims: usize,
}

/// Why two variables might be one.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum MergeReason {
    Abbreviation,
    Spelling,
    Hyphen,
    Plural,
    SameHead,
    NearDuplicate,
}

impl MergeReason {
    pub fn as_str(self) -> &'static str {
        match self {
            MergeReason::Abbreviation => "abbreviation",
            MergeReason::Spelling => "spelling",
            MergeReason::Hyphen => "hyphen",
            MergeReason::Plural => "plural",
            MergeReason::SameHead => "same-head",
            MergeReason::NearDuplicate => "near-duplicate",
        }
    }
}

/// One suggested merge.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct MergeSuggestion {
    /// Key and label of the variable to fold.
    pub from: String,
    pub from_label: String,
    /// Key and label of the variable to keep.
    pub into: String,
    pub into_label: String,
    pub reason: MergeReason,
    /// Documents defining the abbreviation, or claims of `from` for the other reasons.
    pub evidence: usize,
}

/// Every merge suggestion among `vars`, strongest reason first, then most evidence, then by
/// keys (so the order is stable). A pair is suggested once, for its strongest reason.
pub fn suggest(
    vars: &[VariableInfo],
    abbreviations: &Abbreviations,
    normalizer: &Normalizer,
) -> Vec<MergeSuggestion> {
    let by_key: HashMap<&str, &VariableInfo> = vars.iter().map(|v| (v.key.as_str(), v)).collect();
    let mut out: Vec<MergeSuggestion> = Vec::new();
    let mut seen: BTreeSet<(String, String)> = BTreeSet::new();
    let mut push = |out: &mut Vec<MergeSuggestion>,
                    a: &VariableInfo,
                    b: &VariableInfo,
                    reason: MergeReason,
                    evidence: Option<usize>,
                    keep_b: bool| {
        if a.key == b.key {
            return;
        }
        let pair = if a.key < b.key {
            (a.key.clone(), b.key.clone())
        } else {
            (b.key.clone(), a.key.clone())
        };
        if !seen.insert(pair) {
            return;
        }
        let (from, into) = if keep_b || keeps(b, a) {
            (a, b)
        } else {
            (b, a)
        };
        out.push(MergeSuggestion {
            from: from.key.clone(),
            from_label: from.label.clone(),
            into: into.key.clone(),
            into_label: into.label.clone(),
            reason,
            evidence: evidence.unwrap_or(from.claims),
        });
    };

    // Abbreviations defined in the corpus, unambiguous ones only.
    for u in abbreviations.uses().filter(|u| u.is_unambiguous()) {
        if u.longs.first().is_some_and(|(l, docs)| {
            key_drops_a_letter(l, normalizer) || (l.split_whitespace().count() == 1 && *docs < 2)
        }) {
            continue;
        }
        let (Some(short), Some((long, docs))) = (
            by_key.get(normalizer.key(&u.short).as_str()),
            u.longs
                .first()
                .and_then(|(l, d)| Some((by_key.get(normalizer.key(l).as_str())?, *d))),
        ) else {
            continue;
        };
        push(
            &mut out,
            short,
            long,
            MergeReason::Abbreviation,
            Some(docs),
            true,
        );
    }

    // Folded forms: two variables whose folded forms are equal are variants of one another.
    for reason in [
        MergeReason::Spelling,
        MergeReason::Hyphen,
        MergeReason::Plural,
    ] {
        let mut groups: BTreeMap<String, Vec<&VariableInfo>> = BTreeMap::new();
        for v in vars {
            let f = match reason {
                MergeReason::Spelling => fold_spelling(v),
                MergeReason::Hyphen => fold_hyphens(v),
                _ => fold_plural(v),
            };
            if !f.is_empty() {
                groups.entry(f).or_default().push(v);
            }
        }
        for group in groups.values().filter(|g| g.len() > 1) {
            let keep = best(group);
            // Labels that are equal already are no spelling variant (the hyphen fold, which
            // compares labels without punctuation, takes them).
            let same = |v: &VariableInfo| v.label.to_lowercase() == keep.label.to_lowercase();
            for v in group
                .iter()
                .filter(|v| v.key != keep.key && !(reason == MergeReason::Spelling && same(v)))
            {
                push(&mut out, v, keep, reason, None, true);
            }
        }
    }

    // Same head: a qualified variable folds into its bare head when the graph has it.
    for v in vars {
        let split = heads::split(&v.label);
        if split.is_bare() {
            continue;
        }
        let head_key = normalizer.key(&split.head);
        if let Some(head) = by_key.get(head_key.as_str()) {
            push(&mut out, v, head, MergeReason::SameHead, None, true);
        }
    }

    // Near duplicates by key-word overlap, among variables that share a not-too-common word.
    let words: Vec<BTreeSet<&str>> = vars.iter().map(|v| v.key.split(' ').collect()).collect();
    let mut postings: HashMap<&str, Vec<usize>> = HashMap::new();
    for (i, ws) in words.iter().enumerate() {
        for w in ws {
            postings.entry(w).or_default().push(i);
        }
    }
    let mut pairs: BTreeSet<(usize, usize)> = BTreeSet::new();
    for list in postings
        .values()
        .filter(|l| l.len() <= NEAR_DUPLICATE_MAX_POSTING)
    {
        for (n, &i) in list.iter().enumerate() {
            for &j in &list[n + 1..] {
                pairs.insert((i.min(j), i.max(j)));
            }
        }
    }
    for (i, j) in pairs {
        if words[i].len() < 2 && words[j].len() < 2 {
            continue;
        }
        let shared = words[i].intersection(&words[j]).count();
        let union = words[i].union(&words[j]).count();
        if union > 0 && shared as f64 / union as f64 >= NEAR_DUPLICATE_JACCARD {
            push(
                &mut out,
                &vars[i],
                &vars[j],
                MergeReason::NearDuplicate,
                None,
                false,
            );
        }
    }

    out.sort_by(|a, b| {
        a.reason
            .cmp(&b.reason)
            .then(b.evidence.cmp(&a.evidence))
            .then_with(|| a.from.cmp(&b.from))
            .then_with(|| a.into.cmp(&b.into))
    });
    out
}

/// Does the key of `long` drop a one-letter word of it? "protein kinase A (PKA)" has the key of
/// "protein kinase" (the "A" reads as an article), and merging PKA into every protein kinase
/// would join two concepts.
fn key_drops_a_letter(long: &str, normalizer: &Normalizer) -> bool {
    let kept: Vec<String> = normalizer.content_words(long).collect();
    long.split(|c: char| !c.is_alphanumeric())
        .filter(|w| w.chars().count() == 1)
        .any(|w| !kept.contains(&w.to_lowercase()))
}

/// Should `a` be kept over `b`? More claims, then the shorter key, then the smaller key.
fn keeps(a: &VariableInfo, b: &VariableInfo) -> bool {
    (std::cmp::Reverse(a.claims), a.key.len(), &a.key)
        < (std::cmp::Reverse(b.claims), b.key.len(), &b.key)
}

fn best<'a>(group: &[&'a VariableInfo]) -> &'a VariableInfo {
    let mut keep = group[0];
    for v in &group[1..] {
        if keeps(v, keep) {
            keep = v;
        }
    }
    keep
}

/// British → American spelling of one lower-case word, by the regular patterns ("-ise" /
/// "-ize", "-our" / "-or", "-tre" / "-ter", "-ogue" / "-og", "ae"/"oe" / "e"). Both sides of a
/// comparison are folded, so a word that only looks British ("exercise") folds harmlessly.
pub fn american(word: &str) -> String {
    let mut w = word.to_string();
    for (gb, us) in [
        ("isations", "izations"),
        ("isation", "ization"),
        ("ising", "izing"),
        ("ised", "ized"),
        ("ises", "izes"),
        ("ise", "ize"),
        ("ysing", "yzing"),
        ("ysed", "yzed"),
        ("yse", "yze"),
        ("ours", "ors"),
        ("our", "or"),
        ("tres", "ters"),
        ("tre", "ter"),
        ("ogues", "ogs"),
        ("ogue", "og"),
    ] {
        if let Some(stem) = w.strip_suffix(gb) {
            if stem.len() >= 2 {
                w = format!("{stem}{us}");
                break;
            }
        }
    }
    // The "ae"/"oe" of Greek and Latin roots: haemoglobin, oestrogen, anaemia.
    for (gb, us) in [("ae", "e"), ("oe", "e")] {
        if w.len() > 5 && w.contains(gb) {
            w = w.replacen(gb, us, 1);
        }
    }
    w
}

/// The label's words spelled the American way. Labels, not keys, are compared: stems can meet by
/// chance ("organisation" and "organisms" share the stem "organ"), spellings of one word do not.
fn fold_spelling(v: &VariableInfo) -> String {
    v.label
        .to_lowercase()
        .split(|c: char| !c.is_alphanumeric())
        .filter(|w| !w.is_empty())
        .map(american)
        .collect::<Vec<_>>()
        .join(" ")
}

/// The label without case, spaces, hyphens or other punctuation.
fn fold_hyphens(v: &VariableInfo) -> String {
    v.label
        .to_lowercase()
        .chars()
        .filter(|c| c.is_alphanumeric())
        .collect()
}

/// Irregular plurals the stemmer leaves apart, as (plural, singular).
const IRREGULAR_PLURALS: &[(&str, &str)] = &[
    ("mice", "mouse"),
    ("children", "child"),
    ("feet", "foot"),
    ("teeth", "tooth"),
    ("women", "woman"),
    ("men", "man"),
    ("geese", "goose"),
    ("lice", "louse"),
    ("people", "person"),
    ("data", "datum"),
    ("media", "medium"),
    ("bacteria", "bacterium"),
    ("criteria", "criterion"),
    ("phenomena", "phenomenon"),
    ("fungi", "fungus"),
    ("nuclei", "nucleus"),
    ("stimuli", "stimulus"),
    ("analyses", "analysis"),
    ("hypotheses", "hypothesis"),
    ("indices", "index"),
    ("matrices", "matrix"),
    ("larvae", "larva"),
    ("algae", "alga"),
];

/// The label with its last word in the singular: the irregular plurals above, and a final "s"
/// after at least three characters not ending in "s", "u" or "i" (the plurals of short forms,
/// "RNAs" / "RNA", which the stemmer keeps apart).
fn fold_plural(v: &VariableInfo) -> String {
    let l = v.label.to_lowercase();
    let l = l.trim();
    let (rest, last) = match l.rfind(' ') {
        Some(i) => (&l[..=i], &l[i + 1..]),
        None => ("", l),
    };
    let singular = IRREGULAR_PLURALS
        .iter()
        .find(|(pl, _)| *pl == last)
        .map(|(_, sg)| *sg)
        .or_else(|| {
            last.strip_suffix('s')
                .filter(|s| s.chars().count() >= 3 && !s.ends_with(['s', 'u', 'i']))
        })
        .unwrap_or(last);
    format!("{rest}{singular}")
}

/// A readable, file-safe id for a label: lower case, runs of anything but letters and digits
/// turned into one "-" ("Nitrogen runoff (N)" → "nitrogen-runoff-n"). Empty labels give
/// "variable".
pub fn slug(label: &str) -> String {
    let mut out = String::with_capacity(label.len());
    let mut dash = false;
    for c in label.chars().flat_map(char::to_lowercase) {
        if c.is_alphanumeric() {
            if dash && !out.is_empty() {
                out.push('-');
            }
            dash = false;
            out.push(c);
        } else {
            dash = true;
        }
    }
    if out.is_empty() {
        out.push_str("variable");
    }
    out
}

/// Unique slugs for (key, label) pairs, in the same order. Labels that slug alike are told apart
/// by a numeric suffix ("-2", "-3", …) given in key order, so the ids are the same however the
/// input is ordered; a suffixed id never takes a slug that another label has itself.
pub fn unique_slugs(vars: &[(&str, &str)]) -> Vec<String> {
    let slugs: Vec<String> = vars.iter().map(|(_, l)| slug(l)).collect();
    let natural: BTreeSet<&str> = slugs.iter().map(String::as_str).collect();
    let mut by_slug: BTreeMap<&str, Vec<usize>> = BTreeMap::new();
    for (i, s) in slugs.iter().enumerate() {
        by_slug.entry(s.as_str()).or_default().push(i);
    }
    let mut out = slugs.clone();
    let mut taken: BTreeSet<String> = natural.iter().map(|s| s.to_string()).collect();
    for (s, mut idx) in by_slug {
        if idx.len() < 2 {
            continue;
        }
        idx.sort_by(|&a, &b| vars[a].0.cmp(vars[b].0));
        let mut n = 2;
        for &i in &idx[1..] {
            let mut cand = format!("{s}-{n}");
            while taken.contains(&cand) {
                n += 1;
                cand = format!("{s}-{n}");
            }
            taken.insert(cand.clone());
            out[i] = cand;
            n += 1;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::super::abbrev::definitions;
    use super::*;
    use crate::patterns::PatternSet;

    fn norm() -> Normalizer {
        Normalizer::new(&PatternSet::builtin().unwrap().lexicon)
    }

    fn var(n: &Normalizer, label: &str, claims: usize) -> VariableInfo {
        VariableInfo {
            key: n.key(label),
            label: label.to_string(),
            claims,
        }
    }

    fn reasons(s: &[MergeSuggestion]) -> Vec<(&str, &str, MergeReason, usize)> {
        s.iter()
            .map(|m| {
                (
                    m.from_label.as_str(),
                    m.into_label.as_str(),
                    m.reason,
                    m.evidence,
                )
            })
            .collect()
    }

    #[test]
    fn each_reason_is_found() {
        let n = norm();
        let vars = vec![
            var(&n, "soil organic carbon", 9),
            var(&n, "SOC", 4),
            var(&n, "fertilised fields", 2),
            var(&n, "fertilized fields", 5),
            var(&n, "ground water", 3),
            var(&n, "gut bacteria", 2),
            var(&n, "gut bacterium", 1),
            var(&n, "RNAs", 2),
            var(&n, "RNA", 6),
            var(&n, "groundwater", 7),
            var(&n, "nitrogen runoff", 6),
            var(&n, "nitrogen runoff from fertilised fields", 1),
            var(&n, "crayfish density in streams", 1),
            var(&n, "stream crayfish density", 8),
        ];
        let mut abbr = Abbreviations::default();
        let d = &definitions("We measured soil organic carbon (SOC) in plots.")[0];
        abbr.add("doc1", d, &n.key(&d.long));
        abbr.add("doc2", d, &n.key(&d.long));
        let s = suggest(&vars, &abbr, &n);
        let r = reasons(&s);
        assert!(
            r.contains(&("SOC", "soil organic carbon", MergeReason::Abbreviation, 2)),
            "{r:?}"
        );
        assert!(
            r.contains(&(
                "fertilised fields",
                "fertilized fields",
                MergeReason::Spelling,
                2
            )),
            "{r:?}"
        );
        assert!(
            r.contains(&("ground water", "groundwater", MergeReason::Hyphen, 3)),
            "{r:?}"
        );
        assert!(
            r.contains(&("gut bacterium", "gut bacteria", MergeReason::Plural, 1)),
            "{r:?}"
        );
        assert!(
            r.contains(&(
                "nitrogen runoff from fertilised fields",
                "nitrogen runoff",
                MergeReason::SameHead,
                1
            )),
            "{r:?}"
        );
        assert!(
            r.contains(&(
                "crayfish density in streams",
                "stream crayfish density",
                MergeReason::NearDuplicate,
                1
            )),
            "{r:?}"
        );
        // Strongest reason first.
        assert_eq!(s[0].reason, MergeReason::Abbreviation);
    }

    #[test]
    fn ambiguous_abbreviations_are_not_suggested() {
        let n = norm();
        let vars = vec![var(&n, "SOC", 3), var(&n, "soil organic carbon", 3)];
        let mut abbr = Abbreviations::default();
        let d1 = &definitions("the soil organic carbon (SOC) pool")[0];
        let d2 = &definitions("the state of charge (SOC) of the cell")[0];
        abbr.add("doc1", d1, &n.key(&d1.long));
        abbr.add("doc2", d2, &n.key(&d2.long));
        assert!(suggest(&vars, &abbr, &n)
            .iter()
            .all(|m| m.reason != MergeReason::Abbreviation));
    }

    #[test]
    fn chance_stem_matches_are_no_spelling_variant() {
        let n = norm();
        // Porter2 stems both to "organ": a spelling fold over keys would join them.
        let vars = vec![var(&n, "organisation", 4), var(&n, "organisms", 4)];
        assert!(suggest(&vars, &Abbreviations::default(), &n).is_empty());
    }

    #[test]
    fn a_letter_dropped_by_the_key_blocks_an_abbreviation() {
        let n = norm();
        let vars = vec![var(&n, "PKA", 4), var(&n, "protein kinase", 4)];
        let mut abbr = Abbreviations::default();
        let d = &definitions("Activation of protein kinase A (PKA) follows.")[0];
        assert_eq!(d.long, "protein kinase A");
        abbr.add("doc1", d, &n.key(&d.long));
        assert!(suggest(&vars, &abbr, &n).is_empty());
    }

    #[test]
    fn a_one_word_long_form_needs_two_documents() {
        let n = norm();
        let vars = vec![var(&n, "PTEN", 4), var(&n, "protein", 40)];
        let mut abbr = Abbreviations::default();
        let d = &definitions("Loss of the protein (PTEN) follows.")[0];
        assert_eq!(d.long, "protein");
        abbr.add("doc1", d, &n.key(&d.long));
        let s = suggest(&vars, &abbr, &n);
        assert!(s.is_empty(), "{s:?}");
        abbr.add("doc2", d, &n.key(&d.long));
        assert_eq!(suggest(&vars, &abbr, &n).len(), 1);
    }

    #[test]
    fn unrelated_variables_are_left_alone() {
        let n = norm();
        let vars = vec![var(&n, "rainfall", 3), var(&n, "fish stocks", 3)];
        assert!(suggest(&vars, &Abbreviations::default(), &n).is_empty());
    }

    #[test]
    fn american_spellings() {
        for (gb, us) in [
            ("colour", "color"),
            ("centre", "center"),
            ("analyse", "analyze"),
            ("haemoglobin", "hemoglobin"),
            ("oestrogen", "estrogen"),
            ("organisation", "organization"),
            ("fertilised", "fertilized"),
        ] {
            assert_eq!(american(gb), us);
        }
    }

    #[test]
    fn slugs_are_readable_and_unique() {
        assert_eq!(slug("Nitrogen runoff (N)"), "nitrogen-runoff-n");
        assert_eq!(slug("  "), "variable");
        assert_eq!(slug("Sea-level rise"), "sea-level-rise");
        let ids = unique_slugs(&[
            ("b", "Fish stocks"),
            ("a", "fish-stocks"),
            ("c", "fish stocks 2"),
        ]);
        // "a" sorts first, so it keeps the plain slug; "b" cannot take "fish-stocks-2", which
        // is the natural slug of "c".
        assert_eq!(ids, vec!["fish-stocks-3", "fish-stocks", "fish-stocks-2"]);
        let again = unique_slugs(&[
            ("c", "fish stocks 2"),
            ("a", "fish-stocks"),
            ("b", "Fish stocks"),
        ]);
        assert_eq!(again, vec!["fish-stocks-2", "fish-stocks", "fish-stocks-3"]);
    }
}
