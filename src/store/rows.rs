//! Claim rows: the compact form of a stored claim that the graph is built from, where its full
//! record lives in the store, and the segment file that holds the rows.
//!
//! A segment's rows file, `seg-NNNNNN.rows`:
//!
//! ```text
//! magic      8 bytes   "HSROWS2\n"
//! blocks     zstd frames, one a block: postcard rows back to back, about ROW_BLOCK bytes of
//!            them before compression
//! directory  postcard: (rows: u64, blocks: Vec<(first row: u64, byte offset: u64)>)
//! footer     8 bytes   byte offset of the directory (u64, little-endian)
//! ```
//!
//! A row does not name its segment: the reader sets [`ClaimRef::segment`] from the file it read
//! the row from, so a segment file can be linked into another store under another number.

use crate::claim::{Claim, Kind, Modality, Polarity};
use crate::error::StoreError;
use serde::{Deserialize, Serialize};
use std::fs::File;
use std::io::{BufWriter, Write};
use std::os::unix::fs::FileExt;
use std::path::{Path, PathBuf};

/// Where a full claim record lives in the store: in segment `segment`'s compressed claim file,
/// the block (one zstd frame) that starts at byte `offset`, at bytes `within..within + len` of
/// the block once decompressed. The segment is not stored with the row (see the module).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct ClaimRef {
    #[serde(skip)]
    pub segment: u32,
    pub offset: u64,
    pub within: u32,
    pub len: u32,
}

/// The compact form of a claim that the graph is built from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClaimRow {
    pub cause: String,
    pub effect: String,
    pub cause_text: String,
    pub effect_text: String,
    pub kind: Kind,
    pub polarity: Polarity,
    pub modality: Modality,
    pub cue: String,
    /// The document: its path, plus `#record` for many-documents-per-file formats.
    pub doc: String,
    pub line: u32,
    /// Byte offset of the sentence in its document.
    pub sentence: u64,
    pub at: ClaimRef,
    /// The claim's confidence (see `crate::extract::confidence`).
    pub confidence: f32,
}

impl ClaimRow {
    pub fn from_claim(c: &Claim, at: ClaimRef) -> ClaimRow {
        ClaimRow {
            cause: c.cause.key.clone(),
            effect: c.effect.key.clone(),
            cause_text: c.cause.text.clone(),
            effect_text: c.effect.text.clone(),
            kind: c.kind,
            polarity: c.polarity,
            modality: c.modality,
            cue: c.cue.clone(),
            doc: doc_id(&c.source.path, c.source.record.as_deref()),
            line: c.source.line as u32,
            sentence: c.source.start as u64,
            at,
            confidence: c.confidence as f32,
        }
    }
}

/// The document identity used for "distinct documents".
pub fn doc_id(path: &str, record: Option<&str>) -> String {
    match record {
        Some(r) => format!("{path}#{r}"),
        None => path.to_string(),
    }
}

const MAGIC: &[u8; 8] = b"HSROWS2\n";

/// Rows are compressed in blocks of about this many bytes (one zstd frame a block): a look-up of
/// one row decompresses one block, and a variable named in many claims of a large segment still
/// decompresses only the blocks of its rows.
const ROW_BLOCK: usize = 8 * 1024;

/// zstd level of the row blocks.
const ROW_LEVEL: i32 = 3;

/// A decompressed row block may be at most this large (a block ends after the row that crosses
/// [`ROW_BLOCK`]; a row is at most a sentence's worth of keys and text).
const MAX_BLOCK: usize = 64 << 20;

fn corrupt(path: &Path, message: String) -> StoreError {
    StoreError::Corrupt {
        path: path.to_path_buf(),
        message,
    }
}

/// Writes a segment's rows file block by block.
pub(crate) struct RowsWriter {
    path: PathBuf,
    out: BufWriter<File>,
    block: Vec<u8>,
    /// Rows written so far, and the first row of the block being filled.
    rows: u64,
    block_first: u64,
    offset: u64,
    blocks: Vec<(u64, u64)>,
}

