//! The `hearsay` command line. This file only parses arguments and dispatches; each subcommand
//! lives in `cmd/<name>.rs`.

mod cmd;

use clap::Parser;
use std::process::ExitCode;

/// The extractor makes many small, short-lived allocations (tokens, spans, claim strings);
/// jemalloc serves them faster than the system allocator, with the same output.
#[global_allocator]
static GLOBAL: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

fn main() -> ExitCode {
    let cli = cmd::Cli::parse();
    match cmd::run(cli) {
        Ok(code) => code,
        Err(err) => {
            // A closed pipe (`hearsay claims | head`) is a normal way to stop reading.
            if err.chain().any(|e| {
                e.downcast_ref::<std::io::Error>()
                    .is_some_and(|io| io.kind() == std::io::ErrorKind::BrokenPipe)
            }) {
                return ExitCode::SUCCESS;
            }
            eprintln!("hearsay: error: {err:#}");
            ExitCode::from(2)
        }
    }
}
