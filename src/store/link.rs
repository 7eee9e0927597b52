//! Joining part stores into one without reading their claims: the reduce step of a cluster run
//! in which every partition scans its own files into a part store.
//!
//! A store is made of immutable files: segments (claim records, rows, postings and aggregate
//! tables, one number a segment), tantivy index segments (named by unique ids) and one
//! vocabulary file; the manifest, the index meta and the vocabulary say which are live. So a
//! part's files can join the output as they are: its segments are hard-linked (copied when the
//! part is on another file system) under new segment numbers, its index segments are
//! hard-linked and listed in the output's index meta, the vocabularies are joined frame by
//! frame (`vocabulary`), and the manifests are joined with each file pointing at its
//! segment's new number. Nothing is decoded, so the cost is a few system calls a file, not a
//! pass over the claims (as `merge` of `extract` shards is).
//!
//! A row's place is its row number within its segment, and a query orders rows by the
//! manifest's files (path order), then row number: renumbering segments changes no answer, and
//! a store linked from parts answers every query as a scan of the same files does.
//!
//! Architecture invariant: a part is never written, except that its lock is taken while it is
//! read (so no scan changes it meanwhile). The output's files are new names, never old files
//! rewritten, so a hard link never lets a later write to the output reach a part. On an error
//! everything written is removed and the output's index meta is put back.

use super::index::IndexLink;
use super::manifest::{load, seg_name, segment_number, write_atomic, Manifest};
use super::vocabulary::Vocabulary;
use super::writer::{lock, CLAIMS_EXT};
use super::{aggregates, compact};
use crate::error::StoreError;
use std::collections::{BTreeMap, HashMap};
use std::fs::{self, File};
use std::path::{Path, PathBuf};

/// What a link did.
#[derive(Debug)]
pub struct LinkReport {
    /// The output store's new manifest.
    pub manifest: Manifest,
    /// Claim segments the output now has.
    pub segments: usize,
    /// Files hard-linked from the parts, and files copied (from another file system).
    pub linked: u64,
    pub copied: u64,
}

/// One part store, read and locked.
struct Part {
    dir: PathBuf,
    manifest: Manifest,
    /// Held while the link runs.
    _lock: File,
}

/// Files put into the output, counted, and removed again if the link fails.
#[derive(Default)]
struct Placed {
    files: Vec<PathBuf>,
    linked: u64,
    copied: u64,
}

impl Placed {
    /// Hard-link `src` to `dst`, or copy it where a link cannot be made (another file system).
    fn place(&mut self, src: &Path, dst: &Path) -> Result<(), StoreError> {
        // A file of that name is a leftover of a link that was killed: no live meta or manifest
        // names it. It goes first, so that a copy never writes through a leftover hard link
        // into a part's file.
        if dst.symlink_metadata().is_ok() {
            fs::remove_file(dst).map_err(|e| StoreError::io(dst, e))?;
        }
        self.files.push(dst.to_path_buf());
        if fs::hard_link(src, dst).is_ok() {
            self.linked += 1;
            return Ok(());
        }
        fs::copy(src, dst).map_err(|e| StoreError::io(dst, e))?;
        File::open(dst)
            .and_then(|f| f.sync_all())
            .map_err(|e| StoreError::io(dst, e))?;
        self.copied += 1;
        Ok(())
    }

    fn remove(&self) {
        for f in &self.files {
            let _ = fs::remove_file(f);
        }
    }
}

/// Join the part stores `parts` into the store at `out`, which must be new or hold no files.
///
/// The parts must be stores of this store version, not locked by a scan, scanned with the same
/// patterns by the same hearsay version, and hold different files; anything else is an error
/// naming the part (and the other part it is at odds with). The output's lock is held
/// throughout; on an error nothing is committed and what was written is removed.
pub fn link(out: &Path, parts: &[PathBuf]) -> Result<LinkReport, StoreError> {
    let existed = out.exists();
    fs::create_dir_all(out).map_err(|e| StoreError::io(out, e))?;
    let out_lock = match lock(out) {
        Ok(l) => l,
        Err(e) => {
            if !existed {
                let _ = fs::remove_dir_all(out);
            }
            return Err(e);
        }
    };
    let had_index = out.join("index").exists();
    let mut placed = Placed::default();
    let mut index: Option<IndexLink> = None;
    let result = link_locked(out, parts, &mut placed, &mut index);
    if result.is_err() {
        placed.remove();
        if let Some(index) = &index {
            index.restore();
        }
        if !existed {
            let _ = fs::remove_dir_all(out);
        } else if !had_index {
            let _ = fs::remove_dir_all(out.join("index"));
        }
    }
    drop(out_lock);
    result
}

