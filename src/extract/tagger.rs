//! A part-of-speech tagger: an averaged perceptron over Penn Treebank tags.
//!
//! It exists so that span decisions can look at word classes (noun phrases next to a cue, finite
//! verbs and complementisers that end a span, "increases" as verb or noun). It is small and
//! transparent on purpose: a linear model over a handful of features of the word and its
//! neighbours, decoded greedily left to right, trained reproducibly by `hearsay train-tagger`
//! from openly licensed treebanks (`patterns/tagger.NOTICE` names them). A tag dictionary of
//! frequent, unambiguous words answers those words without scoring.
//!
//! The model file is text: a header line, a `tags` line, `dict` lines (word, tag) and `f` lines
//! (feature, then `class:weight` pairs with weights in hundredths). Weights near zero are pruned
//! when the model is saved, which keeps the file small at almost no cost in accuracy.

use std::collections::HashMap;

/// The tagger's lookup tables: many short-string lookups per word, so a fast non-keyed hash
/// (the keys come from the shipped model, not from untrusted input, so flooding is not a concern).
type FastMap<K, V> = HashMap<K, V, rustc_hash::FxBuildHasher>;
use std::fmt;
use std::sync::OnceLock;

/// The header line of a model file.
const MAGIC: &str = "hearsay-tagger 1";

/// Penn Treebank tags as used in UD English (XPOS column), with the few extra ones EWT uses.
const TAGS: &[&str] = &[
    "NN", "IN", "DT", "NNP", "PRP", "JJ", "RB", ".", "VB", "NNS", ",", "CC", "VBD", "VBP", "VBZ",
    "CD", "VBN", "VBG", "MD", "TO", "PRP$", "-RRB-", "-LRB-", "WDT", ":", "WRB", "``", "''", "WP",
    "RP", "UH", "POS", "HYPH", "NNPS", "JJR", "JJS", "EX", "NFP", "RBR", "ADD", "GW", "$", "SYM",
    "PDT", "LS", "FW", "RBS", "AFX", "WP$", "XX",
];

/// One part-of-speech tag (Penn Treebank).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Tag(u8);

impl Tag {
    /// The tag as written in treebanks ("NN", "VBZ").
    pub fn as_str(self) -> &'static str {
        TAGS[self.0 as usize]
    }
    /// Parse a Penn tag; `None` for one this tagger does not know.
    pub fn parse(s: &str) -> Option<Tag> {
        TAGS.iter().position(|t| *t == s).map(|i| Tag(i as u8))
    }
    /// Common or proper noun, singular or plural.
    pub fn is_noun(self) -> bool {
        self.as_str().starts_with("NN")
    }
    /// Any verb form (modals included).
    pub fn is_verb(self) -> bool {
        self.as_str().starts_with("VB") || self.as_str() == "MD"
    }
    /// A verb form that carries tense (VBD, VBP, VBZ) or a modal: the head of a finite clause.
    pub fn is_finite_verb(self) -> bool {
        matches!(self.as_str(), "VBD" | "VBP" | "VBZ" | "MD")
    }
    /// Adjective (plain, comparative, superlative).
    pub fn is_adjective(self) -> bool {
        self.as_str().starts_with("JJ")
    }
    /// Past participle (VBN).
    pub fn is_participle(self) -> bool {
        self.as_str() == "VBN"
    }
    /// Proper noun, singular or plural.
    pub fn is_proper_noun(self) -> bool {
        self.as_str().starts_with("NNP")
    }
    /// A word that can stand inside a noun phrase before its head: determiner, adjective,
    /// number, possessive, noun.
    pub fn is_nominal(self) -> bool {
        self.is_noun()
            || self.is_adjective()
            || matches!(self.as_str(), "DT" | "CD" | "PRP$" | "POS" | "HYPH" | "PDT")
    }
}

impl fmt::Display for Tag {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Errors from reading a model file.
#[derive(Debug, thiserror::Error)]
#[error("tagger model line {line}: {message}")]
pub struct ModelError {
    pub line: usize,
    pub message: String,
}

/// A trained tagger.
#[derive(Debug, Clone, Default)]
pub struct Tagger {
    /// Feature weights by name, as training produces them (empty for a loaded model).
    weights: FastMap<String, Vec<(u8, f32)>>,
    dict: FastMap<String, Tag>,
    /// The weights laid out for fast tagging, built on first use.
    prepared: OnceLock<Prepared>,
}

/// Number of tags.
const NT: usize = TAGS.len();

/// The roles a word plays in the features of the words around it, in the order of a word's
/// score vectors: its own features, then as the word 1 and 2 before and 1 and 2 after.
const ROLES: usize = 5;

/// The model rearranged for tagging. A perceptron's score is a sum over features, and most
/// features depend on one word only (its suffixes, its shape, or that it is the previous or
/// next word): their sums are computed once per word and cached, and the features of the
/// previous tags are dense tables. Per word position that leaves the cache lookup and, for the
/// few words that have them, one `t1w` lookup.
#[derive(Debug, Clone, Default)]
struct Prepared {
    weights: HashedWeights,
    /// `t1` features, row `p1` (index `NT` is the sentence start).
    t1: Vec<f32>,
    /// `t2` features, row `p2 * (NT + 1) + p1`.
    t2: Vec<f32>,
    /// `b` plus `first false`, and the difference `first true` minus `first false`.
    bias: Vec<f32>,
    first: Vec<f32>,
    /// Role vectors of the padding outside the sentence: as word 1 and 2 before the first word,
    /// and 1 and 2 after the last.
    before1: Vec<f32>,
    before2: Vec<f32>,
    after1: Vec<f32>,
    after2: Vec<f32>,
}

impl Prepared {
    fn new(weights: &FastMap<String, Vec<(u8, f32)>>) -> Prepared {
        Prepared::from_hashed(HashedWeights::new(weights))
    }

