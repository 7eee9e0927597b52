//! Typed errors of the library. The binary wraps them with `anyhow` context; the library never
//! prints and never exits.

use std::path::PathBuf;

/// Errors from reading one input file. They are per file: the run records them and goes on.
#[derive(Debug, thiserror::Error)]
pub enum ReadError {
    #[error("cannot read: {0}")]
    Io(#[from] std::io::Error),
    #[error("binary file (skipped): {0}")]
    Binary(String),
    #[error("{0}")]
    Malformed(String),
    #[error("no text: {0}")]
    NoText(String),
    #[error("too large: {0}")]
    TooLarge(String),
}

/// Errors from the claim store.
#[derive(Debug, thiserror::Error)]
pub enum StoreError {
    #[error("no store at {0} (run `hearsay scan PATH...` first, or pass --store DIR)")]
    Missing(PathBuf),
    #[error("store {path}: {message}")]
    Corrupt { path: PathBuf, message: String },
    /// Another process holds the store's lock file (a scan or merge is writing it).
    #[error("{lock}: another scan is writing this store; wait for it to finish (the lock is released when that process exits)")]
    Locked { lock: PathBuf },
    #[error("store {path}: {source}")]
    Io {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("search index: {0}")]
    Index(#[from] tantivy::TantivyError),
    /// A line of an `extract` shard that is not a claim, sentence or file record.
    #[error("{path}:{line}: {message}")]
    Shard {
        path: String,
        line: usize,
        message: String,
    },
    /// A part store `link` cannot join: not a store, locked, or at odds with another part.
    #[error("part {part}: {reason}")]
    Part { part: PathBuf, reason: String },
    #[error(
        "store {path} has schema {found}, this hearsay reads {expected}; rescan into a new store"
    )]
    Version {
        path: PathBuf,
        found: u32,
        expected: u32,
    },
    #[error(
        "store {path} holds claims of schema {found}, this hearsay reads schema {expected} \
(the README's \"Output schema\" says what changed); delete the folder and scan again: \
hearsay scan PATH... --store {path}"
    )]
    ClaimSchema {
        path: PathBuf,
        found: u32,
        expected: u32,
    },
}

impl StoreError {
    pub(crate) fn io(path: impl Into<PathBuf>, source: std::io::Error) -> Self {
        StoreError::Io {
            path: path.into(),
            source,
        }
    }
}

/// Why a scan stopped. Nothing of it was committed: the store stays as it was.
#[derive(Debug, thiserror::Error)]
pub enum ScanError {
    #[error("cannot write to the store")]
    Write(#[source] StoreError),
    #[error("cannot commit the store")]
    Commit(#[source] StoreError),
    #[error(transparent)]
    Store(#[from] StoreError),
}

/// Errors from a data file the user gives or the tool ships: pattern files, labelled (gold) data,
/// variable and pair lists, answer files, reference diagrams. Every message names the file and the
/// line (or record) at fault.
#[derive(Debug, thiserror::Error)]
pub enum InputError {
    #[error("{path}:{line}: {message}")]
    Invalid {
        path: PathBuf,
        line: usize,
        message: String,
    },
    #[error("cannot read {path}: {source}")]
    Io {
        path: PathBuf,
        source: std::io::Error,
    },
}

impl InputError {
    pub(crate) fn invalid(
        path: impl AsRef<std::path::Path>,
        line: usize,
        message: impl Into<String>,
    ) -> Self {
        InputError::Invalid {
            path: path.as_ref().to_path_buf(),
            line,
            message: message.into(),
        }
    }
}
