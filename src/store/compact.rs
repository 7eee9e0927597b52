//! Compaction: one summed aggregate table for a store of many segments, so that a query reads
//! one table whatever the number of segments.
//!
//! Each segment has its own aggregate table (`aggregates`). Summing them at query time costs
//! every segment's table in memory at once and a merge of every relation present in several
//! segments (its profile histograms re-sorted each time): on 32 segments holding the same
//! claims as one, `top` took 40 times as long and ten times the memory. So when a commit (or
//! `link`) leaves more than one segment, [`compact`] writes the sum once, `summed.<live>.agg`,
//! where `<live>` fingerprints every live row range of the manifest (the files, their segments
//! and their ranges): a commit that changes any of them needs a new sum, one that does not
//! reuses the old. The file has the format of a segment's table ([`SegmentAggregates`]); its
//! first-claim ordinals are (the file's place among the manifest's files with claims, row), so
//! they order claims across segments as the manifest does.
//!
//! The sum is the sum the query side did: counts, mentions and distinct documents and
//! sentences add up (a document lives in one file and a file's live rows in one segment), the
//! profile histograms merge, and the first claim is the smallest ordinal.

use super::aggregates::{self, RelationAggregate, SegmentAggregates};
use super::aggregates::{KeyAggregate, Profile};
use super::manifest::Manifest;
use crate::error::StoreError;
use std::collections::{BTreeMap, HashMap};
use std::path::Path;

/// The row number in a stored ordinal (its file's place above it).
const ROW: u64 = 0xffff_ffff;

/// The name of the summed table under `manifest`.
pub(super) fn summed_name(manifest: &Manifest) -> String {
    let mut h = blake3::Hasher::new();
    for f in manifest.files.iter().filter(|f| f.claims > 0) {
        h.update(f.path.as_bytes());
        h.update(&[0]);
        h.update(&f.segment.to_le_bytes());
        for (a, b) in f.row_ranges() {
            h.update(&a.to_le_bytes());
            h.update(&b.to_le_bytes());
        }
    }
    let hex = h.finalize().to_hex();
    format!("summed.{}.agg", &hex.as_str()[..16])
}

/// Whether `name` is a summed table (or one being written).
pub(super) fn is_summed_file(name: &str) -> bool {
    name.starts_with("summed.") && (name.ends_with(".agg") || name.ends_with(".agg-tmp"))
}

/// (segment, row) → (the row's file's place among the manifest's files with claims, row), for
/// live rows.
pub(super) fn places(manifest: &Manifest) -> impl Fn(u32, u64) -> Option<u64> {
    let mut ranges: Vec<(u32, u64, u64, u64)> = Vec::new();
    for (place, f) in manifest.files.iter().filter(|f| f.claims > 0).enumerate() {
        for (a, b) in f.row_ranges() {
            ranges.push((f.segment, a, b, place as u64));
        }
    }
    ranges.sort_unstable();
    move |seg, row| {
        let at = ranges.partition_point(|r| (r.0, r.1) <= (seg, row));
        let r = ranges.get(at.checked_sub(1)?)?;
        (r.0 == seg && row < r.2).then_some((r.3 << 32) | row)
    }
}

/// Make sure every live segment of `manifest` has its aggregate table, and, when there is more
/// than one segment, write the store's summed table (unless one for these live rows is on
/// disk). Call before the manifest that needs them is renamed into place: the files are synced.
pub fn compact(dir: &Path, manifest: &Manifest) -> Result<(), StoreError> {
    aggregates::write_missing(dir, manifest)?;
    let segs = manifest.segments();
    if segs.len() < 2 {
        return Ok(());
    }
    let path = dir.join(summed_name(manifest));
    if path.exists() {
        return Ok(());
    }
    let place = places(manifest);
    let mut sum = Sum::default();
    for seg in segs {
        let p = dir.join(aggregates::file_name(manifest, seg));
        let table = SegmentAggregates::open(&p)?;
        sum.add(&p, &table, |stored| {
            place(seg, stored & ROW).ok_or_else(|| StoreError::Corrupt {
                path: p.clone(),
                message: format!("row {} is no live row of segment {seg}", stored & ROW),
            })
        })?;
    }
    sum.finish().write(&path)
}

/// Delete the summed tables `manifest` does not name (and leftovers of killed commits). Call
/// after the manifest is on disk; a file that cannot be removed is left for the next commit.
pub(super) fn remove_stale(dir: &Path, manifest: &Manifest) {
    let keep = (manifest.segments().len() > 1).then(|| summed_name(manifest));
    let Ok(rd) = std::fs::read_dir(dir) else {
        return;
    };
    for e in rd.flatten() {
        let name = e.file_name().to_string_lossy().into_owned();
        if is_summed_file(&name) && keep.as_deref() != Some(name.as_str()) {
            let _ = std::fs::remove_file(e.path());
        }
    }
}

