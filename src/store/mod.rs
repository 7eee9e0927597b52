//! The claim store: what `scan` writes and every query command reads.
//!
//! Layout of a store directory (`.hearsay/` by default):
//!
//! ```text
//! manifest.json      the one file that says what the store holds (written last, atomically)
//! seg-NNNNNN.jsonl   full claim records, one JSON object a line (the documented schema)
//! seg-NNNNNN.rows    the same claims in compact form (postcard records back to back), for
//!                    rebuilding the graph fast
//! index/             a tantivy index with one entry per sentence, for search and co-mentions
//! aliases.tsv        the alias file given to `scan --aliases`, if any
//! lock               held while a scan writes
//! ```
//!
//! Segments are immutable: a re-scan writes one new segment for the files that changed and keeps
//! pointing at the old segments for the rest. The manifest is replaced by an atomic rename after
//! everything it refers to is on disk, so a scan killed at any point leaves the previous manifest,
//! and with it the previous complete store, in force. The search index commits before the manifest;
//! if a scan dies between the two, the next scan re-indexes the files the manifest does not know.

mod rows;

#[cfg(test)]
pub(crate) use rows::test_row;
pub use rows::{doc_id, ClaimRef, ClaimRow};

use crate::claim::Claim;
use crate::corpus::Skipped;
use crate::error::StoreError;
use crate::patterns::{Lexicon, PatternSet};
use crate::variables::StemCache;
use serde::{Deserialize, Serialize};
use std::collections::{BTreeMap, BTreeSet, HashMap};
use std::fs::{self, File};
use std::io::{BufWriter, Read, Seek, SeekFrom, Write};
use std::path::{Path, PathBuf};
use tantivy::collector::DocSetCollector;
use tantivy::query::{BooleanQuery, Occur, Query, TermQuery};
use tantivy::schema::{
    Field, IndexRecordOption, Schema, TextFieldIndexing, TextOptions, FAST, STRING,
};
use tantivy::tokenizer::{
    LowerCaser, SimpleTokenizer, StopWordFilter, TextAnalyzer, Token, TokenFilter, TokenStream,
    Tokenizer,
};
use tantivy::DocAddress;
use tantivy::{doc, Index, IndexReader, IndexWriter, Term};

/// Version of the store layout. Bump on any incompatible change. 2: index terms are stemmed by
/// the variable-key stemmer (they were stemmed by a newer Snowball, which differs on words such
/// as "organism" and "internal", so queries by key missed their sentences). 3: the index keeps a
/// sentence's path, line and start as columns and no stored fields, so a version 2 index has
/// nothing a co-mention query can read. 4: rows are written as claims arrive (postcard records
/// back to back, no count first), a file may have several row ranges (`merge` of a path that
/// recurs), and every sentence carries its file as a term, so replacing a file drops all its
/// sentences (version 3 deleted by the new content's document ids, which kept the sentences of
/// records a changed file no longer has).
pub const STORE_VERSION: u32 = 4;
const TOKENIZER: &str = "hearsay_en";

/// One input file as the store knows it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileEntry {
    pub path: String,
    pub size: u64,
    /// Modification time in nanoseconds since the epoch, for the cheap "unchanged" check.
    pub mtime_ns: u128,
    /// BLAKE3 of the content, for the exact one.
    pub hash: String,
    pub documents: u64,
    pub sentences: u64,
    pub claims: u64,
    /// Which segment holds this file's claims, and which rows of it.
    pub segment: u32,
    pub rows: (u64, u64),
    /// Further row ranges in the same segment, after `rows` (a path whose records `merge` met
    /// in more than one place).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub more_rows: Vec<(u64, u64)>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub warnings: Vec<String>,
}

/// What the store holds.
#[derive(Debug, Clone, Default, Serialize, Deserialize)]
pub struct Manifest {
    pub store_version: u32,
    pub claim_schema: u32,
    pub generation: u64,
    pub hearsay_version: String,
    pub patterns: String,
    /// The pattern set's fingerprint ([`PatternSet::fingerprint`]) the files were read with.
    #[serde(default)]
    pub patterns_fingerprint: String,
    pub files: Vec<FileEntry>,
    /// Files the last scan passed over, with reasons.
    pub skipped: Vec<Skipped>,
    /// Files the last scan could not read, with reasons.
    pub failed: Vec<Skipped>,
}

impl FileEntry {
    /// A file about to be read: known metadata, nothing stored yet.
    pub fn new(path: &str) -> FileEntry {
        FileEntry {
            path: path.to_string(),
            size: 0,
            mtime_ns: 0,
            hash: String::new(),
            documents: 0,
            sentences: 0,
            claims: 0,
            segment: 0,
            rows: (0, 0),
            more_rows: Vec::new(),
            warnings: Vec::new(),
        }
    }

    /// The file's row ranges in its segment, in order.
    pub fn row_ranges(&self) -> impl Iterator<Item = (u64, u64)> + '_ {
        std::iter::once(self.rows).chain(self.more_rows.iter().copied())
    }
}

