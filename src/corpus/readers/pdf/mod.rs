//! PDF via pdf-extract: the text of each page in content order, cleaned into paragraphs.
//!
//! Cleaning, in order: lines that repeat at the top or bottom of many pages (running headers
//! and footers, with digits masked so "Page 3" matches "Page 4") and bare page numbers are
//! dropped; lines are joined into paragraphs (a blank line, or a short line ending a sentence,
//! ends one); a hyphen at a line end before a lower-case letter is undone ("regu-" + "lation");
//! the text stops at a line that is only "References", "Bibliography" or the like, unless
//! `--keep-references` is given. `page_starts` records where each page's text begins, so claims
//! carry their page. A PDF without extractable text (a scan) is an error saying so.
//!
//! Typographic ligatures (U+FB00–U+FB06, "ﬁ" for "fi") are spelt out so words match their
//! plain spelling, and lines that are mostly one-character tokens (glyphs without a usable
//! character map, or figure axis labels) are dropped as not prose.
//!
//! Fonts of form XObjects (figures) get names of their own before extraction, as pdf-extract
//! caches fonts by resource name for a whole page, forms included.
//!
//! This file turns a PDF into page texts (the repairs pdf-extract needs, and the device that
//! reads positioned glyphs) and is the reader; `clean` turns the page texts into paragraphs,
//! which needs no PDF at all.

mod clean;

use crate::corpus::document::{Document, ReadOptions, Reader, Warnings};
use crate::error::ReadError;
use clean::clean_pages;
use std::collections::HashMap;

/// PDF files.
#[derive(Debug, Default)]
pub struct PdfReader;

/// One page's text from pdf-extract's stream of positioned glyphs. pdf-extract's own text
/// output decides word breaks only where a text-showing operator starts, so words that a
/// typesetter places with kerning offsets inside one operator (groff, many table cells) run
/// together; here the gap before every glyph is measured. At an operator start, a move down and
/// back to the left is a line break, a move down of one and a half lines a blank line
/// (pdf-extract's thresholds).
/// Within a line, a gap wider than the line's typical gap between letters (its median, which
/// is about zero when the font's widths are right and larger when they are not) by a tenth of
/// the font size is a space.
/// The gap (in font sizes) inside one text operator that counts as a word break.
const INNER_SPACE: f64 = 0.2;

#[derive(Default)]
struct PageText {
    text: String,
    height: f64,
    last_end: f64,
    last_y: f64,
    started: bool,
    /// Whether the next glyph starts a text-showing operator's word.
    word_start: bool,
    /// The current line: each glyph with the gap before it (a negative value for a glyph
    /// inside an operator), and the font size.
    line: Vec<(String, Option<f64>, f64, bool)>,
}

impl PageText {
    fn flush_line(&mut self) {
        let mut gaps: Vec<f64> = self.line.iter().filter_map(|g| g.1).collect();
        gaps.sort_by(f64::total_cmp);
        let typical = gaps.get(gaps.len() / 2).copied().unwrap_or(0.0).max(0.0);
        for (ch, gap, size, word_start) in self.line.drain(..) {
            // Inside one operator, only a gap of about a space's width (a fifth of the font
            // size) breaks a word: some fonts' widths are off by less than that.
            let need = if word_start { 0.1 } else { INNER_SPACE };
            if gap.is_some_and(|g| g > typical + size * need)
                && !self.text.ends_with(char::is_whitespace)
                && !ch.starts_with(char::is_whitespace)
            {
                self.text.push(' ');
            }
            self.text.push_str(&ch);
        }
    }
}

