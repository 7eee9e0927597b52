//! The per-document pipeline: document → sentences → cue matches → claims → confidence.
//!
//! This is the one place where the stages are chained, so `scan`, `extract`, `merge` and `eval`
//! all produce the same claims from the same text. Its shape follows the cost model: the cue
//! prefilter runs over the whole document first, and only the paragraph-like blocks around its
//! hits are split into sentences and matched. A document without a cue word costs one
//! Aho-Corasick pass. Sentence indexing (for `scan`) splits the whole document separately.

use crate::claim::Claim;
use crate::corpus::Document;
use crate::extract::claims::{Attempt, Extractor, Origin, SentenceRef};
use crate::extract::confidence;
use crate::sentences::{self, SentenceSpan};
use std::cell::Cell;

/// The largest block around a hit that is split into sentences, on each side of it. Paragraphs
/// are seldom longer (eLife's longest line is 6 KB), so a block is nearly always a whole
/// paragraph and its sentences are the ones a split of the whole document gives.
const BLOCK_CAP: usize = 32 * 1024;

/// Byte offsets of line starts, for turning offsets into line and column.
#[derive(Debug, Clone)]
pub struct LineIndex {
    starts: Vec<usize>,
    /// The last offset asked for and its column (characters from its line's start), so that
    /// offsets asked in increasing order on one long line count each character once: without
    /// it, a document that is one line of n sentences costs n × its length.
    last: Cell<(usize, usize)>,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let mut starts = vec![0];
        starts.extend(memchr::memchr_iter(b'\n', text.as_bytes()).map(|i| i + 1));
        LineIndex {
            starts,
            last: Cell::new((0, 0)),
        }
    }

    /// 1-based line of a byte offset.
    pub fn line(&self, offset: usize) -> usize {
        self.starts.partition_point(|&s| s <= offset).max(1)
    }

    /// 1-based line and column (in characters) of a byte offset.
    pub fn line_col(&self, text: &str, offset: usize) -> (usize, usize) {
        let line = self.line(offset);
        let ls = self.starts[line - 1];
        let (last, last_col) = self.last.get();
        // Count on from the last offset when it lies on this line before `offset`.
        let (from, base) = if last >= ls && last <= offset {
            (last, last_col)
        } else {
            (ls, 0)
        };
        let col = base
            + text
                .get(from..offset)
                .map(|s| s.chars().count())
                .unwrap_or(0);
        self.last.set((offset, col));
        (line, col + 1)
    }
}

/// Extract every claim of a document, in document order.
pub fn document_claims(ex: &Extractor, doc: &Document) -> Vec<Claim> {
    let mut out = Vec::new();
    run(ex, doc, &mut out, None);
    out
}

/// Like [`document_claims`], also returning every cue attempt (for `explain`).
pub fn document_attempts(ex: &Extractor, doc: &Document) -> (Vec<Claim>, Vec<Attempt>) {
    let mut out = Vec::new();
    let mut trace = Vec::new();
    run(ex, doc, &mut out, Some(&mut trace));
    (out, trace)
}

fn run(ex: &Extractor, doc: &Document, out: &mut Vec<Claim>, trace: Option<&mut Vec<Attempt>>) {
    run_capped(ex, doc, out, trace, BLOCK_CAP);
}

