//! Whether a cue word states a claim here at all: a noun or adjective use ("an increase in"),
//! part of a name or fixed term, "since" in its time sense, or an outcome cue ("from") whose
//! effect names no outcome.

use super::{Chosen, Extractor, SentenceRef, Span};
use crate::claim::{Kind, Polarity};
use crate::extract::cues::{CueMatch, SlotPlace};
use crate::extract::tagger::Tag;
use crate::extract::tokens::{every_word, tokenize, Token};
use crate::patterns::{CueSpec, Role};

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

impl Extractor {
    /// The fixed term (`[terms]` in lexicon.toml) that starts at token `at`, if any: its words in
    /// order, the first one also after a slash or hyphen ("Ca2+/calmodulin-dependent",
    /// "cyclinB-cyclin-dependent"), the last one also with a plural -s or -es.
    pub(super) fn fixed_term_at(&self, toks: &[Token], at: usize) -> Option<String> {
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

    /// "Fish numbers have fallen since the dam opened": the effect clause is in the perfect and
    /// the cause clause has no present-tense or modal verb, so "since" gives a time.
    pub(super) fn reads_as_time(
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

    /// For an outcome cue whose effect comes right before it: the word before the cue, when it
    /// is not an outcome noun (`None` when the cue needs no check or the word is one).
    pub(super) fn outcome_word_missing(&self, m: &CueMatch, sentence: &str) -> Option<String> {
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
    pub(super) fn outcome_head(&self, toks: &[Token], sent: SentenceRef<'_>, c: &Chosen) -> bool {
        if c.start < sent.offset || c.end > sent.offset + sent.text.len() {
            // An antecedent from the previous sentence: read its own words (untagged).
            return self.outcome_head_in(&tokenize(&c.text));
        }
        let (a, b) = c.tokens(toks, sent);
        self.outcome_head_in(&toks[a..b.min(toks.len())])
    }

    pub(super) fn outcome_head_in(&self, span: &[Token]) -> bool {
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
    pub(super) fn phrase_break(&self, t: &Token) -> bool {
        t.word && (t.lower == "of" || self.lexicon.prepositions.contains(t.lower.as_str()))
    }

    /// "the treatment of headaches from fatigue", "the emission of radiation from phones": when
    /// the span's head is not an outcome noun, the phrase after its last preposition, if that
    /// one's head is.
    pub(super) fn outcome_tail(
        &self,
        toks: &[Token],
        sent: SentenceRef<'_>,
        c: &Chosen,
    ) -> Option<Chosen> {
        let (a, b) = c.tokens(toks, sent);
        let b = b.min(toks.len());
        let k = (a..b).rev().find(|&k| self.phrase_break(&toks[k]))?;
        let span = self.strip_determiners(toks, Span { from: k + 1, to: b });
        let tail = self.choose(toks, sent, span, true)?;
        self.outcome_head(toks, sent, &tail).then_some(tail)
    }

    /// A verb cue right after a determiner or preposition is a noun or adjective use ("an
    /// increase in", "the increased risk"): not this cue.
    pub(super) fn noun_use(&self, m: &CueMatch, toks: &[Token], ca: usize) -> Option<String> {
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
        let before = ca.checked_sub(1).map(|i| toks[i].lower.as_str())?;
        // "Mulch and compost both reduce weeds": a quantifier floating after its noun phrase
        // stands before a verb.
        let floating = matches!(before, "both" | "all" | "each")
            && ca >= 2
            && toks[ca - 2].word
            && !self
                .lexicon
                .determiners
                .contains(toks[ca - 2].lower.as_str())
            && !self
                .lexicon
                .prepositions
                .contains(toks[ca - 2].lower.as_str())
            && toks[ca - 2].lower != "of";
        if !floating {
            if let Some(why) = self.tagged_noun_use(toks, ca, cue.left == Some(Role::Cause)) {
                return Some(why);
            }
        }
        // "the germ that causes ulcers": a relative pronoun, not a determiner, before a verb.
        // "This reduced fish numbers.": a demonstrative standing alone is a pronoun.
        let pronoun = self.bare_demonstrative(toks, ca) == Some(ca - 1);
        let relative = (self.lexicon.relatives.contains(before) || pronoun)
            && toks[ca].tag.is_some_and(Tag::is_finite_verb);
        if (self.lexicon.determiners.contains(before) && !relative && !floating)
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
    pub(super) fn tagged_noun_use(
        &self,
        toks: &[Token],
        ca: usize,
        active: bool,
    ) -> Option<String> {
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
    pub(super) fn other_predicate(&self, toks: &[Token], ca: usize) -> bool {
        let (a, b) = self.clause_around(toks, ca);
        let aux = &self.lexicon.auxiliaries;
        (a..b).any(|i| {
            let t = &toks[i];
            if i == ca || !t.tag.is_some_and(Tag::is_finite_verb) {
                return false;
            }
            // "Officials said the levy triggers ...": the reporting verb governs the clause
            // that holds the cue; it is not that clause's predicate.
            if i < ca && self.lexicon.reporting_verbs.contains(t.lower.as_str()) {
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
    pub(super) fn clause_around(&self, toks: &[Token], i: usize) -> (usize, usize) {
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
}

/// Number words: with units, a span of only these names an amount, not a variable.
const NUMBER_WORDS: &[&str] = &[
    "one",
    "two",
    "three",
    "four",
    "five",
    "six",
    "seven",
    "eight",
    "nine",
    "ten",
    "eleven",
    "twelve",
    "twenty",
    "thirty",
    "forty",
    "fifty",
    "sixty",
    "seventy",
    "eighty",
    "ninety",
    "hundred",
    "hundreds",
    "thousand",
    "thousands",
    "million",
    "millions",
    "billion",
    "dozen",
    "dozens",
    "half",
    "twice",
    "a",
    "an",
    "the",
    "of",
    "per",
    "and",
    "or",
    "to",
    "about",
    "some",
    "nearly",
    "almost",
    "over",
    "under",
    "around",
    "roughly",
    "approximately",
    "january",
    "february",
    "march",
    "april",
    "may",
    "june",
    "july",
    "august",
    "september",
    "october",
    "november",
    "december",
    "spring",
    "summer",
    "autumn",
    "winter",
    "early",
    "late",
    "mid",
];

impl Extractor {
    /// The head word of a span's text: the last word before its first preposition or "of",
    /// lower-cased, without a possessive or a hyphenated prefix ("the east wing" → "wing").
    fn head_of(&self, text: &str) -> Option<String> {
        let toks = tokenize(text);
        let mut head = None;
        for t in &toks {
            if self.phrase_break(t) && head.is_some() {
                break;
            }
            if t.word && !matches!(t.lower.as_str(), "'s" | "’s") {
                head = Some(t.lower.rsplit('-').next().unwrap_or(&t.lower).to_string());
            }
        }
        head
    }

    /// Another sense of the cue word, read from the head of a slot: a path ("the trail leads
    /// to the ridge"), handling ("raised the flag", "cut the rope"), rearing ("raised sheep"), a
    /// contribution to a work ("contributed to the anthology"), or a duty ("the caretaker is
    /// responsible for the keys"). Each is a rule of its own, with its word list in
    /// `[senses]` (lexicon.toml).
    pub(super) fn other_sense(
        &self,
        spec: &CueSpec,
        m: &CueMatch,
        causes: &[Chosen],
        effects: &[Chosen],
    ) -> Result<(), String> {
        let s = &self.lexicon.senses;
        let (Some(cause), Some(effect)) = (causes.first(), effects.first()) else {
            return Ok(());
        };
        let cause_head = self.head_of(&cause.text).unwrap_or_default();
        let effect_head = self.head_of(&effect.text).unwrap_or_default();
        if spec.id.starts_with("lead-to") && s.paths.contains(&cause_head) {
            return Err(format!(
                "\"{cause_head}\" is a way or a place: \"lead to\" in its path sense ([senses] \
                 paths)"
            ));
        }
        let active = m.cause == SlotPlace::Before && m.effect == SlotPlace::After;
        let directional = matches!(
            spec.polarity,
            Polarity::Increase | Polarity::Decrease | Polarity::Prevent
        );
        if directional && active && spec.kind == Kind::Causal {
            if spec.handling && s.handled.contains(&effect_head) {
                return Err(format!(
                    "\"{effect_head}\" is a thing handled: cue {} in its physical sense \
                     ([senses] handled)",
                    spec.id
                ));
            }
            if spec.polarity == Polarity::Increase && s.reared.contains(&effect_head) {
                return Err(format!(
                    "\"{effect_head}\" is raised or reared: not a change of an amount ([senses] \
                     reared)"
                ));
            }
        }
        if spec.id.starts_with("contribute") && s.works.contains(&effect_head) {
            return Err(format!(
                "\"{effect_head}\" is a work one contributes to: a role, not a claim ([senses] \
                 works)"
            ));
        }
        if spec.id.starts_with("responsible") {
            let who = cause
                .pronoun
                .as_deref()
                .unwrap_or(&cause_head)
                .to_lowercase();
            if s.persons.contains(&who) || s.persons.contains(&cause_head) {
                return Err(format!(
                    "\"{cause_head}\" is a person or role: \"responsible for\" names a duty \
                     ([senses] persons)"
                ));
            }
        }
        Ok(())
    }

    /// A causal noun phrase that the sentence studies, measures or leaves open ("we examine the
    /// causes of X", "the effect of X on Y was not measured", "remains unclear") is a topic,
    /// not a claim. The enquiry word stands in the cue's clause outside the slots: before the
    /// cue only as a verb or adjective ("this study shows" is no enquiry), anywhere after.
    pub(super) fn enquiry_talk(
        &self,
        toks: &[Token],
        sent: SentenceRef<'_>,
        ca: usize,
        slots: &[&Chosen],
    ) -> Result<(), String> {
        let (a, b) = self.clause_around(toks, ca);
        let inside = |i: usize| {
            slots.iter().any(|c| {
                c.start >= sent.offset && {
                    let (x, y) = c.tokens(toks, sent);
                    (x..y).contains(&i)
                }
            })
        };
        let enquiry = &self.lexicon.senses.enquiry;
        // The clause may run on past the slots ("... on Y was not measured").
        let b = (b..toks.len())
            .find(|&k| Self::clause_punct(&toks[k]))
            .unwrap_or(toks.len())
            .max(b);
        for (i, t) in toks.iter().enumerate().take(b).skip(a) {
            // A slot word counts when tagged as a finite or base verb: "We examine the causes
            // of" puts "examine" in the cause slot.
            let slot_verb = t
                .tag
                .is_some_and(|g| matches!(g.as_str(), "VB" | "VBP" | "VBZ" | "VBD"));
            if i == ca
                || !t.word
                || (inside(i) && !slot_verb)
                || !enquiry.contains(t.lower.as_str())
            {
                continue;
            }
            let verbal = t.tag.is_none_or(|g| g.is_verb() || g.is_adjective());
            if i > ca || verbal {
                return Err(format!(
                    "\"{}\" around the causal noun: the sentence talks about a causal question, \
                     it states no claim ([senses] enquiry)",
                    t.lower
                ));
            }
        }
        Ok(())
    }

    /// A span of only numbers, units, number words, months and seasons: an amount or a date,
    /// not a variable ("40 °C" read as "C", "the 1990s", "two").
    pub(super) fn amount_only(&self, text: &str) -> bool {
        every_word(text, |w| {
            w.starts_with(|c: char| c.is_ascii_digit())
                || self.lexicon.senses.units.contains(w)
                || NUMBER_WORDS.contains(&w)
        })
    }
}