impl RowsWriter {
    pub fn create(path: &Path) -> Result<RowsWriter, StoreError> {
        let mut out = BufWriter::new(File::create(path).map_err(|e| StoreError::io(path, e))?);
        out.write_all(MAGIC).map_err(|e| StoreError::io(path, e))?;
        Ok(RowsWriter {
            path: path.to_path_buf(),
            out,
            block: Vec::with_capacity(ROW_BLOCK * 2),
            rows: 0,
            block_first: 0,
            offset: MAGIC.len() as u64,
            blocks: Vec::new(),
        })
    }

    /// Append a row; returns its number.
    pub fn push(&mut self, row: &ClaimRow) -> Result<u64, StoreError> {
        postcard::to_io(row, &mut self.block).map_err(|e| corrupt(&self.path, e.to_string()))?;
        let n = self.rows;
        self.rows += 1;
        if self.block.len() >= ROW_BLOCK {
            self.flush()?;
        }
        Ok(n)
    }

    fn flush(&mut self) -> Result<(), StoreError> {
        if self.block.is_empty() {
            return Ok(());
        }
        let frame = zstd::bulk::compress(&self.block, ROW_LEVEL)
            .map_err(|e| StoreError::io(&self.path, e))?;
        self.out
            .write_all(&frame)
            .map_err(|e| StoreError::io(&self.path, e))?;
        self.blocks.push((self.block_first, self.offset));
        self.offset += frame.len() as u64;
        self.block_first = self.rows;
        self.block.clear();
        Ok(())
    }

    /// Write the last block, the directory and the footer; the file is not yet synced.
    pub fn finish(mut self) -> Result<File, StoreError> {
        self.flush()?;
        let dir = postcard::to_stdvec(&(self.rows, &self.blocks))
            .map_err(|e| corrupt(&self.path, e.to_string()))?;
        let io = |e| StoreError::io(&self.path, e);
        self.out.write_all(&dir).map_err(io)?;
        self.out.write_all(&self.offset.to_le_bytes()).map_err(io)?;
        self.out.into_inner().map_err(|e| io(e.into_error()))
    }
}

/// A segment's rows file opened for reading: its block directory in memory, blocks read on
/// demand.
pub(crate) struct RowsFile {
    path: PathBuf,
    file: File,
    segment: u32,
    rows: u64,
    /// (first row, byte offset) of each block, and the directory's offset (the end of the
    /// last block).
    blocks: Vec<(u64, u64)>,
    end: u64,
}

impl RowsFile {
    /// Open segment `segment`'s rows file: every row read from it is given that segment.
    pub fn open(path: &Path, segment: u32) -> Result<RowsFile, StoreError> {
        let file = File::open(path).map_err(|e| StoreError::io(path, e))?;
        let len = file.metadata().map_err(|e| StoreError::io(path, e))?.len();
        if len < (MAGIC.len() + 8) as u64 {
            return Err(corrupt(
                path,
                format!("{len} bytes: too short for a rows file"),
            ));
        }
        let mut head = [0u8; 8];
        file.read_exact_at(&mut head, 0)
            .map_err(|e| StoreError::io(path, e))?;
        if &head != MAGIC {
            return Err(corrupt(path, "not a rows file (bad magic bytes)".into()));
        }
        let mut foot = [0u8; 8];
        file.read_exact_at(&mut foot, len - 8)
            .map_err(|e| StoreError::io(path, e))?;
        let end = u64::from_le_bytes(foot);
        if end < MAGIC.len() as u64 || end > len - 8 {
            return Err(corrupt(
                path,
                format!("directory offset {end} out of range"),
            ));
        }
        let mut bytes = vec![0u8; (len - 8 - end) as usize];
        file.read_exact_at(&mut bytes, end)
            .map_err(|e| StoreError::io(path, e))?;
        let (rows, blocks): (u64, Vec<(u64, u64)>) =
            postcard::from_bytes(&bytes).map_err(|e| corrupt(path, format!("directory: {e}")))?;
        let ordered = blocks
            .windows(2)
            .all(|w| w[0].0 < w[1].0 && w[0].1 < w[1].1);
        let inside = blocks
            .iter()
            .all(|&(r, o)| r < rows && o >= MAGIC.len() as u64 && o < end);
        if !ordered || !inside || (rows > 0 && blocks.first().map(|b| b.0) != Some(0)) {
            return Err(corrupt(
                path,
                "block directory out of order or range".into(),
            ));
        }
        Ok(RowsFile {
            path: path.to_path_buf(),
            file,
            segment,
            rows,
            blocks,
            end,
        })
    }