impl Manifest {
    pub fn segments(&self) -> BTreeSet<u32> {
        self.files
            .iter()
            .filter(|f| f.claims > 0)
            .map(|f| f.segment)
            .collect()
    }
    pub fn totals(&self) -> (u64, u64, u64) {
        self.files.iter().fold((0, 0, 0), |(d, s, c), f| {
            (d + f.documents, s + f.sentences, c + f.claims)
        })
    }
}

/// A store opened for reading.
pub struct Store {
    pub dir: PathBuf,
    pub manifest: Manifest,
    index: Option<(Index, IndexReader, Fields)>,
}

#[derive(Clone, Copy)]
struct Fields {
    path: Field,
    file: Field,
    text: Field,
    line: Field,
    start: Field,
}

impl Fields {
    /// The fields of an opened index (by name, as the index's own schema numbers them).
    fn of(index: &Index) -> Fields {
        let s = index.schema();
        let f = schema().1;
        Fields {
            path: s.get_field("path").unwrap_or(f.path),
            file: s.get_field("file").unwrap_or(f.file),
            text: s.get_field("text").unwrap_or(f.text),
            line: s.get_field("line").unwrap_or(f.line),
            start: s.get_field("start").unwrap_or(f.start),
        }
    }
}

/// One index document per sentence. Its text is indexed, not stored, and its path, line and start
/// are columns (fast fields), not stored either: co-mention queries only need which sentences
/// match, and reading columns is far cheaper than decoding stored documents (stored fields were
/// 60 of the 69 MB of the eLife index). No field norms: nothing is ranked. `file` (indexed
/// only) is the input file the sentence came from, for dropping a file's sentences.
fn schema() -> (Schema, Fields) {
    let mut b = Schema::builder();
    let text_opts = TextOptions::default().set_indexing_options(
        TextFieldIndexing::default()
            .set_tokenizer(TOKENIZER)
            .set_index_option(IndexRecordOption::Basic)
            .set_fieldnorms(false),
    );
    let path = b.add_text_field("path", STRING | FAST);
    let file = b.add_text_field("file", STRING);
    let text = b.add_text_field("text", text_opts);
    let line = b.add_u64_field("line", FAST);
    let start = b.add_u64_field("start", FAST);
    (
        b.build(),
        Fields {
            path,
            file,
            text,
            line,
            start,
        },
    )
}

fn register_tokenizer(index: &Index, unindexed: &[String]) {
    index.tokenizers().register(TOKENIZER, analyzer(unindexed));
}

/// The index's analyzer: words split at anything not alphanumeric, lower-cased, the words no key
/// contains (`unindexed`, see [`crate::variables::dropped_words`]) left out, and the rest stemmed
/// exactly as variable keys are (so a key's words are the index's terms). Leaving out "the",
/// "of" and the like saved about a third of the postings work on eLife text.
fn analyzer(unindexed: &[String]) -> TextAnalyzer {
    TextAnalyzer::builder(SimpleTokenizer::default())
        .filter(LowerCaser)
        .filter(StopWordFilter::remove(unindexed.iter().cloned()))
        .filter(KeyStemmer)
        .build()
}

/// Stems index tokens with [`crate::variables::stem`], the stemmer of variable keys. Each
/// tokenizer (one per indexing thread) remembers the stems of the words it has seen: stemming
/// was the largest single cost of indexing.
#[derive(Clone, Copy)]
struct KeyStemmer;

/// Words whose stems one tokenizer remembers before it starts over (about 8 MB at most).
const STEM_CACHE_WORDS: usize = 100_000;

impl TokenFilter for KeyStemmer {
    type Tokenizer<T: Tokenizer> = KeyStemmerFilter<T>;

    fn transform<T: Tokenizer>(self, inner: T) -> KeyStemmerFilter<T> {
        KeyStemmerFilter {
            inner,
            stems: StemCache::new(STEM_CACHE_WORDS),
        }
    }
}

struct KeyStemmerFilter<T> {
    inner: T,
    stems: StemCache,
}

/// A copy starts with no remembered stems: copies go to other threads, and stems are cheap to
/// learn again.
impl<T: Clone> Clone for KeyStemmerFilter<T> {
    fn clone(&self) -> Self {
        KeyStemmerFilter {
            inner: self.inner.clone(),
            stems: StemCache::new(STEM_CACHE_WORDS),
        }
    }
}

impl<T: Tokenizer> Tokenizer for KeyStemmerFilter<T> {
    type TokenStream<'a> = KeyStemmerStream<'a, T::TokenStream<'a>>;

    fn token_stream<'a>(&'a mut self, text: &'a str) -> Self::TokenStream<'a> {
        KeyStemmerStream {
            tail: self.inner.token_stream(text),
            stems: &mut self.stems,
            word: String::new(),
        }
    }
}

struct KeyStemmerStream<'a, T> {
    tail: T,
    stems: &'a mut StemCache,
    /// The token's word while its stem is written into the token (both buffers are reused).
    word: String,
}