    fn from_hashed(weights: HashedWeights) -> Prepared {
        let vec_of = |fs: &[&str]| {
            let mut v = vec![0f32; NT];
            for f in fs {
                add(&mut v, weights.get(f));
            }
            v
        };
        let tag_name = |i: usize, start: &'static str| if i < NT { TAGS[i] } else { start };
        let mut t1 = Vec::with_capacity((NT + 1) * NT);
        for p1 in 0..=NT {
            t1.extend(vec_of(&[&format!("t1 {}", tag_name(p1, START[0]))]));
        }
        let mut t2 = Vec::with_capacity((NT + 1) * (NT + 1) * NT);
        for p2 in 0..=NT {
            for p1 in 0..=NT {
                let f = format!("t2 {} {}", tag_name(p2, START[1]), tag_name(p1, START[0]));
                t2.extend(vec_of(&[&f]));
            }
        }
        let bias = vec_of(&["b", "first false"]);
        let first_true = vec_of(&["first true"]);
        let first_false = vec_of(&["first false"]);
        let first = first_true
            .iter()
            .zip(&first_false)
            .map(|(a, b)| a - b)
            .collect();
        let before1 = vec_of(&[
            &format!("w-1 {}", START[0]),
            &format!("s3-1 {}", suffix(START[0], 3)),
        ]);
        let before2 = vec_of(&[&format!("w-2 {}", START[1])]);
        let after1 = vec_of(&["w+1 -END-", &format!("s3+1 {}", suffix("-END-", 3))]);
        let after2 = vec_of(&["w+2 -END2-"]);
        Prepared {
            weights,
            t1,
            t2,
            bias,
            first,
            before1,
            before2,
            after1,
            after2,
        }
    }

    /// The role vectors of one word (see `ROLES`), written into `out`; returns the normalised
    /// word and its hash. Each role's weights are added in the order of the word's features in
    /// [`visit_features`], so the sums are the ones scoring by feature names gives.
    fn word_vectors(&self, raw: &str, out: &mut [f32]) -> (String, u64) {
        out.iter_mut().for_each(|x| *x = 0.0);
        let lw = norm(raw);
        let w = lw.as_str();
        let wh = feature_hash(w);
        let mut sh = String::new();
        shape_into(raw, &mut sh);
        let hw = &self.weights;
        let word = hw.words.get(&wh).copied().unwrap_or_default();
        let s3 = hw
            .suffix3
            .get(&feature_hash(suffix(w, 3)))
            .copied()
            .unwrap_or_default();
        let (own, rest) = out.split_at_mut(NT);
        let (b1, rest) = rest.split_at_mut(NT);
        let (b2, rest) = rest.split_at_mut(NT);
        let (a1, a2) = rest.split_at_mut(NT);
        add(own, hw.range(word[0]));
        add(own, hw.single(0, suffix(w, 1)));
        add(own, hw.single(1, suffix(w, 2)));
        add(own, hw.range(s3[0]));
        add(own, hw.single(2, suffix(w, 4)));
        add(own, hw.single(3, first_char(raw)));
        add(own, hw.single(4, &sh));
        // This word as the previous word of the one after it, and so on.
        add(b1, hw.range(word[1]));
        add(b1, hw.range(s3[1]));
        add(b2, hw.range(word[2]));
        add(a1, hw.range(word[3]));
        add(a1, hw.range(s3[2]));
        add(a2, hw.range(word[4]));
        (lw, wh)
    }
}

fn add(v: &mut [f32], ws: &[(u8, f32)]) {
    for &(c, w) in ws {
        v[c as usize] += w;
    }
}

/// Per thread, the role vectors of recently seen words, for one tagger at a time. Bounded: when
/// full it starts over, which keeps memory flat (6144 words × 5 roles × 50 tags × 4 bytes = 6 MB;
/// 8192 words missed 11.5% of eLife words against 13.3%, but put `extract -j2` over 100 MB).
#[derive(Default)]
struct WordCache {
    owner: usize,
    /// A cache for one long sentence only: it never starts over (its slots must stay valid
    /// until the sentence is scored).
    unbounded: bool,
    /// Hash of a raw word → its slot. The word itself is in `raw`, so a lookup compares against
    /// one contiguous buffer instead of a heap string per word.
    index: FastMap<u64, u32>,
    /// The raw words of the slots, back to back, and per slot its range in them.
    raw: String,
    /// Per slot, what is known of its word.
    words: Vec<Slot>,
    /// Per slot, `ROLES * NT` scores.
    vectors: Vec<f32>,
}

const WORD_CACHE_WORDS: usize = 6144;

/// One word of the cache.
struct Slot {
    /// The raw word's range in `WordCache::raw`.
    raw: (u32, u32),
    /// Its tag, when the tag dictionary answers it.
    known: Option<Tag>,
    /// Its hash, when the word has `t1w` features.
    t1w: Option<u64>,
}

impl WordCache {
    /// This word's slot, computing its role vectors if needed.
    fn slot(&mut self, t: &Tagger, p: &Prepared, raw: &str) -> usize {
        let h = feature_hash(raw);
        let mut collided = false;
        if let Some(&i) = self.index.get(&h) {
            let (a, b) = self.words[i as usize].raw;
            if &self.raw[a as usize..b as usize] == raw {
                return i as usize;
            }
            // Another word with the same hash holds the entry: this one gets a slot that is
            // not filed, which is right, only slower.
            collided = true;
        }
        if self.words.len() >= WORD_CACHE_WORDS && !self.unbounded {
            self.clear();
            collided = false;
        }
        let i = self.words.len();
        self.vectors.resize((i + 1) * ROLES * NT, 0.0);
        let (lw, wh) = p.word_vectors(raw, &mut self.vectors[i * ROLES * NT..]);
        let known = t.dict.get(&lw).copied();
        let hash = Some(wh).filter(|h| p.weights.t1w_words.contains(h));
        let at = self.raw.len() as u32;
        self.raw.push_str(raw);
        self.words.push(Slot {
            raw: (at, self.raw.len() as u32),
            known,
            t1w: hash,
        });
        if !collided {
            self.index.insert(h, i as u32);
        }
        i
    }

