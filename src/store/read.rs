//! Reading a store: the manifest, the compact rows the graph is built from, the full claim
//! records they point at, and sentence lookups in the search index.

use super::index::SentenceIndex;
use super::manifest::{load, seg_name, Manifest};
use super::postings::Postings;
use super::rows::{ClaimRef, ClaimRow};
use crate::claim::Claim;
use crate::error::StoreError;
use serde::Deserialize;
use std::collections::{BTreeSet, HashMap};
use std::fs::{self, File};
use std::io::{Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};

/// A store opened for reading.
pub struct Store {
    pub dir: PathBuf,
    pub manifest: Manifest,
    /// The sentence index, once a query needed it.
    index: Option<SentenceIndex>,
}

/// A segment's rows: postcard records back to back.
fn decode_rows<'a, T: Deserialize<'a>>(
    path: &Path,
    mut bytes: &'a [u8],
) -> Result<Vec<T>, StoreError> {
    let mut out = Vec::new();
    while !bytes.is_empty() {
        let (row, rest) = postcard::take_from_bytes(bytes).map_err(|e| StoreError::Corrupt {
            path: path.to_path_buf(),
            message: format!("row {}: {e}", out.len()),
        })?;
        out.push(row);
        bytes = rest;
    }
    Ok(out)
}

impl Store {
    /// Open an existing store.
    pub fn open(dir: &Path) -> Result<Store, StoreError> {
        let manifest = load(dir)?;
        Ok(Store {
            dir: dir.to_path_buf(),
            manifest,
            index: None,
        })
    }

    /// The compact rows of every live claim, in manifest (corpus) order.
    pub fn rows(&self) -> Result<Vec<ClaimRow>, StoreError> {
        let mut by_seg: HashMap<u32, Vec<ClaimRow>> = HashMap::new();
        for seg in self.manifest.segments() {
            let p = self.dir.join(seg_name(seg, "rows"));
            let bytes = fs::read(&p).map_err(|e| StoreError::io(&p, e))?;
            by_seg.insert(seg, decode_rows(&p, &bytes)?);
        }
        let mut out = Vec::new();
        for f in &self.manifest.files {
            if f.claims == 0 {
                continue;
            }
            let rows = by_seg.get(&f.segment).ok_or_else(|| StoreError::Corrupt {
                path: self.dir.clone(),
                message: format!("segment {} missing", f.segment),
            })?;
            for (a, b) in f.row_ranges() {
                let (a, b) = (a as usize, b as usize);
                let slice = rows.get(a..b).ok_or_else(|| StoreError::Corrupt {
                    path: self.dir.clone(),
                    message: format!("rows {a}..{b} out of range for {}", f.path),
                })?;
                out.extend_from_slice(slice);
            }
        }
        Ok(out)
    }

    /// The raw compact rows of every live segment, read once so that many queries can select
    /// from them (see [`Store::rows_where`]).
    pub fn row_bytes(&self) -> Result<RowBytes, StoreError> {
        let mut segs = HashMap::new();
        for seg in self.manifest.segments() {
            let p = self.dir.join(seg_name(seg, "rows"));
            let bytes = fs::read(&p).map_err(|e| StoreError::io(&p, e))?;
            segs.insert(seg, bytes);
        }
        Ok(RowBytes { segs })
    }

