//! Scoring extraction against labelled data.
//!
//! A gold item is a sentence with the cause and effect spans it states (or, for a negative, the
//! marked pair it does not relate causally). Extraction runs on the sentence with the same
//! pipeline as `scan`; a predicted claim *matches* a gold pair when its cause span contains the
//! gold cause, its effect span contains the gold effect, and neither span is more than
//! [`MAX_EXTRA_WORDS`] words longer than the gold text.
//!
//! Formats: `semeval2010` (SemEval-2010 Task 8: one numbered, quoted sentence with `<e1>`/`<e2>`
//! tags, then the relation label, then a comment line).
//!
//! The public face: [`parse_semeval`] and [`score_pairs`] for marked pairs (this file);
//! [`parse_because`], [`parse_cnc`] and [`parse_jsonl`] read span-annotated documents
//! ([`GoldDoc`], `gold`), which [`score_spans`] scores by token overlap (`spans`). The
//! `_judged` variants also return every claim judged right or wrong ([`Judged`]), which the
//! [`Reliability`] table and confidence training use. [`reference`](mod@reference) scores a claim graph against
//! a reference diagram; it stays a module of its own, as its `Scores` and `Prf` are not these.
//! [`usable`](mod@usable) scores claims found in real text against sentences labelled with the
//! claims a reader would accept, and ranks confidence by ROC AUC.

mod gold;
pub mod reference;
mod spans;
pub mod usable;

pub use gold::{parse_because, parse_cnc, parse_jsonl, GoldClaim, GoldDoc, Sign};
pub use spans::{
    overlap_f1, score_spans, score_spans_judged, Accuracy, PairText, Prf, SentenceScores,
    SpanError, SpanReport, MIN_OVERLAP_F1,
};

use crate::claim::{Claim, Kind};
use crate::extract::{sentence_attempts, tokenize, Extractor};
use serde::Serialize;
use std::collections::BTreeMap;

/// How many more words than the gold nominal a matching span may have.
pub const MAX_EXTRA_WORDS: usize = 6;

/// A byte range in a gold sentence.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub struct GoldSpan {
    pub start: usize,
    pub end: usize,
}

/// One labelled sentence.
#[derive(Debug, Clone, Serialize)]
pub struct GoldItem {
    pub id: String,
    pub text: String,
    /// The marked pair in sentence order (SemEval's e1, e2).
    pub pair: (GoldSpan, GoldSpan),
    /// For a causal item, (cause, effect); `None` for a negative.
    pub causal: Option<(GoldSpan, GoldSpan)>,
    pub label: String,
}

/// Parse the SemEval-2010 Task 8 file format.
pub fn parse_semeval(text: &str) -> Result<Vec<GoldItem>, String> {
    let mut items = Vec::new();
    let lines: Vec<&str> = text.lines().collect();
    let mut i = 0;
    while i < lines.len() {
        let line = lines[i].trim_start_matches('\u{feff}').trim();
        if line.is_empty() {
            i += 1;
            continue;
        }
        let (id, quoted) = line
            .split_once('\t')
            .ok_or_else(|| format!("line {}: expected 'ID<TAB>\"sentence\"'", i + 1))?;
        let label = lines
            .get(i + 1)
            .map(|l| l.trim())
            .ok_or_else(|| format!("line {}: missing relation label", i + 2))?;
        let sentence = quoted.trim().trim_matches('"');
        let (plain, e1, e2) = strip_tags(sentence)
            .ok_or_else(|| format!("line {}: missing <e1>/<e2> tags", i + 1))?;
        let causal = match label {
            "Cause-Effect(e1,e2)" => Some((e1, e2)),
            "Cause-Effect(e2,e1)" => Some((e2, e1)),
            _ => None,
        };
        items.push(GoldItem {
            id: id.trim().to_string(),
            text: plain,
            pair: (e1, e2),
            causal,
            label: label.to_string(),
        });
        i += 2;
        // Skip the comment line and blank separator.
        while i < lines.len() && !lines[i].trim().is_empty() && !lines[i].contains('\t') {
            i += 1;
        }
    }
    Ok(items)
}

