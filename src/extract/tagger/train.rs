//! Training: CoNLL-U treebanks read into tagged sentences, an averaged perceptron trained on
//! them, and accuracy against a treebank.

use super::features::{features, norm, START};
use super::{argmax, FastMap, Tag, Tagger, TAGS};
use std::collections::HashMap;
use std::sync::OnceLock;

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
    let dict = tag_dictionary(data);
    let mut run = Perceptron {
        cells: HashMap::new(),
        clock: 0,
        scores: vec![0f32; TAGS.len()],
    };
    let mut order: Vec<usize> = (0..data.len()).collect();
    let mut rng = opts.seed.max(1);
    for it in 0..opts.iterations {
        let (mut ok, mut all) = (0usize, 0usize);
        for &si in &order {
            let (o, a) = run.learn(&data[si], &dict);
            ok += o;
            all += a;
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
    Tagger {
        weights: run.averaged(),
        dict,
        prepared: OnceLock::new(),
    }
}

/// The tag dictionary: frequent words seen with one tag at least 97% of the time.
fn tag_dictionary(data: &[TaggedSentence]) -> FastMap<String, Tag> {
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
    dict
}

/// A feature's weights, their running totals and when each was last changed (for averaging).
struct Cell {
    w: Vec<f32>,
    total: Vec<f64>,
    stamp: Vec<u64>,
}

/// A perceptron in training: a cell per feature, and a clock that counts the words scored.
struct Perceptron {
    cells: HashMap<String, Cell>,
    clock: u64,
    /// Scratch scores, one per tag.
    scores: Vec<f32>,
}

impl Perceptron {
    /// Tag one sentence greedily, moving the weights towards the gold tag at each wrong guess.
    /// Returns the words guessed right and the words guessed (the dictionary's are not).
    fn learn(&mut self, s: &TaggedSentence, dict: &FastMap<String, Tag>) -> (usize, usize) {
        let nt = TAGS.len();
        let (mut ok, mut all) = (0usize, 0usize);
        let words: Vec<&str> = s.iter().map(|(w, _)| w.as_str()).collect();
        let lowered: Vec<String> = words.iter().map(|w| norm(w)).collect();
        let mut prev: Vec<Tag> = Vec::with_capacity(s.len());
        for i in 0..s.len() {
            let gold = s[i].1;
            if let Some(&t) = dict.get(&lowered[i]) {
                prev.push(t);
                continue;
            }
            self.clock += 1;
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
            self.scores.iter_mut().for_each(|x| *x = 0.0);
            for f in &feats {
                if let Some(c) = self.cells.get(f) {
                    for (k, w) in c.w.iter().enumerate() {
                        self.scores[k] += w;
                    }
                }
            }
            let guess = Tag(argmax(&self.scores));
            all += 1;
            if guess == gold {
                ok += 1;
            } else {
                let clock = self.clock;
                for f in feats {
                    let c = self.cells.entry(f).or_insert_with(|| Cell {
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
        (ok, all)
    }

    /// The averaged weights, zeros left out.
    fn averaged(self) -> FastMap<String, Vec<(u8, f32)>> {
        let nt = TAGS.len();
        let clock = self.clock;
        let mut weights = FastMap::default();
        for (f, c) in self.cells {
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
        weights
    }
}
