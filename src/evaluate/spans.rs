//! Scoring extraction against span-annotated gold data (read by `gold`: [`crate::evaluate::GoldDoc`]).
//!
//! The rule: a predicted claim *matches* a gold claim of the same document when the token-overlap
//! F1 of its cause span with the gold cause is at least [`MIN_OVERLAP_F1`], and the same holds
//! for the effects. Tokens are the words of [`crate::extract::tokenize`] (punctuation left out),
//! compared by position. Each gold claim is matched to at most one prediction and each
//! prediction to at most one gold claim; pairs are taken best first (by the smaller of the two
//! F1 scores), so a greedy assignment is stable and cheap. Unmatched predictions are false
//! positives, unmatched gold claims false negatives.
//!
//! Sentence-level data (gold with `causal` labels and no spans) is scored per text instead: a
//! text is predicted causal when at least one causal claim is found in it.

use crate::claim::{Claim, Kind};
use crate::corpus::Document;
use crate::evaluate::gold::{GoldClaim, GoldDoc};
use crate::evaluate::{GoldSpan, Judged, Reliability};
use crate::extract::{collapse, document_claims, tokenize, Extractor};
use serde::Serialize;
use std::collections::BTreeMap;

/// The least token-overlap F1 on each side for a match.
pub const MIN_OVERLAP_F1: f64 = 0.5;

/// True positives, false positives and false negatives, with the ratios.
#[derive(Debug, Clone, Default, Serialize, PartialEq)]
pub struct Prf {
    pub tp: usize,
    pub fp: usize,
    #[serde(rename = "fn")]
    pub fn_: usize,
    pub precision: f64,
    pub recall: f64,
    pub f1: f64,
}

impl Prf {
    fn finish(&mut self) {
        self.precision = ratio(self.tp, self.tp + self.fp);
        self.recall = ratio(self.tp, self.tp + self.fn_);
        self.f1 = if self.precision + self.recall > 0.0 {
            2.0 * self.precision * self.recall / (self.precision + self.recall)
        } else {
            0.0
        };
    }
}

/// Correct out of labelled, on matched claims.
#[derive(Debug, Clone, Default, Serialize, PartialEq)]
pub struct Accuracy {
    pub correct: usize,
    pub labelled: usize,
    pub accuracy: f64,
}

impl Accuracy {
    fn add(&mut self, ok: bool) {
        self.labelled += 1;
        self.correct += usize::from(ok);
    }
    fn finish(&mut self) {
        self.accuracy = ratio(self.correct, self.labelled);
    }
}

/// Sentence-level scores (causal or not), for data labelled per sentence.
#[derive(Debug, Clone, Default, Serialize, PartialEq)]
pub struct SentenceScores {
    pub sentences: usize,
    pub causal: usize,
    #[serde(flatten)]
    pub prf: Prf,
    pub accuracy: f64,
}

/// Everything `eval` reports for span-annotated data.
#[derive(Debug, Clone, Default, Serialize)]
pub struct SpanReport {
    pub documents: usize,
    pub gold_claims: usize,
    pub predicted_claims: usize,
    #[serde(flatten)]
    pub prf: Prf,
    /// The rule used, in words.
    pub rule: String,
    pub by_cue: BTreeMap<String, Prf>,
    pub by_kind: BTreeMap<String, Prf>,
    pub by_polarity: BTreeMap<String, Prf>,
    pub by_modality: BTreeMap<String, Prf>,
    /// Accuracy on matched claims whose gold gives the value.
    pub kind_accuracy: Accuracy,
    pub polarity_accuracy: Accuracy,
    pub modality_accuracy: Accuracy,
    /// BECAUSE sign (Facilitate = increase/unsigned, Inhibit = decrease/prevent).
    pub sign_accuracy: Accuracy,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub sentence_level: Option<SentenceScores>,
    /// Confidence against observed precision on the predicted claims.
    pub reliability: Reliability,
}

/// A cause–effect pair as text, for error listings.
#[derive(Debug, Clone, Serialize)]
pub struct PairText {
    pub cause: String,
    pub effect: String,
    #[serde(skip_serializing_if = "Option::is_none")]
    pub cue: Option<String>,
}

