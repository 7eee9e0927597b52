//! A calibrated confidence for each claim: how likely it is that the claim's cause and effect
//! spans agree with what a human annotator marked.
//!
//! The model is a logistic regression over named, binary features of one claim match (the cue and
//! its family, kind, polarity and modality, span lengths, the part of speech of each span's first
//! and last word, finite verbs inside a span, the words between the spans, punctuation, sentence
//! length, how many claims the sentence gave, whether a slot came from the previous sentence).
//! It is deliberately small and transparent: the weights file (`patterns/confidence.toml`) lists
//! every feature with its weight, so a reader can add up why a claim got 0.8.
//!
//! Features are computed from the claim and the raw text of its sentence only, so the model is
//! trained (`hearsay train-confidence`, see [`train`]) on exactly what the pipeline sees. The
//! tags are those the span finder saw (the words of each cue match's tagging window), passed in
//! by the caller ([`TaggedSentence::from_tokens`]), so nothing is tagged twice.
//!
//! The model is a value: each extractor owns the one of its pattern set
//! ([`ConfidenceModel::of`]: the folder's own `confidence.toml`, else the built-in one), and the
//! pipeline scores a sentence's claims with it ([`score_sentence`]) right after extracting them.
//! This module reads tokens, tags and the cue set's families, never the claims stage itself.

use crate::claim::Claim;
use crate::extract::cues::CueSet;
use crate::extract::tagger::{Tag, Tagger};
use crate::extract::tokens::{tokenize, Token};
use crate::patterns::PatternSet;
use rustc_hash::FxHashMap;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::hash::Hasher as _;

/// The header every model file carries.
pub const FORMAT: &str = "hearsay-confidence 1";

/// A trained model: a bias and one weight per feature name. The names are what the file shows;
/// at load time each is hashed (`feature_hash`) so that scoring a claim looks weights up
/// without building any string.
#[derive(Debug, Clone, Serialize, Deserialize)]
pub struct ConfidenceModel {
    pub format: String,
    pub bias: f64,
    pub weights: BTreeMap<String, f64>,
    #[serde(skip)]
    by_hash: FxHashMap<u64, f64>,
}

impl PartialEq for ConfidenceModel {
    fn eq(&self, other: &ConfidenceModel) -> bool {
        self.format == other.format && self.bias == other.bias && self.weights == other.weights
    }
}

/// Errors from reading a model file.
#[derive(Debug, thiserror::Error)]
#[error("{path}: {message}")]
pub struct ConfidenceError {
    pub path: String,
    pub message: String,
}

/// The hash of a feature `key=value` (or `key`), computed from its parts so that scoring need
/// not join them. Deterministic (FxHash, no random seed).
pub fn feature_hash(key: &str, value: Option<&str>) -> u64 {
    let mut h = rustc_hash::FxHasher::default();
    h.write(key.as_bytes());
    if let Some(v) = value {
        h.write_u8(b'=');
        h.write(v.as_bytes());
    }
    h.finish()
}

/// The hash of a feature by its full name: the part before the first `=` is the key.
fn name_hash(name: &str) -> u64 {
    match name.split_once('=') {
        Some((k, v)) => feature_hash(k, Some(v)),
        None => feature_hash(name, None),
    }
}

impl ConfidenceModel {
    /// A model from its bias and named weights.
    pub fn new(bias: f64, weights: BTreeMap<String, f64>) -> ConfidenceModel {
        let mut m = ConfidenceModel {
            format: FORMAT.to_string(),
            bias,
            weights,
            by_hash: FxHashMap::default(),
        };
        m.index();
        m
    }

    fn index(&mut self) {
        self.by_hash = self
            .weights
            .iter()
            .map(|(k, &w)| (name_hash(k), w))
            .collect();
    }