fn run_capped(
    ex: &Extractor,
    doc: &Document,
    out: &mut Vec<Claim>,
    mut trace: Option<&mut Vec<Attempt>>,
    cap: usize,
) {
    let text = doc.text.as_str();
    let hits = ex.cues.hits(text);
    if hits.is_empty() {
        return;
    }
    let lines = LineIndex::new(text);
    let mut h = 0;
    while h < hits.len() {
        let (spans, be) = block_sentences(text, hits[h].pos, doc.lines_are_paragraphs, cap);
        let mut h_end = h;
        while h_end < hits.len() && hits[h_end].pos < be {
            h_end += 1;
        }
        let block_hits = &hits[h..h_end.max(h + 1)];
        let mut k = 0;
        for (si, s) in spans.iter().enumerate() {
            // Hits inside this sentence.
            while k < block_hits.len() && block_hits[k].pos < s.start {
                k += 1;
            }
            let mut k2 = k;
            while k2 < block_hits.len() && block_hits[k2].pos < s.end {
                k2 += 1;
            }
            if k2 == k {
                continue;
            }
            let candidates = ex.cues.candidates(&block_hits[k..k2], s.start);
            let sent = SentenceRef {
                text: &text[s.start..s.end],
                offset: s.start,
            };
            let prev = si.checked_sub(1).map(|p| SentenceRef {
                text: &text[spans[p].start..spans[p].end],
                offset: spans[p].start,
            });
            let (line, column) = lines.line_col(text, s.start);
            let origin = Origin {
                path: &doc.path,
                line,
                column,
                page: doc.page_of(s.start),
                record: doc.record.as_deref(),
            };
            let before = out.len();
            let toks = ex.extract(sent, prev, &origin, &candidates, out, trace.as_deref_mut());
            if out.len() > before {
                // The confidence features read the tags the span finder saw.
                let tagged = confidence::TaggedSentence::from_tokens(sent.text, sent.offset, toks);
                confidence::score_sentence(&ex.confidence, &ex.cues, &mut out[before..], &tagged);
            }
            k = k2;
        }
        h = h_end.max(h + 1);
    }
}

/// The sentences of the block around the hit at `pos`, and the byte where the block ends (hits
/// from there on belong to later blocks). A block cut short by the cap ([`BLOCK_CAP`]) inside a paragraph
/// loses the sentence at each cut edge, which may be a fragment: it starts and ends at sentence
/// boundaries, so a claim's sentence does not depend on where the hits before it fell.
fn block_sentences(text: &str, pos: usize, lines: bool, cap: usize) -> (Vec<SentenceSpan>, usize) {
    let block = sentences::block_around(text, pos, lines, cap);
    let mut spans = sentences::split_region(text, block.start, block.end);
    let mut end = block.end;
    if block.cut_end && spans.len() > 1 && spans[spans.len() - 1].start > pos {
        end = spans[spans.len() - 1].start;
        spans.pop();
    }
    if block.cut_start && spans.len() > 1 && spans[1].start <= pos {
        spans.remove(0);
    }
    (spans, end)
}

/// A sentence for the search index.
#[derive(Debug, Clone)]
pub struct IndexedSentence<'a> {
    pub text: &'a str,
    pub start: usize,
    pub line: usize,
}

/// Every sentence of a document, with its line, for the search index.
pub fn document_sentences(doc: &Document) -> Vec<IndexedSentence<'_>> {
    let lines = LineIndex::new(&doc.text);
    let spans = if doc.lines_are_paragraphs {
        // One paragraph a line: split each line alone, so that a heading never joins the next line.
        let mut v = Vec::new();
        let mut start = 0;
        for line in doc.text.split_inclusive('\n') {
            v.extend(sentences::split_region(
                &doc.text,
                start,
                start + line.len(),
            ));
            start += line.len();
        }
        v
    } else {
        sentences::split(&doc.text)
    };
    spans
        .into_iter()
        .map(|SentenceSpan { start, end }| IndexedSentence {
            text: &doc.text[start..end],
            start,
            line: lines.line(start),
        })
        .collect()
}

