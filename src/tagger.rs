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
    weights: FastMap<String, Vec<(u8, f32)>>,
    dict: FastMap<String, Tag>,
    /// `weights` keyed by a 64-bit hash of the feature, built on first use: tagging then hashes
    /// the feature text once and compares integers, not strings.
    by_hash: OnceLock<FastMap<u64, Vec<(u8, f32)>>>,
}

fn feature_hash(f: &str) -> u64 {
    use std::hash::Hasher as _;
    let mut h = rustc_hash::FxHasher::default();
    h.write(f.as_bytes());
    h.finish()
}

const START: [&str; 2] = ["-START-", "-START2-"];

fn shape(w: &str) -> String {
    let mut s = String::new();
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
    s
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
    use std::fmt::Write as _;
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
    let first = raw.chars().next();
    let mut emit = |args: std::fmt::Arguments<'_>| {
        buf.clear();
        // Writing into a String cannot fail.
        let _ = buf.write_fmt(args);
        f(buf);
    };
    emit(format_args!("b"));
    emit(format_args!("w {w}"));
    emit(format_args!("s1 {}", suffix(w, 1)));
    emit(format_args!("s2 {}", suffix(w, 2)));
    emit(format_args!("s3 {}", suffix(w, 3)));
    emit(format_args!("s4 {}", suffix(w, 4)));
    match first {
        Some(c) => emit(format_args!("p1 {c}")),
        None => emit(format_args!("p1 ")),
    }
    emit(format_args!("sh {}", shape(raw)));
    emit(format_args!("t1 {p1}"));
    emit(format_args!("t2 {p2} {p1}"));
    emit(format_args!("t1w {p1} {w}"));
    emit(format_args!("w-1 {prev}"));
    emit(format_args!("w-2 {prev2}"));
    emit(format_args!("s3-1 {}", suffix(prev, 3)));
    emit(format_args!("w+1 {next}"));
    emit(format_args!("s3+1 {}", suffix(next, 3)));
    emit(format_args!("w+2 {next2}"));
    emit(format_args!("first {}", i == 0));
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
            Tagger::from_model(include_str!("../patterns/tagger.model"))
                .expect("the built-in tagger model is valid (checked by a unit test)")
        })
    }

    /// Tag a tokenised sentence. For the built-in model the last sentence tagged on each thread
    /// is remembered, so the span finder and the confidence model, which both need the tags of a
    /// sentence with a claim, tag it once.
    pub fn tag(&self, words: &[&str]) -> Vec<Tag> {
        thread_local! {
            static LAST: std::cell::RefCell<(Vec<String>, Vec<Tag>)> =
                const { std::cell::RefCell::new((Vec::new(), Vec::new())) };
        }
        if !std::ptr::eq(self, Tagger::load_builtin()) {
            return self.tag_uncached(words);
        }
        let hit = LAST.with(|l| {
            let l = l.borrow();
            (l.0.len() == words.len() && l.0.iter().zip(words).all(|(a, b)| a == b))
                .then(|| l.1.clone())
        });
        if let Some(tags) = hit {
            return tags;
        }
        let tags = self.tag_uncached(words);
        LAST.with(|l| {
            let mut l = l.borrow_mut();
            l.0.clear();
            l.0.extend(words.iter().map(|w| w.to_string()));
            l.1.clone_from(&tags);
        });
        tags
    }

    fn tag_uncached(&self, words: &[&str]) -> Vec<Tag> {
        let lowered: Vec<String> = words.iter().map(|w| norm(w)).collect();
        let mut out: Vec<Tag> = Vec::with_capacity(words.len());
        let mut scores = vec![0f32; TAGS.len()];
        let mut buf = String::with_capacity(64);
        let weights = self.by_hash.get_or_init(|| {
            self.weights
                .iter()
                .map(|(f, ws)| (feature_hash(f), ws.clone()))
                .collect()
        });
        for i in 0..words.len() {
            if let Some(&t) = self.dict.get(&lowered[i]) {
                out.push(t);
                continue;
            }
            let p1 = if i > 0 { out[i - 1].as_str() } else { START[0] };
            let p2 = if i > 1 { out[i - 2].as_str() } else { START[1] };
            scores.iter_mut().for_each(|s| *s = 0.0);
            visit_features(words, &lowered, i, (p1, p2), &mut buf, |f| {
                if let Some(ws) = weights.get(&feature_hash(f)) {
                    for &(c, w) in ws {
                        scores[c as usize] += w;
                    }
                }
            });
            out.push(Tag(argmax(&scores)));
        }
        out
    }

    /// Parse a model file.
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
                    let mut ws = Vec::new();
                    for p in parts {
                        let (c, w) = p.split_once(':').ok_or_else(|| err(n + 1, "bad weight"))?;
                        let c: usize = c.parse().map_err(|_| err(n + 1, "bad class"))?;
                        let w: i32 = w.parse().map_err(|_| err(n + 1, "bad weight"))?;
                        let tag = file_tags
                            .get(c)
                            .ok_or_else(|| err(n + 1, "class out of range"))?;
                        ws.push((tag.0, w as f32 / 100.0));
                    }
                    t.weights.insert(feat.to_string(), ws);
                }
                Some("") | None => {}
                Some(_) => return Err(err(n + 1, "unknown line kind")),
            }
        }
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
        by_hash: OnceLock::new(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
