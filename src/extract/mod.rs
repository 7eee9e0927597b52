//! Extraction: from a document's text to claims.
//!
//! `pipeline` (blocks around prefilter hits → sentences) → `cues` (cue
//! matches) → `claims` (spans, sign, modality) → `confidence` (a score for each claim, with the
//! extractor's own model). `tokens` splits a sentence into the words every step counts in, and
//! `tagger` tags them. The stage is pure: text in, claims out, no I/O and no global state (the
//! per-thread caches of tags and regex captures change no result).
//!
//! The public face:
//! - [`Extractor`]: built once from a [`PatternSet`](crate::patterns::PatternSet) (its cues
//!   compiled, its lexicon, its [`ConfidenceModel`]); [`document_claims`] runs the whole stage
//!   over one document, [`document_attempts`] and [`sentence_attempts`] also say why each cue
//!   match gave a claim or none (`hearsay explain`), [`document_sentences`] gives every sentence
//!   for the search index.
//! - [`tokenize`], [`collapse`] and [`Token`], for the commands and scorers that count in the
//!   extractor's tokens.
//! - Training and inspecting the two models: the confidence model ([`train_confidence`],
//!   [`confidence_features`], [`explain_confidence`]) and the part-of-speech [`Tagger`]
//!   ([`train_tagger`], [`read_conllu`], [`tagger_accuracy`]).

mod claims;
mod confidence;
mod cues;
mod pipeline;
mod tagger;
mod tokens;

pub use claims::{Attempt, Extractor, ExtractorError, Origin, SentenceRef};
pub use confidence::{
    explain as explain_confidence, features as confidence_features, is_held_out,
    train as train_confidence, unit_key, ConfidenceError, ConfidenceModel, Contribution,
    Example as ConfidenceExample, TaggedSentence, TrainOptions as ConfidenceTrainOptions,
};
pub use cues::{CueSet, Hit};
pub use pipeline::{
    document_attempts, document_claims, document_sentences, sentence_attempts, IndexedSentence,
};
pub use tagger::{
    accuracy as tagger_accuracy, read_conllu, train as train_tagger, Tag,
    TaggedSentence as TreebankSentence, Tagger, TrainOptions as TaggerTrainOptions,
};
pub use tokens::{collapse, tokenize, Token};
