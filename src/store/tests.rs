//! Unit tests of the store's internals: the index analyzer, and claims through the writer and back.

use super::index::analyzer;
use super::rows::ClaimRow;
use std::collections::BTreeSet;
use tantivy::tokenizer::{TextAnalyzer, TokenStream};

fn terms_of(a: &mut TextAnalyzer, text: &str) -> Vec<String> {
    let mut ts = a.token_stream(text);
    let mut out = Vec::new();
    while ts.advance() {
        out.push(ts.token().text.clone());
    }
    out
}

/// The analyzer a scan with the built-in patterns writes with.
fn builtin_analyzer() -> TextAnalyzer {
    let lexicon = crate::patterns::PatternSet::builtin().unwrap().lexicon;
    let unindexed: Vec<String> = crate::variables::dropped_words(&lexicon).collect();
    analyzer(&unindexed)
}

/// Co-mention queries look sentences up by the words of variable keys, so every word of a
/// key must be a term of the sentence it came from. Checked on every line of 150 eLife
/// articles (990 open-access articles; ../shared/data/elife-articles/SOURCE.txt). A stemmer
/// other than the keys' one fails here: a newer Snowball English keeps "organism" and
/// "internal" whole where the keys' Porter2 gives "organ" and "intern".
#[test]
fn key_words_are_index_terms_on_elife_text() {
    let articles = crate::testdata::elife_articles(150);
    if articles.is_empty() {
        return;
    }
    let norm =
        crate::variables::Normalizer::new(&crate::patterns::PatternSet::builtin().unwrap().lexicon);
    let mut a = builtin_analyzer();
    let mut index_terms = |text: &str| terms_of(&mut a, text);
    let (mut lines, mut words) = (0usize, 0usize);
    for (path, text) in &articles {
        for line in text.lines().filter(|l| !l.trim().is_empty()) {
            lines += 1;
            let terms: BTreeSet<String> = index_terms(line).into_iter().collect();
            for w in norm.terms(line) {
                words += 1;
                // Keys keep apostrophes inside a word ("don't"); the index splits there.
                if w.contains(['\'', '’']) {
                    continue;
                }
                assert!(
                    terms.contains(&w),
                    "{}: key word {w:?} is not an index term of {line:?}",
                    path.display()
                );
            }
        }
    }
    assert!(
        lines > 1000 && words > 100_000,
        "{lines} lines, {words} words"
    );
    for (word, stem) in [
        ("organisms", "organ"),
        ("internal", "intern"),
        ("added", "ad"),
    ] {
        assert_eq!(index_terms(word), [stem]);
        assert_eq!(norm.terms(word), [stem]);
    }
}

/// The remembered stems are the stems: the same terms with a cold and a warm cache.
#[test]
fn remembered_stems_equal_fresh_ones() {
    let text = "Rising temperatures increased the flowering of the flowers; it rises.";
    let mut a = analyzer(&[]);
    let first = terms_of(&mut a, text);
    let second = terms_of(&mut a, text);
    assert_eq!(first, second);
    assert_eq!(
        first,
        [
            "rise",
            "temperatur",
            "increas",
            "the",
            "flower",
            "of",
            "the",
            "flower",
            "it",
            "rise"
        ]
    );
}

/// Words no key contains are not index terms; the words around them still are, and a word
/// that only stems like a dropped one ("doe" is not "does") stays.
#[test]
fn words_no_key_contains_are_not_indexed() {
    let mut a = builtin_analyzer();
    let mut index_terms = |text: &str| terms_of(&mut a, text);
    assert_eq!(
        index_terms("The rise of THE temperatures in its way, and it's a doe."),
        ["rise", "temperatur", "doe"]
    );
    let lexicon = crate::patterns::PatternSet::builtin().unwrap().lexicon;
    let norm = crate::variables::Normalizer::new(&lexicon);
    let mut n = 0;
    for w in crate::variables::dropped_words(&lexicon) {
        n += 1;
        assert!(index_terms(&w).is_empty(), "{w:?} is indexed");
        assert!(norm.terms(&w).is_empty(), "{w:?} is a key word");
    }
    assert!(n > 50, "{n} dropped words");
}

/// Claims written through the writer come back from their compressed blocks equal, in order and
/// out of order (the block cache), and the postings select exactly the rows that name a key. The
/// claims are built from their JSON form, so the test holds whatever fields the record gains.
#[test]
fn claims_round_trip_through_compressed_blocks_and_postings() {
    use super::{FileEntry, Store, StoreWriter};
    use crate::claim::Claim;
    let dir = tempfile::tempdir().unwrap();
    let set = crate::patterns::PatternSet::builtin().unwrap();
    let mut w = StoreWriter::open(dir.path(), 15_000_000, &set.lexicon).unwrap();
    let claims: Vec<Claim> = (0..3000)
        .map(|i| {
            let (c, e) = (format!("cause {}", i % 13), format!("effect {}", i % 7));
            serde_json::from_value(serde_json::json!({
                "schema": crate::claim::SCHEMA_VERSION,
                "cause": {"text": c, "key": c, "start": 0, "end": 7},
                "effect": {"text": e, "key": if i % 11 == 0 { &c } else { &e }, "start": 20, "end": 28},
                "kind": if i % 5 == 0 { "association" } else { "causal" },
                "polarity": "increase",
                "modality": "asserted",
                "cue": "increase",
                "sentence": format!("Sentence {i}: {c} increases {e} by {} units.", i * 7919 % 1000),
                "source": {"path": "a.txt", "line": i + 1, "column": 1, "start": i * 50, "end": i * 50 + 40},
                "confidence": (i % 100) as f64 / 100.0,
            }))
            .unwrap()
        })
        .collect();
    w.begin(FileEntry::new("a.txt"));
    w.append_claims("a.txt", &claims[..1700]).unwrap();
    w.append_claims("b.txt", &claims[1700..]).unwrap();
    w.commit(&set, Vec::new(), Vec::new()).unwrap();
    let store = Store::open(dir.path()).unwrap();
    let rows = store.rows().unwrap();
    assert_eq!(rows.len(), claims.len());
    let frames: BTreeSet<u64> = rows.iter().map(|r| r.at.offset).collect();
    assert!(frames.len() > 5, "{} frames", frames.len());
    for (r, c) in rows.iter().zip(&claims) {
        assert_eq!(&store.claim(r.at).unwrap(), c);
    }
    for (r, c) in rows.iter().zip(&claims).rev().step_by(97) {
        assert_eq!(&store.claim(r.at).unwrap(), c);
    }
    let post = store.postings().unwrap();
    assert!(post.keys().contains("effect 3"));
    for key in ["cause 7", "effect 3", "no such key"] {
        let named = store.rows_naming(&post, |k| k == key).unwrap();
        let expect: Vec<&ClaimRow> = rows
            .iter()
            .filter(|r| r.cause == key || r.effect == key)
            .collect();
        assert_eq!(named.iter().collect::<Vec<_>>(), expect, "{key}");
    }
}