    fn clear(&mut self) {
        self.index.clear();
        self.raw.clear();
        self.words.clear();
        self.vectors.clear();
    }
}

/// The weights laid out for tagging: one flat array of `(class, weight)` pairs, and per feature
/// the range of its pairs. One allocation instead of one per feature keeps lookups close
/// together in memory. Features that a word brings to the words around it are filed by the
/// word (one lookup finds all five), and each kind of suffix, prefix and shape feature has a
/// small table of its own: a word not seen before costs seven lookups instead of thirteen, and
/// most of them in tables that stay in cache.
#[derive(Debug, Clone, Default)]
struct HashedWeights {
    /// Features not filed below, by the hash of the whole name.
    ranges: FastMap<u64, (u32, u32)>,
    pairs: Vec<(u8, f32)>,
    /// By word hash: the ranges of the features in `WORD_ROLES` (`(0, 0)` when absent).
    words: FastMap<u64, [(u32, u32); 5]>,
    /// By the hash of a three-character suffix: the ranges of the features in `SUFFIX3_ROLES`.
    suffix3: FastMap<u64, [(u32, u32); 3]>,
    /// One table per kind in `SINGLE_KINDS`, by the hash of the value.
    singles: [FastMap<u64, (u32, u32)>; 5],
    /// The `t1w` features (previous tag and this word), keyed by the previous tag's index (`NT`
    /// for the sentence start) and the word's hash, kept apart so that tagging hashes each word
    /// once, and skips the lookup for a word that has no such feature.
    t1w: FastMap<(u8, u64), (u32, u32)>,
    t1w_words: std::collections::HashSet<u64, rustc_hash::FxBuildHasher>,
}

/// Feature kinds whose value is a word, in the order of `HashedWeights::words`.
const WORD_ROLES: [&str; 5] = ["w", "w-1", "w-2", "w+1", "w+2"];
/// Feature kinds whose value is a three-character suffix.
const SUFFIX3_ROLES: [&str; 3] = ["s3", "s3-1", "s3+1"];
/// Other kinds filed by value: suffixes of one, two and four characters, first character, shape.
const SINGLE_KINDS: [&str; 5] = ["s1", "s2", "s4", "p1", "sh"];

/// Where a feature is filed.
enum Filed {
    T1w(u8, u64),
    Word(usize, u64),
    Suffix3(usize, u64),
    Single(usize, u64),
    Other(u64),
}

fn filed(name: &str) -> Filed {
    if let Some((prev, word)) = t1w_key(name) {
        return Filed::T1w(prev, word);
    }
    if let Some((kind, value)) = name.split_once(' ') {
        let h = || feature_hash(value);
        if let Some(r) = WORD_ROLES.iter().position(|k| *k == kind) {
            return Filed::Word(r, h());
        }
        if let Some(r) = SUFFIX3_ROLES.iter().position(|k| *k == kind) {
            return Filed::Suffix3(r, h());
        }
        if let Some(r) = SINGLE_KINDS.iter().position(|k| *k == kind) {
            return Filed::Single(r, h());
        }
    }
    Filed::Other(feature_hash(name))
}

impl HashedWeights {
    fn new(weights: &FastMap<String, Vec<(u8, f32)>>) -> HashedWeights {
        let mut out = HashedWeights::default();
        out.ranges.reserve(weights.len());
        for (f, ws) in weights {
            let start = out.pairs.len() as u32;
            out.pairs.extend_from_slice(ws);
            out.insert(f, start);
        }
        out
    }

