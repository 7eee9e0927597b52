//! Aggregates: per variable key and per relation, the counts the whole-graph queries print, so
//! that `top` reads a few tables instead of every claim row of the store.
//!
//! One file a segment, `seg-NNNNNN.<live>.agg`, where `<live>` fingerprints the segment's live
//! row ranges in the manifest (the files it holds and their ranges). A commit writes the file
//! of every live segment whose live rows changed (the new segment, and an old one whose file was
//! replaced or deleted: rebuilt from its live rows, a cost proportional to that segment), before
//! the manifest names them, so a killed scan leaves the previous store's files in force. The
//! file is zstd-compressed postcard ([`SegmentAggregates`]).
//!
//! Keys are raw keys (before aliases), so any alias map applied at query time works: keys are
//! remapped and counts summed. Distinct documents and sentences are not sums when two keys
//! merge, so the query side reads the rows of merged keys instead (`query::aggregate`).
//! Documents are counted per file, and a document lives in exactly one file and a file's live
//! rows in exactly one segment, so distinct-document counts of one key add up across segments.

use super::manifest::{seg_name, Manifest};
use super::rows::{ClaimRow, RowsFile};
use crate::claim::{Kind, Modality, Polarity};
use crate::error::StoreError;
use serde::{Deserialize, Serialize};
use std::collections::{BTreeMap, HashMap, HashSet};
use std::path::Path;

/// Magic prefix of an aggregate file (before the zstd stream).
const MAGIC: &[u8; 8] = b"HSAGG01\n";

/// Claim counts by polarity (rows) and modality (columns), in the order of `Polarity::ALL` and
/// `Modality::ALL`.
pub type Grid = [[u32; 5]; 5];

fn polarity_index(p: Polarity) -> usize {
    Polarity::ALL.iter().position(|&x| x == p).unwrap_or(0)
}

fn modality_index(m: Modality) -> usize {
    Modality::ALL.iter().position(|&x| x == m).unwrap_or(0)
}

/// Claims of one unit (a document or a sentence) of a relation by what they give the edge
/// weight (`graph::WeightSpec`): asserted, hedged, conditional, question, and negated or "no
/// effect".
pub type Profile = [u32; 5];

/// The weight class of a claim: its index in a [`Profile`].
pub fn weight_class(p: Polarity, m: Modality) -> usize {
    if p == Polarity::None || m == Modality::Negated {
        return 4;
    }
    match m {
        Modality::Asserted => 0,
        Modality::Hedged => 1,
        Modality::Conditional => 2,
        Modality::Question => 3,
        Modality::Negated => 4,
    }
}

/// One variable key.
#[derive(Debug, Clone, Default, Serialize, Deserialize, PartialEq)]
pub struct KeyAggregate {
    pub key: String,
    /// Lower-cased surface forms and how many claims wrote the key so, sorted by form.
    pub forms: Vec<(String, u32)>,
    /// Claims naming the key as cause or effect.
    pub mentions: u64,
    /// Distinct documents of those claims.
    pub docs: u64,
    /// The first claim naming the key (see [`Aggregator::add`]: an ordinal in corpus order),
    /// and whether it names the key as its effect (the graph numbers a claim's cause first).
    pub first: u64,
    pub first_as_effect: bool,
}

/// One relation: a causal edge (cause → effect) or an association pair (smaller key first).
#[derive(Debug, Clone, Default, Serialize, Deserialize, PartialEq)]
pub struct RelationAggregate {
    /// Indices into [`SegmentAggregates::keys`].
    pub a: u32,
    pub b: u32,
    pub counts: Grid,
    pub docs: u64,
    pub sentences: u64,
    /// How many documents (and sentences) state the relation with each profile: the edge
    /// weight of any `WeightSpec` is a function of these. Sorted by profile.
    pub doc_profiles: Vec<(Profile, u32)>,
    pub sentence_profiles: Vec<(Profile, u32)>,
    /// The first claim of the relation: its ordinal, document, line, and whether it names `a`
    /// as its cause.
    pub first: u64,
    pub first_doc: String,
    pub first_line: u32,
    pub forward: bool,
}

