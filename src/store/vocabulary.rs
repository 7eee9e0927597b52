//! What the store remembers about the names in each file: the abbreviations its documents
//! define, and the head of every variable key its claims use. Queries read both from here
//! instead of detecting them again: `variables --abbreviations` and the merge suggestions read
//! the definitions, and the head roll-up (`--roll-up`) reads the heads.
//!
//! One file a store generation, `vocabulary-NNNNNN.json.zst` (JSON, zstd-compressed; NNNNNN is
//! the manifest's generation), written
//! before the manifest that names that generation and found through it, so a scan killed before
//! its commit leaves the previous generation's file in force. A writer starts from the
//! previous generation's entries; a file read again replaces its entry whole and a file gone
//! loses it, so a re-scan drops the definitions of a changed or deleted file. Definitions are
//! found in every sentence the writer indexes (scan and merge alike); heads are counted from
//! the claims it stores (`Slot::head_key`).

use super::manifest::{write_atomic, Manifest};
use super::read::Store;
use crate::claim::Claim;
use crate::error::StoreError;
use crate::variables::abbrev::{self, Abbreviations};
use crate::variables::Normalizer;
use serde::{Deserialize, Serialize};
use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fs;
use std::io::Write;
use std::path::{Path, PathBuf};

/// One abbreviation definition as stored: where, the two forms as written, and the long form's
/// variable key (before aliases, which a query applies).
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord, Serialize, Deserialize)]
pub struct StoredDefinition {
    /// The document id (`path`, or `path#record`).
    pub doc: String,
    pub short: String,
    pub long: String,
    pub long_key: String,
}

/// What one input file contributes.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileVocabulary {
    /// Each distinct definition of the file's documents once, in the order first found.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub definitions: Vec<StoredDefinition>,
    /// Variable key → (head key, claim slots with that key and head); "" stands for the key
    /// itself (a slot with no qualifier), which most are. A list, not a map: most keys have one
    /// head, and a map per key cost a scan of eLife 40 MB more memory.
    #[serde(default, skip_serializing_if = "BTreeMap::is_empty")]
    pub heads: BTreeMap<String, Vec<(String, u32)>>,
}

/// The vocabulary of every file of a store generation, by path.
///
/// A writer's vocabulary also keeps entries out of memory: once its entries in memory pass
/// [`HOLD`], the files it is not writing are compressed into one frame of their JSON (a
/// [`Batch`]) and brought back only if the writer adds to one of them again. A merge of 16
/// shards of one eLife copy each, one file a shard, held every file's entries, 28 MB a shard,
/// and peaked at 786 MB. A vocabulary read with [`Vocabulary::load`] has every entry in `files`.
#[derive(Debug, Clone, Default, PartialEq, Eq, Serialize, Deserialize)]
pub struct Vocabulary {
    pub files: BTreeMap<String, FileVocabulary>,
    #[serde(skip)]
    frozen: BTreeMap<u64, Batch>,
    /// Which batch each compressed file is in.
    #[serde(skip)]
    frozen_at: HashMap<String, u64>,
    #[serde(skip)]
    next_batch: u64,
    /// Head keys and definitions in `files`, roughly what they cost in memory.
    #[serde(skip)]
    held: usize,
    /// The file added to last: it stays in memory.
    #[serde(skip)]
    current: String,
}

/// Files' entries compressed together: one zstd frame of their JSON object members
/// (`"path":{...},"path":{...}`), and those of them forgotten since (left out when the batch is
/// written or brought back).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
struct Batch {
    frame: Vec<u8>,
    paths: Vec<String>,
    dropped: BTreeSet<String>,
}

/// Head keys and definitions a writer keeps in memory before it compresses the entries of the
/// files it is not writing (an eLife article's file has about 100 a kB of text; 50 000 are
/// about 8 MB).
const HOLD: usize = 50_000;

impl FileVocabulary {
    fn items(&self) -> usize {
        self.heads.len() + self.definitions.len()
    }
}