    /// Decompress block `b` with `dctx` (one decompression context for a run of blocks: making
    /// one costs more than decompressing a block) and decode its rows.
    fn block(
        &self,
        b: usize,
        dctx: &mut zstd::bulk::Decompressor<'static>,
    ) -> Result<Vec<ClaimRow>, StoreError> {
        let (first, at) = self.blocks[b];
        let (next_row, next_at) = self
            .blocks
            .get(b + 1)
            .copied()
            .unwrap_or((self.rows, self.end));
        let mut frame = vec![0u8; (next_at - at) as usize];
        self.file
            .read_exact_at(&mut frame, at)
            .map_err(|e| StoreError::io(&self.path, e))?;
        let raw = dctx
            .decompress(&frame, MAX_BLOCK)
            .map_err(|e| corrupt(&self.path, format!("row block at byte {at}: {e}")))?;
        let want = (next_row - first) as usize;
        let mut out = Vec::with_capacity(want);
        let mut bytes = raw.as_slice();
        while !bytes.is_empty() {
            let (mut row, rest): (ClaimRow, _) = postcard::take_from_bytes(bytes).map_err(|e| {
                corrupt(&self.path, format!("row {}: {e}", first + out.len() as u64))
            })?;
            row.at.segment = self.segment;
            out.push(row);
            bytes = rest;
        }
        if out.len() != want {
            return Err(corrupt(
                &self.path,
                format!(
                    "row block at byte {at}: {} rows, {want} expected",
                    out.len()
                ),
            ));
        }
        Ok(out)
    }

    fn decompressor(&self) -> Result<zstd::bulk::Decompressor<'static>, StoreError> {
        zstd::bulk::Decompressor::new().map_err(|e| StoreError::io(&self.path, e))
    }

    /// Every row with its number, in row order, one block in memory at a time.
    pub fn for_each(&self, mut f: impl FnMut(u64, ClaimRow)) -> Result<(), StoreError> {
        let mut dctx = self.decompressor()?;
        for b in 0..self.blocks.len() {
            let first = self.blocks[b].0;
            for (i, row) in self.block(b, &mut dctx)?.into_iter().enumerate() {
                f(first + i as u64, row);
            }
        }
        Ok(())
    }

    /// Every row, in row order.
    pub fn all(&self) -> Result<Vec<ClaimRow>, StoreError> {
        let mut out = Vec::with_capacity(self.rows as usize);
        self.for_each(|_, r| out.push(r))?;
        Ok(out)
    }

    /// The rows numbered `wanted` (sorted, distinct), each with its number; each block holding
    /// one of them is decompressed once.
    pub fn read(&self, wanted: &[u32]) -> Result<Vec<(u32, ClaimRow)>, StoreError> {
        let mut out = Vec::with_capacity(wanted.len());
        let mut dctx = self.decompressor()?;
        let mut i = 0;
        while i < wanted.len() {
            let row = wanted[i] as u64;
            if row >= self.rows {
                return Err(corrupt(
                    &self.path,
                    format!("row {row} past the end ({} rows)", self.rows),
                ));
            }
            let b = self.blocks.partition_point(|&(first, _)| first <= row) - 1;
            let first = self.blocks[b].0;
            let next = self.blocks.get(b + 1).map_or(self.rows, |x| x.0);
            let mut rows: Vec<Option<ClaimRow>> =
                self.block(b, &mut dctx)?.into_iter().map(Some).collect();
            while i < wanted.len() && (wanted[i] as u64) < next {
                let at = (wanted[i] as u64 - first) as usize;
                if let Some(r) = rows.get_mut(at).and_then(Option::take) {
                    out.push((wanted[i], r));
                }
                i += 1;
            }
        }
        Ok(out)
    }
}