impl pdf_extract::OutputDev for PageText {
    fn begin_page(
        &mut self,
        _page: u32,
        media_box: &pdf_extract::MediaBox,
        _art_box: Option<(f64, f64, f64, f64)>,
    ) -> Result<(), pdf_extract::OutputError> {
        self.height = media_box.ury - media_box.lly;
        Ok(())
    }
    fn end_page(&mut self) -> Result<(), pdf_extract::OutputError> {
        self.flush_line();
        Ok(())
    }
    fn output_character(
        &mut self,
        trm: &pdf_extract::Transform,
        width: f64,
        _spacing: f64,
        font_size: f64,
        ch: &str,
    ) -> Result<(), pdf_extract::OutputError> {
        // Device position with y growing down the page, and the font size after the text
        // matrix (the side of a square of the same area as the transformed em box).
        let (x, y) = (trm.m31, self.height - trm.m32);
        let size = (font_size * (trm.m11 + trm.m21) * font_size * (trm.m12 + trm.m22))
            .abs()
            .sqrt();
        let mut gap = None;
        if self.started {
            let dy = (y - self.last_y).abs();
            // Line breaks are decided where an operator starts, as pdf-extract does: glyphs
            // inside one operator stay on its line whatever their jitter.
            let blank = self.word_start && dy > size * 1.5;
            let back = self.word_start && x < self.last_end && dy > size * 0.5;
            if blank || back {
                self.flush_line();
                self.text
                    .push_str(if blank && back { "\n\n" } else { "\n" });
            } else {
                gap = Some(x - self.last_end);
            }
        }
        self.line.push((ch.to_string(), gap, size, self.word_start));
        self.word_start = false;
        self.started = true;
        self.last_y = y;
        self.last_end = x + width * size;
        Ok(())
    }
    fn begin_word(&mut self) -> Result<(), pdf_extract::OutputError> {
        self.word_start = true;
        Ok(())
    }
    fn end_word(&mut self) -> Result<(), pdf_extract::OutputError> {
        Ok(())
    }
    fn end_line(&mut self) -> Result<(), pdf_extract::OutputError> {
        Ok(())
    }
}

/// Spell out the "move to the next line and show text" operators `'` and `"` (PDF 1.7,
/// 9.4.3), which pdf-extract does not interpret, so their text would be lost (ghostscript
/// writes them for groff's output): `'` is `T*` then `Tj`; `"` sets `Tw` and `Tc` first. Pages
/// whose content cannot be decoded are left as they are.
fn expand_quote_operators(doc: &mut pdf_extract::Document) {
    use pdf_extract::content::Operation;
    let ids: Vec<pdf_extract::ObjectId> = doc.get_pages().values().copied().collect();
    for id in ids {
        let Ok(mut content) = doc.get_and_decode_page_content(id) else {
            continue;
        };
        if !content
            .operations
            .iter()
            .any(|o| o.operator == "'" || o.operator == "\"")
        {
            continue;
        }
        let mut ops = Vec::with_capacity(content.operations.len() * 2);
        for op in content.operations.drain(..) {
            match op.operator.as_str() {
                "'" => {
                    ops.push(Operation::new("T*", vec![]));
                    ops.push(Operation::new("Tj", op.operands));
                }
                "\"" => match <[pdf_extract::Object; 3]>::try_from(op.operands) {
                    Ok([aw, ac, text]) => {
                        ops.push(Operation::new("Tw", vec![aw]));
                        ops.push(Operation::new("Tc", vec![ac]));
                        ops.push(Operation::new("T*", vec![]));
                        ops.push(Operation::new("Tj", vec![text]));
                    }
                    Err(operands) => ops.push(Operation::new("\"", operands)),
                },
                _ => ops.push(op),
            }
        }
        content.operations = ops;
        if let Ok(bytes) = content.encode() {
            // On failure the page keeps its original content.
            let _ = doc.change_page_content(id, bytes);
        }
    }
}

