//! Claims: from a cue match to a cause span, an effect span, a sign and a modality.
//!
//! The matcher says where a cue's words are; this stage decides what the cue is about. Spans are
//! noun-phrase-like runs of words found by walking outwards from the cue and stopping at clause
//! breaks: punctuation, conjunctions, relative pronouns, auxiliaries, reporting verbs and (after
//! the cue) prepositions, all listed in `patterns/lexicon.toml`. The words between a slot and its
//! cue (the *verb group*: "has not been shown to") are read for negation and hedging; a clause
//! opened by "if" makes a claim conditional; a final "?" makes it a question. The stage is pure: it
//! sees one sentence (and the one before it) and does no I/O.
//!
//! The work is split by question: [`spans`] walks out from the cue to the cause and effect spans,
//! [`senses`] decides whether a cue word is used in another sense (a noun, a name, a time), and
//! [`modality`] reads negation, hedges, conditions and sign words; [`assemble`] puts one cue
//! match's slots together into claims; [`window`] says which words are tagged (the clause
//! around each cue match, not the whole sentence).

mod assemble;
mod attribution;
mod modality;
mod senses;
mod spans;
#[cfg(test)]
mod tests;
mod window;

use crate::claim::{Claim, Polarity};
use crate::extract::confidence::{ConfidenceError, ConfidenceModel};
use crate::extract::cues::{Candidate, CueMatch, CueSet, SlotPlace};
use crate::extract::tagger::Tagger;
use crate::extract::tokens::{collapse, token_range, tokenize, Token};
use crate::patterns::{Lexicon, PatternSet};
use crate::variables::Normalizer;
use assemble::MatchCtx;
use rustc_hash::FxHashSet as HashSet;

/// The outcome of one cue match, kept for `hearsay explain`.
#[derive(Debug, Clone)]
pub struct Attempt {
    pub cue: String,
    /// The cue's words as matched.
    pub matched: String,
    pub result: Result<Claim, String>,
    /// How the decision was reached, in words.
    pub notes: Vec<String>,
}

/// The words no span may cross (the words of the other cue matches), and the range of them that
/// one cue match's decision has read. A decision is a pure function of the sentence, the match,
/// the cause it may inherit and the blocked words it reads, so a decision whose read range holds
/// none of the words that changed would come out the same: when a failed match frees its words,
/// only the decisions that read them are made again.
pub(super) struct Blocked<'a> {
    words: &'a [bool],
    /// `[lo, hi)`: the lowest index read and one past the highest (`lo >= hi`: none).
    read: std::cell::Cell<(usize, usize)>,
}

impl<'a> Blocked<'a> {
    fn new(words: &'a [bool]) -> Self {
        Blocked {
            words,
            read: std::cell::Cell::new((usize::MAX, 0)),
        }
    }

    /// Whether word `k` is blocked.
    pub(super) fn at(&self, k: usize) -> bool {
        self.note(k, k + 1);
        self.words[k]
    }

    /// Whether any word of `[a, b)` is blocked.
    pub(super) fn any_in(&self, a: usize, b: usize) -> bool {
        self.note(a, b);
        self.words[a..b].iter().any(|&x| x)
    }

    fn note(&self, a: usize, b: usize) {
        if a < b {
            let (lo, hi) = self.read.get();
            self.read.set((lo.min(a), hi.max(b)));
        }
    }

    /// The range of words read so far.
    fn read(&self) -> (usize, usize) {
        self.read.get()
    }
}

/// A sentence to extract from, with its place in the document.
#[derive(Debug, Clone, Copy)]
pub struct SentenceRef<'a> {
    pub text: &'a str,
    /// Byte offset of the sentence in the document.
    pub offset: usize,
}

/// Where a sentence came from, for the claim's `source`.
#[derive(Debug, Clone)]
pub struct Origin<'a> {
    pub path: &'a str,
    pub line: usize,
    pub column: usize,
    pub page: Option<u32>,
    pub record: Option<&'a str>,
}

/// Turns cue matches into claims.
#[derive(Debug)]
pub struct Extractor {
    pub cues: CueSet,
    pub lexicon: Lexicon,
    pub normalizer: Normalizer,
    verb_group: HashSet<String>,
    right_skip: HashSet<String>,
    single_negators: HashSet<String>,
    /// Keys of the words that name no variable on their own (`[keys] not_alone`), stemmed.
    not_alone: HashSet<String>,
    /// The first words of the negator, conditional and hedge phrases: only a token among them
    /// can start one, so the phrase lists are compared at few positions.
    modal_firsts: HashSet<String>,
    /// The part-of-speech tagger, loaded once per process.
    tagger: &'static Tagger,
    /// The confidence model that scores this extractor's claims: the pattern folder's own
    /// `confidence.toml`, else the built-in one.
    pub confidence: ConfidenceModel,
}