impl<T: TokenStream> TokenStream for KeyStemmerStream<'_, T> {
    fn advance(&mut self) -> bool {
        if !self.tail.advance() {
            return false;
        }
        let token = self.tail.token_mut();
        std::mem::swap(&mut token.text, &mut self.word);
        token.text.clear();
        self.stems.push(&self.word, &mut token.text);
        true
    }

    fn token(&self) -> &Token {
        self.tail.token()
    }

    fn token_mut(&mut self) -> &mut Token {
        self.tail.token_mut()
    }
}

/// Open (or with `create`, create) the store's index. `unindexed` only matters for writing:
/// queries look terms up directly.
fn open_index(dir: &Path, create: bool, unindexed: &[String]) -> Result<Index, StoreError> {
    let idx_dir = dir.join("index");
    let exists = idx_dir.join("meta.json").exists();
    let index = if exists {
        Index::open_in_dir(&idx_dir)?
    } else if create {
        fs::create_dir_all(&idx_dir).map_err(|e| StoreError::io(&idx_dir, e))?;
        Index::create_in_dir(&idx_dir, schema().0)?
    } else {
        return Err(StoreError::Corrupt {
            path: idx_dir,
            message: "search index missing".into(),
        });
    };
    register_tokenizer(&index, unindexed);
    Ok(index)
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

fn seg_name(seg: u32, ext: &str) -> String {
    format!("seg-{seg:06}.{ext}")
}

/// Write `bytes` to `path` atomically: a temporary file, fsync, rename.
fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), StoreError> {
    let tmp = path.with_extension("tmp");
    let mut f = File::create(&tmp).map_err(|e| StoreError::io(&tmp, e))?;
    f.write_all(bytes)
        .and_then(|_| f.sync_all())
        .map_err(|e| StoreError::io(&tmp, e))?;
    fs::rename(&tmp, path).map_err(|e| StoreError::io(path, e))?;
    if let Some(parent) = path.parent() {
        if let Ok(d) = File::open(parent) {
            let _ = d.sync_all();
        }
    }
    Ok(())
}