    /// Parse a model file; `path` names it in errors.
    pub fn parse(path: &str, text: &str) -> Result<ConfidenceModel, ConfidenceError> {
        let err = |message: String| ConfidenceError {
            path: path.to_string(),
            message,
        };
        let mut m: ConfidenceModel = toml::from_str(text).map_err(|e| err(e.to_string()))?;
        if m.format != FORMAT {
            return Err(err(format!(
                "format is \"{}\", expected \"{FORMAT}\"",
                m.format
            )));
        }
        if let Some((k, _)) = m.weights.iter().find(|(_, w)| !w.is_finite()) {
            return Err(err(format!("weight of \"{k}\" is not a finite number")));
        }
        m.index();
        if m.by_hash.len() != m.weights.len() {
            return Err(err("two feature names have the same hash".to_string()));
        }
        Ok(m)
    }

    /// The model of a pattern set: the folder's own `confidence.toml` when it has one, else the
    /// one shipped in `patterns/confidence.toml`.
    pub fn of(set: &PatternSet) -> Result<ConfidenceModel, ConfidenceError> {
        match &set.confidence {
            Some((path, text)) => ConfidenceModel::parse(&path.display().to_string(), text),
            None => ConfidenceModel::parse(
                "patterns/confidence.toml",
                crate::patterns::BUILTIN_CONFIDENCE,
            ),
        }
    }

    /// The probability for a set of named features.
    pub fn probability<S: AsRef<str>>(&self, features: &[S]) -> f64 {
        let z = self.bias
            + features
                .iter()
                .filter_map(|f| self.weights.get(f.as_ref()))
                .sum::<f64>();
        sigmoid(z)
    }

    /// The probability for one claim of a tagged sentence, by hashed look-up (the same value as
    /// [`ConfidenceModel::probability`] of [`features`]).
    pub fn score(
        &self,
        c: &Claim,
        family: &str,
        s: &TaggedSentence<'_>,
        claims_here: usize,
    ) -> f64 {
        let mut z = self.bias;
        visit_features(c, family, s, claims_here, &mut |k, v| {
            if let Some(w) = self.by_hash.get(&feature_hash(k, v)) {
                z += w;
            }
        });
        sigmoid(z)
    }

    /// The model as a readable TOML file, weights sorted by name and rounded to 4 decimals, with
    /// `header` lines written as comments first.
    pub fn to_toml(&self, header: &[String]) -> String {
        let mut s = String::new();
        for h in header {
            s.push_str(&format!("# {h}\n"));
        }
        s.push_str(&format!(
            "format = \"{FORMAT}\"\nbias = {}\n\n[weights]\n",
            round4(self.bias)
        ));
        for (k, w) in &self.weights {
            s.push_str(&format!("\"{}\" = {}\n", k.escape_default(), round4(*w)));
        }
        s
    }
}

fn round4(x: f64) -> f64 {
    let r = (x * 1e4).round() / 1e4;
    if r == 0.0 {
        0.0
    } else {
        r
    }
}

fn sigmoid(z: f64) -> f64 {
    1.0 / (1.0 + (-z).exp())
}

/// A coarse word class for features: few values, so that each is seen often.
fn coarse(t: Tag) -> &'static str {
    match t.as_str() {
        "NN" | "NNS" => "noun",
        "NNP" | "NNPS" => "proper",
        "PRP" => "pronoun",
        "PRP$" | "DT" | "PDT" | "WDT" => "det",
        "CD" => "number",
        s if s.starts_with("VB") || s == "MD" => "verb",
        s if s.starts_with("JJ") => "adj",
        s if s.starts_with("RB") => "adv",
        "IN" | "TO" => "prep",
        _ => "other",
    }
}

/// The class of the token next to a span: a conjunction, a comma, "of", other punctuation, or
/// the coarse word class.
fn neighbour(s: &TaggedSentence<'_>, i: usize) -> &'static str {
    let t = &s.tokens[i];
    match t.lower.as_str() {
        "and" | "or" | "nor" => "conj",
        "," => "comma",
        "of" => "of",
        _ if !t.word => "punct",
        _ => coarse(s.tags[i]),
    }
}

/// Bucket `n` by inclusive upper bounds `edges`, naming each bucket as a range ("0-1", "2",
/// "4-5", "6+"). Every edge list the features use has its names written out once, so scoring
/// allocates nothing.
fn bucket(n: usize, b: &Buckets) -> &'static str {
    let i = b.edges.partition_point(|&e| e < n);
    b.names[i]
}

