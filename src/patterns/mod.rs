//! Loading, validating and expanding the pattern files in `patterns/`.
//!
//! Everything hearsay knows about how English states cause and effect is data: cue entries
//! (`cues/*.toml`), the word lists used around a match (`lexicon.toml`) and irregular verb forms
//! (`irregular-verbs.tsv`). This module turns those files into checked, typed values and reports
//! any mistake as `file:line: reason`. It does no matching itself; `cues` compiles the result.
//!
//! The shipped files are compiled into the binary, so `hearsay` works from any directory;
//! `--patterns DIR` loads a user's folder with the same layout instead.

use crate::claim::{Kind, Modality, Polarity};
use crate::error::InputError;
use serde::Deserialize;
use std::collections::{BTreeMap, HashMap, HashSet};
use std::path::{Path, PathBuf};

/// The built-in pattern files, embedded at compile time. A test checks that every file in
/// `patterns/cues/` is listed here.
pub const BUILTIN_CUE_FILES: &[(&str, &str)] = &[
    (
        "cues/causal-verbs.toml",
        include_str!("../../patterns/cues/causal-verbs.toml"),
    ),
    (
        "cues/directional.toml",
        include_str!("../../patterns/cues/directional.toml"),
    ),
    (
        "cues/connectives.toml",
        include_str!("../../patterns/cues/connectives.toml"),
    ),
    (
        "cues/nominal-passive.toml",
        include_str!("../../patterns/cues/nominal-passive.toml"),
    ),
    (
        "cues/association.toml",
        include_str!("../../patterns/cues/association.toml"),
    ),
    (
        "cues/no-effect.toml",
        include_str!("../../patterns/cues/no-effect.toml"),
    ),
];
const BUILTIN_LEXICON: &str = include_str!("../../patterns/lexicon.toml");
const BUILTIN_IRREGULAR: &str = include_str!("../../patterns/irregular-verbs.tsv");
const BUILTIN_ALIASES: &str = include_str!("../../patterns/aliases.tsv");
/// The shipped confidence model's text (`patterns/confidence.toml`); parsed by the extractor.
pub const BUILTIN_CONFIDENCE: &str = include_str!("../../patterns/confidence.toml");

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
    pub examples: Vec<Example>,
    pub counter_examples: Vec<String>,
    /// Where the entry was defined, for messages.
    pub origin: (PathBuf, usize),
}

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
}

/// Everything loaded from one pattern folder.
#[derive(Debug, Clone)]
pub struct PatternSet {
    pub cues: Vec<CueSpec>,
    pub lexicon: Lexicon,
    /// Surface form → variable name pairs from `aliases.tsv` (applied after the user's own).
    pub aliases: Vec<(String, String)>,
    /// Where the set came from, for messages: "built-in" or the folder.
    pub origin: String,
    /// BLAKE3 of everything that decides which claims a text yields: the hearsay version and the
    /// cue, lexicon, inflection and confidence files (not aliases, which apply at query time). A
    /// store remembers it, so a scan with other patterns or another version re-reads every file.
    pub fingerprint: String,
    /// The folder's own confidence model (path and text), when it has one; read once here so
    /// that the fingerprint covers the model the extractor installs.
    pub confidence: Option<(PathBuf, String)>,
}

/// Hashes the files a pattern set is made of, in load order.
struct Fingerprint(blake3::Hasher);

impl Fingerprint {
    fn new() -> Fingerprint {
        let mut h = blake3::Hasher::new();
        h.update(env!("CARGO_PKG_VERSION").as_bytes());
        Fingerprint(h)
    }

    /// Add one file: its role and its text, each length-prefixed so that no two sets collide
    /// by moving bytes between files.
    fn add<'t>(&mut self, role: &str, text: &'t str) -> &'t str {
        for part in [role, text] {
            self.0.update(&(part.len() as u64).to_le_bytes());
            self.0.update(part.as_bytes());
        }
        text
    }

    fn finish(self) -> String {
        self.0.finalize().to_hex().to_string()
    }
}

