//! The features of a word and the weights laid out for scoring them: the feature strings
//! training sees, and the same sums computed per word for tagging.

use super::{FastMap, NT, TAGS};

/// The model rearranged for tagging. A perceptron's score is a sum over features, and most
/// features depend on one word only (its suffixes, its shape, or that it is the previous or
/// next word): their sums are computed once per word and cached, and the features of the
/// previous tags are dense tables. Per word position that leaves the cache lookup and, for the
/// few words that have them, one `t1w` lookup.
#[derive(Debug, Clone, Default)]
pub(super) struct Prepared {
    pub(super) weights: HashedWeights,
    /// `t1` features, row `p1` (index `NT` is the sentence start).
    pub(super) t1: Vec<f32>,
    /// `t2` features, row `p2 * (NT + 1) + p1`.
    pub(super) t2: Vec<f32>,
    /// `b` plus `first false`, and the difference `first true` minus `first false`.
    pub(super) bias: Vec<f32>,
    pub(super) first: Vec<f32>,
    /// Role vectors of the padding outside the sentence: as word 1 and 2 before the first word,
    /// and 1 and 2 after the last.
    pub(super) before1: Vec<f32>,
    pub(super) before2: Vec<f32>,
    pub(super) after1: Vec<f32>,
    pub(super) after2: Vec<f32>,
}

impl Prepared {
    pub(super) fn new(weights: &FastMap<String, Vec<(u8, f32)>>) -> Prepared {
        Prepared::from_hashed(HashedWeights::new(weights))
    }

