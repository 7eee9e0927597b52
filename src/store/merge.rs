//! Building a store from `extract` shards (the reduce step): the records `extract` writes, and
//! the merge that streams them into a new store.

use super::manifest::{FileEntry, Manifest};
use super::rows::doc_id;
use super::writer::StoreWriter;
use crate::claim::Claim;
use crate::error::StoreError;
use crate::patterns::PatternSet;
use serde::{Deserialize, Serialize};
use std::collections::HashMap;

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
enum ShardLine {
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
