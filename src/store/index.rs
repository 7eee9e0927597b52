//! The search index: one tantivy document per sentence, so that co-mention queries can find
//! the sentences that name two variables. Its analyzer stems words exactly as variable keys are
//! stemmed, so a key's words are the index's terms and a query needs no analysis of its own.

use crate::error::StoreError;
use crate::variables::StemCache;
use std::collections::{BTreeSet, HashSet};
use std::fs;
use std::path::{Path, PathBuf};
use tantivy::collector::DocSetCollector;
use tantivy::columnar::StrColumn;
use tantivy::query::{BooleanQuery, Occur, Query, TermQuery};
use tantivy::schema::{Field, IndexRecordOption, Schema, TextFieldIndexing, TextOptions, FAST};
use tantivy::store::{Compressor, ZstdCompressor};
use tantivy::tokenizer::{
    LowerCaser, SimpleTokenizer, StopWordFilter, TextAnalyzer, Token, TokenFilter, TokenStream,
    Tokenizer,
};
use tantivy::{DocAddress, Index, IndexSettings, ReloadPolicy, Searcher, Term};

const TOKENIZER: &str = "hearsay_en";

#[derive(Clone, Copy)]
pub(super) struct Fields {
    pub(super) path: Field,
    pub(super) file: Field,
    pub(super) text: Field,
    pub(super) line: Field,
    pub(super) start: Field,
}

