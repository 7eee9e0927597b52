//! hearsay finds explicit cause-and-effect statements in text and aggregates them into a claim
//! graph, keeping every claim's sentence and location.
//!
//! A claim is a statement found in text. It is not evidence that the causation is real, and
//! nothing hearsay reports is advice.
//!
//! The pipeline reads top to bottom, one module per stage:
//! [`corpus`] (files → documents) → [`sentences`] → [`cues`] (cue matches) → [`claims`] →
//! [`normalize`] (variable keys) → [`store`] → [`graph`] → the reports in [`report`].
//! [`pipeline`] chains the per-document stages; [`patterns`] loads the data files they use.

pub mod analysis;
pub mod claims;
pub mod comention;
pub mod compare;
pub mod confidence;
pub mod corpus;
pub mod cues;
pub mod error;
pub mod eval;
pub mod export;
pub mod gold;
pub mod graph;
pub mod html;
pub mod model;
pub mod normalize;
pub mod patterns;
pub mod pipeline;
pub mod questions;
pub mod readers;
pub mod report;
pub mod score;
pub mod sentences;
pub mod spaneval;
pub mod stats;
pub mod store;
pub mod tagger;
#[cfg(test)]
mod testdata;
pub mod weight;

pub use model::{Claim, Kind, Modality, Polarity, SCHEMA_VERSION};
