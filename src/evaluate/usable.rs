//! Usable-claim scoring: how many of the claims hearsay finds in real text a reader would accept,
//! judged against sentences labelled with the claims they state.
//!
//! A labelled sentence ([`UsableItem`]) carries the sentence before it (so that a pronoun can be
//! resolved as the pipeline would) and its *usable* claims: cause and effect are real variables
//! (not fragments, boilerplate, method steps or unresolved pronouns) and the sentence states the
//! direction. Extraction runs on the previous sentence and the sentence as one document; only
//! claims whose sentence is the labelled one count.
//!
//! **Matching** is by head words, not by exact spans, because the labels name variables, not
//! byte ranges: a predicted claim matches a gold claim when, on the cause side and on the effect
//! side, the predicted text contains a head word of the gold text (stemmed as variable keys are,
//! [`Normalizer::key`]; the heads are the last content word of each conjunct before the first
//! preposition or relative word, "A and B of C" giving A and B, plus the noun after a measure
//! word, "levels of NICD" giving levels and NICD) and at least half of the predicted side's key
//! words are in the gold side's key (so a span that runs on into other material does not
//! match); causal claims must have cause and effect on the same sides, association claims may be
//! in either order. So "mice" does not match "the TPA response in EPI−/− mice", and "Msl2" does
//! not match "knockdown of Msl2" (whose sign is the opposite). A gold claim may match several
//! predicted claims (a coordinated list labelled as one claim may be found as one claim per
//! item, and each is usable); precision counts predicted claims that match some gold claim,
//! recall gold claims that some predicted claim matches. Sign and modality are compared on
//! matched claims only and reported apart.
//!
//! This rule also labels claims for training the confidence model (`train-confidence --usable`):
//! a claim that matches is right, every other claim of a labelled sentence is wrong, because the
//! labels list every usable claim of the sentence.

use crate::claim::{Claim, Kind, Modality, Polarity};
use crate::error::InputError;
use crate::evaluate::Judged;
use crate::extract::{sentence_attempts, Extractor};
use crate::variables::Normalizer;
use serde::{Deserialize, Serialize};

/// One labelled sentence of a usable-claim sample.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct UsableItem {
    /// The article's id (file stem) and its path under the corpus folder.
    pub doc: String,
    pub path: String,
    /// The sentence's byte range in the article.
    pub start: usize,
    pub end: usize,
    /// The sentence before it in its paragraph ("" at a paragraph's start).
    pub previous: String,
    pub sentence: String,
    /// Every usable claim the sentence states.
    pub gold: Vec<UsableClaim>,
    /// Why the sentence was labelled so.
    #[serde(default)]
    pub note: String,
}

/// One usable claim: cause and effect text (words of the sentence, or of the previous sentence
/// for a resolved pronoun), kind, sign and modality.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct UsableClaim {
    pub cause: String,
    pub effect: String,
    pub kind: Kind,
    pub polarity: Polarity,
    pub modality: Modality,
    #[serde(default)]
    pub note: String,
}

/// Read a sample file (JSON Lines; blank and `#` lines skipped); `path` names it in errors.
pub fn parse_usable(path: &str, text: &str) -> Result<Vec<UsableItem>, InputError> {
    let mut out = Vec::new();
    for (n, line) in text.lines().enumerate() {
        let l = line.trim();
        if l.is_empty() || l.starts_with('#') {
            continue;
        }
        let item: UsableItem =
            serde_json::from_str(l).map_err(|e| InputError::invalid(path, n + 1, e.to_string()))?;
        if item.sentence.trim().is_empty() {
            return Err(InputError::invalid(path, n + 1, "empty sentence"));
        }
        out.push(item);
    }
    Ok(out)
}

/// The scores of one sample.
#[derive(Debug, Clone, Default, Serialize)]
pub struct UsableScores {
    pub sentences: usize,
    /// Claims found in the labelled sentences, and how many matched a gold claim.
    pub predicted: usize,
    pub usable: usize,
    /// Gold claims, and how many a predicted claim matched.
    pub gold: usize,
    pub found: usize,
    /// Of the matched claims: how many have the gold's polarity and modality.
    pub polarity_agrees: usize,
    pub modality_agrees: usize,
}

impl UsableScores {
    /// Usable claims over claims found.
    pub fn precision(&self) -> f64 {
        self.usable as f64 / self.predicted.max(1) as f64
    }
    /// Gold claims found over gold claims.
    pub fn recall(&self) -> f64 {
        self.found as f64 / self.gold.max(1) as f64
    }
}

/// Words that end the head phrase of a gold text: a head noun comes before them.
const PHRASE_ENDS: &[&str] = &[
    "of", "in", "on", "at", "for", "to", "from", "by", "with", "during", "between", "via", "that",
    "which", "after", "before", "within", "among", "upon", "under", "through", "across", "into",
    "relative", "when", "whose", "who",
];

