//! A part-of-speech tagger: an averaged perceptron over Penn Treebank tags.
//!
//! It exists so that span decisions can look at word classes (noun phrases next to a cue, finite
//! verbs and complementisers that end a span, "increases" as verb or noun). It is small and
//! transparent on purpose: a linear model over a handful of features of the word and its
//! neighbours, decoded greedily left to right, trained reproducibly by `hearsay train-tagger`
//! from openly licensed treebanks (`patterns/tagger.NOTICE` names them). A tag dictionary of
//! frequent, unambiguous words answers those words without scoring.
//!
//! The model file is text: a header line, a `tags` line, `dict` lines (word, tag) and `f` lines
//! (feature, then `class:weight` pairs with weights in hundredths). Weights near zero are pruned
//! when the model is saved, which keeps the file small at almost no cost in accuracy.
//!
//! [`tagging`] tags a sentence (the hot path: cached word vectors, dense tag tables), from the
//! weights [`features`] lays out and scores; [`train`] reads CoNLL-U treebanks and trains a
//! model; this file holds the tags and the model file.

mod features;
mod tagging;
#[cfg(test)]
mod tests;
mod train;

pub use train::{accuracy, read_conllu, train, TaggedSentence, TrainOptions};

use features::{HashedWeights, Prepared};
use std::collections::HashMap;

/// The tagger's lookup tables: many short-string lookups per word, so a fast non-keyed hash
/// (the keys come from the shipped model, not from untrusted input, so flooding is not a concern).
type FastMap<K, V> = HashMap<K, V, rustc_hash::FxBuildHasher>;
use std::fmt;
use std::sync::OnceLock;

/// The header line of a model file.
const MAGIC: &str = "hearsay-tagger 1";

/// Penn Treebank tags as used in UD English (XPOS column), with the few extra ones EWT uses.
const TAGS: &[&str] = &[
    "NN", "IN", "DT", "NNP", "PRP", "JJ", "RB", ".", "VB", "NNS", ",", "CC", "VBD", "VBP", "VBZ",
    "CD", "VBN", "VBG", "MD", "TO", "PRP$", "-RRB-", "-LRB-", "WDT", ":", "WRB", "``", "''", "WP",
    "RP", "UH", "POS", "HYPH", "NNPS", "JJR", "JJS", "EX", "NFP", "RBR", "ADD", "GW", "$", "SYM",
    "PDT", "LS", "FW", "RBS", "AFX", "WP$", "XX",
];

/// One part-of-speech tag (Penn Treebank).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Tag(u8);

impl Tag {
    /// The unknown tag ("XX"): what a word no tagging window covered reads as where a tag is
    /// required.
    pub const UNKNOWN: Tag = Tag(TAGS.len() as u8 - 1);
    /// The tag as written in treebanks ("NN", "VBZ").
    pub fn as_str(self) -> &'static str {
        TAGS[self.0 as usize]
    }
    /// Parse a Penn tag; `None` for one this tagger does not know.
    pub fn parse(s: &str) -> Option<Tag> {
        TAGS.iter().position(|t| *t == s).map(|i| Tag(i as u8))
    }
    /// Common or proper noun, singular or plural.
    pub fn is_noun(self) -> bool {
        self.as_str().starts_with("NN")
    }
    /// Any verb form (modals included).
    pub fn is_verb(self) -> bool {
        self.as_str().starts_with("VB") || self.as_str() == "MD"
    }
    /// A verb form that carries tense (VBD, VBP, VBZ) or a modal: the head of a finite clause.
    pub fn is_finite_verb(self) -> bool {
        matches!(self.as_str(), "VBD" | "VBP" | "VBZ" | "MD")
    }
    /// Adjective (plain, comparative, superlative).
    pub fn is_adjective(self) -> bool {
        self.as_str().starts_with("JJ")
    }
    /// Past participle (VBN).
    pub fn is_participle(self) -> bool {
        self.as_str() == "VBN"
    }
    /// Proper noun, singular or plural.
    pub fn is_proper_noun(self) -> bool {
        self.as_str().starts_with("NNP")
    }
    /// A word that can stand inside a noun phrase before its head: determiner, adjective,
    /// number, possessive, noun.
    pub fn is_nominal(self) -> bool {
        self.is_noun()
            || self.is_adjective()
            || matches!(self.as_str(), "DT" | "CD" | "PRP$" | "POS" | "HYPH" | "PDT")
    }
}

impl fmt::Display for Tag {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Errors from reading a model file.
#[derive(Debug, thiserror::Error)]
#[error("tagger model line {line}: {message}")]
pub struct ModelError {
    pub line: usize,
    pub message: String,
}

/// A trained tagger.
#[derive(Debug, Clone, Default)]
pub struct Tagger {
    /// Feature weights by name, as training produces them (empty for a loaded model).
    weights: FastMap<String, Vec<(u8, f32)>>,
    dict: FastMap<String, Tag>,
    /// The weights laid out for fast tagging, built on first use.
    prepared: OnceLock<Prepared>,
}

/// Number of tags.
const NT: usize = TAGS.len();

/// The roles a word plays in the features of the words around it, in the order of a word's
/// score vectors: its own features, then as the word 1 and 2 before and 1 and 2 after.
const ROLES: usize = 5;

impl Tagger {
    /// The model shipped in `patterns/tagger.model`, parsed once.
    pub fn load_builtin() -> &'static Tagger {
        static T: OnceLock<Tagger> = OnceLock::new();
        T.get_or_init(|| {
            Tagger::from_model(include_str!("../../../patterns/tagger.model"))
                .expect("the built-in tagger model is valid (checked by a unit test)")
        })
    }