/// The file name of a generation's vocabulary.
fn file_name(generation: u64) -> String {
    format!("vocabulary-{generation:06}.json.zst")
}

/// zstd level of the vocabulary file (the library's default trade of speed for size).
const LEVEL: i32 = 3;

pub(super) fn path_of(dir: &Path, generation: u64) -> PathBuf {
    dir.join(file_name(generation))
}

/// Files' entries as the members of a JSON object, without its braces: `"path":{...},...`.
fn members_json(files: &BTreeMap<String, FileVocabulary>) -> Result<Vec<u8>, StoreError> {
    let mut json = serde_json::to_vec(files).map_err(|e| StoreError::Corrupt {
        path: PathBuf::from("vocabulary"),
        message: e.to_string(),
    })?;
    json.pop();
    json.remove(0);
    Ok(json)
}

impl Batch {
    /// The batch's entries, but those forgotten since it was made.
    fn entries(&self) -> Result<BTreeMap<String, FileVocabulary>, StoreError> {
        let corrupt = |message: String| StoreError::Corrupt {
            path: PathBuf::from("vocabulary (in memory)"),
            message,
        };
        let members =
            zstd::stream::decode_all(self.frame.as_slice()).map_err(|e| corrupt(e.to_string()))?;
        let mut json = Vec::with_capacity(members.len() + 2);
        json.push(b'{');
        json.extend(members);
        json.push(b'}');
        let mut files: BTreeMap<String, FileVocabulary> =
            serde_json::from_slice(&json).map_err(|e| corrupt(e.to_string()))?;
        files.retain(|p, _| !self.dropped.contains(p));
        Ok(files)
    }
}

/// How a vocabulary file is framed: `{"files":{` in one zstd frame, the files' entries in
/// frames of their own, `}}` in a last frame. The file is one valid zstd stream (frames
/// concatenate) holding the JSON, and the entries of several stores' files join by copying
/// their frames, with a frame holding a comma between them: `link` never decodes them.
struct Framing {
    open: Vec<u8>,
    comma: Vec<u8>,
    close: Vec<u8>,
}

const OPEN: &[u8] = br#"{"files":{"#;
const CLOSE: &[u8] = b"}}";

impl Framing {
    fn new(p: &Path) -> Result<Framing, StoreError> {
        let frame = |b: &[u8]| zstd::bulk::compress(b, LEVEL).map_err(|e| StoreError::io(p, e));
        Ok(Framing {
            open: frame(OPEN)?,
            comma: frame(b",")?,
            close: frame(CLOSE)?,
        })
    }

    /// The files' entries of a vocabulary's JSON: what is between its opening and closing.
    fn body_of_json<'a>(&self, p: &Path, json: &'a [u8]) -> Result<&'a [u8], StoreError> {
        json.strip_prefix(OPEN)
            .and_then(|b| b.strip_suffix(CLOSE))
            .ok_or_else(|| StoreError::Corrupt {
                path: p.to_path_buf(),
                message: "not a vocabulary: the JSON is no {\"files\": {...}} object".into(),
            })
    }
}

impl Vocabulary {
    /// The vocabulary the manifest's generation committed, with only the files the manifest
    /// holds. A store never committed has none.
    pub(super) fn load(dir: &Path, manifest: &Manifest) -> Result<Vocabulary, StoreError> {
        if manifest.generation == 0 {
            return Ok(Vocabulary::default());
        }
        let p = path_of(dir, manifest.generation);
        let file = fs::File::open(&p).map_err(|e| StoreError::io(&p, e))?;
        let json = zstd::stream::Decoder::new(file).map_err(|e| StoreError::io(&p, e))?;
        let reader = std::io::BufReader::new(json);
        let mut v: Vocabulary =
            serde_json::from_reader(reader).map_err(|e| StoreError::Corrupt {
                path: p.clone(),
                message: e.to_string(),
            })?;
        let live: std::collections::BTreeSet<&str> =
            manifest.files.iter().map(|f| f.path.as_str()).collect();
        v.files.retain(|path, _| live.contains(path.as_str()));
        Ok(v)
    }

