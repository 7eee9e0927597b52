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
//! sentence is tagged once with the built-in tagger ([`crate::tagger::Tagger::load_builtin`]) and
//! only when it gave a claim, which keeps the cost to a small share of extraction.
//!
//! The model in force is the built-in one unless [`install`] was called first (the command line
//! does so when `--patterns DIR` holds a `confidence.toml`).

use crate::claims::{tokenize, Extractor, Token};
use crate::model::Claim;
use crate::tagger::{Tag, Tagger};
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::sync::OnceLock;

/// The header every model file carries.
pub const FORMAT: &str = "hearsay-confidence 1";

/// The model shipped in the binary.
const BUILTIN: &str = include_str!("../patterns/confidence.toml");

/// A trained model: a bias and one weight per feature name.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Model {
    pub format: String,
    pub bias: f64,
    pub weights: BTreeMap<String, f64>,
}

/// Errors from reading a model file.
#[derive(Debug, thiserror::Error)]
#[error("{path}: {message}")]
pub struct ModelError {
    pub path: String,
    pub message: String,
}

impl Model {
    /// Parse a model file; `path` names it in errors.
    pub fn parse(path: &str, text: &str) -> Result<Model, ModelError> {
        let m: Model = toml::from_str(text).map_err(|e| ModelError {
            path: path.to_string(),
            message: e.to_string(),
        })?;
        if m.format != FORMAT {
            return Err(ModelError {
                path: path.to_string(),
                message: format!("format is \"{}\", expected \"{FORMAT}\"", m.format),
            });
        }
        if let Some((k, _)) = m.weights.iter().find(|(_, w)| !w.is_finite()) {
            return Err(ModelError {
                path: path.to_string(),
                message: format!("weight of \"{k}\" is not a finite number"),
            });
        }
        Ok(m)
    }

    /// The model shipped in `patterns/confidence.toml`, parsed once.
    pub fn builtin() -> &'static Model {
        static M: OnceLock<Model> = OnceLock::new();
        M.get_or_init(|| {
            Model::parse("patterns/confidence.toml", BUILTIN)
                .expect("the built-in confidence model is valid (checked by a unit test)")
        })
    }

    /// The probability for a set of features.
    pub fn probability<S: AsRef<str>>(&self, features: &[S]) -> f64 {
        let z = self.bias
            + features
                .iter()
                .filter_map(|f| self.weights.get(f.as_ref()))
                .sum::<f64>();
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

static INSTALLED: OnceLock<Model> = OnceLock::new();

/// Use `m` instead of the built-in model for the rest of the process. Fails (returning `m`) when
/// a model is already in force.
pub fn install(m: Model) -> Result<(), Model> {
    INSTALLED.set(m)
}

/// The model in force.
pub fn model() -> &'static Model {
    INSTALLED.get().unwrap_or_else(|| Model::builtin())
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

fn bucket(n: usize, edges: &[usize]) -> String {
    // `edges` are inclusive upper bounds; above the last one is "N+".
    let mut lo = 0;
    for &e in edges {
        if n <= e {
            return if lo == e {
                e.to_string()
            } else {
                format!("{lo}-{e}")
            };
        }
        lo = e + 1;
    }
    format!("{lo}+")
}

/// A sentence tokenised and tagged once, for the features of every claim in it.
pub struct TaggedSentence<'a> {
    text: &'a str,
    /// Byte offset of the sentence in its document.
    offset: usize,
    tokens: Vec<Token>,
    tags: Vec<Tag>,
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
        }
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

