//! hearsay finds explicit cause-and-effect statements in text and aggregates them into a claim
//! graph, keeping every claim's sentence and location.
//!
//! A claim is a statement found in text. It is not evidence that the causation is real, and
//! nothing hearsay reports is advice.
//!
//! The pipeline reads top to bottom, one folder per stage:
//! [`corpus`] (files → documents) → [`sentences`] → [`extract`] (cue matches → claims, with
//! [`variables`] keys) → [`store`] → [`graph`] → [`query`] → [`report`]. Beside it,
//! [`evaluate`] scores extraction and graphs against labelled data and reference diagrams, and
//! [`compare`] sets a model's answers beside what the corpus states. [`claim`] holds the claim
//! record every stage passes on, [`patterns`] the data files the stages use, [`error`] the
//! library's error types. DEVELOPERS.md has the map and the rules of the layering.

// Shared types and data, used by every stage.
pub mod claim;
pub mod error;
pub mod patterns;

// The pipeline, in order.
pub mod corpus;
pub mod extract;
pub mod graph;
pub mod query;
pub mod report;
pub mod sentences;
pub mod store;
pub mod variables;

// Beside the pipeline.
pub mod compare;
pub mod evaluate;

#[cfg(test)]
mod testdata;

pub use claim::{Claim, Kind, Modality, Polarity, SCHEMA_VERSION};