impl Fields {
    /// The fields of an opened index (by name, as the index's own schema numbers them).
    pub(super) fn of(index: &Index) -> Fields {
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
    // The two identifiers are indexed as one token each, with no field norms (0.5 MB of the
    // eLife index as `STRING` gives them).
    let id = || {
        TextOptions::default().set_indexing_options(
            TextFieldIndexing::default()
                .set_tokenizer("raw")
                .set_index_option(IndexRecordOption::Basic)
                .set_fieldnorms(false),
        )
    };
    let path = b.add_text_field("path", id() | FAST);
    let file = b.add_text_field("file", id());
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
pub(super) fn analyzer(unindexed: &[String]) -> TextAnalyzer {
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

/// The settings of a new index. Its document store holds no field (see [`schema`]), yet it
/// keeps a 4-byte offset per document, which lz4 hardly shrinks: about 0.97 MB of the eLife
/// store's 28. zstd at level 9 makes it 0.49 MB. Indexes made with lz4 stay readable.
fn settings() -> IndexSettings {
    IndexSettings {
        docstore_compression: Compressor::Zstd(ZstdCompressor {
            compression_level: Some(9),
        }),
        ..IndexSettings::default()
    }
}

/// Open (or with `create`, create) the store's index. `unindexed` only matters for writing:
/// queries look terms up directly.
pub(super) fn open_index(
    dir: &Path,
    create: bool,
    unindexed: &[String],
) -> Result<Index, StoreError> {
    let idx_dir = dir.join("index");
    let exists = idx_dir.join("meta.json").exists();
    let index = if exists {
        Index::open_in_dir(&idx_dir)?
    } else if create {
        fs::create_dir_all(&idx_dir).map_err(|e| StoreError::io(&idx_dir, e))?;
        Index::builder()
            .schema(schema().0)
            .settings(settings())
            .create_in_dir(&idx_dir)?
    } else {
        return Err(StoreError::Corrupt {
            path: idx_dir,
            message: "search index missing".into(),
        });
    };
    register_tokenizer(&index, unindexed);
    Ok(index)
}

/// The index terms of a variable key (keys are already stemmed: split, do not stem again).
pub fn key_terms(key: &str) -> Vec<String> {
    key.split(' ')
        .filter(|t| !t.is_empty())
        .map(str::to_string)
        .collect()
}

fn searcher_segments(s: &Searcher) -> usize {
    s.segment_readers().len()
}

/// The index of a store opened for queries.
pub(super) struct SentenceIndex {
    /// Kept open for as long as its searcher is used.
    _index: Index,
    /// One view of the index for the life of the query, so that positions found by one call
    /// name the same sentences in the next (a scan committing meanwhile changes nothing here).
    searcher: Searcher,
    fields: Fields,
    dir: PathBuf,
}

impl SentenceIndex {
    /// Open the index of the store at `dir` for queries.
    pub(super) fn open(dir: &Path) -> Result<SentenceIndex, StoreError> {
        let index = open_index(dir, false, &[])?;
        let searcher = index
            .reader_builder()
            .reload_policy(ReloadPolicy::Manual)
            .try_into()?
            .searcher();
        let fields = Fields::of(&index);
        Ok(SentenceIndex {
            _index: index,
            searcher,
            fields,
            dir: dir.to_path_buf(),
        })
    }

    fn terms_query(&self, groups: &[&[String]]) -> Option<Box<dyn Query>> {
        let mut clauses: Vec<(Occur, Box<dyn Query>)> = Vec::new();
        for g in groups {
            if g.is_empty() {
                return None;
            }
            for t in *g {
                let term = Term::from_field_text(self.fields.text, t);
                clauses.push((
                    Occur::Must,
                    Box::new(TermQuery::new(term, IndexRecordOption::Basic)),
                ));
            }
        }
        Some(Box::new(BooleanQuery::new(clauses)))
    }

    /// The (document, sentence start) of every sentence that contains every term of each group.
    pub(super) fn sentence_ids_with(
        &self,
        groups: &[&[String]],
    ) -> Result<BTreeSet<(String, u64)>, StoreError> {
        self.sentence_ids_at(&self.positions_with(groups)?)
    }

    /// Where in the index every sentence containing every term of each group is, sorted: a
    /// sentence's position is its index segment × 2³² + its document number there, 8
    /// bytes, where its (document, start) is a string and a number.
    pub(super) fn positions_with(&self, groups: &[&[String]]) -> Result<Vec<u64>, StoreError> {
        let Some(q) = self.terms_query(groups) else {
            return Ok(Vec::new());
        };
        let mut hits: Vec<u64> = self
            .searcher
            .search(&q, &DocSetCollector)?
            .into_iter()
            .map(|a| (u64::from(a.segment_ord) << 32) | u64::from(a.doc_id))
            .collect();
        hits.sort_unstable();
        Ok(hits)
    }

    /// The (path ordinal, sentence start) of the sentences at `positions` (from
    /// [`Self::positions_with`]), sorted, handed to `each` with their index segment's path
    /// column, one index segment at a time (ordinals are numbers of that segment's dictionary).
    fn sentences_by_segment(
        &self,
        positions: &[u64],
        mut each: impl FnMut(&StrColumn, Vec<(u64, u64)>) -> Result<(), StoreError>,
    ) -> Result<(), StoreError> {
        let searcher = &self.searcher;
        let mut hits: Vec<DocAddress> = positions
            .iter()
            .map(|&p| DocAddress::new((p >> 32) as u32, (p & 0xffff_ffff) as u32))
            .filter(|a| (a.segment_ord as usize) < searcher_segments(searcher))
            .collect();
        hits.sort_unstable();
        let column_error = |e: tantivy::TantivyError| StoreError::Corrupt {
            path: self.dir.join("index"),
            message: format!("sentence columns: {e}"),
        };
        for seg in hits.chunk_by(|a, b| a.segment_ord == b.segment_ord) {
            let columns = searcher.segment_reader(seg[0].segment_ord).fast_fields();
            let starts = columns.u64("start").map_err(column_error)?;
            let Some(paths) = columns.str("path").map_err(column_error)? else {
                continue;
            };
            let mut found: Vec<(u64, u64)> = seg
                .iter()
                .filter_map(|addr| {
                    Some((
                        paths.term_ords(addr.doc_id).next()?,
                        starts.first(addr.doc_id)?,
                    ))
                })
                .collect();
            found.sort_unstable();
            each(&paths, found)?;
        }
        Ok(())
    }

    /// How many of the sentences at `positions` are not among `except` (document, sentence
    /// start): the same count as [`Self::sentence_ids_at`] less `except`, without making a
    /// document id for each sentence. The few excepted documents are looked up in each index
    /// segment's path dictionary instead, and sentences are compared by path ordinal.
    pub(super) fn count_except(
        &self,
        positions: &[u64],
        except: &HashSet<(&str, u64)>,
    ) -> Result<usize, StoreError> {
        let mut count = 0;
        self.sentences_by_segment(positions, |paths, mut found| {
            let mut skip: HashSet<(u64, u64)> = HashSet::with_capacity(except.len());
            for &(doc, start) in except {
                let ord = paths
                    .dictionary()
                    .term_ord(doc)
                    .map_err(|e| StoreError::io(self.dir.join("index"), e))?;
                if let Some(ord) = ord {
                    skip.insert((ord, start));
                }
            }
            found.dedup();
            count += found.iter().filter(|f| !skip.contains(f)).count();
            Ok(())
        })?;
        Ok(count)
    }

    /// The (document, sentence start) of the sentences at `positions` (from
    /// [`Self::positions_with`]).
    pub(super) fn sentence_ids_at(
        &self,
        positions: &[u64],
    ) -> Result<BTreeSet<(String, u64)>, StoreError> {
        let mut out = BTreeSet::new();
        self.sentences_by_segment(positions, |paths, found| {
            // Each path is looked up once, in ordinal order, in one pass over the dictionary
            // (a look-up by ordinal alone reads its dictionary block from the start).
            let mut ords: Vec<u64> = found.iter().map(|f| f.0).collect();
            ords.dedup();
            let mut names: Vec<String> = Vec::with_capacity(ords.len());
            paths
                .dictionary()
                .sorted_ords_to_term_cb(&ords, |b| {
                    names.push(String::from_utf8_lossy(b).into_owned())
                })
                .map_err(|e| StoreError::io(self.dir.join("index"), e))?;
            for (ord, start) in found {
                if let Some(name) = ords.binary_search(&ord).ok().and_then(|i| names.get(i)) {
                    out.insert((name.clone(), start));
                }
            }
            Ok(())
        })?;
        Ok(out)
    }
}

/// The sentence index of a store being linked from parts (see `link`): the parts' index
/// segments are added to the output's index as they are (tantivy segments are immutable files
/// named by a unique id), and one meta file lists them all.
pub(super) struct IndexLink {
    dir: PathBuf,
    meta: tantivy::IndexMeta,
    /// The meta and managed-files list before the link, to put back on failure.
    old_meta: Vec<u8>,
    old_managed: Option<Vec<u8>>,
    managed: BTreeSet<PathBuf>,
}

/// tantivy's list of the files it manages (and may delete once no segment uses them).
const MANAGED: &str = ".managed.json";

impl IndexLink {
    /// The output store's index (created if need be); it must hold no sentences.
    pub(super) fn open(out: &Path) -> Result<IndexLink, StoreError> {
        let index = open_index(out, true, &[])?;
        let meta = index.load_metas()?;
        let dir = out.join("index");
        if !meta.segments.is_empty() {
            return Err(StoreError::Corrupt {
                path: dir,
                message: "the search index already holds sentences; link into a new store".into(),
            });
        }
        let meta_path = dir.join("meta.json");
        let old_meta = fs::read(&meta_path).map_err(|e| StoreError::io(&meta_path, e))?;
        let managed_path = dir.join(MANAGED);
        let old_managed = fs::read(&managed_path).ok();
        let managed = match &old_managed {
            Some(bytes) => serde_json::from_slice(bytes).map_err(|e| StoreError::Corrupt {
                path: managed_path.clone(),
                message: e.to_string(),
            })?,
            None => BTreeSet::new(),
        };
        Ok(IndexLink {
            dir,
            meta,
            old_meta,
            old_managed,
            managed,
        })
    }

    /// Add the index segments of the part store at `part`: its segment files are given to
    /// `place` (which hard-links or copies them into the output index and remembers them), and
    /// its segments join the meta. Its schema and settings must be the output's.
    pub(super) fn add(
        &mut self,
        part: &Path,
        mut place: impl FnMut(&Path, &Path) -> Result<(), StoreError>,
    ) -> Result<(), StoreError> {
        let from = part.join("index");
        if !from.join("meta.json").exists() {
            return Err(StoreError::Corrupt {
                path: from,
                message: "search index missing".into(),
            });
        }
        let meta = Index::open_in_dir(&from)?.load_metas()?;
        if meta.schema != self.meta.schema || meta.index_settings != self.meta.index_settings {
            return Err(StoreError::Corrupt {
                path: from,
                message: "the search index has another schema or other settings than this \
                          hearsay writes"
                    .into(),
            });
        }
        for file in meta.list_segment_files() {
            let src = from.join(&file);
            // The list names every file a segment may have; those it has are on disk.
            if src.exists() {
                place(&src, &self.dir.join(&file))?;
                self.managed.insert(file);
            }
        }
        self.meta.opstamp = self.meta.opstamp.max(meta.opstamp);
        self.meta.segments.extend(meta.segments);
        Ok(())
    }

    /// Write the meta file that makes the added segments the index's, with `payload` (the
    /// store generation, as a scan's commit writes it).
    pub(super) fn commit(&mut self, payload: &str) -> Result<(), StoreError> {
        self.meta.payload = Some(payload.to_string());
        let mut managed: BTreeSet<PathBuf> = self.managed.clone();
        managed.insert(PathBuf::from("meta.json"));
        let corrupt = |e: serde_json::Error| StoreError::Corrupt {
            path: self.dir.clone(),
            message: e.to_string(),
        };
        let mut list = serde_json::to_vec(&managed).map_err(corrupt)?;
        list.push(b'\n');
        super::manifest::write_atomic(&self.dir.join(MANAGED), &list)?;
        let mut meta = serde_json::to_vec_pretty(&self.meta).map_err(corrupt)?;
        meta.push(b'\n');
        super::manifest::write_atomic(&self.dir.join("meta.json"), &meta)
    }

    /// Put the meta and managed-files list back as they were before the link.
    pub(super) fn restore(&self) {
        let _ = super::manifest::write_atomic(&self.dir.join("meta.json"), &self.old_meta);
        let managed = self.dir.join(MANAGED);
        match &self.old_managed {
            Some(bytes) => {
                let _ = super::manifest::write_atomic(&managed, bytes);
            }
            None => {
                let _ = fs::remove_file(managed);
            }
        }
    }
}
