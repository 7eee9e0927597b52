//! The corpus stage: which files to read, and how each becomes one or more documents.
//!
//! Inputs are the paths on the command line, walked recursively (hidden files, `.gitignore`d and
//! `.hearsayignore`d files skipped), plus `-` for standard input. A [`Reader`] turns one file's
//! bytes into [`Document`]s. A reader may emit many documents per file (a JSON Lines dump holds
//! one per record) and may report per-page offsets (PDF), which is why documents are pushed to a
//! callback rather than returned one per file. Per-file failures are values, never panics or
//! aborts: the caller records them and goes on with the next file.

pub mod readers;

use crate::corpus::readers::html::HtmlReader;
use crate::corpus::readers::jsonl::JsonlReader;
use crate::corpus::readers::markdown::MarkdownReader;
use crate::corpus::readers::pdf::PdfReader;
use crate::corpus::readers::text::TextReader;
use crate::error::ReadError;
use std::io::{BufRead, Read};
use std::path::{Path, PathBuf};

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
    /// file is never held whole; the default reads up to [`MAX_FILE_BYTES`] and calls `read`.
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

/// The common body of the readers of text-based formats: decode the bytes as text (reporting
/// any fallback encoding), turn the text into the reader's own text with `extract`, and emit one
/// document without pages.
pub fn emit_decoded(
    label: &str,
    bytes: &[u8],
    warnings: &mut Warnings,
    emit: &mut dyn FnMut(Document),
    extract: impl FnOnce(String) -> Result<String, ReadError>,
) -> Result<(), ReadError> {
    let src = crate::corpus::readers::text::decode_text(label, bytes, warnings)?;
    emit(crate::corpus::readers::text::text_document(
        label,
        None,
        extract(src)?,
    ));
    Ok(())
}

static TEXT: TextReader = TextReader;
static MARKDOWN: MarkdownReader = MarkdownReader;
static HTML: HtmlReader = HtmlReader;
static PDF: PdfReader = PdfReader;
static JSONL: JsonlReader = JsonlReader;

fn reader_of(f: InputFormat) -> &'static dyn Reader {
    match f {
        InputFormat::Auto | InputFormat::Text => &TEXT,
        InputFormat::Markdown => &MARKDOWN,
        InputFormat::Html => &HTML,
        InputFormat::Pdf => &PDF,
        InputFormat::Jsonl => &JSONL,
    }
}

/// The file name's extension(s), lower-cased, with a compression suffix split off.
fn extensions(path: &Path) -> (Option<String>, Option<String>) {
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
pub fn format_by_extension(path: &Path) -> Option<InputFormat> {
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
pub fn sniff(head: &[u8], path: &Path) -> InputFormat {
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
pub fn is_known_file(path: &Path) -> bool {
    format_by_extension(path).is_some()
}

/// Stops a decompressor after `cap` bytes: the defence against decompression bombs.
struct Capped<R> {
    inner: R,
    left: u64,
    cap: u64,
}

#[derive(Debug)]
struct CapExceeded(u64);

impl std::fmt::Display for CapExceeded {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "decompresses to more than {} bytes (raise the cap with --max-decompressed)",
            self.0
        )
    }
}
impl std::error::Error for CapExceeded {}

impl<R: Read> Read for Capped<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.left == 0 {
            // One byte past the cap tells "exactly at the cap" from "over it".
            let mut probe = [0u8; 1];
            return match self.inner.read(&mut probe)? {
                0 => Ok(0),
                _ => Err(std::io::Error::other(CapExceeded(self.cap))),
            };
        }
        let want = buf.len().min(self.left.min(usize::MAX as u64) as usize);
        let n = self.inner.read(&mut buf[..want])?;
        self.left -= n as u64;
        Ok(n)
    }
}

fn capped<R: Read>(inner: R, cap: u64) -> Capped<R> {
    Capped {
        inner,
        left: cap,
        cap,
    }
}

