//! Plain text: UTF-8, UTF-16 with a byte-order mark, and a Latin-1 fallback that is reported.

use super::emit_decoded;
use crate::corpus::document::{Document, ReadOptions, Reader, Warnings, MAX_FILE_BYTES};
use crate::error::ReadError;
use std::io::BufRead;

/// Plain text files.
#[derive(Debug, Default)]
pub struct TextReader;

fn looks_binary(bytes: &[u8]) -> bool {
    let head = &bytes[..bytes.len().min(8192)];
    if head.contains(&0) {
        return true;
    }
    let control = head
        .iter()
        .filter(|&&b| b < 0x09 || (0x0e..0x20).contains(&b))
        .count();
    control * 10 > head.len().max(1)
}

/// Decode a text file. UTF-16 needs its byte-order mark; bytes that are not UTF-8 are read as
/// Latin-1 (windows-1252) when no valid multi-byte UTF-8 appears, else with replacement
/// characters. Either fallback adds a warning naming the file.
pub fn decode_text(
    label: &str,
    bytes: &[u8],
    warnings: &mut Warnings,
) -> Result<String, ReadError> {
    if let Some((enc, bom)) = encoding_rs::Encoding::for_bom(bytes) {
        if enc != encoding_rs::UTF_8 {
            // UTF-16 holds NUL bytes, so it is decoded before the binary check.
            let (text, had_errors) = enc.decode_without_bom_handling(&bytes[bom..]);
            if had_errors {
                warnings.push(format!(
                    "{label}: invalid {} sequences replaced",
                    enc.name()
                ));
            }
            return Ok(text.into_owned());
        }
    }
    if looks_binary(bytes) {
        return Err(ReadError::Binary(format!(
            "{label} holds NUL or control bytes"
        )));
    }
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.to_string()),
        Err(_) => {
            let lossy = String::from_utf8_lossy(bytes);
            let has_utf8 = lossy.chars().any(|c| !c.is_ascii() && c != '\u{FFFD}');
            if has_utf8 {
                warnings.push(format!(
                    "{label}: invalid UTF-8, decoded with replacement characters"
                ));
                Ok(lossy.into_owned())
            } else {
                warnings.push(format!(
                    "{label}: not UTF-8, decoded as Latin-1 (windows-1252)"
                ));
                let (text, _) = encoding_rs::WINDOWS_1252.decode_without_bom_handling(bytes);
                Ok(text.into_owned())
            }
        }
    }
}

/// A document of plain text, with the one-paragraph-per-line guess text dumps need.
pub fn text_document(label: &str, record: Option<String>, text: String) -> Document {
    // A text whose lines are long and seldom blank holds one paragraph per line.
    let lines = text.lines().count().max(1);
    let blank = text.lines().filter(|l| l.trim().is_empty()).count();
    let lines_are_paragraphs = text.len() / lines > 200 && blank * 10 < lines;
    Document {
        path: label.to_string(),
        record,
        text,
        page_starts: Vec::new(),
        lines_are_paragraphs,
    }
}

impl Reader for TextReader {
    fn name(&self) -> &'static str {
        "text"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        _opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        emit_decoded(label, bytes, warnings, emit, Ok)
    }

    /// Reads the file whole, as the default does, but refuses it as soon as one line grows past
    /// `max_record` bytes (the cap a JSON Lines record has): a line that long is a dump or a
    /// generated file, not prose, and every later step works line by line and sentence by
    /// sentence. Refused early, it costs one pass over its bytes and no more memory.
    fn read_stream(
        &self,
        label: &str,
        src: &mut dyn BufRead,
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let mut buf = Vec::new();
        let (mut line, mut line_len) = (1usize, 0usize);
        loop {
            let chunk = src.fill_buf()?;
            if chunk.is_empty() {
                break;
            }
            let mut from = 0;
            for nl in memchr::memchr_iter(b'\n', chunk).chain(std::iter::once(chunk.len())) {
                line_len += nl - from;
                if line_len > opts.max_record {
                    return Err(ReadError::TooLarge(format!(
                        "line {line} is longer than {} bytes (raise the cap with --max-record)",
                        opts.max_record
                    )));
                }
                if nl < chunk.len() {
                    (line, line_len, from) = (line + 1, 0, nl + 1);
                }
            }
            if (buf.len() + chunk.len()) as u64 > MAX_FILE_BYTES {
                return Err(ReadError::TooLarge(format!("over {MAX_FILE_BYTES} bytes")));
            }
            buf.extend_from_slice(chunk);
            let n = chunk.len();
            src.consume(n);
        }
        self.read(label, &buf, opts, warnings, emit)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn binary_is_refused_and_bad_utf8_warns() {
        let mut w = Vec::new();
        assert!(matches!(
            decode_text("b.txt", b"abc\0def", &mut w),
            Err(ReadError::Binary(_))
        ));
        let s = decode_text("u.txt", "café causes joy \u{2014}".as_bytes(), &mut w).unwrap();
        assert!(s.contains('é'));
        let mut bad = "na\u{ef}ve ".as_bytes().to_vec();
        bad.push(0xff);
        let s = decode_text("m.txt", &bad, &mut w).unwrap();
        assert!(s.contains('\u{FFFD}'));
        assert!(w
            .iter()
            .any(|x| x.starts_with("m.txt") && x.contains("replacement")));
    }

    #[test]
    fn a_line_over_the_record_cap_fails_the_file() {
        let opts = ReadOptions {
            max_record: 10,
            ..ReadOptions::default()
        };
        let read = |bytes: &[u8]| {
            let mut docs = Vec::new();
            let r = TextReader.read_stream(
                "t.txt",
                &mut std::io::BufReader::with_capacity(4, bytes),
                &opts,
                &mut Vec::new(),
                &mut |d| docs.push(d),
            );
            (r, docs.len())
        };
        // Lines of exactly the cap are read, whatever the buffer boundaries.
        let (r, n) = read(b"0123456789\nabcdefghij\n0123456789");
        assert!(r.is_ok() && n == 1, "{r:?}");
        let (r, n) = read(b"short\n0123456789a\nmore");
        assert_eq!(n, 0);
        assert_eq!(
            r.unwrap_err().to_string(),
            "too large: line 2 is longer than 10 bytes (raise the cap with --max-record)"
        );
    }

    #[test]
    fn latin1_is_decoded_and_reported() {
        let mut w = Vec::new();
        let s = decode_text("l.txt", b"caf\xe9 causes joy", &mut w).unwrap();
        assert_eq!(s, "café causes joy");
        assert!(w[0].starts_with("l.txt") && w[0].contains("Latin-1"));
    }

    #[test]
    fn utf16_with_bom_is_decoded() {
        let mut w = Vec::new();
        let mut le = vec![0xFF, 0xFE];
        for u in "heat causes drought".encode_utf16() {
            le.extend_from_slice(&u.to_le_bytes());
        }
        assert_eq!(
            decode_text("x", &le, &mut w).unwrap(),
            "heat causes drought"
        );
        let mut be = vec![0xFE, 0xFF];
        for u in "Ünïcode".encode_utf16() {
            be.extend_from_slice(&u.to_be_bytes());
        }
        assert_eq!(decode_text("x", &be, &mut w).unwrap(), "Ünïcode");
        assert!(w.is_empty());
    }
}
