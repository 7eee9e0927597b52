//! The format readers: each turns one file's bytes (or, for JSON Lines, a stream) into
//! [`Document`]s.
//!
//! Every reader produces its own text: markup, code blocks, page furniture and the like are left
//! out, so claim offsets are byte offsets into the text the reader produced, not into the file.
//! For plain text the two are the same. Parsing is left to well-kept crates (pulldown-cmark,
//! html5ever via scraper, serde_json, pdf-extract); the code here only decides what is body text
//! and where the boundaries fall.

pub mod html;
pub mod jsonl;
pub mod markdown;
pub mod pdf;
pub mod text;

use crate::corpus::document::{Document, Warnings};
use crate::error::ReadError;

/// Join extracted blocks with blank lines, so every block ends a sentence.
pub(crate) fn push_block(out: &mut String, block: &str) {
    let block = block.trim();
    if block.is_empty() {
        return;
    }
    if !out.is_empty() {
        out.push_str("\n\n");
    }
    out.push_str(block);
}

/// Collapse runs of whitespace (including line breaks) into one space.
pub(crate) fn collapse_ws(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    let mut space = false;
    for c in s.chars() {
        if c.is_whitespace() {
            space = true;
        } else {
            if space && !out.is_empty() {
                out.push(' ');
            }
            space = false;
            out.push(c);
        }
    }
    out
}

/// The common body of the readers of text-based formats: decode the bytes as text (reporting
/// any fallback encoding), turn the text into the reader's own text with `extract`, and emit one
/// document without pages.
fn emit_decoded(
    label: &str,
    bytes: &[u8],
    warnings: &mut Warnings,
    emit: &mut dyn FnMut(Document),
    extract: impl FnOnce(String) -> Result<String, ReadError>,
) -> Result<(), ReadError> {
    let src = text::decode_text(label, bytes, warnings)?;
    emit(text::text_document(label, None, extract(src)?));
    Ok(())
}