impl Store {
    /// Open an existing store.
    pub fn open(dir: &Path) -> Result<Store, StoreError> {
        let mpath = dir.join("manifest.json");
        if !mpath.exists() {
            return Err(StoreError::Missing(dir.to_path_buf()));
        }
        let text = fs::read_to_string(&mpath).map_err(|e| StoreError::io(&mpath, e))?;
        let manifest: Manifest = serde_json::from_str(&text).map_err(|e| StoreError::Corrupt {
            path: mpath.clone(),
            message: e.to_string(),
        })?;
        if manifest.store_version != STORE_VERSION {
            return Err(StoreError::Version {
                path: dir.to_path_buf(),
                found: manifest.store_version,
                expected: STORE_VERSION,
            });
        }
        // Claim records and rows of another schema cannot be read (rows are postcard, which has
        // no field names): the store must be rebuilt.
        if manifest.claim_schema != crate::claim::SCHEMA_VERSION {
            return Err(StoreError::ClaimSchema {
                path: dir.to_path_buf(),
                found: manifest.claim_schema,
                expected: crate::claim::SCHEMA_VERSION,
            });
        }
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

    fn index(&mut self) -> Result<&(Index, IndexReader, Fields), StoreError> {
        if self.index.is_none() {
            let index = open_index(&self.dir, false, &[])?;
            let reader = index.reader()?;
            let fields = Fields::of(&index);
            self.index = Some((index, reader, fields));
        }
        self.index.as_ref().ok_or_else(|| StoreError::Corrupt {
            path: self.dir.clone(),
            message: "index".into(),
        })
    }

    fn terms_query(fields: &Fields, groups: &[&[String]]) -> Option<Box<dyn Query>> {
        let mut clauses: Vec<(Occur, Box<dyn Query>)> = Vec::new();
        for g in groups {
            if g.is_empty() {
                return None;
            }
            for t in *g {
                let term = Term::from_field_text(fields.text, t);
                clauses.push((
                    Occur::Must,
                    Box::new(TermQuery::new(term, IndexRecordOption::Basic)),
                ));
            }
        }
        Some(Box::new(BooleanQuery::new(clauses)))
    }

    /// The (document, sentence start) of every sentence that contains every term of each group
    /// (terms are stemmed keys' words).
    pub fn sentence_ids_with(
        &mut self,
        groups: &[&[String]],
    ) -> Result<BTreeSet<(String, u64)>, StoreError> {
        let (_, reader, fields) = self.index()?;
        let fields = *fields;
        let mut out = BTreeSet::new();
        let Some(q) = Self::terms_query(&fields, groups) else {
            return Ok(out);
        };
        let searcher = reader.searcher();
        let mut hits: Vec<DocAddress> =
            searcher.search(&q, &DocSetCollector)?.into_iter().collect();
        hits.sort_unstable();
        let column_error = |e: tantivy::TantivyError| StoreError::Corrupt {
            path: self.dir.join("index"),
            message: format!("sentence columns: {e}"),
        };
        let mut path = String::new();
        for seg in hits.chunk_by(|a, b| a.segment_ord == b.segment_ord) {
            let columns = searcher.segment_reader(seg[0].segment_ord).fast_fields();
            let starts = columns.u64("start").map_err(column_error)?;
            let Some(paths) = columns.str("path").map_err(column_error)? else {
                continue;
            };
            // Sentences of one document are neighbours: look each path up once.
            let mut last_ord = None;
            for addr in seg {
                let (Some(ord), Some(start)) = (
                    paths.term_ords(addr.doc_id).next(),
                    starts.first(addr.doc_id),
                ) else {
                    continue;
                };
                if last_ord != Some(ord) {
                    path.clear();
                    paths
                        .ord_to_str(ord, &mut path)
                        .map_err(|e| StoreError::io(self.dir.join("index"), e))?;
                    last_ord = Some(ord);
                }
                out.insert((path.clone(), start));
            }
        }
        Ok(out)
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
struct RowView<'a> {
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
    fn to_row(&self) -> Result<ClaimRow, std::string::FromUtf8Error> {
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

/// The result of reading one changed file, ready to be written. A large file's results need not
/// wait in memory for its end: [`FileResult::spill`] moves what is held so far to an unnamed
/// temporary file in the store's folder, and [`StoreWriter::put`] reads it back in order. The
/// file's old claims and sentences stay until then, so a file that fails part-way loses nothing
/// already stored.
#[derive(Debug, Default)]
pub struct FileResult {
    pub entry: Option<FileEntry>,
    claims: Vec<Claim>,
    /// (document id, line, start, text) of every sentence, for the index.
    sentences: Vec<(String, u64, u64, String)>,
    /// About how many bytes `claims` and `sentences` hold.
    held: usize,
    spilled: Option<Spilled>,
}

/// What a file's result moved to disk: records back to back, each a tag byte (`c` a claim as
/// JSON, `s` a sentence as postcard), a little-endian u32 length and the bytes.
#[derive(Debug)]
struct Spilled {
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

/// A scan's writer: holds the lock, writes a new segment and index entries as files come, and
/// switches the store to them at commit. Claims and rows go to disk as they are added, so its
/// memory is the file entries and the index writer's budget, whatever the corpus size.
pub struct StoreWriter {
    dir: PathBuf,
    _lock: File,
    pub old: Manifest,
    segment: u32,
    jsonl: Option<BufWriter<File>>,
    rows_out: Option<BufWriter<File>>,
    /// Rows written to the new segment so far.
    rows: u64,
    offset: u64,
    index_writer: IndexWriter,
    fields: Fields,
    entries: BTreeMap<String, FileEntry>,
    removed: BTreeSet<String>,
}

impl StoreWriter {
    /// Open or create the store at `dir` for writing, taking its lock. The sentence index leaves
    /// out the words that no key of `lexicon` contains.
    pub fn open(
        dir: &Path,
        heap_bytes: usize,
        lexicon: &Lexicon,
    ) -> Result<StoreWriter, StoreError> {
        let unindexed: Vec<String> = crate::variables::dropped_words(lexicon).collect();
        fs::create_dir_all(dir).map_err(|e| StoreError::io(dir, e))?;
        let lock_path = dir.join("lock");
        let lock = File::create(&lock_path).map_err(|e| StoreError::io(&lock_path, e))?;
        lock.try_lock().map_err(|_| StoreError::Corrupt {
            path: dir.to_path_buf(),
            message: "another scan is writing this store".into(),
        })?;
        let old = match Store::open(dir) {
            Ok(s) => s.manifest,
            Err(StoreError::Missing(_)) => Manifest::default(),
            Err(e) => return Err(e),
        };
        let index = open_index(dir, true, &unindexed)?;
        // Indexing costs about half what extraction does (eLife: 2.5 against 4.9 CPU-seconds),
        // so one indexing thread per three workers keeps up; one a core (tantivy's default)
        // only competed with extraction: 10% more CPU, 20 MB more memory, twice the segments.
        let threads = rayon::current_num_threads().div_ceil(3).clamp(1, 8);
        let index_writer: IndexWriter =
            index.writer_with_num_threads(threads, heap_bytes.max(15_000_000))?;
        let fields = Fields::of(&index);
        // A new segment number above every one on disk (live or left by a killed scan).
        let mut segment = old.segments().iter().max().copied().unwrap_or(0) + 1;
        if let Ok(rd) = fs::read_dir(dir) {
            for e in rd.flatten() {
                let name = e.file_name().to_string_lossy().into_owned();
                if let Some(n) = name
                    .strip_prefix("seg-")
                    .and_then(|r| r.split('.').next())
                    .and_then(|n| n.parse::<u32>().ok())
                {
                    segment = segment.max(n + 1);
                }
            }
        }
        let entries = old
            .files
            .iter()
            .map(|f| (f.path.clone(), f.clone()))
            .collect();
        Ok(StoreWriter {
            dir: dir.to_path_buf(),
            _lock: lock,
            old,
            segment,
            jsonl: None,
            rows_out: None,
            rows: 0,
            offset: 0,
            index_writer,
            fields,
            entries,
            removed: BTreeSet::new(),
        })
    }

    /// The entry the store has for a path.
    pub fn known(&self, path: &str) -> Option<&FileEntry> {
        self.entries.get(path)
    }

    /// Keep a file's entry with new metadata (its content was unchanged).
    pub fn touch(&mut self, entry: FileEntry) {
        self.entries.insert(entry.path.clone(), entry);
    }

    /// Forget a file that is gone.
    pub fn remove(&mut self, path: &str) -> Result<(), StoreError> {
        self.entries.remove(path);
        self.removed.insert(path.to_string());
        self.index_writer
            .delete_term(Term::from_field_text(self.fields.file, path));
        Ok(())
    }

    /// Start a file afresh: its old claims and sentences are dropped, and what [`Self::append`]
    /// adds next belongs to it. `entry` carries the file's metadata and counts.
    pub fn begin(&mut self, mut entry: FileEntry) {
        self.index_writer
            .delete_term(Term::from_field_text(self.fields.file, &entry.path));
        entry.claims = 0;
        entry.segment = 0;
        entry.rows = (self.rows, self.rows);
        entry.more_rows.clear();
        self.removed.remove(&entry.path);
        self.entries.insert(entry.path.clone(), entry);
    }

    /// The entry of a file begun in this writer, to update its counts.
    pub fn entry_mut(&mut self, path: &str) -> Option<&mut FileEntry> {
        self.entries.get_mut(path)
    }

    /// Add claims to a file (begun with [`Self::begin`], or new: then it gets an entry with no
    /// metadata). Claims added to a file after another file's keep their order in a second row
    /// range.
    pub fn append_claims(&mut self, path: &str, claims: &[Claim]) -> Result<(), StoreError> {
        if claims.is_empty() {
            return Ok(());
        }
        if !self.entries.contains_key(path) {
            self.begin(FileEntry::new(path));
        }
        let corrupt = |dir: &Path, e: postcard::Error| StoreError::Corrupt {
            path: dir.to_path_buf(),
            message: e.to_string(),
        };
        if self.jsonl.is_none() {
            let p = self.dir.join(seg_name(self.segment, "jsonl"));
            self.jsonl = Some(BufWriter::new(
                File::create(&p).map_err(|e| StoreError::io(&p, e))?,
            ));
            let p = self.dir.join(seg_name(self.segment, "rows"));
            self.rows_out = Some(BufWriter::new(
                File::create(&p).map_err(|e| StoreError::io(&p, e))?,
            ));
        }
        let first = self.rows;
        let (Some(w), Some(rw)) = (self.jsonl.as_mut(), self.rows_out.as_mut()) else {
            return Ok(());
        };
        let mut line = Vec::new();
        for c in claims {
            line.clear();
            serde_json::to_writer(&mut line, c).map_err(|e| StoreError::Corrupt {
                path: self.dir.clone(),
                message: e.to_string(),
            })?;
            line.push(b'\n');
            w.write_all(&line)
                .map_err(|e| StoreError::io(&self.dir, e))?;
            let at = ClaimRef {
                segment: self.segment,
                offset: self.offset,
                len: (line.len() - 1) as u32,
            };
            self.offset += line.len() as u64;
            postcard::to_io(&ClaimRow::from_claim(c, at), &mut *rw)
                .map_err(|e| corrupt(&self.dir, e))?;
            self.rows += 1;
        }
        let (segment, rows) = (self.segment, self.rows);
        if let Some(entry) = self.entries.get_mut(path) {
            entry.segment = segment;
            entry.claims += claims.len() as u64;
            match entry.more_rows.last_mut() {
                Some(r) if r.1 == first => r.1 = rows,
                Some(_) => entry.more_rows.push((first, rows)),
                None if entry.rows.1 == first => entry.rows.1 = rows,
                None => entry.more_rows.push((first, rows)),
            }
        }
        Ok(())
    }

    /// Add one sentence of `file` to the search index (`id`: its document id).
    pub fn add_sentence(
        &mut self,
        file: &str,
        id: &str,
        line: u64,
        start: u64,
        text: &str,
    ) -> Result<(), StoreError> {
        let f = self.fields;
        self.index_writer.add_document(
            doc!(f.path => id, f.file => file, f.text => text, f.line => line, f.start => start),
        )?;
        Ok(())
    }

    /// Replace one file's claims and sentences: what it spilled first, then what it holds.
    pub fn put(&mut self, result: FileResult) -> Result<(), StoreError> {
        let Some(entry) = result.entry else {
            return Ok(());
        };
        let path = entry.path.clone();
        self.begin(entry);
        if let Some(sp) = result.spilled {
            self.put_spilled(&path, sp)?;
        }
        self.append_claims(&path, &result.claims)?;
        for (id, line, start, text) in &result.sentences {
            self.add_sentence(&path, id, *line, *start, text)?;
        }
        Ok(())
    }

    /// Read a spill file back into the store, in the order it was written.
    fn put_spilled(&mut self, path: &str, sp: Spilled) -> Result<(), StoreError> {
        let dir = sp.dir;
        let mut f = sp
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
                        self.append_claims(path, &claims)?;
                        claims.clear();
                    }
                }
                b's' => {
                    let (id, line, start, text): (&str, u64, u64, &str) =
                        postcard::from_bytes(&buf).map_err(|e| corrupt_spill(&dir, e))?;
                    self.add_sentence(path, id, line, start, text)?;
                }
                t => return Err(corrupt_spill(&dir, format!("unknown record tag {t}"))),
            }
        }
        self.append_claims(path, &claims)
    }

    /// Make everything durable and switch the store to the new manifest. Returns it.
    pub fn commit(
        mut self,
        patterns: &PatternSet,
        skipped: Vec<Skipped>,
        failed: Vec<Skipped>,
    ) -> Result<Manifest, StoreError> {
        for w in [self.jsonl.take(), self.rows_out.take()]
            .into_iter()
            .flatten()
        {
            let f = w
                .into_inner()
                .map_err(|e| StoreError::io(&self.dir, e.into_error()))?;
            f.sync_all().map_err(|e| StoreError::io(&self.dir, e))?;
        }
        let generation = self.old.generation + 1;
        let mut prepared = self.index_writer.prepare_commit()?;
        prepared.set_payload(&generation.to_string());
        prepared.commit()?;
        let manifest = Manifest {
            store_version: STORE_VERSION,
            claim_schema: crate::claim::SCHEMA_VERSION,
            generation,
            hearsay_version: env!("CARGO_PKG_VERSION").to_string(),
            patterns: patterns.origin.clone(),
            patterns_fingerprint: patterns.fingerprint.clone(),
            files: self.entries.into_values().collect(),
            skipped,
            failed,
        };
        let json = serde_json::to_vec_pretty(&manifest).map_err(|e| StoreError::Corrupt {
            path: self.dir.clone(),
            message: e.to_string(),
        })?;
        write_atomic(&self.dir.join("manifest.json"), &json)?;
        // Segments nothing refers to any more (and leftovers of killed scans) can go.
        let live = manifest.segments();
        if let Ok(rd) = fs::read_dir(&self.dir) {
            for e in rd.flatten() {
                let name = e.file_name().to_string_lossy().into_owned();
                if let Some(n) = name
                    .strip_prefix("seg-")
                    .and_then(|r| r.split('.').next())
                    .and_then(|n| n.parse::<u32>().ok())
                {
                    if !live.contains(&n) {
                        let _ = fs::remove_file(e.path());
                    }
                }
            }
        }
        Ok(manifest)
    }

    /// Discard a failed scan: nothing is committed, the previous store stays.
    pub fn abandon(mut self) {
        let _ = self.index_writer.rollback();
    }
}

/// A sentence record of `extract --sentences`: one entry of the search index.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct SentenceRecord {
    /// The document id (path, plus `#record` for many-documents-per-file formats).
    pub sentence_of: String,
    pub line: u64,
    pub start: u64,
    /// The sentence with whitespace runs collapsed, as the index stores it.
    pub text: String,
}

