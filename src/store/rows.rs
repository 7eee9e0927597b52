//! Claim rows: the compact form of a stored claim that the graph is built from, and where its
//! full record lives in the store.

use crate::claim::{Claim, Kind, Modality, Polarity};
use serde::{Deserialize, Serialize};

/// Where a full claim record lives in the store: in segment `segment`'s compressed claim file,
/// the block (one zstd frame) that starts at byte `offset`, at bytes `within..within + len` of
/// the block once decompressed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
pub struct ClaimRef {
    pub segment: u32,
    pub offset: u64,
    pub within: u32,
    pub len: u32,
}

/// The compact form of a claim that the graph is built from.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClaimRow {
    pub cause: String,
    pub effect: String,
    pub cause_text: String,
    pub effect_text: String,
    pub kind: Kind,
    pub polarity: Polarity,
    pub modality: Modality,
    pub cue: String,
    /// The document: its path, plus `#record` for many-documents-per-file formats.
    pub doc: String,
    pub line: u32,
    /// Byte offset of the sentence in its document.
    pub sentence: u64,
    pub at: ClaimRef,
    /// The claim's confidence (see `crate::extract::confidence`).
    pub confidence: f32,
}

impl ClaimRow {
    pub fn from_claim(c: &Claim, at: ClaimRef) -> ClaimRow {
        ClaimRow {
            cause: c.cause.key.clone(),
            effect: c.effect.key.clone(),
            cause_text: c.cause.text.clone(),
            effect_text: c.effect.text.clone(),
            kind: c.kind,
            polarity: c.polarity,
            modality: c.modality,
            cue: c.cue.clone(),
            doc: doc_id(&c.source.path, c.source.record.as_deref()),
            line: c.source.line as u32,
            sentence: c.source.start as u64,
            at,
            confidence: c.confidence as f32,
        }
    }
}

/// The document identity used for "distinct documents".
pub fn doc_id(path: &str, record: Option<&str>) -> String {
    match record {
        Some(r) => format!("{path}#{r}"),
        None => path.to_string(),
    }
}

/// A causal claim row for unit tests: `cause → effect` with this sign and modality, stated in
/// `doc` (line 1, sentence 0, confidence 1). The one row fixture every module's tests share.
#[cfg(test)]
pub(crate) fn test_row(cause: &str, effect: &str, p: Polarity, m: Modality, doc: &str) -> ClaimRow {
    ClaimRow {
        cause: cause.into(),
        effect: effect.into(),
        cause_text: cause.into(),
        effect_text: effect.into(),
        kind: Kind::Causal,
        polarity: p,
        modality: m,
        cue: "raise".into(),
        doc: doc.into(),
        line: 1,
        sentence: 0,
        at: ClaimRef {
            segment: 0,
            offset: 0,
            within: 0,
            len: 0,
        },
        confidence: 1.0,
    }
}