/// The aggregates of one segment's live rows (or of any run of rows given to an [`Aggregator`]).
#[derive(Debug, Clone, Default, Serialize, Deserialize, PartialEq)]
pub struct SegmentAggregates {
    /// Sorted by key.
    pub keys: Vec<KeyAggregate>,
    /// Causal edges, sorted by (a, b).
    pub edges: Vec<RelationAggregate>,
    /// Association pairs (a < b), sorted by (a, b).
    pub pairs: Vec<RelationAggregate>,
    /// Claims by cue id, sorted by cue.
    pub cues: Vec<(String, u64)>,
}

#[derive(Default)]
struct KeyAcc {
    forms: HashMap<String, u32>,
    mentions: u64,
    docs: u64,
    first: u64,
    first_as_effect: bool,
}

/// What one open document has added: which keys and relations it named, and its claims on
/// each relation by weight profile (per document and per sentence).
#[derive(Default)]
struct DocState {
    keys: HashSet<u32>,
    rels: HashMap<(Kind, u32, u32), Profile>,
    sentences: HashMap<(Kind, u32, u32, u64), Profile>,
}

/// Builds [`SegmentAggregates`] from rows in any order: each row comes with its ordinal in
/// corpus order (the smallest is kept as the first claim), and [`Aggregator::end_doc`] after a
/// document's last row lets go of what counting its distinct documents and sentences needs, so
/// memory follows the open documents, not the rows.
#[derive(Default)]
pub struct Aggregator {
    key_ids: HashMap<String, u32>,
    keys: Vec<(String, KeyAcc)>,
    rels: HashMap<(Kind, u32, u32), RelationAggregate>,
    cues: HashMap<String, u64>,
    open: HashMap<String, DocState>,
    /// Profile histograms of the relations, filled as documents end.
    doc_hist: HashMap<(Kind, u32, u32), BTreeMap<Profile, u32>>,
    sentence_hist: HashMap<(Kind, u32, u32), BTreeMap<Profile, u32>>,
}

impl Aggregator {
    fn key(&mut self, k: &str) -> u32 {
        if let Some(&i) = self.key_ids.get(k) {
            return i;
        }
        let i = self.keys.len() as u32;
        self.key_ids.insert(k.to_string(), i);
        self.keys.push((k.to_string(), KeyAcc::default()));
        i
    }

    /// Count one row under the keys `cause` and `effect` (the row's own keys, or what aliases
    /// make of them); a row whose two keys are equal is left out, as the graph leaves it out.
    /// `ordinal` is the row's place in corpus order: the smallest ordinal a key or relation
    /// gets is kept as its first claim.
    pub fn add(&mut self, r: &ClaimRow, cause: &str, effect: &str, ordinal: u64) {
        if cause == effect {
            return;
        }
        match self.cues.get_mut(&r.cue) {
            Some(n) => *n += 1,
            None => {
                self.cues.insert(r.cue.clone(), 1);
            }
        }
        let (a, b) = (self.key(cause), self.key(effect));
        if !self.open.contains_key(&r.doc) {
            self.open.insert(r.doc.clone(), DocState::default());
        }
        let Some(doc) = self.open.get_mut(&r.doc) else {
            return;
        };
        for (k, text, as_effect) in [(a, &r.cause_text, false), (b, &r.effect_text, true)] {
            let acc = &mut self.keys[k as usize].1;
            if acc.mentions == 0 || ordinal < acc.first {
                acc.first = ordinal;
                acc.first_as_effect = as_effect;
            }
            acc.mentions += 1;
            *acc.forms.entry(text.to_lowercase()).or_default() += 1;
            if doc.keys.insert(k) {
                acc.docs += 1;
            }
        }
        let (x, y, forward) = match r.kind {
            Kind::Causal => (a, b, true),
            Kind::Association => {
                // Smaller key first, by the key's text.
                if cause <= effect {
                    (a, b, true)
                } else {
                    (b, a, false)
                }
            }
        };
        let id = (r.kind, x, y);
        let rel = self.rels.entry(id).or_insert_with(|| RelationAggregate {
            a: x,
            b: y,
            first: ordinal,
            first_doc: r.doc.clone(),
            first_line: r.line,
            forward,
            ..RelationAggregate::default()
        });
        if ordinal < rel.first {
            rel.first = ordinal;
            rel.first_doc = r.doc.clone();
            rel.first_line = r.line;
            rel.forward = forward;
        }
        rel.counts[polarity_index(r.polarity)][modality_index(r.modality)] += 1;
        let class = weight_class(r.polarity, r.modality);
        let unit = doc.rels.entry(id).or_default();
        if unit.iter().all(|&n| n == 0) {
            rel.docs += 1;
        }
        unit[class] += 1;
        let unit = doc.sentences.entry((r.kind, x, y, r.sentence)).or_default();
        if unit.iter().all(|&n| n == 0) {
            rel.sentences += 1;
        }
        unit[class] += 1;
    }