    /// Write this generation's file (atomically), before the manifest that names it: the JSON
    /// in three zstd frames, its opening, its files and its closing (see [`Framing`]).
    pub(super) fn write(&self, dir: &Path, generation: u64) -> Result<(), StoreError> {
        let p = path_of(dir, generation);
        let json = serde_json::to_vec(self).map_err(|e| StoreError::Corrupt {
            path: p.clone(),
            message: e.to_string(),
        })?;
        let framing = Framing::new(&p)?;
        let body = framing.body_of_json(&p, &json)?;
        let mut frames: Vec<Vec<u8>> = Vec::new();
        if !body.is_empty() {
            frames.push(zstd::bulk::compress(body, LEVEL).map_err(|e| StoreError::io(&p, e))?);
        }
        for batch in self.frozen.values() {
            if batch.dropped.is_empty() {
                frames.push(batch.frame.clone());
                continue;
            }
            let kept = batch.entries()?;
            // A batch whose files were all forgotten adds nothing (an empty member list
            // between commas would not be JSON).
            if !kept.is_empty() {
                let json = members_json(&kept)?;
                frames.push(zstd::bulk::compress(&json, LEVEL).map_err(|e| StoreError::io(&p, e))?);
            }
        }
        let mut bytes = framing.open.clone();
        for (i, f) in frames.iter().enumerate() {
            if i > 0 {
                bytes.extend_from_slice(&framing.comma);
            }
            bytes.extend_from_slice(f);
        }
        bytes.extend_from_slice(&framing.close);
        write_atomic(&p, &bytes)
    }

    /// Join the vocabularies of stores that hold different files into `dir`'s file of
    /// `generation`, without decoding them: the frames of each one's files are copied between
    /// one opening and one closing frame, with a comma frame between them. A file not framed so
    /// (written by another zstd) is decompressed and its files compressed again.
    pub(super) fn link(
        parts: &[(PathBuf, u64)],
        dir: &Path,
        generation: u64,
    ) -> Result<(), StoreError> {
        let p = path_of(dir, generation);
        let framing = Framing::new(&p)?;
        // Written as it is joined, one part in memory at a time: the joined file grows with the
        // parts (41.5 MB for 32 eLife copies), the memory does not.
        let tmp = p.with_extension("tmp");
        let file = fs::File::create(&tmp).map_err(|e| StoreError::io(&tmp, e))?;
        let mut out = std::io::BufWriter::new(file);
        let mut put = |bytes: &[u8]| out.write_all(bytes).map_err(|e| StoreError::io(&tmp, e));
        put(&framing.open)?;
        let mut first = true;
        for (part, part_generation) in parts {
            let from = path_of(part, *part_generation);
            let bytes = fs::read(&from).map_err(|e| StoreError::io(&from, e))?;
            let raw = bytes
                .strip_prefix(framing.open.as_slice())
                .and_then(|b| b.strip_suffix(framing.close.as_slice()));
            let body = match raw {
                Some(body) => body.to_vec(),
                None => {
                    let json = zstd::stream::decode_all(bytes.as_slice()).map_err(|e| {
                        StoreError::Corrupt {
                            path: from.clone(),
                            message: e.to_string(),
                        }
                    })?;
                    let body = framing.body_of_json(&from, &json)?;
                    if body.is_empty() {
                        Vec::new()
                    } else {
                        zstd::bulk::compress(body, LEVEL).map_err(|e| StoreError::io(&p, e))?
                    }
                }
            };
            if body.is_empty() {
                continue;
            }
            if !first {
                put(&framing.comma)?;
            }
            first = false;
            put(&body)?;
        }
        put(&framing.close)?;
        let file = out
            .into_inner()
            .map_err(|e| StoreError::io(&tmp, e.into_error()))?;
        file.sync_all().map_err(|e| StoreError::io(&tmp, e))?;
        fs::rename(&tmp, &p).map_err(|e| StoreError::io(&p, e))
    }

