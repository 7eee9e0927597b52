//! Queries over a store's claim graph: what the corpus says about a pair, which relations it
//! states most, which variables it names together without a claim, and the evidence sentences
//! behind any of them.
//!
//! The graph layer below computes from rows alone; a query also reads the store, for evidence
//! text and for the sentence index. [`load`] opens a store for queries: it builds the graph once
//! and keeps the store, normaliser and aliases beside it in a [`Loaded`], whose methods answer the
//! queries. The reports themselves ([`pair_report`], [`top_relations`]) stay pure functions of a
//! graph, with evidence text passed in, so they are testable without a store. `pair` has its own
//! plan, [`PairQuery`], because it answers in milliseconds from a part of the graph.
//!
//! The public face: [`load`] and [`Loaded`]; [`lookup`] and [`VarMatch`]; [`PairQuery`],
//! [`PairReport`] and its parts; [`top_relations`]; co-mentions ([`MentionIndex`],
//! [`co_mention_pairs`], [`claim_sentences`]); evidence ([`EvidenceLine`], [`HopEvidence`]); the
//! corpus at a glance ([`corpus_summary`], [`heaviest_edges`]); and the graph's conflicts, which a
//! summary of the corpus lists beside the rest.
//!
//! Architecture invariant: queries never print; every count in a query's answer counts
//! statements in text, not evidence that a causation is real.

mod aggregate;
mod comention;
mod conflicts;
mod evidence;
mod load;
mod lookup;
mod overview;
mod pair;
mod top;
mod variables;

pub use crate::graph::{conflicts, Conflict, ConflictKind};
pub use aggregate::{aggregate, graph_from_aggregates, AggRelation, AggVariable, Aggregated};
pub use comention::{claim_sentences, co_mention_nodes, co_mention_pairs, CoMention, MentionIndex};
pub use conflicts::{ranked_conflicts, ConflictRank, RankedConflict};
pub use evidence::{EvidenceLine, HopEvidence};
pub use load::{load, load_aggregated, load_naming, load_relations, relations_graph, Loaded};
pub use lookup::{lookup, Looked, VarMatch};
pub use overview::{corpus_summary, corpus_summary_of, heaviest_edges, CorpusSummary};
pub use pair::{pair_report, DirectionSummary, Evidence, PairGraph, PairQuery, PairReport};
pub use top::{top_from_aggregates, top_relations, TopRelation};
pub use variables::{abbreviation_list, alias_file, Nearby, SortBy, VariableRow};