/// One false positive or false negative.
#[derive(Debug, Clone, Serialize)]
pub struct SpanError {
    pub id: String,
    /// `false_positive` or `false_negative`.
    pub outcome: &'static str,
    pub sentence: String,
    /// The gold pair (false negative) or the predicted one (false positive).
    pub pair: PairText,
    /// For a false negative, what was predicted in the same sentence; for a false positive, the
    /// gold pairs of that sentence.
    pub nearby: Vec<PairText>,
}

use crate::evaluate::ratio;

/// Word-token ranges of a text, by start offset.
struct Words(Vec<(usize, usize)>);

impl Words {
    fn new(text: &str) -> Self {
        Words(
            tokenize(text)
                .into_iter()
                .filter(|t| t.word)
                .map(|t| (t.start, t.end))
                .collect(),
        )
    }
    /// Indices of the words overlapping a byte range.
    fn within(&self, s: usize, e: usize) -> std::ops::Range<usize> {
        let a = self.0.partition_point(|&(_, we)| we <= s);
        let b = self.0.partition_point(|&(ws, _)| ws < e);
        a..b.max(a)
    }
}

/// Token-overlap F1 of two ranges of word indices.
pub fn overlap_f1(a: std::ops::Range<usize>, b: std::ops::Range<usize>) -> f64 {
    let inter = a.end.min(b.end).saturating_sub(a.start.max(b.start));
    let total = a.len() + b.len();
    if total == 0 {
        0.0
    } else {
        2.0 * inter as f64 / total as f64
    }
}

fn doc_claims(ex: &Extractor, d: &GoldDoc) -> Vec<Claim> {
    let doc = Document {
        path: d.id.clone(),
        record: None,
        text: d.text.clone(),
        page_starts: Vec::new(),
        lines_are_paragraphs: d.lines_are_paragraphs,
    };
    document_claims(ex, &doc)
}

/// The sentence of a document around a byte offset.
fn sentence_at(text: &str, sentences: &[crate::sentences::SentenceSpan], at: usize) -> String {
    sentences
        .iter()
        .find(|s| s.start <= at && at < s.end)
        .map(|s| collapse(&text[s.start..s.end]))
        .unwrap_or_else(|| collapse(text))
}

fn gold_text(text: &str, g: &GoldClaim) -> PairText {
    let t = |s: GoldSpan| text.get(s.start..s.end).unwrap_or("").to_string();
    PairText {
        cause: t(g.cause),
        effect: t(g.effect),
        cue: g.label.clone(),
    }
}

fn pred_text(c: &Claim) -> PairText {
    PairText {
        cause: c.cause.text.clone(),
        effect: c.effect.text.clone(),
        cue: Some(c.cue.clone()),
    }
}

/// Score extraction on span-annotated documents; also return every error.
pub fn score_spans(ex: &Extractor, docs: &[GoldDoc]) -> (SpanReport, Vec<SpanError>) {
    let (r, errors, _) = score_spans_judged(ex, docs);
    (r, errors)
}

/// Like [`score_spans`], also returning the claims judged for the reliability table and for
/// training: right when matched, or when its spans lie inside the spans of one gold claim
/// (`reads_inside`); wrong otherwise when one of its spans shares a word
/// with a span of a gold claim in the same sentence (the annotators read that part of the
/// sentence, and hearsay read it differently: wrong spans or the wrong direction). An unmatched
/// claim that touches no gold span is not judged: the annotation scheme may simply not cover
/// that relation (a stated change, say), so it cannot tell a right reading from a wrong one.
/// Documents labelled only per sentence give no judgements.
pub fn score_spans_judged(
    ex: &Extractor,
    docs: &[GoldDoc],
) -> (SpanReport, Vec<SpanError>, Vec<Judged>) {
    let mut judged = Vec::new();
    let mut r = SpanReport {
        documents: docs.len(),
        rule: format!(
            "token-overlap F1 >= {MIN_OVERLAP_F1} on both cause and effect, one-to-one, best first"
        ),
        ..SpanReport::default()
    };
    let mut errors = Vec::new();
    let mut sent = SentenceScores::default();
    let mut sentence_labels = false;
    for d in docs {
        let claims = doc_claims(ex, d);
        if let Some(gold_causal) = d.causal {
            sentence_labels = true;
            score_sentence_label(d, gold_causal, &claims, &mut sent, &mut errors);
            continue;
        }
        r.gold_claims += d.claims.len();
        r.predicted_claims += claims.len();
        let words = Words::new(&d.text);
        let (gold_match, pred_used) = match_claims(&words, &d.claims, &claims);
        count_gold(&mut r, d, &claims, &gold_match, &mut errors);
        for (pi, c) in claims.iter().enumerate() {
            let right = pred_used[pi] || reads_inside(&words, c, &d.claims);
            if right || touches_gold(&words, c, &d.claims) {
                judged.push(Judged::new(c, &claims, &d.text, &d.id, right));
            }
            if !pred_used[pi] {
                count_false_positive(&mut r, d, c, &mut errors);
            }
        }
    }
    finish(&mut r);
    if sentence_labels {
        sent.prf.finish();
        sent.accuracy = ratio(sent.sentences - sent.prf.fp - sent.prf.fn_, sent.sentences);
        r.sentence_level = Some(sent);
    }
    r.reliability = Reliability::from_judged(&judged);
    (r, errors, judged)
}