    /// Remove every generation's file but `generation`'s (after its manifest is on disk).
    pub(super) fn remove_others(dir: &Path, generation: u64) {
        let keep = file_name(generation);
        if let Ok(rd) = fs::read_dir(dir) {
            for e in rd.flatten() {
                let name = e.file_name().to_string_lossy().into_owned();
                if name.starts_with("vocabulary-") && name != keep {
                    let _ = fs::remove_file(e.path());
                }
            }
        }
    }

    /// Forget a file (read again from the start, or gone).
    pub(super) fn forget(&mut self, path: &str) {
        if let Some(f) = self.files.remove(path) {
            self.held = self.held.saturating_sub(f.items());
        }
        if let Some(b) = self.frozen_at.remove(path) {
            if let Some(batch) = self.frozen.get_mut(&b) {
                batch.dropped.insert(path.to_string());
            }
        }
    }

    /// A writer is about to add to `path`: its entry comes back into memory if it was
    /// compressed, and when memory holds more than [`HOLD`] items the other files' entries are
    /// compressed.
    pub(super) fn focus(&mut self, path: &str) -> Result<(), StoreError> {
        if self.current == path {
            return Ok(());
        }
        if let Some(b) = self.frozen_at.get(path).copied() {
            if let Some(batch) = self.frozen.remove(&b) {
                self.thaw(batch)?;
            }
        }
        if self.held > HOLD {
            self.freeze_all_but(path)?;
        }
        self.current = path.to_string();
        Ok(())
    }

    /// Compress the entries of every file in memory but `keep` into one batch.
    fn freeze_all_but(&mut self, keep: &str) -> Result<(), StoreError> {
        let kept = self.files.remove(keep);
        let files = std::mem::take(&mut self.files);
        if files.is_empty() {
            if let Some(f) = kept {
                self.files.insert(keep.to_string(), f);
            }
            return Ok(());
        }
        let json = members_json(&files)?;
        let frame =
            zstd::bulk::compress(&json, LEVEL).map_err(|e| StoreError::io("vocabulary", e))?;
        let id = self.next_batch;
        self.next_batch += 1;
        let paths: Vec<String> = files.into_keys().collect();
        for p in &paths {
            self.frozen_at.insert(p.clone(), id);
        }
        self.frozen.insert(
            id,
            Batch {
                frame,
                paths,
                dropped: BTreeSet::new(),
            },
        );
        self.held = 0;
        if let Some(f) = kept {
            self.held = f.items();
            self.files.insert(keep.to_string(), f);
        }
        Ok(())
    }

    /// Bring a batch's entries (but those forgotten) back into memory.
    fn thaw(&mut self, batch: Batch) -> Result<(), StoreError> {
        for p in &batch.paths {
            self.frozen_at.remove(p);
        }
        for (path, f) in batch.entries()? {
            self.held += f.items();
            self.files.insert(path, f);
        }
        Ok(())
    }

    /// Count the heads of stored claims' slots under their file.
    pub(super) fn add_claims(&mut self, path: &str, claims: &[Claim]) {
        let f = self.files.entry(path.to_string()).or_default();
        let before = f.items();
        for c in claims {
            for s in [&c.cause, &c.effect] {
                if s.head_key.is_empty() {
                    continue;
                }
                let head = if s.head_key == s.key {
                    ""
                } else {
                    s.head_key.as_str()
                };
                let heads = f.heads.entry(s.key.clone()).or_default();
                match heads.iter_mut().find(|(h, _)| h == head) {
                    Some((_, n)) => *n += 1,
                    None => heads.push((head.to_string(), 1)),
                }
            }
        }
        self.held += f.items() - before;
    }