    /// Parse a model file. The result tags; it keeps no feature names, so only a tagger fresh
    /// from `train` can be written out again with `to_model`.
    pub fn from_model(text: &str) -> Result<Tagger, ModelError> {
        let err = |line: usize, m: &str| ModelError {
            line,
            message: m.to_string(),
        };
        let mut lines = text.lines().enumerate();
        match lines.next() {
            Some((_, l)) if l == MAGIC => {}
            _ => return Err(err(1, "not a hearsay tagger model")),
        }
        let mut t = Tagger::default();
        // Straight into the tagging layout: the feature names are not kept.
        let mut hashed = HashedWeights::default();
        let mut file_tags: Vec<Tag> = Vec::new();
        for (n, line) in lines {
            // Nearly every line is a feature's weights: read those bytes directly (splitting
            // and parsing them as strings was a third of start-up). A line the fast reading
            // does not take whole is read by the general code below, which names its fault.
            if let Some((feat, pairs)) = line.strip_prefix("f\t").and_then(|r| r.split_once('\t')) {
                let start = hashed.pairs.len();
                if read_pairs(pairs, &file_tags, &mut hashed.pairs) {
                    hashed.insert(feat, start as u32);
                    continue;
                }
                hashed.pairs.truncate(start);
            }
            let mut parts = line.split('\t');
            match parts.next() {
                Some("tags") => {
                    file_tags = parts
                        .map(|s| Tag::parse(s).ok_or_else(|| err(n + 1, "unknown tag")))
                        .collect::<Result<_, _>>()?;
                }
                Some("dict") => {
                    let (Some(w), Some(tag)) = (parts.next(), parts.next()) else {
                        return Err(err(n + 1, "dict needs a word and a tag"));
                    };
                    let tag = Tag::parse(tag).ok_or_else(|| err(n + 1, "unknown tag"))?;
                    t.dict.insert(w.to_string(), tag);
                }
                Some("f") => {
                    let feat = parts.next().ok_or_else(|| err(n + 1, "missing feature"))?;
                    let start = hashed.pairs.len() as u32;
                    for p in parts {
                        let (c, w) = p.split_once(':').ok_or_else(|| err(n + 1, "bad weight"))?;
                        let c: usize = c.parse().map_err(|_| err(n + 1, "bad class"))?;
                        let w: i32 = w.parse().map_err(|_| err(n + 1, "bad weight"))?;
                        let tag = file_tags
                            .get(c)
                            .ok_or_else(|| err(n + 1, "class out of range"))?;
                        hashed.pairs.push((tag.0, w as f32 / 100.0));
                    }
                    hashed.insert(feat, start);
                }
                Some("") | None => {}
                Some(_) => return Err(err(n + 1, "unknown line kind")),
            }
        }
        t.prepared = OnceLock::from(Prepared::from_hashed(hashed));
        Ok(t)
    }

    /// Write the model, dropping weights under `min_weight` in absolute value.
    pub fn to_model(&self, min_weight: f32) -> String {
        let mut s = String::new();
        s.push_str(MAGIC);
        s.push('\n');
        s.push_str("tags");
        for t in TAGS {
            s.push('\t');
            s.push_str(t);
        }
        s.push('\n');
        let mut dict: Vec<_> = self.dict.iter().collect();
        dict.sort();
        for (w, t) in dict {
            s.push_str(&format!("dict\t{w}\t{t}\n"));
        }
        let mut feats: Vec<_> = self.weights.iter().collect();
        feats.sort_by(|a, b| a.0.cmp(b.0));
        for (f, ws) in feats {
            let kept: Vec<String> = ws
                .iter()
                .filter(|(_, w)| w.abs() >= min_weight)
                .map(|(c, w)| format!("{c}:{}", (w * 100.0).round() as i32))
                .filter(|p| !p.ends_with(":0"))
                .collect();
            if !kept.is_empty() && !f.contains('\t') && !f.contains('\n') {
                s.push_str(&format!("f\t{f}\t{}\n", kept.join("\t")));
            }
        }
        s
    }
}

/// The `class:weight` pairs of a feature line (tab-separated, weights in hundredths), pushed as
/// `(tag, weight)`; `false`, with some pushed, unless every pair is `DIGITS:DIGITS` or
/// `DIGITS:-DIGITS` (classes of at most 4 digits and in range, weights of at most 9) with single
/// tabs between and none after: the pairs the general reading takes, and it reads them the same.
fn read_pairs(pairs: &str, file_tags: &[Tag], out: &mut Vec<(u8, f32)>) -> bool {
    let b = pairs.as_bytes();
    let mut i = 0;
    let digits = |i: &mut usize, max: usize| -> Option<u32> {
        let from = *i;
        let mut v: u32 = 0;
        while *i < b.len() && b[*i].is_ascii_digit() {
            v = v * 10 + u32::from(b[*i] - b'0');
            *i += 1;
            if *i - from > max {
                return None;
            }
        }
        (*i > from).then_some(v)
    };
    loop {
        let Some(c) = digits(&mut i, 4) else {
            return false;
        };
        if b.get(i) != Some(&b':') {
            return false;
        }
        i += 1;
        let negative = b.get(i) == Some(&b'-');
        if negative {
            i += 1;
        }
        let Some(w) = digits(&mut i, 9) else {
            return false;
        };
        let Some(tag) = file_tags.get(c as usize) else {
            return false;
        };
        let w = if negative { -(w as i32) } else { w as i32 };
        out.push((tag.0, w as f32 / 100.0));
        match b.get(i) {
            None => return true,
            Some(b'\t') if i + 1 < b.len() => i += 1,
            Some(_) => return false,
        }
    }
}

fn argmax(scores: &[f32]) -> u8 {
    let mut best = 0;
    for (i, &s) in scores.iter().enumerate() {
        if s > scores[best] {
            best = i;
        }
    }
    best as u8
}