/// Give the fonts of every form XObject (a figure or other graphic drawn as content of its own)
/// names of their own. A form's font names belong to its own resource dictionary (PDF 1.7,
/// 8.10.1), so a figure may call its Helvetica `/F4` on a page whose text font is also `/F4`;
/// pdf-extract caches fonts by name for a whole page, nested forms included, and then decodes
/// the later text with the font first met under that name (two-byte codes of a CID font read
/// as one-byte Helvetica codes: "\0U\0\0\0V" for "(a)"). Each font a form names gets an alias
/// made from its object number (the same alias for the same font object wherever it is used,
/// so a shared cache entry is then the right font), and the form's `Tf` operators use it. The
/// old names stay, so a form whose content cannot be decoded or encoded is left as it was.
fn give_form_fonts_own_names(doc: &mut pdf_extract::Document) {
    use pdf_extract::content::Content;
    use pdf_extract::Object;
    let forms: Vec<pdf_extract::ObjectId> = doc
        .objects
        .iter()
        .filter_map(|(id, o)| match o {
            Object::Stream(s)
                if s.dict
                    .get(b"Subtype")
                    .and_then(Object::as_name)
                    .is_ok_and(|n| n == b"Form") =>
            {
                Some(*id)
            }
            _ => None,
        })
        .collect();
    for id in forms {
        let Some(fonts) = form_font_dict_mut(doc, id).map(|d| d.clone()) else {
            continue;
        };
        let aliases: HashMap<Vec<u8>, Vec<u8>> = fonts
            .iter()
            .map(|(name, font)| {
                let alias = match font {
                    Object::Reference((n, g)) => format!("HsFont{n}_{g}"),
                    _ => format!("HsFont{}_{}_{}", id.0, id.1, String::from_utf8_lossy(name)),
                };
                (name.clone(), alias.into_bytes())
            })
            .collect();
        let Ok(Object::Stream(stream)) = doc.get_object(id) else {
            continue;
        };
        let Ok(mut content) = stream
            .get_plain_content()
            .and_then(|bytes| Content::decode(&bytes))
        else {
            continue;
        };
        let mut renamed = false;
        for op in content.operations.iter_mut().filter(|o| o.operator == "Tf") {
            if let Some(Object::Name(name)) = op.operands.first_mut() {
                if let Some(alias) = aliases.get(name.as_slice()) {
                    name.clone_from(alias);
                    renamed = true;
                }
            }
        }
        if !renamed {
            continue;
        }
        let Ok(bytes) = content.encode() else {
            continue;
        };
        let Some(dict) = form_font_dict_mut(doc, id) else {
            continue;
        };
        for (name, alias) in &aliases {
            if let Ok(font) = fonts.get(name) {
                dict.set(alias.clone(), font.clone());
            }
        }
        if let Ok(Object::Stream(stream)) = doc.get_object_mut(id) {
            stream.set_plain_content(bytes);
        }
    }
}

/// The font dictionary of a form XObject's own resources, wherever it is stored (inline or as
/// an object of its own, at either level); `None` for a form that uses its caller's resources.
fn form_font_dict_mut(
    doc: &mut pdf_extract::Document,
    form: pdf_extract::ObjectId,
) -> Option<&mut pdf_extract::Dictionary> {
    let stream = doc.get_object(form).ok()?.as_stream().ok()?;
    let resources = stream.dict.get(b"Resources").ok()?;
    let resources_ref = resources.as_reference().ok();
    let resources = match resources_ref {
        Some(r) => doc.get_dictionary(r).ok()?,
        None => resources.as_dict().ok()?,
    };
    if let Ok(fonts) = resources
        .get(b"Font")
        .and_then(pdf_extract::Object::as_reference)
    {
        return doc.get_object_mut(fonts).ok()?.as_dict_mut().ok();
    }
    let resources = match resources_ref {
        Some(r) => doc.get_object_mut(r).ok()?.as_dict_mut().ok()?,
        None => doc
            .get_object_mut(form)
            .ok()?
            .as_stream_mut()
            .ok()?
            .dict
            .get_mut(b"Resources")
            .ok()?
            .as_dict_mut()
            .ok()?,
    };
    resources.get_mut(b"Font").ok()?.as_dict_mut().ok()
}

/// The text of every page. An encrypted PDF is opened with the empty password (owner-only
/// protection); one that needs a real password is an error saying so. A page that cannot be
/// read is a warning and an empty page, so later pages keep their numbers.
fn page_texts(
    label: &str,
    bytes: &[u8],
    warnings: &mut Warnings,
) -> Result<Vec<String>, ReadError> {
    let mut doc = pdf_extract::Document::load_mem(bytes)
        .map_err(|e| ReadError::Malformed(format!("cannot read this PDF: {e}")))?;
    if doc.is_encrypted() && doc.decrypt("").is_err() {
        return Err(ReadError::Malformed(
            "encrypted PDF that needs a password (hearsay reads only PDFs that open without one)"
                .into(),
        ));
    }
    expand_quote_operators(&mut doc);
    give_form_fonts_own_names(&mut doc);
    let numbers: Vec<(u32, pdf_extract::ObjectId)> = doc.get_pages().into_iter().collect();
    let mut pages = Vec::with_capacity(numbers.len());
    for (n, id) in numbers {
        let mut page = PageText::default();
        // The extraction library assumes what a well-formed page has; check it first.
        if let Err(why) = check_page(&mut doc, id) {
            warnings.push(format!("{label}: page {n}: {why}"));
            pages.push(String::new());
            continue;
        }
        let r = crate::corpus::panics::contain(|| pdf_extract::output_doc_page(&doc, &mut page, n));
        match r {
            Ok(Ok(())) => {}
            Ok(Err(e)) => {
                warnings.push(format!("{label}: page {n}: cannot read its text: {e}"));
                page.text.clear();
            }
            Err(_) => {
                warnings.push(format!(
                    "{label}: page {n}: the PDF library failed on this page (malformed page)"
                ));
                page.text.clear();
            }
        }
        pages.push(page.text);
    }
    Ok(pages)
}

