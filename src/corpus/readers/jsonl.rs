//! JSON Lines (also gzip- or zstd-compressed, which the corpus stage undoes): one document per
//! record, streamed line by line so a file of any size is never held whole.
//!
//! A record's text is its `--text-field` (a string); its id is its `--id-field` (a string or
//! number), else `line N`. Blank lines, lines that are not JSON objects, records without the
//! text field, and records over the per-record cap are warnings with the line number; the other
//! records are read.

use super::text::text_document;
use crate::corpus::document::{Document, ReadOptions, Reader, Warnings};
use crate::error::ReadError;
use std::io::BufRead;

/// JSON Lines files.
#[derive(Debug, Default)]
pub struct JsonlReader;

/// At most this many warnings per file are kept; the rest are counted.
const MAX_WARNINGS: usize = 20;

enum Line {
    Eof,
    Read,
    TooLong,
}

/// Read one line into `buf` (without the newline), holding at most `cap` bytes: a longer line
/// is consumed and reported, never stored.
fn read_line_capped(r: &mut dyn BufRead, buf: &mut Vec<u8>, cap: usize) -> std::io::Result<Line> {
    buf.clear();
    let mut too_long = false;
    let mut any = false;
    loop {
        let chunk = r.fill_buf()?;
        if chunk.is_empty() {
            return Ok(if !any {
                Line::Eof
            } else if too_long {
                Line::TooLong
            } else {
                Line::Read
            });
        }
        any = true;
        let (part, done) = match memchr::memchr(b'\n', chunk) {
            Some(i) => (&chunk[..i], Some(i + 1)),
            None => (chunk, None),
        };
        if !too_long {
            if buf.len() + part.len() > cap {
                too_long = true;
                buf.clear();
            } else {
                buf.extend_from_slice(part);
            }
        }
        let used = done.unwrap_or(chunk.len());
        r.consume(used);
        if done.is_some() {
            return Ok(if too_long { Line::TooLong } else { Line::Read });
        }
    }
}

fn id_of(v: &serde_json::Value) -> Option<String> {
    match v {
        serde_json::Value::String(s) => Some(s.clone()),
        serde_json::Value::Number(n) => Some(n.to_string()),
        _ => None,
    }
}

impl Reader for JsonlReader {
    fn name(&self) -> &'static str {
        "jsonl"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        self.read_stream(label, &mut &*bytes, opts, warnings, emit)
    }

    fn read_stream(
        &self,
        label: &str,
        src: &mut dyn BufRead,
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let mut buf = Vec::new();
        let mut line_no = 0u64;
        let (mut bad, mut good) = (0u64, 0u64);
        let mut warn = |w: String, bad: &mut u64| {
            *bad += 1;
            if *bad as usize <= MAX_WARNINGS {
                warnings.push(w);
            }
        };
        loop {
            let got = read_line_capped(src, &mut buf, opts.max_record)?;
            line_no += 1;
            match got {
                Line::Eof => break,
                Line::TooLong => {
                    warn(
                        format!(
                            "{label}:{line_no}: record over {} bytes (skipped; raise with --max-record)",
                            opts.max_record
                        ),
                        &mut bad,
                    );
                    continue;
                }
                Line::Read => {}
            }
            let line = buf.strip_suffix(b"\r").unwrap_or(&buf);
            if line.iter().all(u8::is_ascii_whitespace) {
                warn(format!("{label}:{line_no}: blank line (skipped)"), &mut bad);
                continue;
            }
            let v: serde_json::Value = match serde_json::from_slice(line) {
                Ok(v @ serde_json::Value::Object(_)) => v,
                Ok(_) => {
                    warn(
                        format!("{label}:{line_no}: not a JSON object (skipped)"),
                        &mut bad,
                    );
                    continue;
                }
                Err(e) => {
                    warn(
                        format!("{label}:{line_no}: not JSON: {e} (skipped)"),
                        &mut bad,
                    );
                    continue;
                }
            };
            let Some(text) = v.get(&opts.text_field).and_then(|t| t.as_str()) else {
                warn(
                    format!(
                        "{label}:{line_no}: no string field \"{}\" (skipped)",
                        opts.text_field
                    ),
                    &mut bad,
                );
                continue;
            };
            let id = v
                .get(&opts.id_field)
                .and_then(id_of)
                .unwrap_or_else(|| format!("line {line_no}"));
            good += 1;
            emit(text_document(label, Some(id), text.to_string()));
        }
        if bad as usize > MAX_WARNINGS {
            warnings.push(format!(
                "{label}: {} more bad lines not listed",
                bad as usize - MAX_WARNINGS
            ));
        }
        if good == 0 && bad > 0 {
            return Err(ReadError::Malformed(format!(
                "no readable JSON Lines record ({bad} bad lines)"
            )));
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(src: &str, opts: &ReadOptions) -> (Vec<Document>, Warnings) {
        let mut docs = Vec::new();
        let mut w = Vec::new();
        JsonlReader
            .read("d.jsonl", src.as_bytes(), opts, &mut w, &mut |d| {
                docs.push(d)
            })
            .unwrap();
        (docs, w)
    }

    #[test]
    fn records_and_bad_lines() {
        let src = "{\"id\":\"a1\",\"text\":\"Heat causes drought.\"}\n\n\
                   not json\n{\"text\":\"Rain causes floods.\"}\n{\"id\":7}\n[1]\n{\"id\":9,\"text\":\"x\"}";
        let (docs, w) = read(src, &ReadOptions::default());
        let ids: Vec<_> = docs.iter().map(|d| d.record.clone().unwrap()).collect();
        assert_eq!(ids, ["a1", "line 4", "9"]);
        assert_eq!(docs[0].text, "Heat causes drought.");
        assert_eq!(w.len(), 4, "{w:?}");
        assert!(w[0].starts_with("d.jsonl:2: blank"));
        assert!(w[1].starts_with("d.jsonl:3: not JSON"));
        assert!(w[2].starts_with("d.jsonl:5: no string field \"text\""));
        assert!(w[3].starts_with("d.jsonl:6: not a JSON object"));
    }

    #[test]
    fn fields_are_configurable_and_long_records_skipped() {
        let opts = ReadOptions {
            text_field: "body".into(),
            id_field: "doc".into(),
            max_record: 40,
            ..ReadOptions::default()
        };
        let long = "y".repeat(100);
        let src = format!("{{\"doc\":\"d\",\"body\":\"short\"}}\n{{\"body\":\"{long}\"}}\n");
        let (docs, w) = read(&src, &opts);
        assert_eq!(docs.len(), 1);
        assert_eq!(docs[0].record.as_deref(), Some("d"));
        assert!(w[0].contains(":2: record over 40 bytes"));
    }
}