/// Head nouns that name an amount of what follows ("levels of NICD"): the noun after them is a
/// head too, so "NICD" names the variable as well as "levels of NICD" does.
const MEASURES: &[&str] = &[
    "level",
    "amount",
    "number",
    "concentr",
    "express",
    "activ",
    "rate",
    "frequenc",
    "abund",
    "product",
    "accumul",
    "releas",
    "format",
    "half",
    "size",
    "degre",
    "chang",
    "alter",
    "overexpress",
];

/// The head words of a gold text (stemmed): the last content word of each conjunct of its
/// first phrase ("A and B of C" gives A and B), the noun after a measure word, and the same for
/// a parenthesised gloss ("this interaction (Rev binding to the RRE)").
fn heads(norm: &Normalizer, text: &str) -> Vec<String> {
    let mut plain = String::new();
    let mut glosses = Vec::new();
    let mut depth = 0usize;
    for ch in text.chars() {
        match ch {
            '(' => {
                depth += 1;
                if depth == 1 {
                    glosses.push(String::new());
                }
            }
            ')' => depth = depth.saturating_sub(1),
            _ if depth > 0 => {
                if let Some(g) = glosses.last_mut() {
                    g.push(ch);
                }
            }
            _ => plain.push(ch),
        }
    }
    let mut out = Vec::new();
    for t in std::iter::once(plain.as_str()).chain(glosses.iter().map(String::as_str)) {
        phrase_heads(norm, t, &mut out);
    }
    out
}

fn phrase_heads(norm: &Normalizer, text: &str, out: &mut Vec<String>) {
    // A comma ends a conjunct as "and" does ("A, B or C"); it is kept as an empty word.
    let mut words: Vec<String> = Vec::new();
    for w in text.split_whitespace() {
        words.push(
            w.trim_matches(|c: char| !c.is_alphanumeric())
                .to_lowercase(),
        );
        if w.ends_with([',', ';']) {
            words.push(String::new());
        }
    }
    let end = words
        .iter()
        .position(|w| PHRASE_ENDS.contains(&w.as_str()))
        .unwrap_or(words.len());
    let mut last = None;
    for conjunct in words[..end].split(|w| matches!(w.as_str(), "and" | "or" | "nor" | "")) {
        if let Some(h) = norm.terms(&conjunct.join(" ")).pop() {
            last = Some(h.clone());
            out.push(h);
        }
    }
    let measured = last.is_some_and(|h| MEASURES.iter().any(|m| h.starts_with(m)));
    if measured && end < words.len() {
        let rest = &words[end + 1..];
        let stop = rest
            .iter()
            .position(|w| PHRASE_ENDS.contains(&w.as_str()))
            .unwrap_or(rest.len());
        for conjunct in rest[..stop].split(|w| matches!(w.as_str(), "and" | "or" | "nor" | "")) {
            out.extend(norm.terms(&conjunct.join(" ")).pop());
        }
    }
}

/// Does a predicted side match a gold side (see the module notes)? It names one of the gold's
/// head words, and at least half of its key words are in the gold's key.
fn side_matches(norm: &Normalizer, predicted: &str, gold: &str) -> bool {
    let p = norm.terms(predicted);
    let g = norm.terms(gold);
    let shared = p.iter().filter(|w| g.contains(w)).count();
    let heads = heads(norm, gold);
    shared > 0 && 2 * shared >= p.len() && p.iter().any(|w| heads.contains(w))
}

/// Does predicted claim `c` match gold claim `g`?
pub fn claim_matches(norm: &Normalizer, c: &Claim, g: &UsableClaim) -> bool {
    let same = side_matches(norm, &c.cause.text, &g.cause)
        && side_matches(norm, &c.effect.text, &g.effect);
    let either_order = c.kind == Kind::Association || g.kind == Kind::Association;
    same || (either_order
        && side_matches(norm, &c.cause.text, &g.effect)
        && side_matches(norm, &c.effect.text, &g.cause))
}

/// Extract the claims of one labelled sentence: the previous sentence and the sentence are read
/// as one document, and the claims of the labelled sentence are kept. Returns them with the
/// document text their offsets point into.
pub fn item_claims(ex: &Extractor, item: &UsableItem) -> (Vec<Claim>, String) {
    let text = if item.previous.is_empty() {
        item.sentence.clone()
    } else {
        format!("{} {}", item.previous, item.sentence)
    };
    let from = text.len() - item.sentence.len();
    let (claims, _) = sentence_attempts(ex, &text);
    let kept = claims
        .into_iter()
        .filter(|c| c.source.start >= from)
        .collect();
    (kept, text)
}

