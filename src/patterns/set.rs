//! Loading a pattern set, built in or from a folder, and its fingerprint.

use super::cues::{check_unique, parse_cue_file, CueSpec};
use super::inflection::parse_irregular;
use super::lexicon::{parse_aliases, parse_lexicon, Lexicon};
use crate::error::InputError;
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
    (
        "cues/wordnet-verbs.toml",
        include_str!("../../patterns/cues/wordnet-verbs.toml"),
    ),
];
const BUILTIN_LEXICON: &str = include_str!("../../patterns/lexicon.toml");
const BUILTIN_IRREGULAR: &str = include_str!("../../patterns/irregular-verbs.tsv");
const BUILTIN_ALIASES: &str = include_str!("../../patterns/aliases.tsv");
/// The shipped confidence model's text (`patterns/confidence.toml`); parsed by the extractor.
pub const BUILTIN_CONFIDENCE: &str = include_str!("../../patterns/confidence.toml");

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
    /// that the fingerprint covers the model the extractor scores with.
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