struct Buckets {
    edges: &'static [usize],
    names: &'static [&'static str],
}

const CLAIMS_HERE: Buckets = Buckets {
    edges: &[1, 2],
    names: &["0-1", "2", "3+"],
};
const SENTENCE_WORDS: Buckets = Buckets {
    edges: &[10, 20, 30, 45],
    names: &["0-10", "11-20", "21-30", "31-45", "46+"],
};
const SPAN_WORDS: Buckets = Buckets {
    edges: &[1, 2, 3, 5, 8],
    names: &["0-1", "2", "3", "4-5", "6-8", "9+"],
};
const BETWEEN_WORDS: Buckets = Buckets {
    edges: &[1, 2, 3, 5, 9],
    names: &["0-1", "2", "3", "4-5", "6-9", "10+"],
};

/// A sentence tokenised and tagged once, for the features of every claim in it.
pub struct TaggedSentence<'a> {
    text: &'a str,
    /// Byte offset of the sentence in its document.
    offset: usize,
    tokens: Vec<Token>,
    tags: Vec<Tag>,
    /// What the sentence-wide features read, found once for all the sentence's claims.
    facts: std::cell::OnceCell<SentenceFacts>,
}

/// The sentence-wide facts the features read: the same for every claim of a sentence.
#[derive(Debug, Clone, Copy)]
struct SentenceFacts {
    /// Word tokens.
    words: usize,
    /// Whether the text holds ';', '(', '"', ':'.
    marks: [bool; 4],
    method_word: bool,
    /// "we" or "our" among the tokens.
    we: bool,
    /// "Figure" or "Fig." in the text.
    figure: bool,
    /// The last word token.
    last_word: Option<usize>,
}

/// Membership in one of the word lists below, through a hash set made once: the lists are
/// asked about every word of every claim's sentence and spans.
type WordSet = std::sync::OnceLock<rustc_hash::FxHashSet<&'static str>>;
static METHOD_SET: WordSet = std::sync::OnceLock::new();
static CLAUSE_SET: WordSet = std::sync::OnceLock::new();
static AUXILIARY_SET: WordSet = std::sync::OnceLock::new();