/// An I/O error from reading, with decompression trouble named as such.
fn read_error(e: std::io::Error, compressed: bool) -> ReadError {
    if let Some(c) = e.get_ref().and_then(|i| i.downcast_ref::<CapExceeded>()) {
        return ReadError::TooLarge(c.to_string());
    }
    if compressed && e.kind() != std::io::ErrorKind::PermissionDenied {
        return ReadError::Malformed(format!("corrupt or truncated compressed data: {e}"));
    }
    ReadError::Io(e)
}

/// Read documents from a stream: undo gzip or zstd compression (found by magic bytes), choose
/// the reader, and hand it the stream. `path` supplies the extension.
pub fn read_from(
    label: &str,
    path: &Path,
    src: &mut dyn BufRead,
    opts: &ReadOptions,
    warnings: &mut Warnings,
    emit: &mut dyn FnMut(Document),
) -> Result<(), ReadError> {
    let head = src.fill_buf()?;
    let gz = head.starts_with(&[0x1f, 0x8b]);
    let zst = head.starts_with(&[0x28, 0xb5, 0x2f, 0xfd]);
    let mut inner: Box<dyn BufRead + '_> = if gz {
        Box::new(std::io::BufReader::with_capacity(
            1 << 16,
            capped(
                flate2::bufread::MultiGzDecoder::new(src),
                opts.max_decompressed,
            ),
        ))
    } else if zst {
        let d = zstd::stream::read::Decoder::with_buffer(src).map_err(|e| read_error(e, true))?;
        Box::new(std::io::BufReader::with_capacity(
            1 << 16,
            capped(d, opts.max_decompressed),
        ))
    } else {
        Box::new(src)
    };
    let compressed = gz || zst;
    let head = inner.fill_buf().map_err(|e| read_error(e, compressed))?;
    if head.is_empty() {
        warnings.push(format!("{label}: empty file (no documents)"));
        return Ok(());
    }
    let format = match opts.format {
        InputFormat::Auto => sniff(head, path),
        f => f,
    };
    let reader = reader_of(format);
    let mut err = None;
    let mut guarded = ErrorSlot {
        inner: &mut inner,
        err: &mut err,
    };
    let r = reader.read_stream(label, &mut guarded, opts, warnings, emit);
    match (r, err) {
        (Err(_), Some(e)) => Err(read_error(e, compressed)),
        (r, _) => r,
    }
}

/// Keeps the first I/O error a reader saw, so it can be reported with its real cause (a
/// decompression cap, a truncated archive) rather than as the reader's own.
struct ErrorSlot<'a, 'b> {
    inner: &'a mut Box<dyn BufRead + 'b>,
    err: &'a mut Option<std::io::Error>,
}

impl ErrorSlot<'_, '_> {
    fn keep(&mut self, e: std::io::Error) -> std::io::Error {
        let copy = std::io::Error::new(e.kind(), e.to_string());
        if self.err.is_none() {
            *self.err = Some(e);
        }
        copy
    }
}

impl Read for ErrorSlot<'_, '_> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        self.inner.read(buf).map_err(|e| self.keep(e))
    }
}

impl BufRead for ErrorSlot<'_, '_> {
    fn fill_buf(&mut self) -> std::io::Result<&[u8]> {
        // Borrow juggling: probe first, then return the buffer.
        if let Err(e) = self.inner.fill_buf() {
            return Err(self.keep(e));
        }
        self.inner.fill_buf()
    }
    fn consume(&mut self, n: usize) {
        self.inner.consume(n)
    }
}

/// Read one input into documents, pushed to `emit` as they are read. Files and standard input
/// are streamed. The reader runs under `catch_unwind`: a panic costs its file, not the run.
pub fn read_input(
    input: &Input,
    opts: &ReadOptions,
    warnings: &mut Warnings,
    emit: &mut dyn FnMut(Document),
) -> Result<(), ReadError> {
    read_source(input, opts, warnings, emit, false).map(|_| ())
}

