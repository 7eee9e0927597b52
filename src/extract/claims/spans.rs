//! Walking out from the cue: the noun phrase or clause on each side, coordinated phrases, the
//! antecedent of a pronoun, and a chosen span's text and key text.

use super::{Blocked, Chosen, Extractor, SentenceRef, Span, CLAUSE_CAP_EXTRA, PRONOUNS};
use crate::extract::tagger::Tag;
use crate::extract::tokens::{collapse, tokenize, Token};

/// Prepositions whose phrase may attach to the noun before it inside a span ("cracks in the
/// walls", "damage to the roof"); agent and source prepositions ("by", "from") never do.
const PP_ATTACH: &[&str] = &[
    "in", "on", "at", "to", "for", "among", "within", "across", "around",
];

/// The longest span, in words, that an attached prepositional phrase may make.
const PP_MAX_WORDS: usize = 7;

impl Extractor {
    /// A word that ends a noun-phrase span in either direction.
    pub(super) fn np_boundary(&self, t: &Token) -> bool {
        let l = &self.lexicon;
        // "40 °C", "20 %": a unit sign stays inside the span with its number.
        // "the pupils' fluency": a plural possessive's apostrophe too.
        (!t.word && !matches!(t.lower.as_str(), "°" | "%" | "'" | "’"))
            || l.clause_breaks.contains(t.lower.as_str())
            || l.relatives.contains(t.lower.as_str())
            || l.auxiliaries.contains(t.lower.as_str())
            || (l.reporting_verbs.contains(t.lower.as_str()) && !t.tag.is_some_and(Tag::is_noun))
            || self.single_negators.contains(t.lower.as_str())
    }

    /// Punctuation that closes a clause.
    pub(super) fn clause_punct(t: &Token) -> bool {
        !t.word
            && matches!(
                t.lower.as_str(),
                "," | ";" | ":" | "(" | ")" | "[" | "]" | "." | "!" | "?" | "—" | "–"
            )
    }

    pub(super) fn clause_boundary(&self, t: &Token) -> bool {
        Self::clause_punct(t) || (t.word && self.lexicon.clause_breaks.contains(t.lower.as_str()))
    }

    pub(super) fn strip_determiners(&self, toks: &[Token], mut s: Span) -> Span {
        loop {
            while s.from < s.to
                && self
                    .lexicon
                    .determiners
                    .contains(toks[s.from].lower.as_str())
            {
                s.from += 1;
            }
            // "two of the pumps": a count of what follows names no variable of its own.
            if s.from + 2 < s.to
                && toks[s.from + 1].lower == "of"
                && self.amount_only(&toks[s.from].lower)
            {
                s.from += 2;
                continue;
            }
            return s;
        }
    }

