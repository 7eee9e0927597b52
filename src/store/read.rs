//! Reading a store: the manifest, the compact rows the graph is built from, the full claim
//! records they point at, and sentence lookups in the search index.

use super::aggregates::{self, KeyAggregate, SegmentAggregates};
use super::compact;
use super::index::SentenceIndex;
use super::manifest::{load, seg_name, Manifest};
use super::postings::Postings;
use super::rows::{ClaimRef, ClaimRow, RowsFile};
use super::writer::CLAIMS_EXT;
use crate::claim::Claim;
use crate::error::StoreError;
use std::collections::{BTreeSet, HashMap, HashSet};
use std::fs::File;
use std::io::{Read, Seek, SeekFrom};
use std::path::{Path, PathBuf};
use std::sync::Mutex;

/// A store opened for reading.
pub struct Store {
    pub dir: PathBuf,
    pub manifest: Manifest,
    /// The sentence index, once a query needed it.
    index: Option<SentenceIndex>,
    /// The claim blocks read last (segment, offset, decompressed bytes), at most
    /// [`CACHED_BLOCKS`]: claims are mostly read in store order, so neighbours come from the same
    /// block, and files a parallel scan wrote out of path order come from a few blocks apart.
    blocks: Mutex<Vec<(u32, u64, Vec<u8>)>>,
}

/// How many decompressed claim blocks a store keeps (at most 128 KiB and a record each).
const CACHED_BLOCKS: usize = 16;

/// A decompressed claim block may be at most this large (blocks are written at 128 KiB and end
/// after the record that crosses it; a record is at most a sentence and its spans).
const MAX_BLOCK: u64 = 64 << 20;

impl Store {
    /// Open an existing store.
    pub fn open(dir: &Path) -> Result<Store, StoreError> {
        let manifest = load(dir)?;
        Ok(Store {
            dir: dir.to_path_buf(),
            manifest,
            index: None,
            blocks: Mutex::new(Vec::new()),
        })
    }

    /// The compact rows of every live claim, in manifest (corpus) order.
    pub fn rows(&self) -> Result<Vec<ClaimRow>, StoreError> {
        let mut by_seg: HashMap<u32, Vec<ClaimRow>> = HashMap::new();
        for seg in self.manifest.segments() {
            let p = self.dir.join(seg_name(seg, "rows"));
            by_seg.insert(seg, RowsFile::open(&p, seg)?.all()?);
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
        wanted: impl FnMut(&str) -> bool,
    ) -> Result<Vec<ClaimRow>, StoreError> {
        Ok(self
            .rows_naming_at(post, wanted)?
            .into_iter()
            .map(|(_, r)| r)
            .collect())
    }

    /// [`Store::rows_naming_at`] narrowed to pairs: `group` puts a raw key in a group of keys
    /// (or none), and a row is read when it names a key of each group of one of `pairs` (as
    /// cause or effect, either way round). A caller that wants the rows of a few relations
    /// reads those rows and few others, not every row of their ends.
    pub fn rows_naming_pairs(
        &self,
        post: &PostingIndex,
        groups: usize,
        mut group: impl FnMut(&str) -> Option<usize>,
        pairs: &[(usize, usize)],
    ) -> Result<Vec<ClaimRow>, StoreError> {
        let rows = self.rows_at(post, |p| {
            let lists = p.grouped_rows(groups, &mut group)?;
            let mut out = Vec::new();
            for &(a, b) in pairs {
                let (Some(x), Some(y)) = (lists.get(a), lists.get(b)) else {
                    continue;
                };
                let (mut i, mut j) = (0, 0);
                while i < x.len() && j < y.len() {
                    match x[i].cmp(&y[j]) {
                        std::cmp::Ordering::Less => i += 1,
                        std::cmp::Ordering::Greater => j += 1,
                        std::cmp::Ordering::Equal => {
                            out.push(x[i]);
                            i += 1;
                            j += 1;
                        }
                    }
                }
            }
            out.sort_unstable();
            out.dedup();
            Ok(out)
        })?;
        Ok(rows.into_iter().map(|(_, r)| r).collect())
    }

    /// [`Store::rows_naming`] with each row's ordinal in corpus order (as [`Store::ordinals`]
    /// gives it).
    pub fn rows_naming_at(
        &self,
        post: &PostingIndex,
        mut wanted: impl FnMut(&str) -> bool,
    ) -> Result<Vec<(u64, ClaimRow)>, StoreError> {
        self.rows_at(post, |p| p.rows(&mut wanted))
    }

    /// The live rows of each segment that `chosen` picks from its postings (row numbers in
    /// order), in the order of [`Store::rows`], with their ordinals.
    fn rows_at(
        &self,
        post: &PostingIndex,
        mut chosen: impl FnMut(&Postings) -> Result<Vec<u32>, StoreError>,
    ) -> Result<Vec<(u64, ClaimRow)>, StoreError> {
        let mut by_seg: HashMap<u32, Vec<(usize, ClaimRow)>> = HashMap::new();
        for (seg, p) in &post.segs {
            let at = chosen(p)?;
            let kept = if at.is_empty() {
                Vec::new()
            } else {
                let rows = RowsFile::open(&self.dir.join(seg_name(*seg, "rows")), *seg)?;
                rows.read(&at)?
                    .into_iter()
                    .map(|(i, r)| (i as usize, r))
                    .collect()
            };
            by_seg.insert(*seg, kept);
        }
        let mut out = Vec::new();
        for (fi, f) in self.manifest.files.iter().enumerate() {
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
                out.extend(
                    rows[from..to.max(from)]
                        .iter()
                        .map(|(i, r)| (((fi as u64) << 32) | *i as u64, r.clone())),
                );
            }
        }
        Ok(out)
    }