    /// A document has no more rows: fold its units into the relations' profiles.
    pub fn end_doc(&mut self, doc: &str) {
        if let Some(state) = self.open.remove(doc) {
            self.fold(state);
        }
    }

    fn fold(&mut self, state: DocState) {
        for (id, p) in state.rels {
            *self.doc_hist.entry(id).or_default().entry(p).or_default() += 1;
        }
        for ((kind, x, y, _), p) in state.sentences {
            *self
                .sentence_hist
                .entry((kind, x, y))
                .or_default()
                .entry(p)
                .or_default() += 1;
        }
    }

    pub fn finish(mut self) -> SegmentAggregates {
        let open: Vec<DocState> = self.open.drain().map(|(_, d)| d).collect();
        for d in open {
            self.fold(d);
        }
        // Renumber keys in key order.
        let mut order: Vec<u32> = (0..self.keys.len() as u32).collect();
        order.sort_by(|&x, &y| self.keys[x as usize].0.cmp(&self.keys[y as usize].0));
        let mut new_id = vec![0u32; self.keys.len()];
        for (n, &old) in order.iter().enumerate() {
            new_id[old as usize] = n as u32;
        }
        let mut keys_by_old: Vec<Option<(String, KeyAcc)>> =
            self.keys.into_iter().map(Some).collect();
        let keys: Vec<KeyAggregate> = order
            .iter()
            .filter_map(|&old| keys_by_old[old as usize].take())
            .map(|(key, acc)| {
                let forms: BTreeMap<String, u32> = acc.forms.into_iter().collect();
                KeyAggregate {
                    key,
                    forms: forms.into_iter().collect(),
                    mentions: acc.mentions,
                    docs: acc.docs,
                    first: acc.first,
                    first_as_effect: acc.first_as_effect,
                }
            })
            .collect();
        let mut edges = Vec::new();
        let mut pairs = Vec::new();
        for (id @ (kind, _, _), mut rel) in self.rels {
            rel.doc_profiles = self
                .doc_hist
                .remove(&id)
                .unwrap_or_default()
                .into_iter()
                .collect();
            rel.sentence_profiles = self
                .sentence_hist
                .remove(&id)
                .unwrap_or_default()
                .into_iter()
                .collect();
            let (a, b) = (new_id[rel.a as usize], new_id[rel.b as usize]);
            rel.a = a;
            rel.b = b;
            match kind {
                Kind::Causal => edges.push(rel),
                Kind::Association => pairs.push(rel),
            }
        }
        edges.sort_by_key(|r| (r.a, r.b));
        pairs.sort_by_key(|r| (r.a, r.b));
        let mut cues: Vec<(String, u64)> = self.cues.into_iter().collect();
        cues.sort();
        SegmentAggregates {
            keys,
            edges,
            pairs,
            cues,
        }
    }
}

