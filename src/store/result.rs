//! The results of reading one file, held until the writer takes them: in memory, and for a
//! large input partly in a temporary file, so that memory does not grow with the input.

use super::manifest::FileEntry;
use crate::claim::Claim;
use crate::error::StoreError;
use std::fs::File;
use std::io::{BufWriter, Read, Seek, SeekFrom, Write};
use std::path::{Path, PathBuf};

/// The result of reading one changed file, ready to be written. A large file's results need not
/// wait in memory for its end: [`FileResult::spill`] moves what is held so far to an unnamed
/// temporary file in the store's folder, and [`StoreWriter::put`](super::StoreWriter::put)
/// reads it back in order. The file's old claims and sentences stay until then, so a file that
/// fails part-way loses nothing already stored.
#[derive(Debug, Default)]
pub struct FileResult {
    pub entry: Option<FileEntry>,
    pub(super) claims: Vec<Claim>,
    /// (document id, line, start, text) of every sentence, for the index.
    pub(super) sentences: Vec<(String, u64, u64, String)>,
    /// About how many bytes `claims` and `sentences` hold.
    held: usize,
    pub(super) spilled: Option<Spilled>,
}

/// What a file's result moved to disk: records back to back, each a tag byte (`c` a claim as
/// JSON, `s` a sentence as postcard), a little-endian u32 length and the bytes.
#[derive(Debug)]
pub(super) struct Spilled {
    out: BufWriter<File>,
    dir: PathBuf,
    sentences: u64,
}

/// A claim in memory, roughly (its strings and the sentence it quotes).
const CLAIM_HELD_BYTES: usize = 1024;

impl FileResult {
    /// Add claims of the file, in order.
    pub fn add_claims(&mut self, claims: Vec<Claim>) {
        self.held += claims.len() * CLAIM_HELD_BYTES;
        if self.claims.is_empty() {
            self.claims = claims;
        } else {
            self.claims.extend(claims);
        }
    }

    /// Add a sentence of the file for the index, in order.
    pub fn add_sentence(&mut self, id: String, line: u64, start: u64, text: String) {
        self.held += id.len() + text.len() + 64;
        self.sentences.push((id, line, start, text));
    }

    /// Add another part of the same file, read after everything added so far (a part held in
    /// memory: its entry and any spill are not taken).
    pub fn append(&mut self, part: FileResult) {
        self.held += part.held;
        self.claims.extend(part.claims);
        self.sentences.extend(part.sentences);
    }

    /// About how many bytes of results are held in memory (not counting what was spilled).
    pub fn held_bytes(&self) -> usize {
        self.held
    }

    /// Sentences of the file so far, spilled ones included.
    pub fn sentence_count(&self) -> u64 {
        self.spilled.as_ref().map_or(0, |sp| sp.sentences) + self.sentences.len() as u64
    }

    /// Move everything held in memory to the spill file in `dir` (created on first use, and
    /// gone when the result is dropped, also if the process is killed).
    pub fn spill(&mut self, dir: &Path) -> Result<(), StoreError> {
        let sp = match &mut self.spilled {
            Some(sp) => sp,
            None => {
                let f = tempfile::tempfile_in(dir).map_err(|e| StoreError::io(dir, e))?;
                self.spilled.insert(Spilled {
                    out: BufWriter::with_capacity(1 << 16, f),
                    dir: dir.to_path_buf(),
                    sentences: 0,
                })
            }
        };
        let mut buf = Vec::new();
        for c in self.claims.drain(..) {
            buf.clear();
            serde_json::to_writer(&mut buf, &c).map_err(|e| corrupt_spill(&sp.dir, e))?;
            write_spilled(sp, b'c', &buf)?;
        }
        for (id, line, start, text) in self.sentences.drain(..) {
            buf.clear();
            let bytes = postcard::to_extend(&(id, line, start, text), std::mem::take(&mut buf))
                .map_err(|e| corrupt_spill(&sp.dir, e))?;
            buf = bytes;
            write_spilled(sp, b's', &buf)?;
            sp.sentences += 1;
        }
        self.held = 0;
        Ok(())
    }
}

fn corrupt_spill(dir: &Path, e: impl std::fmt::Display) -> StoreError {
    StoreError::Corrupt {
        path: dir.to_path_buf(),
        message: format!("temporary file of a large input: {e}"),
    }
}

fn write_spilled(sp: &mut Spilled, tag: u8, bytes: &[u8]) -> Result<(), StoreError> {
    let len = u32::try_from(bytes.len()).map_err(|e| corrupt_spill(&sp.dir, e))?;
    let w = &mut sp.out;
    w.write_all(&[tag])
        .and_then(|()| w.write_all(&len.to_le_bytes()))
        .and_then(|()| w.write_all(bytes))
        .map_err(|e| StoreError::io(&sp.dir, e))
}

/// One record read back from a spill file.
pub(super) enum SpilledRecord<'a> {
    /// Claims, in the order they were spilled (a thousand or so at a time).
    Claims(&'a [Claim]),
    /// One sentence: its document id, line, start and text.
    Sentence(&'a str, u64, u64, &'a str),
}

impl Spilled {
    /// Read the spill file back, handing its records to `each` in the order they were written.
    pub(super) fn replay(
        self,
        mut each: impl FnMut(SpilledRecord<'_>) -> Result<(), StoreError>,
    ) -> Result<(), StoreError> {
        let dir = self.dir;
        let mut f = self
            .out
            .into_inner()
            .map_err(|e| StoreError::io(&dir, e.into_error()))?;
        f.seek(SeekFrom::Start(0))
            .map_err(|e| StoreError::io(&dir, e))?;
        let mut r = std::io::BufReader::with_capacity(1 << 16, f);
        let mut claims: Vec<Claim> = Vec::with_capacity(1024);
        let mut head = [0u8; 5];
        let mut buf = Vec::new();
        loop {
            match r.read_exact(&mut head) {
                Ok(()) => {}
                Err(e) if e.kind() == std::io::ErrorKind::UnexpectedEof => break,
                Err(e) => return Err(StoreError::io(&dir, e)),
            }
            let len = u32::from_le_bytes([head[1], head[2], head[3], head[4]]) as usize;
            buf.resize(len, 0);
            r.read_exact(&mut buf)
                .map_err(|e| StoreError::io(&dir, e))?;
            match head[0] {
                b'c' => {
                    claims.push(serde_json::from_slice(&buf).map_err(|e| corrupt_spill(&dir, e))?);
                    if claims.len() == claims.capacity() {
                        each(SpilledRecord::Claims(&claims))?;
                        claims.clear();
                    }
                }
                b's' => {
                    let (id, line, start, text): (&str, u64, u64, &str) =
                        postcard::from_bytes(&buf).map_err(|e| corrupt_spill(&dir, e))?;
                    each(SpilledRecord::Sentence(id, line, start, text))?;
                }
                t => return Err(corrupt_spill(&dir, format!("unknown record tag {t}"))),
            }
        }
        each(SpilledRecord::Claims(&claims))
    }
}
