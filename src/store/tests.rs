//! Unit tests of the store's internals: the index analyzer and rows decoded in place.

use super::index::analyzer;
use super::read::RowView;
use super::rows::{test_row, ClaimRef, ClaimRow};
use crate::claim::{Kind, Modality, Polarity};
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

fn row(i: u64, cause: &str) -> ClaimRow {
    ClaimRow {
        effect: "effect ünïcode".into(),
        cause_text: format!("The {cause}"),
        effect_text: "effects".into(),
        kind: if i.is_multiple_of(2) {
            Kind::Causal
        } else {
            Kind::Association
        },
        cue: "leads to".into(),
        line: i as u32 + 1,
        sentence: i * 1000,
        at: ClaimRef {
            segment: 3,
            offset: i * 77,
            len: 70,
        },
        confidence: 0.25 + i as f32,
        ..test_row(
            cause,
            "",
            Polarity::Decrease,
            Modality::Hedged,
            &format!("d{i}.txt#r"),
        )
    }
}

#[test]
fn rows_decoded_in_place_equal_the_owned_rows() {
    let rows: Vec<ClaimRow> = (0..5).map(|i| row(i, &format!("c{i}"))).collect();
    let bytes = postcard::to_stdvec(&rows).unwrap();
    let views: Vec<RowView> = postcard::from_bytes(&bytes).unwrap();
    let back: Vec<ClaimRow> = views.iter().map(|v| v.to_row().unwrap()).collect();
    assert_eq!(back, rows);
}
