//! HTML via html5ever (through scraper): the text of block elements, each block a sentence
//! boundary; page furniture (script, style, nav, header, footer, aside, noscript, forms, the
//! head) dropped; entities decoded by the parser.
//!
//! The tree is walked with an explicit iterator, never by recursion, so deeply nested input
//! cannot overflow the stack; input nested deeper than [`MAX_DEPTH`] is refused before parsing,
//! because the parser's own cost grows with depth.

use super::{collapse_ws, push_block};
use crate::corpus::{emit_decoded, Document, ReadOptions, Reader, Warnings};
use crate::error::ReadError;
use ego_tree::iter::Edge;
use scraper::{Html, Node};

/// HTML files.
#[derive(Debug, Default)]
pub struct HtmlReader;

/// Deepest tag nesting read; deeper documents are refused as malformed.
pub const MAX_DEPTH: usize = 4096;

const DROPPED: &[&str] = &[
    "script", "style", "nav", "header", "footer", "aside", "noscript", "head", "template", "form",
    "button", "select", "svg", "iframe", "object", "menu",
];

const BLOCKS: &[&str] = &[
    "p",
    "div",
    "h1",
    "h2",
    "h3",
    "h4",
    "h5",
    "h6",
    "li",
    "td",
    "th",
    "tr",
    "br",
    "blockquote",
    "pre",
    "section",
    "article",
    "main",
    "table",
    "ul",
    "ol",
    "dl",
    "dt",
    "dd",
    "figure",
    "figcaption",
    "caption",
    "hr",
    "address",
    "details",
    "summary",
    "body",
    "html",
];

/// A cheap upper bound on nesting: open tags minus close tags, from the raw text.
fn nesting_estimate(src: &str) -> usize {
    let (mut depth, mut max) = (0usize, 0usize);
    let b = src.as_bytes();
    for (i, _) in src.match_indices('<') {
        match b.get(i + 1) {
            Some(b'/') => depth = depth.saturating_sub(1),
            Some(c) if c.is_ascii_alphabetic() => {
                depth += 1;
                max = max.max(depth);
            }
            _ => {}
        }
    }
    max
}

/// The block text of an HTML page.
pub fn html_text(src: &str) -> Result<String, ReadError> {
    if nesting_estimate(src) > MAX_DEPTH * 4 {
        return Err(ReadError::Malformed(format!(
            "HTML nested deeper than {} levels",
            MAX_DEPTH * 4
        )));
    }
    let doc = Html::parse_document(src);
    let mut out = String::new();
    let mut block = String::new();
    let mut skip = 0usize;
    let mut depth = 0usize;
    for edge in doc.tree.root().traverse() {
        match edge {
            Edge::Open(n) => match n.value() {
                Node::Element(e) => {
                    depth += 1;
                    let name = e.name();
                    if skip > 0 || DROPPED.contains(&name) || depth > MAX_DEPTH {
                        skip += 1;
                    } else if BLOCKS.contains(&name) {
                        push_block(&mut out, &collapse_ws(&block));
                        block.clear();
                    }
                }
                Node::Text(t) if skip == 0 => block.push_str(t),
                _ => {}
            },
            Edge::Close(n) => {
                if let Node::Element(e) = n.value() {
                    depth = depth.saturating_sub(1);
                    if skip > 0 {
                        skip -= 1;
                    } else if BLOCKS.contains(&e.name()) {
                        push_block(&mut out, &collapse_ws(&block));
                        block.clear();
                    } else {
                        // Inline elements join words; a space keeps "a<b>b</b>" apart only
                        // where the source had one, so nothing is added here.
                    }
                }
            }
        }
    }
    push_block(&mut out, &collapse_ws(&block));
    Ok(out)
}

impl Reader for HtmlReader {
    fn name(&self) -> &'static str {
        "html"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        _opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        emit_decoded(label, bytes, warnings, emit, |src| html_text(&src))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn blocks_are_kept_and_furniture_dropped() {
        let h = "<!doctype html><html><head><title>T</title><style>p{}</style></head><body>\
                 <nav>Home | About</nav><header>Site</header><h1>Heat &amp; rain</h1>\
                 <p>Drought is <b>caused</b> by heat.</p><div>Second block<script>x()</script></div>\
                 <footer>Copyright</footer></body></html>";
        assert_eq!(
            html_text(h).unwrap(),
            "Heat & rain\n\nDrought is caused by heat.\n\nSecond block"
        );
    }

    #[test]
    fn deep_nesting_neither_overflows_nor_hangs() {
        let n = 100_000;
        let h = format!("{}text{}", "<div>".repeat(n), "</div>".repeat(n));
        assert!(html_text(&h).is_err());
        let n = 3000;
        let h = format!("{}deep text{}", "<span>".repeat(n), "</span>".repeat(n));
        assert!(html_text(&h).unwrap().contains("deep text"));
    }
}
