//! Postings: for each variable key of a segment, the rows that name it as cause or effect, so
//! that a query about a few variables (`pair`, `claims --cause`) reads only their rows instead of
//! every row of the store.
//!
//! One file a segment, `seg-NNNNNN.post`, written when the segment is committed:
//!
//! ```text
//! magic      8 bytes   "HSPOST2\n"
//! lists      one a key, in key order: the key's row numbers in row order as gaps (the first row,
//!            then each row minus the one before), postcard `Vec<u32>` (each a varint)
//! directory  one zstd frame of postcard: Vec<(key, byte offset of its list, byte length)>,
//!            keys sorted and distinct
//! footer     8 bytes   byte offset of the directory (u64, little-endian)
//! ```
//!
//! Keys are the raw keys of the claims (before aliases), so an alias file changed after the scan
//! needs no rebuild: a query resolves every key of the directory and takes the lists of those
//! that resolve to the names it asks about. A row whose cause and effect keys are equal is listed
//! once. The lists cover every row of the segment, live or not; the manifest's row ranges decide
//! which are live, exactly as for a full read of the rows.

use crate::error::StoreError;
use std::collections::BTreeMap;
use std::fs::File;
use std::io::{BufWriter, Write};
use std::os::unix::fs::FileExt;
use std::path::{Path, PathBuf};

const MAGIC: &[u8; 8] = b"HSPOST2\n";

/// A decompressed directory may be at most this large.
const MAX_DIRECTORY: usize = 1 << 30;

fn corrupt(path: &Path, message: String) -> StoreError {
    StoreError::Corrupt {
        path: path.to_path_buf(),
        message,
    }
}

/// The postings of the segment being written, kept in memory until commit (4 bytes a key
/// occurrence: about 8 bytes a claim).
#[derive(Debug, Default)]
pub(crate) struct PostingsBuilder {
    lists: BTreeMap<String, Vec<u32>>,
}

impl PostingsBuilder {
    /// Rows must be added in row order.
    pub fn add(&mut self, cause: &str, effect: &str, row: u32) {
        self.push(cause, row);
        if effect != cause {
            self.push(effect, row);
        }
    }

    fn push(&mut self, key: &str, row: u32) {
        match self.lists.get_mut(key) {
            Some(l) => l.push(row),
            None => {
                self.lists.insert(key.to_string(), vec![row]);
            }
        }
    }

    pub fn is_empty(&self) -> bool {
        self.lists.is_empty()
    }

    /// Write the file (not yet synced: the caller syncs before the manifest names it).
    pub fn write(&self, path: &Path) -> Result<File, StoreError> {
        let io = |e| StoreError::io(path, e);
        let mut w = BufWriter::new(File::create(path).map_err(io)?);
        w.write_all(MAGIC).map_err(io)?;
        let mut dir: Vec<(&str, u64, u32)> = Vec::with_capacity(self.lists.len());
        let mut at = MAGIC.len() as u64;
        let mut gaps = Vec::new();
        for (key, list) in &self.lists {
            gaps.clear();
            let mut before = 0;
            for (i, &row) in list.iter().enumerate() {
                gaps.push(if i == 0 { row } else { row - before });
                before = row;
            }
            let bytes = postcard::to_stdvec(&gaps).map_err(|e| corrupt(path, e.to_string()))?;
            w.write_all(&bytes).map_err(io)?;
            dir.push((key, at, bytes.len() as u32));
            at += bytes.len() as u64;
        }
        let bytes = postcard::to_stdvec(&dir).map_err(|e| corrupt(path, e.to_string()))?;
        let frame = zstd::bulk::compress(&bytes, 3).map_err(io)?;
        w.write_all(&frame).map_err(io)?;
        w.write_all(&at.to_le_bytes()).map_err(io)?;
        w.into_inner().map_err(|e| io(e.into_error()))
    }
}

/// A segment's postings file opened for reading: its directory in memory, the lists read on
/// demand.
#[derive(Debug)]
pub(crate) struct Postings {
    path: PathBuf,
    file: File,
    /// (key, byte offset, byte length of its list), sorted by key.
    dir: Vec<(String, u64, u32)>,
}

