//! What the readers and the reading code share: a document, an input, the options every reader
//! may consult, and the [`Reader`] trait itself. It sits below both, so that the readers need
//! nothing else of the corpus stage.

use crate::error::ReadError;
use std::io::{BufRead, Read};
use std::path::PathBuf;

/// One document's text with what provenance needs.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Document {
    /// The path as the user gave it (`-` for standard input).
    pub path: String,
    /// A record id within the file, for many-documents-per-file formats.
    pub record: Option<String>,
    /// The text the reader produced (markup and page furniture removed). Claim offsets are
    /// bytes into this string, which equals the file only for plain text.
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

/// Why a folder walk passes over files of unknown formats; such files are not warned about.
pub const UNKNOWN_FORMAT: &str = "not a format hearsay reads";

/// A file the walk passed over, with the reason.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub struct Skipped {
    pub path: String,
    pub reason: String,
}

/// Something a reader noticed that the user should know (lossy decoding, say).
pub type Warnings = Vec<String>;

/// Which reader to use: found from the content and extension, or forced.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum InputFormat {
    #[default]
    Auto,
    Text,
    Markdown,
    Html,
    Pdf,
    Jsonl,
}

/// Options every reader may consult.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReadOptions {
    /// The format to read every input as; `Auto` sniffs.
    pub format: InputFormat,
    /// JSON Lines: the field holding a record's text.
    pub text_field: String,
    /// JSON Lines: the field holding a record's id (else the line number is used).
    pub id_field: String,
    /// The most bytes a compressed file may expand to.
    pub max_decompressed: u64,
    /// JSON Lines: the longest record read; longer ones are skipped with a warning.
    pub max_record: usize,
    /// PDF: stop at the references or bibliography heading.
    pub cut_references: bool,
}

impl Default for ReadOptions {
    fn default() -> Self {
        ReadOptions {
            format: InputFormat::Auto,
            text_field: "text".into(),
            id_field: "id".into(),
            max_decompressed: 4 << 30,
            max_record: 64 << 20,
            cut_references: true,
        }
    }
}

/// Turns one file's bytes into documents.
pub trait Reader: Send + Sync {
    /// A short name for messages ("text", "markdown").
    fn name(&self) -> &'static str;
    /// Read `bytes` (the whole file) and emit its documents.
    fn read(
        &self,
        label: &str,
        bytes: &[u8],
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError>;
    /// Read from a stream. Formats that can be read piecewise (JSON Lines) override this so a
    /// file is never held whole; the default reads up to `MAX_FILE_BYTES` (1 GiB) and calls
    /// `read`.
    fn read_stream(
        &self,
        label: &str,
        src: &mut dyn BufRead,
        opts: &ReadOptions,
        warnings: &mut Warnings,
        emit: &mut dyn FnMut(Document),
    ) -> Result<(), ReadError> {
        let mut buf = Vec::new();
        src.take(MAX_FILE_BYTES + 1).read_to_end(&mut buf)?;
        if buf.len() as u64 > MAX_FILE_BYTES {
            return Err(ReadError::TooLarge(format!("over {MAX_FILE_BYTES} bytes")));
        }
        self.read(label, &buf, opts, warnings, emit)
    }
}

/// The largest file hearsay reads whole.
pub(crate) const MAX_FILE_BYTES: u64 = 1 << 30;