/// Extract claims from one sentence given as a string (for `explain` and examples).
pub fn sentence_attempts(ex: &Extractor, text: &str) -> (Vec<Claim>, Vec<Attempt>) {
    let doc = Document {
        path: "<sentence>".into(),
        record: None,
        text: text.to_string(),
        page_starts: Vec::new(),
        lines_are_paragraphs: false,
    };
    document_attempts(ex, &doc)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn doc(text: &str) -> Document {
        Document {
            path: "d.txt".into(),
            record: None,
            text: text.into(),
            page_starts: vec![],
            lines_are_paragraphs: false,
        }
    }

    #[test]
    fn line_and_column_are_one_based() {
        let t = "ab\ncdé f\n";
        let li = LineIndex::new(t);
        assert_eq!(li.line_col(t, 0), (1, 1));
        assert_eq!(li.line_col(t, 3), (2, 1));
        assert_eq!(li.line_col(t, t.find('f').unwrap()), (2, 5));
        // Asked again, backwards and across lines, the counting from the last offset agrees
        // with counting from the line's start.
        assert_eq!(li.line_col(t, 4), (2, 2));
        assert_eq!(li.line_col(t, 3), (2, 1));
        assert_eq!(li.line_col(t, 1), (1, 2));
        assert_eq!(li.line_col(t, t.find('f').unwrap()), (2, 5));
        assert_eq!(li.line(t.len()), 3);
    }

    #[test]
    fn claims_carry_document_offsets_and_lines() {
        let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
        let d = doc("Intro line.\n\nHeavy rain causes flooding. Nothing here.\n");
        let cs = document_claims(&ex, &d);
        assert_eq!(cs.len(), 1);
        let c = &cs[0];
        assert_eq!(&d.text[c.cause.start..c.cause.end], "Heavy rain");
        assert_eq!(&d.text[c.effect.start..c.effect.end], "flooding");
        assert_eq!((c.source.line, c.source.column), (3, 1));
        assert_eq!(
            &d.text[c.source.start..c.source.end],
            "Heavy rain causes flooding."
        );
    }

    /// Over real text (eLife articles, elife-articles/SOURCE.txt): every claim's sentence is a
    /// sentence of the whole document's split (the one the search index holds), and cutting
    /// blocks at 1 KB instead of 32 KB changes no claim but those whose sentence is longer than
    /// the cut allows.
    #[test]
    fn claims_keep_their_sentences_wherever_blocks_are_cut() {
        let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
        let articles = crate::testdata::elife_articles(40);
        let (mut claims, mut long) = (0, 0);
        for (path, text) in &articles {
            let d = crate::corpus::readers::text::text_document(
                &path.display().to_string(),
                None,
                text.clone(),
            );
            let whole: std::collections::HashSet<(usize, usize)> = document_sentences(&d)
                .iter()
                .map(|s| (s.start, s.start + s.text.len()))
                .collect();
            let key = |c: &Claim| {
                let s = (c.source.start, c.source.end);
                (s, c.cue.clone(), c.cause.start, c.effect.start)
            };
            let mut wide = Vec::new();
            run_capped(&ex, &d, &mut wide, None, BLOCK_CAP);
            let mut narrow = Vec::new();
            run_capped(&ex, &d, &mut narrow, None, 1024);
            for c in &wide {
                let span = (c.source.start, c.source.end);
                assert!(
                    whole.contains(&span),
                    "{}: {:?}",
                    path.display(),
                    c.sentence
                );
            }
            let narrow: Vec<_> = narrow.iter().map(key).collect();
            for c in &wide {
                if c.source.end - c.source.start > 1024 {
                    long += 1;
                } else {
                    assert!(
                        narrow.contains(&key(c)),
                        "{}: {:?}",
                        path.display(),
                        c.sentence
                    );
                }
            }
            claims += wide.len();
        }
        if !articles.is_empty() {
            assert!(
                claims > 2000 && long < claims / 100,
                "{claims} claims, {long} long"
            );
        }
    }

    #[test]
    fn sentence_opening_connective_takes_previous_sentence() {
        let ex = Extractor::new(&PatternSet::builtin().unwrap()).unwrap();
        let cs = document_claims(
            &ex,
            &doc("The dam failed. As a result, the valley flooded."),
        );
        assert_eq!(cs.len(), 1, "{cs:#?}");
        assert!(cs[0].cross_sentence);
        assert_eq!(cs[0].cause.text, "dam failed");
    }
}