/// US Letter in points: the size given to a page that states none.
const DEFAULT_MEDIA_BOX: [i64; 4] = [0, 0, 612, 792];

/// Whether page `id` can be handed to the extraction library, which panics on a page object
/// that is not a dictionary, on unreadable content and on a missing or short `MediaBox`. A
/// page without a usable `MediaBox` (its own or inherited) gets a Letter-sized one, as viewers
/// do; the others are reasons to skip the page.
fn check_page(doc: &mut pdf_extract::Document, id: pdf_extract::ObjectId) -> Result<(), String> {
    use pdf_extract::Object;
    if doc.get_dictionary(id).is_err() {
        return Err("the page object is not a dictionary".into());
    }
    if doc.get_page_content(id).is_err() {
        return Err("its content stream cannot be read".into());
    }
    let usable = |o: &Object, doc: &pdf_extract::Document| {
        let o = match o {
            Object::Reference(r) => doc.get_object(*r).ok(),
            o => Some(o),
        };
        o.and_then(|o| o.as_array().ok()).is_some_and(|a| {
            a.len() >= 4
                && a.iter()
                    .take(4)
                    .all(|x| matches!(x, Object::Integer(_) | Object::Real(_)))
        })
    };
    // Walk up the page tree, as the library does, but bounded against cycles. The library
    // takes the first MediaBox it meets, usable or not.
    let mut at = id;
    for _ in 0..64 {
        let Ok(dict) = doc.get_dictionary(at) else {
            break;
        };
        if let Ok(mb) = dict.get(b"MediaBox") {
            if usable(mb, doc) {
                return Ok(());
            }
            break;
        }
        match dict.get(b"Parent").and_then(Object::as_reference) {
            Ok(parent) => at = parent,
            Err(_) => break,
        }
    }
    let Ok(dict) = doc.get_object_mut(id).and_then(Object::as_dict_mut) else {
        return Err("the page object is not a dictionary".into());
    };
    dict.set(
        "MediaBox",
        Object::Array(
            DEFAULT_MEDIA_BOX
                .iter()
                .map(|&v| Object::Integer(v))
                .collect(),
        ),
    );
    Ok(())
}