impl PatternSet {
    /// The patterns shipped with hearsay.
    pub fn builtin() -> Result<PatternSet, InputError> {
        let mut fp = Fingerprint::new();
        let irregular = parse_irregular(
            Path::new("patterns/irregular-verbs.tsv"),
            fp.add("irregular", BUILTIN_IRREGULAR),
        )?;
        let mut cues = Vec::new();
        for (name, text) in BUILTIN_CUE_FILES {
            cues.extend(parse_cue_file(
                &Path::new("patterns").join(name),
                fp.add(name, text),
                &irregular,
            )?);
        }
        check_unique(&cues)?;
        let lexicon = parse_lexicon(
            Path::new("patterns/lexicon.toml"),
            fp.add("lexicon", BUILTIN_LEXICON),
        )?;
        fp.add("confidence", BUILTIN_CONFIDENCE);
        Ok(PatternSet {
            cues,
            lexicon,
            aliases: parse_aliases(Path::new("patterns/aliases.tsv"), BUILTIN_ALIASES)?,
            origin: "built-in".into(),
            fingerprint: fp.finish(),
            confidence: None,
        })
    }

    /// A user's pattern folder with the same layout as `patterns/`. `lexicon.toml` and
    /// `irregular-verbs.tsv` fall back to the built-in ones when the folder has none.
    pub fn load_dir(dir: &Path) -> Result<PatternSet, InputError> {
        let read = |p: PathBuf| {
            std::fs::read_to_string(&p).map_err(|source| InputError::Io { path: p, source })
        };
        let mut fp = Fingerprint::new();
        let irr_path = dir.join("irregular-verbs.tsv");
        let irregular = if irr_path.exists() {
            parse_irregular(&irr_path, fp.add("irregular", &read(irr_path.clone())?))?
        } else {
            parse_irregular(
                Path::new("patterns/irregular-verbs.tsv"),
                fp.add("irregular", BUILTIN_IRREGULAR),
            )?
        };
        let cue_dir = dir.join("cues");
        let mut files: Vec<PathBuf> = std::fs::read_dir(&cue_dir)
            .map_err(|source| InputError::Io {
                path: cue_dir.clone(),
                source,
            })?
            .filter_map(|e| e.ok().map(|e| e.path()))
            .filter(|p| p.extension().is_some_and(|x| x == "toml"))
            .collect();
        files.sort();
        if files.is_empty() {
            return Err(InputError::Invalid {
                path: cue_dir,
                line: 0,
                message: "no .toml cue files".into(),
            });
        }
        let mut cues = Vec::new();
        for f in files {
            let text = read(f.clone())?;
            let name = f.file_name().map(|n| n.to_string_lossy().into_owned());
            let role = format!("cues/{}", name.unwrap_or_default());
            cues.extend(parse_cue_file(&f, fp.add(&role, &text), &irregular)?);
        }
        check_unique(&cues)?;
        let lex_path = dir.join("lexicon.toml");
        let lexicon = if lex_path.exists() {
            parse_lexicon(&lex_path, fp.add("lexicon", &read(lex_path.clone())?))?
        } else {
            parse_lexicon(
                Path::new("patterns/lexicon.toml"),
                fp.add("lexicon", BUILTIN_LEXICON),
            )?
        };
        // The folder's own confidence model when it has one (see `Global::extractor_for`).
        let conf_path = dir.join("confidence.toml");
        let confidence = if conf_path.exists() {
            let text = read(conf_path.clone())?;
            fp.add("confidence", &text);
            Some((conf_path, text))
        } else {
            fp.add("confidence", BUILTIN_CONFIDENCE);
            None
        };
        let al_path = dir.join("aliases.tsv");
        let aliases = if al_path.exists() {
            parse_aliases(&al_path, &read(al_path.clone())?)?
        } else {
            Vec::new()
        };
        Ok(PatternSet {
            cues,
            lexicon,
            aliases,
            origin: dir.display().to_string(),
            fingerprint: fp.finish(),
            confidence,
        })
    }