fn strip_tags(s: &str) -> Option<(String, GoldSpan, GoldSpan)> {
    let mut out = String::with_capacity(s.len());
    let mut spans: BTreeMap<&str, (usize, usize)> = BTreeMap::new();
    let mut rest = s;
    while let Some(p) = rest.find('<') {
        out.push_str(&rest[..p]);
        let tag_end = rest[p..].find('>')? + p;
        let tag = &rest[p + 1..tag_end];
        match tag {
            "e1" | "e2" => {
                spans
                    .entry(if tag == "e1" { "e1" } else { "e2" })
                    .or_insert((0, 0))
                    .0 = out.len();
            }
            "/e1" | "/e2" => {
                spans
                    .entry(if tag == "/e1" { "e1" } else { "e2" })
                    .or_insert((0, 0))
                    .1 = out.len();
            }
            _ => out.push_str(&rest[p..=tag_end]),
        }
        rest = &rest[tag_end + 1..];
    }
    out.push_str(rest);
    let e1 = spans.get("e1")?;
    let e2 = spans.get("e2")?;
    Some((
        out,
        GoldSpan {
            start: e1.0,
            end: e1.1,
        },
        GoldSpan {
            start: e2.0,
            end: e2.1,
        },
    ))
}

fn words(s: &str) -> usize {
    tokenize(s).iter().filter(|t| t.word).count()
}

/// Does a predicted slot cover a gold span, within the length allowance?
pub fn covers(text: &str, slot_start: usize, slot_end: usize, gold: GoldSpan) -> bool {
    slot_start <= gold.start
        && gold.end <= slot_end
        && words(&text[slot_start..slot_end])
            <= words(&text[gold.start..gold.end]) + MAX_EXTRA_WORDS
}

fn matches(text: &str, c: &Claim, cause: GoldSpan, effect: GoldSpan) -> bool {
    c.kind == Kind::Causal
        && covers(text, c.cause.start, c.cause.end, cause)
        && covers(text, c.effect.start, c.effect.end, effect)
}

/// What happened to one item.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Outcome {
    TruePositive,
    FalseNegative,
    /// A claim for the pair in the wrong direction on a causal item (counted as FP and FN).
    WrongDirection,
    FalsePositive,
    TrueNegative,
}

/// Precision, recall and F1 with the counts behind them.
#[derive(Debug, Clone, Default, Serialize)]
pub struct Scores {
    pub items: usize,
    pub positives: usize,
    pub tp: usize,
    pub fp: usize,
    pub fn_: usize,
    pub precision: f64,
    pub recall: f64,
    pub f1: f64,
    /// Share of negative items on which a claim was found for the marked pair.
    pub negative_claim_rate: f64,
    pub by_cue: BTreeMap<String, CueScore>,
    /// Confidence against observed precision on the judged claims.
    pub reliability: Reliability,
}

/// True and false positives of one cue.
#[derive(Debug, Clone, Default, Serialize)]
pub struct CueScore {
    pub tp: usize,
    pub fp: usize,
}

/// One scored item, for `--errors`.
#[derive(Debug, Clone, Serialize)]
pub struct Scored {
    pub id: String,
    pub outcome: Outcome,
    pub text: String,
    pub gold: Option<(String, String)>,
    pub predicted: Vec<(String, String, String)>,
}

/// One claim with its judgement against the gold data, for the reliability table and training.
#[derive(Debug, Clone)]
pub struct Judged {
    pub claim: Claim,
    /// The raw text of the claim's sentence (the claim's offsets are into its document).
    pub sentence: String,
    /// Where the sentence is, for a held-out split that keeps a sentence on one side.
    pub unit: String,
    /// How many claims the sentence gave (a feature of the confidence model).
    pub claims_here: usize,
    pub correct: bool,
}

impl Judged {
    /// Judge `claim`, one of `all` found in a document with text `doc_text`.
    pub fn new(claim: &Claim, all: &[Claim], doc_text: &str, doc_id: &str, correct: bool) -> Self {
        let (a, b) = (claim.source.start, claim.source.end);
        Judged {
            claim: claim.clone(),
            sentence: doc_text.get(a..b).unwrap_or("").to_string(),
            unit: format!("{doc_id}@{a}"),
            claims_here: all.iter().filter(|c| c.source.start == a).count(),
            correct,
        }
    }
}

/// How many equal-width confidence bins the reliability table has.
pub const RELIABILITY_BINS: usize = 10;

/// One bin of the reliability table.
#[derive(Debug, Clone, Default, Serialize, PartialEq)]
pub struct Bin {
    /// The bin is [low, high), the last one [low, 1].
    pub low: f64,
    pub high: f64,
    pub claims: usize,
    pub mean_confidence: f64,
    /// Share of the bin's claims judged correct.
    pub observed_precision: f64,
}