/// The record of `extract --sentences` that opens one input file's sentence records.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileStart {
    pub begin_file: String,
}

/// A file record of `extract --sentences`: closes one input file's records.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
pub struct FileRecord {
    pub file: String,
    pub documents: u64,
    pub sentences: u64,
    /// Bytes of text the readers produced.
    pub bytes: u64,
}

/// One line of an `extract` shard.
#[derive(Debug, Deserialize)]
#[serde(untagged)]
pub enum ShardLine {
    Claim(Box<Claim>),
    Sentence(SentenceRecord),
    File(FileRecord),
    Start(FileStart),
}

/// What a merge has seen of one path.
#[derive(Debug, Default)]
struct MergedPath {
    /// It had a file record (and so exact document and sentence counts).
    closed: bool,
    /// It had a `begin_file` record: its extract run wrote sentences.
    started: bool,
    /// Documents its claims named, counted where the document id changes (a document's claims
    /// are neighbours in a shard): the document count of a path without a file record.
    claim_docs: u64,
    last_doc: String,
}

/// Writes `extract` shards into a new store as they are read (the reduce step).
///
/// Claims go to the store's segment as they come, grouped by file path in the manifest; records
/// of one path may come from several shards (standard input split into partitions gives every
/// partition the path `-`) and keep their arrival order, so shards given in corpus order give
/// rows in corpus order. Sentences go to the index as they come, under the file their
/// `begin_file` record named. Memory holds one entry per path, not the merged output. Shards
/// of older versions without `begin_file` records still merge: their sentences wait for the file
/// record that names their file.
pub struct Merge {
    writer: StoreWriter,
    paths: HashMap<String, MergedPath>,
    /// The file whose sentence records are being read.
    current: Option<String>,
    /// Sentence records with no `begin_file` before them, waiting for their file record.
    pending: Vec<SentenceRecord>,
    pub claims: u64,
}