impl Postings {
    pub fn open(path: &Path) -> Result<Postings, StoreError> {
        let file = File::open(path).map_err(|e| StoreError::io(path, e))?;
        let len = file.metadata().map_err(|e| StoreError::io(path, e))?.len();
        if len < (MAGIC.len() + 8) as u64 {
            return Err(corrupt(
                path,
                format!("{len} bytes: too short for a postings file"),
            ));
        }
        let mut head = [0u8; 8];
        file.read_exact_at(&mut head, 0)
            .map_err(|e| StoreError::io(path, e))?;
        if &head != MAGIC {
            return Err(corrupt(
                path,
                "not a postings file (bad magic bytes)".into(),
            ));
        }
        let mut foot = [0u8; 8];
        file.read_exact_at(&mut foot, len - 8)
            .map_err(|e| StoreError::io(path, e))?;
        let dir_at = u64::from_le_bytes(foot);
        if dir_at < MAGIC.len() as u64 || dir_at > len - 8 {
            return Err(corrupt(
                path,
                format!("directory offset {dir_at} out of range"),
            ));
        }
        let mut frame = vec![0u8; (len - 8 - dir_at) as usize];
        file.read_exact_at(&mut frame, dir_at)
            .map_err(|e| StoreError::io(path, e))?;
        let bytes = zstd::bulk::decompress(&frame, MAX_DIRECTORY)
            .map_err(|e| corrupt(path, format!("directory: {e}")))?;
        let dir: Vec<(String, u64, u32)> =
            postcard::from_bytes(&bytes).map_err(|e| corrupt(path, format!("directory: {e}")))?;
        for (k, at, n) in &dir {
            if *at < MAGIC.len() as u64 || at.checked_add(*n as u64).is_none_or(|end| end > dir_at)
            {
                return Err(corrupt(path, format!("list of \"{k}\" out of range")));
            }
        }
        if dir.windows(2).any(|w| w[0].0 >= w[1].0) {
            return Err(corrupt(path, "directory keys out of order".into()));
        }
        Ok(Postings {
            path: path.to_path_buf(),
            file,
            dir,
        })
    }

    /// Every key of the segment.
    pub fn keys(&self) -> impl Iterator<Item = &str> {
        self.dir.iter().map(|(k, _, _)| k.as_str())
    }

    /// The rows naming any key `wanted` accepts, each once, in row order.
    pub fn rows(&self, mut wanted: impl FnMut(&str) -> bool) -> Result<Vec<u32>, StoreError> {
        let mut out = Vec::new();
        let mut buf = Vec::new();
        for (k, at, n) in &self.dir {
            if !wanted(k) {
                continue;
            }
            buf.resize(*n as usize, 0);
            self.file
                .read_exact_at(&mut buf, *at)
                .map_err(|e| StoreError::io(&self.path, e))?;
            let gaps: Vec<u32> = postcard::from_bytes(&buf)
                .map_err(|e| corrupt(&self.path, format!("list of \"{k}\": {e}")))?;
            let mut row = 0u32;
            for (i, g) in gaps.into_iter().enumerate() {
                row = if i == 0 {
                    g
                } else {
                    row.checked_add(g).ok_or_else(|| {
                        corrupt(&self.path, format!("list of \"{k}\": row past 2^32"))
                    })?
                };
                out.push(row);
            }
        }
        out.sort_unstable();
        out.dedup();
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lists_round_trip_and_a_row_is_listed_once() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("seg-000001.post");
        let mut b = PostingsBuilder::default();
        let at = |row: u32| row;
        b.add("rain", "flood", at(0));
        b.add("flood", "flood", at(1));
        b.add("drought", "rain", at(2));
        b.write(&p).unwrap().sync_all().unwrap();
        let post = Postings::open(&p).unwrap();
        assert_eq!(
            post.keys().collect::<Vec<_>>(),
            ["drought", "flood", "rain"]
        );
        assert_eq!(post.rows(|k| k == "flood").unwrap(), [at(0), at(1)]);
        assert_eq!(
            post.rows(|k| k == "rain" || k == "flood").unwrap(),
            [at(0), at(1), at(2)]
        );
        assert!(post.rows(|k| k == "snow").unwrap().is_empty());
    }

    #[test]
    fn a_damaged_file_is_an_error_naming_it() {
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("seg-000001.post");
        let mut b = PostingsBuilder::default();
        b.add("rain", "flood", 0);
        b.add("rain", "drought", 7);
        b.write(&p).unwrap().sync_all().unwrap();
        let good = std::fs::read(&p).unwrap();
        for bad in [
            good[..good.len() / 2].to_vec(),
            vec![0xff; good.len()],
            [&good[..good.len() - 8], &[0xff; 8][..]].concat(),
        ] {
            std::fs::write(&p, &bad).unwrap();
            let e = Postings::open(&p).unwrap_err().to_string();
            assert!(e.contains("seg-000001.post"), "{e}");
        }
    }
}
