#!/usr/bin/env bash
# The scale ladder: one command from a fresh clone.
#   bench/ladder.sh [--rungs 1,8,32] [--out FILE] [--keep DIR] [--runs N] [--repeat N] [--bin PATH]
#                   [--no-merge]
# Builds in release mode, writes the eLife articles as JSON Lines dumps of 1, 8 and 32 copies
# (distinct ids per copy) in a temporary folder, scans each into its own store, times the common
# queries on every store as cold processes (wall time and peak RSS, median of N runs), merges the
# top rung from one shard per copy, and writes a JSON summary to bench/results/ladder-<date>.json.
# Needs free disk for the top rung: about 1.3 GB of dump and 2 GB of store at 32x.
set -euo pipefail
cd "$(dirname "$0")/.."
[ -x /usr/bin/time ] || (apt-get update -qq && apt-get install -y -qq time)
cargo build --release --quiet
exec python3 bench/ladder.py "$@"