    /// Walk back from token `from` (exclusive): the verb group, then the noun phrase; and,
    /// for the antecedent of a relative pronoun after a copula, the copula's subject.
    pub(super) fn walk_back(
        &self,
        toks: &[Token],
        from: usize,
        noun_cue: bool,
        blocked: &Blocked<'_>,
        notes: &mut Vec<String>,
    ) -> (Span, Option<Span>) {
        let mut i = from;
        while i > 0 && matches!(toks[i - 1].lower.as_str(), "," | ";") {
            i -= 1;
        }
        // "X is one of the commonest causes of Y": before a noun cue, adjectives and adverbs
        // belong to the copula group, not to the slot.
        // A determiner or adjective right before the cue word makes it a noun whatever its tag
        // ("one of the commonest causes of death").
        let noun_cue = noun_cue
            && (toks
                .get(from)
                .is_some_and(|t| t.tag.is_some_and(Tag::is_noun))
                || (from > 0
                    && toks[from - 1]
                        .tag
                        .is_some_and(|g| g.is_adjective() || matches!(g.as_str(), "DT" | "PRP$"))));
        let parenthetical = |k: usize| {
            toks[k].word
                && !blocked.at(k)
                && self.lexicon.parenthetical.contains(toks[k].lower.as_str())
        };
        loop {
            if i == 0 || blocked.at(i - 1) {
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
        let mut relative = false;
        if i > 0 && matches!(toks[i - 1].lower.as_str(), "which" | "that" | "who") {
            // "X, which in turn reduces Z": the cause is the antecedent of the relative pronoun.
            i -= 1;
            if i > 0 && toks[i - 1].lower == "," {
                i -= 1;
            }
            relative = true;
            notes.push("relative pronoun: the slot is its antecedent".into());
        }
        let span = self.np_back(toks, i, blocked);
        let mut defined = None;
        if relative {
            defined = self.defined_subject(toks, span, blocked);
            if defined.is_some() {
                notes.push(
                    "the antecedent is what the clause's subject is said to be: the subject is \
                     a slot too"
                        .into(),
                );
            }
        }
        (span, defined)
    }

    /// The noun phrase that ends at token `end`, walked back to a boundary. A preposition
    /// belongs to it only after a noun ("damage to the roof"); after anything else it opens
    /// the phrase ("caught up in the debt crisis" → "debt crisis").
    fn np_back(&self, toks: &[Token], end: usize, blocked: &Blocked<'_>) -> Span {
        let mut i = end;
        while i > 0
            && end - i < self.lexicon.max_words
            && !blocked.at(i - 1)
            && !self.np_boundary(&toks[i - 1])
            && !(i < end && self.verb_stop(toks, i - 1))
            && !(i < end && self.unattached_preposition(toks, i - 1))
        {
            i -= 1;
        }
        self.strip_determiners(toks, Span { from: i, to: end })
    }

    /// A preposition at `k` (not "of", which follows nouns and quantities alike) with nothing
    /// before it to attach to: not a noun, a number, an adjective or a participle ("pyrotechnics
    /// used during the show", "a dog loose on the road"). Tags must be known.
    fn unattached_preposition(&self, toks: &[Token], k: usize) -> bool {
        let w = toks[k].lower.as_str();
        w != "of"
            && self.lexicon.prepositions.contains(w)
            && (k == 0
                || toks[k - 1].tag.is_some_and(|g| {
                    !g.is_noun() && !matches!(g.as_str(), "CD" | "JJ" | "VBN" | "VBG")
                }))
    }

    /// Where the run of determiners just before token `k` starts (`k` itself when there is none).
    fn determiners_before(&self, toks: &[Token], mut k: usize) -> usize {
        while k > 0
            && self
                .lexicon
                .determiners
                .contains(toks[k - 1].lower.as_str())
        {
            k -= 1;
        }
        k
    }

    /// "Germs are microscopic organisms that cause disease": the antecedent of a relative
    /// pronoun that is the complement of a copula names what the clause's subject is said to
    /// be, so the slot is the subject ("germs"). Only a subject that opens its clause.
    fn defined_subject(&self, toks: &[Token], np: Span, blocked: &Blocked<'_>) -> Option<Span> {
        let k = self.determiners_before(toks, np.from);
        if k < 2 || !matches!(toks[k - 1].lower.as_str(), "is" | "are" | "was" | "were") {
            return None;
        }
        let subject = self.np_back(toks, k - 1, blocked);
        let s = self.determiners_before(toks, subject.from);
        let opens = s == 0 || Self::clause_punct(&toks[s - 1]);
        let has_noun = toks[subject.from..subject.to]
            .iter()
            .any(|t| t.tag.is_some_and(Tag::is_noun));
        (!subject.is_empty() && opens && has_noun && subject.to == k - 1).then_some(subject)
    }

    /// A verb that ends a span walked back: a finite verb, or a base form after "to" or an
    /// auxiliary ("to escape the floodwaters caused by rain" stops at "escape").
    pub(super) fn verb_stop(&self, toks: &[Token], k: usize) -> bool {
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

    /// "This caused delays.": a demonstrative standing alone before a cue (its span was emptied
    /// because it is also a determiner). Returns its token.
    pub(super) fn bare_demonstrative(&self, toks: &[Token], ca: usize) -> Option<usize> {
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
    pub(super) fn antecedent(
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
    pub(super) fn walk_forward(&self, toks: &[Token], from: usize, blocked: &Blocked<'_>) -> Span {
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
            && !blocked.at(j)
            && !(self.np_boundary(&toks[j])
                && !(j == start && self.single_negators.contains(toks[j].lower.as_str()))
                && !(j > start && self.coordinated_modifier(toks, j)))
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

    /// "nasal and sinus pressure", "cool and more dense air": an "and"/"or" after an adjective
    /// joins two modifiers of one noun, not two noun phrases (an adjective ends no phrase).
    fn coordinated_modifier(&self, toks: &[Token], j: usize) -> bool {
        matches!(toks[j].lower.as_str(), "and" | "or")
            && toks[j - 1]
                .tag
                .is_some_and(|g| g.as_str() == "JJ" || g.as_str() == "JJR")
            && toks
                .get(j + 1)
                .is_some_and(|t| t.word && t.tag.is_some_and(Tag::is_nominal))
    }

    /// A word tagged as a finite verb that cannot be one: right after a determiner or a
    /// possessive ("the indicated situation", "the vaccine's live virus") it modifies a noun.
    pub(super) fn np_inside(&self, toks: &[Token], j: usize) -> bool {
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
    pub(super) fn attached_pp(
        &self,
        toks: &[Token],
        span: Span,
        blocked: &Blocked<'_>,
    ) -> Option<usize> {
        let p = span.to;
        if span.is_empty()
            || !toks
                .get(p)
                .is_some_and(|t| PP_ATTACH.contains(&t.lower.as_str()))
            || blocked.at(p)
            || !toks[p - 1].tag.is_some_and(Tag::is_noun)
        {
            return None;
        }
        let mut j = p + 1;
        while j < toks.len()
            && !blocked.at(j)
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
    pub(super) fn clause_back(&self, toks: &[Token], from: usize) -> Span {
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
    pub(super) fn clause_forward(&self, toks: &[Token], from: usize) -> Span {
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

    pub(super) fn choose(
        &self,
        toks: &[Token],
        sent: SentenceRef<'_>,
        span: Span,
        effect_side: bool,
    ) -> Option<Chosen> {
        let (span, mut sign, negated, shown_from) = if effect_side {
            self.read_sign(toks, span)
        } else {
            (span, None, false, span.from)
        };
        let mut span = span;
        // "lowers blood pressure only slightly": trailing adverbs are not the variable's.
        while span.to > span.from + 1 && {
            let w = toks[span.to - 1].lower.as_str();
            w == "only" || self.adverb(w)
        } {
            span.to -= 1;
        }
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
        let lead = (shown_from < span.from).then(|| {
            let ls = toks[shown_from].start;
            (sent.offset + ls, collapse(&sent.text[ls..be]))
        });
        Some(Chosen {
            start: sent.offset + bs,
            end: sent.offset + be,
            text,
            key_text,
            sign,
            negated,
            pronoun: None,
            lead,
        })
    }

    pub(super) fn choose_bytes(
        &self,
        sent: SentenceRef<'_>,
        start: usize,
        end: usize,
    ) -> Option<Chosen> {
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

    /// "Heat, wind and smoke cause delays": the noun phrases coordinated before a slot's span.
    /// The link next to the span must be "and"/"or"; commas may join further ones.
    pub(super) fn conjuncts_back(
        &self,
        toks: &[Token],
        span: Span,
        blocked: &Blocked<'_>,
    ) -> Vec<Span> {
        let mut out = Vec::new();
        let mut from = self.determiners_before(toks, span.from);
        let mut first = true;
        while out.len() < 4 && from > 0 {
            let mut i = from;
            let mut saw_conj = false;
            while i > 0 && matches!(toks[i - 1].lower.as_str(), "and" | "or" | ",") && from - i < 2
            {
                saw_conj |= toks[i - 1].lower != ",";
                i -= 1;
            }
            if i == from || (first && !saw_conj) || blocked.any_in(i, from) {
                break;
            }
            let end = i;
            while i > 0
                && end - i < self.lexicon.max_words
                && !blocked.at(i - 1)
                && !self.np_boundary(&toks[i - 1])
            {
                i -= 1;
            }
            if i == end
                || (i > 0
                    && (blocked.at(i - 1)
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
    pub(super) fn conjuncts_forward(
        &self,
        toks: &[Token],
        span: Span,
        blocked: &Blocked<'_>,
        cue_last: &str,
        reduced: bool,
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
            if k == j || blocked.any_in(j, k) {
                break;
            }
            // "raises A and lowers B": a coordinated verb phrase, not another slot.
            if k < toks.len() && (blocked.at(k) || toks[k].tag.is_some_and(Tag::is_finite_verb)) {
                // "causes smog, acid rain, and contributes to ...": the "and" closed the list.
                if saw_conj {
                    if let Some(last) = out.last_mut() {
                        last.1 = true;
                    }
                }
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
                && (blocked.at(np.to)
                    || self
                        .lexicon
                        .auxiliaries
                        .contains(toks[np.to].lower.as_str()))
            {
                // "The wounds caused by the scourging and the thorns are almost invisible": a
                // cue phrase inside a noun phrase ends before its sentence's verb, so the last
                // conjunct is kept; else "and B are" starts a clause of its own.
                if reduced && saw_conj && !blocked.at(np.to) {
                    out.push((np, saw_conj));
                }
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

fn join(toks: &[Token], a: usize, b: usize) -> String {
    toks[a..b]
        .iter()
        .map(|t| t.lower.as_str())
        .collect::<Vec<_>>()
        .join(" ")
}