/// A causal claim row for unit tests: `cause → effect` with this sign and modality, stated in
/// `doc` (line 1, sentence 0, confidence 1). The one row fixture every module's tests share.
#[cfg(test)]
pub(crate) fn test_row(cause: &str, effect: &str, p: Polarity, m: Modality, doc: &str) -> ClaimRow {
    ClaimRow {
        cause: cause.into(),
        effect: effect.into(),
        cause_text: cause.into(),
        effect_text: effect.into(),
        kind: Kind::Causal,
        polarity: p,
        modality: m,
        cue: "raise".into(),
        doc: doc.into(),
        line: 1,
        sentence: 0,
        at: ClaimRef {
            segment: 0,
            offset: 0,
            within: 0,
            len: 0,
        },
        confidence: 1.0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rows(n: usize) -> Vec<ClaimRow> {
        (0..n)
            .map(|i| {
                let mut r = test_row(
                    &format!("cause {i}"),
                    &format!("effect {}", i % 7),
                    Polarity::Increase,
                    Modality::Asserted,
                    &format!("doc{}", i / 10),
                );
                r.at.offset = i as u64 * 100;
                r.at.len = i as u32;
                r
            })
            .collect()
    }

    /// Enough rows for many blocks: a pass, a full read and a read of scattered rows give the
    /// rows as written, each with the segment the reader was opened for.
    #[test]
    fn rows_round_trip_across_blocks_with_the_readers_segment() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("seg-000003.rows");
        let written = rows(2000);
        let mut w = RowsWriter::create(&p).unwrap();
        for (i, r) in written.iter().enumerate() {
            assert_eq!(w.push(r).unwrap(), i as u64);
        }
        w.finish().unwrap().sync_all().unwrap();
        let f = RowsFile::open(&p, 9).unwrap();
        assert!(f.blocks.len() > 5, "{} blocks", f.blocks.len());
        let mut expected = written.clone();
        for r in &mut expected {
            r.at.segment = 9;
        }
        assert_eq!(f.all().unwrap(), expected);
        let wanted = [0u32, 1, 57, 58, 999, 1999];
        let got = f.read(&wanted).unwrap();
        assert_eq!(got.len(), wanted.len());
        for (n, r) in got {
            assert_eq!(r, expected[n as usize]);
        }
        assert!(f
            .read(&[2000])
            .unwrap_err()
            .to_string()
            .contains("seg-000003.rows"));
    }

    #[test]
    fn an_empty_segment_and_a_damaged_file() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("seg-000001.rows");
        RowsWriter::create(&p).unwrap().finish().unwrap();
        assert!(RowsFile::open(&p, 1).unwrap().all().unwrap().is_empty());
        let mut w = RowsWriter::create(&p).unwrap();
        for r in rows(300) {
            w.push(&r).unwrap();
        }
        w.finish().unwrap().sync_all().unwrap();
        let good = std::fs::read(&p).unwrap();
        let mut flipped = good.clone();
        flipped[20] ^= 0xff;
        for bad in [
            good[..good.len() / 2].to_vec(),
            vec![0u8; 4],
            [&good[..good.len() - 8], &[0xff; 8][..]].concat(),
            flipped,
        ] {
            std::fs::write(&p, &bad).unwrap();
            let e = RowsFile::open(&p, 1)
                .and_then(|f| f.all())
                .unwrap_err()
                .to_string();
            assert!(e.contains("seg-000001.rows"), "{e}");
        }
    }
}
