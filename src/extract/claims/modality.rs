//! Modality and sign: negation, conditions, hedges and questions read from the words before the
//! cue; sign words and change nouns ("higher", "an increase in") read from the effect span.

use super::{Extractor, Span};
use crate::claim::{Modality, Polarity};
use crate::extract::tokens::Token;

impl Extractor {
    /// Read sign words and change nouns at the start of an effect span.
    pub(super) fn read_sign(&self, toks: &[Token], s: Span) -> (Span, Option<Polarity>, bool) {
        let l = &self.lexicon;
        let mut s = s;
        let mut negated = false;
        if !s.is_empty()
            && matches!(
                toks[s.from].lower.as_str(),
                "no" | "neither" | "nothing" | "none"
            )
        {
            negated = true;
            s.from += 1;
        }
        s = self.strip_determiners(toks, s);
        let mut sign = None;
        if s.to - s.from >= 3
            && toks[s.from + 1].word
            && l.change_links.contains(toks[s.from + 1].lower.as_str())
        {
            let w = toks[s.from].lower.as_str();
            if l.increase_nouns.contains(w) {
                sign = Some(Polarity::Increase);
            } else if l.decrease_nouns.contains(w) {
                sign = Some(Polarity::Decrease);
            }
            if sign.is_some() {
                s.from += 2;
                s = self.strip_determiners(toks, s);
            }
        }
        (s, sign, negated)
    }

    pub(super) fn sign_word(&self, w: &str) -> Option<Polarity> {
        if self.lexicon.sign_increase.contains(w) {
            Some(Polarity::Increase)
        } else if self.lexicon.sign_decrease.contains(w) {
            Some(Polarity::Decrease)
        } else {
            None
        }
    }

    pub(super) fn modality(
        &self,
        toks: &[Token],
        cue_from: usize,
        sentence: &str,
        notes: &mut Vec<String>,
    ) -> Modality {
        if sentence.trim_end().ends_with('?') {
            notes.push("the sentence is a question".into());
            return Modality::Question;
        }
        let mut clause_start = cue_from;
        while clause_start > 0 {
            let t = &toks[clause_start - 1];
            if Self::clause_punct(t)
                || matches!(
                    t.lower.as_str(),
                    "but" | "whereas" | "while" | "although" | "though" | "yet"
                )
            {
                break;
            }
            clause_start -= 1;
        }
        let prefix = &toks[clause_start..cue_from];
        let found = |phrases: &[Vec<String>], within: &[Token]| -> Option<String> {
            for (i, t) in within.iter().enumerate() {
                if !self.modal_firsts.contains(t.lower.as_str()) {
                    continue;
                }
                for p in phrases {
                    if within.len() - i >= p.len()
                        && p.iter().zip(&within[i..]).all(|(w, t)| *w == t.lower)
                    {
                        // "not only ... but also" is not a denial.
                        if p[0] == "not" && within.get(i + 1).is_some_and(|t| t.lower == "only") {
                            continue;
                        }
                        return Some(p.join(" "));
                    }
                }
            }
            None
        };
        if let Some(w) = found(&self.lexicon.negators, prefix) {
            notes.push(format!("negated by \"{w}\""));
            return Modality::Negated;
        }
        if let Some(w) = found(&self.lexicon.conditionals, &toks[..cue_from]) {
            notes.push(format!("conditional on \"{w}\""));
            return Modality::Conditional;
        }
        if let Some(w) = found(&self.lexicon.hedges, prefix) {
            notes.push(format!("hedged by \"{w}\""));
            return Modality::Hedged;
        }
        Modality::Asserted
    }
}