fn listed(set: &'static WordSet, list: &'static [&'static str], w: &str) -> bool {
    set.get_or_init(|| list.iter().copied().collect())
        .contains(w)
}

impl<'a> TaggedSentence<'a> {
    /// Tokenise and tag the sentence that starts at `offset` in its document.
    pub fn new(text: &'a str, offset: usize) -> Self {
        let tokens = tokenize(text);
        let words: Vec<&str> = tokens.iter().map(|t| &text[t.start..t.end]).collect();
        let tags = Tagger::load_builtin().tag(&words);
        TaggedSentence {
            text,
            offset,
            tokens,
            tags,
            facts: std::cell::OnceCell::new(),
        }
    }

    /// The sentence that starts at `offset` in its document, with the tokens and tags the
    /// extractor gave it (`Extractor::extract`, `Extractor::sentence_tokens`): the confidence
    /// features read the span finder's tags instead of tagging again. A word left untagged (outside
    /// every cue's tagging window) reads as the unknown tag.
    pub fn from_tokens(text: &'a str, offset: usize, tokens: Vec<Token>) -> Self {
        let tags = tokens
            .iter()
            .map(|t| t.tag.unwrap_or(Tag::UNKNOWN))
            .collect();
        TaggedSentence {
            text,
            offset,
            tokens,
            tags,
            facts: std::cell::OnceCell::new(),
        }
    }

    fn facts(&self) -> SentenceFacts {
        *self.facts.get_or_init(|| SentenceFacts {
            words: self.tokens.iter().filter(|t| t.word).count(),
            marks: [";", "(", "\"", ":"].map(|mark| self.text.contains(mark)),
            method_word: self
                .tokens
                .iter()
                .any(|t| t.word && listed(&METHOD_SET, METHOD_WORDS, &t.lower)),
            we: self
                .tokens
                .iter()
                .any(|t| t.lower == "we" || t.lower == "our"),
            figure: self.text.contains("Figure") || self.text.contains("Fig."),
            last_word: self.tokens.iter().rposition(|t| t.word),
        })
    }

    /// Token indices of a document byte range, when it lies inside this sentence.
    fn tokens_in(&self, start: usize, end: usize) -> Option<std::ops::Range<usize>> {
        if start < self.offset || end > self.offset + self.text.len() || start >= end {
            return None;
        }
        let (s, e) = (start - self.offset, end - self.offset);
        let a = self.tokens.partition_point(|t| t.end <= s);
        let b = self.tokens.partition_point(|t| t.start < e);
        (a < b).then_some(a..b)
    }

    fn word_count(&self, r: std::ops::Range<usize>) -> usize {
        self.tokens[r].iter().filter(|t| t.word).count()
    }
}

/// The feature keys of one side of a claim.
struct SideKeys {
    outside: &'static str,
    words: &'static str,
    first: &'static str,
    head: &'static str,
    opens_sentence: &'static str,
    ends_sentence: &'static str,
    finite_verb: &'static str,
    comma: &'static str,
    paren: &'static str,
    no_noun: &'static str,
    clause_word: &'static str,
    auxiliary: &'static str,
    hyphen_head: &'static str,
    before: &'static str,
    after: &'static str,
}

const CAUSE: SideKeys = SideKeys {
    outside: "cause_outside",
    words: "cause_words",
    first: "cause_first",
    head: "cause_head",
    opens_sentence: "cause_opens_sentence",
    ends_sentence: "cause_ends_sentence",
    finite_verb: "cause_finite_verb",
    comma: "cause_comma",
    paren: "cause_paren",
    no_noun: "cause_no_noun",
    clause_word: "cause_clause_word",
    auxiliary: "cause_auxiliary",
    hyphen_head: "cause_hyphen_head",
    before: "cause_before",
    after: "cause_after",
};

const EFFECT: SideKeys = SideKeys {
    outside: "effect_outside",
    words: "effect_words",
    first: "effect_first",
    head: "effect_head",
    opens_sentence: "effect_opens_sentence",
    ends_sentence: "effect_ends_sentence",
    finite_verb: "effect_finite_verb",
    comma: "effect_comma",
    paren: "effect_paren",
    no_noun: "effect_no_noun",
    clause_word: "effect_clause_word",
    auxiliary: "effect_auxiliary",
    hyphen_head: "effect_hyphen_head",
    before: "effect_before",
    after: "effect_after",
};

/// Words that start or mark a clause: a span holding one has run past its noun phrase into a
/// clause ("it remains unclear how", "we set out to examine whether").
const CLAUSE_WORDS: &[&str] = &[
    "that",
    "which",
    "whether",
    "how",
    "what",
    "we",
    "it",
    "there",
    "when",
    "if",
    "although",
    "because",
    "since",
    "while",
    "whereas",
    "thus",
    "therefore",
    "hence",
    "suggesting",
    "indicating",
    "showing",
];

/// Auxiliaries and copulas: a span holding one is a clause, or a fragment around one ("is",
/// "were able to", "could").
const AUXILIARIES: &[&str] = &[
    "is", "are", "was", "were", "be", "been", "being", "has", "have", "had", "do", "does", "did",
    "can", "could", "may", "might", "must", "should", "would", "will",
];

/// Words of a methods section: a sentence with one describes a procedure more often than it
/// states a finding ("cells were plated ... to induce", "determined by one-way ANOVA").
const METHOD_WORDS: &[&str] = &[
    "incubated",
    "plated",
    "stained",
    "transfected",
    "harvested",
    "centrifuged",
    "washed",
    "resuspended",
    "eluted",
    "dissolved",
    "diluted",
    "anova",
    "t-test",
    "performed",
    "measured",
    "analyzed",
    "analysed",
    "quantified",
    "protocol",
    "assay",
    "buffer",
    "medium",
    "media",
    "using",
    "µm",
    "mm",
    "ml",
    "µl",
    "nm",
];

/// Visit the features of one claim: each is a key with an optional value, named `key=value` (or
/// `key`) in the model file. `family` is the claim's cue family; `claims_here` how many claims
/// its sentence gave. Nothing is allocated, so scoring costs a few hash look-ups per claim.
pub fn visit_features(
    c: &Claim,
    family: &str,
    s: &TaggedSentence<'_>,
    claims_here: usize,
    f: &mut impl FnMut(&str, Option<&str>),
) {
    f("cue", Some(&c.cue));
    f("family", Some(family));
    f("kind", Some(c.kind.as_str()));
    f("polarity", Some(c.polarity.as_str()));
    f("modality", Some(c.modality.as_str()));
    f("claims_here", Some(bucket(claims_here, &CLAIMS_HERE)));
    if c.cross_sentence {
        f("cross_sentence", None);
    }
    let facts = s.facts();
    let sentence_words = facts.words;
    f(
        "sentence_words",
        Some(bucket(sentence_words, &SENTENCE_WORDS)),
    );
    for (has, name) in facts.marks.iter().zip([
        "sentence_semicolon",
        "sentence_paren",
        "sentence_quote",
        "sentence_colon",
    ]) {
        if *has {
            f(name, None);
        }
    }
    if facts.method_word {
        f("sentence_method_word", None);
    }
    if facts.we {
        f("sentence_we", None);
    }
    if facts.figure {
        f("sentence_figure", None);
    }
    let last_word = facts.last_word;
    let mut inside = 0;
    let mut ranges = [None, None];
    let cause_first = c.cause.start <= c.effect.start;
    for (i, (k, slot)) in [(&CAUSE, &c.cause), (&EFFECT, &c.effect)]
        .into_iter()
        .enumerate()
    {
        let Some(r) = s.tokens_in(slot.start, slot.end) else {
            f(k.outside, None);
            continue;
        };
        let words = s.word_count(r.clone());
        inside += words;
        f(k.words, Some(bucket(words, &SPAN_WORDS)));
        let first = r.clone().find(|&i| s.tokens[i].word);
        let last = r.clone().rev().find(|&i| s.tokens[i].word);
        if let (Some(a), Some(b)) = (first, last) {
            f(k.first, Some(coarse(s.tags[a])));
            f(k.head, Some(coarse(s.tags[b])));
            if a == 0 {
                f(k.opens_sentence, None);
            }
            if Some(b) == last_word {
                f(k.ends_sentence, None);
            }
        }
        if r.clone().any(|i| s.tags[i].is_finite_verb()) {
            f(k.finite_verb, None);
        }
        if !r
            .clone()
            .any(|i| s.tokens[i].word && matches!(coarse(s.tags[i]), "noun" | "proper" | "number"))
        {
            f(k.no_noun, None);
        }
        let lowers = || s.tokens[r.clone()].iter().map(|t| t.lower.as_str());
        if lowers().any(|w| listed(&CLAUSE_SET, CLAUSE_WORDS, w)) {
            f(k.clause_word, None);
        }
        if lowers().any(|w| listed(&AUXILIARY_SET, AUXILIARIES, w)) {
            f(k.auxiliary, None);
        }
        if let Some(b) = last {
            if s.tokens[b].lower.contains('-') {
                f(k.hyphen_head, None);
            }
        }
        // The token just outside the claim on this span's outer side (the inner side is the
        // cue, whose tag says little): a span that starts after "of X and" or a preposition is
        // often a piece of a longer noun phrase ("Msl2" of "knockdown of Msl1 and Msl2", "mice"
        // of "the response in mice").
        if (i == 0) == cause_first {
            let j = r.start.checked_sub(1);
            f(k.before, Some(j.map_or("edge", |j| neighbour(s, j))));
        } else {
            let j = (r.end < s.tokens.len()).then_some(r.end);
            f(k.after, Some(j.map_or("edge", |j| neighbour(s, j))));
        }
        let text = &s.text[s.tokens[r.start].start..s.tokens[r.end - 1].end];
        if text.contains(',') {
            f(k.comma, None);
        }
        if text.contains(['(', ')']) {
            f(k.paren, None);
        }
        ranges[i] = Some(r);
    }
    if let [Some(a), Some(b)] = &ranges {
        let (first, second, order) = if a.start <= b.start {
            (a, b, "cause_first")
        } else {
            (b, a, "effect_first")
        };
        f("order", Some(order));
        if second.start >= first.end {
            let gap = first.end..second.start;
            f(
                "between_words",
                Some(bucket(s.word_count(gap.clone()), &BETWEEN_WORDS)),
            );
            if s.tokens[gap].iter().any(|t| t.lower == ",") {
                f("between_comma", None);
            }
        }
        let share = inside as f64 / sentence_words.max(1) as f64;
        f(
            "coverage",
            Some(match share {
                x if x < 0.25 => "low",
                x if x < 0.5 => "mid",
                x if x < 0.75 => "high",
                _ => "most",
            }),
        );
    }
}

/// The name of a feature as the model file writes it.
pub fn feature_name(key: &str, value: Option<&str>) -> String {
    match value {
        Some(v) => format!("{key}={v}"),
        None => key.to_string(),
    }
}

/// The features of one claim by name (for training and for `explain`; scoring uses
/// `visit_features` and the hashed weights instead).
pub fn features(
    c: &Claim,
    family: &str,
    s: &TaggedSentence<'_>,
    claims_here: usize,
) -> Vec<String> {
    let mut out = Vec::new();
    visit_features(c, family, s, claims_here, &mut |k, v| {
        out.push(feature_name(k, v))
    });
    out
}

/// Set the confidence of the claims of one sentence `s` with model `m`; `cues` is the cue set
/// that found them (for each cue's family).
pub fn score_sentence(
    m: &ConfidenceModel,
    cues: &CueSet,
    claims: &mut [Claim],
    s: &TaggedSentence<'_>,
) {
    if claims.is_empty() {
        return;
    }
    let n = claims.len();
    for c in claims.iter_mut() {
        let p = m.score(c, cues.family(&c.cue), s, n);
        c.confidence = (p * 1000.0).round() / 1000.0;
    }
}

/// One feature's share in a claim's confidence, for `explain`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Contribution {
    pub feature: String,
    pub weight: f64,
}

