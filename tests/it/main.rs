//! Integration tests: the real `hearsay` binary over the demo corpus, temporary stores and the
//! shared external datasets. One binary, topic modules.

mod common;
mod external;
mod graph;
mod hostile;
mod quality;
mod report_html;
mod store;
mod subcommands;
