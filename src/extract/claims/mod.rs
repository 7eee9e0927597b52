//! Claims: from a cue match to a cause span, an effect span, a sign and a modality.
//!
//! The matcher says where a cue's words are; this stage decides what the cue is about. Spans are
//! noun-phrase-like runs of words found by walking outwards from the cue and stopping at clause
//! breaks: punctuation, conjunctions, relative pronouns, auxiliaries, reporting verbs and (after
//! the cue) prepositions, all listed in `patterns/lexicon.toml`. The words between a slot and its
//! cue (the *verb group*: "has not been shown to") are read for negation and hedging; a clause
//! opened by "if" makes a claim conditional; a final "?" makes it a question. The stage is pure: it
//! sees one sentence (and the one before it) and does no I/O.

use crate::claim::{Claim, Modality, Polarity, Slot, Source, SCHEMA_VERSION};
use crate::extract::cues::{CueMatch, CueSet, SlotPlace};
use crate::extract::tagger::{Tag, Tagger};
use crate::patterns::{Lexicon, PatternSet, PatternToken, Role};
use crate::variables::Normalizer;
use compact_str::CompactString;
use regex::Regex;
use rustc_hash::FxHashSet as HashSet;
use std::sync::OnceLock;

/// A word or punctuation mark of a sentence; offsets are bytes into the sentence.
#[derive(Debug, Clone)]
pub struct Token {
    pub start: usize,
    pub end: usize,
    /// Lower-cased, with ’ as '. Inline up to 24 bytes: no allocation for almost any word.
    pub lower: CompactString,
    pub word: bool,
    /// The token starts with an upper-case letter.
    pub capital: bool,
    /// Part of speech, filled in by `Extractor::tag_tokens` for sentences where a cue fired.
    pub tag: Option<Tag>,
}

fn token_regex() -> &'static Regex {
    static RE: OnceLock<Regex> = OnceLock::new();
    RE.get_or_init(|| {
        Regex::new(r"[\p{L}\p{N}]+(?:['’\-.][\p{L}\p{N}]+)*|\S")
            .expect("static token regex is valid")
    })
}

/// A token's lower-case form with the typographic apostrophe made plain (inline: no allocation
/// for a word of up to 24 bytes).
fn lower_word(s: &str) -> CompactString {
    if s.is_ascii() {
        let mut lower = CompactString::from(s);
        lower.make_ascii_lowercase();
        return lower;
    }
    let lower = s.to_lowercase();
    CompactString::from(if lower.contains('’') {
        lower.replace('’', "'")
    } else {
        lower
    })
}

/// Split a sentence into tokens.
pub fn tokenize(sentence: &str) -> Vec<Token> {
    token_spans(sentence)
        .into_iter()
        .map(|(start, end)| {
            let s = &sentence[start..end];
            let word = s.chars().next().is_some_and(char::is_alphanumeric);
            Token {
                start,
                end,
                lower: lower_word(s),
                word,
                capital: s.chars().next().is_some_and(char::is_uppercase),
                tag: None,
            }
        })
        .collect()
}

/// Unicode `White_Space` in ASCII: what the token regex's `\S` skips (note: vertical tab too).
fn ascii_space(b: u8) -> bool {
    matches!(b, b'\t' | b'\n' | 0x0B | 0x0C | b'\r' | b' ')
}

/// The byte ranges of the token regex's matches. Tokenising was a tenth of extraction, most of
/// it the regex stepping through UTF-8: a token made of ASCII is found here by hand, and only a
/// token that starts with, or runs into, a non-ASCII character is left to the regex.
fn token_spans(s: &str) -> Vec<(usize, usize)> {
    let b = s.as_bytes();
    let mut out = Vec::with_capacity(b.len() / 5 + 1);
    let mut i = 0;
    // The regex's match from `at` (a place where a match may start), or `None` when none is left.
    let by_regex = |at: usize| token_regex().find_at(s, at).map(|m| (m.start(), m.end()));
    while i < b.len() {
        let c = b[i];
        if ascii_space(c) {
            i += 1;
            continue;
        }
        let token = if !c.is_ascii() {
            by_regex(i)
        } else if !c.is_ascii_alphanumeric() {
            Some((i, i + 1))
        } else {
            let start = i;
            loop {
                while i < b.len() && b[i].is_ascii_alphanumeric() {
                    i += 1;
                }
                match (b.get(i), b.get(i + 1)) {
                    // A joiner and a letter or digit after it: the token goes on.
                    (Some(b'\'' | b'-' | b'.'), Some(n)) if n.is_ascii_alphanumeric() => i += 2,
                    // A non-ASCII character inside or right after the token, or after a
                    // joiner: it may be a letter (or the typographic apostrophe), so the regex
                    // decides.
                    (Some(x), _) if !x.is_ascii() => break by_regex(start),
                    (Some(b'\'' | b'-' | b'.'), Some(n)) if !n.is_ascii() => break by_regex(start),
                    _ => break Some((start, i)),
                }
            }
        };
        match token {
            Some(m) => {
                out.push(m);
                i = m.1;
            }
            None => break,
        }
    }
    out
}

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

const CLAUSE_CAP_EXTRA: usize = 4;

/// Prepositions whose phrase may attach to the noun before it inside a span ("cracks in the
/// walls", "damage to the roof"); agent and source prepositions ("by", "from") never do.
const PP_ATTACH: &[&str] = &[
    "in", "on", "at", "to", "for", "among", "within", "across", "around",
];

/// Words naming a quantity of what follows "of": the head of "most of the noise" is "noise".
const QUANTITIES: &[&str] = &[
    "most",
    "some",
    "much",
    "part",
    "half",
    "amount",
    "amounts",
    "lot",
    "lots",
    "level",
    "levels",
    "deal",
    "bit",
    "all",
    "majority",
    "share",
    "proportion",
    "fraction",
    "rest",
    "degree",
    "kind",
    "type",
    "sort",
    "form",
    "source",
    "sources",
    "cases",
    "case",
    "number",
    "percent",
];

/// The longest span, in words, that an attached prepositional phrase may make.
const PP_MAX_WORDS: usize = 7;

