//! Integration tests: the real `hearsay` binary over the demo corpus, temporary stores and the
//! shared external datasets. One binary, topic modules.

mod aggregates;
mod common;
mod compare;
mod compare_stats;
mod confidence;
mod crash;
mod external;
mod first_use;
mod graph;
mod graph_analyses;
mod groups;
mod hostile;
mod layering;
mod link;
mod merge;
mod pair_fast;
mod quality;
mod readers_generated;
mod readers_jsonl;
mod readers_props;
mod readers_real;
mod report_html;
mod spark;
mod store;
mod subcommands;
mod usable;
mod variables;