/// How model `m` scored one claim, for `explain`: the confidence the pipeline gives it and the
/// features that carry a weight, largest effect first. `cues` is the cue set that found it, `s`
/// its sentence as the extractor tagged it ([`TaggedSentence::from_tokens`]), `all` the claims
/// found in the text (for the claims-per-sentence feature).
pub fn explain(
    m: &ConfidenceModel,
    cues: &CueSet,
    c: &Claim,
    s: &TaggedSentence<'_>,
    all: &[Claim],
) -> (f64, Vec<Contribution>) {
    let a = c.source.start;
    let here = all.iter().filter(|o| o.source.start == a).count().max(1);
    let names = features(c, cues.family(&c.cue), s, here);
    let p = (m.probability(&names) * 1000.0).round() / 1000.0;
    let mut out: Vec<Contribution> = names
        .into_iter()
        .filter_map(|f| {
            m.weights.get(&f).map(|&w| Contribution {
                feature: f,
                weight: w,
            })
        })
        .collect();
    out.sort_by(|x, y| {
        y.weight
            .abs()
            .total_cmp(&x.weight.abs())
            .then_with(|| x.feature.cmp(&y.feature))
    });
    (p, out)
}

/// One labelled example for training: its features and whether the claim was right.
#[derive(Debug, Clone)]
pub struct Example {
    pub features: Vec<String>,
    pub correct: bool,
}