/// A document labelled only as a whole (causal or not): counted per sentence.
fn score_sentence_label(
    d: &GoldDoc,
    gold_causal: bool,
    claims: &[Claim],
    sent: &mut SentenceScores,
    errors: &mut Vec<SpanError>,
) {
    sent.sentences += 1;
    sent.causal += usize::from(gold_causal);
    let predicted = claims.iter().any(|c| c.kind == Kind::Causal);
    match (predicted, gold_causal) {
        (true, true) => sent.prf.tp += 1,
        (true, false) => sent.prf.fp += 1,
        (false, true) => sent.prf.fn_ += 1,
        (false, false) => {}
    }
    if predicted != gold_causal {
        let pairs: Vec<PairText> = claims.iter().map(pred_text).collect();
        errors.push(SpanError {
            id: d.id.clone(),
            outcome: if predicted {
                "false_positive"
            } else {
                "false_negative"
            },
            sentence: collapse(&d.text),
            pair: pairs.first().cloned().unwrap_or(PairText {
                cause: String::new(),
                effect: String::new(),
                cue: None,
            }),
            nearby: pairs.into_iter().skip(1).collect(),
        });
    }
}

/// Gold claims matched to predicted ones, one to one, best overlap first: per gold claim its
/// match, and per predicted claim whether it was used. Claims carry document offsets, and a gold
/// document is the whole text, so they agree.
fn match_claims(
    words: &Words,
    gold: &[GoldClaim],
    claims: &[Claim],
) -> (Vec<Option<usize>>, Vec<bool>) {
    let mut candidates: Vec<(f64, usize, usize)> = Vec::new();
    for (gi, g) in gold.iter().enumerate() {
        let gc = words.within(g.cause.start, g.cause.end);
        let ge = words.within(g.effect.start, g.effect.end);
        for (pi, c) in claims.iter().enumerate() {
            let fc = overlap_f1(gc.clone(), words.within(c.cause.start, c.cause.end));
            let fe = overlap_f1(ge.clone(), words.within(c.effect.start, c.effect.end));
            let m = fc.min(fe);
            if m >= MIN_OVERLAP_F1 {
                candidates.push((m, gi, pi));
            }
        }
    }
    candidates.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)).then(a.2.cmp(&b.2)));
    let mut gold_match = vec![None; gold.len()];
    let mut pred_used = vec![false; claims.len()];
    for (_, gi, pi) in candidates {
        if gold_match[gi].is_none() && !pred_used[pi] {
            gold_match[gi] = Some(pi);
            pred_used[pi] = true;
        }
    }
    (gold_match, pred_used)
}