    /// The live rows whose (cause key, effect key), as UTF-8 bytes, `keep` accepts, in the order
    /// of [`Store::rows`]. Rows are decoded without copying their text; only kept rows are
    /// copied, so selecting a few rows costs one pass over the bytes instead of building every row.
    pub fn rows_where(
        &self,
        bytes: &RowBytes,
        mut keep: impl FnMut(&[u8], &[u8]) -> bool,
    ) -> Result<Vec<ClaimRow>, StoreError> {
        let mut by_seg: HashMap<u32, Vec<(usize, ClaimRow)>> = HashMap::new();
        let mut lens: HashMap<u32, usize> = HashMap::new();
        for (&seg, b) in &bytes.segs {
            let p = self.dir.join(seg_name(seg, "rows"));
            let corrupt = |message: String| StoreError::Corrupt {
                path: p.clone(),
                message,
            };
            let rows: Vec<RowView> = decode_rows(&p, b)?;
            lens.insert(seg, rows.len());
            let mut kept = Vec::new();
            for (i, r) in rows.iter().enumerate() {
                if keep(r.cause, r.effect) {
                    kept.push((i, r.to_row().map_err(|e| corrupt(e.to_string()))?));
                }
            }
            by_seg.insert(seg, kept);
        }
        let mut out = Vec::new();
        for f in &self.manifest.files {
            if f.claims == 0 {
                continue;
            }
            let (Some(rows), Some(&len)) = (by_seg.get(&f.segment), lens.get(&f.segment)) else {
                return Err(StoreError::Corrupt {
                    path: self.dir.clone(),
                    message: format!("segment {} missing", f.segment),
                });
            };
            for (a, b) in f.row_ranges() {
                let (a, b) = (a as usize, b as usize);
                if a > b || b > len {
                    return Err(StoreError::Corrupt {
                        path: self.dir.clone(),
                        message: format!("rows {a}..{b} out of range for {}", f.path),
                    });
                }
                let from = rows.partition_point(|(i, _)| *i < a);
                let to = rows.partition_point(|(i, _)| *i < b);
                out.extend(rows[from..to].iter().map(|(_, r)| r.clone()));
            }
        }
        Ok(out)
    }

    /// The postings of every live segment (their directories read, their lists not), for any
    /// number of [`Store::rows_naming`] look-ups.
    pub fn postings(&self) -> Result<PostingIndex, StoreError> {
        let mut segs = Vec::new();
        for seg in self.manifest.segments() {
            segs.push((seg, Postings::open(&self.dir.join(seg_name(seg, "post")))?));
        }
        Ok(PostingIndex { segs })
    }

    /// The live rows whose raw cause or effect key `wanted` accepts, in the order of
    /// [`Store::rows`]: the postings say which rows they are, and only those rows are read.
    pub fn rows_naming(
        &self,
        post: &PostingIndex,
        mut wanted: impl FnMut(&str) -> bool,
    ) -> Result<Vec<ClaimRow>, StoreError> {
        let mut by_seg: HashMap<u32, Vec<(usize, ClaimRow)>> = HashMap::new();
        for (seg, p) in &post.segs {
            let at = p.rows(&mut wanted)?;
            let path = self.dir.join(seg_name(*seg, "rows"));
            let mut kept = Vec::with_capacity(at.len());
            if !at.is_empty() {
                let f = File::open(&path).map_err(|e| StoreError::io(&path, e))?;
                let size = f.metadata().map_err(|e| StoreError::io(&path, e))?.len();
                let mut buf = Vec::new();
                for a in at {
                    if a.offset.saturating_add(a.len as u64) > size {
                        return Err(StoreError::Corrupt {
                            path: path.clone(),
                            message: format!(
                                "row {} at {}+{} past the end ({size} bytes)",
                                a.row, a.offset, a.len
                            ),
                        });
                    }
                    buf.resize(a.len as usize, 0);
                    std::os::unix::fs::FileExt::read_exact_at(&f, &mut buf, a.offset)
                        .map_err(|e| StoreError::io(&path, e))?;
                    let row: ClaimRow =
                        postcard::from_bytes(&buf).map_err(|e| StoreError::Corrupt {
                            path: path.clone(),
                            message: format!("row {}: {e}", a.row),
                        })?;
                    kept.push((a.row as usize, row));
                }
            }
            by_seg.insert(*seg, kept);
        }
        let mut out = Vec::new();
        for f in &self.manifest.files {
            if f.claims == 0 {
                continue;
            }
            let Some(rows) = by_seg.get(&f.segment) else {
                return Err(StoreError::Corrupt {
                    path: self.dir.clone(),
                    message: format!("segment {} missing", f.segment),
                });
            };
            for (a, b) in f.row_ranges() {
                let (a, b) = (a as usize, b as usize);
                let from = rows.partition_point(|(i, _)| *i < a);
                let to = rows.partition_point(|(i, _)| *i < b);
                out.extend(rows[from..to.max(from)].iter().map(|(_, r)| r.clone()));
            }
        }
        Ok(out)
    }

