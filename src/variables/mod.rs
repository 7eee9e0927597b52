//! Variable keys: how "the rising sea levels" and "rising sea level" become the same variable.
//!
//! A key is the lower-cased content words of a span, with determiners and stop words removed and
//! each word stemmed (Porter2, from `rust-stemmers`), joined by single spaces. Aliases map keys onto
//! keys, so an alias file written in surface forms works through the same normalisation. Keys are
//! computed at extraction time and stored in the claim; aliases are applied when the graph is built,
//! so changing an alias file needs no rescan.
//!
//! The public face: [`Normalizer`] (span text → key), [`Aliases`] (key → key, applied when the
//! graph is built; [`rollup`] makes them count abbreviations or heads as one variable), [`stem`] and [`StemCache`] (the one stemmer, shared with the sentence index)
//! and [`dropped_words`] (the words keys leave out, which the index leaves out too).

pub mod abbrev;
pub mod heads;
pub mod merge;
pub mod rollup;

use crate::patterns::Lexicon;
use compact_str::CompactString;
use rust_stemmers::{Algorithm, Stemmer};
use std::collections::{HashMap, HashSet};

/// The Porter2 stem of one lower-cased word, as keys and the search index stem it.
pub fn stem(word: &str) -> std::borrow::Cow<'_, str> {
    static STEMMER: std::sync::OnceLock<Stemmer> = std::sync::OnceLock::new();
    STEMMER
        .get_or_init(|| Stemmer::create(Algorithm::English))
        .stem(word)
}

/// A bounded memory of stems: a corpus repeats its words, and stemming them again was most of
/// the cost of making keys and of indexing sentences. When full it starts over.
#[derive(Debug, Default)]
pub struct StemCache {
    /// Words and stems inline (up to 24 bytes): a hit reads one table slot, no heap strings.
    stems: HashMap<CompactString, CompactString, rustc_hash::FxBuildHasher>,
    cap: usize,
}

impl StemCache {
    /// A cache of at most `cap` words.
    pub fn new(cap: usize) -> StemCache {
        StemCache {
            stems: HashMap::default(),
            cap,
        }
    }

    /// Append the stem of `word` (see [`stem`]) to `out`.
    pub fn push(&mut self, word: &str, out: &mut String) {
        if let Some(s) = self.stems.get(word) {
            out.push_str(s);
            return;
        }
        let s = CompactString::from(stem(word));
        out.push_str(&s);
        if self.stems.len() >= self.cap {
            self.stems.clear();
        }
        self.stems.insert(CompactString::from(word), s);
    }
}

/// Words whose stems each thread remembers for keys before it starts over (about 1 MB).
const KEY_STEM_CACHE_WORDS: usize = 10_000;

/// Append the stem of `word` to `out`, remembering it per thread.
fn push_stem(word: &str, out: &mut String) {
    thread_local! {
        static STEMS: std::cell::RefCell<StemCache> =
            std::cell::RefCell::new(StemCache::new(KEY_STEM_CACHE_WORDS));
    }
    STEMS.with(|c| c.borrow_mut().push(word, out));
}

/// The words no key contains: the lexicon's determiners and key stop words. The sentence index
/// leaves them out too (co-mention queries only ever ask for a key's words).
pub fn dropped_words(lexicon: &Lexicon) -> impl Iterator<Item = String> + '_ {
    lexicon
        .determiners
        .iter()
        .chain(lexicon.stopwords.iter())
        .cloned()
}

/// Turns surface text into variable keys.
pub struct Normalizer {
    dropped: HashSet<String, rustc_hash::FxBuildHasher>,
}

impl std::fmt::Debug for Normalizer {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Normalizer")
            .field("dropped", &self.dropped.len())
            .finish()
    }
}

impl Normalizer {
    pub fn new(lexicon: &Lexicon) -> Self {
        Normalizer {
            dropped: dropped_words(lexicon).collect(),
        }
    }

    /// The words of `text` that a key keeps, lower-cased but not stemmed.
    pub fn content_words<'a>(&'a self, text: &'a str) -> impl Iterator<Item = String> + 'a {
        text.split(|c: char| !(c.is_alphanumeric() || c == '\'' || c == '’'))
            .map(|w| w.trim_matches(|c| c == '\'' || c == '’'))
            .filter(|w| !w.is_empty())
            .map(str::to_lowercase)
            .map(|w| {
                w.strip_suffix("'s")
                    .or_else(|| w.strip_suffix("’s"))
                    .map(str::to_string)
                    .unwrap_or(w)
            })
            .filter(move |w| !self.dropped.contains(w))
    }