    /// File the feature `name`, whose pairs are `pairs[start..]`.
    fn insert(&mut self, name: &str, start: u32) {
        let range = (start, self.pairs.len() as u32);
        match filed(name) {
            Filed::T1w(prev, word) => {
                self.t1w.insert((prev, word), range);
                self.t1w_words.insert(word);
            }
            Filed::Word(r, h) => self.words.entry(h).or_default()[r] = range,
            Filed::Suffix3(r, h) => self.suffix3.entry(h).or_default()[r] = range,
            Filed::Single(k, h) => {
                self.singles[k].insert(h, range);
            }
            Filed::Other(h) => {
                self.ranges.insert(h, range);
            }
        }
    }

    fn range(&self, (a, b): (u32, u32)) -> &[(u8, f32)] {
        &self.pairs[a as usize..b as usize]
    }

    /// The weights of a feature of kind `SINGLE_KINDS[kind]` with this value.
    fn single(&self, kind: usize, value: &str) -> &[(u8, f32)] {
        self.singles[kind]
            .get(&feature_hash(value))
            .map_or(&[], |&r| self.range(r))
    }

    /// The weights of any feature, by name.
    fn get(&self, feature: &str) -> &[(u8, f32)] {
        let r = match filed(feature) {
            Filed::T1w(prev, word) => return self.t1w(prev as usize, word),
            Filed::Word(r, h) => self.words.get(&h).map(|w| w[r]),
            Filed::Suffix3(r, h) => self.suffix3.get(&h).map(|s| s[r]),
            Filed::Single(k, h) => self.singles[k].get(&h).copied(),
            Filed::Other(h) => self.ranges.get(&h).copied(),
        };
        r.map_or(&[], |r| self.range(r))
    }

    /// The `t1w` weights for a previous tag (`NT` at the start) and a word hash.
    fn t1w(&self, prev: usize, word: u64) -> &[(u8, f32)] {
        match self.t1w.get(&(prev as u8, word)) {
            Some(&r) => self.range(r),
            None => &[],
        }
    }
}

/// A `t1w` feature name ("t1w TAG word") as (previous tag index, word hash).
fn t1w_key(name: &str) -> Option<(u8, u64)> {
    let (tag, word) = name.strip_prefix("t1w ")?.split_once(' ')?;
    let prev = if tag == START[0] {
        NT
    } else {
        TAGS.iter().position(|t| *t == tag)?
    };
    Some((prev as u8, feature_hash(word)))
}

fn feature_hash(f: &str) -> u64 {
    use std::hash::Hasher as _;
    let mut h = rustc_hash::FxHasher::default();
    h.write(f.as_bytes());
    h.finish()
}

const START: [&str; 2] = ["-START-", "-START2-"];

/// The word's shape ("Xxxx", "dd-x"): character classes with repeats collapsed, at most 7.
fn shape_into(w: &str, s: &mut String) {
    for c in w.chars() {
        let k = if c.is_uppercase() {
            'X'
        } else if c.is_lowercase() {
            'x'
        } else if c.is_numeric() {
            'd'
        } else {
            c
        };
        if !s.ends_with(k) {
            s.push(k);
        }
        if s.len() > 6 {
            break;
        }
    }
}

/// The word's first character as a string slice ("" for an empty word).
fn first_char(w: &str) -> &str {
    w.chars().next().map_or("", |c| &w[..c.len_utf8()])
}

fn suffix(w: &str, n: usize) -> &str {
    let start = w
        .char_indices()
        .rev()
        .nth(n.saturating_sub(1))
        .map_or(0, |(i, _)| i);
    &w[start..]
}

fn norm(w: &str) -> String {
    if w.chars()
        .all(|c| c.is_ascii_digit() || c == ',' || c == '.')
        && w.chars().any(|c| c.is_ascii_digit())
    {
        "!DIGITS".to_string()
    } else {
        w.to_lowercase()
    }
}

/// Call `f` with each feature of word `i`, given the two previous tags. Features are written into
/// one reused buffer, so tagging allocates nothing per feature.
fn visit_features(
    words: &[&str],
    lowered: &[String],
    i: usize,
    (p1, p2): (&str, &str),
    buf: &mut String,
    mut f: impl FnMut(&str),
) {
    let w = lowered[i].as_str();
    let raw = words[i];
    let prev = if i > 0 {
        lowered[i - 1].as_str()
    } else {
        START[0]
    };
    let prev2 = if i > 1 {
        lowered[i - 2].as_str()
    } else {
        START[1]
    };
    let next = lowered.get(i + 1).map_or("-END-", String::as_str);
    let next2 = lowered.get(i + 2).map_or("-END2-", String::as_str);
    let first = first_char(raw);
    let mut sh = String::new();
    shape_into(raw, &mut sh);
    // Each feature is its parts concatenated; `push_str` into the reused buffer is much cheaper
    // than formatting machinery on this hot path.
    let mut emit = |parts: &[&str]| {
        buf.clear();
        for p in parts {
            buf.push_str(p);
        }
        f(buf);
    };
    emit(&["b"]);
    emit(&["w ", w]);
    emit(&["s1 ", suffix(w, 1)]);
    emit(&["s2 ", suffix(w, 2)]);
    emit(&["s3 ", suffix(w, 3)]);
    emit(&["s4 ", suffix(w, 4)]);
    emit(&["p1 ", first]);
    emit(&["sh ", &sh]);
    emit(&["t1 ", p1]);
    emit(&["t2 ", p2, " ", p1]);
    emit(&["t1w ", p1, " ", w]);
    emit(&["w-1 ", prev]);
    emit(&["w-2 ", prev2]);
    emit(&["s3-1 ", suffix(prev, 3)]);
    emit(&["w+1 ", next]);
    emit(&["s3+1 ", suffix(next, 3)]);
    emit(&["w+2 ", next2]);
    emit(&["first ", if i == 0 { "true" } else { "false" }]);
}

/// The features of word `i` as owned strings (training).
fn features(words: &[&str], lowered: &[String], i: usize, p1: &str, p2: &str) -> Vec<String> {
    let mut out = Vec::with_capacity(18);
    let mut buf = String::new();
    visit_features(words, lowered, i, (p1, p2), &mut buf, |f| {
        out.push(f.to_string())
    });
    out
}

impl Tagger {
    /// The model shipped in `patterns/tagger.model`, parsed once.
    pub fn load_builtin() -> &'static Tagger {
        static T: OnceLock<Tagger> = OnceLock::new();
        T.get_or_init(|| {
            Tagger::from_model(include_str!("../../patterns/tagger.model"))
                .expect("the built-in tagger model is valid (checked by a unit test)")
        })
    }

