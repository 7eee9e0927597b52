//! The lexicon (`lexicon.toml`: the word lists the span, sign and modality logic use) and alias
//! files (`aliases.tsv`).

use super::{invalid, line_of};
use crate::error::InputError;
use serde::Deserialize;
use std::collections::HashSet;
use std::path::Path;

/// A set of words, hashed with Fx: the span finder asks these sets about nearly every token.
pub type WordSet = HashSet<String, rustc_hash::FxBuildHasher>;

/// Word lists used around a cue match (see `patterns/lexicon.toml`).
#[derive(Debug, Clone, Default)]
pub struct Lexicon {
    pub determiners: WordSet,
    pub clause_breaks: WordSet,
    pub relatives: WordSet,
    pub auxiliaries: WordSet,
    pub prepositions: WordSet,
    pub reporting_verbs: WordSet,
    pub max_words: usize,
    pub fillers: WordSet,
    pub not_adverbs: WordSet,
    /// Sentence adverbs that may stand, alone or between commas, between a subject and its
    /// verb ("the increase, though, caused").
    pub parenthetical: WordSet,
    pub hedges: Vec<Vec<String>>,
    pub negators: Vec<Vec<String>>,
    pub conditionals: Vec<Vec<String>>,
    pub sign_increase: WordSet,
    pub sign_decrease: WordSet,
    pub increase_nouns: WordSet,
    pub decrease_nouns: WordSet,
    pub change_links: WordSet,
    pub stopwords: WordSet,
    /// Words that name no variable when they are all a span holds ("the conclusion",
    /// "possibly"): a claim with such a cause or effect is a statement about reasoning.
    pub not_alone: WordSet,
    /// Nouns that name an outcome (pain, damage, heat), with their plurals: the heads that a cue
    /// marked `outcome_effect` needs.
    pub outcomes: WordSet,
    /// Names of things that contain a glued cue ("cyclin-dependent kinase"), lower-cased, as
    /// words: inside them the glued cue states nothing.
    pub fixed_terms: Vec<Vec<String>>,
    /// Intransitive verbs of change that end an effect clause ("grain prices rose"), as phrases.
    pub increase_verbs: Vec<Vec<String>>,
    pub decrease_verbs: Vec<Vec<String>>,
    /// `[senses]`: the words that show a cue word in another sense (see lexicon.toml).
    pub senses: Senses,
}

/// `[senses]` in lexicon.toml: word lists for the rules that read a cue word in another sense
/// (a path, handling, a role, a piece of work) or a sentence that only talks about a causal
/// question.
#[derive(Debug, Clone, Default)]
pub struct Senses {
    /// Ways and places a "lead to" may run along: "the trail leads to the ridge".
    pub paths: WordSet,
    /// Things lifted, lowered, cut or blocked by hand: "raised the flag", "cut the rope".
    pub handled: WordSet,
    /// Animals and crops one raises: "raised sheep".
    pub reared: WordSet,
    /// Collective works one contributes to: "contributed to the anthology".
    pub works: WordSet,
    /// People and roles: "the caretaker is responsible for the keys".
    pub persons: WordSet,
    /// Words of research and enquiry that make a causal noun phrase a topic, not a claim:
    /// "we examine the causes of", "the effect ... was not measured".
    pub enquiry: WordSet,
    /// Units, and words for dates and amounts, that name no variable alone ("°C", "mg").
    pub units: WordSet,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLexicon {
    span: RawSpanLex,
    verb_group: RawVerbGroup,
    modality: RawModality,
    sign: RawSign,
    keys: RawKeys,
    #[serde(default)]
    outcomes: RawOutcomes,
    #[serde(default)]
    terms: RawTerms,
    #[serde(default)]
    senses: RawSenses,
}
#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct RawSenses {
    #[serde(default)]
    paths: Vec<String>,
    #[serde(default)]
    handled: Vec<String>,
    #[serde(default)]
    reared: Vec<String>,
    #[serde(default)]
    works: Vec<String>,
    #[serde(default)]
    persons: Vec<String>,
    #[serde(default)]
    enquiry: Vec<String>,
    #[serde(default)]
    units: Vec<String>,
}
#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct RawTerms {
    fixed: Vec<String>,
}
#[derive(Deserialize, Default)]
#[serde(deny_unknown_fields)]
struct RawOutcomes {
    nouns: Vec<String>,
}
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSpanLex {
    determiners: Vec<String>,
    clause_breaks: Vec<String>,
    relatives: Vec<String>,
    auxiliaries: Vec<String>,
    prepositions: Vec<String>,
    reporting_verbs: Vec<String>,
    max_words: usize,
}
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawVerbGroup {
    fillers: Vec<String>,
    #[serde(default)]
    not_adverbs: Vec<String>,
    #[serde(default)]
    parenthetical: Vec<String>,
}
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawModality {
    hedges: Vec<String>,
    negators: Vec<String>,
    conditionals: Vec<String>,
}
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSign {
    increase: Vec<String>,
    decrease: Vec<String>,
    increase_nouns: Vec<String>,
    decrease_nouns: Vec<String>,
    change_links: Vec<String>,
    #[serde(default)]
    increase_verbs: Vec<String>,
    #[serde(default)]
    decrease_verbs: Vec<String>,
}
#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawKeys {
    stopwords: Vec<String>,
    #[serde(default)]
    not_alone: Vec<String>,
}