    pub(super) fn from_hashed(weights: HashedWeights) -> Prepared {
        let weights = weights.grouped();
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
    pub(super) fn word_vectors(&self, raw: &str, out: &mut [f32]) -> (String, u64) {
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

pub(super) fn add(v: &mut [f32], ws: &[(u8, f32)]) {
    for &(c, w) in ws {
        v[c as usize] += w;
    }
}

/// The weights laid out for tagging: one flat array of `(class, weight)` pairs, and per feature
/// the range of its pairs. One allocation instead of one per feature keeps lookups close
/// together in memory. Features that a word brings to the words around it are filed by the
/// word (one lookup finds all five), and each kind of suffix, prefix and shape feature has a
/// small table of its own: a word not seen before costs seven lookups instead of thirteen, and
/// most of them in tables that stay in cache.
#[derive(Debug, Clone, Default)]
pub(super) struct HashedWeights {
    /// Features not filed below, by the hash of the whole name.
    pub(super) ranges: FastMap<u64, (u32, u32)>,
    pub(super) pairs: Vec<(u8, f32)>,
    /// By word hash: the ranges of the features in `WORD_ROLES` (`(0, 0)` when absent).
    pub(super) words: FastMap<u64, [(u32, u32); 5]>,
    /// By the hash of a three-character suffix: the ranges of the features in `SUFFIX3_ROLES`.
    pub(super) suffix3: FastMap<u64, [(u32, u32); 3]>,
    /// One table per kind in `SINGLE_KINDS`, by the hash of the value.
    pub(super) singles: [FastMap<u64, (u32, u32)>; 5],
    /// The `t1w` features (previous tag and this word), keyed by the previous tag's index (`NT`
    /// for the sentence start) and the word's hash, kept apart so that tagging hashes each word
    /// once, and skips the lookup for a word that has no such feature.
    pub(super) t1w: FastMap<(u8, u64), (u32, u32)>,
    pub(super) t1w_words: std::collections::HashSet<u64, rustc_hash::FxBuildHasher>,
}

/// Feature kinds whose value is a word, in the order of `HashedWeights::words`.
pub(super) const WORD_ROLES: [&str; 5] = ["w", "w-1", "w-2", "w+1", "w+2"];
/// Feature kinds whose value is a three-character suffix.
pub(super) const SUFFIX3_ROLES: [&str; 3] = ["s3", "s3-1", "s3+1"];
/// Other kinds filed by value: suffixes of one, two and four characters, first character, shape.
pub(super) const SINGLE_KINDS: [&str; 5] = ["s1", "s2", "s4", "p1", "sh"];

/// Where a feature is filed.
pub(super) enum Filed {
    T1w(u8, u64),
    Word(usize, u64),
    Suffix3(usize, u64),
    Single(usize, u64),
    Other(u64),
}

pub(super) fn filed(name: &str) -> Filed {
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
    pub(super) fn new(weights: &FastMap<String, Vec<(u8, f32)>>) -> HashedWeights {
        let mut out = HashedWeights::default();
        out.ranges.reserve(weights.len());
        for (f, ws) in weights {
            let start = out.pairs.len() as u32;
            out.pairs.extend_from_slice(ws);
            out.insert(f, start);
        }
        out
    }

    /// The same weights with the pairs laid out by table: a word's five role features next to
    /// each other, then a suffix's three, then the other tables'. A word the cache misses reads
    /// its features from one stretch of memory instead of from up to five places in the model's
    /// alphabetical order; every feature keeps its pairs, in their order.
    pub(super) fn grouped(mut self) -> HashedWeights {
        let old = std::mem::take(&mut self.pairs);
        let mut pairs = Vec::with_capacity(old.len());
        let mut moved = |r: &mut (u32, u32)| {
            let at = pairs.len() as u32;
            pairs.extend_from_slice(&old[r.0 as usize..r.1 as usize]);
            *r = (at, pairs.len() as u32);
        };
        self.words.values_mut().flatten().for_each(&mut moved);
        self.suffix3.values_mut().flatten().for_each(&mut moved);
        for table in &mut self.singles {
            table.values_mut().for_each(&mut moved);
        }
        self.t1w.values_mut().for_each(&mut moved);
        self.ranges.values_mut().for_each(&mut moved);
        self.pairs = pairs;
        self
    }

    /// File the feature `name`, whose pairs are `pairs[start..]`.
    pub(super) fn insert(&mut self, name: &str, start: u32) {
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

    pub(super) fn range(&self, (a, b): (u32, u32)) -> &[(u8, f32)] {
        &self.pairs[a as usize..b as usize]
    }

    /// The weights of a feature of kind `SINGLE_KINDS[kind]` with this value.
    pub(super) fn single(&self, kind: usize, value: &str) -> &[(u8, f32)] {
        self.singles[kind]
            .get(&feature_hash(value))
            .map_or(&[], |&r| self.range(r))
    }

    /// The weights of any feature, by name.
    pub(super) fn get(&self, feature: &str) -> &[(u8, f32)] {
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
    pub(super) fn t1w(&self, prev: usize, word: u64) -> &[(u8, f32)] {
        match self.t1w.get(&(prev as u8, word)) {
            Some(&r) => self.range(r),
            None => &[],
        }
    }
}

/// A `t1w` feature name ("t1w TAG word") as (previous tag index, word hash).
pub(super) fn t1w_key(name: &str) -> Option<(u8, u64)> {
    let (tag, word) = name.strip_prefix("t1w ")?.split_once(' ')?;
    let prev = if tag == START[0] {
        NT
    } else {
        TAGS.iter().position(|t| *t == tag)?
    };
    Some((prev as u8, feature_hash(word)))
}

pub(super) fn feature_hash(f: &str) -> u64 {
    use std::hash::Hasher as _;
    let mut h = rustc_hash::FxHasher::default();
    h.write(f.as_bytes());
    h.finish()
}

pub(super) const START: [&str; 2] = ["-START-", "-START2-"];

/// The word's shape ("Xxxx", "dd-x"): character classes with repeats collapsed, at most 7.
pub(super) fn shape_into(w: &str, s: &mut String) {
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
pub(super) fn first_char(w: &str) -> &str {
    w.chars().next().map_or("", |c| &w[..c.len_utf8()])
}

pub(super) fn suffix(w: &str, n: usize) -> &str {
    let start = w
        .char_indices()
        .rev()
        .nth(n.saturating_sub(1))
        .map_or(0, |(i, _)| i);
    &w[start..]
}

pub(super) fn norm(w: &str) -> String {
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
pub(super) fn visit_features(
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
pub(super) fn features(
    words: &[&str],
    lowered: &[String],
    i: usize,
    p1: &str,
    p2: &str,
) -> Vec<String> {
    let mut out = Vec::with_capacity(18);
    let mut buf = String::new();
    visit_features(words, lowered, i, (p1, p2), &mut buf, |f| {
        out.push(f.to_string())
    });
    out
}