    /// Tag a tokenised sentence. For the built-in model the last sentence tagged on each thread
    /// is remembered, so the span finder and the confidence model, which both need the tags of a
    /// sentence with a claim, tag it once.
    pub fn tag(&self, words: &[&str]) -> Vec<Tag> {
        thread_local! {
            static LAST: std::cell::RefCell<(Vec<u8>, Vec<Tag>)> =
                const { std::cell::RefCell::new((Vec::new(), Vec::new())) };
        }
        if !std::ptr::eq(self, Tagger::load_builtin()) {
            return self.tag_uncached(words);
        }
        // The sentence's words, each after its length: one buffer to compare, unambiguously.
        let mut key = Vec::with_capacity(words.iter().map(|w| w.len() + 4).sum());
        for w in words {
            key.extend_from_slice(&(w.len() as u32).to_le_bytes());
            key.extend_from_slice(w.as_bytes());
        }
        let hit = LAST.with(|l| {
            let l = l.borrow();
            (l.0 == key).then(|| l.1.clone())
        });
        if let Some(tags) = hit {
            return tags;
        }
        let tags = self.tag_uncached(words);
        LAST.with(|l| {
            let mut l = l.borrow_mut();
            l.0 = key;
            l.1.clone_from(&tags);
        });
        tags
    }

    fn tag_uncached(&self, words: &[&str]) -> Vec<Tag> {
        thread_local! {
            static CACHE: std::cell::RefCell<WordCache> = std::cell::RefCell::new(WordCache::default());
        }
        let p = self.prepared();
        CACHE.with(|c| {
            let mut cache = c.borrow_mut();
            let me = self as *const Tagger as usize;
            if cache.owner != me {
                *cache = WordCache {
                    owner: me,
                    ..WordCache::default()
                };
            }
            self.tag_with(p, &mut cache, words)
        })
    }

    fn tag_with(&self, p: &Prepared, cache: &mut WordCache, words: &[&str]) -> Vec<Tag> {
        let n = words.len();
        // Slots are gathered before scoring, so the cache must not start over midway: it
        // starts over first if the sentence might not fit. A sentence too long for that gets
        // a cache of its own.
        let mut own = WordCache {
            unbounded: true,
            ..WordCache::default()
        };
        let cache = if n <= WORD_CACHE_WORDS / 2 {
            if cache.words.len() + n > WORD_CACHE_WORDS {
                cache.clear();
            }
            cache
        } else {
            &mut own
        };
        let slots: Vec<usize> = words.iter().map(|w| cache.slot(self, p, w)).collect();
        let vectors = &cache.vectors;
        let role = |i: usize, r: usize| {
            let at = slots[i] * ROLES * NT + r * NT;
            &vectors[at..at + NT]
        };
        let mut out: Vec<Tag> = Vec::with_capacity(n);
        let mut scores = [0f32; NT];
        for i in 0..n {
            let Slot {
                known,
                t1w: t1w_word,
                ..
            } = &cache.words[slots[i]];
            if let Some(t) = known {
                out.push(*t);
                continue;
            }
            let t1 = if i > 0 { out[i - 1].0 as usize } else { NT };
            let t2 = if i > 1 { out[i - 2].0 as usize } else { NT };
            scores.copy_from_slice(&p.bias);
            let parts: [&[f32]; 7] = [
                role(i, 0),
                if i > 0 { role(i - 1, 1) } else { &p.before1 },
                if i > 1 { role(i - 2, 2) } else { &p.before2 },
                if i + 1 < n { role(i + 1, 3) } else { &p.after1 },
                if i + 2 < n { role(i + 2, 4) } else { &p.after2 },
                &p.t1[t1 * NT..(t1 + 1) * NT],
                &p.t2[(t2 * (NT + 1) + t1) * NT..(t2 * (NT + 1) + t1 + 1) * NT],
            ];
            for part in parts {
                for (s, x) in scores.iter_mut().zip(part) {
                    *s += x;
                }
            }
            if i == 0 {
                for (s, x) in scores.iter_mut().zip(&p.first) {
                    *s += x;
                }
            }
            if let Some(h) = t1w_word {
                add(&mut scores, p.weights.t1w(t1, *h));
            }
            out.push(Tag(argmax(&scores)));
        }
        out
    }

