//! One cue match to claims: the slots on each side (a fronted clause or the previous sentence
//! when the cue opens its sentence, a pronoun's antecedent), the checks that need both slots,
//! and the claim records, one per pair of coordinated cause and effect.

use super::{Blocked, Chosen, Extractor, Origin, SentenceRef, PRONOUNS};
use crate::claim::{Claim, Modality, Polarity, Slot, Source, SCHEMA_VERSION};
use crate::extract::cues::{CueMatch, SlotPlace};
use crate::extract::tokens::{collapse, tokenize, Token};
use crate::patterns::{Lexicon, PatternToken};
use crate::variables::heads;

/// What deciding the slots of one cue match needs: the match, its tokens, the sentence and its
/// neighbour, where it came from.
pub(super) struct MatchCtx<'a> {
    pub(super) m: &'a CueMatch,
    /// The cue's token range `[ca, cb)`.
    pub(super) ca: usize,
    pub(super) cb: usize,
    /// The sentence's tokens, tagged.
    pub(super) toks: &'a [Token],
    /// Tokens no span may cross: the words of the other cues.
    pub(super) blocked: &'a Blocked<'a>,
    pub(super) sent: SentenceRef<'a>,
    pub(super) prev: Option<SentenceRef<'a>>,
    pub(super) origin: &'a Origin<'a>,
    /// The sentence with whitespace collapsed, as the claim records it: made once, by the
    /// first claim of the sentence (most sentences with a cue match give none).
    pub(super) sentence_text: &'a std::cell::OnceCell<String>,
    /// The cause of the verb this one is coordinated with ("X raises A and lowers B": for
    /// "lowers", X), used when the slot before the cue is empty.
    pub(super) inherited_cause: Option<&'a Chosen>,
}

/// A slot as first chosen, and the slots coordinated with it ("heat, wind and smoke").
type Picked = (Option<Chosen>, Vec<Chosen>);