/// Does the confidence mean what it says? Claims binned by confidence, each bin's mean confidence
/// against its observed precision, with the expected calibration error (the claim-weighted mean
/// of |observed - mean confidence| over bins) and the Brier score (mean squared difference of
/// confidence and outcome).
#[derive(Debug, Clone, Default, Serialize, PartialEq)]
pub struct Reliability {
    pub claims: usize,
    pub correct: usize,
    pub bins: Vec<Bin>,
    pub expected_calibration_error: f64,
    pub brier: f64,
}

impl Reliability {
    /// From (confidence, correct) pairs.
    pub fn from_outcomes(outcomes: impl IntoIterator<Item = (f64, bool)>) -> Reliability {
        let n = RELIABILITY_BINS;
        let mut sums = vec![(0usize, 0.0f64, 0usize); n];
        let mut r = Reliability::default();
        let mut brier = 0.0;
        for (p, ok) in outcomes {
            let p = p.clamp(0.0, 1.0);
            let b = ((p * n as f64) as usize).min(n - 1);
            sums[b].0 += 1;
            sums[b].1 += p;
            sums[b].2 += usize::from(ok);
            r.claims += 1;
            r.correct += usize::from(ok);
            brier += (p - f64::from(u8::from(ok))).powi(2);
        }
        let mut ece = 0.0;
        for (i, &(count, sum, ok)) in sums.iter().enumerate() {
            let bin = Bin {
                low: i as f64 / n as f64,
                high: (i + 1) as f64 / n as f64,
                claims: count,
                mean_confidence: if count > 0 { sum / count as f64 } else { 0.0 },
                observed_precision: ratio(ok, count),
            };
            ece += count as f64 * (bin.observed_precision - bin.mean_confidence).abs();
            r.bins.push(bin);
        }
        if r.claims > 0 {
            r.expected_calibration_error = ece / r.claims as f64;
            r.brier = brier / r.claims as f64;
        }
        r
    }

    pub fn from_judged(judged: &[Judged]) -> Reliability {
        Reliability::from_outcomes(judged.iter().map(|j| (j.claim.confidence, j.correct)))
    }
}

fn overlaps(c: &Claim, g: GoldSpan) -> bool {
    let side = |s: &crate::claim::Slot| s.start < g.end && g.start < s.end;
    side(&c.cause) || side(&c.effect)
}

/// The verdict on a claim of a Cause-Effect item that does not match its pair: wrong when it
/// gives the pair backwards, puts a gold nominal on the wrong side, or has a span that touches a
/// gold nominal without covering it within the allowance; not judged when one side reads its
/// gold nominal right and the other touches neither (the sentence may state more than the one
/// marked pair: in "A and B cause C" the annotation marks one of A and B), nor when the claim
/// touches no gold nominal.
fn judge_causal_item(text: &str, c: &Claim, cause: GoldSpan, effect: GoldSpan) -> Option<bool> {
    let touches = |s: &crate::claim::Slot, g: GoldSpan| s.start < g.end && g.start < s.end;
    let reads = |s: &crate::claim::Slot, g: GoldSpan| covers(text, s.start, s.end, g);
    if touches(&c.cause, effect) || touches(&c.effect, cause) || c.kind != Kind::Causal {
        return (overlaps(c, cause) || overlaps(c, effect)).then_some(false);
    }
    let cause_ok = reads(&c.cause, cause);
    let effect_ok = reads(&c.effect, effect);
    let cause_bad = touches(&c.cause, cause) && !cause_ok;
    let effect_bad = touches(&c.effect, effect) && !effect_ok;
    if cause_bad || effect_bad {
        Some(false)
    } else {
        None
    }
}

/// Is a SemEval label the catch-all `Other` (no relation of the scheme)?
fn is_other(label: &str) -> bool {
    label.trim().eq_ignore_ascii_case("other")
}

/// Score extraction on SemEval-style items (one marked pair each).
pub fn score_pairs(ex: &Extractor, items: &[GoldItem]) -> (Scores, Vec<Scored>) {
    let (s, scored, _) = score_pairs_judged(ex, items);
    (s, scored)
}

