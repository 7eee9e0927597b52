//! Cue entries: the cue files (`cues/*.toml`) parsed and checked, and pattern strings read into
//! tokens.

use super::inflection::{word_forms, Irregular};
use super::{invalid, line_of};
use crate::claim::{Kind, Modality, Polarity};
use crate::error::InputError;
use serde::Deserialize;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// Which slot a pattern token stands for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    Cause,
    Effect,
}

/// One token of a cue's pattern string.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum PatternToken {
    Slot(Role),
    /// A literal word, with its accepted forms (one form unless the word was marked `~` or `+`);
    /// `verb` is true for `word~`.
    Word {
        forms: Vec<String>,
        verb: bool,
    },
    /// A literal glued by a hyphen to the word before it (`-induced`).
    Glued {
        forms: Vec<String>,
    },
    /// Optional punctuation.
    Punct(char),
}

/// An example sentence with the claim it must give.
#[derive(Debug, Clone)]
pub struct Example {
    pub text: String,
    pub cause: String,
    pub effect: String,
    pub polarity: Option<Polarity>,
    pub modality: Option<Modality>,
}

/// A validated cue entry, before compilation into a matcher.
#[derive(Debug, Clone)]
pub struct CueSpec {
    pub id: String,
    pub family: String,
    pub pattern: String,
    pub tokens: Vec<PatternToken>,
    pub kind: Kind,
    pub polarity: Polarity,
    /// Slots are clauses (connectives), not noun phrases.
    pub clause_spans: bool,
    pub reject_after: Option<String>,
    pub reject_before: Option<String>,
    /// The cue only counts when the effect's head noun is one of the lexicon's outcome nouns
    /// ("headaches from mold", "friction produces heat", not "a man from Oslo").
    pub outcome_effect: bool,
    /// The connective also has a time sense ("since"): a perfect-tense effect clause beside a
    /// past-tense or verbless cause clause reads as time, not reason, and gives no claim.
    pub time_sense: bool,
    /// A denied claim of this cue states that there is no effect ("does not affect Y"): its
    /// polarity becomes `none`, as for "has no effect on" (the no-effect convention).
    pub negated_none: bool,
    /// The verb also names moving or handling a thing ("raised the flag", "cut the rope"): an
    /// object whose head is in `[senses] handled` (lexicon.toml) gives no claim.
    pub handling: bool,
    pub examples: Vec<Example>,
    pub counter_examples: Vec<String>,
    /// Where the entry was defined, for messages.
    pub origin: (PathBuf, usize),
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    cue: Vec<toml::Spanned<RawCue>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawCue {
    id: String,
    family: Option<String>,
    pattern: String,
    kind: String,
    polarity: String,
    spans: Option<String>,
    reject_after: Option<String>,
    reject_before: Option<String>,
    #[serde(default)]
    outcome_effect: bool,
    #[serde(default)]
    time_sense: bool,
    #[serde(default)]
    negated_none: bool,
    #[serde(default)]
    handling: bool,
    #[serde(default)]
    examples: Vec<RawExample>,
    #[serde(default)]
    counter_examples: Vec<String>,
    #[allow(dead_code)]
    note: Option<String>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawExample {
    text: String,
    cause: String,
    effect: String,
    polarity: Option<String>,
    modality: Option<String>,
}

/// Parse one cue file. Every error names the file and the line of the offending entry.
pub fn parse_cue_file(
    path: &Path,
    text: &str,
    irregular: &Irregular,
) -> Result<Vec<CueSpec>, InputError> {
    let raw: RawFile = toml::from_str(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start)).unwrap_or(0);
        invalid(path, line, e.message().to_string())
    })?;
    let mut out = Vec::with_capacity(raw.cue.len());
    for spanned in raw.cue {
        let line = line_of(text, spanned.span().start);
        let raw = spanned.into_inner();
        let err = |m: String| invalid(path, line, format!("cue '{}': {m}", raw.id));
        if raw.id.is_empty()
            || !raw
                .id
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-' || c == '.')
        {
            return Err(err(
                "id must be lowercase letters, digits, '-' or '.'".into()
            ));
        }
        let kind: Kind = raw.kind.parse().map_err(err)?;
        let polarity: Polarity = raw.polarity.parse().map_err(err)?;
        let clause_spans = match raw.spans.as_deref() {
            None | Some("phrase") => false,
            Some("clause") => true,
            Some(o) => {
                return Err(err(format!(
                    "spans must be \"phrase\" or \"clause\", not \"{o}\""
                )))
            }
        };
        let tokens = parse_pattern(&raw.pattern, irregular).map_err(err)?;
        for (name, re) in [
            ("reject_after", &raw.reject_after),
            ("reject_before", &raw.reject_before),
        ] {
            // Parsed, not compiled: the cue matcher compiles it once (a regex too large to
            // compile is reported there, also with its file and line).
            if let Some(re) = re {
                regex_syntax::Parser::new()
                    .parse(re)
                    .map_err(|e| err(format!("{name}: invalid regex: {e}")))?;
            }
        }
        if raw.examples.is_empty() {
            return Err(err("needs at least one example".into()));
        }
        let mut examples = Vec::new();
        for ex in raw.examples {
            examples.push(Example {
                polarity: ex
                    .polarity
                    .as_deref()
                    .map(str::parse)
                    .transpose()
                    .map_err(err)?,
                modality: ex
                    .modality
                    .as_deref()
                    .map(str::parse)
                    .transpose()
                    .map_err(err)?,
                text: ex.text,
                cause: ex.cause,
                effect: ex.effect,
            });
        }
        out.push(CueSpec {
            family: raw.family.unwrap_or_else(|| "other".into()),
            id: raw.id,
            pattern: raw.pattern,
            tokens,
            kind,
            polarity,
            clause_spans,
            reject_after: raw.reject_after,
            reject_before: raw.reject_before,
            outcome_effect: raw.outcome_effect,
            time_sense: raw.time_sense,
            negated_none: raw.negated_none,
            handling: raw.handling,
            examples,
            counter_examples: raw.counter_examples,
            origin: (path.to_path_buf(), line),
        });
    }
    Ok(out)
}