    /// Add the abbreviation definitions of one sentence of document `doc` of file `path`.
    pub(super) fn add_sentence(
        &mut self,
        path: &str,
        doc: &str,
        text: &str,
        normalizer: &Normalizer,
    ) {
        if !text.contains('(') {
            return;
        }
        let defs = abbrev::definitions(text);
        if defs.is_empty() {
            return;
        }
        let f = self.files.entry(path.to_string()).or_default();
        let before = f.items();
        for d in defs {
            let s = StoredDefinition {
                doc: doc.to_string(),
                long_key: normalizer.key(&d.long),
                short: d.short,
                long: d.long,
            };
            // A definition names its document, and a document's sentences arrive together,
            // so a repeat can only be among the last definitions, those of this document:
            // searching the whole list made a one-file dump of many documents quadratic (a
            // 1.3 GB JSON Lines dump spent 93% of its scan comparing definitions).
            let repeat = f
                .definitions
                .iter()
                .rev()
                .take_while(|d| d.doc == s.doc)
                .any(|d| *d == s);
            if !s.long_key.is_empty() && !repeat {
                f.definitions.push(s);
            }
        }
        self.held += f.items() - before;
    }

    /// The definitions pooled per corpus, long-form keys through `resolve` (the aliases in
    /// force), in file order.
    pub fn abbreviations(&self, resolve: impl Fn(&str) -> String) -> Abbreviations {
        let mut out = Abbreviations::default();
        for f in self.files.values() {
            for d in &f.definitions {
                out.add_form(&d.doc, &d.short, &d.long, &resolve(&d.long_key));
            }
        }
        out
    }

    /// Each variable key with the head key most of its claim slots have (ties: the shorter
    /// head, then the first in order), over every file.
    pub fn heads(&self) -> HashMap<String, String> {
        let mut pooled: HashMap<&str, BTreeMap<&str, u64>> = HashMap::new();
        for f in self.files.values() {
            for (key, heads) in &f.heads {
                let e = pooled.entry(key.as_str()).or_default();
                for (h, n) in heads {
                    let h = if h.is_empty() {
                        key.as_str()
                    } else {
                        h.as_str()
                    };
                    *e.entry(h).or_default() += u64::from(*n);
                }
            }
        }
        pooled
            .into_iter()
            .filter_map(|(key, heads)| {
                heads
                    .into_iter()
                    .max_by(|a, b| {
                        a.1.cmp(&b.1)
                            .then_with(|| b.0.len().cmp(&a.0.len()))
                            .then_with(|| b.0.cmp(a.0))
                    })
                    .map(|(h, _)| (key.to_string(), h.to_string()))
            })
            .collect()
    }
}

