//! Extraction: from a document's text to claims.
//!
//! pipeline (blocks around prefilter hits → sentences) → cues (cue matches) → claims (spans, sign,
//! modality) → confidence. The stage is pure: text in, claims out, no I/O and no global state.

pub mod claims;
pub mod confidence;
pub mod cues;
pub mod pipeline;
pub mod tagger;