fn read_source(
    input: &Input,
    opts: &ReadOptions,
    warnings: &mut Warnings,
    emit: &mut dyn FnMut(Document),
    hash: bool,
) -> Result<Option<blake3::Hash>, ReadError> {
    let stdin;
    let mut src: Box<dyn BufRead> = if input.is_stdin() {
        // Streamed like a file: a JSON Lines dump piped in is never held whole.
        stdin = std::io::stdin();
        Box::new(stdin.lock())
    } else {
        let f = std::fs::File::open(&input.path)?;
        Box::new(std::io::BufReader::with_capacity(1 << 16, f))
    };
    if !hash {
        guarded(input, opts, || {
            read_from(&input.label, &input.path, &mut src, opts, warnings, emit)
        })?;
        return Ok(None);
    }
    let mut src = Hashing {
        inner: src,
        hasher: blake3::Hasher::new(),
    };
    guarded(input, opts, || {
        read_from(&input.label, &input.path, &mut src, opts, warnings, emit)
    })?;
    // Whatever the reader left unread is part of the content too.
    std::io::copy(&mut src, &mut std::io::sink())?;
    Ok(Some(src.hasher.finalize()))
}

/// A reader that hashes every byte taken from it.
struct Hashing<R> {
    inner: R,
    hasher: blake3::Hasher,
}

impl<R: BufRead> Read for Hashing<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.hasher.update(&buf[..n]);
        Ok(n)
    }
}

impl<R: BufRead> BufRead for Hashing<R> {
    fn fill_buf(&mut self) -> std::io::Result<&[u8]> {
        self.inner.fill_buf()
    }

    fn consume(&mut self, n: usize) {
        if n == 0 {
            return;
        }
        // The bytes consumed are the front of the buffer the last `fill_buf` returned, which a
        // second call returns again without reading.
        if let Ok(b) = self.inner.fill_buf() {
            self.hasher.update(&b[..n.min(b.len())]);
        }
        self.inner.consume(n)
    }
}

/// Text of a streamed input handed over at a time (by [`read_batched`]), and how many batches are
/// read ahead: a stream holds about 3 MB of documents. On eLife as one JSON Lines file, 1 MB
/// batches ran as fast as the folder of files at -j2 with 88 MB peak RSS; 4 MB held 105 MB.
const BATCH_BYTES: usize = 1 << 20;
const BATCHES_AHEAD: usize = 2;

/// Inputs at least this large on disk are read as streams (see [`streams`]).
pub const STREAM_BYTES: u64 = 8 << 20;

/// Whether an input is better read as a stream of document batches ([`read_batched`]) than
/// whole, with one thread per file: standard input, JSON Lines (one file may hold millions of
/// documents), compressed files (their size on disk says little), and files of
/// [`STREAM_BYTES`] or more. What is extracted from them is the same either way.
pub fn streams(input: &Input, opts: &ReadOptions) -> bool {
    if input.is_stdin() || opts.format == InputFormat::Jsonl {
        return true;
    }
    let (_, compression) = extensions(&input.path);
    compression.is_some()
        || format_by_extension(&input.path) == Some(InputFormat::Jsonl)
        || std::fs::metadata(&input.path).is_ok_and(|m| m.len() >= STREAM_BYTES)
}

/// Read one input on a thread of its own and hand its documents to `each` in input order, in
/// batches of about 1 MB of text, with at most two batches read ahead: memory stays
/// bounded whatever the input's size, and the caller can work on a batch in parallel while the
/// next one is read. Returns the reader's warnings with its result. When `each` fails, its
/// error is returned at once and no further batch is handed over.
pub fn read_batched<E>(
    input: &Input,
    opts: &ReadOptions,
    each: impl FnMut(Vec<Document>) -> Result<(), E>,
) -> Result<(Warnings, Result<(), ReadError>), E> {
    read_batched_with(input, opts, BATCH_BYTES, BATCHES_AHEAD, false, each)
        .map(|(w, r)| (w, r.map(|_| ())))
}