/// Score the extractor on a sample; every claim found is returned judged (usable or not) for the
/// confidence model's ranking and training.
pub fn score_usable(
    ex: &Extractor,
    norm: &Normalizer,
    items: &[UsableItem],
) -> (UsableScores, Vec<Judged>) {
    let mut s = UsableScores::default();
    let mut judged = Vec::new();
    for item in items {
        s.sentences += 1;
        s.gold += item.gold.len();
        let (claims, text) = item_claims(ex, item);
        let mut found = vec![false; item.gold.len()];
        for c in &claims {
            s.predicted += 1;
            let hit = item.gold.iter().position(|g| claim_matches(norm, c, g));
            for (i, g) in item.gold.iter().enumerate() {
                found[i] |= claim_matches(norm, c, g);
            }
            if let Some(i) = hit {
                s.usable += 1;
                s.polarity_agrees += usize::from(c.polarity == item.gold[i].polarity);
                s.modality_agrees += usize::from(c.modality == item.gold[i].modality);
            }
            let id = format!("{}@{}", item.doc, item.start);
            judged.push(Judged::new(c, &claims, &text, &id, hit.is_some()));
        }
        s.found += found.iter().filter(|&&f| f).count();
    }
    (s, judged)
}

/// The area under the ROC curve of scores for positives against negatives (the Mann–Whitney U
/// statistic over the number of pairs; ties count one half). `None` without both classes.
pub fn roc_auc(scored: &[(f64, bool)]) -> Option<f64> {
    let pos: Vec<f64> = scored.iter().filter(|x| x.1).map(|x| x.0).collect();
    let neg: Vec<f64> = scored.iter().filter(|x| !x.1).map(|x| x.0).collect();
    if pos.is_empty() || neg.is_empty() {
        return None;
    }
    let mut u = 0.0;
    for p in &pos {
        for n in &neg {
            u += if p > n {
                1.0
            } else if p == n {
                0.5
            } else {
                0.0
            };
        }
    }
    Some(u / (pos.len() * neg.len()) as f64)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    #[test]
    fn auc_of_a_perfect_a_reversed_and_a_tied_ranking() {
        let perfect = [(0.9, true), (0.8, true), (0.2, false), (0.1, false)];
        assert_eq!(roc_auc(&perfect), Some(1.0));
        let reversed: Vec<_> = perfect.iter().map(|&(p, y)| (p, !y)).collect();
        assert_eq!(roc_auc(&reversed), Some(0.0));
        assert_eq!(roc_auc(&[(0.5, true), (0.5, false)]), Some(0.5));
        assert_eq!(roc_auc(&[(0.5, true)]), None);
        // One discordant pair of four: 3/4 (worked by hand).
        assert_eq!(
            roc_auc(&[(0.9, true), (0.3, true), (0.5, false), (0.1, false)]),
            Some(0.75)
        );
    }

    #[test]
    fn heads_of_gold_texts() {
        let norm = Normalizer::new(&PatternSet::builtin().unwrap().lexicon);
        let h = |t: &str| heads(&norm, t);
        assert_eq!(h("exaggerated TPA response in EPI mice"), ["respons"]);
        assert_eq!(h("levels of NICD in the PSM"), ["level", "nicd"]);
        assert_eq!(h("sex or age of the mice"), ["sex", "age"]);
        assert_eq!(
            h("this interaction (Rev binding to the RRE)"),
            ["interact", "bind"]
        );
        let side = |p: &str, g: &str| side_matches(&norm, p, g);
        assert!(side("NICD", "levels of NICD"));
        assert!(side("higher levels of NICD", "levels of NICD"));
        assert!(!side("mice", "exaggerated TPA response in EPI mice"));
        assert!(!side("Msl2", "knockdown of Msl1 and Msl2"));
        assert!(!side("learning", "length of the pause"));
    }

    #[test]
    fn matching_is_by_shared_head_words_and_direction() {
        let set = PatternSet::builtin().unwrap();
        let norm = Normalizer::new(&set.lexicon);
        let ex = Extractor::new(&set).unwrap();
        let item = UsableItem {
            doc: "t".into(),
            path: "t".into(),
            start: 0,
            end: 0,
            previous: String::new(),
            sentence: "Heavy rainfall causes severe flooding.".into(),
            gold: vec![UsableClaim {
                cause: "heavy rainfall".into(),
                effect: "flooding".into(),
                kind: Kind::Causal,
                polarity: Polarity::Unsigned,
                modality: Modality::Asserted,
                note: String::new(),
            }],
            note: String::new(),
        };
        let (claims, _) = item_claims(&ex, &item);
        assert_eq!(claims.len(), 1, "{claims:?}");
        assert!(claim_matches(&norm, &claims[0], &item.gold[0]));
        let mut backwards = item.gold[0].clone();
        std::mem::swap(&mut backwards.cause, &mut backwards.effect);
        assert!(!claim_matches(&norm, &claims[0], &backwards));
        let (s, judged) = score_usable(&ex, &norm, &[item]);
        assert_eq!((s.predicted, s.usable, s.gold, s.found), (1, 1, 1, 1));
        assert!(judged[0].correct);
    }
}