    /// The built-in set, or the folder when one is given.
    pub fn load(dir: Option<&Path>) -> Result<PatternSet, InputError> {
        match dir {
            Some(d) => Self::load_dir(d),
            None => Self::builtin(),
        }
    }
}

fn invalid(path: &Path, line: usize, message: impl Into<String>) -> InputError {
    InputError::Invalid {
        path: path.to_path_buf(),
        line,
        message: message.into(),
    }
}

pub(crate) fn line_of(text: &str, offset: usize) -> usize {
    text[..offset.min(text.len())]
        .bytes()
        .filter(|&b| b == b'\n')
        .count()
        + 1
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
            examples,
            counter_examples: raw.counter_examples,
            origin: (path.to_path_buf(), line),
        });
    }
    Ok(out)
}

fn check_unique(cues: &[CueSpec]) -> Result<(), InputError> {
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

fn word_forms(word: &str, irregular: &Irregular) -> Result<Vec<String>, String> {
    if let Some(base) = word.strip_suffix('+') {
        // A noun with its plural.
        let forms = word_forms(base, irregular)?;
        let b = base.as_bytes();
        let plural = if base.ends_with('s')
            || base.ends_with('x')
            || base.ends_with("ch")
            || base.ends_with("sh")
        {
            format!("{base}es")
        } else if b.len() > 1 && b[b.len() - 1] == b'y' && !is_vowel(b[b.len() - 2]) {
            format!("{}ies", &base[..base.len() - 1])
        } else {
            format!("{base}s")
        };
        return Ok(forms.into_iter().chain(std::iter::once(plural)).collect());
    }
    let (base, inflect) = match word.strip_suffix('~') {
        Some(b) => (b, true),
        None => (word, false),
    };
    if base.is_empty()
        || !base
            .chars()
            .all(|c| c.is_alphanumeric() || c == '-' || c == '\'')
    {
        return Err(format!(
            "bad literal '{word}': use letters, digits, '-' or '\\''"
        ));
    }
    if base.chars().any(|c| c.is_uppercase()) {
        return Err(format!(
            "literal '{word}' must be lower-case (CAUSE and EFFECT are the only upper-case tokens)"
        ));
    }
    Ok(if inflect {
        inflect_verb(base, irregular)
    } else {
        vec![base.to_string()]
    })
}

/// Irregular verb forms: base → (past, past participle).
pub type Irregular = HashMap<String, (Vec<String>, Vec<String>)>;

/// Parse `irregular-verbs.tsv`: `base<TAB>past<TAB>participle`, with `/` between variants.
pub fn parse_irregular(path: &Path, text: &str) -> Result<Irregular, InputError> {
    let mut map = Irregular::new();
    for (i, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = line.split('\t').map(str::trim).collect();
        if cols.len() != 3 || cols.iter().any(|c| c.is_empty()) {
            return Err(invalid(
                path,
                i + 1,
                "expected three tab-separated columns: base, past, past participle",
            ));
        }
        let split = |s: &str| {
            s.split('/')
                .map(|x| x.trim().to_lowercase())
                .collect::<Vec<_>>()
        };
        map.insert(cols[0].to_lowercase(), (split(cols[1]), split(cols[2])));
    }
    Ok(map)
}

fn is_vowel(c: u8) -> bool {
    matches!(c, b'a' | b'e' | b'i' | b'o' | b'u')
}

/// The inflected forms of a verb: base, third person, past, participle and gerund.
pub fn inflect_verb(base: &str, irregular: &Irregular) -> Vec<String> {
    let b = base.as_bytes();
    let n = b.len();
    let last = b.last().copied().unwrap_or(b'x');
    let mut forms = vec![base.to_string()];
    // The two verbs whose present tense is irregular too.
    match base {
        "have" => forms.push("has".into()),
        "be" => forms.extend(["is", "are", "am", "was", "were", "been", "being"].map(String::from)),
        _ => {}
    }
    // Third person singular.
    if base.ends_with('s')
        || base.ends_with('x')
        || base.ends_with('z')
        || base.ends_with("ch")
        || base.ends_with("sh")
    {
        forms.push(format!("{base}es"));
    } else if last == b'y' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{}ies", &base[..n - 1]));
    } else if last == b'o' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{base}es"));
    } else {
        forms.push(format!("{base}s"));
    }
    // A final consonant after a single vowel may double ("stop" → "stopped"); both spellings are
    // kept, since a wrong one simply never occurs in text.
    let cvc = n >= 3
        && !is_vowel(last)
        && !matches!(last, b'w' | b'x' | b'y')
        && is_vowel(b[n - 2])
        && !is_vowel(b[n - 3]);
    let stems: Vec<String> = if cvc {
        vec![base.to_string(), format!("{base}{}", last as char)]
    } else {
        vec![base.to_string()]
    };
    if let Some((past, part)) = irregular.get(base) {
        forms.extend(past.iter().cloned());
        forms.extend(part.iter().cloned());
    } else if last == b'e' {
        forms.push(format!("{base}d"));
    } else if last == b'y' && n > 1 && !is_vowel(b[n - 2]) {
        forms.push(format!("{}ied", &base[..n - 1]));
    } else {
        forms.extend(stems.iter().map(|s| format!("{s}ed")));
    }
    // Gerund.
    if base.ends_with("ie") {
        forms.push(format!("{}ying", &base[..n - 2]));
    } else if last == b'e' && !base.ends_with("ee") && n > 2 {
        forms.push(format!("{}ing", &base[..n - 1]));
    } else {
        forms.extend(stems.iter().map(|s| format!("{s}ing")));
    }
    let mut seen = HashSet::new();
    forms.retain(|f| seen.insert(f.clone()));
    forms
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
    })
}