/// Like [`score_pairs`], also judging single claims: is hearsay's reading of the sentence right,
/// as far as the annotation can tell? A claim is right when it matches the gold pair. On a
/// Cause-Effect item it is wrong when it misreads the marked pair (`judge_causal_item`). It is
/// also wrong when it relates the marked pair of an item whose label
/// names another, non-causal relation (the pair is a part and its whole, a product and its
/// producer, ...: a causal reading of that pair is a misreading). A claim on the pair of an item
/// labelled `Other` is not judged: that label says only that none of the nine relations applies,
/// and the scheme's Cause-Effect is narrower than a stated effect ("X reduces Y" is often
/// `Other`), so it cannot tell a right reading from a wrong one. Other claims (about words the
/// annotation does not speak of) are not judged either.
pub fn score_pairs_judged(
    ex: &Extractor,
    items: &[GoldItem],
) -> (Scores, Vec<Scored>, Vec<Judged>) {
    let mut judged = Vec::new();
    let mut s = Scores {
        items: items.len(),
        ..Scores::default()
    };
    let mut scored = Vec::with_capacity(items.len());
    let mut negatives = 0;
    let mut neg_hits = 0;
    for it in items {
        let (claims, _) = sentence_attempts(ex, &it.text);
        let (a, b) = it.pair;
        let fwd = |c: &&Claim, x: GoldSpan, y: GoldSpan| matches(&it.text, c, x, y);
        let outcome;
        let mut credited: Option<&Claim> = None;
        if let Some((cause, effect)) = it.causal {
            s.positives += 1;
            if let Some(c) = claims.iter().find(|c| fwd(c, cause, effect)) {
                outcome = Outcome::TruePositive;
                s.tp += 1;
                credited = Some(c);
                s.by_cue.entry(c.cue.clone()).or_default().tp += 1;
            } else if let Some(c) = claims.iter().find(|c| fwd(c, effect, cause)) {
                outcome = Outcome::WrongDirection;
                s.fp += 1;
                s.fn_ += 1;
                s.by_cue.entry(c.cue.clone()).or_default().fp += 1;
            } else {
                outcome = Outcome::FalseNegative;
                s.fn_ += 1;
            }
        } else {
            negatives += 1;
            if let Some(c) = claims.iter().find(|c| fwd(c, a, b) || fwd(c, b, a)) {
                outcome = Outcome::FalsePositive;
                s.fp += 1;
                neg_hits += 1;
                s.by_cue.entry(c.cue.clone()).or_default().fp += 1;
            } else {
                outcome = Outcome::TrueNegative;
            }
        }
        let _ = credited;
        for c in &claims {
            let verdict = match it.causal {
                Some((cause, effect)) if fwd(&c, cause, effect) => Some(true),
                Some((cause, effect)) => judge_causal_item(&it.text, c, cause, effect),
                None if is_other(&it.label) => None,
                None => (fwd(&c, a, b) || fwd(&c, b, a)).then_some(false),
            };
            if let Some(ok) = verdict {
                judged.push(Judged::new(c, &claims, &it.text, &it.id, ok));
            }
        }
        scored.push(Scored {
            id: it.id.clone(),
            outcome,
            text: it.text.clone(),
            gold: it.causal.map(|(c, e)| {
                (
                    it.text[c.start..c.end].to_string(),
                    it.text[e.start..e.end].to_string(),
                )
            }),
            predicted: claims
                .iter()
                .map(|c| (c.cause.text.clone(), c.effect.text.clone(), c.cue.clone()))
                .collect(),
        });
    }
    s.precision = ratio(s.tp, s.tp + s.fp);
    s.recall = ratio(s.tp, s.tp + s.fn_);
    s.f1 = if s.precision + s.recall > 0.0 {
        2.0 * s.precision * s.recall / (s.precision + s.recall)
    } else {
        0.0
    };
    s.negative_claim_rate = ratio(neg_hits, negatives);
    s.reliability = Reliability::from_judged(&judged);
    (s, scored, judged)
}

pub(crate) fn ratio(a: usize, b: usize) -> f64 {
    if b == 0 {
        0.0
    } else {
        a as f64 / b as f64
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_semeval_records() {
        let text = "1\t\"The <e1>fire</e1> was caused by a <e2>spark</e2>.\"\nCause-Effect(e2,e1)\nComment:\n\n2\t\"A <e1>cup</e1> on the <e2>table</e2>.\"\nOther\nComment:\n\n";
        let items = parse_semeval(text).unwrap();
        assert_eq!(items.len(), 2);
        let it = &items[0];
        assert_eq!(it.text, "The fire was caused by a spark.");
        let (c, e) = it.causal.unwrap();
        assert_eq!(&it.text[c.start..c.end], "spark");
        assert_eq!(&it.text[e.start..e.end], "fire");
        assert!(items[1].causal.is_none());
    }

    #[test]
    fn coverage_allows_six_extra_words() {
        let t = "one two three four five six seven eight";
        let g = GoldSpan { start: 0, end: 3 };
        assert!(covers(t, 0, t.find(" eight").unwrap(), g));
        assert!(!covers(t, 0, t.len(), g));
        assert!(!covers(t, 4, t.len(), g));
    }
}