impl Extractor {
    /// The claims of one cue match, or why it gives none.
    pub(super) fn claim_for(
        &self,
        cx: &MatchCtx<'_>,
        notes: &mut Vec<String>,
    ) -> Result<Vec<Claim>, String> {
        let m = cx.m;
        let spec = &self.cues.cues[m.cue].spec;
        let (mut cause, cause_extra) = self.pick(cx, m.cause, false, notes);
        let (mut effect, effect_extra) = self.pick(cx, m.effect, true, notes);
        if cause.is_none() && m.cause == SlotPlace::Before {
            if let Some(c) = cx.inherited_cause {
                notes.push(format!(
                    "coordinated verb: the cause is that of the verb before, \"{}\"",
                    c.text
                ));
                cause = Some(c.clone());
            }
        }
        let mut cross_sentence = self.fill_opening_slot(cx, &mut cause, &mut effect, notes);
        cross_sentence |= self.resolve_pronouns(cx, &mut cause, &mut effect, notes);
        let cause = cause.ok_or("no cause span found")?;
        let effect = effect.ok_or("no effect span found")?;
        self.purpose_infinitive(cx)?;
        for c in [&cause, &effect] {
            self.verb_only(cx, c)?;
        }
        if spec.time_sense
            && !cross_sentence
            && self.reads_as_time(cx.toks, cx.sent, &cause, &effect)
        {
            return Err(
                "a perfect-tense clause beside a past-tense or verbless one: the time sense".into(),
            );
        }
        let mut modality = self.modality(cx.toks, cx.ca, cx.sent.text, notes);
        if spec.polarity == Polarity::None && modality != Modality::Question {
            modality = Modality::Negated;
        }
        // One convention for every no-effect statement: "does not affect Y" states that X has
        // no effect on Y, as "has no effect on Y" does (polarity none, modality negated).
        let no_effect = spec.negated_none && modality == Modality::Negated;
        if no_effect {
            notes.push("a denied effect: polarity none, as \"has no effect on\"".into());
        }
        let causes: Vec<Chosen> = std::iter::once(cause).chain(cause_extra).collect();
        let mut effects: Vec<Chosen> = std::iter::once(effect).chain(effect_extra).collect();
        if spec.outcome_effect {
            effects = self.outcome_effects(cx, effects)?;
        }
        self.other_sense(spec, m, &causes, &effects)?;
        // Only a causal noun that opens its pattern ("the effects of X on Y", "X is a cause of
        // Y") can be a topic of enquiry; "Y from X" and the passives are statements.
        let opens_with_noun =
            noun_first(spec) || matches!(spec.tokens.first(), Some(PatternToken::Word { .. }));
        if spec.family == "nominal" && opens_with_noun {
            let slots: Vec<&Chosen> = causes.iter().chain(&effects).collect();
            self.enquiry_talk(cx.toks, cx.sent, cx.ca, &slots)?;
        }
        if spec.clause_spans && spec.polarity == Polarity::Unsigned {
            for e in &mut effects {
                self.sign_of_clause(cx, e, notes);
            }
        }
        let mut claims = Vec::new();
        let mut first_err = None;
        for c in &causes {
            for e in &effects {
                match self.build_claim(c, e, spec, modality, cross_sentence, cx, notes) {
                    Ok(mut claim) => {
                        claim.attribution = self.source_of(cx, c, e);
                        claims.push(claim);
                    }
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

    /// The slot at `place`, with the slots coordinated with it.
    fn pick(
        &self,
        cx: &MatchCtx<'_>,
        place: SlotPlace,
        effect_side: bool,
        notes: &mut Vec<String>,
    ) -> Picked {
        let (toks, blocked, sent) = (cx.toks, cx.blocked, cx.sent);
        let cue = &self.cues.cues[cx.m.cue];
        let clause = cue.spec.clause_spans;
        let (span, extra, side) = match place {
            SlotPlace::Inside(s, e) => return (self.choose_bytes(sent, s, e), Vec::new()),
            SlotPlace::After => {
                let last_literal = toks[cx.cb.saturating_sub(1).min(toks.len().saturating_sub(1))]
                    .lower
                    .clone();
                let mut span = if clause {
                    self.clause_forward(toks, cx.cb)
                } else {
                    self.walk_forward(toks, cx.cb, blocked)
                };
                if cue.glued_last {
                    // "stress-induced insomnia": the modified noun is the word right after.
                    span.to = span.to.min(span.from + 1);
                }
                // "damage caused by X and Y was ...", "intoxication from X or Y had ...": the
                // cue phrase modifies the noun before it (no verb group between them).
                let reduced = cx.m.effect == SlotPlace::Before
                    && cx.ca > 0
                    && toks[cx.ca - 1].word
                    && !self.verb_group.contains(toks[cx.ca - 1].lower.as_str());
                let extra = if clause || cue.glued_last {
                    Vec::new()
                } else {
                    self.conjuncts_forward(toks, span, blocked, &last_literal, reduced)
                };
                (span, extra, "after")
            }
            SlotPlace::Before => {
                let (span, defined) = if clause {
                    (self.clause_back(toks, cx.ca), None)
                } else {
                    self.walk_back(toks, cx.ca, noun_first(&cue.spec), blocked, notes)
                };
                let mut extra = if clause || span.is_empty() {
                    Vec::new()
                } else {
                    self.conjuncts_back(toks, span, blocked)
                };
                extra.extend(defined);
                (span, extra, "before")
            }
        };
        let extra: Vec<Chosen> = extra
            .into_iter()
            .filter_map(|sp| self.choose(toks, sent, sp, effect_side))
            .collect();
        if !extra.is_empty() {
            notes.push(format!(
                "{} more coordinated slot(s) {side} the cue",
                extra.len()
            ));
        }
        (self.choose(toks, sent, span, effect_side), extra)
    }

    /// An empty slot before a cue that opens the sentence: "Because X, Y." takes the clause
    /// after the comma; "As a result, Y." takes the previous sentence. Returns whether the slot
    /// came from the previous sentence.
    fn fill_opening_slot(
        &self,
        cx: &MatchCtx<'_>,
        cause: &mut Option<Chosen>,
        effect: &mut Option<Chosen>,
        notes: &mut Vec<String>,
    ) -> bool {
        let (m, toks, sent) = (cx.m, cx.toks, cx.sent);
        let before_slot_empty = match (m.cause, m.effect) {
            (SlotPlace::Before, _) => cause.is_none(),
            (_, SlotPlace::Before) => effect.is_none(),
            _ => false,
        };
        if !before_slot_empty || !opens_sentence(toks, cx.ca, &self.lexicon) {
            return false;
        }
        let mut cross_sentence = false;
        let after = if m.cause == SlotPlace::After {
            &*cause
        } else {
            &*effect
        };
        let after_end_tok = after.as_ref().map(|c| {
            toks.iter()
                .position(|t| t.start + sent.offset >= c.end)
                .unwrap_or(toks.len())
        });
        let effect_side = m.effect == SlotPlace::Before;
        let fronted = after_end_tok.and_then(|j| {
            if j < toks.len() && toks[j].lower == "," {
                let span = if self.cues.cues[m.cue].spec.clause_spans {
                    self.clause_forward(toks, j + 1)
                } else {
                    self.walk_forward(toks, j + 1, cx.blocked)
                };
                let span = self.strip_determiners(toks, span);
                self.choose(toks, sent, span, effect_side)
            } else {
                None
            }
        });
        let filled = match fronted {
            Some(c) => {
                notes.push(
                    "the cue opens the sentence: the other slot is the clause after the comma"
                        .into(),
                );
                Some(c)
            }
            None => cx.prev.and_then(|p| {
                let ptoks = tokenize(p.text);
                let mut end = ptoks.len();
                while end > 0 && !ptoks[end - 1].word {
                    end -= 1;
                }
                let span = self.clause_back(&ptoks, end);
                cross_sentence = true;
                notes.push(
                    "the cue opens the sentence: the slot is the previous sentence's last clause"
                        .into(),
                );
                self.choose(&ptoks, p, span, effect_side)
            }),
        };
        if m.cause == SlotPlace::Before {
            *cause = filled;
        } else {
            *effect = filled;
        }
        cross_sentence
    }

    /// "If the crayfish reach the lakes, they will ...": a slot that is only a pronoun takes its
    /// antecedent, and the claim says so. Returns whether an antecedent came from the previous
    /// sentence.
    fn resolve_pronouns(
        &self,
        cx: &MatchCtx<'_>,
        cause: &mut Option<Chosen>,
        effect: &mut Option<Chosen>,
        notes: &mut Vec<String>,
    ) -> bool {
        let (m, toks, sent) = (cx.m, cx.toks, cx.sent);
        let mut cross_sentence = false;
        for (slot, place, effect_side) in [(cause, m.cause, false), (effect, m.effect, true)] {
            let pronoun_at = match slot {
                // A slot already taken from the previous sentence is not this sentence's words.
                Some(c) if c.start >= sent.offset => {
                    let (a, b) = c.tokens(toks, sent);
                    (b == a + 1 && PRONOUNS.contains(&toks[a].lower.as_str())).then_some(a)
                }
                Some(_) => None,
                None if place == SlotPlace::Before => self.bare_demonstrative(toks, cx.ca),
                None => None,
            };
            if let Some(p) = pronoun_at {
                if let Some((c, cross)) = self.antecedent(toks, p, sent, cx.prev, effect_side) {
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
        cross_sentence
    }

    /// An outcome cue's effects: the phrase next to the cue must name the outcome; for an effect
    /// before the cue ("the treatment of headaches from") that is the span's last phrase.
    /// Coordinated effects share the first one's reading: if it is no outcome, none is.
    fn outcome_effects(
        &self,
        cx: &MatchCtx<'_>,
        effects: Vec<Chosen>,
    ) -> Result<Vec<Chosen>, String> {
        let effect_before = cx.m.effect == SlotPlace::Before;
        let effects: Vec<Chosen> = effects
            .into_iter()
            .map_while(|e| {
                if self.outcome_head(cx.toks, cx.sent, &e) {
                    Some(e)
                } else if effect_before {
                    self.outcome_tail(cx.toks, cx.sent, &e)
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
        Ok(effects)
    }

    #[allow(clippy::too_many_arguments)]
    fn build_claim(
        &self,
        cause: &Chosen,
        effect: &Chosen,
        spec: &crate::patterns::CueSpec,
        modality: Modality,
        cross_sentence: bool,
        cx: &MatchCtx<'_>,
        notes: &mut Vec<String>,
    ) -> Result<Claim, String> {
        let (sent, origin) = (cx.sent, cx.origin);
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
        if self.amount_only(&cause.key_text) || self.amount_only(&effect.key_text) {
            return Err(format!(
                "a span is only a number, unit, year or decade (cause \"{}\", effect \"{}\"; \
                 [senses] units in lexicon.toml)",
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
        if spec.negated_none && modality == Modality::Negated {
            polarity = Polarity::None;
        }
        if let (Polarity::Unsigned, Some(s)) = (polarity, effect.sign) {
            notes.push(format!("the effect's sign word makes it an {s}"));
            polarity = s;
        }
        // Heads are split from the text the key was made from, so the head key is the key's
        // own words less the qualifiers'.
        let (chead, ehead) = (
            heads::split(&cause.key_text),
            heads::split(&effect.key_text),
        );
        let (chead_key, ehead_key) = (
            self.head_key(&chead.head, &cause.key_text, &ckey),
            self.head_key(&ehead.head, &effect.key_text, &ekey),
        );
        Ok(Claim {
            schema: SCHEMA_VERSION,
            confidence: 0.0, // set by the pipeline (crate::extract::confidence)
            cause: Slot {
                text: cause.lead.as_ref().map_or(&cause.text, |l| &l.1).clone(),
                key: ckey,
                start: cause.lead.as_ref().map_or(cause.start, |l| l.0),
                end: cause.end,
                pronoun: cause.pronoun.clone(),
                head_key: chead_key,
                head: chead.head,
                qualifiers: chead.qualifiers,
            },
            effect: Slot {
                text: effect.lead.as_ref().map_or(&effect.text, |l| &l.1).clone(),
                key: ekey,
                start: effect.lead.as_ref().map_or(effect.start, |l| l.0),
                end: effect.end,
                pronoun: effect.pronoun.clone(),
                head_key: ehead_key,
                head: ehead.head,
                qualifiers: ehead.qualifiers,
            },
            kind: spec.kind,
            polarity,
            modality,
            cue: spec.id.clone(),
            sentence: cx.sentence_text.get_or_init(|| collapse(sent.text)).clone(),
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
            attribution: None,
        })
    }

    /// The key of a slot's head (`key` that of its `text`): the slot's own key when the head
    /// is the whole text (most are) or has no content word of its own.
    fn head_key(&self, head: &str, text: &str, key: &str) -> String {
        if head == text.trim() {
            return key.to_string();
        }
        let k = self.normalizer.key(head);
        if k.is_empty() {
            key.to_string()
        } else {
            k
        }
    }

    /// "initiatives by the sectors to improve arrangements", "steps are taken to improve": a
    /// verb cue right after "to", with no verb group before it ("is likely to", "has been
    /// shown to", "helps to"), names an aim, not a stated effect.
    fn purpose_infinitive(&self, cx: &MatchCtx<'_>) -> Result<(), String> {
        let spec = &self.cues.cues[cx.m.cue].spec;
        // "criteria to prevent cost to the taxpayer": a measure named with what it prevents is
        // read as a claim that it does (BECAUSE annotates these as consequences).
        if cx.m.cause != SlotPlace::Before
            || spec.clause_spans
            || noun_first(spec)
            || spec.polarity == Polarity::Prevent
        {
            return Ok(());
        }
        let ca = cx.ca;
        if ca < 2 || cx.toks[ca - 1].lower != "to" {
            return Ok(());
        }
        let w = cx.toks[ca - 2].lower.as_str();
        if !cx.toks[ca - 2].word || self.verb_group.contains(w) || self.adverb(w) {
            return Ok(());
        }
        Err(format!(
            "\"{w} to\" before the cue: an aim (a purpose infinitive), not a stated effect"
        ))
    }

    /// A slot that is one verb or adverb ("taken", "were", "interestingly") names no variable.
    fn verb_only(&self, cx: &MatchCtx<'_>, c: &Chosen) -> Result<(), String> {
        if c.start < cx.sent.offset {
            return Ok(());
        }
        let (a, b) = c.tokens(cx.toks, cx.sent);
        let words: Vec<&Token> = cx.toks[a..b.min(cx.toks.len())]
            .iter()
            .filter(|t| t.word)
            .collect();
        // The tagger is unsure on short clauses ("Drought limits grazing"), so a tag alone
        // decides only for past participles with a participle's ending.
        let whole =
            |t: &Token| cx.sent.offset + t.start == c.start && cx.sent.offset + t.end == c.end;
        let fragment = matches!(words.as_slice(), [t] if whole(t) && {
            let w = t.lower.as_str();
            self.lexicon.auxiliaries.contains(w)
                || self.adverb(w)
                || (t.tag.is_some_and(|g| g.is_participle())
                    && (w.ends_with("ed") || w.ends_with("en")))
        });
        if fragment {
            return Err(format!(
                "\"{}\" is a lone verb or adverb: it names no variable",
                c.text
            ));
        }
        Ok(())
    }

    /// Who said it: the attribution read before the claim's first slot in this sentence.
    fn source_of(&self, cx: &MatchCtx<'_>, cause: &Chosen, effect: &Chosen) -> Option<String> {
        let in_sentence = |c: &Chosen| c.start >= cx.sent.offset;
        let first = [cause, effect]
            .into_iter()
            .filter(|c| in_sentence(c))
            .map(|c| c.tokens(cx.toks, cx.sent).0)
            .min()?;
        self.attribution(cx.toks, first.min(cx.ca), cx.sent.text)
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
pub(super) fn numbers_only(key: &str) -> bool {
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
