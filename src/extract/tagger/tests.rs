//! The tagger: the fast path against the feature strings, the model file, the built-in model.

use super::features::{add, feature_hash, features, norm, visit_features, START};
use super::tagging::WordCache;
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
    let vecs = |c: &WordCache, i: usize| c.vectors[i * ROLES * NT..(i + 1) * ROLES * NT].to_vec();
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
    let data = read_conllu(
        "1\tDogs\tdog\tNOUN\tNNS\t_\t0\troot\t_\t_\n2\tbark\tbark\tVERB\tVBP\t_\t1\tx\t_\t_\n\n",
    );
    let t = train(&data, TrainOptions::default(), |_, _| {});
    let back = Tagger::from_model(&t.to_model(0.0)).unwrap();
    assert_eq!(back.tag(&["Dogs", "bark"]), t.tag(&["Dogs", "bark"]));
    assert!(Tagger::from_model("nonsense").is_err());
}

/// The fast reading of a feature line's weights takes exactly the pairs the general reading
/// (split at tabs, then at the colon, `str::parse`) accepts, with the same values, and leaves
/// every other line to it.
#[test]
fn feature_pairs_read_fast_as_the_general_reading_does() {
    let tags: Vec<Tag> = TAGS.iter().map(|t| Tag::parse(t).unwrap()).collect();
    let general = |pairs: &str| -> Option<Vec<(u8, f32)>> {
        pairs
            .split('\t')
            .map(|p| {
                let (c, w) = p.split_once(':')?;
                let c: usize = c.parse().ok()?;
                let w: i32 = w.parse().ok()?;
                Some((tags.get(c)?.0, w as f32 / 100.0))
            })
            .collect()
    };
    for pairs in [
        "0:5",
        "3:-120\t49:7",
        "0012:0009",
        "1:-0",
        "49:123456789",
        "9:1\t9:2\t9:3",
        // Left to the general reading: it refuses these, or reads them in ways not worth a
        // fast path (a plus sign).
        "",
        "1:5\t",
        "\t1:5",
        "1:5\t\t2:3",
        "50:1",
        "1:",
        ":1",
        "1:+5",
        "+1:5",
        "1:5x",
        "12345:1",
        "1:1234567890",
        "1-5",
        "1:--5",
        "a:1",
    ] {
        let mut out = Vec::new();
        let fast = read_pairs(pairs, &tags, &mut out);
        match general(pairs) {
            Some(g) if fast => assert_eq!(out, g, "{pairs:?}"),
            _ => assert!(!fast, "{pairs:?} taken by the fast reading only"),
        }
    }
    // And every line of the built-in model is taken by the fast reading.
    let model = include_str!("../../../patterns/tagger.model");
    let (mut lines, mut fast) = (0, 0);
    for line in model.lines() {
        if let Some((_, pairs)) = line.strip_prefix("f\t").and_then(|r| r.split_once('\t')) {
            lines += 1;
            let mut out = Vec::new();
            if read_pairs(pairs, &tags, &mut out) {
                fast += 1;
                assert_eq!(Some(out), general(pairs), "{line:?}");
            }
        }
    }
    assert!(lines > 50_000 && fast == lines, "{fast} of {lines}");
}

/// After the pairs are regrouped by table, every feature of the built-in model still reads its
/// own weights, in the order of its line in the model file.
#[test]
fn grouped_weights_read_back_every_feature_of_the_model() {
    let text = include_str!("../../../patterns/tagger.model");
    let weights = &Tagger::load_builtin().prepared().weights;
    let mut tags: Vec<Tag> = Vec::new();
    let mut features = 0;
    for line in text.lines() {
        let mut parts = line.split('\t');
        match parts.next() {
            Some("tags") => tags = parts.filter_map(Tag::parse).collect(),
            Some("f") => {
                let name = parts.next().unwrap_or_default();
                let want: Vec<(u8, f32)> = parts
                    .filter_map(|p| {
                        let (c, w) = p.split_once(':')?;
                        let tag = tags.get(c.parse::<usize>().ok()?)?;
                        Some((tag.0, w.parse::<i32>().ok()? as f32 / 100.0))
                    })
                    .collect();
                assert_eq!(weights.get(name), want.as_slice(), "feature {name}");
                features += 1;
            }
            _ => {}
        }
    }
    assert!(features > 80_000, "{features} features read");
}