/// [`read_batched`] that also hashes the input's bytes as they go by, read to the end: for an
/// input that can be read only once (standard input).
pub fn read_batched_hashed<E>(
    input: &Input,
    opts: &ReadOptions,
    each: impl FnMut(Vec<Document>) -> Result<(), E>,
) -> Result<(Warnings, Result<blake3::Hash, ReadError>), E> {
    read_batched_with(input, opts, BATCH_BYTES, BATCHES_AHEAD, true, each)
        .map(|(w, r)| (w, r.map(|h| h.unwrap_or_else(|| blake3::hash(b"")))))
}

/// [`read_batched`] with the batch size and read-ahead given.
fn read_batched_with<E>(
    input: &Input,
    opts: &ReadOptions,
    batch_bytes: usize,
    ahead: usize,
    hash: bool,
    mut each: impl FnMut(Vec<Document>) -> Result<(), E>,
) -> Result<(Warnings, Result<Option<blake3::Hash>, ReadError>), E> {
    let (tx, rx) = std::sync::mpsc::sync_channel::<Vec<Document>>(ahead.max(1));
    let (input_c, opts_c) = (input.clone(), opts.clone());
    // Not a scoped thread: if `each` fails, the caller returns at once instead of waiting for
    // the rest of a long input to be read; the reader then only discards what it reads.
    let reader = std::thread::spawn(move || {
        let mut warnings = Warnings::new();
        let mut batch = Vec::new();
        let mut bytes = 0;
        let mut open = true;
        let r = read_source(
            &input_c,
            &opts_c,
            &mut warnings,
            &mut |d| {
                if !open {
                    return;
                }
                bytes += d.text.len();
                batch.push(d);
                if bytes >= batch_bytes {
                    bytes = 0;
                    open = tx.send(std::mem::take(&mut batch)).is_ok();
                }
            },
            hash,
        );
        if open && !batch.is_empty() {
            let _ = tx.send(batch);
        }
        (warnings, r)
    });
    for batch in rx.iter() {
        each(batch)?;
    }
    Ok(reader.join().unwrap_or_else(|_| {
        (
            Warnings::new(),
            Err(ReadError::Malformed("the reader failed".into())),
        )
    }))
}

thread_local! {
    /// How many `contain` calls are running on this thread.
    static CONTAINED: std::cell::Cell<usize> = const { std::cell::Cell::new(0) };
}

/// Run `f`, turning a panic into `Err`. A panic contained this way is reported by the caller
/// as a warning, so the panic hook from `quiet_contained_panics` does not print it as well.
pub fn contain<T>(f: impl FnOnce() -> T) -> std::thread::Result<T> {
    CONTAINED.with(|c| c.set(c.get() + 1));
    let r = std::panic::catch_unwind(std::panic::AssertUnwindSafe(f));
    CONTAINED.with(|c| c.set(c.get() - 1));
    r
}

/// Install a panic hook that stays silent for panics that `contain` catches (a reader's library
/// failing on a hostile file: the run warns about the file instead) and prints every other panic
/// as the default hook does. For binaries; call once at start-up.
pub fn quiet_contained_panics() {
    let default = std::panic::take_hook();
    std::panic::set_hook(Box::new(move |info| {
        if CONTAINED.with(|c| c.get()) == 0 {
            default(info);
        }
    }));
}