#[derive(Default)]
struct KeySum {
    forms: HashMap<String, u32>,
    mentions: u64,
    docs: u64,
    first: u64,
    first_as_effect: bool,
}

struct RelSum {
    rel: RelationAggregate,
    doc_profiles: BTreeMap<Profile, u32>,
    sentence_profiles: BTreeMap<Profile, u32>,
}

/// Tables being summed, by key text (each table numbers its keys its own way).
#[derive(Default)]
struct Sum {
    keys: HashMap<String, KeySum>,
    /// (association?, a, b) by key text.
    rels: HashMap<(bool, String, String), RelSum>,
    cues: BTreeMap<String, u64>,
}

impl Sum {
    fn add(
        &mut self,
        path: &Path,
        t: &SegmentAggregates,
        ordinal: impl Fn(u64) -> Result<u64, StoreError>,
    ) -> Result<(), StoreError> {
        for k in &t.keys {
            let first = ordinal(k.first)?;
            let s = match self.keys.get_mut(&k.key) {
                Some(s) => s,
                None => self.keys.entry(k.key.clone()).or_insert(KeySum {
                    first,
                    first_as_effect: k.first_as_effect,
                    ..KeySum::default()
                }),
            };
            for (f, n) in &k.forms {
                match s.forms.get_mut(f) {
                    Some(m) => *m += n,
                    None => {
                        s.forms.insert(f.clone(), *n);
                    }
                }
            }
            s.mentions += k.mentions;
            s.docs += k.docs;
            if first < s.first {
                s.first = first;
                s.first_as_effect = k.first_as_effect;
            }
        }
        let key = |i: u32| -> Result<&str, StoreError> {
            t.keys
                .get(i as usize)
                .map(|k| k.key.as_str())
                .ok_or_else(|| StoreError::Corrupt {
                    path: path.to_path_buf(),
                    message: format!("a relation names key {i}, which its table lacks"),
                })
        };
        for (assoc, list) in [(false, &t.edges), (true, &t.pairs)] {
            for r in list {
                let first = ordinal(r.first)?;
                let id = (assoc, key(r.a)?.to_string(), key(r.b)?.to_string());
                let s = self.rels.entry(id).or_insert_with(|| RelSum {
                    rel: RelationAggregate {
                        first,
                        first_doc: r.first_doc.clone(),
                        first_line: r.first_line,
                        forward: r.forward,
                        ..RelationAggregate::default()
                    },
                    doc_profiles: BTreeMap::new(),
                    sentence_profiles: BTreeMap::new(),
                });
                for (row, more) in s.rel.counts.iter_mut().zip(&r.counts) {
                    for (n, m) in row.iter_mut().zip(more) {
                        *n += m;
                    }
                }
                s.rel.docs += r.docs;
                s.rel.sentences += r.sentences;
                for (p, n) in &r.doc_profiles {
                    *s.doc_profiles.entry(*p).or_default() += n;
                }
                for (p, n) in &r.sentence_profiles {
                    *s.sentence_profiles.entry(*p).or_default() += n;
                }
                if first < s.rel.first {
                    s.rel.first = first;
                    s.rel.first_doc = r.first_doc.clone();
                    s.rel.first_line = r.first_line;
                    s.rel.forward = r.forward;
                }
            }
        }
        for (cue, n) in &t.cues {
            *self.cues.entry(cue.clone()).or_default() += n;
        }
        Ok(())
    }

    fn finish(self) -> SegmentAggregates {
        let mut keys: Vec<(String, KeySum)> = self.keys.into_iter().collect();
        keys.sort_unstable_by(|x, y| x.0.cmp(&y.0));
        let id: HashMap<&str, u32> = keys
            .iter()
            .enumerate()
            .map(|(i, (k, _))| (k.as_str(), i as u32))
            .collect();
        let (mut edges, mut pairs) = (Vec::new(), Vec::new());
        for ((assoc, a, b), s) in self.rels {
            let (Some(&a), Some(&b)) = (id.get(a.as_str()), id.get(b.as_str())) else {
                continue;
            };
            let rel = RelationAggregate {
                a,
                b,
                doc_profiles: s.doc_profiles.into_iter().collect(),
                sentence_profiles: s.sentence_profiles.into_iter().collect(),
                ..s.rel
            };
            if assoc {
                pairs.push(rel);
            } else {
                edges.push(rel);
            }
        }
        edges.sort_unstable_by_key(|r| (r.a, r.b));
        pairs.sort_unstable_by_key(|r| (r.a, r.b));
        let keys = keys
            .into_iter()
            .map(|(key, s)| {
                let mut forms: Vec<(String, u32)> = s.forms.into_iter().collect();
                forms.sort_unstable();
                KeyAggregate {
                    key,
                    forms,
                    mentions: s.mentions,
                    docs: s.docs,
                    first: s.first,
                    first_as_effect: s.first_as_effect,
                }
            })
            .collect();
        SegmentAggregates {
            keys,
            edges,
            pairs,
            cues: self.cues.into_iter().collect(),
        }
    }
}