/// The regular English plural of a noun ("injury" → "injuries", "ash" → "ashes").
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

/// Cue counts per family, for listings.
pub fn families(cues: &[CueSpec]) -> BTreeMap<&str, usize> {
    let mut m = BTreeMap::new();
    for c in cues {
        *m.entry(c.family.as_str()).or_insert(0) += 1;
    }
    m
}

#[cfg(test)]
mod tests {
    use super::*;

    fn irr() -> Irregular {
        parse_irregular(Path::new("t"), "lead\tled\tled\ngive\tgave\tgiven\n").unwrap()
    }

    #[test]
    fn inflects_regular_and_irregular_verbs() {
        let i = irr();
        assert_eq!(
            inflect_verb("cause", &i),
            ["cause", "causes", "caused", "causing"]
        );
        assert_eq!(
            inflect_verb("lead", &i),
            ["lead", "leads", "led", "leading"]
        );
        assert!(inflect_verb("stop", &i).contains(&"stopped".to_string()));
        assert!(inflect_verb("worry", &i).contains(&"worries".to_string()));
        assert!(inflect_verb("worry", &i).contains(&"worried".to_string()));
        assert!(inflect_verb("reduce", &i).contains(&"reducing".to_string()));
        assert!(inflect_verb("give", &i).contains(&"given".to_string()));
        assert!(inflect_verb("increase", &i).contains(&"increases".to_string()));
    }

    #[test]
    fn malformed_cue_file_names_file_and_line() {
        let text = "[[cue]]\nid = \"ok\"\npattern = \"CAUSE cause~ EFFECT\"\nkind = \"causal\"\npolarity = \"unsigned\"\nexamples = [{text=\"a causes b\", cause=\"a\", effect=\"b\"}]\n\n[[cue]]\nid = \"bad\"\npattern = \"CAUSE raise~ EFFECT\"\nkind = \"causal\"\npolarity = \"upward\"\nexamples = [{text=\"a raises b\", cause=\"a\", effect=\"b\"}]\n";
        let err = parse_cue_file(Path::new("x.toml"), text, &irr())
            .unwrap_err()
            .to_string();
        assert!(
            err.starts_with("x.toml:8: cue 'bad': unknown polarity 'upward'"),
            "{err}"
        );
    }

