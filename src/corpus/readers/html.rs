//! HTML via html5ever (through scraper): the text of block elements, each block a sentence
//! boundary; page furniture (script, style, nav, header, footer, aside, noscript, forms, the
//! head) dropped; entities decoded by the parser.
//!
//! Saved pages carry their site's chrome in plain `div`s, so three more rules find the body:
//! when the page marks its main content (`<main>` or the WAI-ARIA `role="main"`), only that is
//! read; elements with a WAI-ARIA landmark role that is not content (navigation, banner,
//! contentinfo, complementary, search) are dropped, and so are elements whose `class` or `id`
//! names page furniture ([`FURNITURE`]), and lists that are nearly all link text (menus);
//! and a back-matter heading ("References", "External
//! links", ...) drops everything up to the next heading of the same or a higher level, unless
//! references are kept.
//!
//! The tree is walked with an explicit iterator, never by recursion, so deeply nested input
//! cannot overflow the stack; input nested deeper than [`MAX_DEPTH`] is refused before parsing,
//! because the parser's own cost grows with depth.

use super::emit_decoded;
use super::{collapse_ws, push_block};
use crate::corpus::document::{Document, ReadOptions, Reader, Warnings};
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

/// WAI-ARIA landmark roles that are not the page's content.
const DROPPED_ROLES: &[&str] = &[
    "navigation",
    "banner",
    "contentinfo",
    "complementary",
    "search",
];

/// Words in a `class` or `id` (whole, or one `-`/`_` part of it) that name page furniture.
pub const FURNITURE: &[&str] = &[
    "nav",
    "navbar",
    "navigation",
    "menu",
    "header",
    "footer",
    "sidebar",
    "breadcrumb",
    "breadcrumbs",
    "toolbar",
    "share",
    "social",
    "advert",
    "advertisement",
    "ads",
    "cookie",
    "banner",
    "skip",
    "jump",
    "noprint",
    "hatnote",
    "catlinks",
    "printfooter",
    "editsection",
    "comments",
];

/// Headings that open back matter rather than body text.
const BACK_MATTER: &[&str] = &[
    "references",
    "bibliography",
    "works cited",
    "literature cited",
    "references and notes",
    "notes",
    "footnotes",
    "citations",
    "further reading",
    "external links",
    "see also",
];

fn is_furniture(e: &scraper::node::Element) -> bool {
    if e.attr("role")
        .is_some_and(|r| DROPPED_ROLES.contains(&r.trim()))
    {
        return true;
    }
    let names = e.attr("class").into_iter().chain(e.attr("id"));
    names.flat_map(str::split_whitespace).any(|t| {
        let t = t.to_ascii_lowercase();
        FURNITURE.contains(&t.as_str()) || t.split(['-', '_']).any(|p| FURNITURE.contains(&p))
    })
}

/// A list whose text is nearly all link text is a menu (a site or in-page table of contents).
fn is_link_list(n: ego_tree::NodeRef<'_, Node>) -> bool {
    let Some(el) = scraper::ElementRef::wrap(n) else {
        return false;
    };
    if !matches!(el.value().name(), "ul" | "ol") {
        return false;
    }
    let count = |it: &mut dyn Iterator<Item = &str>| -> usize {
        it.map(|t| t.chars().filter(|c| !c.is_whitespace()).count())
            .sum()
    };
    let all = count(&mut el.text());
    let links: usize = el
        .descendants()
        .filter_map(scraper::ElementRef::wrap)
        .filter(|e| e.value().name() == "a")
        .map(|a| count(&mut a.text()))
        .sum();
    all > 0 && links * 10 >= all * 9
}

fn heading_level(name: &str) -> Option<u8> {
    match name.as_bytes() {
        [b'h', d @ b'1'..=b'6'] => Some(d - b'0'),
        _ => None,
    }
}

/// Whether a heading's text names back matter; a trailing "edit" link word is ignored.
fn is_back_matter(text: &str) -> bool {
    let words: Vec<String> = text
        .split(|c: char| !c.is_alphabetic())
        .filter(|w| !w.is_empty())
        .map(str::to_lowercase)
        .collect();
    let n = words.len() - usize::from(words.last().is_some_and(|w| w == "edit"));
    BACK_MATTER.contains(&words[..n].join(" ").as_str())
}

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
pub fn html_text(src: &str, cut_references: bool) -> Result<String, ReadError> {
    if nesting_estimate(src) > MAX_DEPTH * 4 {
        return Err(ReadError::Malformed(format!(
            "HTML nested deeper than {} levels",
            MAX_DEPTH * 4
        )));
    }
    let doc = Html::parse_document(src);
    let main = scraper::Selector::parse("main, [role=main]").ok();
    let start = main
        .and_then(|s| doc.select(&s).next())
        .map(|m| *m)
        .unwrap_or_else(|| doc.tree.root());
    let mut out = String::new();
    let mut block = String::new();
    let mut skip = 0usize;
    let mut depth = 0usize;
    // The level of the back-matter heading being skipped, if any.
    let mut back: Option<u8> = None;
    for edge in start.traverse() {
        match edge {
            Edge::Open(n) => match n.value() {
                Node::Element(e) => {
                    depth += 1;
                    let name = e.name();
                    if let (Some(level), true) = (heading_level(name), skip == 0 && cut_references)
                    {
                        if back.is_some_and(|b| level <= b) {
                            back = None;
                        }
                        if back.is_none() {
                            let text: String = scraper::ElementRef::wrap(n)
                                .map(|h| h.text().collect())
                                .unwrap_or_default();
                            if is_back_matter(&text) {
                                push_block(&mut out, &collapse_ws(&block));
                                block.clear();
                                back = Some(level);
                            }
                        }
                    }
                    if skip > 0
                        || DROPPED.contains(&name)
                        || depth > MAX_DEPTH
                        || is_furniture(e)
                        || is_link_list(n)
                    {
                        skip += 1;
                    } else if BLOCKS.contains(&name) {
                        push_block(&mut out, &collapse_ws(&block));
                        block.clear();
                    }
                }
                Node::Text(t) if skip == 0 && back.is_none() => block.push_str(t),
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
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        emit_decoded(label, bytes, warnings, emit, |src| {
            html_text(&src, opts.cut_references)
        })
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
            html_text(h, true).unwrap(),
            "Heat & rain\n\nDrought is caused by heat.\n\nSecond block"
        );
    }

    #[test]
    fn deep_nesting_neither_overflows_nor_hangs() {
        let n = 100_000;
        let h = format!("{}text{}", "<div>".repeat(n), "</div>".repeat(n));
        assert!(html_text(&h, true).is_err());
        let n = 3000;
        let h = format!("{}deep text{}", "<span>".repeat(n), "</span>".repeat(n));
        assert!(html_text(&h, true).unwrap().contains("deep text"));
    }

    #[test]
    fn main_content_landmarks_furniture_classes_and_back_matter() {
        let h = "<html><body><div class=\"site-nav\">Home</div><div role=\"main\">\
                 <div role=\"navigation\">Contents</div><ul><li><a href=\"#r\">Results</a></li></ul><h2>Results<span class=\"mw-editsection\">\
                 [edit]</span></h2><p>Heat causes drought.</p><h2>References[edit]</h2>\
                 <h3>Books</h3><p>A. Author (2020).</p><h2>Discussion</h2><p>Rain helps.</p>\
                 </div><div>outside main</div></body></html>";
        assert_eq!(
            html_text(h, true).unwrap(),
            "Results\n\nHeat causes drought.\n\nDiscussion\n\nRain helps."
        );
        assert!(html_text(h, false).unwrap().contains("A. Author"));
    }
}