    /// The aggregate tables a whole-graph query sums: the store's summed table when the store
    /// has one for its live rows (see `compact`), else each live segment's table. Each comes
    /// with its [`TableScope`], which [`Store::ordinals`] needs to place its first claims.
    pub fn aggregates(&self) -> Result<Vec<(TableScope, SegmentAggregates)>, StoreError> {
        let segs = self.manifest.segments();
        if segs.len() > 1 {
            let p = self.dir.join(compact::summed_name(&self.manifest));
            // A store committed before compaction existed has none: its segments' tables
            // answer the same, only slower.
            if p.exists() {
                return Ok(vec![(TableScope::Store, SegmentAggregates::open(&p)?)]);
            }
        }
        let mut out = Vec::new();
        for seg in segs {
            let p = self.dir.join(aggregates::file_name(&self.manifest, seg));
            out.push((TableScope::Segment(seg), SegmentAggregates::open(&p)?));
        }
        Ok(out)
    }

    /// The `keys` tables of the same tables as [`Store::aggregates`] (the summed one, else each
    /// live segment's), without their relations: per raw key its surface forms and counts.
    pub fn aggregate_keys(&self) -> Result<Vec<Vec<KeyAggregate>>, StoreError> {
        let segs = self.manifest.segments();
        if segs.len() > 1 {
            let p = self.dir.join(compact::summed_name(&self.manifest));
            if p.exists() {
                return Ok(vec![SegmentAggregates::open_keys(&p)?]);
            }
        }
        segs.into_iter()
            .map(|seg| {
                let p = self.dir.join(aggregates::file_name(&self.manifest, seg));
                SegmentAggregates::open_keys(&p)
            })
            .collect()
    }

