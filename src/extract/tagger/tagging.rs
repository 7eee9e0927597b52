//! Tagging a sentence (or a cue's window of it): greedy decoding left to right over per-word
//! score vectors that a per-thread cache keeps.

use super::features::{add, feature_hash, Prepared};
use super::{argmax, FastMap, Tag, Tagger, NT, ROLES};

/// Per thread, the role vectors of recently seen words, for one tagger at a time. Bounded: when
/// full it starts over, which keeps memory flat (6144 words × 5 roles × 50 tags × 4 bytes = 6 MB;
/// 8192 words missed 11.5% of eLife words against 13.3%, but put `extract -j2` over 100 MB).
#[derive(Default)]
pub(super) struct WordCache {
    pub(super) owner: usize,
    /// A cache for one long sentence only: it never starts over (its slots must stay valid
    /// until the sentence is scored).
    pub(super) unbounded: bool,
    /// Hash of a raw word → its slot. The word itself is in `raw`, so a lookup compares against
    /// one contiguous buffer instead of a heap string per word.
    pub(super) index: FastMap<u64, u32>,
    /// The raw words of the slots, back to back, and per slot its range in them.
    pub(super) raw: String,
    /// Per slot, what is known of its word.
    pub(super) words: Vec<Slot>,
    /// Per slot, `ROLES * NT` scores.
    pub(super) vectors: Vec<f32>,
}

pub(super) const WORD_CACHE_WORDS: usize = 6144;

/// One word of the cache.
pub(super) struct Slot {
    /// The raw word's range in `WordCache::raw`.
    pub(super) raw: (u32, u32),
    /// Its tag, when the tag dictionary answers it.
    pub(super) known: Option<Tag>,
    /// Its hash, when the word has `t1w` features.
    pub(super) t1w: Option<u64>,
}

impl WordCache {
    /// This word's slot, computing its role vectors if needed.
    pub(super) fn slot(&mut self, t: &Tagger, p: &Prepared, raw: &str) -> usize {
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

    pub(super) fn clear(&mut self) {
        self.index.clear();
        self.raw.clear();
        self.words.clear();
        self.vectors.clear();
    }
}

impl Tagger {
    /// Tag a tokenised sentence (or a run of its words: a cue's tagging window).
    pub fn tag(&self, words: &[&str]) -> Vec<Tag> {
        self.tag_uncached(words)
    }

    pub(super) fn tag_uncached(&self, words: &[&str]) -> Vec<Tag> {
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

    pub(super) fn tag_with(&self, p: &Prepared, cache: &mut WordCache, words: &[&str]) -> Vec<Tag> {
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

    pub(super) fn prepared(&self) -> &Prepared {
        self.prepared.get_or_init(|| Prepared::new(&self.weights))
    }
}
