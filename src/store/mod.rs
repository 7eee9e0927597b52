//! The claim store: what `scan` writes and every query command reads.
//!
//! Layout of a store directory (`.hearsay/` by default):
//!
//! ```text
//! manifest.json      the one file that says what the store holds (written last, atomically)
//! seg-NNNNNN.jsonl.zst  full claim records, one JSON object a line (the documented schema),
//!                    zstd-compressed in blocks of about 128 KiB (one frame a block), so that
//!                    `zstdcat` gives the JSON Lines and a claim is read by decompressing its
//!                    block only
//! seg-NNNNNN.rows    the same claims in compact form (postcard records in zstd blocks of
//!                    about 8 KiB, see `rows`), for rebuilding the graph fast
//! seg-NNNNNN.post    postings: each variable key of the segment and the rows naming it, so a
//!                    query about a few variables reads only their rows (see `postings`)
//! seg-NNNNNN.<live>.agg  the segment's aggregate tables over its live rows (see `aggregates`)
//! summed.<live>.agg  their sum, when there are two or more segments (see `compact`)
//! index/             a tantivy index with one entry per sentence, for search and co-mentions
//! vocabulary-NNNNNN.json.zst  per file, the abbreviations its documents define and the heads
//!                    of its variable keys, for the generation NNNNNN (see `vocabulary`)
//! aliases.tsv        the alias file given to `scan --aliases`, if any
//! lock               held while a scan writes
//! ```
//!
//! Segments are immutable: a re-scan writes one new segment for the files that changed and keeps
//! pointing at the old segments for the rest. The manifest is replaced by an atomic rename after
//! everything it refers to is on disk, so a scan killed at any point leaves the previous manifest,
//! and with it the previous complete store, in force. The search index commits before the manifest;
//! if a scan dies between the two, the next scan re-indexes the files the manifest does not know.
//!
//! The files follow that layout and the life of a store: `manifest` (the commit point), `rows`
//! (the compact claim rows), `index` (the sentence index and its analyzer), `read` (a store
//! opened for queries), `result` (one file's results waiting to be written), `writer` (a new
//! segment and the commit), `scan` (the incremental scan that drives the writer) and `merge`
//! (the same writer fed from `extract` shards).
//!
//! The public face: [`Store`] for reading, [`scan()`] with its [`ScanOptions`] and
//! [`ScanEvents`] for building a store from files, [`StoreWriter`] and [`Merge`] for building
//! one from shards, the records `extract` writes for `merge` ([`SentenceRecord`],
//! [`FileStart`], [`FileRecord`]), and the stored types ([`Manifest`], [`FileEntry`],
//! [`ClaimRow`], [`ClaimRef`]). The store reads files through [`crate::corpus`] and extracts
//! with [`crate::extract`]; it never uses the graph or anything above it.

mod aggregates;
mod compact;
mod index;
mod link;
mod manifest;
mod merge;
mod postings;
mod read;
mod result;
mod rows;
mod scan;
mod vocabulary;
mod writer;

#[cfg(test)]
mod tests;

pub use aggregates::{
    weight_class, Aggregator, Grid, KeyAggregate, Profile, RelationAggregate, SegmentAggregates,
};
pub use compact::compact;
pub use index::key_terms;
pub use link::{link, LinkReport};
pub use manifest::{FileEntry, Manifest};
pub use merge::{FileRecord, FileStart, Merge, SentenceRecord};
pub use read::{PostingIndex, Store, TableScope};
#[cfg(test)]
pub(crate) use rows::test_row;
pub use rows::{doc_id, ClaimRef, ClaimRow};
pub use scan::{scan, ScanEvents, ScanOptions, ScanReport};
pub use vocabulary::{FileVocabulary, StoredDefinition, Vocabulary};
pub use writer::StoreWriter;