impl Merge {
    /// Merge into `writer`'s store, which must hold no files (else the writer is given up).
    pub fn new(writer: StoreWriter) -> Result<Merge, StoreError> {
        if !writer.old.files.is_empty() {
            let path = writer.dir.clone();
            writer.abandon();
            return Err(StoreError::Corrupt {
                path,
                message: "the store already holds files; merge into a new store".into(),
            });
        }
        Ok(Merge {
            writer,
            paths: HashMap::new(),
            current: None,
            pending: Vec::new(),
            claims: 0,
        })
    }

    /// Add the lines of one shard (`name` is used in error messages).
    pub fn read(&mut self, name: &str, input: impl std::io::BufRead) -> Result<(), StoreError> {
        for (i, line) in input.lines().enumerate() {
            let shard_error = |message: String| StoreError::Shard {
                path: name.to_string(),
                line: i + 1,
                message,
            };
            let line = line.map_err(|e| shard_error(e.to_string()))?;
            if line.trim().is_empty() {
                continue;
            }
            let rec: ShardLine = serde_json::from_str(&line).map_err(|e| {
                shard_error(format!(
                    "not a claim, sentence or file record of `hearsay extract`: {e}"
                ))
            })?;
            self.record(rec)?;
        }
        Ok(())
    }

    fn record(&mut self, rec: ShardLine) -> Result<(), StoreError> {
        match rec {
            ShardLine::Claim(c) => {
                let p = self.paths.entry(c.source.path.clone()).or_default();
                let id = doc_id(&c.source.path, c.source.record.as_deref());
                if p.last_doc != id || p.claim_docs == 0 {
                    p.claim_docs += 1;
                    p.last_doc = id;
                }
                self.writer
                    .append_claims(&c.source.path, std::slice::from_ref(&*c))?;
                self.claims += 1;
            }
            ShardLine::Start(s) => {
                self.paths.entry(s.begin_file.clone()).or_default().started = true;
                self.current = Some(s.begin_file);
            }
            ShardLine::Sentence(s) => match &self.current {
                Some(file) => {
                    self.writer
                        .add_sentence(file, &s.sentence_of, s.line, s.start, &s.text)?
                }
                None => self.pending.push(s),
            },
            ShardLine::File(f) => {
                for s in std::mem::take(&mut self.pending) {
                    self.writer
                        .add_sentence(&f.file, &s.sentence_of, s.line, s.start, &s.text)?;
                }
                self.current = None;
                self.paths.entry(f.file.clone()).or_default().closed = true;
                if self.writer.entry_mut(&f.file).is_none() {
                    self.writer.begin(FileEntry::new(&f.file));
                }
                if let Some(e) = self.writer.entry_mut(&f.file) {
                    e.documents += f.documents;
                    e.sentences += f.sentences;
                    e.size += f.bytes;
                }
            }
        }
        Ok(())
    }

