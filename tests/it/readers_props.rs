//! Property tests (proptest): no reader panics on arbitrary bytes, and every sentence, claim
//! slot and claim sentence span lies inside its document's text on character boundaries.
//!
//! Each reader is called directly, outside the `catch_unwind` guard of `corpus`, so a panic
//! fails the property instead of being contained.

use hearsay::corpus::readers::{
    html::HtmlReader, jsonl::JsonlReader, markdown::MarkdownReader, pdf::PdfReader,
    text::TextReader,
};
use hearsay::corpus::{Document, ReadOptions, Reader};
use hearsay::extract::Extractor;
use proptest::prelude::*;
use std::sync::OnceLock;

fn extractor() -> &'static Extractor {
    static EX: OnceLock<Extractor> = OnceLock::new();
    EX.get_or_init(|| {
        let set = hearsay::patterns::PatternSet::builtin().expect("built-in patterns");
        Extractor::new(&set).expect("extractor")
    })
}

const READERS: [&dyn Reader; 5] = [
    &TextReader,
    &MarkdownReader,
    &HtmlReader,
    &PdfReader,
    &JsonlReader,
];

fn in_text(text: &str, start: usize, end: usize) -> bool {
    start <= end && end <= text.len() && text.is_char_boundary(start) && text.is_char_boundary(end)
}

fn ws(s: &str) -> Vec<&str> {
    s.split_whitespace().collect()
}

/// Read `bytes` with every reader (no panic), then check every span of every document.
fn check_all_readers(bytes: &[u8]) -> Result<(), TestCaseError> {
    let opts = ReadOptions::default();
    for r in READERS {
        let mut docs: Vec<Document> = Vec::new();
        let mut warnings = Vec::new();
        let run = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            let mut src: &[u8] = bytes;
            // Both entry points: whole bytes and the stream (JSON Lines streams).
            let _ = r.read("p", bytes, &opts, &mut warnings, &mut |d| docs.push(d));
            let _ = r.read_stream("p", &mut src, &opts, &mut warnings, &mut |d| docs.push(d));
        }));
        prop_assert!(run.is_ok(), "reader {} panicked", r.name());
        for d in &docs {
            let t = &d.text;
            prop_assert!(d.page_starts.windows(2).all(|w| w[0] <= w[1]));
            prop_assert!(d.page_starts.iter().all(|&s| s <= t.len()));
            for s in hearsay::sentences::split(t) {
                prop_assert!(in_text(t, s.start, s.end), "{} sentence {:?}", r.name(), s);
            }
            for s in hearsay::extract::document_sentences(d) {
                prop_assert!(in_text(t, s.start, s.start + s.text.len()));
            }
            for c in hearsay::extract::document_claims(extractor(), d) {
                prop_assert!(in_text(t, c.source.start, c.source.end), "{c:?}");
                prop_assert!(in_text(t, c.cause.start, c.cause.end), "{c:?}");
                prop_assert!(in_text(t, c.effect.start, c.effect.end), "{c:?}");
                // Slot texts are the document's text with whitespace runs collapsed.
                prop_assert_eq!(ws(&t[c.cause.start..c.cause.end]), ws(&c.cause.text));
                prop_assert_eq!(ws(&t[c.effect.start..c.effect.end]), ws(&c.effect.text));
            }
        }
    }
    Ok(())
}

/// Words that reach the cue matcher and the format-specific paths (markup, JSON, PDF header).
const VOCAB: &[&str] = &[
    "rain",
    "causes",
    "floods",
    "raises",
    "the",
    "level",
    "because",
    "of",
    "heat",
    "leads",
    "to",
    "no",
    "effect",
    "on",
    "may",
    "increase",
    ".",
    ",",
    "\n",
    "\n\n",
    "<p>",
    "</p>",
    "<li>",
    "#",
    "```",
    "---",
    "{\"text\":\"",
    "\"}",
    "%PDF-1.4",
    "é",
    "日本",
    "\u{FB01}",
    "-\n",
    "\0",
];

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn arbitrary_bytes_never_panic_a_reader(bytes in proptest::collection::vec(any::<u8>(), 0..2048)) {
        check_all_readers(&bytes)?;
    }

    #[test]
    fn spans_of_word_soup_lie_inside_the_document(words in proptest::collection::vec(proptest::sample::select(VOCAB), 0..120)) {
        check_all_readers(words.join(" ").as_bytes())?;
    }
}