/// Parse `lexicon.toml`.
pub fn parse_lexicon(path: &Path, text: &str) -> Result<Lexicon, InputError> {
    let raw: RawLexicon = toml::from_str(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start)).unwrap_or(0);
        invalid(path, line, e.message().to_string())
    })?;
    let set = |v: Vec<String>| v.into_iter().map(|s| s.to_lowercase()).collect::<WordSet>();
    let phrases = |v: Vec<String>| {
        v.into_iter()
            .map(|s| {
                s.to_lowercase()
                    .split_whitespace()
                    .map(str::to_string)
                    .collect::<Vec<_>>()
            })
            .filter(|p| !p.is_empty())
            .collect::<Vec<_>>()
    };
    // A fixed term must hold a glued word ("x-linked"), or it could never match a glued cue.
    if let Some(t) = raw.terms.fixed.iter().find(|t| {
        t.split_whitespace()
            .next()
            .is_none_or(|w| !w.trim_matches('-').contains('-'))
    }) {
        return Err(invalid(
            path,
            line_of(text, text.find(&format!("\"{t}\"")).unwrap_or(0)),
            format!("fixed term \"{t}\" must start with a hyphenated word (\"cyclin-dependent kinase\")"),
        ));
    }
    if raw.span.max_words == 0 {
        return Err(invalid(
            path,
            line_of(text, text.find("max_words").unwrap_or(0)),
            "max_words must be at least 1",
        ));
    }
    Ok(Lexicon {
        determiners: set(raw.span.determiners),
        clause_breaks: set(raw.span.clause_breaks),
        relatives: set(raw.span.relatives),
        auxiliaries: set(raw.span.auxiliaries),
        prepositions: set(raw.span.prepositions),
        reporting_verbs: set(raw.span.reporting_verbs),
        max_words: raw.span.max_words,
        fillers: set(raw.verb_group.fillers),
        not_adverbs: set(raw.verb_group.not_adverbs),
        parenthetical: set(raw.verb_group.parenthetical),
        hedges: phrases(raw.modality.hedges),
        negators: phrases(raw.modality.negators),
        conditionals: phrases(raw.modality.conditionals),
        sign_increase: set(raw.sign.increase),
        sign_decrease: set(raw.sign.decrease),
        increase_nouns: set(raw.sign.increase_nouns),
        decrease_nouns: set(raw.sign.decrease_nouns),
        change_links: set(raw.sign.change_links),
        stopwords: set(raw.keys.stopwords),
        not_alone: set(raw.keys.not_alone),
        outcomes: raw
            .outcomes
            .nouns
            .iter()
            .flat_map(|n| {
                let n = n.to_lowercase();
                [plural(&n), n]
            })
            .collect(),
        fixed_terms: phrases(raw.terms.fixed),
        increase_verbs: phrases(raw.sign.increase_verbs),
        decrease_verbs: phrases(raw.sign.decrease_verbs),
        senses: Senses {
            paths: with_plurals(&raw.senses.paths),
            handled: with_plurals(&raw.senses.handled),
            reared: with_plurals(&raw.senses.reared),
            works: with_plurals(&raw.senses.works),
            persons: with_plurals(&raw.senses.persons),
            enquiry: set(raw.senses.enquiry),
            units: set(raw.senses.units),
        },
    })
}

/// The regular English plural of a noun ("injury" → "injuries", "ash" → "ashes").
/// The nouns of a list with their plurals, lower-cased.
fn with_plurals(v: &[String]) -> WordSet {
    v.iter()
        .flat_map(|n| {
            let n = n.to_lowercase();
            [plural(&n), n]
        })
        .collect()
}

fn plural(n: &str) -> String {
    let b = n.as_bytes();
    match b {
        [.., c, b'y'] if !b"aeiou".contains(c) => format!("{}ies", &n[..n.len() - 1]),
        [.., b's'] | [.., b'x'] | [.., b'z'] | [.., b'c', b'h'] | [.., b's', b'h'] => {
            format!("{n}es")
        }
        _ => format!("{n}s"),
    }
}

/// Parse an alias file: `surface form<TAB>variable name` per line, `#` comments.
pub fn parse_aliases(path: &Path, text: &str) -> Result<Vec<(String, String)>, InputError> {
    let mut out = Vec::new();
    for (i, line) in text.lines().enumerate() {
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let mut cols = t.splitn(2, '\t');
        match (cols.next().map(str::trim), cols.next().map(str::trim)) {
            (Some(a), Some(b)) if !a.is_empty() && !b.is_empty() => {
                out.push((a.to_string(), b.to_string()))
            }
            _ => {
                return Err(invalid(
                    path,
                    i + 1,
                    "expected 'surface form<TAB>variable name'",
                ))
            }
        }
    }
    Ok(out)
}

/// Load an alias file from disk.
pub fn load_aliases(path: &Path) -> Result<Vec<(String, String)>, InputError> {
    let text = std::fs::read_to_string(path).map_err(|source| InputError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    parse_aliases(path, &text)
}
