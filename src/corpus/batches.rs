//! Streams: inputs read on a thread of their own and handed over in batches of documents, so
//! that one huge input uses every thread in bounded memory.

use super::document::{Document, Input, InputFormat, ReadOptions, Warnings};
use super::format::{extensions, format_by_extension};
use super::read::read_source;
use crate::error::ReadError;

/// Text of a streamed input handed over at a time (by [`read_batched`]), and how many batches are
/// read ahead: a stream holds about 3 MB of documents. On eLife as one JSON Lines file, 1 MB
/// batches ran as fast as the folder of files at -j2 with 88 MB peak RSS; 4 MB held 105 MB.
const BATCH_BYTES: usize = 1 << 20;
const BATCHES_AHEAD: usize = 2;

/// Inputs at least this large on disk are read as streams (see [`streams`]).
pub(super) const STREAM_BYTES: u64 = 8 << 20;

/// Whether an input is better read as a stream of document batches ([`read_batched`]) than
/// whole, with one thread per file: standard input, JSON Lines (one file may hold millions of
/// documents), compressed files (their size on disk says little), and files of
/// `STREAM_BYTES` (8 MB) or more. What is extracted from them is the same either way.
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
pub(super) fn read_batched_with<E>(
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