impl Store {
    /// The store's vocabulary: each file's abbreviation definitions and variable heads, as the
    /// last scan or merge stored them.
    pub fn vocabulary(&self) -> Result<Vocabulary, StoreError> {
        Vocabulary::load(&self.dir, &self.manifest)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::patterns::PatternSet;

    fn claim(cause: (&str, &str), effect: (&str, &str)) -> Claim {
        serde_json::from_value(serde_json::json!({
            "schema": crate::claim::SCHEMA_VERSION,
            "cause": {"text": cause.0, "key": cause.0, "start": 0, "end": 1, "head": cause.1, "head_key": cause.1},
            "effect": {"text": effect.0, "key": effect.0, "start": 2, "end": 3, "head": effect.1, "head_key": effect.1},
            "kind": "causal", "polarity": "increase", "modality": "asserted", "cue": "raise",
            "sentence": "s", "source": {"path": "a.txt", "line": 1, "column": 1, "start": 0, "end": 1},
            "confidence": 0.5,
        }))
        .unwrap()
    }

    /// A key's head is the one most of its slots have over every file; a slot without
    /// qualifiers votes for the key itself; a forgotten file no longer votes.
    #[test]
    fn heads_are_voted_over_files_and_forgotten_with_them() {
        let mut v = Vocabulary::default();
        v.add_claims("a.txt", &[claim(("x in y", "x"), ("z", "z"))]);
        v.add_claims("b.txt", &[claim(("x in y", "x"), ("z", "z"))]);
        v.add_claims("c.txt", &[claim(("x in y", "x in y"), ("z", "z"))]);
        let h = v.heads();
        assert_eq!(h["x in y"], "x");
        assert_eq!(h["z"], "z");
        assert_eq!(v.files["a.txt"].heads["z"], vec![(String::new(), 1)]);
        v.forget("a.txt");
        // One vote each: the shorter head wins the tie.
        assert_eq!(v.heads()["x in y"], "x");
        v.forget("b.txt");
        assert_eq!(v.heads()["x in y"], "x in y");
    }

    /// Entries compressed out of memory come back when their file is added to again, stay
    /// forgotten when it is forgotten, and are written with the rest.
    #[test]
    fn compressed_entries_are_written_brought_back_and_forgotten() {
        let mut v = Vocabulary::default();
        for p in ["a.txt", "b.txt", "c.txt", "d.txt"] {
            v.add_claims(p, &[claim((p, p), ("z", "z"))]);
        }
        v.freeze_all_but("d.txt").unwrap();
        assert_eq!(v.files.keys().collect::<Vec<_>>(), ["d.txt"]);
        v.forget("b.txt");
        v.focus("a.txt").unwrap();
        v.add_claims("a.txt", &[claim(("a.txt", "a.txt"), ("y", "y"))]);
        assert!(v.files.contains_key("c.txt"), "the batch comes back whole");
        v.freeze_all_but("a.txt").unwrap();
        v.forget("c.txt");
        let dir = tempfile::tempdir().unwrap();
        v.write(dir.path(), 1).unwrap();
        let m = Manifest {
            generation: 1,
            files: ["a.txt", "b.txt", "c.txt", "d.txt"]
                .iter()
                .map(|p| crate::store::FileEntry::new(p))
                .collect(),
            ..Manifest::default()
        };
        let back = Vocabulary::load(dir.path(), &m).unwrap();
        assert_eq!(back.files.keys().collect::<Vec<_>>(), ["a.txt", "d.txt"]);
        // What a.txt had before it was compressed, and what was added after it came back.
        let keys: Vec<&String> = back.files["a.txt"].heads.keys().collect();
        assert_eq!(keys, ["a.txt", "y", "z"]);
        // All forgotten: still a valid file.
        let mut w = Vocabulary::default();
        w.add_claims("a.txt", &[claim(("a.txt", "a.txt"), ("z", "z"))]);
        w.add_claims("b.txt", &[claim(("b.txt", "b.txt"), ("z", "z"))]);
        w.freeze_all_but("b.txt").unwrap();
        w.forget("a.txt");
        w.forget("b.txt");
        w.write(dir.path(), 2).unwrap();
        let m = Manifest { generation: 2, ..m };
        assert!(Vocabulary::load(dir.path(), &m).unwrap().files.is_empty());
    }

    /// Definitions are kept once per document, with their long form's key, and pooled per
    /// corpus with the documents defining each meaning.
    #[test]
    fn definitions_are_kept_once_and_pooled() {
        let set = PatternSet::builtin().unwrap();
        let n = Normalizer::new(&set.lexicon);
        let mut v = Vocabulary::default();
        let s = "Soil organic carbon (SOC) rose, and SOC (soil organic carbon) fell.";
        v.add_sentence("a.txt", "a.txt", s, &n);
        v.add_sentence("a.txt", "a.txt", s, &n);
        v.add_sentence("b.txt", "b.txt", "Reactive oxygen species (ROS) rose.", &n);
        v.add_sentence("b.txt", "b.txt", "No parenthesis here.", &n);
        assert_eq!(
            v.files["a.txt"].definitions.len(),
            2,
            "{:?}",
            v.files["a.txt"]
        );
        assert_eq!(
            v.files["a.txt"].definitions[0].long_key,
            n.key("soil organic carbon")
        );
        let pooled: Vec<_> = v.abbreviations(|k| k.to_string()).uses().collect();
        let soc = pooled.iter().find(|u| u.short == "SOC").unwrap();
        assert_eq!(soc.longs, vec![("Soil organic carbon".to_string(), 1)]);
        assert!(pooled.iter().any(|u| u.short == "ROS"));
    }
}
