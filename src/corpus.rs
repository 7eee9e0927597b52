//! The corpus stage: which files to read, and how each becomes one or more documents.
//!
//! Inputs are the paths on the command line, walked recursively (hidden files, `.gitignore`d and
//! `.hearsayignore`d files skipped), plus `-` for standard input. A [`Reader`] turns one file's
//! bytes into [`Document`]s. A reader may emit many documents per file (a JSON Lines dump holds
//! one per record) and may report per-page offsets (PDF), which is why documents are pushed to a
//! callback rather than returned one per file. Per-file failures are values, never panics or
//! aborts: the caller records them and goes on with the next file.

use crate::error::ReadError;
use std::io::Read;
use std::path::{Path, PathBuf};

/// One document's text with what provenance needs.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Document {
    /// The path as the user gave it (`-` for standard input).
    pub path: String,
    /// A record id within the file, for many-documents-per-file formats.
    pub record: Option<String>,
    /// The decoded text. Claim offsets are bytes into this string.
    pub text: String,
    /// Byte offsets at which pages 2, 3, ... start (empty for unpaged formats).
    pub page_starts: Vec<usize>,
    /// True when every line break ends a paragraph (one paragraph per line, as in text dumps).
    pub lines_are_paragraphs: bool,
}

impl Document {
    /// The 1-based page of byte `offset`, for paged documents.
    pub fn page_of(&self, offset: usize) -> Option<u32> {
        if self.page_starts.is_empty() {
            return None;
        }
        Some(self.page_starts.partition_point(|&s| s <= offset) as u32 + 1)
    }
}

/// A file (or standard input) to read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Input {
    /// Where to read from; `-` is standard input.
    pub path: PathBuf,
    /// The path as shown to the user and stored in claims.
    pub label: String,
}

impl Input {
    pub fn is_stdin(&self) -> bool {
        self.label == "-"
    }
}

/// A file the walk passed over, with the reason.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct Skipped {
    pub path: String,
    pub reason: String,
}

/// Something a reader noticed that the user should know (lossy decoding, say).
pub type Warnings = Vec<String>;

/// Turns one file's bytes into documents.
pub trait Reader: Send + Sync {
    /// A short name for messages ("text", "markdown").
    fn name(&self) -> &'static str;
    /// Read `bytes` (the whole file) and emit its documents.
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError>;
}

/// Plain text, UTF-8 (invalid sequences are replaced, with a warning).
#[derive(Debug, Default)]
pub struct TextReader;

/// Markdown, read as text for now (its markup words rarely matter to cues).
#[derive(Debug, Default)]
pub struct MarkdownReader;

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

/// Decode bytes as UTF-8, replacing invalid sequences and warning when it had to.
pub fn decode_text(
    label: &str,
    bytes: &[u8],
    warnings: &mut Warnings,
) -> Result<String, ReadError> {
    if looks_binary(bytes) {
        return Err(ReadError::Binary(format!(
            "{label} holds NUL or control bytes"
        )));
    }
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    match std::str::from_utf8(bytes) {
        Ok(s) => Ok(s.to_string()),
        Err(_) => {
            warnings.push(format!(
                "{label}: invalid UTF-8, decoded with replacement characters"
            ));
            Ok(String::from_utf8_lossy(bytes).into_owned())
        }
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
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let text = decode_text(label, bytes, warnings)?;
        // A file whose lines are long and seldom blank holds one paragraph per line.
        let lines = text.lines().count().max(1);
        let blank = text.lines().filter(|l| l.trim().is_empty()).count();
        let lines_are_paragraphs = text.len() / lines > 200 && blank * 10 < lines;
        emit(Document {
            path: label.to_string(),
            record: None,
            text,
            page_starts: Vec::new(),
            lines_are_paragraphs,
        });
        Ok(())
    }
}

impl Reader for MarkdownReader {
    fn name(&self) -> &'static str {
        "markdown"
    }
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let text = decode_text(label, bytes, warnings)?;
        emit(Document {
            path: label.to_string(),
            record: None,
            text,
            page_starts: Vec::new(),
            lines_are_paragraphs: false,
        });
        Ok(())
    }
}

/// The reader for a file, by extension; `None` for formats hearsay does not read.
pub fn reader_for(path: &Path) -> Option<&'static dyn Reader> {
    static TEXT: TextReader = TextReader;
    static MD: MarkdownReader = MarkdownReader;
    let ext = path
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    match ext.as_deref() {
        Some("txt" | "text") => Some(&TEXT),
        Some("md" | "markdown") => Some(&MD),
        _ => None,
    }
}

/// The name of the per-folder ignore file (gitignore syntax).
pub const IGNORE_FILE: &str = ".hearsayignore";