    /// Where claims are in corpus order: a function from a table's scope and a first-claim
    /// ordinal stored in it to an ordinal that sorts as [`Store::rows`] lists the rows (the
    /// file's place in the manifest, then the row number), `None` for a row no file owns.
    /// Ordinals of [`Store::rows_naming_at`] are of the same kind.
    pub fn ordinals(&self) -> impl Fn(TableScope, u64) -> Option<u64> + '_ {
        const ROW: u64 = 0xffff_ffff;
        let mut ranges: Vec<(u32, u64, u64, u64)> = Vec::new();
        // The manifest place of each file with claims, by its place among those files.
        let mut with_claims: Vec<u64> = Vec::new();
        for (i, f) in self.manifest.files.iter().enumerate() {
            if f.claims == 0 {
                continue;
            }
            with_claims.push(i as u64);
            for (a, b) in f.row_ranges() {
                ranges.push((f.segment, a, b, i as u64));
            }
        }
        ranges.sort_unstable();
        move |scope, stored| {
            let row = stored & ROW;
            match scope {
                TableScope::Segment(seg) => {
                    let at = ranges.partition_point(|r| (r.0, r.1) <= (seg, row));
                    let r = ranges.get(at.checked_sub(1)?)?;
                    (r.0 == seg && row < r.2).then_some((r.3 << 32) | row)
                }
                TableScope::Store => {
                    let place = with_claims.get(usize::try_from(stored >> 32).ok()?)?;
                    Some((place << 32) | row)
                }
            }
        }
    }

    /// The full claim record a row points at.
    pub fn claim(&self, at: ClaimRef) -> Result<Claim, StoreError> {
        let p = self.dir.join(seg_name(at.segment, CLAIMS_EXT));
        let mut cached = self.blocks.lock().unwrap_or_else(|e| e.into_inner());
        let hit = cached
            .iter()
            .position(|(s, o, _)| *s == at.segment && *o == at.offset);
        let i = match hit {
            Some(i) => i,
            None => {
                let mut f = File::open(&p).map_err(|e| StoreError::io(&p, e))?;
                f.seek(SeekFrom::Start(at.offset))
                    .map_err(|e| StoreError::io(&p, e))?;
                let mut block = Vec::new();
                zstd::stream::read::Decoder::new(f)
                    .map(|d| d.single_frame())
                    .and_then(|d| d.take(MAX_BLOCK).read_to_end(&mut block))
                    .map_err(|e| StoreError::Corrupt {
                        path: p.clone(),
                        message: format!("claim block at byte {}: {e}", at.offset),
                    })?;
                if cached.len() >= CACHED_BLOCKS {
                    cached.remove(0);
                }
                cached.push((at.segment, at.offset, block));
                cached.len() - 1
            }
        };
        let block = cached[i].2.as_slice();
        let (a, b) = (at.within as usize, at.within as usize + at.len as usize);
        let bytes = block.get(a..b).ok_or_else(|| StoreError::Corrupt {
            path: p.clone(),
            message: format!(
                "claim at {a}..{b} past the end of its block at byte {}",
                at.offset
            ),
        })?;
        serde_json::from_slice(bytes).map_err(|e| StoreError::Corrupt {
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

    /// The positions in the sentence index of every sentence that contains every term of each
    /// group, sorted: numbers valid for this opened store, which
    /// [`Store::count_sentences_except`] counts. A set of positions is a sixth the memory of the
    /// (document, sentence start) ids, so a query that intersects many sets keeps positions.
    pub fn sentence_positions_with(
        &mut self,
        groups: &[&[String]],
    ) -> Result<Vec<u64>, StoreError> {
        self.sentence_index()?.positions_with(groups)
    }

    /// How many of the sentences at `positions` are not among `except` (document, sentence
    /// start), without making a document id for each sentence.
    pub fn count_sentences_except(
        &mut self,
        positions: &[u64],
        except: &HashSet<(&str, u64)>,
    ) -> Result<usize, StoreError> {
        self.sentence_index()?.count_except(positions, except)
    }

    fn sentence_index(&mut self) -> Result<&SentenceIndex, StoreError> {
        if self.index.is_none() {
            self.index = Some(SentenceIndex::open(&self.dir)?);
        }
        self.index.as_ref().ok_or_else(|| StoreError::Corrupt {
            path: self.dir.join("index"),
            message: "the sentence index did not open".into(),
        })
    }
}

/// What an aggregate table covers: one segment's live rows, or the whole store's (the summed
/// table `compact` writes).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TableScope {
    Segment(u32),
    Store,
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
