//! Postings: for each variable key of a segment, the rows that name it as cause or effect, so
//! that a query about a few variables (`pair`, `claims --cause`) reads only their rows instead of
//! every row of the store.
//!
//! One file a segment, `seg-NNNNNN.post`, written when the segment is committed:
//!
//! ```text
//! magic      8 bytes   "HSPOST1\n"
//! lists      16 bytes an entry, little-endian: row number (u32), byte offset of the row in
//!            seg-NNNNNN.rows (u64), byte length of the row (u32); one list a key, in key order,
//!            each list in row order
//! directory  postcard: Vec<(key, first entry, entries)>, keys sorted and distinct
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

const MAGIC: &[u8; 8] = b"HSPOST1\n";
const ENTRY: usize = 16;

/// Where one row of a segment is: its number and its bytes in the rows file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub(crate) struct RowAt {
    pub row: u32,
    pub offset: u64,
    pub len: u32,
}

/// The postings of the segment being written, kept in memory until commit (16 bytes a key
/// occurrence: about 32 bytes a claim).
#[derive(Debug, Default)]
pub(crate) struct PostingsBuilder {
    lists: BTreeMap<String, Vec<RowAt>>,
}

impl PostingsBuilder {
    pub fn add(&mut self, cause: &str, effect: &str, at: RowAt) {
        self.push(cause, at);
        if effect != cause {
            self.push(effect, at);
        }
    }

    fn push(&mut self, key: &str, at: RowAt) {
        match self.lists.get_mut(key) {
            Some(l) => l.push(at),
            None => {
                self.lists.insert(key.to_string(), vec![at]);
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
        let mut next = 0u64;
        for (key, list) in &self.lists {
            dir.push((key, next, list.len() as u32));
            for e in list {
                w.write_all(&e.row.to_le_bytes()).map_err(io)?;
                w.write_all(&e.offset.to_le_bytes()).map_err(io)?;
                w.write_all(&e.len.to_le_bytes()).map_err(io)?;
            }
            next += list.len() as u64;
        }
        let dir_at = MAGIC.len() as u64 + next * ENTRY as u64;
        let bytes = postcard::to_stdvec(&dir).map_err(|e| StoreError::Corrupt {
            path: path.to_path_buf(),
            message: e.to_string(),
        })?;
        w.write_all(&bytes).map_err(io)?;
        w.write_all(&dir_at.to_le_bytes()).map_err(io)?;
        w.into_inner().map_err(|e| io(e.into_error()))
    }
}

/// A segment's postings file opened for reading: its directory in memory, the lists read on
/// demand.
#[derive(Debug)]
pub(crate) struct Postings {
    path: PathBuf,
    file: File,
    /// (key, first entry, entries), sorted by key.
    dir: Vec<(String, u64, u32)>,
}

impl Postings {
    pub fn open(path: &Path) -> Result<Postings, StoreError> {
        let corrupt = |message: String| StoreError::Corrupt {
            path: path.to_path_buf(),
            message,
        };
        let file = File::open(path).map_err(|e| StoreError::io(path, e))?;
        let len = file.metadata().map_err(|e| StoreError::io(path, e))?.len();
        if len < (MAGIC.len() + 8) as u64 {
            return Err(corrupt(format!(
                "{len} bytes: too short for a postings file"
            )));
        }
        let mut head = [0u8; 8];
        file.read_exact_at(&mut head, 0)
            .map_err(|e| StoreError::io(path, e))?;
        if &head != MAGIC {
            return Err(corrupt("not a postings file (bad magic bytes)".into()));
        }
        let mut foot = [0u8; 8];
        file.read_exact_at(&mut foot, len - 8)
            .map_err(|e| StoreError::io(path, e))?;
        let dir_at = u64::from_le_bytes(foot);
        if dir_at < MAGIC.len() as u64
            || dir_at > len - 8
            || !(dir_at - MAGIC.len() as u64).is_multiple_of(ENTRY as u64)
        {
            return Err(corrupt(format!("directory offset {dir_at} out of range")));
        }
        let mut bytes = vec![0u8; (len - 8 - dir_at) as usize];
        file.read_exact_at(&mut bytes, dir_at)
            .map_err(|e| StoreError::io(path, e))?;
        let dir: Vec<(String, u64, u32)> =
            postcard::from_bytes(&bytes).map_err(|e| corrupt(format!("directory: {e}")))?;
        let entries = (dir_at - MAGIC.len() as u64) / ENTRY as u64;
        for (k, first, n) in &dir {
            if first.checked_add(*n as u64).is_none_or(|end| end > entries) {
                return Err(corrupt(format!("list of \"{k}\" out of range")));
            }
        }
        if dir.windows(2).any(|w| w[0].0 >= w[1].0) {
            return Err(corrupt("directory keys out of order".into()));
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
    pub fn rows(&self, mut wanted: impl FnMut(&str) -> bool) -> Result<Vec<RowAt>, StoreError> {
        let mut out = Vec::new();
        for (k, first, n) in &self.dir {
            if !wanted(k) {
                continue;
            }
            let mut buf = vec![0u8; *n as usize * ENTRY];
            self.file
                .read_exact_at(&mut buf, MAGIC.len() as u64 + first * ENTRY as u64)
                .map_err(|e| StoreError::io(&self.path, e))?;
            for e in buf.chunks_exact(ENTRY) {
                let u32_at = |i: usize| u32::from_le_bytes([e[i], e[i + 1], e[i + 2], e[i + 3]]);
                let mut off = [0u8; 8];
                off.copy_from_slice(&e[4..12]);
                out.push(RowAt {
                    row: u32_at(0),
                    offset: u64::from_le_bytes(off),
                    len: u32_at(12),
                });
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
        let at = |row: u32| RowAt {
            row,
            offset: row as u64 * 10,
            len: 10,
        };
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
        b.add(
            "rain",
            "flood",
            RowAt {
                row: 0,
                offset: 0,
                len: 3,
            },
        );
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