/// Why a pattern set gives no extractor.
#[derive(Debug, thiserror::Error)]
pub enum ExtractorError {
    /// A cue pattern does not compile; the message names its file and line.
    #[error("{0}")]
    Cues(String),
    /// The pattern folder's confidence model is not valid.
    #[error(transparent)]
    Confidence(#[from] ConfidenceError),
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct Span {
    /// Token range [from, to).
    from: usize,
    to: usize,
}

impl Span {
    fn is_empty(&self) -> bool {
        self.from >= self.to
    }
}

/// A slot as chosen, before keys are built.
#[derive(Debug, Clone)]
struct Chosen {
    /// Byte range in the document.
    start: usize,
    end: usize,
    text: String,
    /// Text used for the key (the span less any sign word).
    key_text: String,
    sign: Option<Polarity>,
    negated: bool,
    /// The pronoun written in the sentence, when the span is its antecedent instead.
    pronoun: Option<String>,
    /// Where the claim's text starts when it shows more than the span read for the variable:
    /// "the growth of molds" names the growth, so the claim shows it, while its key, sign and
    /// head are read from "molds" (byte offset in the document, and the text from there).
    lead: Option<(usize, String)>,
}

impl Chosen {
    /// The token range of this span in the sentence `sent` (document offsets made relative).
    fn tokens(&self, toks: &[Token], sent: SentenceRef<'_>) -> (usize, usize) {
        token_range(
            toks,
            self.start.saturating_sub(sent.offset),
            self.end.saturating_sub(sent.offset),
        )
    }
}

/// Pronouns that a slot may consist of and that are resolved to an antecedent.
const PRONOUNS: &[&str] = &["it", "they", "this", "these"];

/// How many words a clause span (connective cues) may have beyond `max_words`.
const CLAUSE_CAP_EXTRA: usize = 4;

impl Extractor {
    /// The extractor of a pattern set: its cues compiled, its lexicon, its confidence model.
    pub fn new(set: &PatternSet) -> Result<Extractor, ExtractorError> {
        let confidence = ConfidenceModel::of(set)?;
        let lexicon = set.lexicon.clone();
        // The tagger's model loads while the cues compile.
        let (cues, _) = rayon::join(|| CueSet::new(set), Tagger::load_builtin);
        let cues = cues.map_err(ExtractorError::Cues)?;
        let normalizer = Normalizer::new(&lexicon);
        let not_alone = lexicon
            .not_alone
            .iter()
            .map(|w| normalizer.key(w))
            .filter(|k| !k.is_empty())
            .collect();
        let single = |v: &Vec<Vec<String>>| {
            v.iter()
                .filter(|p| p.len() == 1)
                .map(|p| p[0].clone())
                .collect::<HashSet<_>>()
        };
        let single_negators = single(&lexicon.negators);
        let modal_firsts = [&lexicon.negators, &lexicon.conditionals, &lexicon.hedges]
            .into_iter()
            .flatten()
            .filter_map(|p| p.first().cloned())
            .collect();
        let mut verb_group: HashSet<String> = lexicon.fillers.iter().cloned().collect();
        verb_group.extend(lexicon.auxiliaries.iter().cloned());
        verb_group.extend(single_negators.iter().cloned());
        verb_group.extend(single(&lexicon.hedges));
        let right_skip = lexicon
            .fillers
            .iter()
            .filter(|w| {
                !lexicon.prepositions.contains(*w)
                    && w.as_str() != "to"
                    && !lexicon.auxiliaries.contains(*w)
            })
            .cloned()
            .collect();
        Ok(Extractor {
            cues,
            lexicon,
            normalizer,
            verb_group,
            right_skip,
            single_negators,
            not_alone,
            modal_firsts,
            tagger: Tagger::load_builtin(),
            confidence,
        })
    }

    /// Tag every word of a tokenised sentence (the sentence before a cue's, when a pronoun
    /// slot looks back to it for an antecedent).
    pub fn tag_tokens(&self, sentence: &str, toks: &mut [Token]) {
        let words: Vec<&str> = toks.iter().map(|t| &sentence[t.start..t.end]).collect();
        for (t, tag) in toks.iter_mut().zip(self.tagger.tag(&words)) {
            t.tag = Some(tag);
        }
    }

    fn adverb(&self, w: &str) -> bool {
        w.len() > 5 && w.ends_with("ly") && !self.lexicon.not_adverbs.contains(w)
    }

    /// Extract the claims of one sentence. `prev` is the sentence before it in the same block, for
    /// connectives that open a sentence. Candidates come from the prefilter. Returns the
    /// sentence's tokens as tagged for the span finder (empty when no cue matched), for the
    /// confidence model to read the same tags.
    pub fn extract(
        &self,
        sent: SentenceRef<'_>,
        prev: Option<SentenceRef<'_>>,
        origin: &Origin<'_>,
        candidates: &[Candidate],
        out: &mut Vec<Claim>,
        mut trace: Option<&mut Vec<Attempt>>,
    ) -> Vec<Token> {
        let before = out.len();
        let Some((matches, mut toks, cue_tokens)) =
            self.matched_tokens(sent.text, candidates, trace.as_deref_mut())
        else {
            return Vec::new();
        };
        let mut blocked = vec![false; toks.len()];
        let noun_uses: Vec<Option<String>> = matches
            .iter()
            .zip(&cue_tokens)
            .map(|(m, &(a, _))| self.noun_use(m, &toks, a))
            .collect();
        // A cue word used as a noun ("the spawning") stays part of the spans around it.
        for (&(a, b), nu) in cue_tokens.iter().zip(&noun_uses) {
            if nu.is_none() {
                blocked[a..b].iter_mut().for_each(|x| *x = true);
            }
        }
        let sentence_text = std::cell::OnceCell::new();
        // One cue match decided: its claims or why none, its notes, and which blocked words the
        // decision read.
        let decide = |i: usize, blocked: &[bool], inherited: Option<&Chosen>| {
            let mut notes = Vec::new();
            let tracked = Blocked::new(blocked);
            let (ca, cb) = cue_tokens[i];
            let r = match &noun_uses[i] {
                Some(why) => Err(why.clone()),
                None => {
                    let cx = MatchCtx {
                        m: &matches[i],
                        ca,
                        cb,
                        toks: &toks,
                        blocked: &tracked,
                        sent,
                        prev,
                        origin,
                        sentence_text: &sentence_text,
                        inherited_cause: inherited,
                    };
                    self.claim_for(&cx, &mut notes)
                }
            };
            (r, notes, tracked.read())
        };
        let mut results = Vec::with_capacity(matches.len());
        let mut notes = Vec::with_capacity(matches.len());
        let mut reads = Vec::with_capacity(matches.len());
        for i in 0..matches.len() {
            let (r, n, read) = decide(i, &blocked, None);
            results.push(r);
            notes.push(n);
            reads.push(read);
        }
        // "The levy raises bus fares and lowers car use": a verb cue with no cause of its own,
        // coordinated with an earlier verb cue that has one, takes that cause. Each takes it
        // from the first decisions; only the matches that take one are decided again.
        let mut inherit: Vec<Option<Chosen>> = vec![None; matches.len()];
        for i in 0..matches.len() {
            if results[i].is_ok() || noun_uses[i].is_some() {
                continue;
            }
            inherit[i] = self.coordinated_cause(&matches, &cue_tokens, &results, &toks, i);
        }
        for (i, inherited) in inherit.iter().enumerate() {
            if inherited.is_some() {
                (results[i], notes[i], reads[i]) = decide(i, &blocked, inherited.as_ref());
            }
        }
        // A cue that gave no claim ("exploding fuel." read as the verb "fuel") must not cut the
        // spans of the others: unblock its words and decide again every match whose decision
        // read one of them. A decision reads nothing else that changed, so the others stand.
        let mut freed = Vec::new();
        for i in 0..matches.len() {
            if results[i].is_err() && noun_uses[i].is_none() {
                let (a, b) = cue_tokens[i];
                for (k, word) in blocked.iter_mut().enumerate().take(b).skip(a) {
                    if *word {
                        *word = false;
                        freed.push(k);
                    }
                }
            }
        }
        if !freed.is_empty() {
            for i in 0..matches.len() {
                let (lo, hi) = reads[i];
                if freed.iter().any(|&k| lo <= k && k < hi) {
                    (results[i], notes[i], reads[i]) = decide(i, &blocked, inherit[i].as_ref());
                }
            }
        }
        for ((m, result), notes) in matches.iter().zip(results).zip(notes) {
            if let Ok(cs) = &result {
                out.extend(cs.iter().cloned());
            }
            if let Some(t) = trace.as_deref_mut() {
                self.record(t, m, sent.text, result, notes);
            }
        }
        self.tag_claim_spans(sent, &mut toks, &out[before..]);
        toks
    }

    /// The cue matches of a sentence that survive the first checks, its tokens with the words
    /// of each match's tagging window tagged ([`window`]), and each match's token range; `None`
    /// when no cue matches.
    #[allow(clippy::type_complexity)]
    fn matched_tokens(
        &self,
        sentence: &str,
        candidates: &[Candidate],
        trace: Option<&mut Vec<Attempt>>,
    ) -> Option<(Vec<CueMatch>, Vec<Token>, Vec<(usize, usize)>)> {
        let mut matches = self.cues.match_sentence(sentence, candidates);
        self.drop_outcome_misses(&mut matches, sentence, trace);
        if matches.is_empty() {
            return None;
        }
        let mut toks = tokenize(sentence);
        let cue_tokens: Vec<(usize, usize)> = matches
            .iter()
            .map(|m| token_range(&toks, m.start, m.end))
            .collect();
        self.tag_clauses(sentence, &mut toks, &cue_tokens);
        Some((matches, toks, cue_tokens))
    }

    /// The tokens of one sentence with the tags extraction gives them: the words of each cue
    /// match's window tagged, and any word of a claim's span outside them (no tag at all when no
    /// cue matches; a claim whose cause comes from the sentence before is not seen here). The pipeline
    /// keeps the tokens it tagged ([`Extractor::extract`] returns them); this is for callers that
    /// start from a sentence's text (`explain`, `train-confidence`), so that they see the same
    /// tags as the pipeline.
    pub fn sentence_tokens(&self, sentence: &str) -> Vec<Token> {
        let hits = self.cues.hits(sentence);
        let candidates = self.cues.candidates(&hits, 0);
        let origin = Origin {
            path: "",
            line: 1,
            column: 1,
            page: None,
            record: None,
        };
        let sent = SentenceRef {
            text: sentence,
            offset: 0,
        };
        let toks = self.extract(sent, None, &origin, &candidates, &mut Vec::new(), None);
        if toks.is_empty() {
            tokenize(sentence)
        } else {
            toks
        }
    }

    /// The cause a verb cue at match `i` takes from the verb cue it is coordinated with: "X
    /// raises A and lowers B" gives "lowers" the cause of "raises". Only for a cue whose cause
    /// comes before it, right after "and", "but" or "yet" (adverbs and "also" between).
    fn coordinated_cause(
        &self,
        matches: &[CueMatch],
        cue_tokens: &[(usize, usize)],
        results: &[Result<Vec<Claim>, String>],
        toks: &[Token],
        i: usize,
    ) -> Option<Chosen> {
        if matches[i].cause != SlotPlace::Before {
            return None;
        }
        let mut k = cue_tokens[i].0;
        while k > 0 && (self.adverb(&toks[k - 1].lower) || toks[k - 1].lower == "also") {
            k -= 1;
        }
        if k == 0 || !matches!(toks[k - 1].lower.as_str(), "and" | "but" | "yet") {
            return None;
        }
        let j = (0..matches.len())
            .filter(|&j| {
                cue_tokens[j].1 < k
                    && matches[j].cause == SlotPlace::Before
                    && results[j].as_ref().is_ok_and(|cs| !cs.is_empty())
            })
            .max_by_key(|&j| cue_tokens[j].1)?;
        let first = results[j].as_ref().ok()?.first()?;
        Some(Chosen {
            start: first.cause.start,
            end: first.cause.end,
            text: first.cause.text.clone(),
            key_text: first.cause.text.clone(),
            sign: None,
            negated: false,
            pronoun: first.cause.pronoun.clone(),
            lead: None,
        })
    }

    /// Before any tagging: an outcome cue whose effect ends right before it ("headaches from")
    /// needs an outcome noun there; most "from"s in a text are not causal and stop here.
    fn drop_outcome_misses(
        &self,
        matches: &mut Vec<CueMatch>,
        sentence: &str,
        mut trace: Option<&mut Vec<Attempt>>,
    ) {
        matches.retain(|m| {
            let Some(word) = self.outcome_word_missing(m, sentence) else {
                return true;
            };
            if let Some(t) = trace.as_deref_mut() {
                t.push(Attempt {
                    cue: self.cues.cues[m.cue].spec.id.clone(),
                    matched: collapse(&sentence[m.start..m.end]),
                    result: Err(format!(
                        "\"{word}\" before the cue is not an outcome noun ([outcomes] in lexicon.toml)"
                    )),
                    notes: Vec::new(),
                });
            }
            false
        });
    }

    /// The attempts of one cue match, for `explain`: one per claim, or the reason for none.
    fn record(
        &self,
        t: &mut Vec<Attempt>,
        m: &CueMatch,
        sentence: &str,
        result: Result<Vec<Claim>, String>,
        notes: Vec<String>,
    ) {
        let cue = self.cues.cues[m.cue].spec.id.clone();
        let matched = collapse(&sentence[m.start..m.end]);
        match result {
            Ok(cs) => {
                for c in cs {
                    t.push(Attempt {
                        cue: cue.clone(),
                        matched: matched.clone(),
                        result: Ok(c),
                        notes: notes.clone(),
                    });
                }
            }
            Err(e) => t.push(Attempt {
                cue,
                matched,
                result: Err(e),
                notes,
            }),
        }
    }
}