impl Reader for PdfReader {
    fn name(&self) -> &'static str {
        "pdf"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let before = warnings.len();
        let pages = page_texts(label, bytes, warnings)?;
        if pages.iter().all(|p| p.trim().is_empty()) {
            // Pages that could not be read are not evidence of a scan.
            let unreadable = warnings.len() - before;
            return Err(ReadError::NoText(if unreadable > 0 {
                format!(
                    "{} page(s), {unreadable} of them unreadable (see the warnings above), and no text on the others",
                    pages.len()
                )
            } else {
                format!(
                    "{} page(s) and no extractable text (a scanned PDF?)",
                    pages.len()
                )
            }));
        }
        let (text, page_starts) = clean_pages(&pages, opts.cut_references);
        emit(Document {
            path: label.to_string(),
            record: None,
            text,
            page_starts,
            lines_are_paragraphs: false,
        });
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A one-page PDF whose page and whose figure (a form XObject) each call a different
    /// font `/F1`: the figure's has an encoding that spells codes `x y z` as "a i n".
    fn pdf_with_a_form_reusing_a_font_name() -> Vec<u8> {
        use pdf_extract::{Dictionary, Document, Object, Stream};
        let name = |n: &str| Object::Name(n.as_bytes().to_vec());
        let dict = |pairs: Vec<(&str, Object)>| {
            let mut d = Dictionary::new();
            for (k, v) in pairs {
                d.set(k, v);
            }
            d
        };
        let mut doc = Document::with_version("1.5");
        let helvetica = |extra: Vec<(&str, Object)>| {
            let mut pairs = vec![
                ("Type", name("Font")),
                ("Subtype", name("Type1")),
                ("BaseFont", name("Helvetica")),
            ];
            pairs.extend(extra);
            Object::Dictionary(dict(pairs))
        };
        let page_font = doc.add_object(helvetica(vec![("Encoding", name("WinAnsiEncoding"))]));
        let differences =
            Object::Array(vec![Object::Integer(120), name("a"), name("i"), name("n")]);
        let form_font = doc.add_object(helvetica(vec![(
            "Encoding",
            Object::Dictionary(dict(vec![
                ("BaseEncoding", name("WinAnsiEncoding")),
                ("Differences", differences),
            ])),
        )]));
        let fonts = |f| Object::Dictionary(dict(vec![("F1", Object::Reference(f))]));
        let box_ = || Object::Array([0, 0, 612, 792].into_iter().map(Object::Integer).collect());
        let form = doc.add_object(Stream::new(
            dict(vec![
                ("Type", name("XObject")),
                ("Subtype", name("Form")),
                ("BBox", box_()),
                (
                    "Resources",
                    Object::Dictionary(dict(vec![("Font", fonts(form_font))])),
                ),
            ]),
            b"BT /F1 12 Tf 72 600 Td (Wyzd) Tj ET".to_vec(),
        ));
        let content = doc.add_object(Stream::new(
            Dictionary::new(),
            b"BT /F1 12 Tf 72 700 Td (Rain xyz) Tj ET /Fm0 Do BT /F1 12 Tf 72 500 Td (Sun xyz) Tj ET"
                .to_vec(),
        ));
        let pages = doc.new_object_id();
        let page = doc.add_object(dict(vec![
            ("Type", name("Page")),
            ("Parent", Object::Reference(pages)),
            ("MediaBox", box_()),
            ("Contents", Object::Reference(content)),
            (
                "Resources",
                Object::Dictionary(dict(vec![
                    ("Font", fonts(page_font)),
                    (
                        "XObject",
                        Object::Dictionary(dict(vec![("Fm0", Object::Reference(form))])),
                    ),
                ])),
            ),
        ]));
        doc.objects.insert(
            pages,
            Object::Dictionary(dict(vec![
                ("Type", name("Pages")),
                ("Kids", Object::Array(vec![Object::Reference(page)])),
                ("Count", Object::Integer(1)),
            ])),
        );
        let catalog = doc.add_object(dict(vec![
            ("Type", name("Catalog")),
            ("Pages", Object::Reference(pages)),
        ]));
        doc.trailer.set("Root", Object::Reference(catalog));
        let mut bytes = Vec::new();
        doc.save_to(&mut bytes).expect("in memory");
        bytes
    }

    #[test]
    fn a_figure_font_with_the_page_font_name_decodes_with_its_own_encoding() {
        // Expected text from the encodings themselves: WinAnsi (PDF 1.7, Annex D) on the page,
        // the Differences array in the figure.
        let mut w = Vec::new();
        let pages =
            page_texts("x.pdf", &pdf_with_a_form_reusing_a_font_name(), &mut w).expect("readable");
        assert!(w.is_empty(), "{w:?}");
        let words: Vec<&str> = pages[0].split_whitespace().collect();
        assert_eq!(words, ["Rain", "xyz", "Wind", "Sun", "xyz"]);
    }

    /// Found by the `read_pdf` fuzz target: the extraction library panics on a page whose
    /// MediaBox is missing or short. Such a page now gets a Letter-sized box and is read.
    #[test]
    fn a_page_without_a_usable_media_box_is_read_not_a_panic() {
        use pdf_extract::{Document, Object};
        for bad in [
            None,
            Some(Object::Array(vec![Object::Integer(0), Object::Integer(0)])),
        ] {
            let mut doc =
                Document::load_mem(&pdf_with_a_form_reusing_a_font_name()).expect("valid PDF");
            for (_, id) in doc.get_pages() {
                let page = doc
                    .get_object_mut(id)
                    .and_then(Object::as_dict_mut)
                    .expect("page");
                page.remove(b"MediaBox");
                if let Some(b) = &bad {
                    page.set("MediaBox", b.clone());
                }
            }
            let mut bytes = Vec::new();
            doc.save_to(&mut bytes).expect("in memory");
            let mut w = Vec::new();
            let pages = page_texts("x.pdf", &bytes, &mut w).expect("readable");
            assert!(pages[0].contains("Rain"), "{pages:?} {w:?}");
        }
    }

    #[test]
    fn malformed_pdf_is_an_error_not_a_panic() {
        let mut w = Vec::new();
        let r = PdfReader.read(
            "x.pdf",
            b"%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer <<>>\n%%EOF",
            &ReadOptions::default(),
            &mut w,
            &mut |_| {},
        );
        assert!(r.is_err());
    }
}