/// Walk the command-line paths. Folders are walked recursively in a stable order; files given
/// by name are always read (as text when the extension is unknown).
pub fn discover(paths: &[String]) -> (Vec<Input>, Vec<Skipped>) {
    let mut inputs = Vec::new();
    let mut skipped = Vec::new();
    for p in paths {
        if p == "-" {
            inputs.push(Input {
                path: PathBuf::from("-"),
                label: "-".into(),
            });
            continue;
        }
        let path = PathBuf::from(p);
        match std::fs::metadata(&path) {
            Err(e) => skipped.push(Skipped {
                path: p.clone(),
                reason: format!("cannot read: {e}"),
            }),
            Ok(m) if m.is_file() => inputs.push(Input {
                path: path.clone(),
                label: p.clone(),
            }),
            Ok(_) => {
                let walker = ignore::WalkBuilder::new(&path)
                    .hidden(true)
                    .add_custom_ignore_filename(IGNORE_FILE)
                    .follow_links(false)
                    .sort_by_file_path(|a, b| a.cmp(b))
                    .build();
                for entry in walker {
                    match entry {
                        Err(e) => skipped.push(Skipped {
                            path: p.clone(),
                            reason: format!("walk error: {e}"),
                        }),
                        Ok(e) => {
                            if !e.file_type().is_some_and(|t| t.is_file()) {
                                continue;
                            }
                            let label = e.path().to_string_lossy().into_owned();
                            if reader_for(e.path()).is_some() {
                                inputs.push(Input {
                                    path: e.path().to_path_buf(),
                                    label,
                                });
                            } else {
                                skipped.push(Skipped {
                                    path: label,
                                    reason: "not a format hearsay reads".into(),
                                });
                            }
                        }
                    }
                }
            }
        }
    }
    (inputs, skipped)
}

/// The largest file hearsay reads whole.
pub const MAX_FILE_BYTES: u64 = 1 << 30;

/// Read an input's bytes (from disk or standard input).
pub fn read_bytes(input: &Input) -> Result<Vec<u8>, ReadError> {
    let mut buf = Vec::new();
    if input.is_stdin() {
        std::io::stdin()
            .lock()
            .take(MAX_FILE_BYTES + 1)
            .read_to_end(&mut buf)?;
    } else {
        let f = std::fs::File::open(&input.path)?;
        f.take(MAX_FILE_BYTES + 1).read_to_end(&mut buf)?;
    }
    if buf.len() as u64 > MAX_FILE_BYTES {
        return Err(ReadError::TooLarge(format!(
            "over {} bytes",
            MAX_FILE_BYTES
        )));
    }
    Ok(buf)
}

/// Read one input into documents with the reader its extension picks (text for stdin and
/// unknown extensions given by name).
pub fn read_documents(
    input: &Input,
    bytes: &[u8],
    warnings: &mut Warnings,
) -> Result<Vec<Document>, ReadError> {
    static TEXT: TextReader = TextReader;
    let reader = reader_for(&input.path).unwrap_or(&TEXT);
    let mut docs = Vec::new();
    // A reader that panics on hostile input costs its file, not the run.
    let result = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
        reader.read(&input.label, bytes, warnings, &mut |d| docs.push(d))
    }));
    match result {
        Ok(r) => r.map(|()| docs),
        Err(_) => Err(ReadError::Malformed(format!(
            "the {} reader failed on this file",
            reader.name()
        ))),
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
        let s = decode_text("u.txt", b"caf\xe9 causes joy", &mut w).unwrap();
        assert!(s.contains('\u{FFFD}'));
        assert_eq!(w.len(), 1);
        assert!(w[0].starts_with("u.txt"));
    }

    #[test]
    fn pages_are_found_by_offset() {
        let d = Document {
            path: "p".into(),
            record: None,
            text: "a".repeat(30),
            page_starts: vec![10, 20],
            lines_are_paragraphs: false,
        };
        assert_eq!(d.page_of(0), Some(1));
        assert_eq!(d.page_of(10), Some(2));
        assert_eq!(d.page_of(25), Some(3));
    }

    #[test]
    fn walk_skips_hidden_and_ignored_files() {
        let dir = tempfile::tempdir().unwrap();
        let root = dir.path();
        std::fs::write(root.join("a.txt"), "x").unwrap();
        std::fs::write(root.join(".hidden.txt"), "x").unwrap();
        std::fs::write(root.join("b.md"), "x").unwrap();
        std::fs::write(root.join("c.bin"), "x").unwrap();
        std::fs::write(root.join("skip.txt"), "x").unwrap();
        std::fs::write(root.join(IGNORE_FILE), "skip.txt\n").unwrap();
        let (inputs, skipped) = discover(&[root.to_string_lossy().into_owned()]);
        let names: Vec<String> = inputs
            .iter()
            .map(|i| {
                Path::new(&i.label)
                    .file_name()
                    .unwrap()
                    .to_string_lossy()
                    .into_owned()
            })
            .collect();
        assert_eq!(names, ["a.txt", "b.md"]);
        assert_eq!(skipped.len(), 1);
        assert!(skipped[0].path.ends_with("c.bin"));
    }
}
