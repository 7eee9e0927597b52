//! The question set: every ordered pair of variables crossed with every wording.
//!
//! Wordings are data (`patterns/questions.toml`, built in with `include_str!`, or a user's file),
//! grouped in families so that answers can be compared across phrasings of the same question.
//! A question's id is a short BLAKE3 hash of its family, wording id and the two variable keys, so
//! the id survives re-ordering the variable list, re-running the command and changes in the
//! spelling of a name that normalise to the same key.

use crate::claim::Polarity;
use crate::error::InputError;
use crate::patterns::line_of;
use crate::variables::Normalizer;
use serde::{Deserialize, Serialize};
use std::fmt;
use std::path::Path;

/// The built-in wordings.
pub const BUILTIN_QUESTIONS: &str = include_str!("../../patterns/questions.toml");
const BUILTIN_PATH: &str = "patterns/questions.toml";

/// A family of wordings: what the question asks, independent of its phrasing.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Family {
    /// "Does x cause y?"
    Directed,
    /// The same direction phrased from the effect: "Is y an effect of x?"
    Reversed,
    /// A causal link in either direction.
    Symmetric,
    /// A signed effect of x on y: "Does x increase y?"
    Sign,
}

impl Family {
    pub const ALL: [Family; 4] = [
        Family::Directed,
        Family::Reversed,
        Family::Symmetric,
        Family::Sign,
    ];
    pub fn as_str(self) -> &'static str {
        match self {
            Family::Directed => "directed",
            Family::Reversed => "reversed",
            Family::Symmetric => "symmetric",
            Family::Sign => "sign",
        }
    }
    /// True when the question is about the direction x → y (all but symmetric).
    pub fn is_directed(self) -> bool {
        self != Family::Symmetric
    }
}

impl fmt::Display for Family {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

impl std::str::FromStr for Family {
    type Err = String;
    fn from_str(s: &str) -> Result<Self, String> {
        Family::ALL
            .into_iter()
            .find(|f| f.as_str() == s.trim().to_ascii_lowercase())
            .ok_or_else(|| {
                format!("unknown family '{s}' (expected directed, reversed, symmetric or sign)")
            })
    }
}

/// One wording of a question.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Wording {
    pub id: String,
    pub family: Family,
    /// For the sign family: the polarity the question asks about.
    pub sign: Option<Polarity>,
    pub text: String,
    /// Line of the entry in its file.
    pub line: usize,
}

impl Wording {
    /// The question for x and y: each `[singular|plural]` choice takes the form that agrees
    /// with the first placeholder after it (a question puts its verb before the subject: "[Is|Are]
    /// {y} an effect of {x}?"), then the placeholders are filled in.
    pub fn render(&self, x: &str, y: &str) -> String {
        let mut out = String::with_capacity(self.text.len() + x.len() + y.len());
        let mut rest = self.text.as_str();
        // Choices are checked by `parse_wordings`; an unclosed '[' is kept as written.
        while let Some(open) = rest.find('[') {
            let Some(close) = rest[open..].find(']').map(|c| open + c) else {
                break;
            };
            out.push_str(&rest[..open]);
            let (one, many) = rest[open + 1..close].split_once('|').unwrap_or(("", ""));
            let tail = &rest[close + 1..];
            let subject = match (tail.find("{x}"), tail.find("{y}")) {
                (Some(a), Some(b)) => Some(if a < b { x } else { y }),
                (Some(_), None) => Some(x),
                (None, Some(_)) => Some(y),
                (None, None) => None,
            };
            out.push_str(if subject.is_some_and(looks_plural) {
                many
            } else {
                one
            });
            rest = tail;
        }
        out.push_str(rest);
        out.replace("{x}", x).replace("{y}", y)
    }
}

/// Whether a variable name reads as a plural, by its last word: ending in "s" but not "ss",
/// "us" or "is" ("algae blooms", "fish stocks"; not "grass", "stimulus", "erosis"). A heuristic:
/// a name such as "species" or "fish" is taken as written.
fn looks_plural(name: &str) -> bool {
    let last = name.split_whitespace().last().unwrap_or("").to_lowercase();
    last.len() > 2 && last.ends_with('s') && !["ss", "us", "is"].iter().any(|e| last.ends_with(e))
}