/// Training settings.
#[derive(Debug, Clone, Copy)]
pub struct TrainOptions {
    /// The L2 penalty on every weight but the bias.
    pub l2: f64,
    /// Features seen in fewer training examples than this get no weight.
    pub min_count: usize,
    /// Newton steps at most (it usually converges in under ten).
    pub max_iterations: usize,
}

impl Default for TrainOptions {
    fn default() -> Self {
        TrainOptions {
            l2: 1.0,
            min_count: 5,
            max_iterations: 50,
        }
    }
}

/// Fit a logistic regression with L2 by Newton's method (iteratively reweighted least squares).
/// Deterministic: features are numbered in name order and examples summed in the given order.
pub fn train(examples: &[Example], opts: TrainOptions) -> ConfidenceModel {
    let mut counts: BTreeMap<&str, usize> = BTreeMap::new();
    for e in examples {
        for f in &e.features {
            *counts.entry(f.as_str()).or_default() += 1;
        }
    }
    let names: Vec<&str> = counts
        .iter()
        .filter(|(_, &n)| n >= opts.min_count)
        .map(|(k, _)| *k)
        .collect();
    let index: BTreeMap<&str, usize> = names.iter().enumerate().map(|(i, k)| (*k, i + 1)).collect();
    // Column 0 is the bias.
    let d = names.len() + 1;
    let rows: Vec<Vec<usize>> = examples
        .iter()
        .map(|e| {
            let mut r: Vec<usize> = std::iter::once(0)
                .chain(
                    e.features
                        .iter()
                        .filter_map(|f| index.get(f.as_str()).copied()),
                )
                .collect();
            r.sort_unstable();
            r.dedup();
            r
        })
        .collect();
    let mut w = vec![0.0; d];
    for _ in 0..opts.max_iterations {
        let mut grad = vec![0.0; d];
        let mut hess = vec![0.0; d * d];
        for (r, e) in rows.iter().zip(examples) {
            let p = sigmoid(r.iter().map(|&j| w[j]).sum());
            let y = f64::from(u8::from(e.correct));
            let h = (p * (1.0 - p)).max(1e-9);
            for &j in r {
                grad[j] += p - y;
                for &k in r {
                    hess[j * d + k] += h;
                }
            }
        }
        for j in 0..d {
            let l2 = if j == 0 { 1e-6 } else { opts.l2 };
            grad[j] += l2 * w[j];
            hess[j * d + j] += l2;
        }
        let step = solve_spd(&mut hess, &grad, d);
        let mut biggest: f64 = 0.0;
        for j in 0..d {
            w[j] -= step[j];
            biggest = biggest.max(step[j].abs());
        }
        if biggest < 1e-9 {
            break;
        }
    }
    ConfidenceModel::new(
        round4(w[0]),
        names
            .iter()
            .enumerate()
            .map(|(i, k)| (k.to_string(), round4(w[i + 1])))
            .filter(|(_, x)| *x != 0.0)
            .collect(),
    )
}

