//! Sentence splitting: turns a document's text into sentence byte ranges.
//!
//! Cause-and-effect cues are matched per sentence, so a wrong break cuts a claim in two and a
//! missed break glues unrelated claims together. The stage is shaped as follows:
//!
//! 1. Hard blocks first: a blank line (or a Unicode paragraph/line separator) always ends a
//!    sentence, and so does a line starting a Markdown list item or heading, or the line after a
//!    heading. A single newline inside a paragraph is wrapped text and is read as a space.
//! 2. Inside each block the UAX #29 sentence rules give candidate breaks (`unicode-segmentation`,
//!    with a fast path for terminators in ASCII surroundings: see `uax29`).
//!    A sentence that opens with a mixed-case word ("mRNA levels fell") is a candidate too,
//!    though UAX #29 never breaks before a lower-case letter.
//! 3. Each candidate is then repaired with cheap, local checks of its surroundings: known
//!    abbreviations, initials, decimals and numbered items, and citation brackets (`[4]`,
//!    "(Author et al., 2019)"), which scientific and technical prose is full of.
//! 4. Sentences are trimmed, empty ones dropped, and over-long ones cut near `MAX_SENTENCE`
//!    bytes so that later stages stay bounded on text without punctuation.
//!
//! Every check looks at a bounded window around the break, so the whole stage is linear in the
//! input, allocates one copy of the region, compiles nothing per call and never panics.//!
//! The public face: [`split`] and [`split_region`] give [`SentenceSpan`]s; [`block_around`] gives
//! the paragraph around a position, so that extraction splits only the text near cue words.
//! `blocks` finds the hard blocks (step 1), `uax29` the candidate breaks (step 2), `repairs`
//! decides each candidate (step 3); this file chains them and trims and cuts (step 4).

mod blocks;
mod repairs;
#[cfg(test)]
mod tests;
mod uax29;

pub use blocks::{block_around, Block};

use blocks::{blocks, flatten_lines};
use repairs::{decide, mixed_case_starts, Decision};

/// A sentence as a byte range into its document's text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SentenceSpan {
    /// Byte offset of the sentence's first character.
    pub start: usize,
    /// Byte offset just past the sentence's last character.
    pub end: usize,
}

/// Sentences longer than this many bytes are cut at the last whitespace before the limit.
const MAX_SENTENCE: usize = 2000;

/// Split `text` into sentences. Ranges are byte offsets into `text`, non-overlapping, in order,
/// trimmed of surrounding whitespace, never empty, and always on char boundaries.
pub fn split(text: &str) -> Vec<SentenceSpan> {
    split_region(text, 0, text.len())
}

/// Split only the region `text[start..end]` (offsets relative to `text`; returned ranges are
/// also relative to `text`). Out-of-range or mid-character offsets are clamped inwards.
pub fn split_region(text: &str, start: usize, end: usize) -> Vec<SentenceSpan> {
    let end = floor_boundary(text, end.min(text.len()));
    let start = ceil_boundary(text, start.min(end));
    let mut out = Vec::new();
    if start >= end {
        return out;
    }
    // Newlines become spaces (same byte length, ASCII), so UAX #29 sees wrapped lines as one
    // line while every offset stays valid for `text`.
    let flat = flatten_lines(&text[start..end]);
    for (s, e) in blocks(text, start, end) {
        split_block(text, &flat[s - start..e - start], s, e, &mut out);
    }
    out
}

/// Split one hard block `text[s..e]`; `flat` is the same bytes with newlines as spaces.
fn split_block(text: &str, flat: &str, s: usize, e: usize, out: &mut Vec<SentenceSpan>) {
    let mut cur = s;
    let mut ends = Vec::new();
    uax29::sentence_ends(flat, &mut ends);
    mixed_case_starts(flat, &mut ends);
    for b in ends.into_iter().map(|off| s + off) {
        if b <= cur || b >= e {
            continue;
        }
        let at = match decide(text, cur, b, e) {
            Decision::Keep => b,
            Decision::MoveTo(moved) => moved,
            Decision::Merge => continue,
        };
        push(text, cur, at, out);
        cur = at;
    }
    push(text, cur, e, out);
}

/// Trim `text[s..e]`, cut it into pieces of at most `MAX_SENTENCE` bytes, and push them.
fn push(text: &str, s: usize, e: usize, out: &mut Vec<SentenceSpan>) {
    let piece = &text[s..e];
    let mut start = s + (piece.len() - piece.trim_start().len());
    let end = s + piece.trim_end().len();
    while start < end {
        let mut cut = end;
        if end - start > MAX_SENTENCE {
            let limit = floor_boundary(text, start + MAX_SENTENCE);
            cut = text[start..limit]
                .rfind(char::is_whitespace)
                .map(|k| start + k)
                .filter(|&k| k > start)
                .unwrap_or(limit);
        }
        let t = text[start..cut].trim_end();
        if !t.is_empty() {
            out.push(SentenceSpan {
                start,
                end: start + t.len(),
            });
        }
        let rest = &text[cut..end];
        start = cut + (rest.len() - rest.trim_start().len());
    }
}

/// The largest char boundary `<= i` (`i <= text.len()`).
fn floor_boundary(text: &str, mut i: usize) -> usize {
    while i > 0 && !text.is_char_boundary(i) {
        i -= 1;
    }
    i
}

/// The smallest char boundary `>= i` (`i <= text.len()`).
fn ceil_boundary(text: &str, mut i: usize) -> usize {
    while i < text.len() && !text.is_char_boundary(i) {
        i += 1;
    }
    i
}