fn link_locked(
    out: &Path,
    parts: &[PathBuf],
    placed: &mut Placed,
    index_slot: &mut Option<IndexLink>,
) -> Result<LinkReport, StoreError> {
    let old = match load(out) {
        Ok(m) if !m.files.is_empty() => {
            return Err(StoreError::Corrupt {
                path: out.to_path_buf(),
                message: "the store already holds files; link into a new store".into(),
            })
        }
        Ok(m) => m,
        Err(StoreError::Missing(_)) => Manifest::default(),
        Err(e) => return Err(e),
    };
    let parts = open_parts(out, parts)?;
    let files = join_manifests(&parts)?;

    // New segment numbers, above any on disk (a killed run may have left some).
    let mut next = 1 + fs::read_dir(out)
        .map_err(|e| StoreError::io(out, e))?
        .flatten()
        .filter_map(|e| segment_number(&e.file_name().to_string_lossy()))
        .max()
        .unwrap_or(0);
    let mut renumber: Vec<BTreeMap<u32, u32>> = Vec::new();
    for p in &parts {
        let mut map = BTreeMap::new();
        for seg in p.manifest.segments() {
            map.insert(seg, next);
            next += 1;
        }
        renumber.push(map);
    }
    let mut manifest = Manifest {
        generation: old.generation + 1,
        ..parts[0].manifest.clone()
    };
    manifest.files = files
        .into_iter()
        .map(|(i, mut f)| {
            f.segment = match f.claims {
                0 => 0,
                _ => renumber[i].get(&f.segment).copied().unwrap_or(0),
            };
            f
        })
        .collect();
    manifest.skipped = parts
        .iter()
        .flat_map(|p| p.manifest.skipped.clone())
        .collect();
    manifest.failed = parts
        .iter()
        .flat_map(|p| p.manifest.failed.clone())
        .collect();
    manifest.skipped.sort_by(|a, b| a.path.cmp(&b.path));
    manifest.failed.sort_by(|a, b| a.path.cmp(&b.path));

    for (p, map) in parts.iter().zip(&renumber) {
        for (&from, &to) in map {
            for ext in [CLAIMS_EXT, "rows", "post"] {
                let src = p.dir.join(seg_name(from, ext));
                if ext != "post" || src.exists() {
                    placed.place(&src, &out.join(seg_name(to, ext)))?;
                }
            }
            // The aggregate table's name fingerprints the segment's files and row ranges, which
            // the link keeps; one that is missing is rebuilt below.
            let agg = p.dir.join(aggregates::file_name(&p.manifest, from));
            if agg.exists() {
                placed.place(&agg, &out.join(aggregates::file_name(&manifest, to)))?;
            }
        }
    }

    let index = index_slot.insert(IndexLink::open(out)?);
    for p in &parts {
        index
            .add(&p.dir, |src, dst| placed.place(src, dst))
            .map_err(|e| part_error(&p.dir, e))?;
    }
    let vocabularies: Vec<(PathBuf, u64)> = parts
        .iter()
        .map(|p| (p.dir.clone(), p.manifest.generation))
        .collect();
    let vocabulary = super::vocabulary::path_of(out, manifest.generation);
    placed.files.push(vocabulary.with_extension("tmp"));
    placed.files.push(vocabulary);
    Vocabulary::link(&vocabularies, out, manifest.generation)?;
    // Each segment's table came with its part; the summed table of all of them is new, so
    // that aggregate queries on the linked store read one table, not one a part.
    for seg in manifest.segments() {
        placed
            .files
            .push(out.join(aggregates::file_name(&manifest, seg)));
    }
    if manifest.segments().len() > 1 {
        placed.files.push(out.join(compact::summed_name(&manifest)));
    }
    compact::compact(out, &manifest)?;
    index.commit(&manifest.generation.to_string())?;
    let json = serde_json::to_vec_pretty(&manifest).map_err(|e| StoreError::Corrupt {
        path: out.to_path_buf(),
        message: e.to_string(),
    })?;
    write_atomic(&out.join("manifest.json"), &json)?;
    compact::remove_stale(out, &manifest);
    Ok(LinkReport {
        segments: manifest.segments().len(),
        manifest,
        linked: placed.linked,
        copied: placed.copied,
    })
}