impl Extractor {
    pub fn new(set: &PatternSet) -> Result<Extractor, String> {
        let lexicon = set.lexicon.clone();
        // The tagger's model loads while the cues compile.
        let (cues, _) = rayon::join(|| CueSet::new(set), Tagger::load_builtin);
        let cues = cues?;
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
        })
    }

    /// Tag the words of a tokenised sentence (only sentences where a cue fired get here).
    pub fn tag_tokens(&self, sentence: &str, toks: &mut [Token]) {
        let words: Vec<&str> = toks.iter().map(|t| &sentence[t.start..t.end]).collect();
        for (t, tag) in toks.iter_mut().zip(self.tagger.tag(&words)) {
            t.tag = Some(tag);
        }
    }

    fn adverb(&self, w: &str) -> bool {
        w.len() > 5 && w.ends_with("ly") && !self.lexicon.not_adverbs.contains(w)
    }

    /// The fixed term (`[terms]` in lexicon.toml) that starts at token `at`, if any: its words in
    /// order, the first one also after a slash or hyphen ("Ca2+/calmodulin-dependent",
    /// "cyclinB-cyclin-dependent"), the last one also with a plural -s or -es.
    fn fixed_term_at(&self, toks: &[Token], at: usize) -> Option<String> {
        self.lexicon.fixed_terms.iter().find_map(|term| {
            let n = term.len();
            let words = toks.get(at..at + n)?;
            let fits = words.iter().zip(term).enumerate().all(|(i, (t, w))| {
                let l = t.lower.as_str();
                l == w
                    || (i == 0
                        && l.strip_suffix(w.as_str())
                            .is_some_and(|r| r.ends_with('/') || r.ends_with('-')))
                    || (i + 1 == n
                        && l.strip_prefix(w.as_str())
                            .is_some_and(|rest| rest == "s" || rest == "es"))
            });
            fits.then(|| term.join(" "))
        })
    }

    /// A word that ends a noun-phrase span in either direction.
    fn np_boundary(&self, t: &Token) -> bool {
        let l = &self.lexicon;
        !t.word
            || l.clause_breaks.contains(t.lower.as_str())
            || l.relatives.contains(t.lower.as_str())
            || l.auxiliaries.contains(t.lower.as_str())
            || (l.reporting_verbs.contains(t.lower.as_str()) && !t.tag.is_some_and(Tag::is_noun))
            || self.single_negators.contains(t.lower.as_str())
    }

    /// Punctuation that closes a clause.
    fn clause_punct(t: &Token) -> bool {
        !t.word
            && matches!(
                t.lower.as_str(),
                "," | ";" | ":" | "(" | ")" | "[" | "]" | "." | "!" | "?" | "—" | "–"
            )
    }

    fn clause_boundary(&self, t: &Token) -> bool {
        Self::clause_punct(t) || (t.word && self.lexicon.clause_breaks.contains(t.lower.as_str()))
    }

    fn strip_determiners(&self, toks: &[Token], mut s: Span) -> Span {
        while s.from < s.to
            && self
                .lexicon
                .determiners
                .contains(toks[s.from].lower.as_str())
        {
            s.from += 1;
        }
        s
    }

    /// Walk back from token `from` (exclusive): the verb group, then the noun phrase.
    fn walk_back(
        &self,
        toks: &[Token],
        from: usize,
        noun_cue: bool,
        blocked: &[bool],
        notes: &mut Vec<String>,
    ) -> Span {
        let mut i = from;
        while i > 0 && matches!(toks[i - 1].lower.as_str(), "," | ";") {
            i -= 1;
        }
        // "X is one of the commonest causes of Y": before a noun cue, adjectives and adverbs
        // belong to the copula group, not to the slot.
        let noun_cue = noun_cue
            && toks
                .get(from)
                .is_some_and(|t| t.tag.is_some_and(Tag::is_noun));
        let parenthetical = |k: usize| {
            toks[k].word
                && !blocked[k]
                && self.lexicon.parenthetical.contains(toks[k].lower.as_str())
        };
        loop {
            if i == 0 || blocked[i - 1] {
                break;
            }
            let t = &toks[i - 1];
            if t.word
                && (self.verb_group.contains(t.lower.as_str())
                    || self.adverb(&t.lower)
                    || (noun_cue
                        && t.tag
                            .is_some_and(|g| g.is_adjective() || g.as_str().starts_with("RB"))))
            {
                i -= 1;
                continue;
            }
            // "the tardiness however has been caused", "the increase, though, caused".
            let skip = if parenthetical(i - 1) {
                1
            } else if t.lower == "," && i >= 2 && parenthetical(i - 2) {
                2
            } else {
                break;
            };
            i -= skip;
            if i > 0 && toks[i - 1].lower == "," {
                i -= 1;
            }
        }
        if i < from {
            notes.push(format!(
                "verb group before the cue: \"{}\"",
                join(toks, i, from)
            ));
        }
        if i > 0 && matches!(toks[i - 1].lower.as_str(), "which" | "that" | "who") {
            // "X, which in turn reduces Z": the cause is the antecedent of the relative pronoun.
            i -= 1;
            if i > 0 && toks[i - 1].lower == "," {
                i -= 1;
            }
            notes.push("relative pronoun: the slot is its antecedent".into());
        }
        let end = i;
        while i > 0
            && end - i < self.lexicon.max_words
            && !blocked[i - 1]
            && !self.np_boundary(&toks[i - 1])
            && !(i < end && self.verb_stop(toks, i - 1))
        {
            i -= 1;
        }
        self.strip_determiners(toks, Span { from: i, to: end })
    }

    /// A verb that ends a span walked back: a finite verb, or a base form after "to" or an
    /// auxiliary ("to escape the floodwaters caused by rain" stops at "escape").
    fn verb_stop(&self, toks: &[Token], k: usize) -> bool {
        match toks[k].tag {
            // A finite verb needs a noun or pronoun subject right before it: "Farmers lost
            // income", but not the mis-tagged nouns in "On the farms, buffer strips prevent
            // runoff" or "report that boat traffic increases erosion".
            Some(g) if g.is_finite_verb() => {
                k > 0
                    && toks[k - 1]
                        .tag
                        .is_some_and(|p| p.is_noun() || p.as_str().starts_with("PRP"))
            }
            Some(g) if g.as_str() == "VB" => {
                k > 0 && {
                    let p = toks[k - 1].lower.as_str();
                    p == "to" || self.lexicon.auxiliaries.contains(p)
                }
            }
            _ => false,
        }
    }

    /// "Fish numbers have fallen since the dam opened": the effect clause is in the perfect and
    /// the cause clause has no present-tense or modal verb, so "since" gives a time.
    fn reads_as_time(
        &self,
        toks: &[Token],
        sent: SentenceRef<'_>,
        cause: &Chosen,
        effect: &Chosen,
    ) -> bool {
        let range = |c: &Chosen| {
            let (a, b) = c.tokens(toks, sent);
            &toks[a..b]
        };
        // The effect clause may start before its chosen span ("The town has grown since ...").
        let e = range(effect);
        let perfect = e.iter().enumerate().any(|(i, t)| {
            matches!(t.lower.as_str(), "has" | "have" | "had" | "'ve")
                && e[i + 1..]
                    .iter()
                    .take(3)
                    .any(|n| n.lower == "been" || n.tag.is_some_and(Tag::is_participle))
        });
        let present = range(cause).iter().any(|t| {
            matches!(t.lower.as_str(), "is" | "are" | "am")
                || t.tag
                    .is_some_and(|g| matches!(g.as_str(), "VBZ" | "VBP" | "MD"))
        });
        perfect && !present
    }

    /// "This caused delays.": a demonstrative standing alone before a cue (its span was emptied
    /// because it is also a determiner). Returns its token.
    fn bare_demonstrative(&self, toks: &[Token], ca: usize) -> Option<usize> {
        let mut i = ca;
        while i > 0
            && toks[i - 1].word
            && (self.verb_group.contains(toks[i - 1].lower.as_str())
                || self.adverb(&toks[i - 1].lower))
        {
            i -= 1;
        }
        let p = i.checked_sub(1)?;
        let opens = p == 0 || self.clause_boundary(&toks[p - 1]);
        (opens && matches!(toks[p].lower.as_str(), "this" | "these")).then_some(p)
    }

    /// The antecedent of the pronoun at token `p`: the subject noun phrase of the clause before
    /// it in the sentence, else of the previous sentence. The subject is the run of nominal words
    /// right before the first finite verb, and must hold a noun that is not itself a pronoun.
    fn antecedent(
        &self,
        toks: &[Token],
        p: usize,
        sent: SentenceRef<'_>,
        prev: Option<SentenceRef<'_>>,
        effect_side: bool,
    ) -> Option<(Chosen, bool)> {
        let subject = |toks: &[Token], upto: usize| -> Option<Span> {
            // The tagger often reads a plural verb after a noun as a base form ("crayfish reach").
            let v = (1..upto).find(|&i| {
                toks[i].tag.is_some_and(|g| {
                    g.is_finite_verb() || (g.as_str() == "VB" && toks[i - 1].lower != "to")
                })
            })?;
            let mut i = v;
            while i > 0
                && toks[i - 1].word
                && toks[i - 1].tag.is_some_and(|g| g.is_nominal())
                && !self.np_boundary(&toks[i - 1])
                && v - i < self.lexicon.max_words
            {
                i -= 1;
            }
            let span = self.strip_determiners(toks, Span { from: i, to: v });
            let ok = !span.is_empty()
                && toks[span.from..span.to]
                    .iter()
                    .any(|t| t.tag.is_some_and(Tag::is_noun))
                && !toks[span.from..span.to]
                    .iter()
                    .any(|t| PRONOUNS.contains(&t.lower.as_str()) || t.lower == "they");
            ok.then_some(span)
        };
        // "If boat traffic rises, it ...": the noun phrase after a clause opener, for when the
        // tagger missed the verb ("rises" read as a plural noun). A run that fills the whole
        // clause has swallowed its verb and gives that word back.
        let opener_np = || -> Option<Span> {
            toks.first()
                .filter(|t| self.lexicon.clause_breaks.contains(t.lower.as_str()))?;
            let comma = (1..p).find(|&i| toks[i].lower == ",")?;
            let from =
                (1..comma).find(|&i| !self.lexicon.determiners.contains(toks[i].lower.as_str()))?;
            let mut j = from;
            while j < comma
                && toks[j].word
                && toks[j].tag.is_some_and(|g| g.is_nominal())
                && !self.np_boundary(&toks[j])
            {
                j += 1;
            }
            if j == comma && j - from > 1 {
                j -= 1;
            }
            let span = Span { from, to: j };
            (!span.is_empty()
                && toks[span.from..span.to]
                    .iter()
                    .any(|t| t.tag.is_some_and(Tag::is_noun)))
            .then_some(span)
        };
        if let Some(span) = subject(toks, p).or_else(opener_np) {
            let mut c = self.choose(toks, sent, span, effect_side)?;
            c.pronoun = Some(toks[p].lower.to_string());
            return Some((c, false));
        }
        // Only a pronoun that opens its sentence looks back to the previous one.
        if toks[..p].iter().any(|t| t.word) {
            return None;
        }
        let prev = prev?;
        let mut ptoks = tokenize(prev.text);
        self.tag_tokens(prev.text, &mut ptoks);
        let span = subject(&ptoks, ptoks.len())?;
        let mut c = self.choose(&ptoks, prev, span, effect_side)?;
        c.pronoun = Some(toks[p].lower.to_string());
        Some((c, true))
    }

    /// Walk forward from token `from`: the noun phrase after a cue.
    fn walk_forward(&self, toks: &[Token], from: usize, blocked: &[bool]) -> Span {
        let mut j = from;
        while j < toks.len() && matches!(toks[j].lower.as_str(), "," | ";" | ":") {
            j += 1;
        }
        while j < toks.len()
            && toks[j].word
            && (self.right_skip.contains(toks[j].lower.as_str()) || self.adverb(&toks[j].lower))
        {
            j += 1;
        }
        let start = j;
        // "an increase in Y": the change noun and its link belong to the span (read_sign reads them).
        let mut k = j;
        while k < toks.len() && self.lexicon.determiners.contains(toks[k].lower.as_str()) {
            k += 1;
        }
        if k + 1 < toks.len()
            && (self.lexicon.increase_nouns.contains(toks[k].lower.as_str())
                || self.lexicon.decrease_nouns.contains(toks[k].lower.as_str()))
            && self
                .lexicon
                .change_links
                .contains(toks[k + 1].lower.as_str())
        {
            j = k + 2;
        }
        while j < toks.len()
            && j - start < self.lexicon.max_words
            && !blocked[j]
            && !(self.np_boundary(&toks[j])
                && !(j == start && self.single_negators.contains(toks[j].lower.as_str())))
            && !self.lexicon.prepositions.contains(toks[j].lower.as_str())
            && !(j > start
                && toks[j].tag.is_some_and(Tag::is_finite_verb)
                && !self.np_inside(toks, j))
        {
            j += 1;
        }
        let mut span = Span { from: start, to: j };
        while let Some(to) = self.attached_pp(toks, span, blocked) {
            span.to = to;
        }
        span
    }

    /// A word tagged as a finite verb that cannot be one: right after a determiner or a
    /// possessive ("the indicated situation", "the vaccine's live virus") it modifies a noun.
    fn np_inside(&self, toks: &[Token], j: usize) -> bool {
        j > 0 && {
            let p = &toks[j - 1];
            self.lexicon.determiners.contains(p.lower.as_str())
                || p.tag
                    .is_some_and(|g| matches!(g.as_str(), "DT" | "PRP$" | "POS"))
                || (p.word && p.lower.ends_with("'s"))
        }
    }

    /// "damage to the sea wall": a prepositional phrase that belongs to the noun phrase ending
    /// at `span.to` (a locative or goal preposition followed by a tagged noun phrase). Returns
    /// the new end, or `None` when there is none or the span would pass `PP_MAX_WORDS`.
    fn attached_pp(&self, toks: &[Token], span: Span, blocked: &[bool]) -> Option<usize> {
        let p = span.to;
        if span.is_empty()
            || !toks
                .get(p)
                .is_some_and(|t| PP_ATTACH.contains(&t.lower.as_str()))
            || blocked[p]
            || !toks[p - 1].tag.is_some_and(Tag::is_noun)
        {
            return None;
        }
        let mut j = p + 1;
        while j < toks.len()
            && !blocked[j]
            && toks[j].word
            && toks[j].tag.is_some_and(Tag::is_nominal)
            && !self.np_boundary(&toks[j])
        {
            j += 1;
        }
        // The phrase must end in a noun, and the span stay short enough for a noun phrase.
        if j == p + 1 || !toks[j - 1].tag.is_some_and(Tag::is_noun) || j - span.from > PP_MAX_WORDS
        {
            return None;
        }
        Some(j)
    }

    /// The clause before token `from`, for connective cues.
    fn clause_back(&self, toks: &[Token], from: usize) -> Span {
        let mut from = from;
        while from > 0
            && (Self::clause_punct(&toks[from - 1])
                || matches!(toks[from - 1].lower.as_str(), "and" | "but" | "so"))
        {
            from -= 1;
        }
        let mut i = from;
        while i > 0 && !self.clause_boundary(&toks[i - 1]) {
            i -= 1;
        }
        let mut s = self.strip_determiners(toks, Span { from: i, to: from });
        // "Erosion is because of traffic": the copula belongs to the cue, not the clause.
        while s.to > s.from + 1
            && self
                .lexicon
                .auxiliaries
                .contains(toks[s.to - 1].lower.as_str())
        {
            s.to -= 1;
        }
        s.to = s.to.min(s.from + self.lexicon.max_words + CLAUSE_CAP_EXTRA);
        s
    }

    /// The clause from token `from` on, for connective cues.
    fn clause_forward(&self, toks: &[Token], from: usize) -> Span {
        let mut j = from;
        while j < toks.len()
            && (Self::clause_punct(&toks[j])
                || self.lexicon.determiners.contains(toks[j].lower.as_str()))
        {
            j += 1;
        }
        let start = j;
        while j < toks.len()
            && !Self::clause_punct(&toks[j])
            && !(j > start
                && toks[j].word
                && self.lexicon.clause_breaks.contains(toks[j].lower.as_str()))
        {
            j += 1;
        }
        Span {
            from: start,
            to: j.min(start + self.lexicon.max_words + CLAUSE_CAP_EXTRA),
        }
    }

    /// Read sign words and change nouns at the start of an effect span.
    fn read_sign(&self, toks: &[Token], s: Span) -> (Span, Option<Polarity>, bool) {
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

    fn sign_word(&self, w: &str) -> Option<Polarity> {
        if self.lexicon.sign_increase.contains(w) {
            Some(Polarity::Increase)
        } else if self.lexicon.sign_decrease.contains(w) {
            Some(Polarity::Decrease)
        } else {
            None
        }
    }

    fn choose(
        &self,
        toks: &[Token],
        sent: SentenceRef<'_>,
        span: Span,
        effect_side: bool,
    ) -> Option<Chosen> {
        let (span, mut sign, negated) = if effect_side {
            self.read_sign(toks, span)
        } else {
            (span, None, false)
        };
        if span.is_empty() {
            return None;
        }
        let mut key_from = span.from;
        if effect_side {
            if let Some(p) = self.sign_word(&toks[span.from].lower) {
                if span.to - span.from > 1 {
                    sign = sign.or(Some(p));
                    key_from += 1;
                }
            }
        }
        let (bs, be) = (toks[span.from].start, toks[span.to - 1].end);
        let text = collapse(&sent.text[bs..be]);
        let key_text = collapse(&sent.text[toks[key_from].start..be]);
        Some(Chosen {
            start: sent.offset + bs,
            end: sent.offset + be,
            text,
            key_text,
            sign,
            negated,
            pronoun: None,
        })
    }

    fn choose_bytes(&self, sent: SentenceRef<'_>, start: usize, end: usize) -> Option<Chosen> {
        let raw = &sent.text[start..end];
        let toks = tokenize(raw);
        let span = self.strip_determiners(
            &toks,
            Span {
                from: 0,
                to: toks.len(),
            },
        );
        if span.is_empty() || span.to - span.from > self.lexicon.max_words + CLAUSE_CAP_EXTRA {
            return None;
        }
        let shifted = SentenceRef {
            text: raw,
            offset: sent.offset + start,
        };
        self.choose(&toks, shifted, span, false)
    }

    fn modality(
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

    /// Extract the claims of one sentence. `prev` is the sentence before it in the same block, for
    /// connectives that open a sentence. Candidates come from the prefilter.
    pub fn extract(
        &self,
        sent: SentenceRef<'_>,
        prev: Option<SentenceRef<'_>>,
        origin: &Origin<'_>,
        candidates: &[crate::extract::cues::Candidate],
        out: &mut Vec<Claim>,
        mut trace: Option<&mut Vec<Attempt>>,
    ) {
        let mut matches = self.cues.match_sentence(sent.text, candidates);
        // Before any tagging: an outcome cue whose effect ends right before it ("headaches from")
        // needs an outcome noun there; most "from"s in a text are not causal and stop here.
        matches.retain(|m| {
            let Some(word) = self.outcome_word_missing(m, sent.text) else {
                return true;
            };
            if let Some(t) = trace.as_deref_mut() {
                t.push(Attempt {
                    cue: self.cues.cues[m.cue].spec.id.clone(),
                    matched: collapse(&sent.text[m.start..m.end]),
                    result: Err(format!(
                        "\"{word}\" before the cue is not an outcome noun ([outcomes] in lexicon.toml)"
                    )),
                    notes: Vec::new(),
                });
            }
            false
        });
        if matches.is_empty() {
            return;
        }
        let mut toks = tokenize(sent.text);
        self.tag_tokens(sent.text, &mut toks);
        let toks = toks;
        let mut blocked = vec![false; toks.len()];
        let cue_tokens: Vec<(usize, usize)> = matches
            .iter()
            .map(|m| token_range(&toks, m.start, m.end))
            .collect();
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
        let sentence_text = collapse(sent.text);
        let run = |blocked: &[bool],
                   notes_out: &mut Vec<Vec<String>>|
         -> Vec<Result<Vec<Claim>, String>> {
            notes_out.clear();
            matches
                .iter()
                .zip(&cue_tokens)
                .zip(&noun_uses)
                .map(|((m, &(ca, cb)), nu)| {
                    let mut notes = Vec::new();
                    let r = match nu {
                        Some(why) => Err(why.clone()),
                        None => self.claim_for(
                            m,
                            (ca, cb),
                            &toks,
                            blocked,
                            sent,
                            prev,
                            origin,
                            &sentence_text,
                            &mut notes,
                        ),
                    };
                    notes_out.push(notes);
                    r
                })
                .collect()
        };
        let mut notes = Vec::new();
        let mut results = run(&blocked, &mut notes);
        // A cue that gave no claim ("exploding fuel." read as the verb "fuel") must not cut the
        // spans of the others: unblock its words and decide again.
        let failed: Vec<usize> = results
            .iter()
            .enumerate()
            .filter(|(i, r)| r.is_err() && noun_uses[*i].is_none())
            .map(|(i, _)| i)
            .collect();
        if !failed.is_empty() {
            for &i in &failed {
                let (a, b) = cue_tokens[i];
                blocked[a..b].iter_mut().for_each(|x| *x = false);
            }
            results = run(&blocked, &mut notes);
        }
        for ((m, result), notes) in matches.iter().zip(results).zip(notes) {
            if let Ok(cs) = &result {
                out.extend(cs.iter().cloned());
            }
            if let Some(t) = trace.as_deref_mut() {
                let cue = self.cues.cues[m.cue].spec.id.clone();
                let matched = collapse(&sent.text[m.start..m.end]);
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
    }

    /// For an outcome cue whose effect comes right before it: the word before the cue, when it
    /// is not an outcome noun (`None` when the cue needs no check or the word is one).
    fn outcome_word_missing(&self, m: &CueMatch, sentence: &str) -> Option<String> {
        if !self.cues.cues[m.cue].spec.outcome_effect || m.effect != SlotPlace::Before {
            return None;
        }
        let before = sentence[..m.start].trim_end();
        let word: String = before
            .rsplit(|c: char| !c.is_alphanumeric())
            .next()
            .unwrap_or("")
            .to_lowercase();
        // "Heat is produced by": a verb group stands between; the head is checked after the spans.
        let verb_group = self.verb_group.contains(&word) || self.adverb(&word);
        (!verb_group && !self.lexicon.outcomes.contains(&word)).then_some(word)
    }

    /// Whether an effect span's head noun is an outcome noun: the last word before any
    /// preposition ("heat in the engine" → "heat"), tagged as a noun when tags are known.
    fn outcome_head(&self, toks: &[Token], sent: SentenceRef<'_>, c: &Chosen) -> bool {
        if c.start < sent.offset || c.end > sent.offset + sent.text.len() {
            // An antecedent from the previous sentence: read its own words (untagged).
            return self.outcome_head_in(&tokenize(&c.text));
        }
        let (a, b) = c.tokens(toks, sent);
        self.outcome_head_in(&toks[a..b.min(toks.len())])
    }

    fn outcome_head_in(&self, span: &[Token]) -> bool {
        // The head of each phrase between prepositions: "most of the noise" → "most", "noise".
        let mut heads: Vec<&Token> = Vec::new();
        let mut head = None;
        let mut of_before = Vec::new();
        for t in span {
            if self.phrase_break(t) {
                heads.extend(head.take());
                of_before.push(t.lower == "of");
                if heads.is_empty() {
                    break;
                }
            } else if t.word {
                head = Some(t);
            }
        }
        heads.extend(head);
        let is_outcome = |t: &Token| {
            let last = t.lower.rsplit('-').next().unwrap_or(&t.lower);
            self.lexicon.outcomes.contains(last) && t.tag.is_none_or(Tag::is_noun)
        };
        match heads.as_slice() {
            [] => false,
            [first, rest @ ..] => {
                is_outcome(first)
                    // "most of the noise", "a great deal of pleasure": the quantity's object.
                    || (QUANTITIES.contains(&first.lower.as_str())
                        && of_before.first() == Some(&true)
                        && rest.first().is_some_and(|t| is_outcome(t)))
            }
        }
    }

    /// "of" or a preposition: where one phrase of a span ends and the next begins.
    fn phrase_break(&self, t: &Token) -> bool {
        t.word && (t.lower == "of" || self.lexicon.prepositions.contains(t.lower.as_str()))
    }

    /// "the treatment of headaches from fatigue", "the emission of radiation from phones": when
    /// the span's head is not an outcome noun, the phrase after its last preposition, if that
    /// one's head is.
    fn outcome_tail(&self, toks: &[Token], sent: SentenceRef<'_>, c: &Chosen) -> Option<Chosen> {
        let (a, b) = c.tokens(toks, sent);
        let b = b.min(toks.len());
        let k = (a..b).rev().find(|&k| self.phrase_break(&toks[k]))?;
        let span = self.strip_determiners(toks, Span { from: k + 1, to: b });
        let tail = self.choose(toks, sent, span, true)?;
        self.outcome_head(toks, sent, &tail).then_some(tail)
    }

    /// A verb cue right after a determiner or preposition is a noun or adjective use ("an
    /// increase in", "the increased risk"): not this cue.
    fn noun_use(&self, m: &CueMatch, toks: &[Token], ca: usize) -> Option<String> {
        let cue = &self.cues.cues[m.cue];
        // A capitalised cue word after a word inside the sentence is part of a name ("Foster
        // City", "Lead Author"), and so is one after a comma or an opening bracket that does not
        // open the sentence ("(Applied Biosystems, Foster City, CA)"), when the cue word starts
        // its token (a glued cue, "-mediated", starts inside it, and the capital is the cause's:
        // "(ROCK-mediated").
        let after_name = |i: usize| {
            let punct = match toks[i].lower.as_str() {
                "," => true,
                "(" | "[" => i > 0,
                _ => false,
            };
            toks[i].word || (punct && toks[ca].start == m.start)
        };
        if ca > 0 && toks[ca].capital && after_name(ca - 1) {
            return Some("capitalised inside the sentence: part of a name, not a statement".into());
        }
        // A glued cue inside a fixed name ("cyclin-dependent kinase").
        if toks[ca].start < m.start {
            if let Some(t) = self.fixed_term_at(toks, ca) {
                return Some(format!(
                    "part of the fixed term \"{t}\" ([terms] in lexicon.toml), not a statement"
                ));
            }
        }
        if cue.left.is_none() || cue.spec.clause_spans || !cue.verb_first {
            return None;
        }
        // "the limit of 5 knots", "the limit is": a verb is not followed by "of" or an auxiliary.
        let cb = toks
            .iter()
            .position(|t| t.start >= m.end)
            .unwrap_or(toks.len());
        if let Some(next) = toks.get(cb) {
            if next.lower == "of" || self.lexicon.auxiliaries.contains(next.lower.as_str()) {
                return Some(format!(
                    "\"{}\" after the cue: a noun use, not a statement",
                    next.lower
                ));
            }
        }
        if let Some(why) = self.tagged_noun_use(toks, ca, cue.left == Some(Role::Cause)) {
            return Some(why);
        }
        let before = ca.checked_sub(1).map(|i| toks[i].lower.as_str())?;
        // "the germ that causes ulcers": a relative pronoun, not a determiner, before a verb.
        // "This reduced fish numbers.": a demonstrative standing alone is a pronoun.
        let pronoun = self.bare_demonstrative(toks, ca) == Some(ca - 1);
        let relative = (self.lexicon.relatives.contains(before) || pronoun)
            && toks[ca].tag.is_some_and(Tag::is_finite_verb);
        if (self.lexicon.determiners.contains(before) && !relative)
            || (self.lexicon.prepositions.contains(before) && before != "to")
        {
            return Some(format!(
                "\"{before}\" before the cue: a noun or adjective use, not a statement"
            ));
        }
        None
    }

    /// The tagger's reading of a verb cue's first word. A noun or adjective reading ("tax
    /// increases hurt growth", "the speed limit proposal") wins only when the clause has another
    /// finite verb to be its predicate; a past participle between a noun and a noun, with no
    /// "have" before it, is a modifier ("a purpose driven animal"), not an active statement.
    fn tagged_noun_use(&self, toks: &[Token], ca: usize, active: bool) -> Option<String> {
        let tag = toks[ca].tag?;
        let w = &toks[ca].lower;
        let other_verb = self.other_predicate(toks, ca);
        if (tag.is_noun() || tag.is_adjective()) && other_verb {
            return Some(format!(
                "\"{w}\" is tagged {tag} and the clause has another predicate: a noun use, not a statement"
            ));
        }
        if active && tag.is_participle() {
            let mut i = ca;
            while i > 0 && toks[i - 1].word && self.adverb(&toks[i - 1].lower) {
                i -= 1;
            }
            let prev = i.checked_sub(1).map(|i| &toks[i]);
            let perfect = prev.is_some_and(|t| {
                matches!(
                    t.lower.as_str(),
                    "have" | "has" | "had" | "having" | "'ve" | "'d"
                )
            });
            let modifier = prev.is_some_and(|t| t.tag.is_some_and(Tag::is_nominal))
                && toks
                    .get(ca + 1)
                    .is_some_and(|t| t.tag.is_some_and(|g| g.is_noun() || g.is_adjective()));
            if !perfect && modifier && other_verb {
                return Some(format!(
                    "\"{w}\" is a past participle between nominals: a modifier, not an active statement"
                ));
            }
        }
        None
    }

    /// Whether the clause around the cue word at `ca` has a predicate of its own: a copula or
    /// an auxiliary with its verb ("was rejected"), or a finite verb at least one word away from
    /// the cue (the tagger is least sure right next to an ambiguous word). An auxiliary that only
    /// opens a question ("Does X cause Y?") does not count.
    fn other_predicate(&self, toks: &[Token], ca: usize) -> bool {
        let (a, b) = self.clause_around(toks, ca);
        let aux = &self.lexicon.auxiliaries;
        (a..b).any(|i| {
            let t = &toks[i];
            if i == ca || !t.tag.is_some_and(Tag::is_finite_verb) {
                return false;
            }
            if !aux.contains(t.lower.as_str()) {
                return i + 1 < ca || i > ca + 1;
            }
            if matches!(t.lower.as_str(), "is" | "are" | "was" | "were" | "am") {
                return true;
            }
            let mut j = i + 1;
            while j < b
                && (self.single_negators.contains(toks[j].lower.as_str())
                    || self.adverb(&toks[j].lower))
            {
                j += 1;
            }
            j < b && j != ca && toks[j].tag.is_some_and(Tag::is_verb)
        })
    }

    /// The clause around token `i`: bounded by clause punctuation and clause-breaking words.
    fn clause_around(&self, toks: &[Token], i: usize) -> (usize, usize) {
        let mut a = i;
        while a > 0
            && !self.clause_boundary(&toks[a - 1])
            && !self.lexicon.relatives.contains(toks[a - 1].lower.as_str())
        {
            a -= 1;
        }
        let mut b = i + 1;
        while b < toks.len()
            && !self.clause_boundary(&toks[b])
            && !self.lexicon.relatives.contains(toks[b].lower.as_str())
        {
            b += 1;
        }
        (a, b)
    }

    #[allow(clippy::too_many_arguments)]
    fn claim_for(
        &self,
        m: &CueMatch,
        (ca, cb): (usize, usize),
        toks: &[Token],
        blocked: &[bool],
        sent: SentenceRef<'_>,
        prev: Option<SentenceRef<'_>>,
        origin: &Origin<'_>,
        sentence_text: &str,
        notes: &mut Vec<String>,
    ) -> Result<Vec<Claim>, String> {
        let cue = &self.cues.cues[m.cue];
        let spec = &cue.spec;
        let clause = spec.clause_spans;
        let mut cross_sentence = false;
        let last_literal = toks[cb.saturating_sub(1).min(toks.len().saturating_sub(1))]
            .lower
            .clone();
        let pick = |place: SlotPlace,
                    effect_side: bool,
                    notes: &mut Vec<String>|
         -> (Option<Chosen>, Vec<Chosen>) {
            match place {
                SlotPlace::Inside(s, e) => (self.choose_bytes(sent, s, e), Vec::new()),
                SlotPlace::After => {
                    let mut span = if clause {
                        self.clause_forward(toks, cb)
                    } else {
                        self.walk_forward(toks, cb, blocked)
                    };
                    if cue.glued_last {
                        // "stress-induced insomnia": the modified noun is the word right after.
                        span.to = span.to.min(span.from + 1);
                    }
                    let extra = if clause || cue.glued_last {
                        Vec::new()
                    } else {
                        self.conjuncts_forward(toks, span, blocked, &last_literal)
                    };
                    let extra: Vec<Chosen> = extra
                        .into_iter()
                        .filter_map(|sp| self.choose(toks, sent, sp, effect_side))
                        .collect();
                    if !extra.is_empty() {
                        notes.push(format!(
                            "{} more coordinated slot(s) after the cue",
                            extra.len()
                        ));
                    }
                    (self.choose(toks, sent, span, effect_side), extra)
                }
                SlotPlace::Before => {
                    let span = if clause {
                        self.clause_back(toks, ca)
                    } else {
                        self.walk_back(toks, ca, noun_first(spec), blocked, notes)
                    };
                    let extra = if clause || span.is_empty() {
                        Vec::new()
                    } else {
                        self.conjuncts_back(toks, span, blocked)
                    };
                    let extra: Vec<Chosen> = extra
                        .into_iter()
                        .filter_map(|sp| self.choose(toks, sent, sp, effect_side))
                        .collect();
                    if !extra.is_empty() {
                        notes.push(format!(
                            "{} more coordinated slot(s) before the cue",
                            extra.len()
                        ));
                    }
                    (self.choose(toks, sent, span, effect_side), extra)
                }
            }
        };
        let (mut cause, cause_extra) = pick(m.cause, false, notes);
        let (mut effect, effect_extra) = pick(m.effect, true, notes);
        // An empty slot before a cue that opens the sentence: "Because X, Y." takes the clause after
        // the comma; "As a result, Y." takes the previous sentence.
        let before_slot_empty = match (m.cause, m.effect) {
            (SlotPlace::Before, _) => cause.is_none(),
            (_, SlotPlace::Before) => effect.is_none(),
            _ => false,
        };
        if before_slot_empty && opens_sentence(toks, ca, &self.lexicon) {
            let after = if m.cause == SlotPlace::After {
                &cause
            } else {
                &effect
            };
            let after_end_tok = after.as_ref().map(|c| {
                toks.iter()
                    .position(|t| t.start + sent.offset >= c.end)
                    .unwrap_or(toks.len())
            });
            let fronted = after_end_tok.and_then(|j| {
                if j < toks.len() && toks[j].lower == "," {
                    let span = if clause {
                        self.clause_forward(toks, j + 1)
                    } else {
                        self.walk_forward(toks, j + 1, blocked)
                    };
                    let span = self.strip_determiners(toks, span);
                    self.choose(toks, sent, span, m.effect == SlotPlace::Before)
                } else {
                    None
                }
            });
            let filled = match fronted {
                Some(c) => {
                    notes.push("the cue opens the sentence: the other slot is the clause after the comma".into());
                    Some(c)
                }
                None => prev.and_then(|p| {
                    let ptoks = tokenize(p.text);
                    let mut end = ptoks.len();
                    while end > 0 && !ptoks[end - 1].word {
                        end -= 1;
                    }
                    let span = self.clause_back(&ptoks, end);
                    cross_sentence = true;
                    notes.push("the cue opens the sentence: the slot is the previous sentence's last clause".into());
                    self.choose(&ptoks, p, span, m.effect == SlotPlace::Before)
                }),
            };
            if m.cause == SlotPlace::Before {
                cause = filled;
            } else {
                effect = filled;
            }
        }
        // "If the crayfish reach the lakes, they will ...": a slot that is only a pronoun takes
        // its antecedent, and the claim says so.
        for (slot, place, effect_side) in
            [(&mut cause, m.cause, false), (&mut effect, m.effect, true)]
        {
            let pronoun_at = match slot {
                // A slot already taken from the previous sentence is not this sentence's words.
                Some(c) if c.start >= sent.offset => {
                    let (a, b) = c.tokens(toks, sent);
                    (b == a + 1 && PRONOUNS.contains(&toks[a].lower.as_str())).then_some(a)
                }
                Some(_) => None,
                None if place == SlotPlace::Before => self.bare_demonstrative(toks, ca),
                None => None,
            };
            if let Some(p) = pronoun_at {
                if let Some((c, cross)) = self.antecedent(toks, p, sent, prev, effect_side) {
                    notes.push(format!(
                        "\"{}\" resolved to \"{}\"{}",
                        toks[p].lower,
                        c.text,
                        if cross {
                            " in the previous sentence"
                        } else {
                            ""
                        }
                    ));
                    cross_sentence |= cross;
                    *slot = Some(c);
                }
            }
        }
        let cause = cause.ok_or("no cause span found")?;
        let effect = effect.ok_or("no effect span found")?;
        if spec.time_sense && !cross_sentence && self.reads_as_time(toks, sent, &cause, &effect) {
            return Err(
                "a perfect-tense clause beside a past-tense or verbless one: the time sense".into(),
            );
        }
        let mut modality = self.modality(toks, ca, sent.text, notes);
        let polarity = spec.polarity;
        if polarity == Polarity::None && modality != Modality::Question {
            modality = Modality::Negated;
        }
        let causes: Vec<Chosen> = std::iter::once(cause).chain(cause_extra).collect();
        let mut effects: Vec<Chosen> = std::iter::once(effect).chain(effect_extra).collect();
        if spec.outcome_effect {
            // The phrase next to the cue must name the outcome: for an effect before the cue
            // ("the treatment of headaches from") that is the span's last phrase. Coordinated
            // effects share the first one's reading: if it is no outcome, none is.
            let effect_before = m.effect == SlotPlace::Before;
            effects = effects
                .into_iter()
                .map_while(|e| {
                    if self.outcome_head(toks, sent, &e) {
                        Some(e)
                    } else if effect_before {
                        self.outcome_tail(toks, sent, &e)
                    } else {
                        None
                    }
                })
                .collect();
            if effects.is_empty() {
                return Err(
                    "the effect's head is not an outcome noun ([outcomes] in lexicon.toml)".into(),
                );
            }
        }
        let mut claims = Vec::new();
        let mut first_err = None;
        for c in &causes {
            for e in &effects {
                match self.build_claim(
                    c,
                    e,
                    spec,
                    modality,
                    cross_sentence,
                    sent,
                    origin,
                    sentence_text,
                    notes,
                ) {
                    Ok(claim) => claims.push(claim),
                    Err(why) => {
                        first_err.get_or_insert(why);
                    }
                }
            }
        }
        if claims.is_empty() {
            return Err(first_err.unwrap_or_else(|| "no claim".into()));
        }
        Ok(claims)
    }

    #[allow(clippy::too_many_arguments)]
    fn build_claim(
        &self,
        cause: &Chosen,
        effect: &Chosen,
        spec: &crate::patterns::CueSpec,
        modality: Modality,
        cross_sentence: bool,
        sent: SentenceRef<'_>,
        origin: &Origin<'_>,
        sentence_text: &str,
        notes: &mut Vec<String>,
    ) -> Result<Claim, String> {
        if cause.start < effect.end && effect.start < cause.end && !cross_sentence {
            return Err("cause and effect spans overlap".into());
        }
        let ckey = self.normalizer.key(&cause.key_text);
        let ekey = self.normalizer.key(&effect.key_text);
        if ckey.is_empty() || ekey.is_empty() {
            return Err(format!(
                "a span has no content word (cause \"{}\", effect \"{}\")",
                cause.text, effect.text
            ));
        }
        if ckey == ekey {
            return Err(format!(
                "cause and effect are the same variable (\"{ckey}\")"
            ));
        }
        if numbers_only(&ckey) || numbers_only(&ekey) {
            return Err(format!(
                "a span is only numbers (cause \"{}\", effect \"{}\")",
                cause.text, effect.text
            ));
        }
        // Only such words, and labels with digits beside them ("Figure 6C").
        let alone = |key: &str| {
            key.split(' ').any(|w| self.not_alone.contains(w))
                && key
                    .split(' ')
                    .all(|w| self.not_alone.contains(w) || w.chars().any(|c| c.is_ascii_digit()))
        };
        if alone(&ckey) || alone(&ekey) {
            return Err(format!(
                "a span names no variable on its own (cause \"{}\", effect \"{}\"; [keys] \
                 not_alone in lexicon.toml)",
                cause.text, effect.text
            ));
        }
        let mut modality = modality;
        if effect.negated && modality != Modality::Question {
            notes.push("the effect is denied (\"no ...\")".into());
            modality = Modality::Negated;
        }
        let mut polarity = spec.polarity;
        if let (Polarity::Unsigned, Some(s)) = (polarity, effect.sign) {
            notes.push(format!("the effect's sign word makes it an {s}"));
            polarity = s;
        }
        Ok(Claim {
            schema: SCHEMA_VERSION,
            confidence: 0.0, // set by the pipeline (crate::extract::confidence)
            cause: Slot {
                text: cause.text.clone(),
                key: ckey,
                start: cause.start,
                end: cause.end,
                pronoun: cause.pronoun.clone(),
            },
            effect: Slot {
                text: effect.text.clone(),
                key: ekey,
                start: effect.start,
                end: effect.end,
                pronoun: effect.pronoun.clone(),
            },
            kind: spec.kind,
            polarity,
            modality,
            cue: spec.id.clone(),
            sentence: sentence_text.to_string(),
            source: Source {
                path: origin.path.to_string(),
                line: origin.line,
                column: origin.column,
                start: sent.offset,
                end: sent.offset + sent.text.len(),
                page: origin.page,
                record: origin.record.map(str::to_string),
            },
            cross_sentence,
        })
    }

    /// "Heat, wind and smoke cause delays": the noun phrases coordinated before a slot's span.
    /// The link next to the span must be "and"/"or"; commas may join further ones.
    fn conjuncts_back(&self, toks: &[Token], span: Span, blocked: &[bool]) -> Vec<Span> {
        let mut out = Vec::new();
        let mut from = span.from;
        while from > 0
            && self
                .lexicon
                .determiners
                .contains(toks[from - 1].lower.as_str())
        {
            from -= 1;
        }
        let mut first = true;
        while out.len() < 4 && from > 0 {
            let mut i = from;
            let mut saw_conj = false;
            while i > 0 && matches!(toks[i - 1].lower.as_str(), "and" | "or" | ",") && from - i < 2
            {
                saw_conj |= toks[i - 1].lower != ",";
                i -= 1;
            }
            if i == from || (first && !saw_conj) || blocked[i..from].iter().any(|&b| b) {
                break;
            }
            let end = i;
            while i > 0
                && end - i < self.lexicon.max_words
                && !blocked[i - 1]
                && !self.np_boundary(&toks[i - 1])
            {
                i -= 1;
            }
            if i == end
                || (i > 0
                    && (blocked[i - 1]
                        || self
                            .lexicon
                            .auxiliaries
                            .contains(toks[i - 1].lower.as_str())))
            {
                break;
            }
            let np = self.strip_determiners(toks, Span { from: i, to: end });
            if np.is_empty() {
                break;
            }
            out.push(np);
            from = i;
            first = false;
        }
        out
    }

    /// "X causes delays and cancellations": the noun phrases coordinated after a slot's span.
    fn conjuncts_forward(
        &self,
        toks: &[Token],
        span: Span,
        blocked: &[bool],
        cue_last: &str,
    ) -> Vec<Span> {
        let mut out: Vec<(Span, bool)> = Vec::new();
        let mut j = span.to;
        while out.len() < 4 && j < toks.len() {
            let mut k = j;
            let mut saw_conj = false;
            while k < toks.len()
                && matches!(toks[k].lower.as_str(), "and" | "or" | ",")
                && k - j < 2
            {
                saw_conj |= toks[k].lower != ",";
                k += 1;
            }
            if k == j || blocked[j..k].iter().any(|&b| b) {
                break;
            }
            // "caused by X or by Y": the cue's preposition may be repeated.
            if k < toks.len()
                && toks[k].lower == cue_last
                && self.lexicon.prepositions.contains(cue_last)
            {
                k += 1;
            }
            let np = self.walk_forward(toks, k, blocked);
            let np = self.strip_determiners(toks, np);
            if np.is_empty() {
                break;
            }
            if np.to < toks.len()
                && (blocked[np.to]
                    || self
                        .lexicon
                        .auxiliaries
                        .contains(toks[np.to].lower.as_str()))
            {
                break;
            }
            out.push((np, saw_conj));
            j = np.to;
        }
        // A list needs an "and"/"or": drop trailing comma-only conjuncts.
        while out.last().is_some_and(|(_, conj)| !conj) {
            out.pop();
        }
        out.into_iter().map(|(s, _)| s).collect()
    }
}

/// The cue's first literal is a noun with its plural (`cause+ of`), not a verb or adjective.
fn noun_first(spec: &crate::patterns::CueSpec) -> bool {
    spec.tokens.iter().find_map(|t| match t {
        PatternToken::Word { forms, verb } => Some(!verb && forms.len() > 1),
        PatternToken::Glued { .. } => Some(false),
        _ => None,
    }) == Some(true)
}

/// A key whose words are all numbers: a year, a count or a label, not a variable ("(Smith et
/// al., 2013). Thus, ...", "in experiments 2 and 4 ... drives").
fn numbers_only(key: &str) -> bool {
    key.split(' ')
        .all(|w| w.chars().all(|c| c.is_ascii_digit()))
}

/// Nothing but punctuation, conjunctions and fillers stands before token `ca`.
fn opens_sentence(toks: &[Token], ca: usize, l: &Lexicon) -> bool {
    toks[..ca].iter().all(|t| {
        !t.word
            || l.clause_breaks.contains(t.lower.as_str())
            || l.fillers.contains(t.lower.as_str())
    })
}

fn token_range(toks: &[Token], start: usize, end: usize) -> (usize, usize) {
    let a = toks
        .iter()
        .position(|t| t.end > start)
        .unwrap_or(toks.len());
    let b = toks
        .iter()
        .rposition(|t| t.start < end)
        .map(|i| i + 1)
        .unwrap_or(a);
    (a, b.max(a))
}

fn join(toks: &[Token], a: usize, b: usize) -> String {
    toks[a..b]
        .iter()
        .map(|t| t.lower.as_str())
        .collect::<Vec<_>>()
        .join(" ")
}

/// Collapse whitespace runs (line breaks included) to single spaces.
pub fn collapse(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for w in s.split_whitespace() {
        if !out.is_empty() {
            out.push(' ');
        }
        out.push_str(w);
    }
    out
}

#[cfg(test)]
mod token_tests {
    use super::*;
    use proptest::prelude::*;

    fn by_regex(s: &str) -> Vec<(usize, usize)> {
        token_regex()
            .find_iter(s)
            .map(|m| (m.start(), m.end()))
            .collect()
    }

    proptest! {
        /// The hand-found tokens are the token regex's, over the characters its rules and the
        /// fast path care about: ASCII letters, digits, joiners, spaces (vertical tab and
        /// no-break space among them), letters and a combining mark outside ASCII, the
        /// typographic apostrophe.
        #[test]
        fn tokens_agree_with_the_regex(s in proptest::string::string_regex(
            "[aZ09 .'\\-,;()\t\u{b}\u{c}\r\n\u{0}\u{7f}µαé\u{301}’\u{a0}\u{2009}\u{2013}]{0,30}"
        ).expect("valid regex")) {
            prop_assert_eq!(token_spans(&s), by_regex(&s));
        }
    }

    /// And over real scientific text: every non-empty line of 120 eLife articles (990 open-access
    /// articles; ../shared/data/elife-articles/SOURCE.txt).
    #[test]
    fn tokens_agree_on_elife_lines() {
        let lines = crate::testdata::elife_lines(120);
        if lines.is_empty() {
            return;
        }
        for (path, line) in &lines {
            assert_eq!(
                token_spans(line),
                by_regex(line),
                "{}: {line:?}",
                path.display()
            );
        }
        assert!(lines.len() > 1000, "too few lines: {}", lines.len());
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ex() -> Extractor {
        Extractor::new(&PatternSet::builtin().unwrap()).unwrap()
    }

    fn claims(e: &Extractor, text: &str) -> Vec<Claim> {
        claims_after(e, None, SentenceRef { text, offset: 0 })
    }

    /// Every sentence of `lines` (path, one paragraph a line: `testdata::elife_lines`) with the
    /// sentence before it in the same line.
    fn sentences_of(
        lines: &[(std::path::PathBuf, String)],
    ) -> Vec<(&std::path::Path, Option<SentenceRef<'_>>, SentenceRef<'_>)> {
        let mut out = Vec::new();
        for (path, line) in lines {
            let mut prev = None;
            for s in crate::sentences::split(line) {
                let sent = SentenceRef {
                    text: &line[s.start..s.end],
                    offset: s.start,
                };
                out.push((path.as_path(), prev, sent));
                prev = Some(sent);
            }
        }
        out
    }

    /// The claims of `sent`, with `prev` as the sentence before it.
    fn claims_after(
        e: &Extractor,
        prev: Option<SentenceRef<'_>>,
        sent: SentenceRef<'_>,
    ) -> Vec<Claim> {
        let origin = Origin {
            path: "t",
            line: 1,
            column: 1,
            page: None,
            record: None,
        };
        let hits = e.cues.hits(sent.text);
        let mut out = Vec::new();
        e.extract(
            sent,
            prev,
            &origin,
            &e.cues.candidates(&hits, 0),
            &mut out,
            None,
        );
        out
    }

    fn one(e: &Extractor, text: &str) -> (String, String, Polarity, Modality) {
        let cs = claims(e, text);
        assert_eq!(cs.len(), 1, "{text}: {cs:#?}");
        let c = &cs[0];
        (
            c.cause.text.clone(),
            c.effect.text.clone(),
            c.polarity,
            c.modality,
        )
    }

    #[test]
    fn tokenizer_keeps_contractions_and_hyphens() {
        let t: Vec<String> = tokenize("It doesn't cause sea-level rise, 3.5 mg.")
            .into_iter()
            .map(|t| t.lower.to_string())
            .collect();
        assert_eq!(
            t,
            [
                "it",
                "doesn't",
                "cause",
                "sea-level",
                "rise",
                ",",
                "3.5",
                "mg",
                "."
            ]
        );
    }

    #[test]
    fn basic_spans_sign_and_modality() {
        let e = ex();
        assert_eq!(
            one(&e, "Heavy rain causes flooding."),
            (
                "Heavy rain".into(),
                "flooding".into(),
                Polarity::Unsigned,
                Modality::Asserted
            )
        );
        assert_eq!(
            one(&e, "Smoking causes higher blood pressure.").2,
            Polarity::Increase
        );
        assert_eq!(one(&e, "Stress may cause insomnia.").3, Modality::Hedged);
        assert_eq!(
            one(&e, "Stress does not cause insomnia.").3,
            Modality::Negated
        );
        assert_eq!(one(&e, "Does stress cause insomnia?").3, Modality::Question);
        assert_eq!(
            one(
                &e,
                "If the dam breaks, heavy rain will cause flooding downstream."
            )
            .3,
            Modality::Conditional
        );
        // A pronoun takes the subject of the clause before it, and the slot keeps the pronoun.
        let cs = claims(&e, "If the dam breaks, it will cause flooding downstream.");
        assert_eq!(cs.len(), 1);
        assert_eq!(
            (cs[0].cause.key.as_str(), cs[0].cause.pronoun.as_deref()),
            ("dam", Some("it"))
        );
        assert_eq!(cs[0].modality, Modality::Conditional);
        // A pronoun with no antecedent names no variable.
        assert!(claims(&e, "It will cause flooding downstream.").is_empty());
        let (c, ef, _, m) = one(&e, "The flooding was caused by heavy rain.");
        assert_eq!(
            (c.as_str(), ef.as_str(), m),
            ("heavy rain", "flooding", Modality::Asserted)
        );
    }

    #[test]
    fn change_nouns_give_the_sign() {
        let e = ex();
        let (_, ef, p, _) = one(&e, "Drought leads to an increase in food prices.");
        assert_eq!((ef.as_str(), p), ("food prices", Polarity::Increase));
    }

    #[test]
    fn chain_gives_two_claims() {
        let e = ex();
        let cs = claims(
            &e,
            "Warm water increases algae, which in turn reduces oxygen.",
        );
        let pairs: Vec<(&str, &str)> = cs
            .iter()
            .map(|c| (c.cause.text.as_str(), c.effect.text.as_str()))
            .collect();
        assert_eq!(pairs, [("Warm water", "algae"), ("algae", "oxygen")]);
    }

    #[test]
    fn noun_use_of_a_verb_cue_is_not_a_claim() {
        let e = ex();
        assert!(claims(&e, "An increase in rainfall was recorded.").is_empty());
    }

    /// Citation years before "Thus,"/"Therefore," ("(Smith et al., 2013). Thus, ...") became
    /// causes, and the digit veto of the `cause` cue dropped "exon 11 causes a frame-shift". On
    /// eLife text (990 open-access articles; ../shared/data/elife-articles/SOURCE.txt): no claim
    /// has a variable made only of numbers, and a number right before "cause" no longer vetoes
    /// the claim.
    #[test]
    fn numbers_alone_are_no_variable_on_elife_text() {
        let lines = crate::testdata::elife_lines(300);
        if lines.is_empty() {
            return;
        }
        let e = ex();
        let digit_cause = Regex::new(r"\d\s+caus(?:es|ed|e)\s").unwrap();
        let (mut claims_seen, mut after_digit) = (0, 0);
        for (path, prev, sent) in sentences_of(&lines) {
            let text = sent.text;
            let cs = claims_after(&e, prev, sent);
            for c in &cs {
                claims_seen += 1;
                for key in [&c.cause.key, &c.effect.key] {
                    assert!(
                        !numbers_only(key),
                        "{}: number-only variable {key:?} in {text}",
                        path.display()
                    );
                }
            }
            if digit_cause.is_match(text) && cs.iter().any(|c| c.cue == "cause") {
                after_digit += 1;
            }
        }
        // Measured on 300 articles: 22 849 claims, 27 with a number right before "cause" (1 with
        // the old digit veto).
        assert!(
            claims_seen > 20_000 && after_digit >= 15,
            "{claims_seen} claims, {after_digit} after a digit"
        );
    }

    /// "These results lead to the conclusion that ..." states an inference, not a cause: on the
    /// eLife articles (990 open-access articles; ../shared/data/elife-articles/SOURCE.txt) about
    /// 300 claims had a cause or effect made only of reasoning words ("conclusion",
    /// "possibility", "possibly", "suggesting"), and about 1 100 one that only pointed at a
    /// figure ("(Figure 6C), and reduces ..."). Such spans give no claim (`[keys] not_alone`);
    /// "leads to an increase in" keeps its claim.
    #[test]
    fn reasoning_words_alone_are_no_variable_on_elife_text() {
        let lines = crate::testdata::elife_lines(990);
        if lines.is_empty() {
            return;
        }
        let e = ex();
        let inference = Regex::new(
            r"(?i)\b(?:lead|leads|led) to the (?:conclusion|hypothesis|idea|notion|possibility|prediction|proposal) that\b",
        )
        .unwrap();
        let outcome =
            Regex::new(r"(?i)\b(?:leads|led) to (?:an? )?(?:increase|decrease|reduction|loss)\b")
                .unwrap();
        let pointer = Regex::new(r"^(?i:figure|fig\.?|table)\s*\d+[A-Za-z]?$").unwrap();
        let (mut inferred, mut stated, mut kept, mut pointing) = (0, 0, 0, 0);
        for (path, _, sent) in sentences_of(&lines) {
            let text = sent.text;
            // "(Figure 6C), and reduces ...": a pointer into the paper is no variable.
            let figure = text.contains("(Figure ");
            let (i, o) = (inference.is_match(text), outcome.is_match(text));
            if !figure && i == o {
                continue;
            }
            let cs = claims_after(&e, None, sent);
            if figure {
                pointing += 1;
                for c in &cs {
                    assert!(
                        !pointer.is_match(&c.cause.text) && !pointer.is_match(&c.effect.text),
                        "{}: a figure as a variable: {} -> {} in {text}",
                        path.display(),
                        c.cause.text,
                        c.effect.text
                    );
                }
            }
            if i == o {
                continue;
            }
            let n = cs.iter().filter(|c| c.cue == "lead-to").count();
            if i {
                inferred += 1;
                assert_eq!(n, 0, "{}: an inference claimed in {text}", path.display());
            } else {
                stated += 1;
                kept += n.min(1);
            }
        }
        // Measured on all 990 articles: 27 inference sentences (with the list emptied, claims
        // in them fail the test at once), and 48 of 58 outcome sentences keep a claim (the
        // others fail on their spans: "no cause span found", "either" before the cue).
        assert!(inferred > 20, "only {inferred} inference sentences");
        assert!(
            pointing > 1000,
            "only {pointing} sentences pointing at a figure"
        );
        assert!(
            kept * 5 >= stated * 4,
            "{kept} of {stated} outcome sentences kept a claim"
        );
    }

    /// Fixed names that hold a glued cue ("cyclin-dependent kinase", "adeno-associated virus")
    /// led `top` on the eLife articles (990 open-access articles;
    /// ../shared/data/elife-articles/SOURCE.txt). Inside a name listed in `[terms]` the glued
    /// cue gives no claim; the same cues in statements ("shRNA-mediated knockdown",
    /// "diet-induced obesity") keep theirs.
    #[test]
    fn glued_cues_inside_fixed_names_give_no_claim_on_elife_text() {
        let lines = crate::testdata::elife_lines(990);
        if lines.is_empty() {
            return;
        }
        let e = ex();
        let names = Regex::new(
            r"(?i)\b(?:cyclin-dependent kinases?|adeno-associated virus|enzyme-linked immunosorbent|collision-induced dissociation|microtubule-associated proteins?)\b",
        )
        .unwrap();
        let statements =
            Regex::new(r"(?i)\b(?:shrna|sirna|clathrin)-mediated (?:knockdown|endocytosis)\b|\bdiet-induced obesity\b")
                .unwrap();
        let (mut named, mut stated, mut kept) = (0, 0, 0);
        for (path, _, sent) in sentences_of(&lines) {
            let text = sent.text;
            let in_name = names.is_match(text);
            let in_statement = statements.is_match(text);
            if !in_name && !in_statement {
                continue;
            }
            let glued: Vec<Claim> = claims_after(&e, None, sent)
                .into_iter()
                .filter(|c| c.cue.starts_with("hyphen-"))
                .collect();
            if in_name && !in_statement {
                named += 1;
                for c in &glued {
                    let inside = |span: &crate::claim::Slot| {
                        names.find_iter(text).any(|m| {
                            span.start - sent.offset >= m.start()
                                && span.end - sent.offset <= m.end()
                        })
                    };
                    assert!(
                        !(inside(&c.cause) && inside(&c.effect)),
                        "{}: a claim inside a fixed name: {} -> {} in {text}",
                        path.display(),
                        c.cause.text,
                        c.effect.text
                    );
                }
            }
            if in_statement {
                stated += 1;
                kept += usize::from(!glued.is_empty());
            }
        }
        // Measured on all 990 articles: 59 sentences with one of these names (each gave a
        // claim inside it before); 96 of 96 statements keep a glued claim.
        assert!(named > 50, "only {named} sentences with a fixed name");
        assert!(
            kept * 10 >= stated * 9,
            "{kept} of {stated} statements kept a glued claim"
        );
    }

    /// "Determine" in methods sections mostly means "find out": "the t test was used to determine
    /// the significance" gave "used → significance", and `top` on the eLife articles (990
    /// open-access articles; ../shared/data/elife-articles/SOURCE.txt) listed it. The measuring
    /// uses (a purpose infinitive, the passive, a first-person subject) give no claim; a noun
    /// subject right before "determines" still does.
    #[test]
    fn determine_in_the_sense_of_measure_is_no_claim_on_elife_text() {
        let lines = crate::testdata::elife_lines(300);
        if lines.is_empty() {
            return;
        }
        let e = ex();
        let measuring = Regex::new(
            r"(?i)\b(?:used to|in order to|aim was to|were|was|we|we then|we have not) determined?\b",
        )
        .unwrap();
        let stated = Regex::new(r"\b[a-z]{4,} determines\b").unwrap();
        let (mut measured, mut kept, mut stated_sentences) = (0, 0, 0);
        for (path, _, sent) in sentences_of(&lines) {
            let text = sent.text;
            let n = claims_after(&e, None, sent)
                .iter()
                .filter(|c| c.cue == "determine")
                .count();
            let once = text.to_lowercase().matches("determin").count() == 1;
            if once && measuring.is_match(text) {
                measured += 1;
                assert_eq!(
                    n,
                    0,
                    "{}: a measuring 'determine' claimed in {text}",
                    path.display()
                );
            }
            if once && stated.is_match(text) {
                stated_sentences += 1;
                kept += n.min(1);
            }
        }
        // Sentences with one "determin..." only, so the sentence shows which use was read.
        // Measured on 300 articles: 353 measuring sentences (with the old cue, claims in them
        // fail the test at once); 25 of 30 "<word> determines" sentences keep a claim.
        assert!(measured > 250, "only {measured} measuring sentences");
        assert!(
            kept * 2 > stated_sentences,
            "{kept} of {stated_sentences} 'X determines' sentences kept a claim"
        );
    }

    /// Supplier addresses in methods sections, "(Applied Biosystems, Foster City, CA)", were the
    /// most-stated causal relation of the eLife articles (990 open-access articles;
    /// ../shared/data/elife-articles/SOURCE.txt) before a capitalised cue word after a comma
    /// counted as part of a name. A glued cue after a comma keeps its claim: the capital of
    /// "ROCK-mediated" is the cause's.
    #[test]
    fn capitalised_cue_after_a_comma_is_a_name_on_elife_text() {
        let lines = crate::testdata::elife_lines(400);
        if lines.is_empty() {
            return;
        }
        let e = ex();
        let (mut addresses, mut glued, mut glued_claims) = (0, 0, 0);
        for (path, _, sent) in sentences_of(&lines) {
            let text = sent.text;
            let address = text.contains(", Foster City") || text.contains(", Sparks, MD");
            let glued_after_comma = text.split(", ").skip(1).any(|rest| {
                rest.starts_with(char::is_uppercase)
                    && rest
                        .split(' ')
                        .next()
                        .is_some_and(|w| w.ends_with("-mediated") || w.ends_with("-induced"))
            });
            if !address && !glued_after_comma {
                continue;
            }
            let cs = claims(&e, text);
            if address {
                addresses += 1;
                for c in &cs {
                    assert!(
                        !["foster", "spark"].contains(&c.cue.as_str()),
                        "{}: a place name read as a claim: {text}",
                        path.display()
                    );
                }
            }
            if glued_after_comma {
                glued += 1;
                glued_claims += cs
                    .iter()
                    .filter(|c| c.cue.starts_with("hyphen-"))
                    .count()
                    .min(1);
            }
        }
        assert!(addresses >= 10, "{addresses} address sentences");
        // Measured on 400 articles: 15 address sentences, and 36 of 36 glued sentences claimed.
        assert!(
            glued >= 5 && glued_claims * 10 >= glued * 8,
            "{glued_claims} of {glued}"
        );
    }
}