fn guarded(
    input: &Input,
    opts: &ReadOptions,
    f: impl FnOnce() -> Result<(), ReadError>,
) -> Result<(), ReadError> {
    // A reader that panics on hostile input costs its file, not the run.
    match contain(f) {
        Ok(r) => r,
        Err(_) => {
            let name = match opts.format {
                InputFormat::Auto => format_by_extension(&input.path)
                    .map(|f| reader_of(f).name())
                    .unwrap_or("text"),
                f => reader_of(f).name(),
            };
            Err(ReadError::Malformed(format!(
                "the {name} reader failed on this file (malformed input)"
            )))
        }
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
                            let label = e.path().to_string_lossy().into_owned();
                            if e.path_is_symlink() {
                                // Links are not followed: a link loop must not hang the walk.
                                skipped.push(Skipped {
                                    path: label,
                                    reason: "symbolic link (not followed)".into(),
                                });
                                continue;
                            }
                            if !e.file_type().is_some_and(|t| t.is_file()) {
                                continue;
                            }
                            if is_known_file(e.path()) {
                                inputs.push(Input {
                                    path: e.path().to_path_buf(),
                                    label,
                                });
                            } else {
                                skipped.push(Skipped {
                                    path: label,
                                    reason: UNKNOWN_FORMAT.into(),
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

#[cfg(test)]
mod tests {
    use super::*;

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

    /// A JSON Lines file of `n` records, the last one broken, as an input.
    fn records(dir: &Path, n: usize) -> Input {
        let mut text = String::new();
        for i in 0..n {
            text.push_str(&format!("{{\"id\": {i}, \"text\": \"record {i} text\"}}\n"));
        }
        text.push_str("{\"id\": broken\n");
        let path = dir.join("d.jsonl");
        std::fs::write(&path, text).unwrap();
        Input {
            label: path.to_string_lossy().into_owned(),
            path,
        }
    }

    #[test]
    fn batches_hold_every_document_in_order() {
        let dir = tempfile::tempdir().unwrap();
        let input = records(dir.path(), 1000);
        let opts = ReadOptions::default();
        assert!(streams(&input, &opts));
        let mut whole = Vec::new();
        let mut w1 = Warnings::new();
        read_input(&input, &opts, &mut w1, &mut |d| whole.push(d)).unwrap();
        assert_eq!(whole.len(), 1000);
        let mut sizes = Vec::new();
        let mut batched = Vec::new();
        let (w2, r) = read_batched_with(&input, &opts, 200, 2, true, |b| {
            sizes.push(b.len());
            batched.extend(b);
            Ok::<_, ()>(())
        })
        .unwrap();
        // The hash taken on the way is the hash of the file's bytes.
        let bytes = std::fs::read(&input.path).unwrap();
        assert_eq!(r.unwrap(), Some(blake3::hash(&bytes)));
        assert_eq!(batched, whole);
        assert_eq!(w2, w1, "the broken record is warned about once");
        assert_eq!(w2.len(), 1);
        // "record N text" is 13 to 15 bytes: 14 documents reach 200 bytes.
        assert!(sizes.len() > 60, "{sizes:?}");
        assert!(sizes[..sizes.len() - 1]
            .iter()
            .all(|&n| (13..=16).contains(&n)));
    }

    #[test]
    fn a_failing_consumer_stops_the_batches() {
        let dir = tempfile::tempdir().unwrap();
        let input = records(dir.path(), 1000);
        let mut seen = 0;
        let r = read_batched_with(&input, &ReadOptions::default(), 200, 1, false, |_| {
            seen += 1;
            if seen == 3 {
                Err("stdout closed")
            } else {
                Ok(())
            }
        });
        assert_eq!(r.err(), Some("stdout closed"));
        assert_eq!(seen, 3);
    }

    #[test]
    fn a_long_first_record_is_sniffed_as_json_lines() {
        let record = format!("{{\"text\": \"{}\"}}\n", "word ".repeat(5000));
        let head = &record.as_bytes()[..8192];
        assert_eq!(sniff(head, Path::new("-")), InputFormat::Jsonl);
        // A short file ending inside its JSON, or a brace that starts no JSON, is text.
        assert_eq!(
            sniff(b"{\"text\": \"open", Path::new("-")),
            InputFormat::Text
        );
        let prose = format!("{{Editor's note}} {}", "word ".repeat(5000));
        assert_eq!(
            sniff(&prose.as_bytes()[..8192], Path::new("-")),
            InputFormat::Text
        );
    }
}