/// Count each gold claim of `d`: a true positive with its labels compared, or a false negative.
fn count_gold(
    r: &mut SpanReport,
    d: &GoldDoc,
    claims: &[Claim],
    gold_match: &[Option<usize>],
    errors: &mut Vec<SpanError>,
) {
    let spans = if errors_wanted_for(d) {
        crate::sentences::split(&d.text)
    } else {
        Vec::new()
    };
    for (gi, g) in d.claims.iter().enumerate() {
        match gold_match[gi] {
            Some(pi) => {
                let c = &claims[pi];
                r.prf.tp += 1;
                bump(&mut r.by_cue, &c.cue, |p| p.tp += 1);
                bump(&mut r.by_kind, c.kind.as_str(), |p| p.tp += 1);
                bump(&mut r.by_polarity, c.polarity.as_str(), |p| p.tp += 1);
                bump(&mut r.by_modality, c.modality.as_str(), |p| p.tp += 1);
                if let Some(k) = g.kind {
                    r.kind_accuracy.add(k == c.kind);
                }
                if let Some(p) = g.polarity {
                    r.polarity_accuracy.add(p == c.polarity);
                }
                if let Some(m) = g.modality {
                    r.modality_accuracy.add(m == c.modality);
                }
                if let Some(s) = g.sign {
                    r.sign_accuracy.add(s.agrees(c.polarity));
                }
            }
            None => {
                r.prf.fn_ += 1;
                let kind = g.kind.map_or("unlabelled", Kind::as_str);
                bump(&mut r.by_kind, kind, |p| p.fn_ += 1);
                let pol = g.polarity.map_or("unlabelled", |p| p.as_str());
                bump(&mut r.by_polarity, pol, |p| p.fn_ += 1);
                let m = g.modality.map_or("unlabelled", |m| m.as_str());
                bump(&mut r.by_modality, m, |p| p.fn_ += 1);
                let at = g.cause.start.min(g.effect.start);
                let s = sentence_at(&d.text, &spans, at);
                let nearby = claims
                    .iter()
                    .filter(|c| c.source.start <= at && at < c.source.end)
                    .map(pred_text)
                    .collect();
                errors.push(SpanError {
                    id: d.id.clone(),
                    outcome: "false_negative",
                    sentence: s,
                    pair: gold_text(&d.text, g),
                    nearby,
                });
            }
        }
    }
}

/// Count a predicted claim that matched no gold claim of `d`.
fn count_false_positive(r: &mut SpanReport, d: &GoldDoc, c: &Claim, errors: &mut Vec<SpanError>) {
    r.prf.fp += 1;
    bump(&mut r.by_cue, &c.cue, |p| p.fp += 1);
    bump(&mut r.by_kind, c.kind.as_str(), |p| p.fp += 1);
    bump(&mut r.by_polarity, c.polarity.as_str(), |p| p.fp += 1);
    bump(&mut r.by_modality, c.modality.as_str(), |p| p.fp += 1);
    let nearby = d
        .claims
        .iter()
        .filter(|g| {
            let at = g.cause.start.min(g.effect.start);
            c.source.start <= at && at < c.source.end
        })
        .map(|g| gold_text(&d.text, g))
        .collect();
    errors.push(SpanError {
        id: d.id.clone(),
        outcome: "false_positive",
        sentence: c.sentence.clone(),
        pair: pred_text(c),
        nearby,
    });
}

/// Turn the span report's counts into rates.
fn finish(r: &mut SpanReport) {
    r.prf.finish();
    for m in [
        &mut r.by_cue,
        &mut r.by_kind,
        &mut r.by_polarity,
        &mut r.by_modality,
    ] {
        m.values_mut().for_each(Prf::finish);
    }
    for a in [
        &mut r.kind_accuracy,
        &mut r.polarity_accuracy,
        &mut r.modality_accuracy,
        &mut r.sign_accuracy,
    ] {
        a.finish();
    }
}

/// Do the cause and effect of `c` lie, word for word, inside the cause and the effect of one gold
/// claim? Then hearsay read the relation the annotators marked, with shorter spans: event-level
/// annotation (the Causal News Corpus) marks whole clauses where hearsay takes the noun phrase.
fn reads_inside(words: &Words, c: &Claim, gold: &[GoldClaim]) -> bool {
    let within = |x: std::ops::Range<usize>, y: std::ops::Range<usize>| {
        !x.is_empty() && y.start <= x.start && x.end <= y.end
    };
    let cause = words.within(c.cause.start, c.cause.end);
    let effect = words.within(c.effect.start, c.effect.end);
    c.kind == Kind::Causal
        && gold.iter().any(|g| {
            within(cause.clone(), words.within(g.cause.start, g.cause.end))
                && within(effect.clone(), words.within(g.effect.start, g.effect.end))
        })
}

/// Does a span of `c` share a word with a span of a gold claim in the claim's sentence?
fn touches_gold(words: &Words, c: &Claim, gold: &[GoldClaim]) -> bool {
    let (a, b) = (c.source.start, c.source.end);
    let inside = |g: GoldSpan| g.start < b && a < g.end;
    let shares = |x: std::ops::Range<usize>, y: std::ops::Range<usize>| {
        x.start.max(y.start) < x.end.min(y.end)
    };
    let mine = [
        words.within(c.cause.start, c.cause.end),
        words.within(c.effect.start, c.effect.end),
    ];
    gold.iter()
        .flat_map(|g| [g.cause, g.effect])
        .filter(|&g| inside(g))
        .any(|g| {
            let w = words.within(g.start, g.end);
            mine.iter().any(|m| shares(m.clone(), w.clone()))
        })
}