/// A store error about one part, as an error naming the part.
fn part_error(part: &Path, e: StoreError) -> StoreError {
    match e {
        StoreError::Part { .. } => e,
        StoreError::Missing(_) => StoreError::Part {
            part: part.to_path_buf(),
            reason: "not a store (it has no manifest.json; make it with `hearsay --store PART \
                     scan FILE...`)"
                .into(),
        },
        StoreError::Locked { .. } => StoreError::Part {
            part: part.to_path_buf(),
            reason: "locked: a scan is writing it; link it once that scan has finished".into(),
        },
        e => StoreError::Part {
            part: part.to_path_buf(),
            reason: e.to_string(),
        },
    }
}

/// Open and lock every part, checking that none is the output or given twice.
fn open_parts(out: &Path, dirs: &[PathBuf]) -> Result<Vec<Part>, StoreError> {
    let out_real = fs::canonicalize(out).map_err(|e| StoreError::io(out, e))?;
    let mut seen: HashMap<PathBuf, &Path> = HashMap::new();
    let mut parts = Vec::new();
    for dir in dirs {
        if !dir.join("manifest.json").is_file() {
            return Err(part_error(dir, StoreError::Missing(dir.clone())));
        }
        let real = fs::canonicalize(dir).map_err(|e| part_error(dir, StoreError::io(dir, e)))?;
        if real == out_real {
            return Err(StoreError::Part {
                part: dir.clone(),
                reason: "is the output store; link parts into a new store".into(),
            });
        }
        if let Some(first) = seen.insert(real, dir) {
            return Err(StoreError::Part {
                part: dir.clone(),
                reason: format!("given twice (also as {})", first.display()),
            });
        }
        let lock = lock(dir).map_err(|e| part_error(dir, e))?;
        let manifest = load(dir).map_err(|e| part_error(dir, e))?;
        parts.push(Part {
            dir: dir.clone(),
            manifest,
            _lock: lock,
        });
    }
    if parts.is_empty() {
        return Err(StoreError::Corrupt {
            path: out.to_path_buf(),
            message: "no parts to link".into(),
        });
    }
    Ok(parts)
}

/// Every part's files in path order, each with its part's place: the parts must have been
/// read alike and must hold different files.
fn join_manifests(parts: &[Part]) -> Result<Vec<(usize, super::FileEntry)>, StoreError> {
    let first = &parts[0];
    let mut files: BTreeMap<&str, (usize, usize)> = BTreeMap::new();
    for (i, p) in parts.iter().enumerate() {
        let (m, m0) = (&p.manifest, &first.manifest);
        if m.patterns_fingerprint != m0.patterns_fingerprint {
            return Err(StoreError::Part {
                part: p.dir.clone(),
                reason: format!(
                    "scanned with the patterns {} (fingerprint {}), but part {} with {} \
                     (fingerprint {}); scan every part with the same --patterns",
                    m.patterns,
                    m.patterns_fingerprint,
                    first.dir.display(),
                    m0.patterns,
                    m0.patterns_fingerprint
                ),
            });
        }
        if m.hearsay_version != m0.hearsay_version {
            return Err(StoreError::Part {
                part: p.dir.clone(),
                reason: format!(
                    "written by hearsay {}, but part {} by hearsay {}; scan every part with \
                     the same hearsay",
                    m.hearsay_version,
                    first.dir.display(),
                    m0.hearsay_version
                ),
            });
        }
        for (j, f) in m.files.iter().enumerate() {
            if let Some((other, _)) = files.insert(&f.path, (i, j)) {
                return Err(StoreError::Part {
                    part: p.dir.clone(),
                    reason: format!(
                        "holds the file {}, which part {} holds too; give each file to one part",
                        f.path,
                        parts[other].dir.display()
                    ),
                });
            }
        }
    }
    Ok(files
        .into_values()
        .map(|(i, j)| (i, parts[i].manifest.files[j].clone()))
        .collect())
}
