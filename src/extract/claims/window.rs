//! Which words of a sentence are tagged: the clause that holds each cue match, up to its
//! boundaries, and a few words beyond them.
//!
//! Tagging was the largest single cost of extraction, and much of a long sentence lies in
//! clauses the span rules never read: a span stops at a clause break, so the tags they ask for
//! are those of the cue's own clause (and, for a relative clause, of its antecedent's). The
//! boundaries are found from the words alone (punctuation, conjunctions, relative pronouns, as
//! `patterns/lexicon.toml` lists them), since tags are what is being saved. Words outside every
//! window keep no tag, which the rules read as "unknown".

use super::{Extractor, SentenceRef, PRONOUNS};
use crate::claim::Claim;
use crate::extract::tokens::{token_range, Token};

/// Words tagged on each side of a claim span that lies partly outside every window: the tagger
/// reads two words on each side of a word.
const SPAN_MARGIN: usize = 3;

/// Words tagged beyond a window's clause boundaries. The tagger reads two words on each side
/// and the two tags before a word, and the span rules look a little past a boundary (the noun
/// after a coordinator, an attached prepositional phrase), so tags up to here must be those of
/// the whole sentence or close to them. On eLife a margin of 3 changed 17 claims more than 5 did,
/// and cost a BECAUSE false positive; 5 leaves every evaluation figure as it was.
const WINDOW_MARGIN: usize = 5;

impl Extractor {
    /// Tag the words of the clauses that hold the cue matches at token ranges `cue_tokens`;
    /// overlapping windows are tagged as one run of words.
    pub(super) fn tag_clauses(
        &self,
        sentence: &str,
        toks: &mut [Token],
        cue_tokens: &[(usize, usize)],
    ) {
        let mut windows: Vec<(usize, usize)> = cue_tokens
            .iter()
            .map(|&(a, b)| self.clause_window(toks, a, b))
            .collect();
        windows.sort_unstable();
        let mut merged: Vec<(usize, usize)> = Vec::with_capacity(windows.len());
        for (a, b) in windows {
            match merged.last_mut() {
                Some(last) if a <= last.1 => last.1 = last.1.max(b),
                _ => merged.push((a, b)),
            }
        }
        for (a, b) in merged {
            let words: Vec<&str> = toks[a..b]
                .iter()
                .map(|t| &sentence[t.start..t.end])
                .collect();
            for (t, tag) in toks[a..b].iter_mut().zip(self.tagger.tag(&words)) {
                t.tag = Some(tag);
            }
        }
    }

    /// Tag the words of the claims' spans in `sent` that no window covered (a connective's
    /// clause runs past the clause boundaries that end a window), so that the confidence
    /// features read a real tag for the first, last and verb words of every span. Each such span
    /// is tagged with [`SPAN_MARGIN`] words on each side, and only untagged words take its tags:
    /// the tags the span finder saw stay as they were.
    pub(super) fn tag_claim_spans(
        &self,
        sent: SentenceRef<'_>,
        toks: &mut [Token],
        claims: &[Claim],
    ) {
        let end = sent.offset + sent.text.len();
        for c in claims {
            for slot in [&c.cause, &c.effect] {
                if slot.start < sent.offset || slot.end > end || slot.start >= slot.end {
                    continue;
                }
                let (a, b) = token_range(toks, slot.start - sent.offset, slot.end - sent.offset);
                if a >= b || toks[a..b].iter().all(|t| t.tag.is_some()) {
                    continue;
                }
                let (lo, hi) = (
                    a.saturating_sub(SPAN_MARGIN),
                    (b + SPAN_MARGIN).min(toks.len()),
                );
                let words: Vec<&str> = toks[lo..hi]
                    .iter()
                    .map(|t| &sent.text[t.start..t.end])
                    .collect();
                for (t, tag) in toks[lo..hi].iter_mut().zip(self.tagger.tag(&words)) {
                    t.tag.get_or_insert(tag);
                }
            }
        }
    }

    /// The token range to tag for a cue match at tokens `ca..cb`: out to the first clause
    /// boundary on each side, then [`WINDOW_MARGIN`] words more. Boundaries right next to the
    /// cue (no word crossed yet) are crossed, as the span walk crosses them ("X, causing Y"); so
    /// is one relative pronoun on the left, whose antecedent is the cause ("X, which reduces
    /// Y"), and one "and" or "or" on the right, where a coordinated effect goes on ("reduces X
    /// and Y"). A pronoun in the window may take its antecedent from anywhere before it, so then
    /// the window starts at the sentence's start.
    fn clause_window(&self, toks: &[Token], ca: usize, cb: usize) -> (usize, usize) {
        let mut i = ca;
        let mut words = 0;
        let mut relative_crossed = false;
        while i > 0 {
            let t = &toks[i - 1];
            if self.window_edge(t) {
                let relative = t.word && self.lexicon.relatives.contains(t.lower.as_str());
                if words == 0 || (relative && !relative_crossed) {
                    relative_crossed |= relative;
                    words = 0;
                    i -= 1;
                    continue;
                }
                break;
            }
            words += 1;
            i -= 1;
        }
        let mut j = cb.max(ca);
        words = 0;
        let mut coordinator_crossed = false;
        while j < toks.len() {
            if self.window_edge(&toks[j]) {
                let coordinator = matches!(toks[j].lower.as_str(), "and" | "or");
                if words > 0 && (coordinator_crossed || !coordinator) {
                    break;
                }
                coordinator_crossed |= coordinator;
            } else {
                words += 1;
            }
            j += 1;
        }
        if toks[i..j]
            .iter()
            .any(|t| t.word && PRONOUNS.contains(&t.lower.as_str()))
        {
            i = 0;
        }
        (
            i.saturating_sub(WINDOW_MARGIN),
            (j + WINDOW_MARGIN).min(toks.len()),
        )
    }

    /// A token that ends a clause for the tagging window: clause punctuation, a conjunction or
    /// clause opener, or a relative pronoun.
    fn window_edge(&self, t: &Token) -> bool {
        Self::clause_punct(t)
            || (t.word
                && (self.lexicon.clause_breaks.contains(t.lower.as_str())
                    || self.lexicon.relatives.contains(t.lower.as_str())))
    }
}