impl SegmentAggregates {
    /// Write the file (synced: the manifest that needs it comes after).
    pub fn write(&self, path: &Path) -> Result<(), StoreError> {
        let bytes = postcard::to_stdvec(self).map_err(|e| StoreError::Corrupt {
            path: path.to_path_buf(),
            message: e.to_string(),
        })?;
        let mut out = MAGIC.to_vec();
        out.extend((bytes.len() as u64).to_le_bytes());
        out.extend(zstd::bulk::compress(&bytes, 3).map_err(|e| StoreError::io(path, e))?);
        let tmp = path.with_extension("agg-tmp");
        std::fs::write(&tmp, &out).map_err(|e| StoreError::io(&tmp, e))?;
        std::fs::File::open(&tmp)
            .and_then(|f| f.sync_all())
            .map_err(|e| StoreError::io(&tmp, e))?;
        std::fs::rename(&tmp, path).map_err(|e| StoreError::io(path, e))
    }

    pub fn open(path: &Path) -> Result<SegmentAggregates, StoreError> {
        let raw = read_raw(path)?;
        postcard::from_bytes(&raw).map_err(|e| StoreError::Corrupt {
            path: path.to_path_buf(),
            message: e.to_string(),
        })
    }

    /// The `keys` table of the file alone: the tables after it are not decoded (a query that
    /// needs a few variables' labels, `pair`, is spared decoding every relation).
    pub fn open_keys(path: &Path) -> Result<Vec<KeyAggregate>, StoreError> {
        /// The file's record up to its first table (postcard stops there).
        #[derive(Deserialize)]
        struct KeysOnly {
            keys: Vec<KeyAggregate>,
        }
        let raw = read_raw(path)?;
        postcard::from_bytes::<KeysOnly>(&raw)
            .map(|k| k.keys)
            .map_err(|e| StoreError::Corrupt {
                path: path.to_path_buf(),
                message: e.to_string(),
            })
    }
}

/// The decompressed postcard record of an aggregate file.
fn read_raw(path: &Path) -> Result<Vec<u8>, StoreError> {
    let bytes = std::fs::read(path).map_err(|e| StoreError::io(path, e))?;
    let corrupt = |message: String| StoreError::Corrupt {
        path: path.to_path_buf(),
        message,
    };
    let body = bytes
        .strip_prefix(MAGIC.as_slice())
        .ok_or_else(|| corrupt("not an aggregate file".into()))?;
    let (len, body) = body
        .split_first_chunk::<8>()
        .ok_or_else(|| corrupt("no length".into()))?;
    // The length bounds the buffer; a damaged file claiming more than zstd can make of its
    // bytes is refused before anything is allocated.
    let len = u64::from_le_bytes(*len);
    if len > (body.len() as u64).saturating_mul(2048) {
        return Err(corrupt(format!(
            "a length of {len} bytes for {} compressed",
            body.len()
        )));
    }
    zstd::bulk::decompress(body, len as usize).map_err(|e| corrupt(e.to_string()))
}

/// The name of segment `seg`'s aggregate file under `manifest`: it fingerprints the files the
/// segment holds live rows of and their row ranges, so a commit that changes them needs a new
/// file, and one that does not reuses the old.
pub(super) fn file_name(manifest: &Manifest, seg: u32) -> String {
    let mut h = blake3::Hasher::new();
    for f in manifest
        .files
        .iter()
        .filter(|f| f.segment == seg && f.claims > 0)
    {
        h.update(f.path.as_bytes());
        h.update(&[0]);
        for (a, b) in f.row_ranges() {
            h.update(&a.to_le_bytes());
            h.update(&b.to_le_bytes());
        }
    }
    let hex = h.finalize().to_hex();
    format!("seg-{seg:06}.{}.agg", &hex.as_str()[..16])
}