    /// Paths without a file record: those whose sentences began (their `extract` stopped
    /// part-way through them), sorted, and the number that had no sentence records at all
    /// (shards written without `--sentences`).
    pub fn unclosed(&self) -> (Vec<&str>, usize) {
        let mut cut: Vec<&str> = self
            .paths
            .iter()
            .filter(|(_, p)| !p.closed && p.started)
            .map(|(k, _)| k.as_str())
            .collect();
        cut.sort_unstable();
        let bare = self
            .paths
            .values()
            .filter(|p| !p.closed && !p.started)
            .count();
        (cut, bare)
    }

    /// Paths merged.
    pub fn files(&self) -> usize {
        self.paths.len()
    }

    /// Commit the store. Paths without a file record count the documents their claims name.
    pub fn commit(mut self, patterns: &PatternSet) -> Result<Manifest, StoreError> {
        if !self.pending.is_empty() {
            let n = self.pending.len();
            self.writer.abandon();
            return Err(StoreError::Shard {
                path: "-".into(),
                line: 0,
                message: format!(
                    "{n} sentence records after the last file record (a truncated shard?)"
                ),
            });
        }
        for (path, p) in &self.paths {
            if !p.closed {
                if let Some(e) = self.writer.entry_mut(path) {
                    e.documents = p.claim_docs;
                }
            }
        }
        self.writer.commit(patterns, Vec::new(), Vec::new())
    }

    /// Give up: nothing is committed.
    pub fn abandon(self) {
        self.writer.abandon();
    }
}