/// Solve `A x = b` for a symmetric positive definite `A` (row-major, `n`×`n`) by Cholesky
/// factorisation in place.
fn solve_spd(a: &mut [f64], b: &[f64], n: usize) -> Vec<f64> {
    for j in 0..n {
        let mut s = a[j * n + j];
        for k in 0..j {
            s -= a[j * n + k] * a[j * n + k];
        }
        let diag = s.max(1e-12).sqrt();
        a[j * n + j] = diag;
        for i in j + 1..n {
            let mut s = a[i * n + j];
            for k in 0..j {
                s -= a[i * n + k] * a[j * n + k];
            }
            a[i * n + j] = s / diag;
        }
    }
    // Forward (L y = b), then backward (Lᵀ x = y).
    let mut y = b.to_vec();
    for i in 0..n {
        for k in 0..i {
            y[i] -= a[i * n + k] * y[k];
        }
        y[i] /= a[i * n + i];
    }
    for i in (0..n).rev() {
        for k in i + 1..n {
            y[i] -= a[k * n + i] * y[k];
        }
        y[i] /= a[i * n + i];
    }
    y
}

/// The key the held-out split hashes: the dataset's name and the claim's unit (document and
/// sentence offset, [`crate::evaluate::Judged::unit`]).
pub fn unit_key(dataset: &str, unit: &str) -> String {
    format!("{dataset}:{unit}")
}