    #[test]
    fn a_fixed_term_without_a_hyphenated_word_names_its_line() {
        let lexicon = include_str!("../../patterns/lexicon.toml");
        let bad = lexicon.replacen("fixed = [", "fixed = [\"protein kinase\", ", 1);
        let err = parse_lexicon(Path::new("lexicon.toml"), &bad)
            .unwrap_err()
            .to_string();
        let line = bad
            .lines()
            .position(|l| l.contains("\"protein kinase\""))
            .unwrap()
            + 1;
        assert!(
            err.starts_with(&format!(
                "lexicon.toml:{line}: fixed term \"protein kinase\""
            )),
            "{err}"
        );
        assert!(parse_lexicon(Path::new("lexicon.toml"), lexicon).is_ok());
    }

    #[test]
    fn toml_syntax_error_has_line() {
        let err = parse_cue_file(
            Path::new("y.toml"),
            "[[cue]]\nid = \"a\"\npattern = \n",
            &irr(),
        )
        .unwrap_err()
        .to_string();
        assert!(err.starts_with("y.toml:3:"), "{err}");
    }

    /// A reject rule that is not a regex is an error naming the file, the cue's line and the
    /// key, found when the file loads (before anything is compiled).
    #[test]
    fn bad_reject_regex_names_file_line_and_key() {
        let file =
            "[[cue]]\nid = \"a\"\nfamily = \"causal-verb\"\npattern = \"CAUSE cause~ EFFECT\"\n\
kind = \"causal\"\npolarity = \"unsigned\"\nreject_before = '(?:the'\n\
examples = [{ text = \"Rain causes floods.\", cause = \"rain\", effect = \"floods\" }]\n";
        let err = parse_cue_file(Path::new("z.toml"), file, &irr())
            .unwrap_err()
            .to_string();
        assert!(err.starts_with("z.toml:1:"), "{err}");
        assert!(err.contains("reject_before: invalid regex"), "{err}");
        let fixed = file.replace("'(?:the'", "'(?:the)$'");
        assert!(parse_cue_file(Path::new("z.toml"), &fixed, &irr()).is_ok());
    }

    #[test]
    fn pattern_shape_is_checked() {
        let i = irr();
        assert!(parse_pattern("CAUSE cause~ EFFECT", &i).is_ok());
        assert!(parse_pattern("CAUSE EFFECT", &i).is_err());
        assert!(parse_pattern("CAUSE cause~", &i).is_err());
        assert!(parse_pattern("cause~ -induced CAUSE EFFECT", &i).is_err());
        assert!(parse_pattern("CAUSE Cause EFFECT", &i).is_err());
        assert!(parse_pattern("CAUSE -induced EFFECT", &i).is_ok());
    }

    #[test]
    fn builtin_patterns_load() {
        let set = PatternSet::builtin().expect("built-in patterns are valid");
        assert!(set.cues.len() >= 120, "only {} cues", set.cues.len());
    }

    #[test]
    fn every_cue_file_is_builtin() {
        let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("patterns/cues");
        for e in std::fs::read_dir(dir).unwrap() {
            let name = format!("cues/{}", e.unwrap().file_name().to_string_lossy());
            assert!(
                BUILTIN_CUE_FILES.iter().any(|(n, _)| *n == name),
                "{name} is not listed in BUILTIN_CUE_FILES"
            );
        }
    }

    #[test]
    fn aliases_need_two_columns() {
        assert!(parse_aliases(Path::new("a.tsv"), "# c\nsea rise\tsea level rise\n").is_ok());
        let e = parse_aliases(Path::new("a.tsv"), "ok\tfine\nbroken line\n")
            .unwrap_err()
            .to_string();
        assert!(e.starts_with("a.tsv:2:"), "{e}");
    }
}