/// Whether every `[...]` in a wording is a `[singular|plural]` choice with a placeholder after it.
fn choices_are_valid(text: &str) -> bool {
    let mut rest = text;
    while let Some(open) = rest.find(['[', ']']) {
        if rest[open..].starts_with(']') {
            return false;
        }
        let Some(close) = rest[open + 1..].find(['[', ']']).map(|c| open + 1 + c) else {
            return false;
        };
        let inner = &rest[open + 1..close];
        let tail = &rest[close + 1..];
        if rest[close..].starts_with('[')
            || inner.matches('|').count() != 1
            || !(tail.contains("{x}") || tail.contains("{y}"))
        {
            return false;
        }
        rest = tail;
    }
    true
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawFile {
    #[serde(default)]
    wording: Vec<toml::Spanned<RawWording>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawWording {
    id: String,
    family: String,
    sign: Option<String>,
    text: String,
}

fn invalid(path: &Path, line: usize, message: impl Into<String>) -> InputError {
    InputError::Invalid {
        path: path.to_path_buf(),
        line,
        message: message.into(),
    }
}

/// Parse and validate a wording file. Every error is `file:line: reason`.
pub fn parse_wordings(path: &Path, text: &str) -> Result<Vec<Wording>, InputError> {
    let raw: RawFile = toml::from_str(text).map_err(|e| {
        let line = e.span().map(|s| line_of(text, s.start)).unwrap_or(0);
        invalid(path, line, e.message().to_string())
    })?;
    let mut out: Vec<Wording> = Vec::new();
    for spanned in raw.wording {
        let line = line_of(text, spanned.span().start);
        let raw = spanned.into_inner();
        let err = |m: String| invalid(path, line, format!("wording '{}': {m}", raw.id));
        if raw.id.is_empty()
            || !raw
                .id
                .chars()
                .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
        {
            return Err(err("id must be lowercase letters, digits or '-'".into()));
        }
        if let Some(first) = out.iter().find(|w| w.id == raw.id) {
            return Err(err(format!("id already used on line {}", first.line)));
        }
        let family: Family = raw.family.parse().map_err(err)?;
        let sign = match (&raw.sign, family) {
            (None, Family::Sign) => {
                return Err(err(
                    "the sign family needs sign = \"increase\" or \"decrease\"".into(),
                ))
            }
            (None, _) => None,
            (Some(_), f) if f != Family::Sign => {
                return Err(err("only the sign family takes a sign".into()))
            }
            (Some(s), _) => match s.as_str() {
                "increase" => Some(Polarity::Increase),
                "decrease" => Some(Polarity::Decrease),
                _ => return Err(err(format!("sign '{s}' must be increase or decrease"))),
            },
        };
        for slot in ["{x}", "{y}"] {
            if raw.text.matches(slot).count() != 1 {
                return Err(err(format!("text must contain {slot} exactly once")));
            }
        }
        let rest = raw.text.replace("{x}", "").replace("{y}", "");
        if rest.contains('{') || rest.contains('}') {
            return Err(err("text may use only the placeholders {x} and {y}".into()));
        }
        if !choices_are_valid(&raw.text) {
            return Err(err(
                "a choice is written [singular|plural] and needs {x} or {y} after it".into(),
            ));
        }
        out.push(Wording {
            id: raw.id,
            family,
            sign,
            text: raw.text,
            line,
        });
    }
    if out.is_empty() {
        return Err(invalid(path, 0, "no [[wording]] entries"));
    }
    Ok(out)
}

/// The built-in wordings, or those of `file`.
pub fn load_wordings(file: Option<&Path>) -> Result<Vec<Wording>, InputError> {
    match file {
        None => parse_wordings(Path::new(BUILTIN_PATH), BUILTIN_QUESTIONS),
        Some(p) => {
            let text = std::fs::read_to_string(p).map_err(|source| InputError::Io {
                path: p.to_path_buf(),
                source,
            })?;
            parse_wordings(p, &text)
        }
    }
}

/// A variable as the user named it, with its normalised key.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Named {
    pub name: String,
    pub key: String,
}

fn data_lines(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'))
}

fn named(n: &Normalizer, path: &Path, line: usize, name: &str) -> Result<Named, InputError> {
    let key = n.key(name);
    if key.is_empty() {
        return Err(InputError::invalid(
            path,
            line,
            format!("'{name}' has no content words, so it names no variable"),
        ));
    }
    Ok(Named {
        name: name.to_string(),
        key,
    })
}

/// Every ordered pair of a variable list: one name per line, `#` comments and blank lines
/// skipped. Two names with the same key are an error (they would ask the same question).
pub fn pairs_from_vars(
    n: &Normalizer,
    path: &Path,
    text: &str,
) -> Result<Vec<(Named, Named)>, InputError> {
    let mut vars: Vec<(usize, Named)> = Vec::new();
    for (line, l) in data_lines(text) {
        let v = named(n, path, line, l)?;
        if let Some((first, _)) = vars.iter().find(|(_, o)| o.key == v.key) {
            return Err(InputError::invalid(
                path,
                line,
                format!(
                    "'{l}' is the same variable as line {first} (key '{}')",
                    v.key
                ),
            ));
        }
        vars.push((line, v));
    }
    let mut out = Vec::with_capacity(vars.len() * vars.len().saturating_sub(1));
    for (_, a) in &vars {
        for (_, b) in &vars {
            if a.key != b.key {
                out.push((a.clone(), b.clone()));
            }
        }
    }
    Ok(out)
}

/// Ordered pairs from a pair list: `x<TAB>y` per line, `#` comments and blank lines skipped.
pub fn pairs_from_list(
    n: &Normalizer,
    path: &Path,
    text: &str,
) -> Result<Vec<(Named, Named)>, InputError> {
    let mut out = Vec::new();
    for (line, l) in data_lines(text) {
        let Some((x, y)) = l.split_once('\t') else {
            return Err(InputError::invalid(
                path,
                line,
                "expected two names separated by a tab",
            ));
        };
        let (x, y) = (
            named(n, path, line, x.trim())?,
            named(n, path, line, y.trim())?,
        );
        if x.key == y.key {
            return Err(InputError::invalid(
                path,
                line,
                format!("both names are the same variable (key '{}')", x.key),
            ));
        }
        out.push((x, y));
    }
    Ok(out)
}

/// Where the pairs of a question set come from: a variable list (every ordered pair) or a pair
/// list (only the pairs listed).
#[derive(Debug, Clone, Copy)]
pub enum PairList<'a> {
    Vars(&'a Path),
    Pairs(&'a Path),
}

/// Read the pairs of a variable or pair list.
pub fn read_pairs(n: &Normalizer, list: PairList<'_>) -> Result<Vec<(Named, Named)>, InputError> {
    let (PairList::Vars(path) | PairList::Pairs(path)) = list;
    let text = std::fs::read_to_string(path).map_err(|source| InputError::Io {
        path: path.to_path_buf(),
        source,
    })?;
    match list {
        PairList::Vars(_) => pairs_from_vars(n, path, &text),
        PairList::Pairs(_) => pairs_from_list(n, path, &text),
    }
}

/// One question.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Question {
    pub id: String,
    pub x: String,
    pub y: String,
    pub x_key: String,
    pub y_key: String,
    pub family: Family,
    pub template: String,
    pub text: String,
}

/// The stable id of a question: the first 12 hex digits of BLAKE3 over family, wording id and
/// both keys, NUL-separated.
pub fn question_id(family: Family, template: &str, x_key: &str, y_key: &str) -> String {
    let mut h = blake3::Hasher::new();
    for part in [family.as_str(), template, x_key, y_key] {
        h.update(part.as_bytes());
        h.update(b"\0");
    }
    h.finalize().to_hex()[..12].to_string()
}

/// Every pair crossed with every wording (sign wordings only when `with_sign`), pair-major.
pub fn questions(pairs: &[(Named, Named)], wordings: &[Wording], with_sign: bool) -> Vec<Question> {
    let used: Vec<&Wording> = wordings
        .iter()
        .filter(|w| with_sign || w.family != Family::Sign)
        .collect();
    let mut out = Vec::with_capacity(pairs.len() * used.len());
    for (x, y) in pairs {
        for w in &used {
            out.push(Question {
                id: question_id(w.family, &w.id, &x.key, &y.key),
                x: x.name.clone(),
                y: y.name.clone(),
                x_key: x.key.clone(),
                y_key: y.key.clone(),
                family: w.family,
                template: w.id.clone(),
                text: w.render(&x.name, &y.name),
            });
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn normalizer() -> Normalizer {
        Normalizer::new(&PatternSet::builtin().unwrap().lexicon)
    }

    #[test]
    fn builtin_wordings_cover_every_family() {
        let w = load_wordings(None).unwrap();
        for f in Family::ALL {
            assert!(w.iter().any(|w| w.family == f), "{f} missing");
        }
    }

    #[test]
    fn bad_wordings_name_their_line() {
        let cases = [
            ("[[wording]]\nid = \"a\"\nfamily = \"odd\"\ntext = \"{x} {y}\"\n", 1, "unknown family"),
            ("\n[[wording]]\nid = \"a\"\nfamily = \"directed\"\ntext = \"{x}\"\n", 2, "{y}"),
            (
                "[[wording]]\nid = \"a\"\nfamily = \"directed\"\ntext = \"{x} {y}\"\n\n[[wording]]\nid = \"a\"\nfamily = \"reversed\"\ntext = \"{y} {x}\"\n",
                6,
                "line 1",
            ),
            ("[[wording]]\nid = \"a\"\nfamily = \"sign\"\ntext = \"{x} {y}\"\n", 1, "needs sign"),
            ("[[wording]]\nid = \"a\"\nfamily = \"directed\"\ntext = \"{x} {y} {z}\"\n", 1, "only the placeholders"),
            ("[[wording]]\nid = \"a\"\nfamliy = \"directed\"\n", 3, "famliy"),
        ];
        for (text, line, needle) in cases {
            let e = parse_wordings(Path::new("q.toml"), text)
                .unwrap_err()
                .to_string();
            assert!(e.starts_with(&format!("q.toml:{line}:")), "{e}");
            assert!(e.contains(needle), "{e}");
        }
    }

    #[test]
    fn every_ordered_pair_times_every_wording_with_stable_ids() {
        let n = normalizer();
        let pairs = pairs_from_vars(
            &n,
            Path::new("v"),
            "# c\nboat traffic\n\nalgae blooms\nwater clarity\n",
        )
        .unwrap();
        assert_eq!(pairs.len(), 6);
        let w = load_wordings(None).unwrap();
        let q = questions(&pairs, &w, false);
        assert_eq!(q.len(), 6 * 3);
        let with_sign = questions(&pairs, &w, true);
        assert_eq!(with_sign.len(), 6 * 5);
        let ids: std::collections::BTreeSet<&str> =
            with_sign.iter().map(|q| q.id.as_str()).collect();
        assert_eq!(ids.len(), with_sign.len());
        // Re-spelling a name keeps the id.
        let again = pairs_from_vars(
            &n,
            Path::new("v"),
            "Boat traffic\nthe algae blooms\nwater clarity\n",
        )
        .unwrap();
        assert_eq!(questions(&again, &w, false)[0].id, q[0].id);
        assert_eq!(q[1].text, "Are algae blooms an effect of boat traffic?");
        assert_eq!(q[0].text, "Does boat traffic cause algae blooms?");
        // The verb agrees with the subject after it: algae blooms (plural) as x.
        let back = q
            .iter()
            .find(|q| q.x == "algae blooms" && q.template == "cause");
        assert_eq!(
            back.map(|q| q.text.as_str()),
            Some("Do algae blooms cause boat traffic?")
        );
    }

    #[test]
    fn plural_names_by_their_last_word() {
        for (name, plural) in [
            ("algae blooms", true),
            ("fish stocks", true),
            ("boat traffic", false),
            ("grass", false),
            ("stimulus", false),
            ("gas", true),
        ] {
            assert_eq!(looks_plural(name), plural, "{name}");
        }
    }

    #[test]
    fn a_choice_must_be_closed_split_and_followed_by_a_placeholder() {
        assert!(choices_are_valid("[Is|Are] {y} an effect of {x}?"));
        assert!(choices_are_valid("{x} and {y}"));
        for bad in [
            "[Is] {y} {x}",
            "[Is|Are {y} {x}",
            "{y} {x} [Is|Are]",
            "Is|Are] {x} {y}",
        ] {
            assert!(!choices_are_valid(bad), "{bad}");
        }
    }

    #[test]
    fn duplicate_variables_and_bad_pair_lines_are_errors() {
        let n = normalizer();
        let e =
            pairs_from_vars(&n, Path::new("v"), "boat traffic\nthe boat traffic\n").unwrap_err();
        assert!(e.to_string().starts_with("v:2:"), "{e}");
        let e = pairs_from_list(&n, Path::new("p"), "boat\tfish\nno tab here\n").unwrap_err();
        assert!(e.to_string().starts_with("p:2:"), "{e}");
        let ok = pairs_from_list(&n, Path::new("p"), "boat traffic\talgae blooms\n").unwrap();
        assert_eq!(ok.len(), 1);
    }
}
