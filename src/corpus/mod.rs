//! The corpus stage: which files to read, and how each becomes one or more documents.
//!
//! Inputs are the paths on the command line, walked recursively (hidden files, `.gitignore`d and
//! `.hearsayignore`d files skipped), plus `-` for standard input. A [`Reader`] turns one file's
//! bytes into [`Document`]s. A reader may emit many documents per file (a JSON Lines dump holds
//! one per record) and may report per-page offsets (PDF), which is why documents are pushed to a
//! callback rather than returned one per file. Per-file failures are values, never panics or
//! aborts: the caller records them and goes on with the next file.
//!
//! The files: `document` holds what the readers and the reading code share (the document, the
//! input, the options, the [`Reader`] trait), so that the `readers` need nothing else of this
//! stage; `format` chooses a reader; `decompress` undoes compression within a cap; `read`
//! reads one input; `batches` reads a stream in batches of documents on a thread of its own;
//! `walk` finds the inputs; `panics` keeps a reader's panic to its file.
//!
//! The public face: the types of `document`, [`discover`] (the walk), [`read_input`] and
//! [`read_from`] (one input, whole), [`streams`], [`read_batched`] and
//! [`read_batched_hashed`] (one input in batches), [`quiet_contained_panics`] for binaries,
//! and the [`readers`] themselves (for tests and fuzzing). The corpus stage knows nothing of
//! sentences, claims or the store.

mod batches;
mod decompress;
mod document;
mod format;
mod panics;
mod read;
mod walk;

pub mod readers;

#[cfg(test)]
mod tests;

pub use batches::{read_batched, read_batched_hashed, streams};
pub use document::{
    Document, Input, InputFormat, ReadOptions, Reader, Skipped, Warnings, UNKNOWN_FORMAT,
};
pub use panics::quiet_contained_panics;
pub use read::{read_from, read_input};
pub use walk::discover;