    /// The variable key of `text`; empty when it has no content word.
    pub fn key(&self, text: &str) -> String {
        // The words of `content_words`, each lower-cased into one reused buffer: every claim
        // makes four keys, and a string per word was a third of their cost.
        let mut out = String::with_capacity(text.len());
        let mut lower = String::new();
        for w in text.split(|c: char| !(c.is_alphanumeric() || c == '\'' || c == '’')) {
            let w = w.trim_matches(|c| c == '\'' || c == '’');
            if w.is_empty() {
                continue;
            }
            lower.clear();
            if w.is_ascii() {
                lower.push_str(w);
                lower.make_ascii_lowercase();
            } else {
                lower.push_str(&w.to_lowercase());
            }
            let w = lower
                .strip_suffix("'s")
                .or_else(|| lower.strip_suffix("’s"))
                .unwrap_or(&lower);
            if self.dropped.contains(w) {
                continue;
            }
            if !out.is_empty() {
                out.push(' ');
            }
            push_stem(w, &mut out);
        }
        out
    }

    /// The stemmed terms of a key or surface text, as the search index stores them.
    pub fn terms(&self, text: &str) -> Vec<String> {
        self.key(text)
            .split(' ')
            .filter(|t| !t.is_empty())
            .map(str::to_string)
            .collect()
    }
}

/// A key → key mapping built from alias pairs in surface form, and the level it counts
/// variables at (a roll-up, [`rollup::roll_up`], is aliases too).
#[derive(Debug, Clone, Default)]
pub struct Aliases {
    map: HashMap<String, String>,
    level: rollup::Level,
}

impl Aliases {
    /// Build from (surface form, variable name) pairs; earlier pairs win.
    pub fn new(normalizer: &Normalizer, pairs: &[(String, String)]) -> Self {
        let mut map = HashMap::new();
        for (from, to) in pairs {
            let (f, t) = (normalizer.key(from), normalizer.key(to));
            if !f.is_empty() && !t.is_empty() && f != t {
                map.entry(f).or_insert(t);
            }
        }
        Aliases {
            map,
            level: rollup::Level::Variable,
        }
    }

    /// The level these aliases count variables at: [`rollup::Level::Variable`] unless they are
    /// a roll-up.
    pub fn level(&self) -> rollup::Level {
        self.level
    }

    /// The variable a key stands for.
    pub fn resolve<'a>(&'a self, key: &'a str) -> &'a str {
        self.map.get(key).map(String::as_str).unwrap_or(key)
    }

    pub fn is_empty(&self) -> bool {
        self.map.is_empty()
    }

    /// The variable a name typed in a query stands for. At the head level, a qualified name
    /// that no stored variable has ("nitrogen runoff from the farms") counts as its head, as
    /// the stored qualified variables do; otherwise this is `resolve` of the name's key.
    pub fn query_key(&self, normalizer: &Normalizer, query: &str) -> String {
        let key = normalizer.key(query);
        if self.level == rollup::Level::Head && !self.map.contains_key(&key) {
            let head = heads::split(query).head;
            let head_key = normalizer.key(&head);
            if !head_key.is_empty() {
                return self.resolve(&head_key).to_string();
            }
        }
        self.resolve(&key).to_string()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn norm() -> Normalizer {
        Normalizer::new(&PatternSet::builtin().unwrap().lexicon)
    }

    /// A key is the stems of `content_words`, joined by spaces: the fused loop of `key` gives
    /// the same text for any mix of letters, apostrophes, case, non-ASCII and stop words.
    #[test]
    fn key_is_the_stems_of_the_content_words() {
        use proptest::prelude::*;
        let n = norm();
        let mut runner = proptest::test_runner::TestRunner::new(ProptestConfig::with_cases(3000));
        let words =
            "(The|the|OF|Rising|levels|cell's|Cell’s|'s|’|'|ÄRZTE|Straße|İ|x|-|,| |  |é|2019|ΣΑΣ)";
        let texts =
            proptest::string::string_regex(&format!("{words}{{0,8}}")).expect("valid regex");
        runner
            .run(&texts, |t| {
                let stems: Vec<String> =
                    n.content_words(&t).map(|w| stem(&w).into_owned()).collect();
                prop_assert_eq!(n.key(&t), stems.join(" "));
                Ok(())
            })
            .expect("key agrees with content_words");
    }

    #[test]
    fn inflected_phrases_meet() {
        let n = norm();
        assert_eq!(n.key("the rising sea levels"), n.key("rising sea level"));
        assert_eq!(n.key("Crayfish numbers"), n.key("crayfish number"));
        assert_eq!(n.key("sea-level"), n.key("sea level"));
        assert_eq!(n.key("the lake's algae"), n.key("lake algae"));
        assert_eq!(n.key("the"), "");
    }

    #[test]
    fn aliases_map_surface_forms() {
        let n = norm();
        let a = Aliases::new(&n, &[("algal blooms".into(), "algae bloom".into())]);
        assert_eq!(a.resolve(&n.key("the algal bloom")), n.key("algae blooms"));
        assert_eq!(a.resolve("other"), "other");
    }
}
