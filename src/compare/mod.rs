//! Set a model's answers to causal questions beside what the corpus states.
//!
//! hearsay never calls a model: the user answers the questions of `hearsay questions` in any way
//! they like, and this module reads those answers ([`AnswerSet::read`], [`read_answers`]), gives
//! every question the corpus's support profile ([`profiles`]), and summarises how closely the
//! answers follow it ([`summarise`]). Support is computed from the claim graph and one index
//! query per variable ([`MentionIndex`](crate::query::MentionIndex)), never by a scan per pair,
//! so hundreds of pairs cost about as much as one.
//!
//! The files follow the steps: `questions` makes the question set, `answers` reads and resolves
//! the answers, `load` reads both for a loaded store (as `compare` and `report --compare` do),
//! `profile` holds the corpus side of each question, `summary` the statistics over the answers,
//! and `stats` the statistics themselves.
//!
//! The public face: [`AnswerSource`], [`AnswerSet`], [`Corpus`], [`profiles`], [`pair_views`],
//! [`summarise`] and their result types; [`questions`] (the question set, also read by
//! `hearsay questions`) and [`stats`] are modules of their own.
//!
//! Agreement with the corpus means the answer follows what the text states. It is not
//! correctness: the corpus's statements are not evidence that the causation is real.

mod answers;
mod load;
mod profile;
pub mod questions;
pub mod stats;
mod summary;
#[cfg(test)]
mod tests;

pub use answers::{asked, parse_answer, read_answers, Answer, AnswerContext, Asked, Label};
pub use load::{AnswerSet, AnswerSource};
pub use profile::{implied, pair_views, profiles, Corpus, PairView, Profile};
pub use summary::{summarise, CalibrationBin, Comparison, Summary, WordingRow};