/// Which examples are held out: a fixed share chosen by a hash of a unit key (document and
/// sentence), so that the split does not depend on order and one sentence never straddles it.
pub fn is_held_out(unit: &str, every: u8) -> bool {
    blake3::hash(unit.as_bytes()).as_bytes()[0].is_multiple_of(every.max(1))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn builtin_model_parses() {
        let m = ConfidenceModel::of(&PatternSet::builtin().unwrap()).unwrap();
        assert_eq!(m.format, FORMAT);
    }

    #[test]
    fn buckets_read_as_ranges() {
        assert_eq!(bucket(1, &SPAN_WORDS), "0-1");
        assert_eq!(bucket(2, &SPAN_WORDS), "2");
        assert_eq!(bucket(4, &SPAN_WORDS), "4-5");
        assert_eq!(bucket(6, &SPAN_WORDS), "6-8");
        assert_eq!(bucket(9, &SPAN_WORDS), "9+");
        assert_eq!(bucket(0, &CLAIMS_HERE), "0-1");
        assert_eq!(bucket(46, &SENTENCE_WORDS), "46+");
        assert_eq!(bucket(10, &BETWEEN_WORDS), "10+");
        // Every bucket list names one more bucket than it has edges.
        for b in [&CLAIMS_HERE, &SENTENCE_WORDS, &SPAN_WORDS, &BETWEEN_WORDS] {
            assert_eq!(b.names.len(), b.edges.len() + 1);
        }
    }

    #[test]
    fn hashed_scoring_equals_scoring_by_name() {
        let ex = crate::extract::Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
        let text = "Heavy rain probably causes severe flooding in the valley, officials said.";
        let (claims, _) = crate::extract::pipeline::sentence_attempts(&ex, text);
        assert!(!claims.is_empty());
        let m = &ex.confidence;
        let s = TaggedSentence::new(text, 0);
        for c in &claims {
            let fam = ex.cues.family(&c.cue);
            let names = features(c, fam, &s, claims.len());
            assert!(names.iter().any(|n| n.starts_with("cue=")), "{names:?}");
            let by_name = m.probability(&names);
            let by_hash = m.score(c, fam, &s, claims.len());
            assert!((by_name - by_hash).abs() < 1e-12, "{by_name} {by_hash}");
        }
    }

    #[test]
    fn cholesky_solves_a_small_system() {
        // [[4, 2], [2, 3]] x = [2, 1]  =>  x = [0.5, 0]
        let mut a = vec![4.0, 2.0, 2.0, 3.0];
        let x = solve_spd(&mut a, &[2.0, 1.0], 2);
        assert!((x[0] - 0.5).abs() < 1e-12 && x[1].abs() < 1e-12, "{x:?}");
    }

    #[test]
    fn training_learns_a_separating_feature_and_is_repeatable() {
        // Invented toy data: feature "good" is right 9 times in 10, "bad" 1 in 10.
        let mut ex = Vec::new();
        for i in 0..100 {
            let good = i % 2 == 0;
            let correct = if good { i % 20 != 0 } else { i % 20 == 1 };
            ex.push(Example {
                features: vec![if good { "good" } else { "bad" }.to_string()],
                correct,
            });
        }
        let m = train(&ex, TrainOptions::default());
        let pg = m.probability(&["good"]);
        let pb = m.probability(&["bad"]);
        assert!(pg > 0.8 && pb < 0.2, "{pg} {pb}");
        assert_eq!(m, train(&ex, TrainOptions::default()));
        let back = ConfidenceModel::parse("t", &m.to_toml(&["test".into()])).unwrap();
        assert_eq!(back, m);
    }

    #[test]
    fn bad_model_files_name_the_file() {
        let e = ConfidenceModel::parse("x.toml", "format = \"other\"\nbias = 0\n[weights]\n")
            .unwrap_err();
        assert!(e.to_string().starts_with("x.toml:"), "{e}");
    }
}