/// The index terms of a variable key (keys are already stemmed: split, do not stem again).
pub fn key_terms(key: &str) -> Vec<String> {
    key.split(' ')
        .filter(|t| !t.is_empty())
        .map(str::to_string)
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::claim::{Kind, Modality, Polarity};

    fn terms_of(a: &mut TextAnalyzer, text: &str) -> Vec<String> {
        let mut ts = a.token_stream(text);
        let mut out = Vec::new();
        while ts.advance() {
            out.push(ts.token().text.clone());
        }
        out
    }

    /// The analyzer a scan with the built-in patterns writes with.
    fn builtin_analyzer() -> TextAnalyzer {
        let lexicon = crate::patterns::PatternSet::builtin().unwrap().lexicon;
        let unindexed: Vec<String> = crate::variables::dropped_words(&lexicon).collect();
        analyzer(&unindexed)
    }

    /// Co-mention queries look sentences up by the words of variable keys, so every word of a
    /// key must be a term of the sentence it came from. Checked on every line of 150 eLife
    /// articles (990 open-access articles; ../shared/data/elife-articles/SOURCE.txt). A stemmer
    /// other than the keys' one fails here: a newer Snowball English keeps "organism" and
    /// "internal" whole where the keys' Porter2 gives "organ" and "intern".
    #[test]
    fn key_words_are_index_terms_on_elife_text() {
        let articles = crate::testdata::elife_articles(150);
        if articles.is_empty() {
            return;
        }
        let norm = crate::variables::Normalizer::new(
            &crate::patterns::PatternSet::builtin().unwrap().lexicon,
        );
        let mut a = builtin_analyzer();
        let mut index_terms = |text: &str| terms_of(&mut a, text);
        let (mut lines, mut words) = (0usize, 0usize);
        for (path, text) in &articles {
            for line in text.lines().filter(|l| !l.trim().is_empty()) {
                lines += 1;
                let terms: BTreeSet<String> = index_terms(line).into_iter().collect();
                for w in norm.terms(line) {
                    words += 1;
                    // Keys keep apostrophes inside a word ("don't"); the index splits there.
                    if w.contains(['\'', '’']) {
                        continue;
                    }
                    assert!(
                        terms.contains(&w),
                        "{}: key word {w:?} is not an index term of {line:?}",
                        path.display()
                    );
                }
            }
        }
        assert!(
            lines > 1000 && words > 100_000,
            "{lines} lines, {words} words"
        );
        for (word, stem) in [
            ("organisms", "organ"),
            ("internal", "intern"),
            ("added", "ad"),
        ] {
            assert_eq!(index_terms(word), [stem]);
            assert_eq!(norm.terms(word), [stem]);
        }
    }

    /// The remembered stems are the stems: the same terms with a cold and a warm cache.
    #[test]
    fn remembered_stems_equal_fresh_ones() {
        let text = "Rising temperatures increased the flowering of the flowers; it rises.";
        let mut a = analyzer(&[]);
        let first = terms_of(&mut a, text);
        let second = terms_of(&mut a, text);
        assert_eq!(first, second);
        assert_eq!(
            first,
            [
                "rise",
                "temperatur",
                "increas",
                "the",
                "flower",
                "of",
                "the",
                "flower",
                "it",
                "rise"
            ]
        );
    }

    /// Words no key contains are not index terms; the words around them still are, and a word
    /// that only stems like a dropped one ("doe" is not "does") stays.
    #[test]
    fn words_no_key_contains_are_not_indexed() {
        let mut a = builtin_analyzer();
        let mut index_terms = |text: &str| terms_of(&mut a, text);
        assert_eq!(
            index_terms("The rise of THE temperatures in its way, and it's a doe."),
            ["rise", "temperatur", "doe"]
        );
        let lexicon = crate::patterns::PatternSet::builtin().unwrap().lexicon;
        let norm = crate::variables::Normalizer::new(&lexicon);
        let mut n = 0;
        for w in crate::variables::dropped_words(&lexicon) {
            n += 1;
            assert!(index_terms(&w).is_empty(), "{w:?} is indexed");
            assert!(norm.terms(&w).is_empty(), "{w:?} is a key word");
        }
        assert!(n > 50, "{n} dropped words");
    }

    fn row(i: u64, cause: &str) -> ClaimRow {
        ClaimRow {
            effect: "effect ünïcode".into(),
            cause_text: format!("The {cause}"),
            effect_text: "effects".into(),
            kind: if i.is_multiple_of(2) {
                Kind::Causal
            } else {
                Kind::Association
            },
            cue: "leads to".into(),
            line: i as u32 + 1,
            sentence: i * 1000,
            at: ClaimRef {
                segment: 3,
                offset: i * 77,
                len: 70,
            },
            confidence: 0.25 + i as f32,
            ..test_row(
                cause,
                "",
                Polarity::Decrease,
                Modality::Hedged,
                &format!("d{i}.txt#r"),
            )
        }
    }

    #[test]
    fn rows_decoded_in_place_equal_the_owned_rows() {
        let rows: Vec<ClaimRow> = (0..5).map(|i| row(i, &format!("c{i}"))).collect();
        let bytes = postcard::to_stdvec(&rows).unwrap();
        let views: Vec<RowView> = postcard::from_bytes(&bytes).unwrap();
        let back: Vec<ClaimRow> = views.iter().map(|v| v.to_row().unwrap()).collect();
        assert_eq!(back, rows);
    }
}