    fn prepared(&self) -> &Prepared {
        self.prepared.get_or_init(|| Prepared::new(&self.weights))
    }

    /// Parse a model file. The result tags; it keeps no feature names, so only a tagger fresh
    /// from `train` can be written out again with `to_model`.
    pub fn from_model(text: &str) -> Result<Tagger, ModelError> {
        let err = |line: usize, m: &str| ModelError {
            line,
            message: m.to_string(),
        };
        let mut lines = text.lines().enumerate();
        match lines.next() {
            Some((_, l)) if l == MAGIC => {}
            _ => return Err(err(1, "not a hearsay tagger model")),
        }
        let mut t = Tagger::default();
        // Straight into the tagging layout: the feature names are not kept.
        let mut hashed = HashedWeights::default();
        let mut file_tags: Vec<Tag> = Vec::new();
        for (n, line) in lines {
            let mut parts = line.split('\t');
            match parts.next() {
                Some("tags") => {
                    file_tags = parts
                        .map(|s| Tag::parse(s).ok_or_else(|| err(n + 1, "unknown tag")))
                        .collect::<Result<_, _>>()?;
                }
                Some("dict") => {
                    let (Some(w), Some(tag)) = (parts.next(), parts.next()) else {
                        return Err(err(n + 1, "dict needs a word and a tag"));
                    };
                    let tag = Tag::parse(tag).ok_or_else(|| err(n + 1, "unknown tag"))?;
                    t.dict.insert(w.to_string(), tag);
                }
                Some("f") => {
                    let feat = parts.next().ok_or_else(|| err(n + 1, "missing feature"))?;
                    let start = hashed.pairs.len() as u32;
                    for p in parts {
                        let (c, w) = p.split_once(':').ok_or_else(|| err(n + 1, "bad weight"))?;
                        let c: usize = c.parse().map_err(|_| err(n + 1, "bad class"))?;
                        let w: i32 = w.parse().map_err(|_| err(n + 1, "bad weight"))?;
                        let tag = file_tags
                            .get(c)
                            .ok_or_else(|| err(n + 1, "class out of range"))?;
                        hashed.pairs.push((tag.0, w as f32 / 100.0));
                    }
                    hashed.insert(feat, start);
                }
                Some("") | None => {}
                Some(_) => return Err(err(n + 1, "unknown line kind")),
            }
        }
        t.prepared = OnceLock::from(Prepared::from_hashed(hashed));
        Ok(t)
    }

    /// Write the model, dropping weights under `min_weight` in absolute value.
    pub fn to_model(&self, min_weight: f32) -> String {
        let mut s = String::new();
        s.push_str(MAGIC);
        s.push('\n');
        s.push_str("tags");
        for t in TAGS {
            s.push('\t');
            s.push_str(t);
        }
        s.push('\n');
        let mut dict: Vec<_> = self.dict.iter().collect();
        dict.sort();
        for (w, t) in dict {
            s.push_str(&format!("dict\t{w}\t{t}\n"));
        }
        let mut feats: Vec<_> = self.weights.iter().collect();
        feats.sort_by(|a, b| a.0.cmp(b.0));
        for (f, ws) in feats {
            let kept: Vec<String> = ws
                .iter()
                .filter(|(_, w)| w.abs() >= min_weight)
                .map(|(c, w)| format!("{c}:{}", (w * 100.0).round() as i32))
                .filter(|p| !p.ends_with(":0"))
                .collect();
            if !kept.is_empty() && !f.contains('\t') && !f.contains('\n') {
                s.push_str(&format!("f\t{f}\t{}\n", kept.join("\t")));
            }
        }
        s
    }
}

fn argmax(scores: &[f32]) -> u8 {
    let mut best = 0;
    for (i, &s) in scores.iter().enumerate() {
        if s > scores[best] {
            best = i;
        }
    }
    best as u8
}

/// A tagged sentence from a treebank.
pub type TaggedSentence = Vec<(String, Tag)>;

/// Read the FORM and XPOS columns of a CoNLL-U file. Multiword-token lines and empty nodes are
/// skipped; tokens with a tag this tagger does not know are tagged `XX`.
pub fn read_conllu(text: &str) -> Vec<TaggedSentence> {
    let mut out = Vec::new();
    let mut cur = Vec::new();
    let unknown = Tag::parse("XX").unwrap_or(Tag(0));
    for line in text.lines() {
        if line.trim().is_empty() {
            if !cur.is_empty() {
                out.push(std::mem::take(&mut cur));
            }
            continue;
        }
        if line.starts_with('#') {
            continue;
        }
        let cols: Vec<&str> = line.split('\t').collect();
        if cols.len() < 5 || cols[0].contains('-') || cols[0].contains('.') {
            continue;
        }
        cur.push((cols[1].to_string(), Tag::parse(cols[4]).unwrap_or(unknown)));
    }
    if !cur.is_empty() {
        out.push(cur);
    }
    out
}

/// Share of tokens tagged as the treebank tags them.
pub fn accuracy(t: &Tagger, sentences: &[TaggedSentence]) -> f64 {
    let (mut ok, mut all) = (0usize, 0usize);
    for s in sentences {
        let words: Vec<&str> = s.iter().map(|(w, _)| w.as_str()).collect();
        for (p, (_, g)) in t.tag(&words).iter().zip(s) {
            ok += usize::from(p == g);
            all += 1;
        }
    }
    if all == 0 {
        0.0
    } else {
        ok as f64 / all as f64
    }
}

