//! Modality and sign: negation, conditions, hedges and questions read from the words before the
//! cue; sign words and change nouns ("higher", "an increase in") read from the effect span.

use super::assemble::MatchCtx;
use super::{Chosen, Extractor, Span};
use crate::claim::{Modality, Polarity};
use crate::extract::tokens::{collapse, Token};

impl Extractor {
    /// Read sign words and change nouns at the start of an effect span.
    /// Also returns where the shown text starts: before a change noun and its link ("the
    /// growth of molds"), which the span itself leaves out.
    pub(super) fn read_sign(
        &self,
        toks: &[Token],
        s: Span,
    ) -> (Span, Option<Polarity>, bool, usize) {
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
        let shown_from = s.from;
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
        (s, sign, negated, shown_from)
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
            // "Why does grazing deplete the soil?" takes its claim for granted and asks only
            // for the reason: the claim counts as stated (patterns/README.md, "Questions").
            if toks
                .iter()
                .find(|t| t.word)
                .is_some_and(|t| t.lower == "why")
            {
                notes.push("a why-question presupposes its claim: read as stated".into());
            } else {
                notes.push("the sentence is a question".into());
                return Modality::Question;
            }
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
        // "We explore whether tolls reduce traffic": an embedded question asks, it states nothing.
        if prefix.iter().any(|t| t.lower == "whether") {
            notes.push("inside a \"whether\" clause: an embedded question".into());
            return Modality::Question;
        }
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

    /// "Because the rains failed, grain prices rose": an effect clause of a connective that ends
    /// in an intransitive verb of change (`increase_verbs`/`decrease_verbs` in lexicon.toml,
    /// tagged as a verb) gives the effect its sign; the effect is the clause's subject.
    pub(super) fn sign_of_clause(
        &self,
        cx: &MatchCtx<'_>,
        e: &mut Chosen,
        notes: &mut Vec<String>,
    ) {
        let (toks, sent) = (cx.toks, cx.sent);
        if e.start < sent.offset || e.sign.is_some() {
            return;
        }
        let (a, mut b) = e.tokens(toks, sent);
        b = b.min(toks.len());
        while b > a && (!toks[b - 1].word || self.adverb(&toks[b - 1].lower)) {
            b -= 1;
        }
        let ends_with = |p: &[String]| {
            b > a + p.len()
                && p.iter().zip(&toks[b - p.len()..b]).all(|(w, t)| *w == t.lower)
                // "tax increases" is a noun: an -s form must be tagged as a verb.
                && (toks[b - p.len()].tag.is_none_or(|g| g.is_verb())
                    || !toks[b - p.len()].lower.ends_with('s'))
        };
        let lists = [
            (&self.lexicon.increase_verbs, Polarity::Increase),
            (&self.lexicon.decrease_verbs, Polarity::Decrease),
        ];
        let Some((n, sign)) = lists
            .iter()
            .find_map(|(list, sign)| list.iter().find(|p| ends_with(p)).map(|p| (p.len(), *sign)))
        else {
            return;
        };
        let mut end = b - n;
        while end > a
            && (self
                .lexicon
                .auxiliaries
                .contains(toks[end - 1].lower.as_str())
                || self.adverb(&toks[end - 1].lower))
        {
            end -= 1;
        }
        if end <= a {
            return;
        }
        let verb = collapse(&sent.text[toks[b - n].start..toks[b - 1].end]);
        notes.push(format!("the effect clause ends in \"{verb}\": an {sign}"));
        let (bs, be) = (toks[a].start, toks[end - 1].end);
        e.end = sent.offset + be;
        e.text = collapse(&sent.text[bs..be]);
        e.key_text = e.text.clone();
        e.sign = Some(sign);
    }
}
