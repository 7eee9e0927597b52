//! Which reader reads a file: the extension, the first bytes, or the format forced.

use super::document::{InputFormat, Reader};
use super::readers::html::HtmlReader;
use super::readers::jsonl::JsonlReader;
use super::readers::markdown::MarkdownReader;
use super::readers::pdf::PdfReader;
use super::readers::text::TextReader;
use std::path::Path;

static TEXT: TextReader = TextReader;
static MARKDOWN: MarkdownReader = MarkdownReader;
static HTML: HtmlReader = HtmlReader;
static PDF: PdfReader = PdfReader;
static JSONL: JsonlReader = JsonlReader;

pub(super) fn reader_of(f: InputFormat) -> &'static dyn Reader {
    match f {
        InputFormat::Auto | InputFormat::Text => &TEXT,
        InputFormat::Markdown => &MARKDOWN,
        InputFormat::Html => &HTML,
        InputFormat::Pdf => &PDF,
        InputFormat::Jsonl => &JSONL,
    }
}

/// The file name's extension(s), lower-cased, with a compression suffix split off.
pub(super) fn extensions(path: &Path) -> (Option<String>, Option<String>) {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().to_ascii_lowercase())
        .unwrap_or_default();
    let mut parts = name.rsplit('.');
    let last = parts.next().map(str::to_string);
    if name.contains('.') {
        if let Some(l @ ("gz" | "zst")) = last.as_deref() {
            let inner = if name.matches('.').count() >= 2 {
                parts.next().map(str::to_string)
            } else {
                None
            };
            return (inner, Some(l.to_string()));
        }
        return (last, None);
    }
    (None, None)
}

/// The format an extension names, if any.
pub(super) fn format_by_extension(path: &Path) -> Option<InputFormat> {
    let (ext, _) = extensions(path);
    match ext.as_deref()? {
        "txt" | "text" => Some(InputFormat::Text),
        "md" | "markdown" => Some(InputFormat::Markdown),
        "html" | "htm" | "xhtml" => Some(InputFormat::Html),
        "pdf" => Some(InputFormat::Pdf),
        "jsonl" | "ndjson" => Some(InputFormat::Jsonl),
        _ => None,
    }
}

/// Choose a format: strong content signs (a PDF header, an HTML doctype or root tag) win, then
/// the extension, then weak signs (a first line that is a JSON object), then text.
pub(super) fn sniff(head: &[u8], path: &Path) -> InputFormat {
    let trimmed = {
        let h = head.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(head);
        let start = h
            .iter()
            .position(|b| !b.is_ascii_whitespace())
            .unwrap_or(h.len());
        &h[start..]
    };
    if trimmed.starts_with(b"%PDF-") {
        return InputFormat::Pdf;
    }
    let lower: Vec<u8> = trimmed
        .iter()
        .take(512)
        .map(u8::to_ascii_lowercase)
        .collect();
    if lower.starts_with(b"<!doctype html") || lower.starts_with(b"<html") {
        return InputFormat::Html;
    }
    if let Some(f) = format_by_extension(path) {
        return f;
    }
    if trimmed.starts_with(b"{") {
        let mut lines = trimmed.splitn(2, |&b| b == b'\n');
        let first = lines.next().unwrap_or(trimmed);
        let whole_line = lines.next().is_some();
        match serde_json::from_slice::<serde_json::Value>(first) {
            Ok(v) if v.is_object() => return InputFormat::Jsonl,
            // A first record longer than the bytes looked at (a stream's buffer, at least
            // 8 KiB): valid JSON as far as it goes counts as the same sign. A short file that
            // ends inside its JSON is no such sign.
            Err(e) if e.is_eof() && !whole_line && first.len() >= 4096 => {
                return InputFormat::Jsonl
            }
            _ => {}
        }
    }
    InputFormat::Text
}

/// Whether a folder walk reads this file: a known extension, possibly compressed.
pub(super) fn is_known_file(path: &Path) -> bool {
    format_by_extension(path).is_some()
}