pub(super) fn check_unique(cues: &[CueSpec]) -> Result<(), InputError> {
    let mut seen: HashMap<&str, &CueSpec> = HashMap::new();
    for c in cues {
        if let Some(first) = seen.insert(&c.id, c) {
            return Err(invalid(
                &c.origin.0,
                c.origin.1,
                format!(
                    "duplicate cue id '{}' (first defined at {}:{})",
                    c.id,
                    first.origin.0.display(),
                    first.origin.1
                ),
            ));
        }
    }
    Ok(())
}

/// Split a pattern string into tokens and check its shape.
pub fn parse_pattern(pattern: &str, irregular: &Irregular) -> Result<Vec<PatternToken>, String> {
    let mut tokens = Vec::new();
    for word in pattern.split_whitespace() {
        let tok = match word {
            "CAUSE" => PatternToken::Slot(Role::Cause),
            "EFFECT" => PatternToken::Slot(Role::Effect),
            "," | ";" => PatternToken::Punct(word.chars().next().unwrap_or(',')),
            w if w.starts_with('-') && w.len() > 1 => PatternToken::Glued {
                forms: word_forms(&w[1..], irregular)?,
            },
            w => PatternToken::Word {
                forms: word_forms(w, irregular)?,
                verb: w.ends_with('~'),
            },
        };
        tokens.push(tok);
    }
    let count = |r: Role| {
        tokens
            .iter()
            .filter(|t| **t == PatternToken::Slot(r))
            .count()
    };
    if count(Role::Cause) != 1 || count(Role::Effect) != 1 {
        return Err(format!(
            "pattern \"{pattern}\" must contain CAUSE and EFFECT exactly once each"
        ));
    }
    if !tokens
        .iter()
        .any(|t| matches!(t, PatternToken::Word { .. } | PatternToken::Glued { .. }))
    {
        return Err(format!("pattern \"{pattern}\" has no literal word"));
    }
    for (i, t) in tokens.iter().enumerate() {
        if matches!(t, PatternToken::Glued { .. })
            && !matches!(tokens.get(i.wrapping_sub(1)), Some(PatternToken::Slot(_)))
        {
            return Err(format!(
                "pattern \"{pattern}\": a '-word' must follow a slot"
            ));
        }
        if let (PatternToken::Slot(_), Some(PatternToken::Slot(_))) = (t, tokens.get(i + 1)) {
            return Err(format!(
                "pattern \"{pattern}\": two slots need a literal between them"
            ));
        }
    }
    Ok(tokens)
}
