//! Who the sentence says made a claim: "officials said X triggers Y", "the survey found that X
//! reduces Y", "according to the report, X increased Y". The attribution is the words as written
//! (a noun phrase), so that users can count claims by the kind of source. It is read only inside
//! the claim's own sentence, and only where the reporting clause governs the claim's clause.

use super::Extractor;
use crate::extract::tagger::Tag;
use crate::extract::tokens::{collapse, Token};

/// The most words an attribution may have.
const MAX_SOURCE_WORDS: usize = 6;

/// Pronouns that stand for no source of their own ("it was reported that").
const EMPTY_SUBJECTS: &[&str] = &["it", "this", "that", "there", "which", "what"];

impl Extractor {
    /// The source of a claim whose first slot in the sentence starts at token `first`.
    pub(super) fn attribution(
        &self,
        toks: &[Token],
        first: usize,
        sentence: &str,
    ) -> Option<String> {
        self.according_to(toks, first, sentence)
            .or_else(|| self.reported_by(toks, first, sentence))
    }

    /// "According to the union, the strike delayed deliveries": the phrase up to the comma,
    /// when the sentence (or its clause) opens with "according to".
    fn according_to(&self, toks: &[Token], first: usize, sentence: &str) -> Option<String> {
        let at = (0..first.min(toks.len()).saturating_sub(1))
            .find(|&i| toks[i].lower == "according" && toks[i + 1].lower == "to")?;
        // Only a clause-opening "according to": nothing but punctuation before it, or a comma.
        if at > 0 && !Self::clause_punct(&toks[at - 1]) {
            return None;
        }
        let from = at + 2;
        let to = (from..first).find(|&i| Self::clause_punct(&toks[i]))?;
        self.source_text(toks, from, to, sentence)
    }

    /// "Officials said (that) X ...": a reporting verb right before the claim's first slot
    /// (past an optional "that" or comma), and its subject before it (past auxiliaries and
    /// adverbs: "researchers have long argued").
    fn reported_by(&self, toks: &[Token], first: usize, sentence: &str) -> Option<String> {
        let mut r = first;
        while r > 0
            && (matches!(toks[r - 1].lower.as_str(), "that" | "," | ":")
                || self
                    .lexicon
                    .determiners
                    .contains(toks[r - 1].lower.as_str()))
        {
            r -= 1;
        }
        let verb = r.checked_sub(1)?;
        let v = &toks[verb];
        if !v.word
            || !self.lexicon.reporting_verbs.contains(v.lower.as_str())
            || v.tag.is_some_and(Tag::is_noun)
        {
            return None;
        }
        let mut end = verb;
        while end > 0
            && toks[end - 1].word
            && (self
                .lexicon
                .auxiliaries
                .contains(toks[end - 1].lower.as_str())
                || self.adverb(&toks[end - 1].lower)
                || matches!(toks[end - 1].lower.as_str(), "also" | "now" | "recently"))
        {
            end -= 1;
        }
        let mut from = end;
        while from > 0
            && end - from < MAX_SOURCE_WORDS
            && toks[from - 1].word
            && !self.clause_boundary(&toks[from - 1])
            && !self
                .lexicon
                .relatives
                .contains(toks[from - 1].lower.as_str())
            && !self
                .lexicon
                .auxiliaries
                .contains(toks[from - 1].lower.as_str())
            && !self
                .lexicon
                .reporting_verbs
                .contains(toks[from - 1].lower.as_str())
            && !(self
                .lexicon
                .prepositions
                .contains(toks[from - 1].lower.as_str())
                && toks[from - 1].lower != "of")
            && !toks[from - 1].tag.is_some_and(Tag::is_finite_verb)
        {
            from -= 1;
        }
        self.source_text(toks, from, end, sentence)
    }

    /// The words `[from, to)` as written, when they name a source: some word that is not a
    /// determiner, and not a bare "it" or "this".
    fn source_text(
        &self,
        toks: &[Token],
        from: usize,
        to: usize,
        sentence: &str,
    ) -> Option<String> {
        if from >= to || to > toks.len() {
            return None;
        }
        let words = &toks[from..to];
        if words.len() == 1 {
            let w = words[0].lower.as_str();
            // "..., not ... found that": a negator or a lone auxiliary is no source.
            if EMPTY_SUBJECTS.contains(&w)
                || self.single_negators.contains(w)
                || self.lexicon.auxiliaries.contains(w)
            {
                return None;
            }
        }
        if words
            .iter()
            .all(|t| !t.word || self.lexicon.determiners.contains(t.lower.as_str()))
        {
            return None;
        }
        Some(collapse(&sentence[toks[from].start..toks[to - 1].end]))
    }
}