    /// The full claim record a row points at.
    pub fn claim(&self, at: ClaimRef) -> Result<Claim, StoreError> {
        let p = self.dir.join(seg_name(at.segment, "jsonl"));
        let mut f = File::open(&p).map_err(|e| StoreError::io(&p, e))?;
        f.seek(SeekFrom::Start(at.offset))
            .map_err(|e| StoreError::io(&p, e))?;
        let mut buf = vec![0; at.len as usize];
        f.read_exact(&mut buf).map_err(|e| StoreError::io(&p, e))?;
        serde_json::from_slice(&buf).map_err(|e| StoreError::Corrupt {
            path: p,
            message: e.to_string(),
        })
    }

    /// Every live claim, streamed in corpus order.
    pub fn for_each_claim(&self, mut f: impl FnMut(Claim) -> bool) -> Result<(), StoreError> {
        for r in self.rows()? {
            if !f(self.claim(r.at)?) {
                break;
            }
        }
        Ok(())
    }

    /// The (document, sentence start) of every sentence that contains every term of each group
    /// (terms are stemmed keys' words). The index is opened on first use: most commands never
    /// search it.
    pub fn sentence_ids_with(
        &mut self,
        groups: &[&[String]],
    ) -> Result<BTreeSet<(String, u64)>, StoreError> {
        let index = match &mut self.index {
            Some(index) => index,
            None => self.index.insert(SentenceIndex::open(&self.dir)?),
        };
        index.sentence_ids_with(groups)
    }
}

/// The postings of a store's live segments (see [`Store::postings`]).
#[derive(Debug)]
pub struct PostingIndex {
    segs: Vec<(u32, Postings)>,
}

impl PostingIndex {
    /// Every raw variable key of the live segments (a key of removed claims may be among them).
    pub fn keys(&self) -> BTreeSet<&str> {
        self.segs.iter().flat_map(|(_, p)| p.keys()).collect()
    }
}

/// The compact rows of a store's live segments, as read from disk (see [`Store::row_bytes`]).
#[derive(Debug, Default)]
pub struct RowBytes {
    segs: HashMap<u32, Vec<u8>>,
}

/// A [`ClaimRow`] decoded in place: the same fields in the same order (postcard has no field
/// names, and encodes a string and a byte string alike), with the text borrowed from the row
/// bytes as bytes, so that only the rows kept pay for the UTF-8 check.
#[derive(Debug, Deserialize)]
pub(super) struct RowView<'a> {
    cause: &'a [u8],
    effect: &'a [u8],
    cause_text: &'a [u8],
    effect_text: &'a [u8],
    kind: crate::claim::Kind,
    polarity: crate::claim::Polarity,
    modality: crate::claim::Modality,
    cue: &'a [u8],
    doc: &'a [u8],
    line: u32,
    sentence: u64,
    at: ClaimRef,
    confidence: f32,
}

impl RowView<'_> {
    pub(super) fn to_row(&self) -> Result<ClaimRow, std::string::FromUtf8Error> {
        let s = |b: &[u8]| String::from_utf8(b.to_vec());
        Ok(ClaimRow {
            cause: s(self.cause)?,
            effect: s(self.effect)?,
            cause_text: s(self.cause_text)?,
            effect_text: s(self.effect_text)?,
            kind: self.kind,
            polarity: self.polarity,
            modality: self.modality,
            cue: s(self.cue)?,
            doc: s(self.doc)?,
            line: self.line,
            sentence: self.sentence,
            at: self.at,
            confidence: self.confidence,
        })
    }
}