/// The features of one claim. `family` is its cue's family; `claims_here` how many claims its
/// sentence gave.
pub fn features(
    c: &Claim,
    family: &str,
    s: &TaggedSentence<'_>,
    claims_here: usize,
) -> Vec<String> {
    let mut f = vec![
        format!("cue={}", c.cue),
        format!("family={family}"),
        format!("kind={}", c.kind),
        format!("polarity={}", c.polarity),
        format!("modality={}", c.modality),
        format!("claims_here={}", bucket(claims_here, &[1, 2])),
    ];
    if c.cross_sentence {
        f.push("cross_sentence".into());
    }
    let sentence_words = s.tokens.iter().filter(|t| t.word).count();
    f.push(format!(
        "sentence_words={}",
        bucket(sentence_words, &[10, 20, 30, 45])
    ));
    for (mark, name) in [
        (";", "semicolon"),
        ("(", "paren"),
        ("\"", "quote"),
        (":", "colon"),
    ] {
        if s.text.contains(mark) {
            f.push(format!("sentence_{name}"));
        }
    }
    let last_word = s.tokens.iter().rposition(|t| t.word);
    let mut inside = 0;
    let mut ranges = Vec::new();
    for (side, slot) in [("cause", &c.cause), ("effect", &c.effect)] {
        let Some(r) = s.tokens_in(slot.start, slot.end) else {
            f.push(format!("{side}_outside"));
            ranges.push(None);
            continue;
        };
        let words = s.word_count(r.clone());
        inside += words;
        f.push(format!("{side}_words={}", bucket(words, &[1, 2, 3, 5, 8])));
        let word_idx: Vec<usize> = r.clone().filter(|&i| s.tokens[i].word).collect();
        if let (Some(&a), Some(&b)) = (word_idx.first(), word_idx.last()) {
            f.push(format!("{side}_first={}", coarse(s.tags[a])));
            f.push(format!("{side}_head={}", coarse(s.tags[b])));
            if a == 0 {
                f.push(format!("{side}_opens_sentence"));
            }
            if Some(b) == last_word {
                f.push(format!("{side}_ends_sentence"));
            }
        }
        if r.clone().any(|i| s.tags[i].is_finite_verb()) {
            f.push(format!("{side}_finite_verb"));
        }
        let text = &s.text[s.tokens[r.start].start..s.tokens[r.end - 1].end];
        if text.contains(',') {
            f.push(format!("{side}_comma"));
        }
        if text.contains(['(', ')']) {
            f.push(format!("{side}_paren"));
        }
        ranges.push(Some(r));
    }
    if let [Some(a), Some(b)] = ranges.as_slice() {
        let (first, second, order) = if a.start <= b.start {
            (a, b, "cause_first")
        } else {
            (b, a, "effect_first")
        };
        f.push(format!("order={order}"));
        if second.start >= first.end {
            let gap = first.end..second.start;
            f.push(format!(
                "between_words={}",
                bucket(s.word_count(gap.clone()), &[1, 2, 3, 5, 9])
            ));
            if s.tokens[gap].iter().any(|t| t.lower == ",") {
                f.push("between_comma".into());
            }
        }
        let share = inside as f64 / sentence_words.max(1) as f64;
        f.push(format!(
            "coverage={}",
            match share {
                x if x < 0.25 => "low",
                x if x < 0.5 => "mid",
                x if x < 0.75 => "high",
                _ => "most",
            }
        ));
    }
    f
}

/// The family of a cue id, from the extractor's cue set ("" when unknown).
pub fn family<'e>(ex: &'e Extractor, cue: &str) -> &'e str {
    ex.cues
        .cues
        .iter()
        .find(|c| c.spec.id == cue)
        .map_or("", |c| c.spec.family.as_str())
}

/// The features of every claim of one sentence (`sentence` starts at document offset `offset`).
pub fn sentence_features(
    ex: &Extractor,
    claims: &[Claim],
    sentence: &str,
    offset: usize,
) -> Vec<Vec<String>> {
    if claims.is_empty() {
        return Vec::new();
    }
    let s = TaggedSentence::new(sentence, offset);
    claims
        .iter()
        .map(|c| features(c, family(ex, &c.cue), &s, claims.len()))
        .collect()
}

/// Set the confidence of the claims of one sentence with the model in force.
pub fn score_sentence(ex: &Extractor, claims: &mut [Claim], sentence: &str, offset: usize) {
    let m = model();
    let feats = sentence_features(ex, claims, sentence, offset);
    for (c, f) in claims.iter_mut().zip(feats) {
        c.confidence = (m.probability(&f) * 1000.0).round() / 1000.0;
    }
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
pub fn train(examples: &[Example], opts: TrainOptions) -> Model {
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
    Model {
        format: FORMAT.to_string(),
        bias: round4(w[0]),
        weights: names
            .iter()
            .enumerate()
            .map(|(i, k)| (k.to_string(), round4(w[i + 1])))
            .filter(|(_, x)| *x != 0.0)
            .collect(),
    }
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
/// sentence offset, [`crate::eval::Judged::unit`]).
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
        let m = Model::builtin();
        assert_eq!(m.format, FORMAT);
    }

    #[test]
    fn buckets_read_as_ranges() {
        assert_eq!(bucket(1, &[1, 2, 3, 5]), "0-1");
        assert_eq!(bucket(2, &[1, 2, 3, 5]), "2");
        assert_eq!(bucket(4, &[1, 2, 3, 5]), "4-5");
        assert_eq!(bucket(9, &[1, 2, 3, 5]), "6+");
        assert_eq!(bucket(0, &[1, 2]), "0-1");
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
        let back = Model::parse("t", &m.to_toml(&["test".into()])).unwrap();
        assert_eq!(back, m);
    }

    #[test]
    fn bad_model_files_name_the_file() {
        let e = Model::parse("x.toml", "format = \"other\"\nbias = 0\n[weights]\n").unwrap_err();
        assert!(e.to_string().starts_with("x.toml:"), "{e}");
    }
}
