//! Markdown via pulldown-cmark: prose only. Code blocks, front matter and raw HTML are left
//! out; headings, paragraphs, list items, quotes and table cells each end a block, so each is a
//! sentence boundary. Offsets are into the extracted text.

use super::emit_decoded;
use super::{collapse_ws, push_block};
use crate::corpus::document::{Document, ReadOptions, Reader, Warnings};
use crate::error::ReadError;
use pulldown_cmark::{Event, Options, Parser, Tag, TagEnd};

/// Markdown files.
#[derive(Debug, Default)]
pub struct MarkdownReader;

/// The prose of a Markdown text, one block per paragraph-like element.
pub fn markdown_text(src: &str) -> String {
    let opts = Options::ENABLE_YAML_STYLE_METADATA_BLOCKS
        | Options::ENABLE_PLUSES_DELIMITED_METADATA_BLOCKS
        | Options::ENABLE_TABLES
        | Options::ENABLE_FOOTNOTES
        | Options::ENABLE_STRIKETHROUGH;
    let mut out = String::new();
    let mut block = String::new();
    let mut skip = 0usize;
    for ev in Parser::new_ext(src, opts) {
        match ev {
            Event::Start(Tag::CodeBlock(_) | Tag::MetadataBlock(_) | Tag::HtmlBlock) => skip += 1,
            Event::End(TagEnd::CodeBlock | TagEnd::MetadataBlock(_) | TagEnd::HtmlBlock) => {
                skip = skip.saturating_sub(1)
            }
            _ if skip > 0 => {}
            Event::Start(
                Tag::Paragraph
                | Tag::Heading { .. }
                | Tag::Item
                | Tag::BlockQuote(_)
                | Tag::TableCell
                | Tag::FootnoteDefinition(_),
            )
            | Event::End(
                TagEnd::Paragraph
                | TagEnd::Heading(_)
                | TagEnd::Item
                | TagEnd::BlockQuote(_)
                | TagEnd::TableCell
                | TagEnd::FootnoteDefinition,
            )
            | Event::Rule => {
                push_block(&mut out, &collapse_ws(&block));
                block.clear();
            }
            Event::Text(t) | Event::Code(t) => block.push_str(&t),
            Event::SoftBreak | Event::HardBreak => block.push(' '),
            _ => {}
        }
    }
    push_block(&mut out, &collapse_ws(&block));
    out
}

impl Reader for MarkdownReader {
    fn name(&self) -> &'static str {
        "markdown"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        _opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        emit_decoded(label, bytes, warnings, emit, |src| Ok(markdown_text(&src)))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn code_and_front_matter_are_dropped_and_items_are_blocks() {
        let md =
            "---\ntitle: x causes y\n---\n\n# Heat and rain\n\nDrought is caused\nby heat.\n\n\
                  ```\nlet a = b causes c;\n```\n\n- first item\n- second item\n";
        let t = markdown_text(md);
        assert_eq!(
            t,
            "Heat and rain\n\nDrought is caused by heat.\n\nfirst item\n\nsecond item"
        );
    }
}