/// Training settings.
#[derive(Debug, Clone, Copy)]
pub struct TrainOptions {
    pub iterations: usize,
    /// Seed of the shuffle between iterations (training is deterministic given the data).
    pub seed: u64,
}

impl Default for TrainOptions {
    fn default() -> Self {
        TrainOptions {
            iterations: 5,
            seed: 1,
        }
    }
}

/// Train an averaged perceptron on tagged sentences. `progress` is called after each iteration
/// with its number and the share of training tokens tagged right during it.
pub fn train(
    data: &[TaggedSentence],
    opts: TrainOptions,
    mut progress: impl FnMut(usize, f64),
) -> Tagger {
    let nt = TAGS.len();
    // Tag dictionary: frequent words seen with one tag at least 97% of the time.
    let mut counts: HashMap<String, HashMap<Tag, usize>> = HashMap::new();
    for s in data {
        for (w, t) in s {
            *counts.entry(norm(w)).or_default().entry(*t).or_default() += 1;
        }
    }
    let mut dict = FastMap::default();
    for (w, c) in &counts {
        let total: usize = c.values().sum();
        if let Some((t, n)) = c.iter().max_by_key(|(t, n)| (**n, std::cmp::Reverse(**t))) {
            if total >= 20 && *n as f64 / total as f64 >= 0.97 {
                dict.insert(w.clone(), *t);
            }
        }
    }
    // Weights, their running totals and when each was last changed (for averaging).
    struct Cell {
        w: Vec<f32>,
        total: Vec<f64>,
        stamp: Vec<u64>,
    }
    let mut cells: HashMap<String, Cell> = HashMap::new();
    let mut clock: u64 = 0;
    let mut order: Vec<usize> = (0..data.len()).collect();
    let mut rng = opts.seed.max(1);
    let mut scores = vec![0f32; nt];
    for it in 0..opts.iterations {
        let (mut ok, mut all) = (0usize, 0usize);
        for &si in &order {
            let s = &data[si];
            let words: Vec<&str> = s.iter().map(|(w, _)| w.as_str()).collect();
            let lowered: Vec<String> = words.iter().map(|w| norm(w)).collect();
            let mut prev: Vec<Tag> = Vec::with_capacity(s.len());
            for i in 0..s.len() {
                let gold = s[i].1;
                if let Some(&t) = dict.get(&lowered[i]) {
                    prev.push(t);
                    continue;
                }
                clock += 1;
                let p1 = if i > 0 {
                    prev[i - 1].as_str()
                } else {
                    START[0]
                };
                let p2 = if i > 1 {
                    prev[i - 2].as_str()
                } else {
                    START[1]
                };
                let feats = features(&words, &lowered, i, p1, p2);
                scores.iter_mut().for_each(|x| *x = 0.0);
                for f in &feats {
                    if let Some(c) = cells.get(f) {
                        for (k, w) in c.w.iter().enumerate() {
                            scores[k] += w;
                        }
                    }
                }
                let guess = Tag(argmax(&scores));
                all += 1;
                if guess == gold {
                    ok += 1;
                } else {
                    for f in feats {
                        let c = cells.entry(f).or_insert_with(|| Cell {
                            w: vec![0.0; nt],
                            total: vec![0.0; nt],
                            stamp: vec![0; nt],
                        });
                        for (k, d) in [(gold.0 as usize, 1.0f32), (guess.0 as usize, -1.0)] {
                            c.total[k] += (clock - c.stamp[k]) as f64 * c.w[k] as f64;
                            c.stamp[k] = clock;
                            c.w[k] += d;
                        }
                    }
                }
                prev.push(guess);
            }
        }
        progress(
            it + 1,
            if all == 0 {
                0.0
            } else {
                ok as f64 / all as f64
            },
        );
        // A fixed-seed Fisher–Yates shuffle (xorshift), so that training is reproducible.
        for i in (1..order.len()).rev() {
            rng ^= rng << 13;
            rng ^= rng >> 7;
            rng ^= rng << 17;
            order.swap(i, (rng % (i as u64 + 1)) as usize);
        }
    }
    let mut weights = FastMap::default();
    for (f, c) in cells {
        let ws: Vec<(u8, f32)> = (0..nt)
            .map(|k| {
                let total = c.total[k] + (clock - c.stamp[k]) as f64 * c.w[k] as f64;
                (k as u8, (total / clock.max(1) as f64) as f32)
            })
            .filter(|(_, w)| *w != 0.0)
            .collect();
        if !ws.is_empty() {
            weights.insert(f, ws);
        }
    }
    Tagger {
        weights,
        dict,
        prepared: OnceLock::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Tagging straight from the feature strings, as training sees them.
    fn tag_reference(t: &Tagger, words: &[&str]) -> Vec<Tag> {
        let lowered: Vec<String> = words.iter().map(|w| norm(w)).collect();
        let mut out: Vec<Tag> = Vec::new();
        let mut buf = String::new();
        for i in 0..words.len() {
            if let Some(&tag) = t.dict.get(&lowered[i]) {
                out.push(tag);
                continue;
            }
            let p1 = if i > 0 { out[i - 1].as_str() } else { START[0] };
            let p2 = if i > 1 { out[i - 2].as_str() } else { START[1] };
            let mut scores = vec![0f32; NT];
            visit_features(words, &lowered, i, (p1, p2), &mut buf, |f| {
                add(&mut scores, t.prepared().weights.get(f));
            });
            out.push(Tag(argmax(&scores)));
        }
        out
    }

    /// The fast path (cached word vectors, dense tag tables) gives the tags the features give,
    /// on real treebank sentences (UD English-EWT dev, see ../shared/data/pos-treebank/SOURCE),
    /// also when the word cache starts over and for a sentence too long for the cache.
    #[test]
    fn fast_tagging_agrees_with_the_feature_strings() {
        let t = Tagger::load_builtin();
        let path = crate::testdata::shared("pos-treebank/ud-english-ewt/en_ewt-ud-dev.conllu")
            .unwrap_or_default();
        let mut sentences: Vec<Vec<String>> = std::fs::read_to_string(path)
            .map(|text| read_conllu(&text))
            .unwrap_or_default()
            .into_iter()
            .take(1500)
            .map(|s| s.into_iter().map(|(w, _)| w).collect())
            .collect();
        sentences.push(
            "Heavy rains in 2019 raised the river's levels by 3.5 m , flooding 12 villages ."
                .split(' ')
                .map(String::from)
                .collect(),
        );
        let mut total = 0;
        let mut same = 0;
        for s in &sentences {
            let words: Vec<&str> = s.iter().map(String::as_str).collect();
            let fast = t.tag_uncached(&words);
            let slow = tag_reference(t, &words);
            total += words.len();
            same += fast.iter().zip(&slow).filter(|(a, b)| a == b).count();
        }
        // Sums in another order may break an exact tie differently; nothing more.
        assert!(total > 0);
        assert!(
            same as f64 >= total as f64 * 0.9999,
            "{same} of {total} tags agree"
        );
        // More distinct words than the cache holds: the long sentence's own cache never starts over.
        let long: Vec<String> = (0..9000).map(|i| format!("word{i}")).collect();
        let words: Vec<&str> = long.iter().map(String::as_str).collect();
        assert_eq!(t.tag_uncached(&words), tag_reference(t, &words));
    }

    /// A word whose hash another word holds in the cache gets its own vectors, not the other's.
    #[test]
    fn word_cache_survives_a_hash_collision() {
        let t = Tagger::load_builtin();
        let p = t.prepared();
        let mut cache = WordCache::default();
        let storm = cache.slot(t, p, "storm");
        // Pretend "rained" hashes like "storm".
        cache.index.insert(feature_hash("rained"), storm as u32);
        let rained = cache.slot(t, p, "rained");
        assert_ne!(rained, storm);
        let mut fresh = WordCache::default();
        let alone = fresh.slot(t, p, "rained");
        let vecs =
            |c: &WordCache, i: usize| c.vectors[i * ROLES * NT..(i + 1) * ROLES * NT].to_vec();
        assert_eq!(vecs(&cache, rained), vecs(&fresh, alone));
        assert_eq!(cache.slot(t, p, "storm"), storm);
    }

    /// The feature strings are the model's keys: a change here silently changes every tag.
    #[test]
    fn feature_strings_are_the_model_keys() {
        let words = ["The", "Storm"];
        let lowered: Vec<String> = words.iter().map(|w| norm(w)).collect();
        let want = [
            "b",
            "w storm",
            "s1 m",
            "s2 rm",
            "s3 orm",
            "s4 torm",
            "p1 S",
            "sh Xx",
            "t1 DT",
            "t2 -START- DT",
            "t1w DT storm",
            "w-1 the",
            "w-2 -START2-",
            "s3-1 the",
            "w+1 -END-",
            "s3+1 ND-",
            "w+2 -END2-",
            "first false",
        ];
        assert_eq!(features(&words, &lowered, 1, "DT", "-START-"), want);
        let first = features(&[""], &[String::new()], 0, "-START-", "-START2-");
        assert_eq!(
            (first[6].as_str(), first[17].as_str()),
            ("p1 ", "first true")
        );
    }

    #[test]
    fn builtin_model_loads_and_tags_a_sentence() {
        let t = Tagger::load_builtin();
        let tags = t.tag(&["The", "storm", "increases", "the", "damage", "."]);
        let s: Vec<&str> = tags.iter().map(|t| t.as_str()).collect();
        assert_eq!(s, ["DT", "NN", "VBZ", "DT", "NN", "."]);
        assert!(tags[2].is_finite_verb());
    }

    #[test]
    fn model_round_trips_through_text() {
        let data = read_conllu("1\tDogs\tdog\tNOUN\tNNS\t_\t0\troot\t_\t_\n2\tbark\tbark\tVERB\tVBP\t_\t1\tx\t_\t_\n\n");
        let t = train(&data, TrainOptions::default(), |_, _| {});
        let back = Tagger::from_model(&t.to_model(0.0)).unwrap();
        assert_eq!(back.tag(&["Dogs", "bark"]), t.tag(&["Dogs", "bark"]));
        assert!(Tagger::from_model("nonsense").is_err());
    }
}
