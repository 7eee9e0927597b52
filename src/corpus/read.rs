//! Reading one input into documents: undo compression, choose the reader, stream the bytes to
//! it (hashing them on the way when asked), and contain a reader's panic to its file.

use super::decompress::{capped, read_error};
use super::document::{Document, Input, InputFormat, ReadOptions, Warnings};
use super::format::{format_by_extension, reader_of, sniff};
use super::panics::contain;
use crate::error::ReadError;
use std::io::{BufRead, Read};
use std::path::Path;

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

pub(super) fn read_source(
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