/// Write the aggregate file of every live segment of `manifest` that has none yet, from the
/// segment's live rows, read twice as a stream (first for each document's last live row, then
/// to count): memory follows the segment's keys and relations, not its rows.
pub(super) fn write_missing(dir: &Path, manifest: &Manifest) -> Result<(), StoreError> {
    for seg in manifest.segments() {
        let path = dir.join(file_name(manifest, seg));
        if path.exists() {
            continue;
        }
        // Live row ranges of the segment with their file's place among its files in path
        // (corpus) order: a row's ordinal is (place, row number).
        let mut ranges: Vec<(u64, u64, u64)> = Vec::new();
        for (place, f) in manifest
            .files
            .iter()
            .filter(|f| f.segment == seg && f.claims > 0)
            .enumerate()
        {
            ranges.extend(f.row_ranges().map(|(a, b)| (a, b, place as u64)));
        }
        ranges.sort_unstable();
        let live = |row: u64| -> Option<u64> {
            let at = ranges.partition_point(|r| r.0 <= row);
            let r = ranges.get(at.checked_sub(1)?)?;
            (row < r.1).then_some((r.2 << 32) | row)
        };
        let rows = RowsFile::open(&dir.join(seg_name(seg, "rows")), seg)?;
        let mut last: HashMap<String, u64> = HashMap::new();
        rows.for_each(|i, r| {
            if live(i).is_some() {
                match last.get_mut(&r.doc) {
                    Some(l) => *l = i,
                    None => {
                        last.insert(r.doc, i);
                    }
                }
            }
        })?;
        let mut agg = Aggregator::default();
        rows.for_each(|i, r| {
            if let Some(ordinal) = live(i) {
                agg.add(&r, &r.cause, &r.effect, ordinal);
                if last.get(&r.doc) == Some(&i) {
                    agg.end_doc(&r.doc);
                }
            }
        })?;
        agg.finish().write(&path)?;
    }
    Ok(())
}

/// Whether `name` is an aggregate file (`seg-NNNNNN.<fingerprint>.agg`).
pub(super) fn is_aggregate_file(name: &str) -> bool {
    name.starts_with("seg-") && (name.ends_with(".agg") || name.ends_with(".agg-tmp"))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::store::test_row;

    #[test]
    fn counts_documents_per_batch_and_keeps_the_first_claim() {
        let mut rows = [
            test_row("b", "a", Polarity::Increase, Modality::Asserted, "d1"),
            test_row("b", "a", Polarity::Increase, Modality::Hedged, "d1"),
            test_row("b", "b", Polarity::Increase, Modality::Hedged, "d1"),
            test_row("b", "a", Polarity::Decrease, Modality::Asserted, "d2"),
            test_row("c", "a", Polarity::Increase, Modality::Asserted, "d2"),
        ];
        rows[4].kind = Kind::Association;
        let mut agg = Aggregator::default();
        for (i, r) in rows.iter().enumerate() {
            agg.add(r, &r.cause, &r.effect, 10 + i as u64);
            if i == 2 {
                agg.end_doc("d1");
            }
        }
        let s = agg.finish();
        let keys: Vec<&str> = s.keys.iter().map(|k| k.key.as_str()).collect();
        assert_eq!(keys, ["a", "b", "c"]);
        // The self-loop b → b is left out.
        assert_eq!(
            (s.keys[1].mentions, s.keys[1].docs, s.keys[1].first),
            (3, 2, 10)
        );
        assert_eq!(s.edges.len(), 1);
        let e = &s.edges[0];
        assert_eq!((e.a, e.b, e.docs, e.sentences, e.first), (1, 0, 2, 2, 10));
        assert_eq!(e.counts[0][0] + e.counts[0][1] + e.counts[1][0], 3);
        // The association "c, a" is filed as (a, c), stated backwards.
        assert_eq!(
            (s.pairs[0].a, s.pairs[0].b, s.pairs[0].forward),
            (0, 2, false)
        );
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("x.agg");
        s.write(&p).unwrap();
        assert_eq!(SegmentAggregates::open(&p).unwrap(), s);
        assert_eq!(SegmentAggregates::open_keys(&p).unwrap(), s.keys);
        std::fs::write(&p, b"HSAGG01\n\x05\0\0\0\0\0\0\0bad").unwrap();
        assert!(SegmentAggregates::open(&p).is_err());
    }
}