/// Documents longer than one sentence need the splitter to name an error's sentence.
fn errors_wanted_for(d: &GoldDoc) -> bool {
    d.text.len() > 400
}

fn bump(m: &mut BTreeMap<String, Prf>, key: &str, f: impl FnOnce(&mut Prf)) {
    f(m.entry(key.to_string()).or_default());
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::evaluate::gold::{parse_because, parse_cnc, parse_jsonl, Sign};
    use crate::patterns::PatternSet;

    fn ex() -> Extractor {
        Extractor::new(&PatternSet::builtin().unwrap()).unwrap()
    }

    #[test]
    fn overlap_f1_counts_shared_words() {
        assert_eq!(overlap_f1(0..2, 0..2), 1.0);
        assert_eq!(overlap_f1(0..4, 2..4), 2.0 * 2.0 / 6.0);
        assert_eq!(overlap_f1(0..2, 3..5), 0.0);
    }

    #[test]
    fn jsonl_gold_scores_a_match_and_a_false_positive() {
        let gold = "# invented\n{\"sentence\": \"Heavy rain causes flooding.\", \"claims\": [{\"cause\": \"Heavy rain\", \"effect\": \"flooding\", \"polarity\": \"increase\", \"modality\": \"asserted\"}]}\n{\"sentence\": \"Smoking causes cancer.\", \"claims\": []}\n";
        let docs = parse_jsonl("g.jsonl", gold).unwrap();
        assert_eq!(docs.len(), 2);
        let (r, errors) = score_spans(&ex(), &docs);
        assert_eq!((r.prf.tp, r.prf.fp, r.prf.fn_), (1, 1, 0), "{r:#?}");
        assert_eq!(r.modality_accuracy.labelled, 1);
        assert_eq!(errors.len(), 1);
        assert_eq!(errors[0].outcome, "false_positive");
    }

    #[test]
    fn jsonl_rejects_a_span_not_in_the_sentence() {
        let e = parse_jsonl(
            "g",
            "{\"sentence\": \"a b\", \"claims\": [{\"cause\": \"x\", \"effect\": \"b\"}]}",
        )
        .unwrap_err();
        assert!(e.to_string().contains("g:1"), "{e}");
    }

    #[test]
    fn because_standoff_gives_spans_and_sign() {
        let text = "Tariffs reduce trade. Rain causes floods.";
        let ann = "T1\tArgument 0 7\tTariffs\nT2\tArgument 15 20\ttrade\nT3\tConsequence 8 14\treduce\nE1\tConsequence:T3 Cause:T1 Effect:T2\nA1\tDegree E1 Inhibit\nT4\tArgument 22 26\tRain\nT5\tArgument 34 40\tfloods\nT6\tConsequence 27 33\tcauses\nE2\tConsequence:T6 Cause:T4 Effect:T5\n";
        let d = parse_because("x", text, ann).unwrap();
        assert_eq!(d.claims.len(), 2);
        assert_eq!(d.claims[0].sign, Some(Sign::Inhibit));
        assert_eq!(d.claims[1].sign, Some(Sign::Facilitate));
        assert_eq!(
            &text[d.claims[1].effect.start..d.claims[1].effect.end],
            "floods"
        );
    }

    #[test]
    fn cnc_rows_of_one_sentence_are_grouped() {
        let csv = "corpus,doc_id,sent_id,eg_id,index,text,text_w_pairs,seq_label,pair_label,context,num_sents\ncnc,d1,1,0,i0,\"A B\",\"<ARG0>Rain</ARG0> <SIG0>caused</SIG0> <ARG1>floods</ARG1> .\",1,1,,1\ncnc,d1,1,1,i1,\"A B\",\"<ARG1>Rain</ARG1> caused <ARG0>x</ARG0> .\",1,1,,1\n";
        let docs = parse_cnc("c.csv", csv).unwrap();
        assert_eq!(docs.len(), 1);
        assert_eq!(docs[0].text, "Rain caused floods .");
        assert_eq!(docs[0].claims.len(), 2);
        let c = &docs[0].claims[0];
        assert_eq!(&docs[0].text[c.cause.start..c.cause.end], "Rain");
    }
}
